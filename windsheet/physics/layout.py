"""Winding layout: where every turn of every strand sits.

Pure geometry on SI numbers.  Strands are wound side by side, A, B, … in each
pitch slot, touching (or, asked for, evenly spread across the pitch); layers are
wound back and forth (layer 1 returns over layer 0).  Untaped close-wound
layers nest: each upper turn lies in the groove between two turns below,
half a conductor spacing along and ``d·√3/2`` out.  Taped (or spaced) layers
stack, one wire diameter plus the tape apart.  A winding that does not fit
raises :class:`WindingDoesNotFit` saying by how much.

Coordinates
-----------
``r`` is the radius of the turn's centre about the coil axis (cylinder,
bobbin) or, on a toroid, the distance of the conductor from the inner wall
measured inwards (for neighbour finding only; toroid inductance does not use
it).  ``z`` is the axial position of the turn's centre from the start of the
traverse; on a toroid, the arc position along the inner circumference.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

#: Multilayer bulge allowance on build height (common practice: about 10 %).
BULGE_ALLOWANCE = 1.10
LAYER_STYLES = ("nested", "stacked")
#: How the strands of one slot sit: touching side by side, or spread evenly over the pitch.
STRAND_SPACINGS = ("together", "even")
#: Angle left free between start and finish on a toroid (common practice: 20–30°).
TOROID_GAP_DEG = 30.0


#: Most layers laid out when the order says ``layers: auto``, the same bound as
#: an explicit layer count; beyond it the engine's work grows as layers squared.
MAX_LAYERS = 200


class WindingDoesNotFit(ValueError):
    """The turns asked for do not fit on the form; the message says by how much."""


class FormTooSmall(WindingDoesNotFit):
    """The wire cannot go on (or through) the form at all, whatever the turns."""


@dataclass(frozen=True)
class Layout:
    """Every turn of a winding, as parallel arrays (one entry per turn).

    Attributes
    ----------
    kind : str
        ``"cylinder"``, ``"toroid"`` or ``"bobbin"``.
    r, z : ndarray
        Turn-centre radius and axial (or arc) position. [m]
    layer, slot, strand, index : ndarray of int
        Layer (0 = innermost), slot within the layer (0 at the start end),
        strand (0 = A), and the turn's number along its strand in winding
        order (0 = the start).
    turn_length : ndarray
        Length of wire in each turn. [m]
    pitch : float
        Axial advance per slot, i.e. per turn of one strand. [m]
    copper_diameter, overall_diameter : float
        Bare and insulated wire diameter. [m]
    layer_style : str
        ``"nested"`` (upper turns in the grooves below) or ``"stacked"``.
    layer_step : float
        Radial distance between the conductor centres of adjacent layers. [m]
    strand_spacing : float
        Axial distance between neighbouring strands of one slot: the overall
        diameter when together, ``pitch / strands`` when spread evenly. [m]
    """

    kind: str
    strands: int
    turns_per_strand: int
    layers: int
    slots_per_layer: int
    pitch: float
    copper_diameter: float
    overall_diameter: float
    tape: float
    r: np.ndarray
    z: np.ndarray
    layer: np.ndarray
    slot: np.ndarray
    strand: np.ndarray
    index: np.ndarray
    turn_length: np.ndarray
    turns_in_layer: tuple = ()
    build_height: float = 0.0
    traverse_used: float = 0.0
    notes: tuple = field(default_factory=tuple)
    layer_style: str = "stacked"
    layer_step: float = 0.0
    strand_spacing: float = 0.0
    # Toroids only: each turn's angle round the core from the start, in the
    # winding direction [rad], and the radius of layer 0's conductor centres
    # on the inside of the core [m].  ``None`` on coaxial windings.
    theta: np.ndarray | None = None
    ring_radius: float = 0.0
    spread: str = ""
    # Sectioned windings (windsheet.physics.section_layout): how many sections, each turn's
    # section (0 = the start's), each section's width and the wall between two [m], and
    # the layers wound in each section.  ``layer`` then counts layers in winding order
    # through the sections, so each (layer, strand) group keeps the shape groups() promises.
    sections: int = 1
    section: np.ndarray | None = None
    section_width: float = 0.0
    section_wall: float = 0.0
    layers_per_section: tuple = ()
    # Results derived from the geometry alone (the neighbour search), kept
    # with the layout so that each is computed once however often it is asked for.
    _memo: dict = field(default_factory=dict, compare=False, repr=False)

    @property
    def n_turns(self) -> int:
        return int(self.r.size)

    @property
    def radial_layers(self) -> int:
        """Layers one above another in the build: a section's, when the winding is sectioned."""
        return max(self.layers_per_section) if self.sections > 1 else self.layers

    def section_points(self) -> np.ndarray:
        """Turn centres in the plane where the turns crowd, ``(n, 2)``. [m]

        Coaxial windings: ``(r, z)``, their section through the axis.  A
        toroid: the plane through the core's mid-height, where each turn
        crosses the inside of the hole at radius ``ring_radius - r`` and its
        own angle; distances there are the true ones between the wires,
        across the start-finish gap as anywhere else.
        """
        if self.theta is None:
            return np.column_stack([self.r, self.z])
        rho = self.ring_radius - self.r
        return np.column_stack([rho * np.cos(self.theta), rho * np.sin(self.theta)])

    def strand_turns(self, s: int) -> np.ndarray:
        """Indices (into the arrays) of strand ``s``'s turns, in winding order."""
        sel = np.flatnonzero(self.strand == s)
        return sel[np.argsort(self.index[sel], kind="stable")]

    def strand_length(self) -> np.ndarray:
        """Wire in the turns of each strand, leads excluded. [m]"""
        return np.bincount(self.strand, weights=self.turn_length, minlength=self.strands)

    def groups(self):
        """Turns grouped by (layer, strand): each group shares one radius and
        sits at ``z = z0 + slot * pitch`` over a contiguous slot range.

        Yields ``(layer, strand, radius, z0, slot_lo, slot_hi)`` with
        ``slot_hi`` exclusive.  The fast inductance sum relies on this shape.
        """
        for lay in range(self.layers):
            for s in range(self.strands):
                sel = (self.layer == lay) & (self.strand == s)
                if not sel.any():
                    continue
                slots = self.slot[sel]
                lo, hi = int(slots.min()), int(slots.max()) + 1
                z0 = float(self.z[sel][0] - self.slot[sel][0] * self.pitch)
                yield lay, s, float(self.r[sel][0]), z0, lo, hi


