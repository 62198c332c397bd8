"""``windsheet traveller`` and ``windsheet demo``: job sheets, one order or a batch in parallel."""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Optional

import typer

from windsheet.common.errors import InputError

from .common import guarded, say_repairs, to_json


def register(app: typer.Typer) -> None:
    """Add ``traveller`` and ``demo`` to the command line."""
    app.command("traveller")(traveller_cmd)
    app.command("demo")(demo_cmd)


def _traveller_job(arg: str, paper: str, fmt: str, force: bool, units: str | None = None, pdf=None):
    """Size, check and render one traveller (runs in a worker process for a batch).

    ``pdf`` renders the HTML to PDF bytes (default :func:`render_pdf`, in process).
    """
    from .batch import load_order_arg
    from windsheet.design.dispatch import size_any
    from windsheet.design.qc_plan import issued_state
    from windsheet.sheets.render import render_pdf

    o = load_order_arg(arg)
    p = size_any(o)
    check_issuable, render_traveller_html = _sheet_functions(p)
    check_issuable(p, force)
    if fmt != "json":
        from windsheet.order.limits import check_sheet_units

        check_sheet_units(len(p.job.units), "job.quantity", "traveller")
    p = p.with_state(issued_state(p.state, force))
    forced = p.state.state == "forced"
    if fmt == "json":
        data = (to_json(p.as_json()) + "\n").encode("utf-8")
    else:
        page = render_traveller_html(p, paper=paper, forced=forced, units=units)
        data = page.encode("utf-8") if fmt == "html" else (pdf or render_pdf)(page)
    return p, o.source.decode("utf-8", "replace"), o.sha256, forced, data


def _sheet_functions(design):
    """The issuable check and the traveller renderer for a coil or a transformer."""
    from windsheet.design.dispatch import is_transformer_design

    if is_transformer_design(design):
        from windsheet.sheets.transformer_render import check_transformer_issuable, render_transformer_html

        return check_transformer_issuable, render_transformer_html
    from windsheet.sheets.render import check_issuable, render_traveller_html

    return check_issuable, render_traveller_html


def _traveller_worker(args):
    try:
        return _traveller_job(*args), None
    except InputError as exc:
        return None, str(exc)
    except Exception as exc:  # a bug must not cost the rest of the batch its summary
        from .common import internal_fault

        return None, internal_fault(exc)


@guarded
def traveller_cmd(orders: list[str] = typer.Argument(..., help="Orders (YAML files), folders of orders or globs; "
                                                     "'-' reads one order from standard input."),
                  out: str = typer.Option(..., "-o", "--out", help="Output file, or '-' for standard output; "
                                          "for several orders, an output folder (one traveller per order)."),
                  html: bool = typer.Option(False, "--html", help="Write HTML (same as --format html)."),
                  fmt: Optional[str] = typer.Option(None, "--format", help="pdf, html or json (the prediction); "
                                                    "default: from the output file's extension, else pdf."),
                  paper: str = typer.Option("a4", "--paper", help="Paper size: a4 or letter."),
                  units: Optional[str] = typer.Option(None, "--units", help="metric (mm, °C), imperial "
                                                      "(inches, °F) or both (inches and °F first, mm and °C "
                                                      "beside); default as the order is written."),
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
    from windsheet.records.register import open_register
    from windsheet.records.sheet_ledger import recorded_sheet

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
        from windsheet.sheets.pdf_worker import pdf_renderer

        # WeasyPrint loads in a second process while this one sizes the order.
        with pdf_renderer(fmt_ == "pdf") as pdf:
            p, source, sha, forced, data = _traveller_job(files[0], paper, fmt_, force, units, pdf=pdf)
        with open_register(register) as reg:
            say_repairs(reg)
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
        say_repairs(reg)
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
    typer.echo(f"{p.job.number} rev {p.job.revision}: {target}{note}", err=True)


def _in_parallel(fn, work: list, jobs: int = 0):
    """``fn`` over ``work`` in worker processes, results in order as each is ready (one core: in process)."""
    import os

    n = min(jobs or os.cpu_count() or 1, len(work))
    if n <= 1:
        yield from map(fn, work)
        return
    from concurrent.futures import ProcessPoolExecutor
    from windsheet.sheets.pdf_worker import die_with_parent

    # Each worker ends with this command, however it ends (a killed batch left them running).
    with ProcessPoolExecutor(max_workers=n, initializer=die_with_parent, initargs=(os.getpid(),)) as pool:
        yield from pool.map(fn, work)


@guarded
def demo_cmd(out: Path = typer.Option(Path("out"), "--out", help="Folder for the demo sheets."),
             samples: Optional[Path] = typer.Option(None, "--samples", help="Folder of sample orders "
                                                    "(default: the project's samples/).")):
    """Render every sample order's traveller, and the sample measurements' sign-off sheets, to PDF and HTML (nothing is recorded)."""
    from windsheet.common.fileio import atomic_write_bytes
    from windsheet.design.dispatch import size_any
    from windsheet.order.reader import load_any_order
    from windsheet.qc.readings_file import load_measured
    from windsheet.sheets.render import order_files, render_pdf
    from .signoff_cmd import _evaluate, _signoff_sheet

    folder = samples or Path(__file__).resolve().parents[2] / "samples"
    files = order_files(folder)
    out.mkdir(parents=True, exist_ok=True)
    predictions = {}
    for f in files:
        o = load_any_order(f)
        p = size_any(o)
        predictions[p.job.number] = (p, o)
        page = _sheet_functions(p)[1](p)
        atomic_write_bytes(out / f"{f.stem}.html", page.encode("utf-8"))
        atomic_write_bytes(out / f"{f.stem}.pdf", render_pdf(page))
    typer.echo(f"{len(files)} travellers (PDF and HTML) written to {out.resolve()}")
    sheets = 0
    for m in sorted(folder.glob("*.measured.yaml")):
        readings = load_measured(m)
        if readings.job not in predictions:
            continue
        p, o = predictions[readings.job]
        result = _evaluate(p, o, readings, readings.inspector)
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

    from windsheet.records.demo_records import build_sample_register
    from windsheet.common.fileio import atomic_write_bytes
    from windsheet.records.materials import bill_csv, bill_of_materials
    from windsheet.sheets.records_render import materials_html, report_html
    from windsheet.records.register import open_register
    from windsheet.sheets.render import render_pdf
    from windsheet.records.report import report_from_register
    from windsheet.sheets.control_chart import report_charts

    bill = bill_of_materials(predictions)
    atomic_write_bytes(out / "materials.csv", bill_csv(bill).encode("utf-8"))
    atomic_write_bytes(out / "materials.pdf", render_pdf(materials_html(bill)))
    with tempfile.TemporaryDirectory() as tmp:
        reg_path = Path(tmp) / "sample-register.db"
        build_sample_register(reg_path)
        with open_register(reg_path, create=False) as reg:
            rep = report_from_register(reg)
        atomic_write_bytes(out / "sample-register.db", reg_path.read_bytes())
    atomic_write_bytes(out / "qc-report.json", (to_json(rep) + "\n").encode("utf-8"))
    atomic_write_bytes(out / "qc-report.pdf", render_pdf(report_html(rep, report_charts(rep))))
    typer.echo(f"bill of materials (materials.csv, .pdf) and QC report on a simulated register "
               f"(qc-report.pdf, .json, sample-register.db; invented data) written to {out.resolve()}")
