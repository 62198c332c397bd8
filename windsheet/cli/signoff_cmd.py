"""Command line: ``windsheet signoff``, for one readings file or a batch of them."""

from __future__ import annotations

import functools
import json
from pathlib import Path
from typing import Optional

import typer

from windsheet.common.errors import InputError

from .common import eng, guarded, internal_fault, say_repairs, to_json


def register(app: typer.Typer) -> None:
    """Add ``signoff`` and ``readings-form`` to the command line."""
    app.command()(signoff)
    app.command("readings-form")(readings_form_cmd)


def signoff(paths: list[str] = typer.Argument(..., help="The order (YAML) and its bench readings (YAML or CSV, "
                                              "see samples/*.measured.yaml); or several orders and readings "
                                              "files, folders or globs: each readings file is signed off "
                                              "against the order of its job."),
            as_json: bool = typer.Option(False, "--json", help="Print the sign-off as JSON (SI units); "
                                         "a batch prints one JSON object per line (JSON Lines)."),
            register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                   "$WINDSHEET_REGISTER, else ./windsheet-register.db)."),
            inspector: Optional[str] = typer.Option(None, "--inspector", help="Who signs the units off."),
            out: Optional[Path] = typer.Option(None, "-o", "--out", help="Also write the sign-off sheet here "
                                               "(PDF, or HTML with --html); for a batch, a folder."),
            html: bool = typer.Option(False, "--html", help="Write the sheet as HTML (same as --format html)."),
            fmt: Optional[str] = typer.Option(None, "--format", help="pdf or html; default from the "
                                              "sheet's extension, else pdf."),
            paper: str = typer.Option("a4", "--paper", help="Paper size: a4 or letter."),
            dry_run: bool = typer.Option(False, "--dry-run", help="Evaluate and print only: record nothing "
                                         "(the register file is opened read-only) and write no sheet.")):
    """Sign off measured units against the issued traveller.

    Exit status: 0 every unit passes, 1 any unit fails (or, in a batch, a readings file is
    refused), 3 none fails but some are incomplete (a required QC line not read), 2 bad input.
    """
    from .batch import expand_signoff_paths, is_order_file, names_many

    try:
        if len(paths) == 2 and not any(map(names_many, paths)) and not is_order_file(paths[1]):
            orders, readings = [paths[0]], [paths[1]]  # the classic form: ORDER READINGS
        else:
            orders, readings = expand_signoff_paths(paths)
        if not readings:
            raise InputError("signoff", "no readings file among the arguments (*.measured.yaml, *.csv, or a "
                             "YAML file with 'job' and 'units')")
        if len(orders) == 1 and len(readings) == 1:
            code = _signoff_single(orders[0], readings[0], as_json, register, inspector, out, html, fmt,
                                   paper, dry_run)
        else:
            code = _signoff_batch(orders, readings, as_json, register, inspector, out, html, fmt, paper, dry_run)
    except InputError as exc:
        typer.echo(f"windsheet: {exc}", err=True)
        raise typer.Exit(2) from None
    raise typer.Exit(code)


def _signoff_single(order, measured, as_json, register, inspector, out, html, fmt, paper, dry_run) -> int:
    from .batch import output_format
    from windsheet.qc.readings_file import load_measured
    from windsheet.order.reader import load_any_order
    from windsheet.records.register import open_register, open_register_readonly
    from windsheet.qc.signoff import exit_status
    from windsheet.qc.signoff import summary_lines as signoff_lines

    html = output_format(out, fmt, html, allowed=("pdf", "html")) == "html"
    o = load_any_order(order)
    readings = load_measured(measured)
    who = _inspector(inspector, readings)
    if dry_run and out is not None:
        raise InputError("--out", "a dry run writes no sheet; drop --out or --dry-run")
    if out is not None and not (out.parent if str(out.parent) else Path(".")).is_dir():
        raise InputError(str(out), f"cannot write: folder {str(out.parent)!r} does not exist")
    if out is not None:
        from windsheet.order.limits import check_sheet_units

        # Checked before anything is evaluated or recorded; without -o any number is signed off.
        check_sheet_units(len(readings.units), "units", "sign-off sheet")
    if dry_run:
        with open_register_readonly(register) as reg:
            result = _sign(reg, o, readings, who, dry_run=True)
        typer.echo(to_json(result) if as_json else "\n".join(signoff_lines(result, eng) + ["(dry run: nothing recorded)"]))
        return exit_status(result)
    with open_register(register, create=False) as reg:
        say_repairs(reg)
        result = _sign(reg, o, readings, who, sheet_to=out, html=html, paper=paper)
    typer.echo(to_json(result) if as_json else "\n".join(signoff_lines(result, eng)))
    return exit_status(result)