def _layer_plan(turns: int, slots_max: int, layers, across: str = "the traverse") -> list[int]:
    """Turns per layer; full layers first, the remainder in the last.

    ``across`` names the width wound across as the order names it.
    """
    if slots_max < 1:
        raise WindingDoesNotFit(f"not even one turn fits across {across}")
    if layers in (None, "auto"):
        n_layers = math.ceil(turns / slots_max)
        per = slots_max
        if n_layers > MAX_LAYERS:
            raise WindingDoesNotFit(
                f"{turns} turns at {slots_max} per layer need {n_layers} layers, more than the "
                f"{MAX_LAYERS} windsheet lays out: short by {turns - MAX_LAYERS * slots_max} turn(s) "
                f"(give the form a max_build, more room across {across} or a finer wire)")
    else:
        n_layers = int(layers)
        per = math.ceil(turns / n_layers)
        if per > slots_max:
            raise WindingDoesNotFit(
                f"{turns} turns in {n_layers} layer(s) need {per} turns per layer, "
                f"{across} holds {slots_max}; short by {per - slots_max} turn(s) per layer"
            )
    plan = [per] * (n_layers - 1) + [turns - per * (n_layers - 1)]
    if plan[-1] <= 0:
        raise WindingDoesNotFit(
            f"{turns} turns cannot fill {n_layers} layers of {per}: use fewer layers"
        )
    return plan


