"""Field types of the order language: quantities with units, percentages, names, choices.

Each type reads the order's text into an SI float (or a checked word) once,
at the edge; pydantic reports a failure at the field's YAML path.
"""

from __future__ import annotations

import re
from typing import Annotated, Literal, Union

from pydantic import BeforeValidator, Field

from windsheet.common.errors import InputError
from .units import parse_percent, parse_quantity


def quantity(dimension, **kw):
    """A pydantic validator reading a quantity of ``dimension`` with its unit into SI."""
    def conv(v):
        try:
            return parse_quantity(v, dimension, "", **kw)
        except InputError as e:
            raise ValueError(e.message) from None
    return BeforeValidator(conv)


def _pct(v):
    try:
        return parse_percent(v, "")
    except InputError as e:
        raise ValueError(e.message) from None


Length = Annotated[float, quantity("length")]
Length0 = Annotated[float, quantity("length", allow_zero=True)]
Inductance = Annotated[float, quantity("inductance")]
Voltage = Annotated[float, quantity("voltage")]
Frequency0 = Annotated[float, quantity("frequency", allow_zero=True)]
Frequency = Annotated[float, quantity("frequency")]
Temperature = Annotated[float, quantity("temperature")]
Angle = Annotated[float, quantity("angle")]
FluxDensity = Annotated[float, quantity("flux_density")]
Current = Annotated[float, quantity("current", allow_zero=True)]
RiseTime = Annotated[float, quantity("rise_time")]
PulseWidth = Annotated[float, quantity("pulse_width")]
Energy = Annotated[float, quantity("energy")]
PeakVoltage = Annotated[float, quantity("voltage", form="peak")]
Fraction = Annotated[float, BeforeValidator(_pct)]
def _plain_text(v):
    # A control character (DEL, an escape, a newline) would garble the sheet and the terminal.
    if isinstance(v, str):
        bad = next((ch for ch in v if ord(ch) < 32 or 127 <= ord(ch) < 160 or ch in "\u2028\u2029"), None)
        if bad is not None:
            raise ValueError(f"contains the control character U+{ord(bad):04X}; expected plain text on one line")
    return v


Text = Annotated[str, Field(max_length=200), BeforeValidator(_plain_text)]


def _alnum(v):
    if not isinstance(v, (str, int)) or isinstance(v, bool):
        raise ValueError("expected text")
    v = str(v).strip()
    if not v or not re.fullmatch(r"[A-Za-z0-9][A-Za-z0-9._/-]{0,39}", v):
        raise ValueError("expected letters, digits and . _ / - only (up to 40), like 'HL-0412'")
    return v


Ident = Annotated[str, BeforeValidator(_alnum)]


def lowered(v):
    """Text lower-cased and stripped (choice words are read case-insensitively); anything else as given."""
    return v.strip().lower() if isinstance(v, str) else v


def known_word(v, words):
    """``v`` as one of ``words`` (read case-insensitively), or None: a list or mapping is no word."""
    w = lowered(v) if isinstance(v, str) else None
    return w if w is not None and w in words else None


def choice(*words):
    """A field taking one of ``words``, read case-insensitively (``Cylinder`` is ``cylinder``)."""
    return Annotated[Literal[words], BeforeValidator(lowered)]


def count_or_auto(what: str, lo: int, hi: int):
    """A whole number from ``lo`` to ``hi``, or ``auto``; the message says both."""
    def conv(v):
        if isinstance(v, str) and v.strip().lower() == "auto":
            return "auto"
        if isinstance(v, bool) or not isinstance(v, int) or not lo <= v <= hi:
            raise ValueError(f"expected a whole number of {what} from {lo} to {hi}, or auto")
        return v
    return Annotated[Union[int, Literal["auto"]], BeforeValidator(conv)]


def strand_keys(v):
    """Strand names as the order writes them: ``a`` is strand A."""
    if not isinstance(v, dict):
        return v
    out = {}
    for k, val in v.items():
        key = k.strip().upper() if isinstance(k, str) else k
        if key in out:
            raise ValueError(f"strand {key} is named twice")
        out[key] = val
    return out


def _flag(v):
    if isinstance(v, bool):
        return v
    if isinstance(v, str) and v.strip().lower() in ("true", "yes", "false", "no"):
        return v.strip().lower() in ("true", "yes")
    raise ValueError("expected true or false")


#: A yes/no field: YAML's true/false (or the words yes/no), nothing else (1 and 0 are refused).
Flag = Annotated[bool, BeforeValidator(_flag)]
