"""A count of the register's changes, kept by the register itself (schema version 4).

A writer must not write into a register the listing would refuse, so a writer checks what the
listing reads of every row (:func:`windsheet.records.register_schema.check_listed`): linear in
the register, a tenth of a second or more at 50,000 jobs, on every ``--issue`` and sign-off.
Most of those checks find what the previous writer left. Version 4 keeps two numbers in
``meta``: ``changes``, raised by a trigger on every row added, changed or removed in a listed
table, by windsheet or by anyone; and ``checked_changes``, the count at which a writer last
saw every listed row checked (by its own scan, or because nothing but windsheet's writers, who
write only what they checked, changed it since). A writer scans only when the two differ: after
a change made outside windsheet, once. A missing trigger is refused as damage, as the stored
states' are; a missing count reads as "changed".

Standard library only: the register uses it.
"""

from __future__ import annotations

import sqlite3
from typing import Optional

COUNT_KEY = "changes"
CHECKED_KEY = "checked_changes"

#: The tables the listing reads (and the writers' check covers); a change to any row raises the count.
WATCHED = ("jobs", "issues", "signoffs", "unit_signoffs", "job_states")


def trigger_names() -> list[str]:
    """The triggers a version-4 register must hold (checked on every open).

    Examples
    --------
    >>> trigger_names()[:2]
    ['change_count_jobs_insert', 'change_count_jobs_update']
    >>> len(trigger_names())
    15
    """
    return [f"change_count_{t}_{op}" for t in WATCHED for op in ("insert", "update", "delete")]


def triggers_sql() -> list[str]:
    """``CREATE TRIGGER`` statements: each row added, changed or removed raises the count by one."""
    return [f"CREATE TRIGGER IF NOT EXISTS change_count_{t}_{op} AFTER {op.upper()} ON {t} BEGIN "
            f"UPDATE meta SET value = CAST(value AS INTEGER) + 1 WHERE key = '{COUNT_KEY}'; END"
            for t in WATCHED for op in ("insert", "update", "delete")]


def create(conn: sqlite3.Connection) -> None:
    """Add the triggers and the two counts (inside the caller's transaction, after its check)."""
    for stmt in triggers_sql():
        conn.execute(stmt)
    conn.execute("INSERT OR IGNORE INTO meta VALUES (?, '0')", (COUNT_KEY,))
    mark_checked(conn)


def _meta_count(conn: sqlite3.Connection, key: str) -> Optional[int]:
    row = conn.execute("SELECT value FROM meta WHERE key = ?", (key,)).fetchone()
    try:
        return int(row[0]) if row is not None else None
    except (TypeError, ValueError):
        return None


def count(conn: sqlite3.Connection) -> Optional[int]:
    """The register's change count now (``None`` when its row is gone)."""
    return _meta_count(conn, COUNT_KEY)


def checked(conn: sqlite3.Connection) -> Optional[int]:
    """The change count at which every listed row was last known checked (``None``: never)."""
    return _meta_count(conn, CHECKED_KEY)


def needs_check(conn: sqlite3.Connection, now: Optional[int] = None) -> bool:
    """Whether a row may have changed since a writer last saw every listed row checked
    (``now``: the count, when the caller has just read it)."""
    now = count(conn) if now is None else now
    return now is None or now != checked(conn)


def mark_checked(conn: sqlite3.Connection) -> None:
    """Record that every listed row is checked at the present count (inside a writer's
    transaction, after its check and its own writes); restores a count someone removed."""
    conn.execute("INSERT OR IGNORE INTO meta VALUES (?, '0')", (COUNT_KEY,))
    conn.execute("INSERT OR REPLACE INTO meta VALUES (?, (SELECT value FROM meta WHERE key = ?))",
                 (CHECKED_KEY, COUNT_KEY))


def missing_triggers(conn: sqlite3.Connection) -> list[str]:
    have = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type = 'trigger'")}
    return [t for t in trigger_names() if t not in have]
