"""A sized design completed with the facts every output prints: connections, QC plan, state.

Made once, here, for a new design (:mod:`windsheet.design.build`) and for one
read back from an earlier version's record (:mod:`windsheet.design.legacy`),
by the same rules.
"""

from __future__ import annotations

from typing import Optional

import math

from .connections import connections
from .construct import as_dict, construct
from .family import family_of
from .model import Design, DesignCore, DesignState, LayerRow
from .qc_plan import design_state, qc_plan


def complete(core: DesignCore, required: Optional[list[str]] = None,
             state: Optional[DesignState] = None) -> Design:
    """``core`` with its connections, QC plan (``required``: keep an issue's recorded list) and state."""
    conn = connections(as_dict(core.hookup), [s.id for s in core.strands],
                       [as_dict(t) for t in core.terminations], [as_dict(lead) for lead in core.leads],
                       terminal_Vpk=terminal_peak(core))
    plan = qc_plan(core, required)
    key, label = family_of(as_dict(core, include={"form", "wire", "winding", "strands", "hookup"}))
    # Every value here was computed, not read: put together without validating (design/construct.py).
    return construct(Design, {**dict(core), "connections": conn, "qc_plan": plan,
                                  "layer_plan": layer_plan(core),
                                  "qc_required": plan.required,
                                  "state": state or design_state(core.insulation, core.thermal),
                                  "family": {"key": key, "label": label}})


def terminal_peak(core: DesignCore) -> float | None:
    """The highest voltage between leads brought out: the duty's, or between windings, as a peak. [V]"""
    d = core.duty
    if d is None:
        return None
    crest = math.sqrt(2.0) if d.frequency_Hz and d.waveform != "pulse" else 1.0
    own = d.voltage_peak_V if d.voltage_peak_V is not None else d.voltage_V * crest
    return max(own, (d.between_windings_V or 0.0) * crest)


def layer_plan(core: DesignCore) -> list[LayerRow]:
    """Each layer as the operator winds it: turns, where it starts, the counter at its end, what goes over it.

    The counter counts turns per strand from the start of the winding (all strands go
    on together, one counter turn each).  Margin tape is built up with each layer: the
    wraps of its thickness that make up one layer's height, the wire and any layer tape.

    """
    w = core.winding
    if w is None or not w.turns_in_layer:
        return []
    toroid = (core.form.kind or "") == "toroid"
    n = len(w.turns_in_layer)
    tape = w.layer_tape_m > 0 and n > 1
    margin_t = core.form.margin_tape_thickness_m if core.form.margin_tape_m else None
    wraps = None
    if margin_t and core.wire is not None:
        # The margins stand beside the layers' ends, where turns stack: a wire and a tape per layer.
        wraps = max(1, math.ceil((core.wire.overall_diameter_m + (w.layer_tape_m if tape else 0.0)) / margin_t - 1e-9))
    # A sectioned winding: each section's layers counted on their own, back and forth from its start side.
    sections = w.layers_per_section or [n]
    place = [(s, k) for s, count in enumerate(sections) for k in range(count)]
    rows, count = [], 0
    for k, turns in enumerate(w.turns_in_layer):
        start = count
        count += int(turns)
        section, within = place[k]
        if toroid:
            from_end = "start-mark" if k % 2 == 0 else "end of the layer below"
        else:
            from_end = "start-end" if within % 2 == 0 else "finish-end"
        last = k == n - 1
        if last:
            after = "outer-wrap" if w.outer_wrap is not None else None
        elif within == sections[section] - 1:
            after = "crossover"
        else:
            after = "layer-tape" if tape else None
        rows.append(LayerRow.computed(layer=within + 1, turns=int(turns), from_end=from_end, counter_start=start,
                                      counter_end=count, tape_after=after, margin_wraps=wraps,
                                      section=section + 1 if w.layers_per_section else None))
    return rows
