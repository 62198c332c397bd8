"""The winding procedure: the traveller's steps for one order, from its own fields.

The chain, in the order the work is done: :mod:`.procedure_winding` (the form, the wire,
the starts, the layers as a layer table, the finishes, the outer wrap), then
:mod:`.procedure_finishing` (ends identified, core assembled, readings, joints,
termination, hipot).  Words only: every number and count comes from the design
(:class:`windsheet.design.model.Design`).
"""

from __future__ import annotations

from .procedure_finishing import (core_assembly_step, identify_step, joint_steps, measurement_steps, terminate_step,
                                  test_steps)
from .procedure_winding import (finish_step, gap_step, layer_table, outer_wrap_step, preparation_steps, start_step,
                                winding_step)


def procedure_blocks(p) -> list[dict]:
    """The procedure as the sheet prints it: numbered steps, with the layer table after the step that winds.

    Returns ``[{"steps": [...]}, {"layers": [...]}, {"steps": [...]}]`` (the layer table only
    for more than one layer).  Steps are numbered through.
    """
    toroid = (p.form.kind or "") == "toroid"
    wound = preparation_steps(p) + [start_step(p), winding_step(p)]
    after = [gap_step(p)] if toroid else []
    after.append(finish_step(p))
    wrap = outer_wrap_step(p)
    if wrap is not None:
        after.append(wrap)
    after.append(identify_step(p))
    if (p.form.kind or "") == "bobbin":
        # Before any reading: every inductance predicted, and the hipot to core, need the core on.
        after.append(core_assembly_step(p))
    after += measurement_steps(p) + joint_steps(p) + [terminate_step(p)] + test_steps(p)
    for i, s in enumerate(wound + after):
        s["number"] = i + 1
    table = layer_table(p)
    return [{"steps": wound}] + ([{"layers": table}] if table else []) + [{"steps": after}]


def procedure_steps(p) -> list[dict]:
    """The winding procedure for this order, step by step (the layer table's rows are not steps).

    Which steps appear depends on the order: strand count, layers and layer tape,
    toroid, bobbin or cylinder, whether the hookup has joints, pins, the duty.
    """
    return [s for block in procedure_blocks(p) for s in block.get("steps", [])]