def _inward_plan(turns: int, capacity, across: str) -> list[int]:
    """Turns per layer when each layer holds what its own (shrinking) circle takes, filled in turn."""
    plan, left = [], turns
    while left > 0:
        cap = capacity(len(plan))
        if cap < 1 or len(plan) >= MAX_LAYERS:
            room = sum(plan)
            raise WindingDoesNotFit(
                f"{turns} turns do not fit on {across}: {len(plan)} layer(s) building inward hold "
                f"{room}; short by {turns - room} turn(s)")
        plan.append(min(cap, left))
        left -= plan[-1]
    return plan


def _wind(plan, strands, pitch, d, r_of_layer, length_of_layer, z_shift=lambda lay: 0.0,
          spacing=None):
    """Place turns back and forth, layer by layer (vectorised, one block per layer).

    Strand ``s`` of slot ``k`` sits at ``z = k·pitch + s·spacing + d/2
    + z_shift(layer)``, so each (layer, strand) group keeps one radius and
    ``z = z0 + slot·pitch`` (the shape :meth:`Layout.groups` promises).
    """
    spacing = d if spacing is None else spacing
    blocks = []
    count = 0  # turns of each strand laid so far
    end_slot = 0  # slot where the previous layer finished
    for lay, n in enumerate(plan):
        slots = np.arange(n) if lay % 2 == 0 else end_slot - np.arange(n)
        k = np.repeat(slots, strands)
        s = np.tile(np.arange(strands), n)
        index = count + np.repeat(np.arange(n), strands)
        z = k * pitch + s * spacing + d / 2 + z_shift(lay)
        blocks.append((np.full(k.size, r_of_layer(lay)), z, np.full(k.size, lay), k, s, index,
                       np.full(k.size, length_of_layer(lay))))
        count += n
        end_slot = int(slots[-1])
    cols = [np.concatenate(c) for c in zip(*blocks)]
    return (cols[0].astype(float), cols[1].astype(float), cols[2].astype(int), cols[3].astype(int),
            cols[4].astype(int), cols[5].astype(int), cols[6].astype(float))


def _check_pitch(pitch, strands, d):
    if pitch is None:
        return strands * d
    if pitch < strands * d * (1 - 1e-9):
        raise WindingDoesNotFit(
            f"pitch {pitch * 1e3:.3f} mm is less than {strands} strand(s) x "
            f"{d * 1e3:.3f} mm overall diameter = {strands * d * 1e3:.3f} mm"
        )
    return pitch


def _strand_spacing(spacing, strands, d, pitch):
    """Distance between neighbouring strands of a slot. [m]"""
    if spacing not in (None,) + STRAND_SPACINGS:
        raise ValueError(f"strand spacing is together or even, got {spacing!r}")
    return pitch / strands if spacing == "even" else d


def _slot_width(strands, d, spacing):
    """Axial room one slot's strands take."""
    return (strands - 1) * spacing + d


def _slots_across(width, strands, d, pitch, spacing=None):
    """Slots that fit in ``width``: the last slot's strands must fit too."""
    need = _slot_width(strands, d, d if spacing is None else spacing)
    return int(math.floor((width - need) / pitch + 1e-9)) + 1 if width >= need * (1 - 1e-12) else 0


