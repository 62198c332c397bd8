"""Sheets and their register records land together, even across a crash.

A traveller or sign-off sheet is staged beside its target, its path and
content hash are recorded in the register's ``sheets`` table (state
``pending``) in the same transaction as the issue or sign-off, and only then
is it renamed into place and marked ``placed``.  A process killed between the
commit and the rename leaves a committed record, a pending ledger row and the
complete staged file.  The next run that opens the register for writing
**finishes it from the staged file**: when the staged file is there with the
recorded hash it is renamed into place; when the target already holds the
recorded content the row is marked placed; otherwise the row is marked
``unprinted`` (the record stands, the sheet must be printed again), and
``windsheet register JOB`` says so.
"""

from __future__ import annotations

import hashlib
import sqlite3
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Optional

from windsheet.common.errors import InputError
from windsheet.common.fileio import discard_file, place_file, stage_file


@dataclass
class StagedSheet:
    """A sheet written beside its target, waiting for its record's commit."""

    kind: str
    target: Path
    staged: str
    sha256: str
    id: Optional[int] = None


def sha256_of(data: bytes) -> str:
    """Hex SHA-256 of a sheet's bytes.

    Examples
    --------
    >>> sha256_of(b"")[:12]
    'e3b0c44298fc'
    """
    return hashlib.sha256(data).hexdigest()


def record_pending(conn: sqlite3.Connection, sheet: StagedSheet, ref_id: int, now: str) -> None:
    """Inside the record's transaction: the sheet's path, hash and staged file, state pending."""
    cur = conn.execute("INSERT INTO sheets (kind, ref_id, path, sha256, staged, state, recorded_at)"
                       " VALUES (?, ?, ?, ?, ?, 'pending', ?)",
                       (sheet.kind, int(ref_id), str(Path(sheet.target).resolve()), sheet.sha256,
                        str(Path(sheet.staged).resolve()), now))
    sheet.id = int(cur.lastrowid)


@contextmanager
def recorded_sheet(register, kind: str, target, data: bytes):
    """Stage ``data`` for ``target``; the block records it (passing the yielded sheet to the
    register's record call); then the sheet is put in place and marked placed.

    If the block fails nothing is placed and the staged file is removed (the
    record's transaction rolled back with it).
    """
    target, staged = stage_file(target, data)
    sheet = StagedSheet(kind, Path(target), staged, sha256_of(data))
    try:
        yield sheet
    except BaseException:
        discard_file(staged)
        raise
    try:
        place_file(staged, target)
    except OSError as exc:
        if sheet.id is None:  # nothing recorded: nothing to finish later
            discard_file(staged)
            raise InputError(str(target), f"cannot write: {exc.strerror or exc}") from None
        raise InputError(str(target), f"recorded, but the sheet could not be put in place ({exc.strerror or exc}); "
                                      "the next windsheet run that writes the register finishes it") from None
    if sheet.id is not None:
        register.mark_sheet(sheet.id, "placed")


def _file_sha(path: Path) -> Optional[str]:
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except OSError:
        return None


def finish_pending(conn: sqlite3.Connection) -> list[str]:
    """Finish every sheet a crashed run left pending; returns one line per sheet touched."""
    notes = []
    rows = conn.execute("SELECT id, kind, path, sha256, staged FROM sheets WHERE state = 'pending'").fetchall()
    for sid, kind, path, sha, staged in rows:
        target = Path(path)
        if _file_sha(target) == sha:
            state = "placed"
        elif staged and _file_sha(Path(staged)) == sha:
            try:
                place_file(staged, target)
                state = "placed"
                notes.append(f"finished the {kind} sheet {target} left by an interrupted run")
            except OSError as exc:
                notes.append(f"could not finish the {kind} sheet {target} ({exc.strerror or exc}); "
                             "it stays pending")
                continue
        else:
            state = "unprinted"
            notes.append(f"the {kind} sheet {target} of an interrupted run is lost: its record stands, "
                         "print the sheet again")
        conn.execute("UPDATE sheets SET state = ? WHERE id = ?", (state, sid))
    return notes
