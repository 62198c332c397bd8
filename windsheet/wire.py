"""Magnet wire data: sizes, enamel grades, copper properties.

Published tables live as CSV files in ``windsheet/data`` with a ``source``
column and are loaded once.  A shop can point an order at its own catalog
(CSV with columns ``name, copper_diameter_mm, overall_diameter_mm,
breakdown_V, grade, thermal_class, source``).
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np

GRADE_NAMES = {1: "grade 1 (single build)", 2: "grade 2 (heavy build)", 3: "grade 3 (triple build)"}
#: Thermal classes per IEC 60085 (memory). [degC]
THERMAL_CLASSES = (105, 120, 130, 155, 180, 200, 220, 240)


def _read_csv(name):
    with resources.files("windsheet").joinpath("data", name).open(encoding="utf-8") as fh:
        return list(csv.DictReader(fh))


@lru_cache(maxsize=1)
def copper():
    """Annealed copper constants (IEC 60028), SI: resistivity, alpha, density."""
    rows = {r["quantity"]: float(r["value"]) for r in _read_csv("copper.csv")}
    return rows


@lru_cache(maxsize=1)
def grade_table():
    """IEC 60317-0-1 rows: {grade: (nominal_m, min_increase_m, max_overall_m, breakdown_V)}."""
    out = {}
    for g in (1, 2, 3):
        rows = sorted((r for r in _read_csv("iec60317_grades.csv") if int(r["grade"]) == g),
                      key=lambda r: float(r["nominal_mm"]))
        out[g] = tuple(np.array([float(r[k]) for r in rows]) for k in
                       ("nominal_mm", "min_increase_mm", "max_overall_mm", "min_breakdown_V"))
    return out


def awg_diameter(gauge: int) -> float:
    """Nominal bare diameter of an AWG size.

    Parameters
    ----------
    gauge : int
        American Wire Gauge number (0000 is -3). [-]

    Returns
    -------
    d : float
        Bare copper diameter. [m]

    References
    ----------
    .. [1] ASTM B258, Standard Specification for Standard Nominal Diameters and
       Cross-Sectional Areas of AWG Sizes: d = 0.127 mm x 92^((36 - n)/39).
    """
    return 0.127e-3 * 92.0 ** ((36 - gauge) / 39.0)


def enamel_build(nominal_d: float, grade: int):
    """Overall diameter and breakdown voltage of enamelled round copper wire.

    Between the tabulated sizes values are interpolated on log-log axes;
    outside them they are extrapolated and flagged.

    Parameters
    ----------
    nominal_d : float
        Nominal bare diameter. [m]
    grade : int
        Enamel grade 1, 2 or 3 (single, heavy, triple build).

    Returns
    -------
    overall_d : float
        Maximum overall diameter. [m]
    breakdown : float
        Minimum breakdown voltage by the twisted-pair test. [V]
    extrapolated : bool
        True when ``nominal_d`` lies outside the tabulated sizes.

    References
    ----------
    .. [1] IEC 60317-0-1, Specifications for particular types of winding wires -
       Part 0-1: Enamelled round copper wire, general requirements (dimension
       and breakdown tables, as adopted in IS 13730-0-1).
    """
    nom, _inc, over, bd = grade_table()[grade]
    x = math.log(nominal_d * 1e3)
    lx = np.log(nom)
    extrapolated = not (nom[0] * 0.999 <= nominal_d * 1e3 <= nom[-1] * 1.001)
    # Increase over nominal scales close to sqrt(d) across the table; interpolate it.
    inc = np.log(over - nom)
    lo, hi = (0, 1) if x < lx[0] else ((-2, -1) if x > lx[-1] else (None, None))
    if lo is None:
        inc_d = math.exp(np.interp(x, lx, inc))
        bd_v = float(np.exp(np.interp(x, lx, np.log(bd))))
    else:
        def extrap(y):
            slope = (y[hi] - y[lo]) / (lx[hi] - lx[lo])
            return y[lo] + slope * (x - lx[lo])
        inc_d = math.exp(extrap(inc))
        bd_v = float(math.exp(extrap(np.log(bd))))
    return nominal_d + inc_d * 1e-3, bd_v, extrapolated


@dataclass(frozen=True)
class Wire:
    """A magnet wire as the engine uses it (SI)."""

    label: str
    standard: str
    copper_diameter: float
    overall_diameter: float
    grade: int | None
    thermal_class: int
    breakdown: float
    source: str
    warnings: tuple = ()

    @property
    def area(self) -> float:
        return math.pi * self.copper_diameter ** 2 / 4


def _temperature_factor(temperature_C):
    """R(t)/R(20 degC) of annealed copper, linear in IEC 60028's coefficient."""
    return 1 + copper()["temperature_coefficient_20C"] * (temperature_C - 20.0)


