"""Capacitance per unit length between conductors of adjacent layers, and what the layers take of a row's.

Pure functions on SI numbers: Massarini & Kazimierczuk's flux tubes through
enamel, air and tape in series over a contact's cell and the arcs beside it,
series plates at Dowell's equivalent-strip faces, and the share of two
neighbours' field in a row that the layers beside it take.
:mod:`windsheet.physics.capacitance` assigns them to the neighbour pairs of a
winding.
"""

from __future__ import annotations

import math

import numpy as np

from .constants import EPSILON_0 as EPS0
from .conductor_capacitance import (CELL_HALF_ANGLE, ENAMEL_EPS_R, TAPE_EPS_R, enamel_log_ratio,
                                    turn_to_turn_capacitance_per_length)


def flux_tube_capacitance_per_length(copper_diameter, overall_diameter, half_angle,
                                     eps_r=ENAMEL_EPS_R, solid=0.0, solid_eps_r=TAPE_EPS_R,
                                     air_gap=0.0):
    """Capacitance per length of one contact between two enamelled round wires,
    flux tubes through enamel, air (and any tape) in series.

    Massarini & Kazimierczuk's elementary flux tubes: at angle θ from the
    line of centres a tube of width ``R dθ`` crosses both enamel films
    (coaxial, ``2 ln(R/r)/(ε0 εr)`` per radian), the air between the
    surfaces, ``2R(1 − cos θ)`` long, and any layer of uniform thickness in
    between (tape ``τ`` at ``εt``, or a further air gap ``g``).  Taken in
    series and integrated over the cell ``|θ| < θc``:

    ``C' = ε0 · 2/√(a² − 1) · atan(√((a + 1)/(a − 1)) · tan(θc/2))``,
    ``a = 1 + ln(R/r)/εr + (τ/εt + g)/(2R)``.

    Parameters
    ----------
    copper_diameter, overall_diameter : float
        Bare diameter ``2r`` and diameter over the enamel ``2R``. [m]
    half_angle : float
        Half-angle ``θc`` of the cell: half the angle to the next contact
        round the wire (:data:`CELL_HALF_ANGLE`). [rad]
    eps_r : float
        Relative permittivity of the enamel. [-]
    solid, solid_eps_r : float
        Thickness and permittivity of a sheet between the wires (layer tape). [m], [-]
    air_gap : float
        Distance between the surfaces (or between a surface and the tape)
        beyond touching. [m]

    Returns
    -------
    C' : float
        Capacitance per length of the contact. [F/m]

    Notes
    -----
    Against a 2-D finite-difference field solution of periodic layers
    (tests/test_capacitance.py): stacked layers, cell ±45°, 7 % low; nested,
    two contacts of ±30° each, 4–5 % low (computed; 0.45 mm copper, 0.50 mm
    overall, εr 3.5).  The series integral is what the piecewise cell of
    :func:`turn_to_turn_capacitance_per_length` bounds from above.

    References
    ----------
    .. [1] A. Massarini, M. K. Kazimierczuk, "Self-capacitance of inductors",
       IEEE Trans. Power Electronics 12(4):671, 1997 (flux-tube cell; the
       series form and the cell half-angles derived here).
    .. [2] ∫dθ/(a − cos θ), standard integral (e.g. Gradshteyn & Ryzhik 2.553.3, memory).

    Examples
    --------
    >>> c = flux_tube_capacitance_per_length(0.45e-3, 0.50e-3, math.pi / 4)
    >>> round(c * 1e12, 1)     # pF/m, one stacked contact
    92.0
    """
    R = overall_diameter / 2.0
    a = (1.0 + float(enamel_log_ratio(copper_diameter, overall_diameter)) / eps_r
         + (solid / solid_eps_r + air_gap) / (2.0 * R))
    root = math.sqrt(a * a - 1.0)
    return EPS0 * 2.0 / root * math.atan(math.sqrt((a + 1.0) / (a - 1.0)) * math.tan(half_angle / 2.0))


