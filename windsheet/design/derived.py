"""A sized design completed with the facts every output prints: connections, QC plan, state.

Made once, here, for a new design (:mod:`windsheet.design.build`) and for one
read back from an earlier version's record (:mod:`windsheet.design.legacy`),
by the same rules.
"""

from __future__ import annotations

from typing import Optional

from .connections import connections
from .family import family_of
from .model import Design, DesignCore, DesignState
from .qc_plan import design_state, qc_plan


def complete(core: DesignCore, required: Optional[list[str]] = None,
             state: Optional[DesignState] = None) -> Design:
    """``core`` with its connections, QC plan (``required``: keep an issue's recorded list) and state."""
    conn = connections(core.hookup.model_dump(), [s.id for s in core.strands],
                       [t.model_dump() for t in core.terminations], [lead.model_dump() for lead in core.leads])
    plan = qc_plan(core, required)
    key, label = family_of(core.model_dump(include={"form", "wire", "winding", "strands", "hookup"}))
    return Design.model_validate({**dict(core), "connections": conn, "qc_plan": plan,
                                  "qc_required": plan.required,
                                  "state": state or design_state(core.insulation, core.thermal),
                                  "family": {"key": key, "label": label}})
