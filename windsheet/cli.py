"""Command line: ``windsheet size | traveller | signoff | register | demo``.

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
                  rich_markup_mode=None)  # plain usage errors: a few lines, no boxes


@app.callback()
def _root():
    """Job sheets for coil winding: size an order, print its traveller, sign off the units."""


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
    row("Winding", f"{w['strands']} strand(s) × {w['turns_per_strand']} turns, {w['layers']} layer(s) "
        f"{w['turns_in_layer']}, pitch {eng(w['pitch_m'], 'm')}")
    if w.get("target"):
        t = w["target"]
        row("Target", f"{eng(t['inductance_H'], 'H')} → {t['turns_exact']:.2f} turns exact, "
            f"{t['turns_chosen']} chosen give {eng(t['inductance_at_chosen_H'], 'H')} ({t['error'] * 100:+.2f} %)")
    fit = p["fit"]
    row("Fit", f"{fit['slots_per_layer']} slots per layer, traverse used {eng(fit['traverse_used_m'], 'm')}"
        + (f" of {eng(fit['traverse_m'], 'm')}" if fit.get("traverse_m") else "")
        + f", build {eng(fit['build_m'], 'm')}")
    row("Hookup", f"{p['hookup']['name']}: joins {p['hookup']['joins'] or 'none'}, terminals {p['hookup']['terminals']}")
    for s in p["strands"]:
        row(f"Strand {s['id']}", f"{eng(s['inductance_H'], 'H')}, {eng(s['resistance_20C_ohm'], 'Ω')} at 20 °C, "
            f"{s['wire_length_m']:.2f} m ({s['wire_length_with_scrap_m']:.2f} m with scrap), "
            f"{s['mass_kg'] * 1e3:.1f} g")
    t = p["terminal"]
    row("Terminals", f"L {eng(t['inductance_H'], 'H')} (accept {eng(t['accept']['inductance_min_H'], 'H')} … "
        f"{eng(t['accept']['inductance_max_H'], 'H')}), R {eng(t['resistance_ohm'], 'Ω')} at 20 °C, "
        f"{eng(t['resistance_hot_ohm'], 'Ω')} at {p['duty']['operating_temperature_C']:.0f} °C")
    row("", f"C {eng(t['capacitance_F'], 'F')}, self-resonance {eng(t['self_resonance_Hz'], 'Hz')}")
    if p.get("current_sheet_inductance_H"):
        row("Cross-check", f"current sheet (Nagaoka) {eng(p['current_sheet_inductance_H'], 'H')}, with Rosa's "
            f"correction {eng(p['current_sheet_rosa_corrected_H'], 'H')} (strand A)")
    wa = p["worst_adjacent"]
    row("Worst adjacent", f"{eng(wa['voltage_Vpk'], 'V')} peak — {wa['where']}")
    ins = p["insulation"]
    row("Insulation", f"{ins['verdict'].upper()}" + "".join(f"\n{'':16}  {r}" for r in ins["reasons"]))
    row("Hipot", f"{eng(p['hipot']['voltage_V'], 'V')} for {p['hipot']['duration_s']:.0f} s — {p['hipot']['basis']}")
    for wtext in p["warnings"]:
        row("Note", wtext)
    width = max(len(k) for k, _ in rows)
    return [f"{k:<{width}}  {v}" for k, v in rows]


def _to_json(obj) -> str:
    return json.dumps(obj, indent=2, ensure_ascii=False, allow_nan=False, default=str)


# ---------------------------------------------------------------- commands
@app.command()
@guarded
def size(order: Path = typer.Argument(..., help="The order, a YAML file."),
         as_json: bool = typer.Option(False, "--json", help="Print the whole prediction as JSON (SI units).")):
    """Size a coil order: turns, layers, fit, wire, resistance, inductance, stress."""
    from .order import load_order
    from .predict import predict

    p = predict(load_order(order))
    if as_json:
        typer.echo(_to_json(p))
    else:
        typer.echo("\n".join(summary_lines(p)))


@app.command()
@guarded
def signoff(order: Path = typer.Argument(..., help="The order, a YAML file."),
            measured: Path = typer.Argument(..., help="The bench readings, a YAML file (see samples/*.measured.yaml)."),
            as_json: bool = typer.Option(False, "--json", help="Print the sign-off as JSON (SI units)."),
            register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                   "$WINDSHEET_REGISTER, else ./windsheet-register.db)."),
            inspector: Optional[str] = typer.Option(None, "--inspector", help="Who signs the units off."),
            out: Optional[Path] = typer.Option(None, "-o", "--out", help="Also write the sign-off sheet here "
                                               "(PDF, or HTML with --html)."),
            html: bool = typer.Option(False, "--html", help="Write the sheet as HTML instead of PDF."),
            paper: str = typer.Option("a4", "--paper", help="Paper size: a4 or letter.")):
    """Sign off measured units against the issued traveller; exit 0 all pass, 1 any fail, 2 bad input."""
    from .measured import load_measured
    from .order import load_order
    from .register import open_register
    from .signoff import evaluate_signoff, exit_status
    from .signoff import summary_lines as signoff_lines

    o = load_order(order)
    readings = load_measured(measured)
    who = (inspector or "").strip() or readings.inspector
    if not who:
        raise InputError("inspector", "name the inspector with --inspector or 'inspector:' in the measured file")
    job = o.doc.job
    if out is not None and not (out.parent if str(out.parent) else Path(".")).is_dir():
        raise InputError(str(out), f"cannot write: folder {str(out.parent)!r} does not exist")
    with open_register(register, create=False) as reg:
        _, issued = reg.find_issue(job.number, job.revision, o.sha256)
        result = evaluate_signoff(issued, readings, inspector=who)
        units = [u.model_dump(mode="json") for u in readings.units]
        if out is None:
            reg.record_signoff(result, o.sha256, who, measured_units=units)
        else:
            from .fileio import staged_write

            with staged_write(out, _signoff_sheet(issued, result, html, paper)):
                reg.record_signoff(result, o.sha256, who, measured_units=units)
    typer.echo(_to_json(result) if as_json else "\n".join(signoff_lines(result, eng)))
    raise typer.Exit(exit_status(result))


def _signoff_sheet(prediction, result, html, paper) -> bytes:
    from .render import render_pdf, render_signoff_html

    page = render_signoff_html(prediction, result, paper=paper)
    return page.encode("utf-8") if html else render_pdf(page)


@app.command("register")
@guarded
def register_cmd(job: Optional[str] = typer.Argument(None, help="A job number: show its history."),
                 register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                        "$WINDSHEET_REGISTER, else ./windsheet-register.db)."),
                 issue: Optional[Path] = typer.Option(None, "--issue", help="Record ORDER.yaml as issued "
                                                      "(the traveller command does this when it prints)."),
                 as_json: bool = typer.Option(False, "--json", help="Print as JSON.")):
    """List jobs in the register with their state (issued, passed, failed), or one job's history."""
    from .register import open_register
    from .signoff import history_lines, register_lines

    issued = None
    if issue is not None:
        from .order import load_order
        from .predict import predict

        o = load_order(issue)
        p = predict(o)
    from .register import resolve_register_path

    if issue is None and not resolve_register_path(register).exists():
        typer.echo(f"(no register yet at {resolve_register_path(register)})")
        return
    with open_register(register, create=issue is not None) as reg:
        if issue is not None:
            issued = reg.record_issue(p, o.source.decode("utf-8", "replace"), o.sha256)
            typer.echo(f"issued {p['job']['number']} rev {p['job']['revision']} (issue {issued})", err=True)
        if job:
            h = reg.job_history(job)
            typer.echo(_to_json(h) if as_json else "\n".join(history_lines(h)))
        else:
            jobs = reg.list_jobs()
            typer.echo(_to_json(jobs) if as_json else "\n".join(register_lines(jobs)))