def layer_plate_capacitance_per_length(copper_diameter, overall_diameter, layer_step, width,
                                       eps_r=ENAMEL_EPS_R, tape=0.0, tape_eps_r=TAPE_EPS_R):
    """Capacitance per length between one conductor and the layer facing it, as plates.

    Each layer becomes a plate at the face of Dowell's equal-area square
    conductor (side ``d·√π/2``); between the faces lie the two enamel films
    (``2t``), the tape and air, in series:
    ``C' = ε0 w / (2t/εr + τ/εt + air)``, ``air = step − d√π/2 − 2t − τ``.

    Parameters
    ----------
    copper_diameter, overall_diameter : float
        Bare and overall wire diameter. [m]
    layer_step : float
        Radial distance between the two layers' conductor centres. [m]
    width : float
        Axial room of one conductor in its layer. [m]
    eps_r, tape_eps_r : float
        Relative permittivity of enamel and tape. [-]
    tape : float
        Layer tape thickness. [m]

    Returns
    -------
    C' : float
        Capacitance per length of the conductor to the layer beside it. [F/m]

    Notes
    -----
    Right where a thick tape makes the field uniform (within 3 % of the 2-D
    field solution for 0.2–0.5 mm tape on 0.5 mm wire, computed); low for
    thin or no tape, where the field crowds into the contacts.  Use the larger
    of this and :func:`flux_tube_capacitance_per_length`.

    References
    ----------
    .. [1] P. L. Dowell, "Effects of eddy currents in transformer windings",
       Proc. IEE 113(8):1387, 1966 (equal-area square conductor).
    .. [2] Series plane dielectrics, standard electrostatics.

    Examples
    --------
    >>> round(layer_plate_capacitance_per_length(0.45e-3, 0.5e-3, 1.0e-3, 0.5e-3, tape=0.5e-3) * 1e12, 1)
    20.0
    """
    t = (overall_diameter - copper_diameter) / 2.0
    face = copper_diameter * math.sqrt(math.pi) / 2.0
    air = max(layer_step - face - 2.0 * t - tape, 0.0)
    return EPS0 * width / (2.0 * t / eps_r + tape / tape_eps_r + air)


#: Weight of the tubes that leave a wire between its contact's cell and the direction of its
#: neighbour in the same layer (windsheet's own rule, derived; see
#: :func:`layer_cell_capacitance_per_length`).
SHARED_ARC_WEIGHT = 0.5
#: Per contact with the next layer, the arcs of a wire's surface [rad, from the line of centres]:
#: its own cell (both sides) and the arc beyond it up to the neighbour in the same layer, on the
#: sides where that arc lies.  Stacked: ±45° own, 45°–90° on both sides; nested: ±30° own, 30°–60°
#: on the side away from the other contact (60°–90° from the vertical).
LAYER_ARCS = {"stacked": (math.pi / 4, math.pi / 2, 2), "nested": (math.pi / 6, math.pi / 3, 1)}


def _tube_angle_integral(a, theta):
    """∫₀^θ dθ / (a − cos θ), a > 1 (Gradshteyn & Ryzhik 2.553.3, memory)."""
    root = math.sqrt(a * a - 1.0)
    return 2.0 / root * math.atan(math.sqrt((a + 1.0) / (a - 1.0)) * math.tan(theta / 2.0))


