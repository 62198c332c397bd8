"""Each job's state kept in the register (schema version 3): table ``job_states``, one row per job.

The listing of 50,000 jobs read each job's state from 200,000 unit sign-offs every time it
ran. Version 3 keeps the result beside the records: the writer that issues a job or signs
it off works the job's state out from its records (as the listing did) and stores it in the
same transaction. Triggers in the register itself delete a job's row whenever one of its
issues, sign-offs or unit sign-offs is added, changed or removed, by windsheet or by anyone,
so a stored row is never older than the records it sums; a job without a row is worked out
from its records as before. ``windsheet register --check`` compares every stored row with
the records.

Standard library only: the listing uses it.
"""

from __future__ import annotations

import json
import sqlite3

TABLE = "job_states"

#: The table: the job's latest issue (its key, so the newest-first listing is a reverse scan),
#: its state, the counts the listing prints and the unit serials by verdict (for --json).
TABLE_SQL = f"""
CREATE TABLE IF NOT EXISTS {TABLE} (
    issue_id INTEGER PRIMARY KEY,
    job TEXT NOT NULL UNIQUE,
    state TEXT NOT NULL CHECK (state IN ('issued', 'passed', 'failed', 'incomplete')),
    units_passed INTEGER NOT NULL,
    units_total INTEGER NOT NULL,
    tally_json TEXT NOT NULL
)"""

#: The records a job's state is worked out from; a change to any row of them drops the job's stored row.
SOURCES = ("issues", "signoffs", "unit_signoffs")


def trigger_names() -> list[str]:
    """The triggers a version-3 register must hold (checked on every open).

    Examples
    --------
    >>> trigger_names()[:2]
    ['job_states_stale_issues_insert', 'job_states_stale_issues_update']
    """
    return [f"{TABLE}_stale_{t}_{op}" for t in SOURCES for op in ("insert", "update", "delete")]


def triggers_sql() -> list[str]:
    """``CREATE TRIGGER`` statements: any change to a job's records deletes its stored state."""
    out = []
    for table in SOURCES:
        for op, jobs in (("insert", "NEW.job"), ("update", "OLD.job, NEW.job"), ("delete", "OLD.job")):
            out.append(f"CREATE TRIGGER IF NOT EXISTS {TABLE}_stale_{table}_{op} AFTER {op.upper()} ON {table} "
                       f"BEGIN DELETE FROM {TABLE} WHERE job IN ({jobs}); END")
    return out


def create(conn: sqlite3.Connection) -> None:
    """Add the table and its triggers (inside the caller's transaction)."""
    conn.execute(TABLE_SQL)
    for stmt in triggers_sql():
        conn.execute(stmt)


def has_table(conn: sqlite3.Connection) -> bool:
    return conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = ?",
                        (TABLE,)).fetchone() is not None


def missing_triggers(conn: sqlite3.Connection) -> list[str]:
    have = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type = 'trigger'")}
    return [t for t in trigger_names() if t not in have]


def row_of(st: dict) -> tuple:
    """The stored row of one job's state (a dict as the listing gives it).

    Examples
    --------
    >>> row_of({"issue_id": 7, "number": "HL-1", "state": "issued", "units": ["a", "b"],
    ...         "units_passed": ["a"], "units_failed": [], "units_incomplete": [], "units_not_signed": ["b"]})
    (7, 'HL-1', 'issued', 1, 2, '{"failed":[],"incomplete":[],"not_signed":["b"],"passed":["a"]}')
    """
    tally = {"passed": st["units_passed"], "failed": st["units_failed"], "incomplete": st["units_incomplete"],
             "not_signed": st["units_not_signed"]}
    return (st["issue_id"], st["number"], st["state"], len(st["units_passed"]), len(st["units"]),
            json.dumps(tally, sort_keys=True, separators=(",", ":")))


def store(conn: sqlite3.Connection, states) -> None:
    """Store jobs' states worked out from their records (inside the writer's transaction)."""
    conn.executemany(f"INSERT OR REPLACE INTO {TABLE} (issue_id, job, state, units_passed, units_total, "
                     "tally_json) VALUES (?, ?, ?, ?, ?, ?)", [row_of(st) for st in states])


def complete(conn: sqlite3.Connection) -> bool:
    """Whether every listed job has its stored state (else the listing works them all out).

    A row is dropped by the triggers whenever its job's records change and written back by
    windsheet's writers; a count of the stored rows against the jobs with an issue finds a job
    someone changed outside windsheet (two index scans, no record read).
    """
    stored = conn.execute(f"SELECT count(*) FROM {TABLE}").fetchone()[0]
    listed = conn.execute("SELECT count(*) FROM (SELECT DISTINCT job FROM issues)").fetchone()[0]
    return stored == listed


#: The listing's columns of every job, newest issue first, from the stored states: the issue's
#: listed columns from its covering index, the customer from the jobs table.
def listing_query(index: str, tally: bool, where: str = "") -> str:
    extra = ", i.order_sha256, i.units_json, i.issued_by, j.part, s.tally_json" if tally else ""
    return (f"SELECT s.job, s.issue_id, i.revision, j.customer, i.issued_at, s.state, s.units_passed, "
            f"s.units_total, i.design_state{extra} FROM {TABLE} s "
            f"JOIN issues i{f' INDEXED BY {index}' if index else ''} ON i.job = s.job AND i.id = s.issue_id "
            f"JOIN jobs j ON j.number = s.job {where} ORDER BY s.issue_id DESC")
