"""Quantities with units, read once at the edge into SI floats.

The order language has a strict grammar of its own::

    quantity  := number [" "] unit [" " qualifier]
    number    := [+-] digits [. digits] [e [+-] digits]      (decimal only)
    unit      := [prefix] symbol | name                       (mm, uH, kHz, Mohm, degC, in, inch)
    qualifier := rms | ac | peak | pk | dc                    (voltages and currents only)

so ``12 V rms``, ``12 Vrms``, ``170 Vpk``, ``170 V peak`` and ``24 V dc`` all
read, while nothing is ever evaluated: ``25*2 mm``, ``40 mm + 10 mm`` and
``9**9**9 mm`` are refused at once with the expected form.  A unit's case is
forgiven only where no other unit is spelt that way (``KHz`` is kHz; ``MHZ``
could be MHz or mHz and is refused with both).

The unit table holds definitions only (SI prefixes, the inch of 25.4 mm, the
kelvin's 273.15 offset), so reading a quantity costs microseconds and imports
nothing; ``tests/test_units.py`` checks every spelling against pint's
registry.  Temperatures come back in degrees Celsius, the shop's unit.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Optional

from windsheet.common.errors import InputError
from .unit_table import table as _table

#: Peak over rms of a sine (crest factor). [-]
SINE_CREST = math.sqrt(2.0)

# Field kind -> (kind of unit, SI unit for messages, example for messages).
DIMENSIONS = {
    "length": ("length", "m", "50 mm"),
    "inductance": ("inductance", "H", "60 uH"),
    "capacitance": ("capacitance", "F", "10 nF"),
    "voltage": ("voltage", "V", "230 V"),
    "current": ("current", "A", "0.2 A"),
    "frequency": ("frequency", "Hz", "50 Hz"),
    "resistance": ("resistance", "ohm", "1.5 ohm"),
    "time": ("time", "s", "60 s"),
    "rise_time": ("time", "s", "100 ns"),
    "pulse_width": ("time", "s", "10 us"),
    "energy": ("energy", "J", "50 mJ"),
    "temperature": ("temperature", "degC", "25 degC"),
    "inductance_factor": ("inductance", "H", "2.2 uH"),
    "mass": ("mass", "kg", "12 g"),
    "angle": ("angle", "rad", "30 deg"),
    "flux_density": ("flux_density", "T", "1.2 T"),
}

# Plausible magnitudes for a coil-shop document (SI, outside zero).  Far wider
# than any real order; they keep absurd values (1e300 A) from overflowing the
# engine into inf/NaN and say so at the field instead.
#: The coldest temperature windsheet reads (an ambient, a hot-spot setting, a bench's
#: ambient): copper's linear resistance-temperature rule is not used below it. [degC]
TEMPERATURE_FLOOR_DEGC = -100.0

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
    "rise_time": (1e-12, 1.0),
    "pulse_width": (1e-12, 10.0),
    "energy": (1e-12, 1e7),
    "temperature": (-273.15, 1000.0),
    "mass": (1e-9, 1e4),
    "flux_density": (1e-6, 1e2),
}

_QUALIFIERS = {"rms": "rms", "ac": "rms", "a.c.": "rms", "peak": "peak", "pk": "peak",
               "dc": "dc", "d.c.": "dc"}
_PEAK_TO_PEAK = ("pp", "p-p", "pk-pk", "peak-to-peak", "ptp")


@dataclass(frozen=True)
class Reading:
    """A quantity as read: SI value, the unit understood, and any qualifier.

    ``qualifier`` is ``"rms"``, ``"peak"``, ``"dc"`` or None (none given);
    ``ac`` reads as rms, ``pk`` as peak.
    """

    value: float
    unit: str
    qualifier: Optional[str] = None


# --- The grammar --------------------------------------------------------------------

_NUMBER = r"[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?"
_QUANTITY = re.compile(
    rf"(?P<number>{_NUMBER})\s*"
    r"(?P<unit>[A-Za-z]+(?:\s*/\s*(?P<per>[A-Za-z]+)\s*(?P<square>\^\s*2|²))?)?"
    r"(?:\s+(?P<qualifier>[A-Za-z][A-Za-z.\-]*))?")
_NOT_FINITE = re.compile(r"[-+]?\.?(?:nan|inf|infinity)\b", re.IGNORECASE)
_EXPONENT = re.compile(r"(?<=[\d.])[eE][-+]?\d+")
_PER_TURN_SQUARED = ("turn", "turns", "t", "N")
_TEMPERATURE_HINTS = {"c": "degC", "f": "degF", "degc": "degC", "degf": "degF"}


def _normalise(text: str) -> str:
    text = text.strip().replace("µ", "u").replace("μ", "u").replace("Ω", "ohm")
    text = re.sub(r"[°º]\s*([CF])\b", r"deg\1", text)
    text = re.sub(r"[°º]", " deg", text)
    # Qualifiers with punctuation glued to the unit: Vp-p, Vd.c.
    return re.sub(r"(?<=[A-Za-z])(pk-pk|p-p|a\.c\.|d\.c\.)$", r" \1", text, flags=re.IGNORECASE)


def _looks_like_arithmetic(text: str) -> bool:
    body = _EXPONENT.sub("", text)
    if re.search(r"[*^()=]", body):
        return True
    if re.search(r"\S\s*[-+]", body.lstrip("+-")):
        return True
    if re.search(r"/\s*[\d.]", body):
        return True
    return len(re.findall(r"\d+(?:\.\d*)?|\.\d+", body)) > 1


def _lookup(word: str):
    """The unit a spelling names: exact, else case-forgiven when only one unit folds to it."""
    units, folded, _ = _table()
    if word in units:
        return units[word]
    same = folded.get(word.casefold(), [])
    if len(same) == 1 and same[0] in units:
        return units[same[0]]
    return None


def _split_glued_qualifier(word: str):
    """``Vrms`` -> ("V", "rms"); None when ``word`` does not end in a qualifier."""
    for q in sorted([*(_QUALIFIERS), *_PEAK_TO_PEAK], key=len, reverse=True):
        plain = q.replace(".", "").replace("-", "")
        if len(word) > len(plain) and word.casefold().endswith(plain):
            rest = word[: -len(plain)]
            unit = _lookup(rest)
            if unit is not None and unit.kind in ("voltage", "current"):
                return rest, word[-len(plain):]
    return None


def _suggestions(number: str, word: str, dimension: str) -> list[str]:
    """Spellings the writer may have meant, of the field's kind and in its range, as quantities."""
    units, folded, _ = _table()
    kind = DIMENSIONS[dimension][0]
    lo, hi = SANE_RANGE.get(dimension, (0.0, math.inf))
    found = []
    if kind == "temperature" and word.casefold() in _TEMPERATURE_HINTS:
        found.append(_TEMPERATURE_HINTS[word.casefold()])
    found += [s for s in folded.get(word.casefold(), []) if s in units and units[s].kind == kind]
    if not found:
        import difflib  # only on the way to a refusal

        symbols = [s for s, u in units.items() if u.kind == kind and len(s) <= 5]
        found = difflib.get_close_matches(word, symbols, n=2, cutoff=0.6)
    seen, out = set(), []
    for s in found:
        unit = units[s]
        si = abs(float(number) * unit.factor + unit.offset)
        if kind != "temperature" and si != 0 and not lo <= si <= hi:
            continue
        canonical = unit.canonical
        if canonical not in seen:
            seen.add(canonical)
            out.append(f"'{number} {canonical}'")
    return out


