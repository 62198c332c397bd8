"""The one user-facing error type.

Anything a user can fix (a field in an order, a measured-values file, an
output path, the register file) raises :class:`InputError` carrying where the
fault is.  The CLI prints ``str(err)`` as one line on stderr and exits with 2;
any other exception escaping is a bug.
"""

from __future__ import annotations

import re


class InputError(Exception):
    """A fault the user can fix, located by a YAML path such as ``wire.size``."""

    def __init__(self, path: str, message: str):
        self.path = path
        self.message = message
        super().__init__(f"{path}: {message}" if path else message)


def field_name(part):
    """A key as it can stand in a one-line message: odd keys quoted, newlines escaped."""
    if isinstance(part, str) and not re.fullmatch(r"[\w.\[\]-]{1,80}", part):
        return repr(part[:40])
    return part


def join_path(*parts) -> str:
    """Render a location like ``winding.turns`` or ``hookup.joins[0][1]``."""
    out = ""
    for p in map(field_name, parts):
        if isinstance(p, int):
            out += f"[{p}]"
        elif out:
            out += f".{p}"
        else:
            out = str(p)
    return out
