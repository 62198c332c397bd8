"""Quantities with units, parsed once at the edge into SI floats (pint)."""

from __future__ import annotations

import math
from functools import lru_cache

from .errors import InputError

# Dimension name -> (pint dimensionality string, SI unit, example for messages)
DIMENSIONS = {
    "length": ("[length]", "m", "50 mm"),
    "inductance": ("[mass] * [length] ** 2 / [time] ** 2 / [current] ** 2", "H", "60 uH"),
    "capacitance": ("[current] ** 2 * [time] ** 4 / [mass] / [length] ** 2", "F", "10 nF"),
    "voltage": ("[mass] * [length] ** 2 / [time] ** 3 / [current]", "V", "230 V"),
    "current": ("[current]", "A", "0.2 A"),
    "frequency": ("1 / [time]", "Hz", "50 Hz"),
    "resistance": ("[mass] * [length] ** 2 / [time] ** 3 / [current] ** 2", "ohm", "1.5 ohm"),
    "time": ("[time]", "s", "60 s"),
    "temperature": ("[temperature]", "degC", "25 degC"),
    "inductance_factor": ("[mass] * [length] ** 2 / [time] ** 2 / [current] ** 2", "H", "2.2 uH"),
    "mass": ("[mass]", "kg", "12 g"),
    "angle": ("", "radian", "30 deg"),
}


# Plausible magnitudes for a coil-shop document (SI, outside zero).  Far wider
# than any real order; they keep absurd values (1e300 A) from overflowing the
# engine into inf/NaN and say so at the field instead.
SANE_RANGE = {
    "length": (1e-7, 1e3),
    "inductance": (1e-12, 1e4),
    "inductance_factor": (1e-12, 1e4),
    "capacitance": (1e-15, 1.0),
    "voltage": (1e-6, 1e7),
    "current": (1e-9, 1e5),
    "frequency": (1e-3, 1e11),
    "resistance": (1e-9, 1e18),
    "time": (1e-6, 1e7),
    "temperature": (-273.15, 1000.0),
    "mass": (1e-9, 1e4),
}


def _si_text(x: float, unit: str) -> str:
    return f"{x:g} {unit}"


@lru_cache(maxsize=1)
def ureg():
    import pint

    reg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    # Shop shorthand that pint does not know out of the box.
    reg.define("turn = [] = t = turns")
    return reg


def parse_quantity(value, dimension: str, path: str, *, allow_zero: bool = False,
                   allow_negative: bool = False) -> float:
    """Parse ``value`` (``"50 mm"``, ``"60 uH"``, ``"25 degC"``) into an SI float.

    A bare number is refused: an order must say its unit.  Temperatures come back
    in degrees Celsius, the shop's unit, not kelvin.
    """
    pint_dim, si_unit, example = DIMENSIONS[dimension]
    name = dimension.replace("_", " ")
    expected = f"expected {'an' if name[0] in 'aeiou' else 'a'} {name} with a unit, like '{example}'"
    if isinstance(value, bool) or value is None:
        raise InputError(path, expected)
    if isinstance(value, (int, float)):
        raise InputError(path, f"{expected}; the number {value!r} has no unit")
    if not isinstance(value, str) or len(value) > 64 or not value.strip():
        raise InputError(path, expected)
    text = value.strip().replace("µ", "u").replace("μ", "u").replace("Ω", "ohm")
    text = text.replace("°C", "degC").replace("° C", "degC")
    reg = ureg()
    try:
        q = reg.Quantity(text)
    except Exception:
        raise InputError(path, f"{expected}; could not read {value!r}") from None
    if isinstance(q, (int, float)) or not hasattr(q, "dimensionality"):
        raise InputError(path, f"{expected}; {value!r} has no unit")
    if q.dimensionality != reg.Quantity(1, si_unit).dimensionality:
        raise InputError(path, f"{expected}; got {value!r}")
    try:
        si = float(q.to(si_unit).magnitude)
    except Exception:
        raise InputError(path, f"{expected}; could not convert {value!r}") from None
    if not math.isfinite(si):
        raise InputError(path, f"{expected}; {value!r} is not a finite number")
    if dimension == "angle" and str(q.units) not in ("degree", "radian", "arcminute"):
        raise InputError(path, f"{expected}; got {value!r}")
    if dimension != "temperature":
        if si < 0 and not allow_negative:
            raise InputError(path, f"must be positive, got {value!r}")
        if si == 0 and not allow_zero and dimension != "angle":
            raise InputError(path, f"must be greater than zero, got {value!r}")
    elif si < -273.15:
        raise InputError(path, f"is below absolute zero: {value!r}")
    lo, hi = SANE_RANGE.get(dimension, (0.0, math.inf))
    if abs(si) > hi:
        raise InputError(path, f"must be at most {_si_text(hi, si_unit)}, got {value!r}")
    if si != 0 and abs(si) < lo and dimension != "temperature":
        zero = " or zero" if allow_zero else ""
        raise InputError(path, f"must be at least {_si_text(lo, si_unit)}{zero}, got {value!r}")
    return si


def parse_percent(value, path: str) -> float:
    """Parse ``"10 %"`` or ``"0.5 %"`` into a fraction (0.10, 0.005)."""
    expected = "expected a percentage like '10 %'"
    if isinstance(value, bool) or not isinstance(value, str):
        raise InputError(path, expected)
    text = value.strip()
    if not text.endswith("%"):
        raise InputError(path, f"{expected}; got {value!r}")
    try:
        frac = float(text[:-1].strip()) / 100.0
    except ValueError:
        raise InputError(path, f"{expected}; got {value!r}") from None
    if not math.isfinite(frac) or frac < 0 or frac >= 10:
        raise InputError(path, f"{expected} between 0 % and 1000 %; got {value!r}")
    return frac
