"""One sizing pass: the order's layout at a turn count, its strand matrix and its network.

The first links of the chain (order -> layout -> inductance + wire ->
network), shared by :func:`windsheet.design.build.build_design`, the target-inductance
search (:mod:`windsheet.design.target_turns`) and the sign-off's turn-count
hypotheses.  Pure composition of the physics modules; no model of its own.
"""

from __future__ import annotations

import math

import numpy as np

from windsheet.physics import coil_formulas as cf
from windsheet.physics import inductance as ind
from windsheet.physics import layout as lay
from windsheet.physics import section_layout as sections
from windsheet.common.errors import InputError
from windsheet.order.limits import check_engine_work, check_turns_in_all
from windsheet.physics.network import separate_windings, solve_network
from windsheet.order.document import BobbinForm, CylinderForm, Order, ToroidForm
from windsheet.order.wire_choice import resolve_wire
from windsheet.physics.wire import dc_resistance


def layout_at(order: Order, wire, turns: int):
    """The order's layout at ``turns`` per strand, within the work budgets (windsheet.order.limits)."""
    field = "winding.turns" if order.doc.winding.turns else "winding.target_inductance"
    check_turns_in_all(turns, order.doc.winding.strands, field)
    layout = place_turns(order, wire, turns)
    check_engine_work(layout.turns_per_strand, layout.layers, layout.strands, field)
    return layout


def place_turns(order: Order, wire, turns: int):
    """The turns laid on the order's form (cylinder, bobbin or toroid).

    A winding that cannot be laid is refused at its field (InputError).
    """
    f, w = order.doc.form, order.doc.winding
    layers = None if w.layers == "auto" else w.layers
    args = dict(copper_diameter=wire.copper_diameter, overall_diameter=wire.overall_diameter,
                strands=w.strands, turns=turns, layers=layers, pitch=w.pitch, tape=order.tape)
    # Checked first, so that a style the construction cannot take is refused at its own field.
    try:
        lay.layer_geometry(w.layer_style, order.tape, w.pitch or w.strands * wire.overall_diameter,
                           w.strands, wire.overall_diameter,
                           (w.pitch or w.strands * wire.overall_diameter) / w.strands
                           if w.strand_spacing == "even" else wire.overall_diameter)
    except ValueError as exc:
        raise InputError("winding.layer_style", str(exc)) from None
    args.update(layer_style=w.layer_style, strand_spacing=w.strand_spacing)
    if w.spread is not None and not isinstance(f, ToroidForm):
        raise InputError("winding.spread", "applies to a toroid only (spread round the core)")
    if not isinstance(f, ToroidForm):
        width, across = winding_width(order)
    elif w.sections > 1:
        raise InputError("winding.sections", "applies to a cylinder or bobbin (walls across the traverse); "
                         "a toroid is sectored round the core (winding.spread)")
    if w.sections > 1:
        return _sectioned(order, wire, turns, width, across, args)
    try:
        if isinstance(f, CylinderForm):
            # Enamel is only proven to survive a mandrel of the wire's own diameter
            # (IEC 60851-3 mandrel winding test, memory); a thinner form is refused.
            if f.diameter < wire.overall_diameter:
                raise lay.FormTooSmall(
                    f"{f.diameter * 1e3:.3f} mm is smaller than the wire's {wire.overall_diameter * 1e3:.3f} mm "
                    "overall diameter: the wire is thicker than the form")
            return lay.cylinder_layout(f.diameter, width, max_build=f.max_build, across=across, **args)
        if isinstance(f, ToroidForm):
            spread = "even" if w.spread in (None, "even") else math.degrees(w.spread)
            return lay.toroid_layout(f.inner_diameter, f.outer_diameter, f.height,
                                     gap_deg=math.degrees(f.gap), spread=spread, **args)
        return lay.bobbin_layout(width, f.height, diameter=f.diameter,
                                 mean_turn_length=f.mean_turn_length, across=across, **args)
    except lay.FormTooSmall as exc:
        raise InputError("form.inner_diameter" if isinstance(f, ToroidForm) else "form.diameter", str(exc)) from None
    except lay.WindingDoesNotFit as exc:
        raise InputError("winding.turns" if order.doc.winding.turns else "winding.target_inductance",
                         f"does not fit: {exc}") from None


def _sectioned(order: Order, wire, turns: int, width: float, across: str, args: dict):
    """The turns laid in ``winding.sections`` sections, each as the form lays an unsectioned winding."""
    f, w = order.doc.form, order.doc.winding
    field = "winding.turns" if w.turns else "winding.target_inductance"
    args = {k: v for k, v in args.items() if k != "turns"}

    def one(section_w, n):
        if isinstance(f, CylinderForm):
            return lay.cylinder_layout(f.diameter, section_w, max_build=f.max_build, turns=n,
                                       across="a section", **args)
        return lay.bobbin_layout(section_w, f.height, diameter=f.diameter, mean_turn_length=f.mean_turn_length,
                                 turns=n, across="a section", **args)
    if turns < w.sections:
        raise InputError("winding.sections", f"{w.sections} sections need at least one turn each; "
                         f"the winding has {turns}")
    try:
        return sections.sectioned_layout(one, width, w.sections, w.section_wall.thickness, turns)
    except lay.WindingDoesNotFit as exc:
        raise InputError(field, f"does not fit: {exc} ({across})") from None


