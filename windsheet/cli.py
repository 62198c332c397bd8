"""Command line: ``windsheet size | traveller | signoff | register | demo | wires | bench``.

Results go to stdout, diagnostics to stderr.  A fault in the user's input is
one line on stderr and exit status 2; nothing is written.
"""

from __future__ import annotations

import functools
import json
import sys
from pathlib import Path
from typing import Optional

import typer

from . import fmt
from .errors import InputError

app = typer.Typer(add_completion=False, no_args_is_help=True, pretty_exceptions_enable=False,
                  rich_markup_mode=None,  # plain usage errors: a few lines, no boxes
                  context_settings={"help_option_names": ["-h", "--help"]})


def _show_version(value: bool):
    if value:
        from . import __version__

        typer.echo(f"windsheet {__version__}")
        raise typer.Exit(0)


@app.callback()
def _root(version: bool = typer.Option(False, "--version", is_eager=True, callback=_show_version,
                                       help="Print the version and exit.")):
    """Job sheets for coil winding: size an order, print its traveller, sign off the units.

    Exit status: 0 done (and every verdict a pass or marginal), 1 a verdict short of that
    (an insulation FAIL from size, a unit not passed at sign-off) or a batch with a refused
    order, 2 bad input (one line on stderr names the field or file; nothing is written).
    """


def guarded(fn):
    """Turn an InputError into one line on stderr and exit status 2."""
    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        try:
            return fn(*args, **kwargs)
        except InputError as exc:
            typer.echo(f"windsheet: {exc}", err=True)
            raise typer.Exit(2) from None
    return wrapper


# ---------------------------------------------------------------- formatting
def eng(value, unit: str, digits: int = 4) -> str:
    """A number with an SI prefix for the terminal: ``eng(6.12e-5, 'H') == '61.20 µH'``."""
    return fmt.eng(value, unit, sig=digits, sep=" ")


