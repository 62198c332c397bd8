"""Recognising a register and naming its faults: the header read as plain bytes, the version and
structure, the whole-file check, and a locked, read-only, full or failing disk said as such.

Standard library only; :mod:`windsheet.records.register` opens the file after these checks.
"""

from __future__ import annotations

import errno
import os
import shutil
import sqlite3
from pathlib import Path
from typing import Optional

from windsheet.common.errors import InputError
from windsheet.records import register_schema as schema
from .register_schema import SCHEMA_VERSION

APPLICATION = "windsheet-register"
#: PRAGMA application_id, "WSHR" in ASCII: marks the file in its own header.
APPLICATION_ID = 0x57534852

_SQLITE_MAGIC = b"SQLite format 3\x00"


def _read_header(path: Path, label: str) -> bytes:
    try:
        with open(path, "rb") as fh:
            return fh.read(100)
    except PermissionError:
        raise InputError(label, "cannot read the register: permission denied") from None
    except IsADirectoryError:
        raise InputError(label, "is a folder, not a register file") from None
    except OSError as exc:
        raise InputError(label, f"cannot read the register: {exc.strerror or exc}") from None


def _check_header(header: bytes, label: str) -> None:
    if len(header) < 100 or not header.startswith(_SQLITE_MAGIC):
        raise InputError(label, "is not a windsheet register (not an SQLite database); "
                                "refusing to touch it — give another path with --register")
    app_id = int.from_bytes(header[68:72], "big")
    if app_id != APPLICATION_ID:
        raise InputError(label, "is an SQLite database but not a windsheet register; "
                                "refusing to touch it — give another path with --register")


def _check_contents(conn: sqlite3.Connection, label: str, whole_file: bool = True) -> int:
    """Check a register's header tables, version and structure; returns its schema version.

    ``whole_file`` adds SQLite's ``quick_check`` of every page (a read of the whole
    file): made before a migration (which reads every record). A writer otherwise
    checks what the listing reads (:func:`register_schema.check_listed`), a reader
    meets any damage in the rows it reads, refused there; ``windsheet register
    --check`` makes the whole check.
    """
    try:
        ok = conn.execute("PRAGMA quick_check").fetchone()[0] if whole_file else "ok"
        row = conn.execute("SELECT value FROM meta WHERE key = 'application'").fetchone()
        version = conn.execute("PRAGMA user_version").fetchone()[0]
    except (sqlite3.DatabaseError, UnicodeError) as exc:
        if _is_locked(exc):
            raise _locked_error(label) from None
        raise (_disk_fault(label, exc)
               or InputError(label, f"register is damaged or not a windsheet register ({_one_line(exc)})")) from None
    if ok != "ok":
        first = (str(ok).splitlines() or ["?"])[0][:160]
        raise InputError(label, f"register is damaged (integrity check: {first}); restore it from a backup")
    if row is None or row[0] != APPLICATION:
        raise InputError(label, "is not a windsheet register (no application marker)")
    if version > SCHEMA_VERSION:
        raise InputError(label, f"register has schema version {version}, newer than this windsheet "
                                f"understands ({SCHEMA_VERSION}); upgrade windsheet")
    if version < 1:
        raise InputError(label, "register has no schema version; it is damaged")
    try:
        schema.check_structure(conn, version, label)
    except (sqlite3.DatabaseError, UnicodeError) as exc:
        raise InputError(label, f"register is damaged ({_one_line(exc)}); restore it from a backup") from None
    return version


def _is_locked(exc: Exception) -> bool:
    text = str(exc).lower()
    return "locked" in text or "busy" in text


def _locked_error(label: str) -> InputError:
    return InputError(label, "register is locked by another writer; waited, then gave up — "
                             "try again when the other sign-off has finished")


#: Less free space than this on the register's disk makes an I/O fault a full disk. [bytes]
_NEARLY_FULL_BYTES = 1 << 20


def _disk_fault(label: str, exc: BaseException) -> Optional[InputError]:
    """A full disk or a failing one, said as such (never as a damaged register), or None.

    SQLite says "database or disk is full" when a write is refused, but "disk I/O
    error" when it cannot even make its shared-memory file; the free space tells
    the two apart.
    """
    text = str(exc).lower()
    full = "disk is full" in text or getattr(exc, "errno", None) == errno.ENOSPC
    if not full and "disk i/o error" not in text:
        return None
    if not full:
        try:
            folder = Path(label).parent if str(Path(label).parent) else Path(".")
            full = shutil.disk_usage(folder).free < _NEARLY_FULL_BYTES
        except OSError:
            pass
    if full:
        return InputError(label, "disk full: no space left to write the register (or its -wal and -shm files "
                                 "beside it); nothing was recorded — free space on that disk and run it again")
    return InputError(label, "disk I/O error reading or writing the register (a fault of the disk or file "
                             "system, not of the register's content); nothing was recorded")


def _one_line(exc) -> str:
    if isinstance(exc, UnicodeDecodeError):
        return "text that is not UTF-8"
    return (str(exc).splitlines() or [""])[0][:160]



def _read_only_error(label: str) -> InputError:
    return InputError(label, "register is read-only here (no write permission on the file or its folder); "
                             "nothing was recorded — list it with 'windsheet register', or ask for write access")


def _check_writable(p: Path, label: str) -> None:
    """Refuse to open a register for writing that cannot be written (file, or its folder for the WAL files)."""
    folder = p.parent if str(p.parent) else Path(".")
    if not os.access(p, os.W_OK) or not os.access(folder, os.W_OK | os.X_OK):
        raise _read_only_error(label)


def _reads(method):
    """A read of the register: damage found while reading is one line, never a traceback."""
    import functools

    @functools.wraps(method)
    def wrapper(self, *args, **kwargs):
        try:
            return method(self, *args, **kwargs)
        except InputError:
            raise
        except sqlite3.OperationalError as exc:
            if _is_locked(exc):
                raise _locked_error(self.label) from None
            raise (_disk_fault(self.label, exc) or
                   InputError(self.label, f"register is damaged ({_one_line(exc)}); restore it from a backup")) from None
        except (sqlite3.DatabaseError, ValueError, TypeError, AttributeError, KeyError, UnicodeError) as exc:
            raise InputError(self.label, f"register is damaged ({type(exc).__name__}: {_one_line(exc)}); "
                                         "restore it from a backup") from None
    return wrapper