def layer_cell_capacitance_per_length(copper_diameter, overall_diameter, layer_style,
                                      eps_r=ENAMEL_EPS_R, solid=0.0, solid_eps_r=TAPE_EPS_R,
                                      arc_weight=SHARED_ARC_WEIGHT):
    """Capacitance per length of one contact between conductors of adjacent layers, by flux tubes
    that take in the cavities between a layer's turns.

    Massarini & Kazimierczuk's tubes (enamel, air and any tape in series, as in
    :func:`flux_tube_capacitance_per_length`) over the contact's own cell, ``|θ| < θc``, plus
    half the tubes of the arc from ``θc`` to the direction of the wire's neighbour in its own
    layer, ``θn``:

    ``C' = ε0 [F(θc) + w · (m/2) · (F(θn) − F(θc))]``,  ``F(θ) = ∫₀^θ dθ/(a − cos θ)``,

    with ``a`` as in :func:`flux_tube_capacitance_per_length` and ``m`` the sides on which the
    arc lies (stacked: ``θc = 45°``, ``θn = 90°``, both sides; nested: ``θc = 30°``,
    ``θn = 60°``, the side away from the other contact), ``w = ½`` between touching turns.

    Parameters
    ----------
    copper_diameter, overall_diameter : float
        Bare diameter ``2r`` and diameter over the enamel ``2R``. [m]
    layer_style : str
        ``"nested"`` (each turn rests on two below: count two contacts) or ``"stacked"`` (one).
    eps_r : float
        Relative permittivity of the enamel. [-]
    solid, solid_eps_r : float
        Thickness and relative permittivity of the layer tape between the layers. [m], [-]
    arc_weight : float
        Share ``w`` of the arc's tubes that reach the other layer: ½ between touching turns
        (:data:`SHARED_ARC_WEIGHT`), 1 between spaced turns, where no cusp holds the field
        back. [-]

    Returns
    -------
    C' : float
        Capacitance per length of one contact. [F/m]

    Notes
    -----
    Why the arc beyond the cell.  Massarini & Kazimierczuk end each contact's cell half way
    to the next contact round the wire, which is right when every neighbour takes its share
    of the field.  Between layers the neighbours in the same layer are at (nearly) the same
    potential and take almost none: the surface that faces them sends its field down into
    the cavity between the other layer's turns.  Leaving that arc out (the cell alone)
    understates the layer's capacitance, 3–14 % against a 2-D field solution; taking its
    straight tubes whole overstates it by 5–10 %, since the cusp where two turns of one layer
    meet holds almost no field.  Half the arc's tubes (windsheet's own rule, the mid-point
    of those two bounds) reads within 2.2 % of the field solution of two periodic layers
    over 0.315–1.016 mm copper, grades 1–3, nested and stacked, tape 0–0.2 mm
    (tests/test_capacitance.py, tests/test_winding_field.py).

    References
    ----------
    .. [1] A. Massarini, M. K. Kazimierczuk, "Self-capacitance of inductors",
       IEEE Trans. Power Electronics 12(4):671, 1997 (flux-tube cell; the series
       form, the cell angles and the shared arc derived here).
    .. [2] ∫dθ/(a − cos θ), standard integral (e.g. Gradshteyn & Ryzhik 2.553.3, memory).

    Examples
    --------
    >>> round(layer_cell_capacitance_per_length(0.45e-3, 0.50e-3, "stacked") * 1e12, 1)   # pF/m
    97.9
    >>> round(2 * layer_cell_capacitance_per_length(0.45e-3, 0.50e-3, "nested") * 1e12, 1)
    171.8
    """
    own, neighbour, sides = LAYER_ARCS[layer_style]
    R = overall_diameter / 2.0
    a = (1.0 + float(enamel_log_ratio(copper_diameter, overall_diameter)) / eps_r
         + solid / solid_eps_r / (2.0 * R))
    f_own, f_next = _tube_angle_integral(a, own), _tube_angle_integral(a, neighbour)
    return EPS0 * (f_own + arc_weight * 0.5 * sides * (f_next - f_own))


