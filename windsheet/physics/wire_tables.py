"""Published magnet-wire tables: IEC 60317-0-1 grades, NEMA MW 1000 builds, SWG and AWG sizes.

Every value comes from a row of a CSV file in ``windsheet/data`` that names its
source and how sure it is (``seen`` in a stored copy of a published table,
``memory``, or ``computed`` by a rule the row's source names).  Nothing is
interpolated between rows.

The lookup rules:

- A metric size must be one of IEC 60317-0-1's nominal conductor diameters
  (the R20 series and the R40 intermediate sizes).  Any other diameter is
  refused (:class:`NotInTable`) naming the nearest standard sizes.
- A gauge size (AWG, SWG) is not a nominal diameter of IEC 60317-0-1; it takes
  the row of the *next larger* preferred (R20) nominal diameter: the same
  minimum increase, the same maximum increase and the same minimum breakdown.
  This is the standard's rule for intermediate sizes (stated for breakdown in
  the IS 13730 adoption's table notes) and it reproduces that adoption's own
  SWG table (see ``tests/test_wire.py``).
- NEMA MW 1000 rows hold only what was found in a stored copy (single build
  dimensions, heavy build minimum increase); a missing value is reported as
  missing, never filled in.
"""

from __future__ import annotations

import csv
import math
import re
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources

IEC = "IEC 60317-0-1"
NEMA = "NEMA MW 1000"
STANDARDS = (IEC, NEMA)
#: Grade names of IEC 60317-0-1 and the NEMA MW 1000 build each roughly matches.
GRADE_NAMES = {1: "grade 1 (single build)", 2: "grade 2 (heavy build)", 3: "grade 3 (triple build)"}
NEMA_BUILDS = {1: "single", 2: "heavy", 3: "triple"}
_MIL = 25.4e-6


class NotInTable(ValueError):
    """A size or grade that no table row covers; the message says what is known instead."""


def _read_csv(name):
    with resources.files("windsheet.physics").joinpath("data", name).open(encoding="utf-8") as fh:
        return list(csv.DictReader(fh))


def _um(d_m: float) -> int:
    """A diameter as whole micrometres, the key of every table (all nominal sizes are whole µm)."""
    return int(round(d_m * 1e6))


@dataclass(frozen=True)
class EnamelRow:
    """One size and grade of a published enamelled-wire table (SI units).

    ``None`` marks a value the table does not give (or that no stored copy gave).
    ``sources`` maps each quantity to ``(source, sureness)``.
    """

    standard: str
    nominal: float
    grade: int
    min_increase: float | None = None
    max_overall: float | None = None
    breakdown: float | None = None
    test: str = ""
    series: str = ""
    sources: dict = field(default_factory=dict, compare=False)
    rule: str = ""

    @property
    def min_overall(self) -> float | None:
        return None if self.min_increase is None else self.nominal + self.min_increase

    @property
    def complete(self) -> bool:
        return None not in (self.min_increase, self.max_overall, self.breakdown)

    def missing(self) -> list[str]:
        names = {"min_increase": "minimum increase", "max_overall": "maximum overall diameter",
                 "breakdown": "minimum breakdown voltage"}
        return [text for key, text in names.items() if getattr(self, key) is None]


_QUANTITY = {"min_increase_mm": ("min_increase", 1e-3), "max_overall_mm": ("max_overall", 1e-3),
             "min_breakdown_V": ("breakdown", 1.0)}


@lru_cache(maxsize=1)
def iec_table() -> dict:
    """IEC 60317-0-1 rows: ``{(nominal_um, grade): EnamelRow}``, loaded once.

    Returns
    -------
    rows : dict
        Keyed by (nominal conductor diameter [µm], grade); each
        :class:`EnamelRow` holds its values in SI ([m], [V]).

    References
    ----------
    .. [1] IEC 60317-0-1, Enamelled round copper wire, dimension and
       breakdown tables; sources per row in
       ``windsheet/physics/data/iec60317_0_1_copper.csv``.

    Examples
    --------
    >>> row = iec_table()[(500, 2)]         # IEC 60317-0-1 table row 0.500 mm grade 2
    >>> round(row.min_overall * 1e3, 3), round(row.max_overall * 1e3, 3), row.breakdown
    (0.545, 0.566, 4600.0)
    """
    acc: dict = {}
    for r in _read_csv("iec60317_0_1_copper.csv"):
        key = (int(round(float(r["nominal_mm"]) * 1000)), int(r["grade"]))
        slot = acc.setdefault(key, {"series": r["series"], "sources": {}, "test": ""})
        name, scale = _QUANTITY[r["quantity"]]
        slot[name] = float(r["value"]) * scale
        slot["sources"][name] = (r["source"], r["sureness"])
        if r["test"]:
            slot["test"] = r["test"]
    return {key: EnamelRow(IEC, key[0] / 1e6, key[1], **v) for key, v in acc.items()}


