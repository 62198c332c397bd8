"""Reel, lot and instrument traceability of signed-off units.

Each unit's measured values may name the wire reel or lot (one for every
strand, or one per strand), the form's or core's lot, and the ids of the
instruments it was measured with (see :mod:`windsheet.qc.measured`).  At sign-off
they travel in the evaluated unit (``unit["trace"]``), print on the sign-off
sheet, and are stored row by row in the register's ``unit_lots`` table, so
that the recall question "which units were built from reel X?" is one exact
look-up (:func:`units_with_lot`).

This module imports only the standard library: ``windsheet register --lot``
must start fast.
"""

from __future__ import annotations

import sqlite3

from windsheet.qc.trace import lot_rows

#: The register table of lots; created in new registers and added to older ones on open.
UNIT_LOTS_SCHEMA = """
CREATE TABLE IF NOT EXISTS unit_lots (
    id INTEGER PRIMARY KEY,
    signoff_id INTEGER NOT NULL REFERENCES signoffs(id),
    job TEXT NOT NULL,
    serial TEXT NOT NULL,
    kind TEXT NOT NULL CHECK (kind IN ('wire', 'core', 'instrument')),
    role TEXT NOT NULL,
    lot TEXT NOT NULL,
    signed_at TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS unit_lots_lot ON unit_lots(lot)
"""


def ensure_table(conn: sqlite3.Connection) -> None:
    """Add the ``unit_lots`` table to a register that lacks it (a register made before it existed)."""
    have = conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'unit_lots'").fetchone()
    if have:
        return
    conn.execute("BEGIN IMMEDIATE")
    try:
        for stmt in filter(str.strip, UNIT_LOTS_SCHEMA.split(";")):
            conn.execute(stmt)
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise


def insert_unit_lots(c, signoff_id: int, job: str, serial: str, trace: dict, now: str) -> int:
    """Store a unit's trace inside the sign-off's transaction; returns the rows written."""
    rows = lot_rows(trace)
    c.executemany("INSERT INTO unit_lots (signoff_id, job, serial, kind, role, lot, signed_at)"
                  " VALUES (?, ?, ?, ?, ?, ?, ?)",
                  [(signoff_id, job, serial, kind, role, lot, now) for kind, role, lot in rows])
    return len(rows)


def units_with_lot(conn: sqlite3.Connection, lot: str) -> list[dict]:
    """Every unit recorded with ``lot`` (a reel, a core lot or an instrument id).

    The match is exact (same characters, same case): a recall list must hold
    the units built from that lot and no others.  A unit signed off more than
    once is listed once, with every sign-off that recorded the lot.

    Returns
    -------
    units : list of dict
        ``job``, ``serial``, ``kind`` (wire, core, instrument), ``roles``
        (strands or instrument roles), ``signoffs`` (ids) and ``signed_at``
        (first and last), ordered by job and serial.
    """
    have = conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'unit_lots'").fetchone()
    if not have:
        return []
    found: dict = {}
    for job, serial, kind, role, sid, at in conn.execute(
            "SELECT job, serial, kind, role, signoff_id, signed_at FROM unit_lots WHERE lot = ?"
            " ORDER BY job, serial, id", (lot,)):
        u = found.setdefault((job, serial, kind), {"job": job, "serial": serial, "kind": kind, "roles": [],
                                                  "signoffs": [], "signed_at": [at, at]})
        if role and role not in u["roles"]:
            u["roles"].append(role)
        if sid not in u["signoffs"]:
            u["signoffs"].append(sid)
        u["signed_at"][1] = at
    return list(found.values())


def similar_lots(conn: sqlite3.Connection, lot: str) -> list[str]:
    """Recorded lots equal to ``lot`` but for letter case: offered when the exact search finds none."""
    have = conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'unit_lots'").fetchone()
    if not have:
        return []
    return [r[0] for r in conn.execute(
        "SELECT DISTINCT lot FROM unit_lots WHERE lot = ? COLLATE NOCASE AND lot != ? ORDER BY lot", (lot, lot))]


def lot_lines(lot: str, units: list[dict], similar=()) -> list[str]:
    """Readable lines of a lot search.

    Examples
    --------
    >>> lot_lines("R-1", [{"job": "J1", "serial": "J1-01", "kind": "wire", "roles": ["A"],
    ...                    "signoffs": [3], "signed_at": ["2026-01-02", "2026-01-02"]}])
    ['Lot R-1: 1 unit(s)', '  J1  J1-01  wire (A)  signed off 2026-01-02']
    """
    if not units:
        hint = f" (recorded with another letter case: {', '.join(similar)})" if similar else ""
        return [f"Lot {lot}: no unit recorded with it{hint}"]
    out = [f"Lot {lot}: {len({(u['job'], u['serial']) for u in units})} unit(s)"]
    for u in units:
        roles = f" ({', '.join(u['roles'])})" if u["roles"] else ""
        out.append(f"  {u['job']}  {u['serial']}  {u['kind']}{roles}  signed off {u['signed_at'][1]}")
    return out
