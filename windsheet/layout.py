"""Winding layout: where every turn of every strand sits.

Pure geometry on SI numbers.  Strands are wound side by side, A, B, … in each
pitch slot; layers are wound back and forth (layer 1 returns over layer 0),
layer tape adds to the radius between layers.  A winding that does not fit
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

    @property
    def n_turns(self) -> int:
        return int(self.r.size)

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


def _wind(plan, strands, pitch, d, r_of_layer, length_of_layer, z_offset=0.0):
    """Place turns back and forth, layer by layer."""
    rows = []  # (r, z, layer, slot, strand, index, length)
    count = [0] * strands
    end_slot = 0  # slot where the previous layer finished
    for lay, n in enumerate(plan):
        if lay % 2 == 0:
            slots = range(n)
        else:
            slots = range(end_slot, end_slot - n, -1)
        for k in slots:
            for s in range(strands):
                z = z_offset + k * pitch + s * d + d / 2
                rows.append((r_of_layer(lay), z, lay, k, s, count[s], length_of_layer(lay)))
                count[s] += 1
        end_slot = slots[-1]
    a = np.array(rows, dtype=float)
    return (a[:, 0], a[:, 1], a[:, 2].astype(int), a[:, 3].astype(int),
            a[:, 4].astype(int), a[:, 5].astype(int), a[:, 6])


def _check_pitch(pitch, strands, d):
    if pitch is None:
        return strands * d
    if pitch < strands * d * (1 - 1e-9):
        raise WindingDoesNotFit(
            f"pitch {pitch * 1e3:.3f} mm is less than {strands} strand(s) x "
            f"{d * 1e3:.3f} mm overall diameter = {strands * d * 1e3:.3f} mm"
        )
    return pitch


def _slots_across(width, strands, d, pitch):
    """Slots that fit in ``width``: the last slot's strands must fit too."""
    return int(math.floor((width - strands * d) / pitch + 1e-9)) + 1 if width >= strands * d else 0