def _kind_name(kind: str) -> str:
    name = kind.replace("_", " ")
    return f"{'an' if name[0] in 'aeiou' else 'a'} {name}"


def read_quantity(value, dimension: str, path: str, *, allow_zero: bool = False,
                  allow_negative: bool = False) -> Reading:
    """Read ``value`` (``"50 mm"``, ``"12 V rms"``, ``"25 degC"``) into a :class:`Reading`.

    Parameters
    ----------
    value : str
        The text from the order or measured file.
    dimension : str
        What the field holds: a key of :data:`DIMENSIONS` (``"length"``,
        ``"voltage"``, ``"temperature"`` ...).
    path : str
        The field's YAML path, for the error message.
    allow_zero, allow_negative : bool
        Whether 0 or a negative value is accepted (temperatures may always be
        negative, down to absolute zero).

    Returns
    -------
    Reading
        ``value`` in SI units [m, H, F, V, A, Hz, ohm, s, kg, rad], temperatures
        in [degC]; the unit as understood; the qualifier given (voltages and
        currents only), not yet applied.

    Raises
    ------
    InputError
        Anything but a number, a unit of the right kind and (for a voltage or a
        current) a qualifier; the message shows the expected form.

    Examples
    --------
    >>> read_quantity("170 Vpk", "voltage", "duty.voltage")
    Reading(value=170.0, unit='V', qualifier='peak')
    >>> read_quantity("2 KHz", "frequency", "test.frequency").value
    2000.0
    >>> read_quantity("25*2 mm", "length", "form.traverse")
    Traceback (most recent call last):
    ...
    windsheet.common.errors.InputError: form.traverse: expected a length with a unit, like '50 mm'; arithmetic is not read in '25*2 mm': write the value itself
    """
    kind, si_unit, example = DIMENSIONS[dimension]
    expected = f"expected {_kind_name(dimension)} with a unit, like '{example}'"
    if isinstance(value, bool) or value is None:
        raise InputError(path, expected)
    if isinstance(value, (int, float)):
        raise InputError(path, f"{expected}; the number {value!r} has no unit")
    if not isinstance(value, str) or len(value) > 64 or not value.strip():
        raise InputError(path, expected)
    text = _normalise(value)
    m = _QUANTITY.fullmatch(text)
    if m is None:
        raise InputError(path, f"{expected}; {_why_unreadable(text, value)}")
    number, word, qual_text = m.group("number"), m.group("unit"), m.group("qualifier")
    if word is None:
        raise InputError(path, f"{expected}; {value!r} has no unit")
    per = m.group("per")
    if per is not None:
        if dimension != "inductance_factor" or per not in _PER_TURN_SQUARED:
            raise InputError(path, f"{expected}; could not read the unit in {value!r}")
        word = re.split(r"\s*/", word)[0]
    unit = _lookup(word)
    if unit is None and qual_text is None:
        glued = _split_glued_qualifier(word)
        if glued:
            word, qual_text = glued
            unit = _lookup(word)
    if unit is None:
        raise InputError(path, f"{expected}; {_why_unknown(number, word, dimension, value)}")
    if unit.kind != kind:
        hint = _suggestions(number, word, dimension)
        also = f"; did you mean {' or '.join(hint)}?" if hint else ""
        raise InputError(path, f"{expected}; got {value!r} ({_kind_name(unit.kind)}){also}")
    qualifier = _qualifier(qual_text, kind, expected, value, path)
    si = float(number) * unit.factor + unit.offset
    _check_range(si, dimension, si_unit, value, path, allow_zero, allow_negative, expected)
    return Reading(si, unit.canonical, qualifier)


