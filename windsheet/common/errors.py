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
        self.path = one_line(path, MAX_PATH_CHARS) if path else path
        self.message = one_line(message, MAX_MESSAGE_CHARS)
        super().__init__(f"{self.path}: {self.message}" if self.path else self.message)


#: What a refusal may quote: a whole CSV header or a hostile key is cut to this. [characters]
MAX_PATH_CHARS = 300
MAX_MESSAGE_CHARS = 1000

_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f\u2028\u2029]")


def one_line(text, cap: int = MAX_MESSAGE_CHARS) -> str:
    r"""``text`` as one line of at most ``cap`` characters: control characters (a newline, DEL)
    written as escapes, and anything past the cap cut with an ellipsis.

    >>> one_line("line one\nline two\x7f")
    'line one\\nline two\\x7f'
    >>> len(one_line("x" * 1000, 50))
    50
    """
    text = _CONTROL.sub(lambda m: repr(m.group())[1:-1], str(text))
    return text if len(text) <= cap else text[: cap - 1] + "…"


def quoted(value, cap: int = 60) -> str:
    """``repr`` of what a user wrote, cut to ``cap`` characters: a refusal names it, never echoes a page."""
    text = str(value)
    return repr(text) if len(text) <= cap else repr(text[: cap - 1] + "…")


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