def sector_spans(order: Order) -> list[tuple[float, float]]:
    """Each winding's sector of the ring, ``(from_deg, to_deg)`` from the start mark, a form.gap after each.

    The order's sector angles, or the ring less one gap per winding shared evenly.
    """
    f, w = order.doc.form, order.doc.winding
    gap = math.degrees(f.gap)
    sizes = ([math.degrees(a) for a in w.arrangement.sectors] if w.arrangement.sectors
             else [(360.0 - w.strands * gap) / w.strands] * w.strands)
    spans, at = [], 0.0
    for size in sizes:
        spans.append((at, at + size))
        at += size + gap
    return spans


def sector_layouts(order: Order, wire, turns: int) -> list:
    """One single-winding layout per sector (arrangement: sectors), each turned to its sector's start.

    It checks that each winding fits its own sector and gives its turns' angles for
    the top view; the stress check keeps the windings side by side, the worst case.
    """
    f, w = order.doc.form, order.doc.winding
    layers = None if w.layers == "auto" else w.layers
    out = []
    for s, (a0, a1) in enumerate(sector_spans(order)):
        try:
            one = lay.toroid_layout(f.inner_diameter, f.outer_diameter, f.height, wire.copper_diameter,
                                    wire.overall_diameter, 1, turns, layers=layers, pitch=w.pitch / w.strands
                                    if w.pitch else None, tape=order.tape, layer_style=w.layer_style,
                                    spread=a1 - a0)
        except lay.WindingDoesNotFit as exc:
            raise InputError("winding.arrangement", f"winding {'ABCD'[s]} does not fit its {a1 - a0:.0f}° "
                             f"sector: {exc}") from None
        out.append((a0, one))
    return out


def winding_width(order: Order) -> tuple[float, str]:
    """The traverse left for turns once margin tape and the start offset are off, and its name. [m]"""
    f, start = order.doc.form, order.doc.winding.start
    traverse, name = (f.width, "the bobbin's width") if isinstance(f, BobbinForm) else (f.traverse, "the traverse")
    width = lay.usable_traverse(traverse, order.margin, start.end, start.offset)
    if width <= 0:
        field = "form.margin_tape" if order.margin and 2 * order.margin >= traverse else "winding.start.offset"
        raise InputError(field, f"leaves no room to wind: {name} is {traverse * 1e3:.3f} mm")
    less = [w for w, on in (("margins", order.margin), ("start offset", start.offset and start.end != "centre")) if on]
    return width, (f"{name} less its {' and '.join(less)} ({width * 1e3:.3f} mm)" if less else name)


def core_al(order: Order):
    """The core's inductance factor A_L [H/turn²], or None for an air-core form."""
    f = order.doc.form
    if isinstance(f, ToroidForm):
        if f.al is not None:
            return f.al
        return float(cf.toroid_al(f.permeability, f.inner_diameter, f.outer_diameter, f.height))
    if isinstance(f, BobbinForm):
        return f.al
    return None


def strand_lengths(order: Order, layout):
    """Wire per strand: its turns plus two leads. [m]"""
    return layout.strand_length() + 2 * order.doc.winding.lead_length


def inductance_matrix(order: Order, wire, layout, kernels=None):
    """Strand inductance matrix [H]: the filament sum on air, A_L and two-wire leakage on a core."""
    al = core_al(order)
    if al is None:
        return ind.strand_matrix(layout, kernels)
    S = layout.strands
    L = cf.cored_strand_matrix([layout.turns_per_strand] * S, al, order.doc.winding.coupling)
    if S > 1:
        # Leakage between side-by-side strands on a core: the two-wire line
        # inductance along the strand, split between the pair (common practice).
        lp = float(cf.two_wire_inductance_per_length(wire.overall_diameter, wire.copper_diameter))
        L = L + np.eye(S) * lp * layout.strand_length() / 2
    return L


def network_at(order: Order, L, R, frequency):
    """The hookup solved at ``frequency`` [Hz] from strand matrices ``L`` [H] and ``R`` [ohm]."""
    if order.hookup_name == "separate":
        duty = order.doc.duty
        between = duty.between_windings if duty.between_windings is not None else duty.voltage
        return separate_windings(L, R, between / duty.voltage if duty.voltage > 0 else 0.0)
    return solve_network(L, R, order.joins, order.terminals, frequency, hookup=order.hookup_name)


def terminal_inductance(order, wire, turns, kernels=None):
    """Inductance at the terminals [H] at ``turns`` per strand, at the test frequency."""
    layout = layout_at(order, wire, turns)
    L = inductance_matrix(order, wire, layout, kernels)
    R = dc_resistance(strand_lengths(order, layout), wire.copper_diameter, conductor=wire.conductor)
    return network_at(order, L, R, order.doc.test.frequency).inductance




def strand_values_at_turns(order: Order, turns: int):
    """Strand inductance matrix [H] and resistances at 20 degC [ohm] re-sized at ``turns``.

    The same engine as :func:`predict`, for the sign-off's turn-count
    hypotheses (N - k ... N + k); raises InputError when that many turns do not fit.
    """
    wire = resolve_wire(order)
    layout = layout_at(order, wire, int(turns))
    L = inductance_matrix(order, wire, layout)
    R = dc_resistance(strand_lengths(order, layout), wire.copper_diameter, conductor=wire.conductor)
    return np.asarray(L, dtype=float), np.asarray(R, dtype=float)