def _why_unreadable(text: str, value: str) -> str:
    if _NOT_FINITE.match(text):
        return f"{value!r} is not a finite number"
    if re.fullmatch(r"[-+]?\d+,\d+\s*[A-Za-z]*", text):
        return f"could not read {value!r}: write the decimal point as '.'"
    if _looks_like_arithmetic(text):
        return f"arithmetic is not read in {value!r}: write the value itself"
    return f"could not read {value!r}: write a number, then its unit"


def _why_unknown(number: str, word: str, dimension: str, value: str) -> str:
    _, folded, foreign = _table()
    kind = DIMENSIONS[dimension][0]
    hint = _suggestions(number, word, dimension)
    also = f"; did you mean {' or '.join(hint)}?" if hint else ""
    if word in foreign:
        return f"{word!r} means {foreign[word]}, which windsheet does not read{also}"
    same = folded.get(word.casefold(), [])
    if len(same) > 1 and any(s not in foreign for s in same):
        return f"{word!r} could be more than one unit (letter case matters){also}"
    return f"unknown unit {word!r} in {value!r}{also}"


def _qualifier(text, kind, expected, value, path):
    if text is None:
        return None
    word = text.casefold()
    if word in _PEAK_TO_PEAK:
        raise InputError(path, f"peak-to-peak is not read in {value!r}: give the peak, like '170 V peak' "
                               "(half the peak-to-peak of a symmetric wave)")
    if word not in _QUALIFIERS:
        raise InputError(path, f"{expected}; could not read {text!r} in {value!r} "
                               "(after the unit only rms, peak or dc may follow)")
    if kind not in ("voltage", "current"):
        raise InputError(path, f"{expected}; rms, peak and dc belong to a voltage or a current, "
                               f"not to {_kind_name(kind)}")
    return _QUALIFIERS[word]


def _check_range(si, dimension, si_unit, value, path, allow_zero, allow_negative, expected):
    if not math.isfinite(si):
        raise InputError(path, f"{expected}; {value!r} is not a finite number")
    if dimension != "temperature":
        if si < 0 and not allow_negative:
            raise InputError(path, f"must be positive, got {value!r}")
        if si == 0 and not allow_zero and dimension != "angle":
            raise InputError(path, f"must be greater than zero, got {value!r}")
    elif si < -273.15 - 1e-9:
        raise InputError(path, f"is below absolute zero: {value!r}")
    elif si < TEMPERATURE_FLOOR_DEGC:
        # Copper's resistance is linear in temperature (IEC 60028) only well above the
        # cryogenic range; at 0 K it would be negative and the heat balance has no solution.
        raise InputError(path, f"expected a temperature from {TEMPERATURE_FLOOR_DEGC:g} degC to "
                               f"{SANE_RANGE['temperature'][1]:g} degC, like '25 degC'; got {value!r} "
                               "(windsheet's resistance and heating models do not reach that cold)")
    lo, hi = SANE_RANGE.get(dimension, (0.0, math.inf))
    if abs(si) > hi:
        raise InputError(path, f"must be at most {hi:g} {si_unit}, got {value!r}")
    if si != 0 and abs(si) < lo and dimension != "temperature":
        zero = " or zero" if allow_zero else ""
        raise InputError(path, f"must be at least {lo:g} {si_unit}{zero}, got {value!r}")


