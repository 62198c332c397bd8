"""Insulation between windings: clearance, creepage and solid insulation per IEC 60664-1.

The tables live in ``windsheet/physics/data/iec60664_1_*.csv``, each row with its
source and how sure it is (seen in a stored copy, or from memory).  This module
only looks rows up, always on the safe side: a voltage between two rows takes the
higher row (the standard permits interpolation; windsheet does not rely on it).

These are the generic rules of the basic safety publication.  A product standard
(for small transformers IEC 61558-1 and its parts) sets its own distances and test
voltages, and it governs; a licensed assessor decides compliance.
"""

from __future__ import annotations

import csv
from functools import lru_cache
from importlib import resources

#: Preferred series of rated impulse voltages (IEC 60664-1, 4.2.3). [V]
IMPULSE_SERIES_V = (330.0, 500.0, 800.0, 1500.0, 2500.0, 4000.0, 6000.0, 8000.0, 12000.0)

#: Overvoltage categories in the order of Table F.1's columns.
OVERVOLTAGE_CATEGORIES = ("I", "II", "III", "IV")

#: Insulating materials by comparative tracking index (IEC 60664-1, 4.8.1.3).
MATERIAL_GROUPS = ("I", "II", "IIIa", "IIIb")

BARRIER_CLASSES = ("functional", "basic", "supplementary", "reinforced")


def _rows(name):
    with resources.files("windsheet.physics").joinpath("data", name).open(encoding="utf-8") as fh:
        return list(csv.DictReader(fh))


@lru_cache(maxsize=None)
def _impulse_table():
    return [(float(r["line_to_neutral_up_to_V"]), [float(r[f"ovc_{c}_V"]) for c in OVERVOLTAGE_CATEGORIES])
            for r in _rows("iec60664_1_impulse.csv")]


@lru_cache(maxsize=None)
def _clearance_table():
    return [(float(r["impulse_withstand_kV"]) * 1e3, [float(r[f"pd{p}_mm"]) * 1e-3 for p in (1, 2, 3)])
            for r in _rows("iec60664_1_clearance.csv")]


@lru_cache(maxsize=None)
def _creepage_table():
    out = []
    for r in _rows("iec60664_1_creepage.csv"):
        pd1 = float(r["pd1_mm"]) * 1e-3
        pd2 = [float(r[f"pd2_group_{g}_mm"]) * 1e-3 for g in ("I", "II", "III")]
        pd3 = [float(r[f"pd3_group_{g}_mm"]) * 1e-3 for g in ("I", "II", "III")]
        out.append((float(r["working_voltage_rms_V"]), pd1, pd2, pd3))
    return out


def rated_impulse_voltage(line_to_neutral_V, category="II"):
    """Rated impulse voltage of equipment fed from the low-voltage mains.

    Parameters
    ----------
    line_to_neutral_V : float
        Line-to-neutral voltage derived from the nominal system voltage (rms,
        or d.c.); the next higher row of the table is taken. [V]
    category : {"I", "II", "III", "IV"}
        Overvoltage category (II: appliances fed from the fixed installation).

    Returns
    -------
    U_imp : float
        Rated impulse voltage, 1.2/50 µs peak. [V]

    References
    ----------
    .. [1] IEC 60664-1, Insulation coordination for equipment within low-voltage
       systems, Table F.1.

    Examples
    --------
    A 230 V mains appliance (300 V row), overvoltage category II:

    >>> rated_impulse_voltage(230.0, "II")
    2500.0
    """
    col = OVERVOLTAGE_CATEGORIES.index(str(category).upper())
    for up_to, values in _impulse_table():
        if line_to_neutral_V <= up_to + 1e-9:
            return values[col]
    raise ValueError(f"{line_to_neutral_V:g} V is above the 1000 V the table covers")


def next_impulse_step(impulse_V):
    """The next value of the preferred impulse series above ``impulse_V``: reinforced insulation's clearance.

    Parameters
    ----------
    impulse_V : float
        A rated impulse voltage. [V]

    Returns
    -------
    U : float
        The next preferred value (IEC 60664-1, 5.1.6: reinforced insulation is
        dimensioned for the impulse one step higher). [V]

    References
    ----------
    .. [1] IEC 60664-1, 4.2.3 (preferred series) and 5.1.6 (memory for the clause).

    Examples
    --------
    >>> next_impulse_step(2500.0)
    4000.0
    """
    for v in IMPULSE_SERIES_V:
        if v > impulse_V + 1e-9:
            return v
    return 1.6 * impulse_V


def clearance(impulse_V, pollution_degree=2):
    """Minimum clearance in air (case A, inhomogeneous field, up to 2000 m).

    Parameters
    ----------
    impulse_V : float
        Impulse withstand voltage the clearance must hold; the next higher row
        is taken. [V]
    pollution_degree : {1, 2, 3}

    Returns
    -------
    d : float
        Minimum clearance. [m]

    References
    ----------
    .. [1] IEC 60664-1, Table F.2, case A.

    Examples
    --------
    2.5 kV at pollution degree 2, and 4 kV (reinforced at 230 V, category II):

    >>> round(clearance(2500.0) * 1e3, 2), round(clearance(4000.0) * 1e3, 2)
    (1.5, 3.0)
    """
    col = (1, 2, 3).index(int(pollution_degree))
    for up_to, values in _clearance_table():
        if impulse_V <= up_to + 1e-9:
            return values[col]
    raise ValueError(f"{impulse_V:g} V is above the table's 100 kV")


