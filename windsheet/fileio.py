"""Atomic output files: a reader sees the old file or the new one, never half of one."""

from __future__ import annotations

import os
import tempfile
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


def clean_stale_temps(folder, name: str) -> list[Path]:
    """Remove temporary files a crashed run of this host left beside ``folder/name``.

    A temporary file is ``.NAME.HOST-PID.XXXX.tmp``; it is stale when HOST is
    this host and process PID no longer runs.  Files of live processes and of
    other hosts are left alone.  Returns what was removed.
    """
    folder = Path(folder)
    mine = _temp_prefix(name)
    host_prefix = mine[: mine.rindex("-") + 1]
    removed = []
    try:
        names = [q for q in folder.iterdir() if q.name.startswith(host_prefix) and q.name.endswith(".tmp")]
    except OSError:
        return removed
    for q in names:
        pid_text = q.name[len(host_prefix):].split(".", 1)[0]
        if not pid_text.isdigit():
            continue
        try:
            os.kill(int(pid_text), 0)
            continue  # still running
        except ProcessLookupError:
            pass
        except OSError:
            continue  # running as someone else
        try:
            q.unlink()
            removed.append(q)
        except OSError:
            pass
    return removed


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
    clean_stale_temps(folder, target.name)
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=_temp_prefix(target.name), suffix=".tmp", dir=folder)
    except PermissionError:
        raise InputError(label, f"cannot write: no write permission in folder {str(folder)!r}") from None
    except OSError as exc:
        raise InputError(label, f"cannot write: {exc.strerror or exc}") from None
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
        if isinstance(exc, PermissionError):
            raise InputError(label, "cannot write: permission denied") from None
        if isinstance(exc, OSError):
            raise InputError(label, f"cannot write: {exc.strerror or exc}") from None
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
    together; :mod:`windsheet.sheet_ledger` also closes the window between
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
        if isinstance(exc, PermissionError):
            raise InputError(label, "cannot write: permission denied") from None
        if isinstance(exc, OSError):
            raise InputError(label, f"cannot write: {exc.strerror or exc}") from None
        raise


def atomic_write_bytes(path, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically; see :func:`staged_write`."""
    with staged_write(path, data) as target:
        return target


def atomic_write_text(path, text: str, encoding: str = "utf-8") -> Path:
    """Write ``text`` atomically; see :func:`atomic_write_bytes`."""
    return atomic_write_bytes(path, text.encode(encoding))


# --- Reading YAML safely -------------------------------------------------------------

MAX_YAML_BYTES = 1_000_000
MAX_YAML_DEPTH = 32


def _yaml_loader_class(max_depth: int):
    import yaml

    class LimitedSafeLoader(yaml.SafeLoader):
        """Safe loader that also refuses aliases, deep nesting and repeated keys.

        Aliases are refused outright: shop files never need them and they are
        how an "alias bomb" grows a few hundred bytes into gigabytes.
        """

        _depth = 0

        def compose_node(self, parent, index):
            if self.check_event(yaml.AliasEvent):
                event = self.peek_event()
                raise yaml.constructor.ConstructorError(
                    None, None, "aliases (*name) are not accepted", event.start_mark)
            self._depth += 1
            try:
                if self._depth > max_depth:
                    raise yaml.constructor.ConstructorError(
                        None, None, f"nested deeper than {max_depth} levels",
                        self.peek_event().start_mark)
                return super().compose_node(parent, index)
            finally:
                self._depth -= 1

        def construct_mapping(self, node, deep=False):
            seen = set()
            for key_node, _ in node.value:
                key = self.construct_object(key_node, deep=True)
                try:
                    hashable = key in seen
                except TypeError:
                    raise yaml.constructor.ConstructorError(
                        None, None, "a mapping key must be plain text", key_node.start_mark)
                if hashable:
                    raise yaml.constructor.ConstructorError(
                        None, None, f"key {key!r} appears twice", key_node.start_mark)
                seen.add(key)
            return super().construct_mapping(node, deep=deep)

    return LimitedSafeLoader


def read_yaml_file(path, *, max_bytes: int = MAX_YAML_BYTES, max_depth: int = MAX_YAML_DEPTH):
    """Read a YAML document with size, depth, alias and type limits.

    Returns the loaded document (usually a dict).  Every refusal is an
    :class:`InputError` naming the file: missing, unreadable, too large, not
    UTF-8 text, not YAML, or using features a shop file never needs.
    """
    return parse_yaml_bytes(read_limited(path, max_bytes), str(path), max_bytes=max_bytes, max_depth=max_depth)


def read_limited(path, max_bytes: int) -> bytes:
    """The bytes of a YAML file, reading at most one byte past ``max_bytes`` (so an
    oversized file is noticed without reading it all); faults name the file."""
    label = str(path)
    try:
        with open(Path(path), "rb") as fh:
            return fh.read(max_bytes + 1)
    except FileNotFoundError:
        raise InputError(label, "file not found") from None
    except IsADirectoryError:
        raise InputError(label, "is a folder, expected a YAML file") from None
    except PermissionError:
        raise InputError(label, "cannot read: permission denied") from None
    except OSError as exc:
        raise InputError(label, f"cannot read: {exc.strerror or exc}") from None


def parse_yaml_bytes(raw: bytes, label: str, *, max_bytes: int = MAX_YAML_BYTES,
                     max_depth: int = MAX_YAML_DEPTH):
    """Parse YAML from bytes with the limits of :func:`read_yaml_file`."""
    import yaml

    if len(raw) > max_bytes:
        raise InputError(label, f"file is larger than {max_bytes // 1000} kB; not a shop file")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError(label, "is not UTF-8 text (binary file?)") from None
    if "\x00" in text:
        raise InputError(label, "contains NUL characters (binary file?)")
    try:
        return yaml.load(text, Loader=_yaml_loader_class(max_depth))  # noqa: S506 - SafeLoader subclass
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        where = f" at line {mark.line + 1}, column {mark.column + 1}" if mark else ""
        problem = exc.problem or exc.context or "not valid YAML"
        raise InputError(label, f"not valid YAML{where}: {problem}") from None
    except yaml.YAMLError as exc:
        raise InputError(label, f"not valid YAML: {exc}") from None
    except RecursionError:
        raise InputError(label, "nested too deeply") from None