def side_factor_beside_layers(copper_diameter, overall_diameter, layers_beside, layer_style="nested",
                              eps_r=ENAMEL_EPS_R):
    """What remains of two neighbouring turns' capacitance in their row when layers lie along it.

    Massarini & Kazimierczuk's touching-turn value (:func:`turn_to_turn_capacitance_per_length`)
    is kept for a lone row (a single layer).  In a layer winding the pair is taken by the same flux
    tubes in series as the layers (:func:`layer_cell_capacitance_per_length`): on a side where a
    layer lies, its own cell to ``θc`` (the layer's turns take the rest); on an open side (the
    top of the outer layer, the bottom of the inner one), out to 90°:

    ``C' = ε0 [(2 − n) F(90°) + n F(θc)] / 2``,

    ``n`` the layers beside the row (0–2), ``θc`` the cell's half-angle in the winding's packing
    (:data:`CELL_HALF_ANGLE`: 30° nested, 45° stacked).  Returned as a factor on the touching-turn
    value, and applied to spaced neighbours in the row too.

    Parameters
    ----------
    copper_diameter, overall_diameter : float
        Bare and overall wire diameter. [m]
    layers_beside : int or ndarray of int
        Layers lying along the row: 0 (a single layer), 1 (the inner or outer layer) or 2. [-]
    layer_style : str
        ``"nested"`` or ``"stacked"``: how the layers pack.
    eps_r : float
        Relative permittivity of the enamel. [-]

    Returns
    -------
    factor : float or ndarray
        ``C'`` over the touching-turn value; 1 with no layer beside. [-]

    Notes
    -----
    Checked on bifilar layers against a 2-D field solution of the whole cross-section
    (tests/test_winding_field.py): with the touching-turn value kept, two-layer bifilar windings
    read 9–10 % high.  A lone row of touching bifilar turns reads 4 % above the field with it.

    References
    ----------
    .. [1] A. Massarini, M. K. Kazimierczuk, IEEE Trans. Power Electronics 12(4):671, 1997
       (flux tubes; the sides' cells derived here).

    Examples
    --------
    >>> [round(float(f), 3) for f in side_factor_beside_layers(0.315e-3, 0.349e-3, np.array([0, 1, 2]))]
    [1.0, 0.836, 0.739]
    """
    a = 1.0 + float(enamel_log_ratio(copper_diameter, overall_diameter)) / eps_r
    open_side = _tube_angle_integral(a, math.pi / 2)
    layer_side = _tube_angle_integral(a, CELL_HALF_ANGLE[layer_style])
    n = np.asarray(layers_beside)
    tubes = EPS0 * 0.5 * ((2 - n) * open_side + n * layer_side)
    factor = tubes / turn_to_turn_capacitance_per_length(copper_diameter, overall_diameter, eps_r)
    return np.where(n > 0, factor, 1.0)


def layer_pair_capacitance_per_length(copper_diameter, overall_diameter, layer_style, layer_step,
                                      width, eps_r=ENAMEL_EPS_R, tape=0.0, tape_eps_r=TAPE_EPS_R):
    """Capacitance per length of one facing pair of conductors in adjacent layers.

    Nested layers: each upper conductor rests on two below, each contact a
    flux-tube cell of ±30° with half the arc beyond it to the neighbour in the
    layer (:func:`layer_cell_capacitance_per_length`).  Stacked layers: one
    contact directly over, a cell of ±45° and half the arcs to 90° (all of
    them between spaced turns), through enamel, air and tape in series, or the
    plates of :func:`layer_plate_capacitance_per_length` over the conductor's
    room in its layer but no wider than the layers' centres are apart (the
    field between spaced turns is not uniform), whichever is larger (each
    leaves out flux the other holds, so the larger is the nearer).

    Parameters
    ----------
    copper_diameter, overall_diameter : float
        Bare and overall wire diameter. [m]
    layer_style : str
        ``"nested"`` or ``"stacked"``.
    layer_step : float
        Radial distance between layer centres. [m]
    width : float
        Axial room of one conductor in its layer. [m]
    eps_r, tape_eps_r : float
        Relative permittivity of enamel and tape. [-]
    tape : float
        Layer tape thickness. [m]

    Returns
    -------
    C' : float
        Capacitance per length of one facing pair. [F/m]

    References
    ----------
    See :func:`layer_cell_capacitance_per_length` and
    :func:`layer_plate_capacitance_per_length`.

    Examples
    --------
    >>> round(layer_pair_capacitance_per_length(0.45e-3, 0.5e-3, "nested", 0.433e-3, 0.5e-3) * 1e12, 1)
    85.9
    """
    if layer_style == "nested":
        return layer_cell_capacitance_per_length(copper_diameter, overall_diameter, "nested", eps_r)
    spaced = width > overall_diameter * (1.0 + 1e-6)
    cell = layer_cell_capacitance_per_length(copper_diameter, overall_diameter, "stacked", eps_r,
                                             tape, tape_eps_r, 1.0 if spaced else SHARED_ARC_WEIGHT)
    # The field is uniform across a plate no wider than the layers are apart (centre to centre).
    plate = layer_plate_capacitance_per_length(copper_diameter, overall_diameter, layer_step,
                                               min(width, layer_step), eps_r, tape, tape_eps_r)
    return max(cell, plate)