@lru_cache(maxsize=1)
def nema_table() -> dict:
    """NEMA MW 1000 rows: ``{(awg, grade): EnamelRow}`` plus bare nominals ``{awg: d}`` under key ``'bare'``.

    Returns
    -------
    table : dict
        ``"rows"``: ``{(awg, grade): EnamelRow}``, values in SI ([m]);
        ``"bare"``: ``{awg: (nominal bare diameter [m], (source, sureness))}``.

    References
    ----------
    .. [1] NEMA MW 1000, Magnet Wire, Part 2 (round film-insulated copper), as
       tabulated in a maker's catalogue; see ``windsheet/physics/data/nema_mw1000_copper.csv``.

    Examples
    --------
    22 AWG: bare 25.3 mil (ASTM B258 gives 0.6438 mm = 25.35 mil), single
    build at most 27.0 mil overall (NEMA MW 1000 row as stored).

    >>> t = nema_table()
    >>> round(t["bare"][22][0] / 25.4e-6, 1), round(t["rows"][(22, 1)].max_overall / 25.4e-6, 1)
    (25.3, 27.0)
    """
    bare, acc = {}, {}
    build_grade = {v: k for k, v in NEMA_BUILDS.items()}
    for r in _read_csv("nema_mw1000_copper.csv"):
        awg, v = int(r["awg"]), float(r["value_mil"]) * _MIL
        if r["build"] == "bare":
            bare[awg] = (v, (r["source"], r["sureness"]))
            continue
        slot = acc.setdefault((awg, build_grade[r["build"]]), {"sources": {}})
        name = {"min_increase": "min_increase", "max_overall": "max_overall"}[r["quantity"]]
        slot[name] = v
        slot["sources"][name] = (r["source"], r["sureness"])
    rows = {key: EnamelRow(NEMA, bare[key[0]][0], key[1], test="twisted pair", series=f"{key[0]} AWG", **v)
            for key, v in acc.items()}
    return {"rows": rows, "bare": bare}


@lru_cache(maxsize=1)
def swg_table() -> dict:
    """Imperial Standard Wire Gauge: ``{gauge: (diameter_m, source, sureness)}``.

    Returns
    -------
    table : dict
        ``{SWG number: (diameter [m], source, sureness)}``, 10 to 48 SWG.

    References
    ----------
    .. [1] Imperial Standard Wire Gauge, Order in Council of 23 August 1883
       (later BS 3737); rows in ``windsheet/physics/data/swg.csv``.

    Examples
    --------
    >>> d, source, sure = swg_table()[30]
    >>> round(d * 1e3, 4), sure                  # 30 SWG = 0.0124 in × 25.4 = 0.31496 mm
    (0.315, 'seen')
    """
    return {int(r["swg"]): (float(r["diameter_in"]) * 0.0254, r["source"], r["sureness"])
            for r in _read_csv("swg.csv")}


def iec_nominals(series=("R20", "R40")) -> list[float]:
    """The nominal conductor diameters of IEC 60317-0-1's table, ascending. [m]

    Parameters
    ----------
    series : tuple of str
        Which series to list: ``"R20"`` (preferred) and/or ``"R40"`` (intermediate).

    Returns
    -------
    nominals : list of float
        Nominal conductor diameters. [m]

    References
    ----------
    .. [1] IEC 60317-0-1, nominal conductor diameters.
    .. [2] ISO 3, Preferred numbers: the R20 series
       1.00, 1.12, 1.25, 1.40, 1.60, 1.80, 2.00, 2.24, 2.50, 2.80, 3.15, 3.55,
       4.00, 4.50, 5.00, 5.60, 6.30, 7.10, 8.00, 9.00 (memory).

    Examples
    --------
    >>> [round(d * 1e3, 3) for d in iec_nominals(("R20",)) if 0.3e-3 < d < 0.6e-3]   # ISO 3 R20 (memory)
    [0.315, 0.355, 0.4, 0.45, 0.5, 0.56]
    """
    return sorted({row.nominal for row in iec_table().values() if row.series in series})


