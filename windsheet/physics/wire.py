"""Magnet wire as the engine uses it: the conductor's physics and the :class:`Wire`.

Conductor constants (copper, aluminium) live in ``windsheet/data/conductors.csv``
with their sources; the enamel tables and size rules live in
:mod:`windsheet.physics.wire_tables`.  A shop can point an order at its own catalog
(CSV with columns ``name, copper_diameter_mm, overall_diameter_mm,
breakdown_V, grade, thermal_class, source``).
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from functools import lru_cache
from typing import NamedTuple

import numpy as np

from .wire_tables import (GRADE_NAMES, IEC, NEMA, EnamelRow, NotInTable, Size, awg_diameter,  # noqa: F401
                          iec_row, next_larger_row, parse_gauge, row_for, swg_diameter)
from .wire_tables import _read_csv

#: Thermal classes per IEC 60085 (memory). [degC]
THERMAL_CLASSES = (105, 120, 130, 155, 180, 200, 220, 240)
CONDUCTORS = ("copper", "aluminium")


@lru_cache(maxsize=None)
def conductor(name: str = "copper") -> dict:
    """Constants of a conductor metal, SI: ``resistivity_20C`` [ohm m],
    ``temperature_coefficient_20C`` [1/K], ``density`` [kg/m^3].

    Parameters
    ----------
    name : str
        ``"copper"`` (annealed, IEC 60028) or ``"aluminium"`` (IEC 60889 grade).

    Returns
    -------
    constants : dict

    References
    ----------
    .. [1] IEC 60028, International standard of resistance for copper.
    .. [2] IEC 60889, Hard-drawn aluminium wire for overhead line conductors
       (61 % IACS); see ``windsheet/data/conductors.csv`` for each value's sureness.

    Examples
    --------
    >>> round(conductor("aluminium")["resistivity_20C"] / conductor("copper")["resistivity_20C"], 3)
    1.639
    """
    rows = {r["quantity"]: float(r["value"]) for r in _read_csv("conductors.csv") if r["conductor"] == name}
    if not rows:
        raise ValueError(f"unknown conductor {name!r}; expected one of {', '.join(CONDUCTORS)}")
    return rows


_constants = conductor  # the physics functions below take a ``conductor`` name that shadows it


def copper() -> dict:
    """Annealed copper constants (IEC 60028), SI: see :func:`conductor`.

    Returns
    -------
    constants : dict
        ``resistivity_20C`` [ohm m], ``temperature_coefficient_20C`` [1/K],
        ``density`` [kg/m^3].

    References
    ----------
    .. [1] IEC 60028, International standard of resistance for copper:
       1/58 ohm mm^2/m at 20 degC, 0.00393 /K, 8.89 g/cm^3 (memory).

    Examples
    --------
    >>> c = copper()                  # 1/58 ohm mm^2/m is 1.7241e-8 ohm m
    >>> round(c["resistivity_20C"] * 58e6, 4), c["temperature_coefficient_20C"], c["density"]
    (1.0, 0.00393, 8890.0)
    """
    return conductor("copper")


class EnamelBuild(NamedTuple):
    """Overall diameter [m] and minimum breakdown [V] of a size and grade; ``from_next_row`` is
    True when the values were carried from the next larger row (a gauge size)."""

    overall_diameter: float
    breakdown: float
    from_next_row: bool


def enamel_build(nominal_d: float, grade: int) -> EnamelBuild:
    """Maximum overall diameter and minimum breakdown of enamelled round copper wire.

    A tabulated nominal diameter gets its own IEC 60317-0-1 row; any other
    diameter (a gauge size) the next larger preferred row, the standard's
    rule for intermediate sizes.  Nothing is interpolated.

    Parameters
    ----------
    nominal_d : float
        Nominal conductor diameter. [m]
    grade : int
        Enamel grade 1, 2 or 3 (single, heavy, triple build).

    Returns
    -------
    overall_d : float
        Maximum overall diameter. [m]
    breakdown : float
        Minimum breakdown voltage (test method in the row). [V]
    from_next_row : bool
        True when ``nominal_d`` is not itself a tabulated nominal diameter.

    Raises
    ------
    NotInTable
        No row covers the size, or the row gives no value for the grade.

    References
    ----------
    .. [1] IEC 60317-0-1, Specifications for particular types of winding wires -
       Part 0-1: Enamelled round copper wire (dimension and breakdown tables);
       sources per row in ``windsheet/data/iec60317_0_1_copper.csv``.

    Examples
    --------
    >>> od, bd, carried = enamel_build(0.500e-3, 2)
    >>> round(od * 1e3, 3), bd, carried
    (0.566, 4600.0, False)
    """
    row = next_larger_row(nominal_d, grade)
    if row.max_overall is None or row.breakdown is None:
        raise NotInTable(f"{IEC} gives no grade {grade} {' or '.join(row.missing())} for "
                         f"{nominal_d * 1e3:.3f} mm")
    return EnamelBuild(row.max_overall, row.breakdown, bool(row.rule))


def grade_breakdowns(nominal_d: float) -> dict:
    """Minimum breakdown [V] of every grade the table gives for a diameter: ``{grade: V}``.

    Parameters
    ----------
    nominal_d : float
        Nominal conductor diameter (a gauge size takes the next larger row,
        as :func:`enamel_build`). [m]

    Returns
    -------
    breakdowns : dict
        ``{grade: minimum breakdown voltage [V]}`` for grades 1–3 that the
        row gives; empty when none does.

    References
    ----------
    .. [1] IEC 60317-0-1, dielectric breakdown table; per-row sources in
       ``windsheet/physics/data/iec60317_0_1_copper.csv``.

    Examples
    --------
    >>> grade_breakdowns(0.500e-3)     # IEC 60317-0-1 table row 0.500 mm: 2400 / 4600 / 7000 V
    {1: 2400.0, 2: 4600.0, 3: 7000.0}
    >>> grade_breakdowns(0.3759e-3)    # 28 SWG takes the 0.400 mm row: 2300 / 4400 / 6600 V
    {1: 2300.0, 2: 4400.0, 3: 6600.0}
    """
    out = {}
    for g in (1, 2, 3):
        try:
            out[g] = enamel_build(nominal_d, g).breakdown
        except NotInTable:
            pass
    return out


@dataclass(frozen=True)
class Wire:
    """A magnet wire as the engine uses it (SI).

    ``copper_diameter`` is the bare conductor diameter whatever the metal
    (the name predates aluminium); ``conductor`` names the metal.
    """

    label: str
    standard: str
    copper_diameter: float
    overall_diameter: float
    grade: int | None
    thermal_class: int
    breakdown: float
    source: str
    warnings: tuple = ()
    conductor: str = "copper"
    min_increase: float | None = None
    breakdown_test: str = ""
    sources: tuple = ()

    @property
    def area(self) -> float:
        return math.pi * self.copper_diameter ** 2 / 4

    @property
    def conductor_diameter(self) -> float:
        return self.copper_diameter

    @property
    def min_overall_diameter(self) -> float | None:
        return None if self.min_increase is None else self.copper_diameter + self.min_increase


def _temperature_factor(temperature_C, conductor_name="copper"):
    """R(t)/R(20 degC), linear in the conductor's coefficient at 20 degC."""
    return 1 + _constants(conductor_name)["temperature_coefficient_20C"] * (np.asarray(temperature_C) - 20.0)


