"""Several orders in one process: which files the arguments name, reading ``-``, progress.

A batch carries on past a bad order; the command names each failure by its
file and ends with a summary line.  Nothing here computes physics.
"""

from __future__ import annotations

import glob
import sys
from contextlib import contextmanager
from pathlib import Path

from windsheet.common.errors import InputError

#: Name an order read from standard input goes by in messages.
STDIN = "-"

#: A batch shows a progress bar (on a terminal) from this many orders.
PROGRESS_FROM = 4

#: Output formats by file extension; ``--format`` overrides.
FORMATS = {".pdf": "pdf", ".html": "html", ".htm": "html", ".json": "json"}


def _is_order_file(q: Path) -> bool:
    name = q.name.lower()
    return (q.suffix.lower() in (".yaml", ".yml") and q.is_file()
            and not name.endswith((".measured.yaml", ".measured.yml")))


def expand_orders(args) -> list[str]:
    """The order files the command-line arguments name, in the order given.

    Each argument is a file, a folder (its ``*.yaml`` orders, not its
    ``*.measured.yaml`` readings, sorted by name), a glob the shell did not
    expand (``'jobs/*.yaml'``), or ``-`` for standard input.  A pattern that
    matches nothing is refused; a missing file is refused when it is read.

    Examples
    --------
    >>> expand_orders(["-"])
    ['-']
    """
    out: list[str] = []
    for a in args:
        a = str(a)
        if a == STDIN:
            out.append(a)
            continue
        p = Path(a)
        if p.is_dir():
            found = sorted(str(q) for q in p.iterdir() if _is_order_file(q))
            if not found:
                raise InputError(a, "is a folder with no order files (*.yaml) in it")
            out += found
        elif glob.has_magic(a) and not p.exists():
            found = sorted(q for q in glob.glob(a) if _is_order_file(Path(q)))
            if not found:
                raise InputError(a, "no order files match this pattern")
            out += found
        else:
            out.append(a)  # a missing file is refused by name when it is read
    if out.count(STDIN) > 1:
        raise InputError(STDIN, "standard input can be read once only")
    return list(dict.fromkeys(out))


READINGS_SUFFIXES = (".measured.yaml", ".measured.yml", ".csv")


def _yaml_top(path: str):
    from windsheet.common.fileio import read_limited
    from windsheet.common.yaml_reading import MAX_YAML_BYTES, parse_yaml_bytes

    try:
        return parse_yaml_bytes(read_limited(path, MAX_YAML_BYTES), path)
    except (InputError, OSError):
        return None


def is_readings_file(path: str) -> bool:
    """Whether a file holds bench readings rather than an order.

    By name (``*.measured.yaml``, ``*.csv``), else by content: readings name
    their job as text and list ``units``; an order's ``job`` is a mapping.
    An unreadable file counts as an order, so that its fault is reported
    when it is read as one.
    """
    if path.lower().endswith(READINGS_SUFFIXES):
        return True
    doc = _yaml_top(path)
    return isinstance(doc, dict) and "units" in doc and not isinstance(doc.get("job"), dict)


def is_order_file(path: str) -> bool:
    """Whether a file reads as an order (a YAML mapping whose ``job`` is a mapping)."""
    if path.lower().endswith(READINGS_SUFFIXES):
        return False
    doc = _yaml_top(path)
    return isinstance(doc, dict) and isinstance(doc.get("job"), dict)


def names_many(arg: str) -> bool:
    """Whether an argument is a folder or an unexpanded glob, rather than one file."""
    p = Path(arg)
    return p.is_dir() or (glob.has_magic(arg) and not p.exists())


def expand_signoff_paths(args) -> tuple[list[str], list[str]]:
    """The orders and the readings files that sign-off arguments name.

    Arguments are files, folders or globs as in :func:`expand_orders`; a
    folder gives its orders and its readings (``*.measured.yaml``, ``*.csv``).
    """
    found: list[str] = []
    for a in map(str, args):
        p = Path(a)
        if p.is_dir():
            found += sorted(str(q) for q in p.iterdir() if q.is_file() and (
                _is_order_file(q) or q.name.lower().endswith(READINGS_SUFFIXES)))
        elif glob.has_magic(a) and not p.exists():
            hits = sorted(glob.glob(a))
            if not hits:
                raise InputError(a, "no files match this pattern")
            found += hits
        else:
            found.append(a)
    found = list(dict.fromkeys(found))
    readings = [f for f in found if Path(f).is_file() and is_readings_file(f)]
    return [f for f in found if f not in readings], readings


def read_stdin(max_bytes: int, what: str = "order") -> bytes:
    """Standard input's bytes, refused past ``max_bytes`` without reading it all."""
    data = sys.stdin.buffer.read(max_bytes + 1)
    if len(data) > max_bytes:
        raise InputError("standard input", f"is larger than {max_bytes // 1024} KiB; not a {what}")
    return data


def load_order_arg(arg: str):
    """The order a command-line argument names (``-``: standard input): a coil's or a transformer's."""
    from windsheet.order.document import MAX_ORDER_BYTES
    from windsheet.order.reader import load_any_order, parse_any_order

    if arg == STDIN:
        return parse_any_order(read_stdin(MAX_ORDER_BYTES), "standard input")
    return load_any_order(arg)


def output_format(out, fmt: str | None, html: bool = False, allowed=("pdf", "html", "json")) -> str:
    """The format a written sheet takes: ``--format``, else ``--html``, else the extension.

    Examples
    --------
    >>> output_format("x.html", None)
    'html'
    >>> output_format("x.pdf", "html")
    'html'
    >>> output_format("-", None)
    'pdf'
    """
    if fmt:
        f = fmt.strip().lower()
        if f not in allowed:
            raise InputError("--format", f"expected {', '.join(allowed)}; got {fmt!r}")
        return f
    if html:
        return "html"
    if out is None or str(out) == STDIN:
        return "pdf"
    suffix = Path(str(out)).suffix.lower()
    if suffix in FORMATS and FORMATS[suffix] in allowed:
        return FORMATS[suffix]
    if not suffix:
        return "pdf"
    raise InputError(str(out), f"cannot tell the format from {suffix!r}: name the file "
                     f"{' or '.join('.' + a for a in allowed)}, or give --format")


@contextmanager
def progress(total: int, label: str):
    """A progress bar on stderr when it is a terminal and the batch is long; else nothing.

    Yields a function to call once per finished item.
    """
    if total < PROGRESS_FROM or not sys.stderr.isatty():
        yield lambda: None
        return
    from rich.progress import Progress  # typer brings rich; only loaded for a long batch on a terminal
    from rich.console import Console

    with Progress(console=Console(stderr=True), transient=True) as bar:
        task = bar.add_task(label, total=total)
        yield lambda: bar.advance(task)