def summary_lines(p: dict) -> list[str]:
    """The readable, aligned summary of a prediction."""
    rows = []

    def row(label, value):
        rows.append((label, value))

    j = p["job"]
    row("Job", f"{j['number']} rev {j['revision']} — {j['part']} (qty {j['quantity']})")
    row("Wire", p["wire"]["label"] + f", overall {eng(p['wire']['overall_diameter_m'], 'm')}")
    w = p["winding"]
    layers = ", ".join(str(n) for n in w["turns_in_layer"])
    row("Winding", f"{_count(w['strands'], 'strand')} × {w['turns_per_strand']} turns, "
        f"{_count(w['layers'], 'layer')} ({layers} turns per strand), pitch {eng(w['pitch_m'], 'm')}")
    if w.get("target"):
        t = w["target"]
        row("Target", f"{eng(t['inductance_H'], 'H')} → {t['turns_exact']:.2f} turns exact, "
            f"{t['turns_chosen']} chosen give {eng(t['inductance_at_chosen_H'], 'H')} ({t['error'] * 100:+.2f} %)")
    fit = p["fit"]
    row("Fit", f"{fit['slots_per_layer']} slots per layer, traverse used {eng(fit['traverse_used_m'], 'm')}"
        + (f" of {eng(fit['traverse_m'], 'm')}" if fit.get("traverse_m") else "")
        + f", build {eng(fit['build_m'], 'm')}")
    place = fit.get("placement") or {}
    if place.get("margin_m") or place.get("bare_start_m", 0) > 1e-5:
        row("Placement", f"first turn {eng(place['first_turn_m'], 'm')} from the start end"
            + (f", margin tape {eng(place['margin_m'], 'm')} each end" if place.get("margin_m") else ""))
    row("Hookup", hookup_words(p["hookup"]))
    if p.get("terminations"):
        row("Pins", ", ".join(f"pin {t['pin']} {' + '.join(t['ends'])}" for t in p["terminations"]))
    for s in p["strands"]:
        row(f"Strand {s['id']}", f"{eng(s['inductance_H'], 'H')}, {eng(s['resistance_20C_ohm'], 'Ω')} at 20 °C, "
            f"{s['wire_length_m']:.2f} m ({s['wire_length_with_scrap_m']:.2f} m with scrap), "
            f"{s['mass_kg'] * 1e3:.1f} g")
    t = p["terminal"]
    row("Terminals", f"L {eng(t['inductance_H'], 'H')} (accept {eng(t['accept']['inductance_min_H'], 'H')} … "
        f"{eng(t['accept']['inductance_max_H'], 'H')}), R {eng(t['resistance_ohm'], 'Ω')} at 20 °C, "
        f"{eng(t['resistance_hot_ohm'], 'Ω')} at {p['duty']['operating_temperature_C']:.0f} °C")
    if t["accept"].get("inductance_basis") == "target":
        row("", f"L accept band is the ordered target ± tolerance; prediction "
            f"{t['accept']['prediction_offset'] * 100:+.2f} % from target")
    row("", f"C {eng(t['capacitance_F'], 'F')}, self-resonance {eng(t['self_resonance_Hz'], 'Hz')}")
    if t.get("resistance_ac_ohm") is not None and p.get("ac_resistance") and p["duty"]["frequency_Hz"]:
        row("", f"R {eng(t['resistance_ac_ohm'], 'Ω')} at {eng(p['duty']['frequency_Hz'], 'Hz')} "
            f"(AC/DC {p['ac_resistance']['ratio']:.3f}), loss {eng(t['loss_W'], 'W')} at the duty current")
    if p.get("current_sheet_inductance_H"):
        row("Cross-check", f"current sheet (Nagaoka) {eng(p['current_sheet_inductance_H'], 'H')}, with Rosa's "
            f"correction {eng(p['current_sheet_rosa_corrected_H'], 'H')} (strand A)")
    th = p.get("thermal")
    if th:
        row("Heating", f"{th['verdict'].upper()} — surface +{th['surface_rise_K']:.1f} K, hot spot "
            f"{th['hot_spot_C']:.0f} °C (class {th['thermal_class_C'] or '—'}), "
            f"{th['current_density_A_per_mm2']:.2f} A/mm²")
    imp = p.get("impulse")
    if imp:
        row("Fast edge", f"first turn {eng(imp['first_turn_Vpk'], 'V')} peak (even share "
            f"{eng(imp['first_turn_uniform_Vpk'], 'V')}), worst pair {eng(imp['worst_pair_Vpk'], 'V')} peak"
            + (f", α {imp['alpha']:.3g}" if imp.get("alpha") is not None else ""))
    wa = p["worst_adjacent"]
    row("Worst adjacent", f"{eng(wa['voltage_Vpk'], 'V')} peak — {wa['where']}")
    ins = p["insulation"]
    row("Insulation", f"{ins['verdict'].upper()}" + "".join(f"\n{'':16}  {r}" for r in ins["reasons"]))
    row("Hipot", f"{eng(p['hipot']['voltage_V'], 'V')} for {p['hipot']['duration_s']:.0f} s — {p['hipot']['basis']}")
    for wtext in p["warnings"]:
        row("Note", wtext)
    width = max(len(k) for k, _ in rows)
    return [f"{k:<{width}}  {v}" for k, v in rows]