def dc_resistance(length, copper_d, temperature_C=20.0, conductor="copper"):
    """DC resistance of a round wire.

    Parameters
    ----------
    length : float or ndarray
        Wire length. [m]
    copper_d : float
        Bare conductor diameter. [m]
    temperature_C : float
        Conductor temperature. [degC]
    conductor : str
        ``"copper"`` or ``"aluminium"``.

    Returns
    -------
    R : float or ndarray
        Resistance. [ohm]

    References
    ----------
    .. [1] IEC 60028, International standard of resistance for copper:
       1/58 ohm mm^2/m at 20 degC, temperature coefficient 0.00393 /K.
    .. [2] IEC 60889 (aluminium, 61 % IACS): 0.028264 ohm mm^2/m, 0.00403 /K.

    Examples
    --------
    >>> d = math.sqrt(4 / math.pi) * 1e-3          # 1 mm^2
    >>> round(float(dc_resistance(58.0, d)), 4)
    1.0
    """
    rho = _constants(conductor)["resistivity_20C"]
    r20 = rho * np.asarray(length) / (math.pi * copper_d ** 2 / 4)
    return r20 * _temperature_factor(temperature_C, conductor)


def resistance_to_20C(R, temperature_C, conductor="copper"):
    """Correct a resistance measured at ``temperature_C`` to 20 degC.

    Parameters
    ----------
    R : float
        Resistance measured. [ohm]
    temperature_C : float
        Conductor (ambient) temperature at the measurement. [degC]
    conductor : str
        ``"copper"`` or ``"aluminium"``.

    Returns
    -------
    R20 : float
        Resistance at 20 degC. [ohm]

    References
    ----------
    .. [1] IEC 60028 (copper, 0.00393 /K at 20 degC); IEC 60889 (aluminium, 0.00403 /K).

    Examples
    --------
    >>> round(float(resistance_to_20C(1.0393, 30.0)), 6)
    1.0
    """
    return R / _temperature_factor(temperature_C, conductor)