def parse_quantity(value, dimension: str, path: str, *, allow_zero: bool = False,
                   allow_negative: bool = False, form: Optional[str] = None) -> float:
    """Read ``value`` (``"50 mm"``, ``"60 uH"``, ``"25 degC"``) into an SI float.

    Parameters
    ----------
    value : str
        The text from the order or measured file; a bare number is refused.
    dimension : str
        A key of :data:`DIMENSIONS`.
    path : str
        The field's YAML path, for the error message.
    allow_zero, allow_negative : bool
        As in :func:`read_quantity`.
    form : {None, "peak", "rms", "dc"}
        None: the field takes a plain value, and rms/peak/dc is refused.
        Otherwise the form the field is in: it takes a plain value or one
        marked so (``"500 V peak"`` for a peak field); another is refused.

    Returns
    -------
    float
        The value in SI units [m, H, F, V, A, Hz, ohm, s, kg, rad]; temperatures
        in [degC], the shop's unit, not kelvin.

    Examples
    --------
    >>> parse_quantity("50 mm", "length", "form.traverse")
    0.05
    >>> parse_quantity("25 degC", "temperature", "duty.ambient")
    25.0
    >>> parse_quantity("500 V peak", "voltage", "insulation.pdiv", form="peak")
    500.0
    >>> parse_quantity("25 C", "temperature", "duty.ambient")
    Traceback (most recent call last):
    ...
    windsheet.common.errors.InputError: duty.ambient: expected a temperature with a unit, like '25 degC'; 'C' means coulomb, which windsheet does not read; did you mean '25 degC'?
    """
    reading = read_quantity(value, dimension, path, allow_zero=allow_zero, allow_negative=allow_negative)
    if reading.qualifier is not None and reading.qualifier != form:
        plain, name = DIMENSIONS[dimension][2], dimension.replace("_", " ")
        if form is not None:
            raise InputError(path, f"is a {form} {name}, like '{plain}' or '{plain} {form}' "
                                   f"(a value given as {reading.qualifier} is not converted here); got {value!r}")
        raise InputError(path, f"takes a plain {name} like '{plain}', without '{reading.qualifier}'; got {value!r}")
    return reading.value


def parse_percent(value, path: str) -> float:
    """Read ``"10 %"`` or ``"0.5 %"`` into a fraction (0.10, 0.005).

    Parameters
    ----------
    value : str
        A decimal number followed by ``%``.
    path : str
        The field's YAML path, for the error message.

    Returns
    -------
    float
        The fraction [-], from 0 up to (not including) 10.

    Examples
    --------
    >>> parse_percent("10 %", "tolerances.inductance")
    0.1
    >>> parse_percent("5*2 %", "tolerances.inductance")
    Traceback (most recent call last):
    ...
    windsheet.common.errors.InputError: tolerances.inductance: expected a percentage like '10 %'; got '5*2 %'
    """
    expected = "expected a percentage like '10 %'"
    if isinstance(value, bool) or not isinstance(value, str) or len(value) > 64:
        raise InputError(path, expected)
    text = value.strip()
    m = re.fullmatch(rf"({_NUMBER})\s*%", text)
    if not m:
        raise InputError(path, f"{expected}; got {value!r}")
    frac = float(m.group(1)) / 100.0
    if not math.isfinite(frac) or frac < 0 or frac >= 10:
        raise InputError(path, f"{expected} between 0 % and 1000 %; got {value!r}")
    return frac


def sine_rms(peak):
    """The rms of a sine from its peak.

    Parameters
    ----------
    peak : float
        Peak value (of a voltage or current). [V] or [A]

    Returns
    -------
    float
        ``peak / sqrt(2)``, in the unit of ``peak``.

    References
    ----------
    .. [1] IEC 60050-103, International Electrotechnical Vocabulary, the
       root-mean-square value (from memory); for a sinusoid it is the peak
       over sqrt(2), checked in tests against a sampled sine.

    Examples
    --------
    >>> round(sine_rms(325.27), 2)
    230.0
    """
    return peak / SINE_CREST
