"""Atomic output files (a reader sees the old file or the new one, never half of one), their
temporary files, and bounded reads of regular files only, CSV included; YAML is read in yaml_reading.py."""

from __future__ import annotations

import csv
import errno
import io
import os
import stat
import tempfile
import re
from contextlib import contextmanager
from pathlib import Path

from .errors import InputError


def _fsync_dir(folder: Path) -> None:
    # The rename itself lives in the directory; sync it so a power cut keeps it.
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _temp_prefix(name: str) -> str:
    # Host and process in the name: a later run can tell a crashed writer's file from a live one's.
    import socket

    host = "".join(ch for ch in socket.gethostname() if ch.isalnum() or ch in "-_")[:40] or "host"
    return f".{name}.{host}-{os.getpid()}."


#: A temporary file of windsheet's own: ``.NAME.HOST-PID.RANDOM.tmp`` (see :func:`_temp_prefix`).
_TEMP_NAME = re.compile(r"^\.(?P<name>.+)\.(?P<host>[A-Za-z0-9_-]{1,40})-(?P<pid>\d{1,10})\.[A-Za-z0-9_]{1,16}\.tmp$")
#: A temporary file this old is stale whoever made it (a crashed run of another host). [s]
STALE_TEMP_AGE_S = 24 * 3600.0
#: A crashed run of this host is not cleaned up sooner than this, whatever its PID says. [s]
FRESH_TEMP_AGE_S = 10.0


def clean_stale_temps(folder, name: str | None = None, *, now: float | None = None) -> list[Path]:
    """Remove temporary files crashed runs of windsheet left in ``folder``.

    Only windsheet's own pattern, ``.NAME.HOST-PID.XXXX.tmp``, is touched, and
    only when it is stale: made on this host by a process that no longer runs
    (and older than a few seconds), or older than a day whoever made it.
    ``name`` limits the clean-up to the temporary files of one target.
    Files of live processes are left alone.  Returns what was removed.
    """
    import time

    folder = Path(folder)
    now = time.time() if now is None else now
    mine = _temp_prefix(name or "x")
    host = mine[len(f".{name or 'x'}."): mine.rindex("-")]
    removed = []
    try:
        candidates = [(q, m) for q in folder.iterdir() if (m := _TEMP_NAME.match(q.name))
                      and (name is None or m.group("name") == name)]
    except OSError:
        return removed
    for q, m in candidates:
        try:
            st = q.lstat()
        except OSError:
            continue
        if not stat.S_ISREG(st.st_mode):
            continue
        age = now - st.st_mtime
        if age < STALE_TEMP_AGE_S:
            if m.group("host") != host or age < FRESH_TEMP_AGE_S and name is None:
                continue
            try:
                os.kill(int(m.group("pid")), 0)
                continue  # still running
            except ProcessLookupError:
                pass
            except (OSError, OverflowError):
                continue  # running as someone else
        try:
            q.unlink()
            removed.append(q)
        except OSError:
            pass
    return removed


def _refuse_write(label: str, exc: BaseException) -> None:
    """An OS fault while writing ``label`` as one line; anything else goes on up."""
    if isinstance(exc, PermissionError):
        raise InputError(label, "cannot write: permission denied") from None
    if isinstance(exc, OSError) and exc.errno in (errno.ENOSPC, errno.EDQUOT):
        raise InputError(label, "disk full: no space left to write it (or over the disk quota); "
                                "nothing was written — free space on that disk and run it again") from None
    if isinstance(exc, OSError):
        raise InputError(label, f"cannot write: {exc.strerror or exc}") from None


def _refuse_read_only_target(target: Path, label: str) -> None:
    """A file someone made read-only is not replaced (the rename would, keeping its mode): refuse, as
    the shell refuses ``>`` into it.  Judged by its mode bits, so the file's owner and root are held too."""
    try:
        mode = target.stat().st_mode
    except OSError:
        return
    if stat.S_ISREG(mode) and (not mode & 0o222 or not os.access(target, os.W_OK)):
        raise InputError(label, f"cannot write: the file is read-only (mode {stat.S_IMODE(mode):o}); "
                                "make it writable or remove it, or write to another name")