def layer_geometry(layer_style, tape, pitch, strands, d, spacing=None):
    """Style, radial step and axial shift of alternate layers for a winding.

    Parameters
    ----------
    layer_style : str or None
        ``"nested"``, ``"stacked"``, or ``None`` for the default: untaped
        close-wound layers nest, taped or spaced layers stack.
    tape : float
        Layer tape thickness. [m]
    pitch : float
        Axial advance per turn of one strand. [m]
    strands : int
        Strands wound side by side.
    d : float
        Overall wire diameter. [m]
    spacing : float or None
        Distance between neighbouring strands of a slot; default ``d``. [m]

    Returns
    -------
    style : str
    step : float
        Radial distance between adjacent layers' conductor centres:
        ``d·√3/2`` nested (three touching circles), ``d + tape`` stacked. [m]
    shift : float
        Axial offset of every second layer: half the conductor spacing when
        nested, 0 when stacked. [m]

    Raises
    ------
    ValueError
        ``"nested"`` asked for with layer tape, or with spaced turns (there
        are no grooves for the upper layer to lie in).

    References
    ----------
    Orthocyclic (nested) and layer-on-layer winding, common practice; the
    ``√3/2`` spacing is the geometry of touching equal circles.

    Examples
    --------
    >>> style, step, shift = layer_geometry(None, 0.0, 0.5e-3, 1, 0.5e-3)
    >>> style, round(step * 1e3, 4), round(shift * 1e3, 4)
    ('nested', 0.433, 0.25)
    >>> layer_geometry(None, 50e-6, 0.5e-3, 1, 0.5e-3)[0]
    'stacked'
    """
    spacing = d if spacing is None else spacing
    close = abs(pitch - strands * d) <= 1e-9 * strands * d and abs(spacing - d) <= 1e-9 * d
    if layer_style is None:
        layer_style = "nested" if tape <= 0 and close else "stacked"
    if layer_style not in LAYER_STYLES:
        raise ValueError(f"layer style is nested or stacked, got {layer_style!r}")
    if layer_style == "nested":
        if tape > 0:
            raise ValueError("taped layers stack: the tape keeps the upper layer out of the grooves")
        if not close:
            raise ValueError("only close-wound layers nest: spaced turns leave no grooves to lie in")
        return "nested", d * math.sqrt(3.0) / 2.0, d / 2.0
    return "stacked", d + tape, 0.0


def cylinder_layout(diameter, traverse, copper_diameter, overall_diameter, strands, turns,
                    layers=None, pitch=None, tape=0.0, max_build=None, kind="cylinder",
                    turn_length_of_layer=None, layer_style=None, strand_spacing=None,
                    across="the traverse", build_limit="the form") -> Layout:
    """Lay out a layer winding on a cylindrical former or bobbin.

    Parameters
    ----------
    diameter : float
        Diameter of the winding surface. [m]
    traverse : float
        Usable axial winding length. [m]
    copper_diameter, overall_diameter : float
        Bare and insulated wire diameter. [m]
    strands : int
        Strands wound side by side (1–4).
    turns : int
        Turns per strand.
    layers : int or None
        Number of layers; ``None`` fills full layers.
    pitch : float or None
        Axial advance per turn of one strand; default close-wound,
        ``strands * overall_diameter``. [m]
    tape : float
        Layer tape thickness between layers. [m]
    max_build : float or None
        Largest radial build allowed. [m]
    layer_style : str or None
        ``"nested"`` or ``"stacked"``; default by construction (see
        :func:`layer_geometry`).
    strand_spacing : str or None
        ``"together"`` (default: the strands of a slot touch, side by side)
        or ``"even"`` (spread evenly over the pitch).
    across, build_limit : str
        How messages name the traverse and the build limit (a bobbin's
        window ``width`` and ``height``).

    Returns
    -------
    Layout

    Notes
    -----
    The last turn of a nested layer is laid half a conductor spacing past
    the one below; at a full layer it climbs against the flange.  The
    position used stands for it.

    References
    ----------
    Layer-wound, back-and-forth construction and the ~10 % multilayer bulge
    allowance are common practice.

    Examples
    --------
    >>> lay = cylinder_layout(0.02, 10e-3, 0.45e-3, 0.5e-3, 1, 40)
    >>> lay.layers, lay.turns_in_layer, lay.layer_style
    (2, (20, 20), 'nested')
    """
    d = overall_diameter
    pitch = _check_pitch(pitch, strands, d)
    spacing = _strand_spacing(strand_spacing, strands, d, pitch)
    style, step, shift = layer_geometry(layer_style, tape, pitch, strands, d, spacing)
    slots_max = _slots_across(traverse, strands, d, pitch, spacing)
    if slots_max < 1:
        raise WindingDoesNotFit(
            f"{strands} strand(s) of {d * 1e3:.3f} mm need {_slot_width(strands, d, spacing) * 1e3:.3f} mm, "
            f"{across} is {traverse * 1e3:.3f} mm"
        )
    plan = _layer_plan(turns, slots_max, layers, across)
    n_layers = len(plan)
    build = d + (n_layers - 1) * step
    allowance = BULGE_ALLOWANCE if n_layers > 1 else 1.0
    notes = []
    if max_build is not None and build * allowance > max_build * (1 + 1e-9):
        raise WindingDoesNotFit(
            f"{n_layers} layers build {build * allowance * 1e3:.2f} mm (with "
            f"{(allowance - 1) * 100:.0f} % bulge allowance), {build_limit} allows "
            f"{max_build * 1e3:.2f} mm; over by {(build * allowance - max_build) * 1e3:.2f} mm"
        )
    if n_layers > 1:
        notes.append(f"build includes a {(allowance - 1) * 100:.0f} % multilayer bulge "
                     "allowance (common practice)")

    if style == "nested" and n_layers > 1:
        notes.append("untaped layers nest in the grooves of the layer below (orthocyclic, "
                     "d·√3/2 apart)")

    def r_of_layer(lay):
        return diameter / 2 + d / 2 + lay * step

    length = turn_length_of_layer or (lambda lay: 2 * math.pi * r_of_layer(lay))
    r, z, layer, slot, strand, index, tl = _wind(plan, strands, pitch, d, r_of_layer, length,
                                                 lambda lay: shift * (lay % 2), spacing)
    used = (max(plan) - 1) * pitch + _slot_width(strands, d, spacing)
    return Layout(kind=kind, strands=strands, turns_per_strand=turns, layers=n_layers,
                  slots_per_layer=slots_max, pitch=pitch, copper_diameter=copper_diameter,
                  overall_diameter=d, tape=tape, r=r, z=z, layer=layer, slot=slot,
                  strand=strand, index=index, turn_length=tl, turns_in_layer=tuple(plan),
                  build_height=build * allowance, traverse_used=used, notes=tuple(notes),
                  layer_style=style, layer_step=step, strand_spacing=spacing)