def _signoff_batch(orders, readings_files, as_json, register, inspector, out, html, fmt, paper, dry_run) -> int:
    """Each readings file against the order of its job; a refused file is named and the batch goes on."""
    from .batch import output_format, progress
    from windsheet.order.limits import check_sheet_units
    from windsheet.qc.readings_file import load_measured
    from windsheet.order.reader import load_any_order
    from windsheet.records.register import open_register, open_register_readonly
    from windsheet.qc.signoff import summary_lines as signoff_lines

    if dry_run and out is not None:
        raise InputError("--out", "a dry run writes no sheet; drop --out or --dry-run")
    if out is not None:
        if out.exists() and not out.is_dir():
            raise InputError(str(out), "several sign-offs need an output folder, not a file")
        html = output_format(None, fmt, html, allowed=("pdf", "html")) == "html"
    refused: list[str] = []

    def refuse(f: str, exc: InputError):
        msg = str(exc)
        typer.echo(f"windsheet: {msg if msg.startswith(f) else f'{f}: {msg}'}", err=True)
        refused.append(f)

    by_job: dict = {}
    for f in orders:
        try:
            o = load_any_order(f)
        except InputError as exc:
            refuse(f, exc)
            continue
        except Exception as exc:  # a bug: name it and go on to the summary
            refuse(f, InputError("", internal_fault(exc)))
            continue
        by_job.setdefault(o.doc.job.number, []).append((f, o))
    if out is not None:
        out.mkdir(parents=True, exist_ok=True)
    tally = {"pass": 0, "fail": 0, "incomplete": 0, "not signed": 0}
    opened = open_register_readonly(register) if dry_run else open_register(register, create=False)
    with opened as reg, progress(len(readings_files), "signing off") as step:
        if not dry_run:
            say_repairs(reg)
        for f in readings_files:
            try:
                readings = load_measured(f)
                o = _order_of(readings, by_job)
                who = _inspector(inspector, readings)
                target = None
                if out is not None:
                    check_sheet_units(len(readings.units), "units", "sign-off sheet")
                    target = out / f"{_base_name(f)}.signoff.{'html' if html else 'pdf'}"
                result = _sign(reg, o, readings, who, dry_run=dry_run, sheet_to=target, html=html, paper=paper)
            except InputError as exc:
                refuse(f, exc)
                step()
                continue
            except Exception as exc:  # a bug must not cost the rest of the batch its summary
                refuse(f, InputError("", internal_fault(exc)))
                step()
                continue
            for v, key in (("pass", "units_passed"), ("fail", "units_failed"), ("incomplete", "units_incomplete")):
                tally[v] += result[key]
            tally["not signed"] += len(result["units_not_signed"])
            if as_json:
                typer.echo(json.dumps({"file": f, **result}, ensure_ascii=False, allow_nan=False, default=str))
            else:
                typer.echo(f"== {f}\n" + "\n".join(signoff_lines(result, eng)) + "\n")
            step()
    done = len(readings_files) - sum(f in refused for f in readings_files)
    tail = f"; {len(refused)} refused ({', '.join(refused)})" if refused else ""
    dry = " (dry run: nothing recorded)" if dry_run else ""
    typer.echo(f"windsheet: signed off {done} of {len(readings_files)} readings files — units "
               f"{tally['pass']} pass, {tally['fail']} fail, {tally['incomplete']} incomplete"
               + (f", {tally['not signed']} of their jobs' units not signed" if tally["not signed"] else "")
               + f"{tail}{dry}", err=True)
    if refused or tally["fail"]:
        return 1
    return 3 if tally["incomplete"] else 0


def _inspector(given: Optional[str], readings) -> str:
    who = (given or "").strip() or readings.inspector
    if not who:
        raise InputError("inspector", "name the inspector with --inspector or 'inspector:' in the measured file")
    return who


def _order_of(readings, by_job: dict):
    """The one order among the arguments that these readings belong to."""
    cands = by_job.get(readings.job, [])
    if readings.revision is not None:
        cands = [(f, o) for f, o in cands if str(o.doc.job.revision) == str(readings.revision)]
    rev = f" rev {readings.revision}" if readings.revision is not None else ""
    if not cands:
        raise InputError("job", f"no order for job {readings.job}{rev} among the arguments")
    if len(cands) > 1:
        raise InputError("revision", f"several orders are job {readings.job} ({', '.join(f for f, _ in cands)}); "
                         "give the revision in the readings")
    return cands[0][1]