def awg_diameter(gauge: int) -> float:
    """Nominal bare diameter of an AWG size.

    Parameters
    ----------
    gauge : int
        American Wire Gauge number (0000 is -3). [-]

    Returns
    -------
    d : float
        Bare conductor diameter. [m]

    References
    ----------
    .. [1] ASTM B258, Standard Specification for Standard Nominal Diameters and
       Cross-Sectional Areas of AWG Sizes: d = 0.127 mm x 92^((36 - n)/39).

    Examples
    --------
    >>> round(awg_diameter(22) * 1e3, 4)
    0.6438
    """
    return 0.127e-3 * 92.0 ** ((36 - gauge) / 39.0)


def awg_nominal_diameter(gauge: int) -> tuple[float, str]:
    """The nominal bare diameter of an AWG size as the standards tabulate it, and its source.

    ASTM B258 and NEMA MW 1000 print each size's diameter in mils rounded to
    0.1 mil, and their resistance tables are computed from those rounded
    diameters; the formula of :func:`awg_diameter` is only how the sizes are
    defined.  One diameter serves the table's rows, the resistance and the sizing.

    Parameters
    ----------
    gauge : int
        American Wire Gauge number (0000 is -3). [-]

    Returns
    -------
    d : float
        Bare conductor diameter. [m]
    source : str
        Where it comes from: the stored NEMA MW 1000 row (6-40 AWG), else the
        ASTM B258 formula rounded to 0.1 mil.

    References
    ----------
    .. [1] ASTM B258, nominal diameters of AWG sizes (formula; 0.1 mil
       rounding of the printed table from memory, matched by the stored NEMA
       MW 1000 catalogue page for 6-40 AWG, tests/test_wire.py).

    Examples
    --------
    >>> round(awg_nominal_diameter(40)[0] / 25.4e-6, 1)    # 3.1 mil, not the formula's 3.145
    3.1
    """
    bare = nema_table()["bare"]
    if gauge in bare:
        return bare[gauge][0], f"{NEMA} table (ASTM B258 nominal, 0.1 mil)"
    return round(awg_diameter(gauge) / _MIL, 1) * _MIL, "ASTM B258 formula rounded to 0.1 mil"


def swg_diameter(gauge: int) -> float:
    """Nominal diameter of an Imperial Standard Wire Gauge size.

    Parameters
    ----------
    gauge : int
        SWG number, 10 to 48. [-]

    Returns
    -------
    d : float
        Wire diameter. [m]

    References
    ----------
    .. [1] Imperial Standard Wire Gauge, Order in Council of 23 August 1883
       (later BS 3737): the gauge is a list of diameters in inches.

    Examples
    --------
    >>> round(swg_diameter(28) * 1e3, 4)
    0.3759
    """
    try:
        return swg_table()[gauge][0]
    except KeyError:
        lo, hi = min(swg_table()), max(swg_table())
        raise NotInTable(f"SWG sizes here run from {lo} to {hi} SWG; got {gauge} SWG") from None


def nearest_sizes(d: float, grade: int) -> tuple:
    """The IEC 60317-0-1 nominal diameters just below and just above ``d`` with a full row for ``grade``. [m]

    Parameters
    ----------
    d : float
        Conductor diameter asked for. [m]
    grade : int
        Enamel grade 1, 2 or 3. [-]

    Returns
    -------
    below, above : float or None
        Nearest tabulated nominal diameters with all three values for the
        grade; ``None`` past either end of the table. [m]

    References
    ----------
    .. [1] IEC 60317-0-1, nominal conductor diameters (R20 with R40 intermediates).

    Examples
    --------
    >>> [round(x * 1e3, 3) for x in nearest_sizes(0.47e-3, 2)]    # R20 0.450 and R40 0.475 mm
    [0.45, 0.475]
    """
    full = sorted(r.nominal for r in iec_table().values() if r.grade == grade and r.complete)
    below = [x for x in full if x < d]
    above = [x for x in full if x > d]
    return (below[-1] if below else None, above[0] if above else None)