def dc_resistance(length, copper_d, temperature_C=20.0):
    """DC resistance of annealed copper wire.

    Parameters
    ----------
    length : float or ndarray
        Wire length. [m]
    copper_d : float
        Bare copper diameter. [m]
    temperature_C : float
        Conductor temperature. [degC]

    Returns
    -------
    R : float or ndarray
        Resistance. [ohm]

    References
    ----------
    .. [1] IEC 60028, International standard of resistance for copper:
       1/58 ohm mm^2/m at 20 degC, temperature coefficient 0.00393 /K.
    """
    r20 = copper()["resistivity_20C"] * np.asarray(length) / (math.pi * copper_d ** 2 / 4)
    return r20 * _temperature_factor(temperature_C)


def resistance_to_20C(R, temperature_C):
    """Correct a resistance measured at ``temperature_C`` to 20 degC.

    Parameters
    ----------
    R : float
        Resistance measured. [ohm]
    temperature_C : float
        Conductor (ambient) temperature at the measurement. [degC]

    Returns
    -------
    R20 : float
        Resistance at 20 degC. [ohm]

    References
    ----------
    .. [1] IEC 60028 (temperature coefficient 0.00393 /K at 20 degC).
    """
    return R / _temperature_factor(temperature_C)


def copper_mass(length, copper_d):
    """Copper mass of a wire.

    Parameters
    ----------
    length : float or ndarray
        Wire length. [m]
    copper_d : float
        Bare copper diameter. [m]

    Returns
    -------
    m : float or ndarray
        Mass of copper, enamel excluded. [kg]

    References
    ----------
    .. [1] IEC 60028 (density 8.89 g/cm^3).
    """
    return copper()["density"] * np.asarray(length) * math.pi * copper_d ** 2 / 4


def standard_wire(nominal_d, grade, thermal_class=155, label=None, standard="IEC 60317-0-1",
                  overall_d=None, breakdown=None) -> Wire:
    """Build a :class:`Wire` from a nominal diameter and grade, with optional datasheet overrides."""
    over, bd, extrap = enamel_build(nominal_d, grade)
    warnings = []
    source = "IEC 60317-0-1 table (interpolated)"
    if extrap:
        source = "IEC 60317-0-1 table (extrapolated beyond 0.315–1.016 mm)"
        if overall_d is None or breakdown is None:
            warnings.append(
                f"wire {nominal_d * 1e3:.3f} mm lies outside the built-in IEC 60317-0-1 rows; "
                "overall diameter and breakdown are extrapolated: give the datasheet values "
                "as wire.overall_diameter and wire.breakdown")
    if overall_d is not None or breakdown is not None:
        source = "datasheet values given in the order" + (
            "" if (overall_d is not None and breakdown is not None) else f"; rest from {source}")
    return Wire(label=label or f"{nominal_d * 1e3:.3f} mm {GRADE_NAMES[grade]}", standard=standard,
                copper_diameter=nominal_d, overall_diameter=overall_d or over, grade=grade,
                thermal_class=thermal_class, breakdown=breakdown or bd, source=source,
                warnings=tuple(warnings))


def load_catalog(path):
    """Read a shop wire catalog (CSV) into ``{name: row}``; raises ValueError on a bad row.

    The file is read bounded (:func:`windsheet.fileio.read_csv_rows`): a FIFO,
    a device or an oversized file is refused by name with InputError.
    """
    from .fileio import read_csv_rows

    out = {}
    for n, row in enumerate(read_csv_rows(path, "wire catalog (CSV)"), start=2):
        try:
            out[row["name"].strip()] = Wire(
                label=row["name"].strip(), standard=row.get("source", "shop catalog") or "shop catalog",
                copper_diameter=float(row["copper_diameter_mm"]) * 1e-3,
                overall_diameter=float(row["overall_diameter_mm"]) * 1e-3,
                grade=int(row["grade"]) if row.get("grade") else None,
                thermal_class=int(row.get("thermal_class") or 155),
                breakdown=float(row["breakdown_V"]),
                source=f"shop catalog {path}, line {n}")
        except (KeyError, TypeError, ValueError, AttributeError):
            raise ValueError(f"line {n}: expected columns name, copper_diameter_mm, "
                             "overall_diameter_mm, breakdown_V, grade, thermal_class") from None
    return out