def _count(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def _end(end: str) -> str:
    # "A.finish" -> "A finish": the words the bench uses.
    return end.replace(".", " ")


def hookup_words(h: dict) -> str:
    """The hookup as a winder says it: ``series-aiding — A finish joined to B start; T1 A start, T2 B finish``."""
    joins = "; ".join(" joined to ".join(_end(e) for e in j) for j in (h.get("joins") or []))
    terms = ", ".join(f"T{i} {_end(t)}" for i, t in enumerate(h.get("terminals") or [], 1))
    return f"{h['name']} — " + (f"{joins}; " if joins else "no joins; ") + f"terminals {terms}"


def _to_json(obj) -> str:
    return json.dumps(obj, indent=2, ensure_ascii=False, allow_nan=False, default=str)


# ---------------------------------------------------------------- commands
@app.command()
def size(orders: list[str] = typer.Argument(..., help="Order files (YAML), folders of orders or globs; "
                                            "'-' reads one order from standard input."),
         as_json: bool = typer.Option(False, "--json", help="Print the whole prediction as JSON (SI units); "
                                      "several orders print one JSON object per line (JSON Lines).")):
    """Size coil orders: turns, layers, fit, wire, resistance, inductance, stress.

    Exit 0 when every order sizes and none fails its insulation check, 1 when one fails it
    (or, in a batch, when any order is refused), 2 for bad input to a single order.
    """
    from .batch import expand_orders, load_order_arg, progress

    try:
        files = expand_orders(orders)
    except InputError as exc:
        typer.echo(f"windsheet: {exc}", err=True)
        raise typer.Exit(2) from None
    if len(files) == 1:
        p = _size_one(files[0])
        typer.echo(_to_json(p) if as_json else "\n".join(summary_lines(p)))
        raise typer.Exit(1 if _insulation_fails(p) else 0)
    from .predict import predict

    refused, failing = [], []
    with progress(len(files), "sizing") as step:
        for f in files:
            try:
                p = predict(load_order_arg(f))
            except InputError as exc:
                # Named by its file; the batch carries on.
                msg = str(exc)
                typer.echo(f"windsheet: {msg if msg.startswith(f) else f'{f}: {msg}'}", err=True)
                refused.append(f)
                step()
                continue
            if _insulation_fails(p):
                failing.append(f)
            if as_json:
                typer.echo(json.dumps({"file": f, **p}, ensure_ascii=False, allow_nan=False, default=str))
            else:
                typer.echo(f"== {f}\n" + "\n".join(summary_lines(p)) + "\n")
            step()
    sized = len(files) - len(refused)
    tail = f"; {len(refused)} refused ({', '.join(refused)})" if refused else ""
    tail += f"; {len(failing)} fail the insulation check ({', '.join(failing)})" if failing else ""
    typer.echo(f"windsheet: sized {sized} of {len(files)} orders{tail}", err=True)
    raise typer.Exit(1 if refused or failing else 0)


@guarded
def _size_one(arg: str) -> dict:
    from .batch import load_order_arg
    from .predict import predict

    return predict(load_order_arg(arg))


def _insulation_fails(p: dict) -> bool:
    return (p.get("insulation") or {}).get("verdict") == "fail"


def _say_repairs(reg):
    for line in getattr(reg, "repairs", []) or []:
        typer.echo(f"windsheet: {line}", err=True)


@app.command("readings-form")
@guarded
def readings_form_cmd(order: Path = typer.Argument(..., help="The order, a YAML file."),
                      out: Path = typer.Option(..., "-o", "--out", help="The form to write (.yaml, or .csv)."),
                      as_csv: bool = typer.Option(False, "--csv", help="Write CSV (one row per unit) even "
                                                  "when the name does not end in .csv.")):
    """Write a measured-values file for the order: its serial numbers, every required QC line empty."""
    from .fileio import atomic_write_text
    from .order import load_order
    from .predict import predict
    from .readings_form import csv_form, yaml_form

    p = predict(load_order(order))
    if out.exists():
        raise InputError(str(out), "already exists; a filled-in form is a record, not overwritten — "
                                   "choose another name")
    if not (out.parent if str(out.parent) else Path(".")).is_dir():
        raise InputError(str(out), f"cannot write: folder {str(out.parent)!r} does not exist")
    csv_out = as_csv or out.suffix.lower() == ".csv"
    atomic_write_text(out, csv_form(p) if csv_out else yaml_form(p))
    typer.echo(f"{p['job']['number']} rev {p['job']['revision']}: readings form for "
               f"{len(p['job']['units'])} units, {len(p['qc_required'])} lines each: {out}", err=True)


@app.command("register")
@guarded
def register_cmd(job: Optional[str] = typer.Argument(None, help="A job number: show its history."),
                 register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                        "$WINDSHEET_REGISTER, else ./windsheet-register.db)."),
                 issue: Optional[Path] = typer.Option(None, "--issue", help="Record ORDER.yaml as issued "
                                                      "(the traveller command does this when it prints)."),
                 force: bool = typer.Option(False, "--force", help="With --issue: record a design that fails "
                                            "its insulation check; it is then marked FORCED."),
                 state: Optional[str] = typer.Option(None, "--state", help="Only jobs in this state: issued, "
                                                     "passed, failed or incomplete."),
                 customer: Optional[str] = typer.Option(None, "--customer", help="Only jobs whose customer "
                                                        "contains this (any case)."),
                 since: Optional[str] = typer.Option(None, "--since", help="Only jobs issued on or after this "
                                                     "date (YYYY-MM-DD)."),
                 as_csv: bool = typer.Option(False, "--csv", help="Print the listing as CSV."),
                 as_json: bool = typer.Option(False, "--json", help="Print as JSON."),
                 lot: Optional[str] = typer.Option(None, "--lot", help="List every unit recorded with this "
                                                   "wire reel or lot, core lot or instrument id (exact match).")):
    """List the jobs in the register (job, revision, customer, issued, state, passed/total, design
    status), or one job's history; --issue records an order as issued; --lot lists the units of a reel or lot."""
    if lot is not None:
        return _lot_search(register, lot, as_json)
    from .register import open_register_readonly, resolve_register_path

    if issue is not None:
        from .order import load_order
        from .predict import predict
        from .qc_lines import design_fails, design_status
        from .register import open_register
        from .render import check_issuable

        o = load_order(issue)
        p = predict(o)
        check_issuable(p, force)
        p = {**p, "design_status": design_status(p, forced=force and design_fails(p))}
        with open_register(register, create=True) as reg:
            issued, how = reg.issue_or_reprint(p, o.source.decode("utf-8", "replace"), o.sha256)
        forced = " — FORCED over a failing design check" if p["design_status"]["state"] == "forced" else ""
        # Only what was recorded: the listing is its own command.
        typer.echo(f"{how} {p['job']['number']} rev {p['job']['revision']} (issue {issued}){forced}", err=True)
        return
    if not resolve_register_path(register).exists():
        typer.echo(f"(no register yet at {resolve_register_path(register)})")
        return
    # Listing reads only: a read-only file or folder can be listed.
    with open_register_readonly(register) as reg:
        if job:
            from .signoff_text import history_lines

            h = reg.job_history(job)
            typer.echo(_to_json(h) if as_json else "\n".join(history_lines(h)))
            return
        jobs = reg.list_jobs()
    from .register_listing import as_csv as listing_csv, select, table_lines

    jobs = select(jobs, state, customer, since)
    if as_json:
        typer.echo(_to_json(jobs))
    elif as_csv:
        typer.echo(listing_csv(jobs), nl=False)
    else:
        typer.echo("\n".join(table_lines(jobs)))


