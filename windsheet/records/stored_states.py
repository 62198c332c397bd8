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
#: what the listing's table prints of it (one scan, no join), its state, the counts and the unit
#: serials by verdict (for --json).
TABLE_SQL = f"""
CREATE TABLE IF NOT EXISTS {TABLE} (
    issue_id INTEGER PRIMARY KEY,
    job TEXT NOT NULL UNIQUE,
    revision TEXT,
    customer TEXT,
    issued_at TEXT,
    design_state TEXT,
    state TEXT NOT NULL CHECK (state IN ('issued', 'passed', 'failed', 'incomplete')),
    units_passed INTEGER NOT NULL,
    units_total INTEGER NOT NULL,
    tally_json TEXT NOT NULL
)"""

#: Every column, in order (what a stored row and :func:`row_of` hold).
COLUMNS = ("issue_id", "job", "revision", "customer", "issued_at", "design_state", "state", "units_passed",
           "units_total", "tally_json")

#: The records a job's stored row is worked out from, and the column naming the job in each; a change
#: to any row of them drops the job's stored row.
SOURCES = (("issues", "job"), ("signoffs", "job"), ("unit_signoffs", "job"), ("jobs", "number"))


def trigger_names() -> list[str]:
    """The triggers a version-3 register must hold (checked on every open).

    Examples
    --------
    >>> trigger_names()[:2]
    ['job_states_stale_issues_insert', 'job_states_stale_issues_update']
    """
    return [f"{TABLE}_stale_{t}_{op}" for t, _ in SOURCES for op in ("insert", "update", "delete")]


def triggers_sql() -> list[str]:
    """``CREATE TRIGGER`` statements: any change to a job's records deletes its stored state."""
    out = []
    for table, col in SOURCES:
        for op, jobs in (("insert", f"NEW.{col}"), ("update", f"OLD.{col}, NEW.{col}"), ("delete", f"OLD.{col}")):
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
    >>> row_of({"issue_id": 7, "number": "HL-1", "revision": "A", "customer": "Fenwick",
    ...         "issued_at": "2026-12-02T10:00:00+00:00", "design_status": {"state": "ok"}, "state": "issued",
    ...         "units": ["a", "b"], "units_passed": ["a"], "units_failed": [], "units_incomplete": [],
    ...         "units_not_signed": ["b"]})[2:]
    ('A', 'Fenwick', '2026-12-02T10:00:00+00:00', 'ok', 'issued', 1, 2, '{"failed":[],"incomplete":[],"not_signed":["b"],"passed":["a"]}')
    """
    tally = {"passed": st["units_passed"], "failed": st["units_failed"], "incomplete": st["units_incomplete"],
             "not_signed": st["units_not_signed"]}
    return (st["issue_id"], st["number"], st["revision"], st["customer"], st["issued_at"],
            st["design_status"]["state"], st["state"], len(st["units_passed"]), len(st["units"]),
            json.dumps(tally, sort_keys=True, separators=(",", ":")))


def store(conn: sqlite3.Connection, states) -> None:
    """Store jobs' states worked out from their records (inside the writer's transaction)."""
    conn.executemany(f"INSERT OR REPLACE INTO {TABLE} ({', '.join(COLUMNS)}) VALUES "
                     f"({', '.join('?' * len(COLUMNS))})", [row_of(st) for st in states])


def complete(conn: sqlite3.Connection) -> bool:
    """Whether every listed job has its stored state (else the listing works them all out).

    A row is dropped by the triggers whenever its job's records change and written back by
    windsheet's writers; a count of the stored rows against the jobs with an issue finds a job
    someone changed outside windsheet (two index scans, no record read).
    """
    stored = conn.execute(f"SELECT count(*) FROM {TABLE}").fetchone()[0]
    listed = conn.execute("SELECT count(*) FROM (SELECT DISTINCT job FROM issues)").fetchone()[0]
    return stored == listed


#: What the listing's table prints of every job, newest issue first: one reverse scan of the stored rows.
TABLE_QUERY = (f"SELECT job, issue_id, revision, customer, issued_at, state, units_passed, units_total, "
               f"design_state FROM {TABLE} ORDER BY issue_id DESC")


def listing_query(index: str, where: str = "") -> str:
    """Every job's listed facts (for ``--json`` and the filters), newest issue first: the stored
    state and serials, the issue's other listed columns from its covering index, the job's part."""
    return (f"SELECT s.job, s.issue_id, i.revision, j.customer, i.issued_at, s.state, i.design_state, "
            f"i.order_sha256, i.units_json, i.issued_by, j.part, s.tally_json FROM {TABLE} s "
            f"JOIN issues i{f' INDEXED BY {index}' if index else ''} ON i.job = s.job AND i.id = s.issue_id "
            f"JOIN jobs j ON j.number = s.job {where} ORDER BY s.issue_id DESC")