def _base_name(path: str) -> str:
    # "jobs/HL-0412.measured.yaml" -> "HL-0412"
    name = Path(path).name
    for suffix in (".measured.yaml", ".measured.yml", ".yaml", ".yml", ".csv"):
        if name.lower().endswith(suffix):
            return name[: -len(suffix)]
    return name


def _sign(reg, order, readings, who: str, *, dry_run: bool = False, sheet_to: Optional[Path] = None,
          html: bool = False, paper: str = "a4") -> dict:
    """Evaluate one readings file against its issued traveller; record it (and its sheet) unless a dry run."""
    job = order.doc.job
    _, issued = reg.find_issue(job.number, job.revision, order.sha256)
    result = _evaluate(issued, order, readings, who)
    if dry_run:
        return result
    units = [u.model_dump(mode="json") for u in readings.units]
    if sheet_to is None:
        reg.record_signoff(result, order.sha256, who, measured_units=units)
        return result
    from windsheet.records.report import family_chart
    from windsheet.sheets.control_chart import control_chart_svg
    from windsheet.records.sheet_ledger import recorded_sheet

    family = family_chart(reg, issued, result)
    chart = control_chart_svg(*family) if family else None
    with recorded_sheet(reg, "signoff", sheet_to, _signoff_sheet(issued, result, html, paper, chart)) as sheet:
        reg.record_signoff(result, order.sha256, who, measured_units=units, sheet=sheet)
    return result


def _evaluate(design, order, readings, who) -> dict:
    """The sign-off of a coil's or a transformer's readings against its design."""
    from windsheet.design.dispatch import is_transformer_design
    from windsheet.qc.transformer_readings import TransformerReadings

    if is_transformer_design(design) != isinstance(readings, TransformerReadings):
        kind = "a transformer" if is_transformer_design(design) else "a coil"
        raise InputError("units", f"job {design.job.number} is {kind}; its readings are "
                         + ("read winding by winding (units[].windings)" if kind == "a transformer"
                            else "read strand by strand (units[].strands), not by windings"))
    if isinstance(readings, TransformerReadings):
        from windsheet.qc.transformer_signoff import evaluate_transformer_signoff

        return evaluate_transformer_signoff(design, readings, inspector=who)
    from windsheet.qc.signoff import evaluate_signoff

    return evaluate_signoff(design, readings, inspector=who, resize=_resizer(order))


def _resizer(order):
    """The engine re-sizing this order at another turn count, for the diagnosis."""
    from windsheet.design.sizing import strand_values_at_turns

    return functools.partial(strand_values_at_turns, order)


def _signoff_sheet(prediction, result, html, paper, qc_chart_svg=None) -> bytes:
    from windsheet.sheets.render import render_pdf, render_signoff_html

    page = render_signoff_html(prediction, result, paper=paper, qc_chart_svg=qc_chart_svg)
    return page.encode("utf-8") if html else render_pdf(page)


@guarded
def readings_form_cmd(order: Path = typer.Argument(..., help="The order, a YAML file."),
                      out: Path = typer.Option(..., "-o", "--out", help="The form to write (.yaml, or .csv)."),
                      as_csv: bool = typer.Option(False, "--csv", help="Write CSV (one row per unit) even "
                                                  "when the name does not end in .csv.")):
    """Write a measured-values file for the order: its serial numbers, every required QC line empty."""
    from windsheet.common.fileio import atomic_write_text
    from windsheet.design.dispatch import is_transformer_design, size_any
    from windsheet.order.reader import load_any_order
    from windsheet.qc.readings_form import csv_form, yaml_form

    p = size_any(load_any_order(order))
    if out.exists():
        raise InputError(str(out), "already exists; a filled-in form is a record, not overwritten — "
                                   "choose another name")
    if not (out.parent if str(out.parent) else Path(".")).is_dir():
        raise InputError(str(out), f"cannot write: folder {str(out.parent)!r} does not exist")
    csv_out = as_csv or out.suffix.lower() == ".csv"
    if is_transformer_design(p):
        if csv_out:
            raise InputError(str(out), "a transformer's readings form is YAML (winding by winding); "
                                       "name it .yaml")
        from windsheet.qc.transformer_form import transformer_yaml_form as yaml_form
    atomic_write_text(out, csv_form(p) if csv_out else yaml_form(p))
    typer.echo(f"{p.job.number} rev {p.job.revision}: readings form for "
               f"{len(p.job.units)} units, {len(p.qc_required)} lines each: {out}", err=True)
