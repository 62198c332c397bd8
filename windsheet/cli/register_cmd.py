"""``windsheet register``: the job listing, one job's history, --issue, --lot and --check."""

from __future__ import annotations

from pathlib import Path
from typing import Optional

import typer

from windsheet.common.errors import InputError

from .common import guarded, to_json


def register(app: typer.Typer) -> None:
    """Add ``register`` to the command line."""
    app.command("register")(register_cmd)


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
                 check: bool = typer.Option(False, "--check", help="Check the whole register, read-only: every "
                                            "page, the text and the JSON of every record (other commands check "
                                            "what they read)."),
                 as_json: bool = typer.Option(False, "--json", help="Print as JSON."),
                 lot: Optional[str] = typer.Option(None, "--lot", help="List every unit recorded with this "
                                                   "wire reel or lot, core lot or instrument id (exact match).")):
    """List the jobs in the register (job, revision, customer, issued, state, passed/total, design
    status), or one job's history; --issue records an order as issued; --lot lists the units of a reel or lot."""
    if lot is not None:
        return _lot_search(register, lot, as_json)
    if check:
        from windsheet.records.register import check_register

        done = check_register(register)
        if as_json:
            typer.echo(to_json(done))
        else:
            typer.echo(f"{done['register']}: no damage found — {done['jobs']} job(s), {done['issues']} issue(s), "
                       f"{done['signoffs']} sign-off(s), {done['unit_signoffs']} unit record(s) checked "
                       "(every page, the listed text, every record's JSON)")
        return
    from windsheet.records.register import open_register_readonly, resolve_register_path

    if issue is not None:
        from windsheet.order.reader import load_any_order
        from windsheet.design.dispatch import size_any
        from windsheet.design.qc_plan import issued_state
        from windsheet.design.dispatch import is_transformer_design
        from windsheet.design.issuable import check_issuable, check_transformer_issuable
        from windsheet.records.register import open_register

        # A coil or a transformer order, as the traveller takes it (its check, without loading the sheets).
        o = load_any_order(issue)
        p = size_any(o)
        (check_transformer_issuable if is_transformer_design(p) else check_issuable)(p, force)
        p = p.with_state(issued_state(p.state, force))
        with open_register(register, create=True) as reg:
            issued, how = reg.issue_or_reprint(p, o.source.decode("utf-8", "replace"), o.sha256)
        forced = " — FORCED over a failing design check" if p.state.state == "forced" else ""
        # Only what was recorded: the listing is its own command.
        typer.echo(f"{how} {p.job.number} rev {p.job.revision} (issue {issued}){forced}", err=True)
        return
    if not resolve_register_path(register).exists():
        typer.echo(f"(no register yet at {resolve_register_path(register)})")
        return
    # Listing reads only: a read-only file or folder can be listed.
    with open_register_readonly(register) as reg:
        if job:
            from windsheet.qc.signoff_text import history_lines

            h = reg.job_history(job)
            typer.echo(to_json(h) if as_json else "\n".join(history_lines(h)))
            return
        from windsheet.records.register_listing import cells_csv, cells_table, select, select_cells

        if as_json:
            typer.echo(to_json(select(reg.list_jobs(), state, customer, since)))
            return
        # The table and CSV read only their cells (from the stored states when the register keeps them).
        rows = select_cells(reg.listing_cells(), state, customer, since)
    if as_csv:
        typer.echo(cells_csv(rows), nl=False)
    else:
        typer.echo("\n".join(cells_table(rows)))


def _lot_search(register, lot, as_json):
    """The recall question: which units were built from (or measured with) ``lot``."""
    from windsheet.records.register import open_register_readonly, resolve_register_path
    from windsheet.records.traceability import lot_lines, similar_lots, units_with_lot

    if not resolve_register_path(register).exists():
        raise InputError(str(resolve_register_path(register)), "no register here yet; nothing is recorded")
    with open_register_readonly(register) as reg:
        units = units_with_lot(reg.conn, lot)
        similar = similar_lots(reg.conn, lot) if not units else []
    typer.echo(to_json({"lot": lot, "units": units}) if as_json else "\n".join(lot_lines(lot, units, similar)))