def _lot_search(register, lot, as_json):
    """The recall question: which units were built from (or measured with) ``lot``."""
    from .register import open_register_readonly, resolve_register_path
    from .traceability import lot_lines, similar_lots, units_with_lot

    if not resolve_register_path(register).exists():
        raise InputError(str(resolve_register_path(register)), "no register here yet; nothing is recorded")
    with open_register_readonly(register) as reg:
        units = units_with_lot(reg.conn, lot)
        similar = similar_lots(reg.conn, lot) if not units else []
    typer.echo(_to_json({"lot": lot, "units": units}) if as_json else "\n".join(lot_lines(lot, units, similar)))


def _traveller_job(arg: str, paper: str, fmt: str, force: bool, units: str | None = None, pdf=None):
    """Size, check and render one traveller (runs in a worker process for a batch).

    ``pdf`` renders the HTML to PDF bytes (default :func:`render_pdf`, in process).
    """
    from .batch import load_order_arg
    from .predict import predict
    from .qc_lines import design_fails, design_status
    from .render import check_issuable, render_pdf, render_traveller_html

    o = load_order_arg(arg)
    p = predict(o)
    check_issuable(p, force)
    if fmt != "json":
        from .limits import check_sheet_units

        check_sheet_units(len(p["job"]["units"]), "job.quantity", "traveller")
    forced = force and design_fails(p)
    p = {**p, "design_status": design_status(p, forced=forced)}
    if fmt == "json":
        data = (_to_json(p) + "\n").encode("utf-8")
    else:
        page = render_traveller_html(p, paper=paper, forced=forced, units=units)
        data = page.encode("utf-8") if fmt == "html" else (pdf or render_pdf)(page)
    return p, o.source.decode("utf-8", "replace"), o.sha256, forced, data


def _traveller_worker(args):
    try:
        return _traveller_job(*args), None
    except InputError as exc:
        return None, str(exc)