def creepage(working_V, pollution_degree=2, material_group="IIIa"):
    """Minimum creepage distance to avoid failure by tracking (basic insulation).

    Parameters
    ----------
    working_V : float
        Working voltage across the insulation, rms (or d.c.); the next higher
        row is taken. [V]
    pollution_degree : {1, 2, 3}
    material_group : {"I", "II", "IIIa", "IIIb"}
        The insulating surface's material group by its CTI; "IIIa" and "IIIb"
        use the group III column. Unknown material: take IIIb.

    Returns
    -------
    d : float
        Minimum creepage distance. [m]

    References
    ----------
    .. [1] IEC 60664-1, Table F.4 (2007 numbering).

    Examples
    --------
    250 V across a bobbin of material group IIIa at pollution degree 2:

    >>> round(creepage(250.0, 2, "IIIa") * 1e3, 2)
    2.5
    """
    group = {"I": 0, "II": 1, "IIIA": 2, "IIIB": 2, "III": 2}[str(material_group).upper()]
    pd = int(pollution_degree)
    for up_to, pd1, pd2, pd3 in _creepage_table():
        if working_V <= up_to + 1e-9:
            return pd1 if pd == 1 else (pd2 if pd == 2 else pd3)[group]
    raise ValueError(f"{working_V:g} V is above the 2000 V the table rows carried here cover")


def barrier_distances(barrier, working_V, impulse_V, pollution_degree=2, material_group="IIIa"):
    """Clearance and creepage a barrier between windings needs.

    Functional, basic and supplementary insulation take the tables' values;
    reinforced insulation takes the clearance of the next impulse step and
    twice the basic creepage.

    Parameters
    ----------
    barrier : {"functional", "basic", "supplementary", "reinforced"}
    working_V : float
        Working voltage across the barrier, rms. [V]
    impulse_V : float
        Rated impulse voltage of the circuit the barrier protects. [V]
    pollution_degree : {1, 2, 3}
    material_group : {"I", "II", "IIIa", "IIIb"}

    Returns
    -------
    clearance_m, creepage_m : float
        The minimum distances. [m]

    References
    ----------
    .. [1] IEC 60664-1, 5.1.6 and 5.2.5 (reinforced insulation; memory for the
       clause numbers), Tables F.2 and F.4.

    Examples
    --------
    Reinforced insulation of a 230 V mains winding (category II, 2.5 kV) to a
    safety extra-low-voltage winding, pollution degree 2, group IIIa:

    >>> c, s = barrier_distances("reinforced", 230.0, 2500.0)
    >>> round(c * 1e3, 2), round(s * 1e3, 2)
    (3.0, 5.0)
    """
    if barrier not in BARRIER_CLASSES:
        raise ValueError(f"barrier must be one of {', '.join(BARRIER_CLASSES)}")
    if barrier == "reinforced":
        return (clearance(next_impulse_step(impulse_V), pollution_degree),
                2.0 * creepage(working_V, pollution_degree, material_group))
    return clearance(impulse_V, pollution_degree), creepage(working_V, pollution_degree, material_group)


def barrier_test_voltage(barrier, working_V):
    """A.C. withstand (hipot) test voltage of a barrier, a labelled default.

    Basic, supplementary and functional: 2U + 1000 V for 1 min; reinforced:
    twice that.  Common practice for wound components (memory); the product
    standard (for transformers IEC 61558-1) tabulates its own values, and they
    govern.

    Parameters
    ----------
    barrier : {"functional", "basic", "supplementary", "reinforced"}
    working_V : float
        Working voltage across the barrier, rms. [V]

    Returns
    -------
    U_test : float
        Test voltage, rms. [V]

    Examples
    --------
    >>> barrier_test_voltage("basic", 230.0), barrier_test_voltage("reinforced", 230.0)
    (1460.0, 2920.0)
    """
    basic = 2.0 * abs(float(working_V)) + 1000.0
    return 2.0 * basic if barrier == "reinforced" else basic


def thin_sheet_layers_ok(barrier, layer_rating_V, layers, test_V, triple_insulated=False):
    """Whether layers of insulating tape (thin sheet) make the barrier.

    Common practice for thin-sheet insulation (memory; the rule of IEC 62368-1
    and IEC 61558-1 for thin sheets): basic or supplementary insulation needs
    one layer that withstands the test voltage, or two that do together;
    reinforced insulation needs three layers of which any two withstand it,
    or two that each withstand it.  Triple-insulated wire on one side makes the
    barrier on its own (its own standard's type test).

    Parameters
    ----------
    barrier : {"functional", "basic", "supplementary", "reinforced"}
    layer_rating_V : float or None
        Withstand voltage of one layer of the tape. [V]
    layers : int
        Layers (wraps) of tape between the windings.
    test_V : float
        The barrier's test voltage. [V]
    triple_insulated : bool
        A winding on one side is triple-insulated wire.

    Returns
    -------
    ok : bool

    Examples
    --------
    Three wraps of 1.5 kV tape against a 2.92 kV reinforced test; two are not enough:

    >>> thin_sheet_layers_ok("reinforced", 1500.0, 3, 2920.0), thin_sheet_layers_ok("reinforced", 1500.0, 2, 2920.0)
    (True, False)
    """
    if triple_insulated or barrier == "functional":
        return True
    if not layer_rating_V or layers < 1:
        return False
    if barrier == "reinforced":
        return (layers >= 3 and 2 * layer_rating_V >= test_V) or (layers >= 2 and layer_rating_V >= test_V)
    return layer_rating_V >= test_V or (layers >= 2 and 2 * layer_rating_V >= test_V)