def cylinder_layout(diameter, traverse, copper_diameter, overall_diameter, strands, turns,
                    layers=None, pitch=None, tape=0.0, max_build=None, kind="cylinder",
                    turn_length_of_layer=None, across="the traverse", build_limit="the form") -> Layout:
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
    across, build_limit : str
        How messages name the traverse and the build limit (a bobbin's
        window ``width`` and ``height``).

    Returns
    -------
    Layout

    References
    ----------
    Layer-wound, back-and-forth construction and the ~10 % multilayer bulge
    allowance are common practice.
    """
    d = overall_diameter
    pitch = _check_pitch(pitch, strands, d)
    slots_max = _slots_across(traverse, strands, d, pitch)
    if slots_max < 1:
        raise WindingDoesNotFit(
            f"{strands} strand(s) of {d * 1e3:.3f} mm need {strands * d * 1e3:.3f} mm, "
            f"{across} is {traverse * 1e3:.3f} mm"
        )
    plan = _layer_plan(turns, slots_max, layers, across)
    n_layers = len(plan)
    build = n_layers * d + (n_layers - 1) * tape
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

    def r_of_layer(lay):
        return diameter / 2 + d / 2 + lay * (d + tape)

    length = turn_length_of_layer or (lambda lay: 2 * math.pi * r_of_layer(lay))
    r, z, layer, slot, strand, index, tl = _wind(plan, strands, pitch, d, r_of_layer, length)
    used = (max(plan) - 1) * pitch + strands * d
    return Layout(kind=kind, strands=strands, turns_per_strand=turns, layers=n_layers,
                  slots_per_layer=slots_max, pitch=pitch, copper_diameter=copper_diameter,
                  overall_diameter=d, tape=tape, r=r, z=z, layer=layer, slot=slot,
                  strand=strand, index=index, turn_length=tl, turns_in_layer=tuple(plan),
                  build_height=build * allowance, traverse_used=used, notes=tuple(notes))


def bobbin_layout(width, height, copper_diameter, overall_diameter, strands, turns,
                  diameter=None, mean_turn_length=None, layers=None, pitch=None,
                  tape=0.0) -> Layout:
    """Lay out a winding in a bobbin window.

    Parameters
    ----------
    width, height : float
        Window width (traverse) and height (largest build). [m]
    diameter : float or None
        Diameter of the bobbin's winding surface. [m]
    mean_turn_length : float or None
        Mean length of turn over the full window, when the bobbin is not round
        (used instead of ``diameter``). [m]
    Other parameters as :func:`cylinder_layout`.

    References
    ----------
    Same construction as :func:`cylinder_layout` (common practice).
    """
    if diameter is None:
        # An equivalent round surface whose middle of the window has the stated MLT.
        diameter = max(mean_turn_length / math.pi - height, overall_diameter)
    return cylinder_layout(diameter, width, copper_diameter, overall_diameter, strands, turns,
                           layers=layers, pitch=pitch, tape=tape, max_build=height, kind="bobbin",
                           across="the bobbin's width", build_limit="the bobbin's height")


def toroid_layout(inner_diameter, outer_diameter, height, copper_diameter, overall_diameter,
                  strands, turns, layers=None, pitch=None, tape=0.0,
                  gap_deg=TOROID_GAP_DEG) -> Layout:
    """Lay out a winding on a toroidal core.

    Turns are counted on the inner circumference, where they crowd; each layer
    leaves ``gap_deg`` free between start and finish.

    Parameters
    ----------
    inner_diameter, outer_diameter, height : float
        Core dimensions (over any coating). [m]
    gap_deg : float
        Angle left free between start and finish. [degree]
    Other parameters as :func:`cylinder_layout`.

    References
    ----------
    The start-to-finish gap of 20–30° is common practice.
    """
    d = overall_diameter
    if outer_diameter <= inner_diameter:
        raise WindingDoesNotFit("the toroid's outer diameter must exceed its inner diameter")
    pitch = _check_pitch(pitch, strands, d)
    usable = (360.0 - gap_deg) / 360.0

    def rho(lay):  # radius of the conductor centres on the inside of the core
        return inner_diameter / 2 - d / 2 - lay * (d + tape)

    if rho(0) <= d:
        raise FormTooSmall(
            f"wire of {d * 1e3:.3f} mm does not pass through a {inner_diameter * 1e3:.2f} mm hole "
            f"with room to wind: the hole needs more than {3 * d * 1e3:.3f} mm (three wire diameters)")
    slots0 = _slots_across(2 * math.pi * rho(0) * usable, strands, d, pitch)
    plan = _layer_plan(turns, slots0, layers, "the core's inner circumference")
    # Inner layers have a shorter circumference: check each one.
    for lay, n in enumerate(plan):
        cap = _slots_across(2 * math.pi * rho(lay) * usable, strands, d, pitch) if rho(lay) > d else 0
        if n > cap:
            raise WindingDoesNotFit(
                f"layer {lay + 1} needs {n} turns per strand on the inside of the core, "
                f"there is room for {cap}; short by {n - cap} turn(s)")
    w = (outer_diameter - inner_diameter) / 2

    def length(lay):  # wire centre runs round the core section, offset by the build
        delta = d / 2 + lay * (d + tape)
        return 2 * (w + height) + 2 * math.pi * delta

    r, z, layer, slot, strand, index, tl = _wind(plan, strands, pitch, d, lambda lay: lay * (d + tape), length)
    n_layers = len(plan)
    return Layout(kind="toroid", strands=strands, turns_per_strand=turns, layers=n_layers,
                  slots_per_layer=slots0, pitch=pitch, copper_diameter=copper_diameter,
                  overall_diameter=d, tape=tape, r=r, z=z, layer=layer, slot=slot,
                  strand=strand, index=index, turn_length=tl, turns_in_layer=tuple(plan),
                  build_height=n_layers * d + (n_layers - 1) * tape,
                  traverse_used=(max(plan) - 1) * pitch + strands * d,
                  notes=(f"{gap_deg:.0f}° left free between start and finish (common practice)",))


def neighbours(layout: Layout):
    """Pairs of physically adjacent conductors.

    Returns
    -------
    i, j : ndarray of int
        Turn indices (into the layout arrays) of each adjacent pair.
    kind : ndarray of str
        ``"side"`` (same layer, next along the traverse), ``"layer"`` (the
        layer above or below, overlapping axially) or ``"lead"`` (a toroid's
        start and finish, which meet across the gap).
    """
    I, J, K = [], [], []
    d = layout.overall_diameter
    for lay in range(layout.layers):
        sel = np.flatnonzero(layout.layer == lay)
        order = sel[np.argsort(layout.z[sel], kind="stable")]
        I.extend(order[:-1]); J.extend(order[1:]); K.extend(["side"] * (order.size - 1))
        if lay + 1 < layout.layers:
            up = np.flatnonzero(layout.layer == lay + 1)
            zs = layout.z[order]
            for t in up:
                lo = np.searchsorted(zs, layout.z[t] - d * 0.999)
                hi = np.searchsorted(zs, layout.z[t] + d * 0.999)
                for q in order[lo:hi]:
                    I.append(q); J.append(t); K.append("layer")
    if layout.kind == "toroid":
        first = np.flatnonzero(layout.index == 0)
        last = np.flatnonzero(layout.index == layout.turns_per_strand - 1)
        for a in first:
            for b in last:
                I.append(a); J.append(b); K.append("lead")
    return np.asarray(I, dtype=int), np.asarray(J, dtype=int), np.asarray(K, dtype=object)
