"""The shop-records commands: ``windsheet materials`` and ``windsheet report``."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer

from .common import guarded, to_json
from windsheet.common.errors import InputError


def register(app: typer.Typer) -> None:
    """Add ``materials``, ``report`` to the command line."""
    app.command("materials")(materials_cmd)
    app.command("report")(report_cmd)


@guarded
def materials_cmd(orders: list[Path] = typer.Argument(..., help="Orders (YAML files) or folders of orders."),
                  out: Optional[Path] = typer.Option(None, "-o", "--out", help="Write the bill here: .csv, "
                                                     ".json or .pdf (by the file's ending)."),
                  as_json: bool = typer.Option(False, "--json", help="Print the bill as JSON (metres, kilograms)."),
                  reels: Optional[Path] = typer.Option(None, "--reels", help="The shop's reel list (CSV: size_mm, "
                                                       "reel_kg; optional standard, grade, conductor, thermal_class, source)."),
                  paper: str = typer.Option("a4", "--paper", help="Paper size of the PDF: a4 or letter.")):
    """Bill of materials for a set of orders: per job and in total (wire, tape, sleeving, forms, labels)."""
    from windsheet.records.materials import bill_csv, bill_json_ready, bill_of_materials, bill_rows, load_reels
    from windsheet.design.dispatch import size_any
    from windsheet.order.reader import load_any_order
    from windsheet.sheets.render import order_files

    kinds = {".csv", ".json", ".pdf"}
    if out is not None:
        if out.suffix.lower() not in kinds:
            raise InputError(str(out), "expected a file ending in .csv, .json or .pdf")
        if not (out.parent if str(out.parent) else Path(".")).is_dir():
            raise InputError(str(out), f"cannot write: folder {str(out.parent)!r} does not exist")
    reel_rows = load_reels(reels) if reels is not None else None
    files = [f for o in orders for f in order_files(o)]
    numbers = {}
    predictions = []
    for f in files:
        p = size_any(load_any_order(f), remedies=False)
        number = p.job.number
        if number in numbers:
            raise InputError(str(f), f"job {number} is also in {numbers[number]}; give each job once")
        numbers[number] = str(f)
        predictions.append(p)
    bill = bill_of_materials(predictions, reel_rows)
    if out is not None:
        from windsheet.common.fileio import atomic_write_bytes

        kind = out.suffix.lower()
        if kind == ".csv":
            data = bill_csv(bill).encode("utf-8")
        elif kind == ".json":
            data = (to_json(bill_json_ready(bill)) + "\n").encode("utf-8")
        else:
            from windsheet.sheets.records_render import materials_html
            from windsheet.sheets.render import render_pdf

            data = render_pdf(materials_html(bill, paper))
        atomic_write_bytes(out, data)
        typer.echo(f"bill of materials for {len(predictions)} job(s): {out}", err=True)
    if as_json:
        typer.echo(to_json(bill_json_ready(bill)))
    elif out is None:
        for r in bill_rows(bill):
            if r["scope"] == "TOTAL":
                typer.echo(f"{r['category']:<9} {r['quantity']:>12,} {r['unit']:<6} {r['item']}")


@guarded
def report_cmd(out: Optional[Path] = typer.Option(None, "-o", "--out", help="Write the QC report PDF here."),
               as_json: bool = typer.Option(False, "--json", help="Print the report as JSON."),
               register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                      "$WINDSHEET_REGISTER, else ./windsheet-register.db)."),
               paper: str = typer.Option("a4", "--paper", help="Paper size: a4 or letter.")):
    """QC report from the register: the shop's bias per family, control charts with run rules."""
    from windsheet.records.register import open_register_readonly
    from windsheet.records.report import report_from_register
    from windsheet.sheets.control_chart import report_charts

    if out is not None and not (out.parent if str(out.parent) else Path(".")).is_dir():
        raise InputError(str(out), f"cannot write: folder {str(out.parent)!r} does not exist")
    # The report only reads: a read-only register (file or folder) is reported on, and left as it was.
    with open_register_readonly(register) as reg:
        rep = report_from_register(reg)
    if not rep["units"]:
        raise InputError(str(rep["register"]), "no unit is signed off in this register yet; nothing to report")
    if out is not None:
        from windsheet.common.fileio import atomic_write_bytes
        from windsheet.sheets.records_render import report_html
        from windsheet.sheets.render import render_pdf

        atomic_write_bytes(out, render_pdf(report_html(rep, report_charts(rep), paper)))
        typer.echo(f"QC report of {rep['units']} unit(s): {out}", err=True)
    if as_json:
        typer.echo(to_json(rep))
    elif out is None:
        typer.echo("\n".join(rep["statements"]))