def _mm(d):
    return f"{d * 1e3:.3f} mm"


def iec_row(nominal_d: float, grade: int) -> EnamelRow:
    """The IEC 60317-0-1 row of a nominal conductor diameter, exactly; refused if it is not one.

    Parameters
    ----------
    nominal_d : float
        Nominal conductor diameter. [m]
    grade : int
        Enamel grade 1, 2 or 3.

    Returns
    -------
    row : EnamelRow
        The table row (values may be ``None`` where the table gives none).

    References
    ----------
    .. [1] IEC 60317-0-1, Specifications for particular types of winding wires -
       Part 0-1: Enamelled round copper wire, Tables 1 (dimensions) and the
       dielectric breakdown table; see each row's ``sources``.

    Examples
    --------
    >>> row = iec_row(0.100e-3, 1)
    >>> round(row.min_overall * 1e3, 3), round(row.max_overall * 1e3, 3)
    (0.108, 0.117)
    """
    row = iec_table().get((_um(nominal_d), grade))
    if row is None or abs(row.nominal - nominal_d) > 0.5e-6:
        lo, hi = nearest_sizes(nominal_d, grade)
        near = " or ".join(_mm(x) for x in (lo, hi) if x is not None)
        raise NotInTable(f"{_mm(nominal_d)} is not a nominal diameter of {IEC}"
                         + (f"; the nearest standard sizes are {near}" if near else ""))
    return row


def next_larger_row(d: float, grade: int) -> EnamelRow:
    """The IEC 60317-0-1 data for a gauge size, by the next larger preferred (R20) row.

    The increases and breakdown of the row are carried to ``d`` unchanged:
    ``max_overall = d + (row.max_overall - row.nominal)``.  A ``d`` that is a
    tabulated nominal diameter gets its own row.

    Parameters
    ----------
    d : float
        Conductor diameter of the gauge size. [m]
    grade : int
        Enamel grade 1, 2 or 3.

    Returns
    -------
    row : EnamelRow
        With ``nominal = d`` and ``rule`` naming the row it was taken from.

    References
    ----------
    .. [1] IEC 60317-0-1, intermediate sizes; IS 13730 (its Indian adoption)
       tabulates SWG sizes this way, and notes for breakdown: "for intermediate
       nominal conductor diameter the value for the next largest nominal
       conductor diameter shall be taken".

    Examples
    --------
    >>> row = next_larger_row(0.3759e-3, 1)          # 28 SWG takes the 0.400 mm row
    >>> round(row.min_increase * 1e3, 3), row.breakdown, row.rule
    (0.021, 2300.0, 'next larger IEC 60317-0-1 row, 0.400 mm')
    """
    # A gauge within half a micrometre of a nominal diameter is that size (42 AWG, 63.5 um, is the
    # 0.063 mm row: the nearer, thinner film and lower breakdown); otherwise the next larger R20 row.
    near = [x for x in iec_nominals() if abs(x - d) <= 0.5e-6 + 1e-12]
    same = bool(near)
    if same and abs(near[0] - d) < 1e-12 and (_um(d), grade) in iec_table():
        return iec_table()[(_um(d), grade)]
    up = near[:1] if same else [x for x in iec_nominals(("R20",)) if x > d]
    if not up:
        raise NotInTable(f"{_mm(d)} is larger than the largest {IEC} row here "
                         f"({_mm(iec_nominals()[-1])})")
    row = iec_table().get((_um(up[0]), grade))
    if row is None:
        raise NotInTable(f"{IEC} defines no grade {grade} at {_mm(up[0])}, the row for {_mm(d)}")
    max_overall = None if row.max_overall is None else d + (row.max_overall - row.nominal)
    rule = f"{IEC} row {_mm(row.nominal)}, the same size" if same else f"next larger {IEC} row, {_mm(row.nominal)}"
    return EnamelRow(IEC, d, grade, row.min_increase, max_overall, row.breakdown, row.test, row.series,
                     row.sources, rule=rule)