@app.command("traveller")
@guarded
def traveller_cmd(order: Path = typer.Argument(..., help="An order (YAML file), or a folder of orders."),
                  out: Path = typer.Option(..., "-o", "--out", help="Output file; for a folder of orders, "
                                           "an output folder (one traveller per order)."),
                  html: bool = typer.Option(False, "--html", help="Write HTML instead of PDF."),
                  paper: str = typer.Option("a4", "--paper", help="Paper size: a4 or letter."),
                  units: Optional[str] = typer.Option(None, "--units", help="imperial (inches beside "
                                                      "millimetres) or metric; default as the order is written."),
                  force: bool = typer.Option(False, "--force", help="Issue even when the insulation check "
                                             "fails; the sheet then says FORCED."),
                  register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                         "$WINDSHEET_REGISTER, else ./windsheet-register.db).")):
    """Print the traveller (job sheet) of an order, and record the issue in the job register."""
    from .fileio import staged_write
    from .order import load_order
    from .predict import predict
    from .register import open_register
    from .render import check_issuable, order_files, render_pdf, render_traveller_html

    files = order_files(order)
    many = Path(order).is_dir()
    into_folder = many or out.is_dir()
    if many and out.exists() and not out.is_dir():
        raise InputError(str(out), "a folder of orders needs an output folder, not a file")
    if not into_folder and not (out.parent if str(out.parent) else Path(".")).is_dir():
        raise InputError(str(out), f"cannot write: folder {str(out.parent)!r} does not exist")
    # Everything is sized, checked and rendered before anything is written or recorded.
    jobs = []
    for f in files:
        o = load_order(f)
        p = predict(o)
        check_issuable(p, force)
        forced = force and (p.get("insulation") or {}).get("verdict") == "fail"
        page = render_traveller_html(p, paper=paper, forced=forced, units=units)
        data = page.encode("utf-8") if html else render_pdf(page)
        target = out / f"{f.stem}.{'html' if html else 'pdf'}" if into_folder else out
        jobs.append((o, p, forced, target, data))
    if many:
        out.mkdir(parents=True, exist_ok=True)
    with open_register(register) as reg:
        for o, p, forced, target, data in jobs:
            # The sheet lands only if its issue is recorded, and the reverse.
            with staged_write(target, data):
                reg.record_issue(p, o.source.decode("utf-8", "replace"), o.sha256)
            note = " — FORCED over a failing insulation check" if forced else ""
            typer.echo(f"{p['job']['number']} rev {p['job']['revision']}: {target}{note}", err=bool(forced))


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

    folder = samples or Path(__file__).resolve().parent.parent / "samples"
    files = order_files(folder)
    out.mkdir(parents=True, exist_ok=True)
    predictions = {}
    for f in files:
        p = predict(load_order(f))
        predictions[p["job"]["number"]] = p
        page = render_traveller_html(p)
        atomic_write_bytes(out / f"{f.stem}.html", page.encode("utf-8"))
        atomic_write_bytes(out / f"{f.stem}.pdf", render_pdf(page))
    typer.echo(f"{len(files)} travellers (PDF and HTML) written to {out.resolve()}")
    sheets = 0
    for m in sorted(folder.glob("*.measured.yaml")):
        readings = load_measured(m)
        p = predictions.get(readings.job)
        if p is None:
            continue
        result = evaluate_signoff(p, readings, inspector=readings.inspector)
        stem = m.name[: -len(".measured.yaml")] + "-signoff"
        atomic_write_bytes(out / f"{stem}.html", _signoff_sheet(p, result, True, "a4"))
        atomic_write_bytes(out / f"{stem}.pdf", _signoff_sheet(p, result, False, "a4"))
        sheets += 1
        typer.echo(f"  sign-off {m.name}: {result['verdict'].upper()}")
    if sheets:
        typer.echo(f"{sheets} sign-off sheets (PDF and HTML) written to {out.resolve()}")