def usable_traverse(traverse, margin=0.0, end="start-end", offset=0.0):
    """Width left for the winding once margin tape and the start offset are taken off. [m]

    Parameters
    ----------
    traverse : float
        Length of the traverse (a bobbin's window width). [m]
    margin : float
        Margin tape width at each end of the traverse. [m]
    end : {"start-end", "finish-end", "centre"}
        The end the winding is placed from (``centre``: centred, no offset).
    offset : float
        Distance from that end's margin (or flange) to the winding's edge. [m]

    Returns
    -------
    float
        Usable width [m]; zero or below when nothing fits.

    References
    ----------
    Margin-wound construction, creepage margins at both ends of the traverse (common practice).

    Examples
    --------
    >>> round(usable_traverse(0.015, margin=0.002, offset=0.001) * 1e3, 3)
    10.0
    """
    return traverse - 2 * margin - (0.0 if end == "centre" else offset)


def traverse_placement(traverse, used, margin=0.0, end="start-end", offset=0.0) -> dict:
    """Where the winding lies on the traverse, measured from the start end. [m]

    Parameters
    ----------
    traverse : float
        Length of the traverse. [m]
    used : float
        Axial width the winding takes (:attr:`Layout.traverse_used`). [m]
    margin, end, offset
        As :func:`usable_traverse`.

    Returns
    -------
    dict
        ``first_turn_m`` (start end to the winding's start edge), ``bare_start_m``
        and ``bare_finish_m`` (bare traverse between margin tape and winding at
        each end), ``margin_m``, ``end`` and ``offset_m``.

    References
    ----------
    Plain geometry on the traverse.

    Examples
    --------
    >>> p = traverse_placement(0.060, 0.037, end="centre")
    >>> round(p["first_turn_m"] * 1e3, 1), round(p["bare_finish_m"] * 1e3, 1)
    (11.5, 11.5)
    """
    room = traverse - 2 * margin - used
    if end == "centre":
        before = room / 2
    elif end == "finish-end":
        before = room - offset
    else:
        before = offset
    return {"end": end, "offset_m": offset, "margin_m": margin, "first_turn_m": margin + before,
            "bare_start_m": before, "bare_finish_m": room - before}