def nema_row(awg: int, grade: int) -> EnamelRow:
    """The NEMA MW 1000 build of an AWG size: what the stored table gives, ``None`` for the rest.

    Parameters
    ----------
    awg : int
        AWG number. [-]
    grade : int
        1, 2, 3 for single, heavy, triple build.

    Returns
    -------
    row : EnamelRow

    References
    ----------
    .. [1] NEMA MW 1000, Magnet Wire, Part 2 (round film-insulated copper), as
       tabulated in a maker's catalogue; see ``windsheet/data/nema_mw1000_copper.csv``.

    Examples
    --------
    >>> row = nema_row(30, 1)
    >>> round(row.max_overall / 25.4e-6, 1), row.missing()
    (11.2, ['minimum breakdown voltage'])
    """
    t = nema_table()
    if awg not in t["bare"]:
        raise NotInTable(f"the stored {NEMA} table covers {min(t['bare'])} to {max(t['bare'])} AWG; got {awg} AWG")
    row = t["rows"].get((awg, grade))
    if row is None:
        return EnamelRow(NEMA, t["bare"][awg][0], grade, test="twisted pair", series=f"{awg} AWG",
                         sources={"nominal": t["bare"][awg][1]})
    return row


# ---------------------------------------------------------------- sizes as people write them
_AWG = re.compile(r"^\s*(\d{1,2}|0{1,4}|[1-4]/0)\s*AWG\s*$", re.IGNORECASE)
_SWG = re.compile(r"^\s*(\d{1,2})\s*SWG\s*$", re.IGNORECASE)


def _awg_number(text: str) -> int:
    if "/" in text:
        return 1 - int(text.split("/")[0])
    if set(text) == {"0"} and len(text) > 1:
        return 1 - len(text)
    return int(text)


@dataclass(frozen=True)
class Size:
    """A wire size as ordered: gauge system, its number, and the conductor diameter. [m]"""

    system: str          # "metric" | "AWG" | "SWG"
    number: int | None
    diameter: float
    text: str

    @property
    def label(self) -> str:
        if self.system == "metric":
            return _mm(self.diameter)
        return f"{self.text} ({self.diameter * 1e3:.4f} mm)"


def parse_gauge(text: str) -> Size | None:
    """``'28 SWG'`` or ``'22 AWG'`` as a :class:`Size`; ``None`` if ``text`` is not a gauge.

    Parameters
    ----------
    text : str
        The size as written in the order: ``"22 AWG"``, ``"4/0 AWG"``, ``"0000 AWG"``, ``"28 SWG"``.

    Returns
    -------
    size : Size or None
        Gauge system, number (4/0 AWG is -3) and diameter [m].

    Raises
    ------
    NotInTable
        An AWG number outside 4/0–46 or an SWG number outside the table.

    References
    ----------
    .. [1] ASTM B258 (AWG diameters), see :func:`awg_diameter`.
    .. [2] Imperial Standard Wire Gauge (1883), see :func:`swg_diameter`.

    Examples
    --------
    >>> s = parse_gauge("4/0 AWG")            # ASTM B258: 4/0 AWG = 0.4600 in = 11.684 mm
    >>> s.system, s.number, round(s.diameter * 1e3, 3)
    ('AWG', -3, 11.684)
    >>> parse_gauge("28 swg").label, parse_gauge("0.5 mm")
    ('28 SWG (0.3759 mm)', None)
    """
    m = _AWG.match(text)
    if m:
        n = _awg_number(m.group(1))
        if not -3 <= n <= 46:
            raise NotInTable(f"AWG sizes run from 4/0 to 46; got {text.strip()!r}")
        return Size("AWG", n, awg_nominal_diameter(n)[0], f"{m.group(1)} AWG")
    m = _SWG.match(text)
    if m:
        n = int(m.group(1))
        return Size("SWG", n, swg_diameter(n), f"{n} SWG")
    return None