@app.command("traveller")
@guarded
def traveller_cmd(orders: list[str] = typer.Argument(..., help="Orders (YAML files), folders of orders or globs; "
                                                     "'-' reads one order from standard input."),
                  out: str = typer.Option(..., "-o", "--out", help="Output file, or '-' for standard output; "
                                          "for several orders, an output folder (one traveller per order)."),
                  html: bool = typer.Option(False, "--html", help="Write HTML (same as --format html)."),
                  fmt: Optional[str] = typer.Option(None, "--format", help="pdf, html or json (the prediction); "
                                                    "default: from the output file's extension, else pdf."),
                  paper: str = typer.Option("a4", "--paper", help="Paper size: a4 or letter."),
                  units: Optional[str] = typer.Option(None, "--units", help="imperial (inches beside "
                                                      "millimetres) or metric; default as the order is written."),
                  force: bool = typer.Option(False, "--force", help="Issue even when the insulation check "
                                             "fails; the sheet then says FORCED."),
                  jobs: int = typer.Option(0, "--jobs", min=0, help="Worker processes for several orders "
                                           "(default: one per core)."),
                  register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                         "$WINDSHEET_REGISTER, else ./windsheet-register.db).")):
    """Print the traveller (job sheet) of an order, and record the issue in the job register.

    One order: everything is sized, checked and rendered before anything is written or
    recorded, and the sheet lands only with its register record. Several orders: rendered in
    parallel, each written and recorded as soon as it is done; a refused order is named and
    the batch carries on (exit 1 at the end).
    """
    from .batch import STDIN, expand_orders, output_format, progress
    from .register import open_register
    from .sheet_ledger import recorded_sheet

    files = expand_orders(orders)
    many = len(files) > 1 or any(Path(a).is_dir() for a in orders if a != STDIN)
    if out == STDIN:
        if many:
            raise InputError("-o", "several travellers need an output folder, not standard output")
        fmt_ = output_format(out, fmt, html)
        if fmt_ == "pdf" and sys.stdout.isatty():
            raise InputError("-o", "will not write a PDF to a terminal: redirect it, or give --format html")
    else:
        out_path = Path(out)
        if many and out_path.exists() and not out_path.is_dir():
            raise InputError(out, "several orders need an output folder, not a file")
        into_folder = many or out_path.is_dir()
        fmt_ = output_format(None if into_folder else out, fmt, html)
        if not into_folder and not (out_path.parent if str(out_path.parent) else Path(".")).is_dir():
            raise InputError(out, f"cannot write: folder {str(out_path.parent)!r} does not exist")
    if not many:
        from .pdf_worker import pdf_renderer

        # WeasyPrint loads in a second process while this one sizes the order.
        with pdf_renderer(fmt_ == "pdf") as pdf:
            p, source, sha, forced, data = _traveller_job(files[0], paper, fmt_, force, units, pdf=pdf)
        with open_register(register) as reg:
            _say_repairs(reg)
            if out == STDIN:
                how = reg.issue_or_reprint(p, source, sha)[1]
                sys.stdout.buffer.write(data)
                sys.stdout.buffer.flush()
            else:
                target = out_path / f"{Path(files[0]).stem}.{fmt_}" if into_folder else out_path
                # The sheet lands only if its issue is recorded, and the reverse.
                with recorded_sheet(reg, "traveller", target, data) as sheet:
                    how = reg.issue_or_reprint(p, source, sha, sheet=sheet)[1]
                _said_issued(p, target, forced, how)
        return
    out_path.mkdir(parents=True, exist_ok=True)
    refused = []
    work = [(f, paper, fmt_, force, units) for f in files]
    with open_register(register) as reg, progress(len(files), "travellers") as step:
        _say_repairs(reg)
        for f, (done, err) in zip(files, _in_parallel(_traveller_worker, work, jobs)):
            if err is not None:
                typer.echo(f"windsheet: {err if err.startswith(f) else f'{f}: {err}'}", err=True)
                refused.append(f)
            else:
                p, source, sha, forced, data = done
                target = out_path / f"{Path(f).stem}.{fmt_}"
                with recorded_sheet(reg, "traveller", target, data) as sheet:
                    how = reg.issue_or_reprint(p, source, sha, sheet=sheet)[1]
                _said_issued(p, target, forced, how)
            step()
    tail = f"; {len(refused)} refused ({', '.join(refused)})" if refused else ""
    typer.echo(f"windsheet: {len(files) - len(refused)} of {len(files)} travellers written to {out_path}{tail}",
               err=True)
    if refused:
        raise typer.Exit(1)


def _said_issued(p, target, forced, how):
    note = " — FORCED over a failing design check" if forced else ""
    typer.echo(f"{p['job']['number']} rev {p['job']['revision']}: {target}{note}", err=True)


def _in_parallel(fn, work: list, jobs: int = 0):
    """``fn`` over ``work`` in worker processes, results in order as each is ready (one core: in process)."""
    import os

    n = min(jobs or os.cpu_count() or 1, len(work))
    if n <= 1:
        yield from map(fn, work)
        return
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(max_workers=n) as pool:
        yield from pool.map(fn, work)