def bobbin_layout(width, height, copper_diameter, overall_diameter, strands, turns,
                  diameter=None, mean_turn_length=None, layers=None, pitch=None,
                  tape=0.0, layer_style=None, strand_spacing=None,
                  across="the bobbin's width") -> Layout:
    """Lay out a winding in a bobbin window.

    Parameters
    ----------
    width, height : float
        Window width (traverse) and height (largest build). [m]
    copper_diameter, overall_diameter : float
        Bare and insulated wire diameter. [m]
    strands : int
        Strands wound side by side (1–4). [-]
    turns : int
        Turns per strand. [-]
    diameter : float or None
        Diameter of the bobbin's winding surface. [m]
    mean_turn_length : float or None
        Mean length of turn over the full window, when the bobbin is not round
        (used instead of ``diameter``): the winding surface is taken round,
        of diameter ``MLT/π − height``. [m]
    Other parameters as :func:`cylinder_layout`.

    Returns
    -------
    Layout
        ``kind`` ``"bobbin"``; ``build_height`` [m] includes the bulge allowance.

    Raises
    ------
    WindingDoesNotFit
        The turns need more than ``width`` per layer or more than ``height`` of build.

    References
    ----------
    Same construction as :func:`cylinder_layout` (common practice).

    Examples
    --------
    40 turns of 0.5 mm overall in a 10 mm wide window: 20 a layer, two nested
    layers, build (0.5 + 0.5·√3/2) mm × 1.10 bulge allowance = 1.026 mm.

    >>> lay = bobbin_layout(10e-3, 3e-3, 0.45e-3, 0.5e-3, 1, 40, diameter=0.02)
    >>> lay.kind, lay.turns_in_layer, round(lay.build_height * 1e3, 3)
    ('bobbin', (20, 20), 1.026)

    A square bobbin of MLT 75.4 mm, 3 mm high: surface 75.4/π − 3 = 21.0 mm
    across, so the first turn runs π × (21.0 + 0.5) mm = 67.5 mm.

    >>> lay = bobbin_layout(10e-3, 3e-3, 0.45e-3, 0.5e-3, 1, 40, mean_turn_length=75.4e-3)
    >>> round(float(lay.turn_length[0]) * 1e3, 1)
    67.5
    """
    if diameter is None:
        # An equivalent round surface whose middle of the window has the stated MLT.
        diameter = max(mean_turn_length / math.pi - height, overall_diameter)
    return cylinder_layout(diameter, width, copper_diameter, overall_diameter, strands, turns,
                           layers=layers, pitch=pitch, tape=tape, max_build=height, kind="bobbin",
                           layer_style=layer_style, strand_spacing=strand_spacing,
                           across=across, build_limit="the bobbin's height")


