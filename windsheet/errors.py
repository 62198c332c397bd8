"""The one user-facing error type.

Anything a user can fix (a field in an order, a measured-values file, an
output path, the register file) raises :class:`InputError` carrying where the
fault is.  The CLI prints ``str(err)`` as one line on stderr and exits with 2;
any other exception escaping is a bug.
"""

from __future__ import annotations


class InputError(Exception):
    """A fault the user can fix, located by a YAML path such as ``wire.size``."""

    def __init__(self, path: str, message: str):
        self.path = path
        self.message = message
        super().__init__(f"{path}: {message}" if path else message)


def join_path(*parts) -> str:
    """Render a location like ``winding.turns`` or ``hookup.joins[0][1]``."""
    out = ""
    for p in parts:
        if isinstance(p, int):
            out += f"[{p}]"
        elif out:
            out += f".{p}"
        else:
            out = str(p)
    return out
