"""Draft readings in the register: what the bench page has saved but not yet signed off.

One row per (job, revision, serial, field) with a version number.  A save names
the version it last saw; when another inspector has saved the same field since,
the save is refused (never written over the other's reading).  The table lives
in the register file itself, so drafts survive a closed browser and a restarted
server, and is added by :func:`migrate` to any register, old or new, without
touching the existing tables.
"""

from __future__ import annotations

import datetime as _dt
import sqlite3
from typing import Optional

from windsheet.common.errors import InputError

#: Longest text kept for one reading (a quantity or a word; notes are longer).
MAX_VALUE_CHARS = 200

_DDL = """
CREATE TABLE IF NOT EXISTS drafts (
    job TEXT NOT NULL,
    revision TEXT NOT NULL,
    serial TEXT NOT NULL,
    field TEXT NOT NULL,
    value TEXT NOT NULL,
    version INTEGER NOT NULL,
    saved_by TEXT,
    saved_at TEXT NOT NULL,
    PRIMARY KEY (job, revision, serial, field)
)
"""


class StaleSave(InputError):
    """A save based on a version another inspector has already replaced."""

    def __init__(self, path: str, message: str, current: dict):
        super().__init__(path, message)
        self.current = current


def migrate(register) -> None:
    """Add the drafts table to ``register`` if it has none (idempotent)."""
    exists = register.conn.execute(
        "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'drafts'").fetchone()
    if exists:
        return
    with register.transaction() as c:
        c.execute(_DDL)


def load_drafts(register, job: str, revision: str) -> dict:
    """``{(serial, field): {"value", "version", "saved_by", "saved_at"}}`` for one job revision."""
    out = {}
    for serial, field, value, version, by, at in register.conn.execute(
            "SELECT serial, field, value, version, saved_by, saved_at FROM drafts"
            " WHERE job = ? AND revision = ?", (job, revision)):
        out[(serial, field)] = {"value": value, "version": version, "saved_by": by, "saved_at": at}
    return out


def save_draft(register, job: str, revision: str, serial: str, field: str, value: str,
               seen_version: int, saved_by: Optional[str] = None) -> int:
    """Save one reading's text; returns its new version.

    Parameters
    ----------
    seen_version : int
        The version the inspector's page showed (0 for a field never saved).

    Raises
    ------
    StaleSave
        Another save replaced that version meanwhile; nothing is written.
    """
    value = str(value).strip()
    if len(value) > MAX_VALUE_CHARS:
        raise InputError(f"{serial}.{field}", f"longer than {MAX_VALUE_CHARS} characters")
    now = _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds")
    with register.transaction() as c:
        row = c.execute("SELECT value, version, saved_by, saved_at FROM drafts WHERE job = ? AND"
                        " revision = ? AND serial = ? AND field = ?",
                        (job, revision, serial, field)).fetchone()
        current = 0 if row is None else int(row[1])
        if current != int(seen_version):
            who = (row[2] or "another inspector") if row else "another inspector"
            shown = row[0] if row else ""
            raise StaleSave(f"{serial} {field}",
                            f"changed by {who} at {row[3] if row else '?'} to {shown!r} since this page "
                            "was loaded; your entry was not saved — check the reading and enter it again",
                            {"value": shown, "version": current})
        if row is not None and row[0] == value:
            return current
        try:
            c.execute("INSERT OR REPLACE INTO drafts VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
                      (job, revision, serial, field, value, current + 1, saved_by, now))
        except sqlite3.Error as exc:
            raise InputError(register.label, f"cannot save the draft: {exc}") from None
        return current + 1