def toroid_layout(inner_diameter, outer_diameter, height, copper_diameter, overall_diameter,
                  strands, turns, layers=None, pitch=None, tape=0.0,
                  gap_deg=TOROID_GAP_DEG, layer_style=None, strand_spacing=None,
                  spread="even") -> Layout:
    """Lay out a winding on a toroidal core.

    Turns are counted on the inner circumference, where they crowd: each
    layer's conductor centres lie on a circle inside the hole, ``d/2`` plus
    the layers below in from the core wall, so layers build inward and each
    holds fewer turns than the one before.  ``spread="even"`` spaces a
    layer's turns evenly over the circumference less ``gap_deg``; an angle
    spreads them evenly over a sector of that angle (the rest of the ring
    stays bare).  A layer holds at most what fits close-wound on its arc.

    Parameters
    ----------
    inner_diameter, outer_diameter, height : float
        Core dimensions (over any coating). [m]
    gap_deg : float
        Angle left free between start and finish when spread evenly. [degree]
    spread : "even" or float
        ``"even"``, or the sector angle the turns are spread over. [degree]
    Other parameters as :func:`cylinder_layout`.

    Returns
    -------
    Layout
        With ``theta``, each turn's angle from the start, and ``z`` its arc
        along its own layer's circle.  ``turn_length`` runs round the core's
        rectangular section offset by the turn's build.

    References
    ----------
    The start-to-finish gap of 20–30° and even spreading over the core are
    common practice; the arc capacity is the same slot rule as
    :func:`cylinder_layout`, taken on each layer's circle inside the hole.

    Examples
    --------
    >>> lay = toroid_layout(0.0148, 0.0253, 0.01, 0.8e-3, 0.884e-3, 2, 12)
    >>> lay.layers, round(float(lay.theta.max()) * 180 / 3.141592653589793, 1)
    (1, 326.4)
    """
    d = overall_diameter
    if outer_diameter <= inner_diameter:
        raise WindingDoesNotFit("the toroid's outer diameter must exceed its inner diameter")
    pitch = _check_pitch(pitch, strands, d)
    spacing = _strand_spacing(strand_spacing, strands, d, pitch)
    style, step, shift = layer_geometry(layer_style, tape, pitch, strands, d, spacing)
    if spread == "even":
        span = math.radians(360.0 - gap_deg)
    else:
        span = math.radians(float(spread))
        if not 0.0 < span < 2 * math.pi:
            raise ValueError("a sector is an angle above 0° and below 360°")

    def rho(lay):  # radius of the conductor centres on the inside of the core
        return inner_diameter / 2 - d / 2 - lay * step

    if rho(0) <= d:
        raise FormTooSmall(
            f"wire of {d * 1e3:.3f} mm does not pass through a {inner_diameter * 1e3:.2f} mm hole "
            f"with room to wind: the hole needs more than {3 * d * 1e3:.3f} mm (three wire diameters)")

    def capacity(lay):
        return _slots_across(rho(lay) * span, strands, d, pitch, spacing) if rho(lay) > d else 0

    slots0 = capacity(0)
    where = "the core's inner circumference" + (f" (a {math.degrees(span):.0f}° sector)"
                                                 if spread != "even" else "")
    if layers in (None, "auto"):
        plan = _inward_plan(turns, capacity, where)
    else:
        plan = _layer_plan(turns, slots0, layers, where)
    for lay, n in enumerate(plan):
        if n > capacity(lay):
            raise WindingDoesNotFit(
                f"layer {lay + 1} needs {n} turns per strand on the inside of the core, "
                f"there is room for {capacity(lay)}; short by {n - capacity(lay)} turn(s)")
    w = (outer_diameter - inner_diameter) / 2

    def length(lay):  # wire centre runs round the core section, offset by the build
        delta = d / 2 + lay * step
        return 2 * (w + height) + 2 * math.pi * delta

    r, z, layer, slot, strand, index, tl = _wind(plan, strands, pitch, d, lambda lay: lay * step, length,
                                                 lambda lay: shift * (lay % 2), spacing)
    theta = np.empty_like(z)
    width = _slot_width(strands, d, spacing)
    for lay, n in enumerate(plan):
        sel = layer == lay
        # Slot pitch along this layer's arc: even over the span, never closer than close-wound.
        arc = rho(lay) * span
        p = pitch if n == 1 else max(pitch, (arc - width) / (n - 1))
        k = slot[sel]
        if lay % 2 == 1:  # a returning layer runs from the end of the span back to the start
            k = (n - 1) - (plan[lay - 1] - 1 - k)
        along = k * p + strand[sel] * spacing + d / 2
        theta[sel] = along / rho(lay)
        z[sel] = along
    used = max((n - 1) * (pitch if n == 1 else max(pitch, (rho(i) * span - width) / (n - 1))) + width
               for i, n in enumerate(plan))
    n_layers = len(plan)
    note = (f"turns spread evenly round the core, {gap_deg:.0f}° left free between start and finish "
            "(common practice)" if spread == "even" else
            f"turns spread evenly over a {math.degrees(span):.0f}° sector of the core")
    return Layout(kind="toroid", strands=strands, turns_per_strand=turns, layers=n_layers,
                  slots_per_layer=slots0, pitch=pitch, copper_diameter=copper_diameter,
                  overall_diameter=d, tape=tape, r=r, z=z, layer=layer, slot=slot,
                  strand=strand, index=index, turn_length=tl, turns_in_layer=tuple(plan),
                  build_height=d + (n_layers - 1) * step, traverse_used=used,
                  notes=(note,), layer_style=style, layer_step=step, strand_spacing=spacing,
                  theta=theta, ring_radius=rho(0), spread="even" if spread == "even" else "sector")