@app.command("demo")
@guarded
def demo_cmd(out: Path = typer.Option(Path("out"), "--out", help="Folder for the demo sheets."),
             samples: Optional[Path] = typer.Option(None, "--samples", help="Folder of sample orders "
                                                    "(default: the project's samples/).")):
    """Render every sample order's traveller, and the sample measurements' sign-off sheets, to PDF and HTML (nothing is recorded)."""
    from .fileio import atomic_write_bytes
    from .order import load_order
    from .predict import predict
    from .measured import load_measured
    from .render import order_files, render_pdf, render_traveller_html
    from .signoff import evaluate_signoff
    from .cli_signoff import _resizer, _signoff_sheet

    folder = samples or Path(__file__).resolve().parent.parent / "samples"
    files = order_files(folder)
    out.mkdir(parents=True, exist_ok=True)
    predictions = {}
    for f in files:
        o = load_order(f)
        p = predict(o)
        predictions[p["job"]["number"]] = (p, o)
        page = render_traveller_html(p)
        atomic_write_bytes(out / f"{f.stem}.html", page.encode("utf-8"))
        atomic_write_bytes(out / f"{f.stem}.pdf", render_pdf(page))
    typer.echo(f"{len(files)} travellers (PDF and HTML) written to {out.resolve()}")
    sheets = 0
    for m in sorted(folder.glob("*.measured.yaml")):
        readings = load_measured(m)
        if readings.job not in predictions:
            continue
        p, o = predictions[readings.job]
        result = evaluate_signoff(p, readings, inspector=readings.inspector, resize=_resizer(o))
        stem = m.name[: -len(".measured.yaml")] + "-signoff"
        atomic_write_bytes(out / f"{stem}.html", _signoff_sheet(p, result, True, "a4"))
        atomic_write_bytes(out / f"{stem}.pdf", _signoff_sheet(p, result, False, "a4"))
        sheets += 1
        typer.echo(f"  sign-off {m.name}: {result['verdict'].upper()}")
    if sheets:
        typer.echo(f"{sheets} sign-off sheets (PDF and HTML) written to {out.resolve()}")
    _demo_records(out, [p for p, _ in predictions.values()])


def _demo_records(out: Path, predictions: list) -> None:
    """The sample bill of materials of every sample order, and a QC report on a simulated register."""
    import tempfile

    from .demo_records import build_sample_register
    from .fileio import atomic_write_bytes
    from .materials import bill_csv, bill_of_materials
    from .records_render import materials_html, report_html
    from .register import open_register
    from .render import render_pdf
    from .report import report_charts, report_from_register

    bill = bill_of_materials(predictions)
    atomic_write_bytes(out / "materials.csv", bill_csv(bill).encode("utf-8"))
    atomic_write_bytes(out / "materials.pdf", render_pdf(materials_html(bill)))
    with tempfile.TemporaryDirectory() as tmp:
        reg_path = Path(tmp) / "sample-register.db"
        build_sample_register(reg_path)
        with open_register(reg_path, create=False) as reg:
            rep = report_from_register(reg)
        atomic_write_bytes(out / "sample-register.db", reg_path.read_bytes())
    atomic_write_bytes(out / "qc-report.json", (_to_json(rep) + "\n").encode("utf-8"))
    atomic_write_bytes(out / "qc-report.pdf", render_pdf(report_html(rep, report_charts(rep))))
    typer.echo(f"bill of materials (materials.csv, .pdf) and QC report on a simulated register "
               f"(qc-report.pdf, .json, sample-register.db; invented data) written to {out.resolve()}")


# The other commands, one module per concern; importing them registers them on ``app``
# (run as ``python -m windsheet.cli``, the imported module does this; see the end).
if __name__ != "__main__":
    from . import cli_bench, cli_records, cli_signoff, cli_tables  # noqa: E402,F401
    from .cli_bench import bench_address, bench_token  # noqa: E402,F401 - re-exported


def main():  # console-script entry point
    import os

    # windsheet uses no pydantic plugins; without this, pydantic scans every
    # installed distribution's entry points when it builds the first model.
    os.environ.setdefault("PYDANTIC_DISABLE_PLUGINS", "__all__")
    app()


if __name__ == "__main__":  # pragma: no cover
    # python -m windsheet.cli: run the imported module's app, on which every command is registered.
    from windsheet.cli import main as _main

    sys.exit(_main())