def stage_file(path, data: bytes) -> tuple[Path, str]:
    """Write ``data`` to a temporary file beside ``path`` (flushed, fsynced, permissions set).

    Returns ``(target, temporary name)``; put it in place with :func:`place_file`.
    Stale temporary files of crashed runs for the same name are removed first.
    """
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    label = str(target)
    if not folder.is_dir():
        raise InputError(label, f"cannot write: folder {str(folder)!r} does not exist")
    if target.is_dir():
        raise InputError(label, "cannot write: this is a folder, expected a file name")
    _refuse_read_only_target(target, label)
    # Crashed runs' temporary files for this target at once, and any other stale one of ours here.
    clean_stale_temps(folder, target.name)
    clean_stale_temps(folder)
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=_temp_prefix(target.name), suffix=".tmp", dir=folder)
    except PermissionError:
        raise InputError(label, f"cannot write: no write permission in folder {str(folder)!r}") from None
    except OSError as exc:
        _refuse_write(label, exc)
        raise
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        if target.exists():
            # Keep the permissions a user gave the old file; mkstemp makes 0600.
            try:
                os.chmod(tmp_name, target.stat().st_mode & 0o7777)
            except OSError:
                pass
        else:
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp_name, 0o666 & ~umask)
    except BaseException as exc:
        discard_file(tmp_name)
        _refuse_write(label, exc)
        raise
    return target, tmp_name


def place_file(tmp_name: str, target) -> None:
    """Rename a staged file over its target (atomic in one folder) and sync the folder."""
    target = Path(target)
    os.replace(tmp_name, target)
    _fsync_dir(target.parent if str(target.parent) else Path("."))


def discard_file(tmp_name: str) -> None:
    try:
        os.unlink(tmp_name)
    except OSError:
        pass


@contextmanager
def staged_write(path, data: bytes):
    """Write ``data`` beside ``path`` and put it in place only if the ``with`` block succeeds.

    The temporary file in the same folder is flushed, fsynced and renamed over
    the target with :func:`os.replace`, which is atomic on POSIX and Windows
    when both names are on one file system (hence the same folder).  On any
    failure, in the write or in the block, the temporary file is removed and
    the old target is left as it was.  The block is where a caller records
    what it wrote (the register), so a record and its file stand or fall
    together; :mod:`windsheet.records.sheet_ledger` also closes the window between
    the record's commit and the rename.

    Raises
    ------
    InputError
        The folder is missing, the path is a folder, or it is not writable;
        the error names the output path.
    """
    target, tmp_name = stage_file(path, data)
    label = str(target)
    try:
        yield target
        place_file(tmp_name, target)
    except BaseException as exc:
        discard_file(tmp_name)
        _refuse_write(label, exc)
        raise