def copper_mass(length, copper_d, conductor="copper"):
    """Conductor mass of a wire (copper unless ``conductor`` says otherwise).

    Parameters
    ----------
    length : float or ndarray
        Wire length. [m]
    copper_d : float
        Bare conductor diameter. [m]
    conductor : str
        ``"copper"`` or ``"aluminium"``.

    Returns
    -------
    m : float or ndarray
        Mass of the conductor, enamel excluded. [kg]

    References
    ----------
    .. [1] IEC 60028 (copper 8.89 g/cm^3); IEC 60889 (aluminium 2.703 g/cm^3).

    Examples
    --------
    >>> d = math.sqrt(4 / math.pi) * 1e-3          # 1 mm^2
    >>> round(float(copper_mass(1.0, d)) * 1e3, 3)  # grams in one metre
    8.89
    """
    rho = _constants(conductor)["density"]
    return rho * np.asarray(length) * math.pi * copper_d ** 2 / 4


conductor_mass = copper_mass

_ALUMINIUM_NOTE = ("aluminium wire: enamel dimensions and breakdown are IEC 60317-0-1's copper rows; "
                   "IEC 60317-0-3 (aluminium) gives the same dimensions as far as recalled (memory, no stored "
                   "copy found): check the wire's datasheet")


def _describe(row: EnamelRow) -> tuple:
    return tuple(sorted({f"{q}: {src} ({sure})" for q, (src, sure) in row.sources.items()}))