def row_for(size: Size, grade: int, standard: str = IEC) -> EnamelRow:
    """The table row a size takes under ``standard`` (see the module's rules).

    Parameters
    ----------
    size : Size
        The size as ordered; its diameter in [m].
    grade : int
        Enamel grade (or NEMA build) 1, 2 or 3. [-]
    standard : str
        :data:`IEC` or :data:`NEMA`.

    Returns
    -------
    row : EnamelRow
        A metric size's own IEC row, a gauge size's next larger IEC row, or an
        AWG size's NEMA row; values in [m] and [V].

    Raises
    ------
    NotInTable
        No row covers the size (a metric size that is not a nominal
        diameter, or a non-AWG size under NEMA).

    References
    ----------
    .. [1] IEC 60317-0-1, intermediate sizes take the next larger row (IS 13730 table notes).
    .. [2] NEMA MW 1000, Part 2, as tabulated in a maker's catalogue.

    Examples
    --------
    >>> row_for(parse_gauge("28 SWG"), 1).rule          # 0.3759 mm lies between 0.355 and 0.400 mm
    'next larger IEC 60317-0-1 row, 0.400 mm'
    >>> round(row_for(parse_gauge("30 AWG"), 1, NEMA).max_overall / 25.4e-6, 1)   # NEMA row: 11.2 mil
    11.2
    """
    if standard == NEMA:
        if size.system != "AWG":
            raise NotInTable(f"{NEMA} tabulates AWG sizes only; {size.text} is {size.system}")
        return nema_row(size.number, grade)
    if size.system == "metric":
        return iec_row(size.diameter, grade)
    return next_larger_row(size.diameter, grade)


def listing(standard: str | None = None, grade: int | None = None, lo: float = 0.0,
            hi: float = math.inf) -> list[EnamelRow]:
    """Rows of the tables, filtered by standard, grade and nominal diameter range [m].

    Parameters
    ----------
    standard : str or None
        :data:`IEC`, :data:`NEMA`, or ``None`` for both.
    grade : int or None
        Enamel grade 1, 2 or 3; ``None`` for all. [-]
    lo, hi : float
        Nominal conductor diameter range, inclusive (±0.5 µm). [m]

    Returns
    -------
    rows : list of EnamelRow
        Sorted by standard, nominal diameter, grade.

    References
    ----------
    As :func:`iec_table` and :func:`nema_table`.

    Examples
    --------
    >>> [round(r.nominal * 1e3, 3) for r in listing(IEC, 2, 0.45e-3, 0.50e-3)]   # R20, R40, R20
    [0.45, 0.475, 0.5]
    """
    out = []
    if standard in (None, IEC):
        out += [r for r in iec_table().values()]
    if standard in (None, NEMA):
        out += [r for r in nema_table()["rows"].values()]
    out = [r for r in out if (grade is None or r.grade == grade) and lo - 0.5e-6 <= r.nominal <= hi + 0.5e-6]
    return sorted(out, key=lambda r: (r.standard, r.nominal, r.grade))


_SURENESS_ORDER = ("memory", "computed", "seen")


def row_record(row: EnamelRow) -> dict:
    """A row as plain JSON-ready data (SI units), with each value's source and sureness.

    Parameters
    ----------
    row : EnamelRow
        A table row.

    Returns
    -------
    record : dict
        ``nominal_diameter_m``, ``min_increase_m``, ``min_overall_diameter_m``,
        ``max_overall_diameter_m`` [m], ``min_breakdown_V`` [V], the test,
        the rule, ``least_sure`` (``memory`` < ``computed`` < ``seen``) and
        ``sources``.

    References
    ----------
    As the row's own ``sources``.

    Examples
    --------
    IEC 60317-0-1 table row 0.500 mm grade 2: 0.500 + 0.045 = 0.545 mm minimum overall.

    >>> rec = row_record(iec_row(0.500e-3, 2))
    >>> round(rec["min_overall_diameter_m"] * 1e3, 3), rec["min_breakdown_V"], rec["least_sure"]
    (0.545, 4600.0, 'computed')
    """
    sure = [s for _src, s in row.sources.values()]
    return {"standard": row.standard, "nominal_diameter_m": row.nominal, "series": row.series,
            "grade": row.grade, "min_increase_m": row.min_increase, "min_overall_diameter_m": row.min_overall,
            "max_overall_diameter_m": row.max_overall, "min_breakdown_V": row.breakdown,
            "breakdown_test": row.test or None, "rule": row.rule or None,
            "least_sure": min(sure, key=_SURENESS_ORDER.index) if sure else None,
            "sources": {q: {"source": src, "sureness": s} for q, (src, s) in row.sources.items()}}


