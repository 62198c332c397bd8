"""``windsheet register``: the job list as an aligned table, CSV or JSON, with filters.

Plain Python only: listing the register loads neither numpy nor pydantic.
"""

from __future__ import annotations

import csv
import io

from windsheet.common.errors import InputError

COLUMNS = ("job", "rev", "customer", "issued", "state", "passed/total", "design")
STATES = ("issued", "passed", "failed", "incomplete")


def job_row(j: dict) -> dict:
    """One job as the listing's columns (words, not Python literals).

    Examples
    --------
    >>> job_row({"number": "HL-0412", "revision": "A", "customer": "Fenwick", "issued_at":
    ...          "2026-12-02T10:00:00+00:00", "state": "passed", "units": ["a", "b"],
    ...          "units_passed": ["a", "b"], "design_status": {"state": "ok"}})["passed/total"]
    '2/2'
    """
    return dict(zip(COLUMNS, job_cells(j)))


_DESIGN_WORDS = {"ok": "ok", "forced": "FORCED", "failing": "FAILING"}


def cells(number, revision, customer, issued_at, state, passed: int, total: int, design) -> tuple:
    """The listing's columns of one job, in order (a tuple: 50,000 jobs format in a tenth of a second).

    Examples
    --------
    >>> cells("HL-0412", None, None, "2026-12-02T10:00:00+00:00", "issued", 0, 4, "forced")
    ('HL-0412', '-', '', '2026-12-02', 'issued', '0/4', 'FORCED')
    """
    design = design or "ok"
    return (number, revision or "-", customer or "", (issued_at or "")[:10], state, f"{passed}/{total}",
            _DESIGN_WORDS.get(design, design))


def job_cells(j: dict) -> tuple:
    """:func:`cells` of one job as the register's states give it."""
    return cells(j["number"], j.get("revision"), j.get("customer"), j.get("issued_at"), j["state"],
                 len(j.get("units_passed") or ()), len(j.get("units") or ()),
                 (j.get("design_status") or {}).get("state"))


_cells = job_cells


def _filters(state=None, customer=None, since=None) -> tuple:
    """The filters as compared: a state word, a lower-case customer part, an ISO date (or None)."""
    if state is not None:
        state = state.strip().lower()
        if state not in STATES:
            raise InputError("--state", f"expected one of {', '.join(STATES)}; got {state!r}")
    if since is not None:
        import datetime as _dt

        try:
            since = _dt.date.fromisoformat(since.strip()).isoformat()
        except ValueError:
            raise InputError("--since", f"expected a date like 2026-12-01; got {since!r}") from None
    return state, (customer or "").strip().lower(), since


def select(jobs: list[dict], state=None, customer=None, since=None) -> list[dict]:
    """Jobs matching every filter given: a state, a customer (case-insensitive part of the name),
    issued on or after a date (``YYYY-MM-DD``)."""
    state, want, since = _filters(state, customer, since)
    return [j for j in jobs
            if (state is None or j["state"] == state)
            and (not want or want in (j.get("customer") or "").lower())
            and (since is None or (j.get("issued_at") or "")[:10] >= since)]


def select_cells(rows: list[tuple], state=None, customer=None, since=None) -> list[tuple]:
    """:func:`select` on the listing's cells (customer, issued date and state are cells 2, 3 and 4)."""
    state, want, since = _filters(state, customer, since)
    if state is None and not want and since is None:
        return rows
    return [r for r in rows
            if (state is None or r[4] == state) and (not want or want in r[2].lower())
            and (since is None or r[3] >= since)]


def table_lines(jobs: list[dict]) -> list[str]:
    """An aligned table with a header row; ``(no jobs)`` when empty."""
    return cells_table([job_cells(j) for j in jobs])


def cells_table(rows: list[tuple]) -> list[str]:
    """:func:`table_lines` of the listing's cells."""
    if not rows:
        return ["(no jobs)"]
    # Widths column by column over tuples of text: 50,000 jobs format in a fraction of a second.
    rows = [COLUMNS] + rows
    width = [max(map(len, col)) for col in zip(*rows)]
    fmt = "  ".join(f"{{:<{w}}}" for w in width)
    return [fmt.format(*r).rstrip() for r in rows]


def as_csv(jobs: list[dict]) -> str:
    """The listing as CSV with a header row (a spreadsheet's import)."""
    return cells_csv([job_cells(j) for j in jobs])


def cells_csv(rows: list[tuple]) -> str:
    """:func:`as_csv` of the listing's cells."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(COLUMNS)
    w.writerows(rows)
    return buf.getvalue()