def standard_wire(nominal_d, grade, thermal_class=155, label=None, standard=IEC, overall_d=None,
                  breakdown=None, conductor="copper", size: Size | None = None) -> Wire:
    """A :class:`Wire` from a table row, with optional datasheet overrides.

    The row is the size's own (metric), the next larger IEC row (a gauge
    size) or the NEMA MW 1000 build (an AWG size under ``standard=NEMA``).
    A value the row lacks must come from the datasheet; both datasheet values
    together accept any size, with no table at all.

    Parameters
    ----------
    nominal_d : float
        Nominal conductor diameter. [m]
    grade : int
        Enamel grade 1, 2 or 3 (single, heavy, triple build). [-]
    thermal_class : int
        Thermal class (IEC 60085). [degC]
    label : str or None
        Name on the sheets; by default the size and grade.
    standard : str
        :data:`IEC` or :data:`NEMA`.
    overall_d : float or None
        Datasheet maximum overall diameter, replacing the table's. [m]
    breakdown : float or None
        Datasheet minimum breakdown voltage, replacing the table's. [V]
    conductor : str
        ``"copper"`` or ``"aluminium"``.
    size : Size or None
        The size as ordered (a gauge); by default metric ``nominal_d``.

    Returns
    -------
    Wire
        Diameters [m], breakdown [V], and where each value came from.

    Raises
    ------
    NotInTable
        The size or a needed value is not in the table and the datasheet does not give it.

    References
    ----------
    .. [1] IEC 60317-0-1, Enamelled round copper wire (dimension and breakdown tables).
    .. [2] NEMA MW 1000, Magnet Wire, Part 2, as tabulated in a maker's catalogue.
       Per-row sources in ``windsheet/physics/data``.

    Examples
    --------
    >>> w = standard_wire(0.500e-3, 2)       # IEC 60317-0-1 table row 0.500 mm grade 2: max 0.566 mm, 4600 V
    >>> round(w.overall_diameter * 1e3, 3), w.breakdown, w.source
    (0.566, 4600.0, 'IEC 60317-0-1 table row')
    >>> w = standard_wire(0.37592e-3, 1, size=parse_gauge("28 SWG"))
    >>> round(w.overall_diameter * 1e3, 4), w.breakdown       # 0.3759 + (0.439 - 0.400) mm, the 0.400 mm row
    (0.4149, 2300.0)
    """
    size = size or Size("metric", None, nominal_d, f"{nominal_d * 1e3:.3f} mm")
    warnings = [_ALUMINIUM_NOTE] if conductor == "aluminium" else []
    if overall_d is not None and breakdown is not None:
        try:
            row = row_for(size, grade, standard)
        except NotInTable:
            row = None
        return Wire(label=label or f"{size.label} {GRADE_NAMES[grade]}", standard=standard,
                    copper_diameter=nominal_d, overall_diameter=overall_d, grade=grade,
                    thermal_class=thermal_class, breakdown=breakdown, source="datasheet values given in the order",
                    warnings=tuple(warnings), conductor=conductor,
                    min_increase=row.min_increase if row else None, breakdown_test=row.test if row else "",
                    sources=("overall diameter and breakdown: datasheet values given in the order",))
    row = row_for(size, grade, standard)
    over = overall_d if overall_d is not None else row.max_overall
    bd = breakdown if breakdown is not None else row.breakdown
    if over is None or bd is None:
        missing = [t for t, v in (("maximum overall diameter (give wire.overall_diameter)", over),
                                  ("minimum breakdown voltage (give wire.breakdown)", bd)) if v is None]
        raise NotInTable(f"{standard} gives no {GRADE_NAMES[grade]} {' or '.join(missing)} for {size.label} "
                         "in the stored table")
    source = f"{standard} table row" + (f" ({row.rule})" if row.rule else "")
    if overall_d is not None or breakdown is not None:
        source = f"datasheet value given in the order; rest from the {source}"
    return Wire(label=label or f"{size.label} {GRADE_NAMES[grade]}", standard=standard,
                copper_diameter=nominal_d, overall_diameter=over, grade=grade, thermal_class=thermal_class,
                breakdown=bd, source=source, warnings=tuple(warnings), conductor=conductor,
                min_increase=row.min_increase, breakdown_test=row.test, sources=_describe(row))


def load_catalog(path):
    """Read a shop wire catalog (CSV) into ``{name: row}``; raises ValueError on a bad row.

    The file is read bounded (:func:`windsheet.common.fileio.read_csv_rows`): a FIFO,
    a device or an oversized file is refused by name with InputError.
    """
    from windsheet.common.fileio import read_csv_rows

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
