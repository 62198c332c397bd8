"""The units the order language reads: every accepted spelling and its SI factor.

Definitions only: the SI prefixes, the inch of 25.4 mm (international
agreement of 1959) with the mil and thou of 0.001 in, the minute and hour,
the kelvin's 273.15 offset and the Fahrenheit degree of 5/9 K.
``tests/test_units.py`` checks every spelling against pint's registry.
Spellings of units windsheet does not read (siemens, coulomb ...) are listed
too, so that a letter case is never forgiven into a unit when the writer may
have meant another.
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import NamedTuple

_PREFIXES = {"f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9,
             "T": 1e12}
# The other SI prefixes (peta, exa, atto, deci ...): not read, but PH is a petahenry, never a pH.
_OTHER_SI_PREFIXES = ("a", "z", "y", "r", "q", "d", "c", "da", "h", "P", "E", "Z", "Y", "R", "Q")
_BINARY_PREFIXES = ("Ki", "Mi", "Gi", "Ti", "Pi", "Ei", "Zi", "Yi")
_PREFIX_NAMES = {"femto": "f", "pico": "p", "nano": "n", "micro": "u", "milli": "m", "kilo": "k",
                 "mega": "M", "giga": "G", "tera": "T"}
# SI symbol -> (kind, factor of the unprefixed unit to SI, names)
_SI = {
    "m": ("length", 1.0, ("metre", "meter", "metres", "meters")),
    "H": ("inductance", 1.0, ("henry", "henries", "henrys")),
    "F": ("capacitance", 1.0, ("farad", "farads")),
    "V": ("voltage", 1.0, ("volt", "volts")),
    "T": ("flux_density", 1.0, ("tesla", "teslas")),
    "A": ("current", 1.0, ("ampere", "amperes", "amp", "amps")),
    "Hz": ("frequency", 1.0, ("hertz",)),
    "ohm": ("resistance", 1.0, ("ohm", "ohms")),
    "s": ("time", 1.0, ("second", "seconds")),
    "J": ("energy", 1.0, ("joule", "joules")),
    "g": ("mass", 1e-3, ("gram", "grams")),
}
# Units outside SI's prefixed symbols: spelling -> (kind, factor, offset, canonical).
# Exact definitions: inch 25.4 mm (1959), mil and thou 0.001 in, foot 12 in.
_OTHER_ACCEPTED = {
    "cm": ("length", 1e-2, 0.0, "cm"), "centimetre": ("length", 1e-2, 0.0, "cm"),
    "centimeter": ("length", 1e-2, 0.0, "cm"), "centimetres": ("length", 1e-2, 0.0, "cm"),
    "centimeters": ("length", 1e-2, 0.0, "cm"),
    "in": ("length", 0.0254, 0.0, "inch"), "inch": ("length", 0.0254, 0.0, "inch"),
    "inches": ("length", 0.0254, 0.0, "inch"),
    "mil": ("length", 2.54e-5, 0.0, "mil"), "mils": ("length", 2.54e-5, 0.0, "mil"),
    "thou": ("length", 2.54e-5, 0.0, "thou"),
    "ft": ("length", 0.3048, 0.0, "ft"), "foot": ("length", 0.3048, 0.0, "ft"),
    "feet": ("length", 0.3048, 0.0, "ft"),
    "kohm": ("resistance", 1e3, 0.0, "kohm"), "kilohm": ("resistance", 1e3, 0.0, "kohm"),
    "kilohms": ("resistance", 1e3, 0.0, "kohm"),
    "megohm": ("resistance", 1e6, 0.0, "Mohm"), "megohms": ("resistance", 1e6, 0.0, "Mohm"),
    "gigohm": ("resistance", 1e9, 0.0, "Gohm"), "gigohms": ("resistance", 1e9, 0.0, "Gohm"),
    "min": ("time", 60.0, 0.0, "min"), "minute": ("time", 60.0, 0.0, "min"),
    "minutes": ("time", 60.0, 0.0, "min"),
    "h": ("time", 3600.0, 0.0, "hour"), "hour": ("time", 3600.0, 0.0, "hour"),
    "hours": ("time", 3600.0, 0.0, "hour"),
    "kg": ("mass", 1.0, 0.0, "kg"),
    "degC": ("temperature", 1.0, 0.0, "degC"), "celsius": ("temperature", 1.0, 0.0, "degC"),
    "K": ("temperature", 1.0, -273.15, "K"), "kelvin": ("temperature", 1.0, -273.15, "K"),
    "degF": ("temperature", 5.0 / 9.0, -32.0 * 5.0 / 9.0, "degF"),
    "fahrenheit": ("temperature", 5.0 / 9.0, -32.0 * 5.0 / 9.0, "degF"),
    "deg": ("angle", math.pi / 180.0, 0.0, "deg"), "degree": ("angle", math.pi / 180.0, 0.0, "deg"),
    "degrees": ("angle", math.pi / 180.0, 0.0, "deg"),
    "arcmin": ("angle", math.pi / 10800.0, 0.0, "arcmin"),
    "arcminute": ("angle", math.pi / 10800.0, 0.0, "arcmin"),
    "arcminutes": ("angle", math.pi / 10800.0, 0.0, "arcmin"),
    "rad": ("angle", 1.0, 0.0, "rad"), "radian": ("angle", 1.0, 0.0, "rad"),
    "radians": ("angle", 1.0, 0.0, "rad"),
}
# Units the order language does not take, listed so that a case is never
# "forgiven" into a unit when the writer may have meant one of these.
_FOREIGN = {"S": "siemens", "C": "coulomb", "W": "watt", "N": "newton",
            "Pa": "pascal", "Wb": "weber", "L": "litre", "l": "litre", "t": "tonne", "G": "gauss",
            "mol": "mole", "cd": "candela", "lm": "lumen", "lx": "lux", "Bq": "becquerel",
            "Gy": "gray", "Sv": "sievert", "bar": "bar", "eV": "electronvolt", "VA": "volt-ampere",
            "Wh": "watt-hour", "Ah": "ampere-hour", "ppm": "parts per million", "dB": "decibel",
            "M": "molar", "a": "annum (year)", "k": "the Boltzmann constant (kelvin is K)"}
# Accepted symbols read without prefixes.
_UNPREFIXED = ("h", "min", "in", "ft", "mil", "K", "deg", "rad")


class Unit(NamedTuple):
    """One spelling: SI value = number x ``factor`` + ``offset`` (temperatures in degC)."""

    kind: str
    factor: float
    offset: float
    canonical: str


@lru_cache(maxsize=1)
def table():
    """The spellings, built once.

    Returns
    -------
    units : dict
        Accepted spelling -> :class:`Unit` (kind, factor and offset to SI, canonical spelling).
    folded : dict
        Case-folded spelling -> every spelling, accepted or foreign, that folds to it.
    foreign : dict
        Spelling of a unit windsheet does not read -> its name.

    Examples
    --------
    >>> units, folded, foreign = table()
    >>> units["kHz"].factor, sorted(folded["mhz"]), foreign["C"]
    (1000.0, ['MHz', 'mHz'], 'coulomb')
    """
    units = {}
    for sym, (kind, base, names) in _SI.items():
        units[sym] = Unit(kind, base, 0.0, sym)
        for name in names:
            units[name] = Unit(kind, base, 0.0, sym)
        for p, f in _PREFIXES.items():
            units[p + sym] = Unit(kind, base * f, 0.0, p + sym)
            for pname, psym in _PREFIX_NAMES.items():
                if psym == p:
                    for name in names:
                        units[pname + name] = Unit(kind, base * f, 0.0, p + sym)
    units.update({k: Unit(*v) for k, v in _OTHER_ACCEPTED.items()})
    folded = {}
    foreign = dict(_FOREIGN)
    # Any prefix on any symbol is a unit to a units library (PH a petahenry, nh a nanohour,
    # Mil a mebilitre): such spellings are never forgiven into one of ours.
    names = {**{sym: sym for sym in (*_SI, *_UNPREFIXED)}, **_FOREIGN}
    for sym, name in names.items():
        for p in (*_PREFIXES, *_OTHER_SI_PREFIXES, *_BINARY_PREFIXES):
            if p + sym not in units:
                foreign.setdefault(p + sym, f"{name} with the prefix {p}")
    for spelling in list(units) + list(foreign):
        folded.setdefault(spelling.casefold(), []).append(spelling)
    return units, folded, foreign