def atomic_write_bytes(path, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically; see :func:`staged_write`."""
    with staged_write(path, data) as target:
        return target


def atomic_write_text(path, text: str, encoding: str = "utf-8") -> Path:
    """Write ``text`` atomically; see :func:`atomic_write_bytes`."""
    return atomic_write_bytes(path, text.encode(encoding))


def _not_regular(mode: int, what: str) -> str | None:
    """Why a file of this ``st_mode`` is refused, or None for a regular file."""
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISDIR(mode):
        return f"is a folder, expected a {what}"
    if stat.S_ISFIFO(mode):
        kind = "a named pipe (FIFO)"
    elif stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        kind = "a device"
    elif stat.S_ISSOCK(mode):
        kind = "a socket"
    else:
        kind = "not a plain file"
    return f"is {kind}, not a regular file; expected a {what}"


def _refuse_os_error(label: str, exc: OSError, what: str):
    if isinstance(exc, FileNotFoundError):
        return InputError(label, "file not found")
    if isinstance(exc, IsADirectoryError):
        return InputError(label, f"is a folder, expected a {what}")
    if isinstance(exc, PermissionError):
        return InputError(label, "cannot read: permission denied")
    return InputError(label, f"cannot read: {exc.strerror or exc}")


def require_regular_file(path, what: str = "file") -> None:
    """Refuse ``path`` unless it is a regular file or does not exist yet.

    Called before a library (SQLite) opens a file itself: a FIFO given as a
    register would block that open for ever, a device would be read without end.

    Raises
    ------
    InputError
        ``path`` names a folder, a FIFO, a device or a socket; the error names it.
    """
    label = str(path)
    try:
        mode = os.stat(path).st_mode
    except FileNotFoundError:
        return
    except OSError as exc:
        raise _refuse_os_error(label, exc, what) from None
    why = _not_regular(mode, what)
    if why:
        raise InputError(label, why)


def read_limited(path, max_bytes: int, what: str = "YAML file") -> bytes:
    """The bytes of a regular file, reading at most one byte past ``max_bytes``
    (so an oversized file is noticed without reading it all); faults name the file.

    A FIFO, a device (``/dev/zero``), a socket or a folder is refused by name
    without blocking: the file is stat-ed first, then opened with ``O_NONBLOCK``
    and checked again on the open descriptor, so a file swapped in between is
    caught too.  Reading a regular file of bounded size cannot wait for a writer.

    Examples
    --------
    >>> read_limited("/dev/zero", 10)
    Traceback (most recent call last):
    ...
    windsheet.common.errors.InputError: /dev/zero: is a device, not a regular file; expected a YAML file
    """
    label = str(path)
    try:
        why = _not_regular(os.stat(path).st_mode, what)
        if why:
            raise InputError(label, why)
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)
                     | getattr(os, "O_CLOEXEC", 0))
    except OSError as exc:
        raise _refuse_os_error(label, exc, what) from None
    try:
        why = _not_regular(os.fstat(fd).st_mode, what)
        if why:
            raise InputError(label, why)
        chunks, left = [], max_bytes + 1
        while left > 0:
            chunk = os.read(fd, min(left, 1 << 20))
            if not chunk:
                break
            chunks.append(chunk)
            left -= len(chunk)
        return b"".join(chunks)
    except OSError as exc:
        raise _refuse_os_error(label, exc, what) from None
    finally:
        os.close(fd)


#: A shop's CSV table (wire catalog, readings) is a few hundred rows. [bytes]
MAX_CSV_BYTES = 1_000_000


def read_csv_rows(path, what: str = "CSV file", max_bytes: int = MAX_CSV_BYTES) -> list[dict]:
    """The rows of a CSV file with a header line, as dicts, read with :func:`read_limited`.

    UTF-8 (a spreadsheet's byte-order mark is dropped).  A field over the
    ``csv`` module's limit (128 K characters) or a malformed quote is refused
    with the line it is on; every refusal is an :class:`InputError` naming the file.
    """
    label = str(path)
    raw = read_limited(path, max_bytes, what)
    if len(raw) > max_bytes:
        raise InputError(label, f"file is larger than {max_bytes // 1000} kB; not a {what}")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError(label, f"is not UTF-8 text; expected a {what}") from None
    if "\x00" in text:
        raise InputError(label, "contains NUL characters (binary file?)")
    reader = csv.DictReader(io.StringIO(text, newline=""))
    try:
        return list(reader)
    except csv.Error as exc:
        problem = (f"a field is longer than {csv.field_size_limit()} characters" if "field limit" in str(exc)
                   else f"not readable as CSV ({exc})")
        raise InputError(label, f"line {reader.line_num + 1}: {problem}; expected a {what}") from None