def main():  # console-script entry point
    app()


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())


# ---------------------------------------------------------------- wire tables
def _wire_lines(records: list[dict], conductor: str) -> list[str]:
    """Aligned text of wire-table rows, millimetres and volts for the shop."""
    from .wire import dc_resistance

    def mm(x):
        return "—" if x is None else f"{x * 1e3:.3f}"
    head = ("standard", "nominal mm", "grade", "min incr", "min OD", "max OD", "breakdown V", "test",
            f"Ω/m 20°C {conductor}", "least sure")
    out = [head]
    for r in records:
        d = r["nominal_diameter_m"]
        size = r["series"] if r["standard"].startswith("NEMA") else mm(d)
        rpm = float(dc_resistance(1.0, d, conductor=conductor))
        out.append((r["standard"], size, str(r["grade"]), mm(r["min_increase_m"]), mm(r["min_overall_diameter_m"]),
                    mm(r["max_overall_diameter_m"]), "—" if r["min_breakdown_V"] is None else f"{r['min_breakdown_V']:.0f}",
                    r["breakdown_test"] or "—", f"{rpm:.4g}", r["least_sure"] or "—"))
    widths = [max(len(row[i]) for row in out) for i in range(len(head))]
    return ["  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip() for row in out]


@app.command("wires")
@guarded
def wires_cmd(size: Optional[list[str]] = typer.Argument(None, help="One size: '0.5 mm', '28 SWG' or '22 AWG'."),
              smallest: Optional[str] = typer.Option(None, "--from", help="Smallest nominal diameter, like '0.1 mm'."),
              largest: Optional[str] = typer.Option(None, "--to", help="Largest nominal diameter, like '0.5 mm'."),
              grade: Optional[int] = typer.Option(None, "--grade", min=1, max=3, help="Grade 1, 2 or 3."),
              standard: Optional[str] = typer.Option(None, "--standard", help="iec (IEC 60317-0-1) or nema (NEMA MW 1000)."),
              conductor: str = typer.Option("copper", "--conductor", help="copper or aluminium (resistance column)."),
              as_json: bool = typer.Option(False, "--json", help="Print the rows as JSON (SI units).")):
    """List the wire tables (IEC 60317-0-1 grades, NEMA MW 1000 builds), or everything known for one size."""
    from . import wire_tables as tables
    from .units import parse_quantity

    cond = conductor.strip().lower().replace("aluminum", "aluminium")
    if cond not in ("copper", "aluminium"):
        raise InputError("--conductor", f"expected copper or aluminium, got {conductor!r}")
    std = None
    if standard:
        key = standard.strip().lower()
        std = tables.IEC if key.startswith("iec") else tables.NEMA if key.startswith("nema") else None
        if std is None:
            raise InputError("--standard", f"expected iec or nema, got {standard!r}")
    if size:
        text = " ".join(size)
        try:
            report = tables.size_report(text)
        except tables.NotInTable as exc:
            raise InputError("size", str(exc)) from None
        rows = [r for r in report["rows"] if (grade is None or r["grade"] == grade)
                and (std is None or r["standard"] == std)]
        if as_json:
            typer.echo(_to_json({**report, "rows": rows}))
            return
        typer.echo(f"{report['size']}: conductor diameter {report['diameter_m'] * 1e3:.4f} mm "
                   f"({report['diameter_source']})")
        typer.echo("\n".join(_wire_lines(rows, cond)))
        for r in rows:
            rule = f" — {r['rule']}" if r["rule"] else ""
            typer.echo(f"{r['standard']} grade {r['grade']}{rule}:")
            for q, s in r["sources"].items():
                typer.echo(f"  {q}: {s['source']} ({s['sureness']})")
        return
    lo = parse_quantity(smallest, "length", "--from") if smallest else 0.0
    hi = parse_quantity(largest, "length", "--to") if largest else float("inf")
    records = [tables.row_record(r) for r in tables.listing(std, grade, lo, hi)]
    if as_json:
        typer.echo(_to_json(records))
    else:
        typer.echo("\n".join(_wire_lines(records, cond)))
