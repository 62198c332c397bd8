"""Designs recorded by an earlier version, read as today's :class:`~windsheet.design.model.Design`.

The one documented conversion (README, "The prediction"): a register keeps the
prediction each traveller was issued with, and sign-off judges the units
against that record, not a fresh sizing.  A record marked
``windsheet.prediction/1`` (or unmarked) is a plain dict with today's keys, some
missing when it is older still; it is read like this:

* keys this version no longer knows are dropped, sections it lacks are left
  empty (``None``, or an empty list);
* the derived facts are made by today's rules (:mod:`windsheet.design.derived`):
  the connections, the QC plan's labels and bands, the design state;
* the QC lines keep the list the issue was recorded with (``qc_required``),
  in its order: the inspector measures what the printed traveller asked for;
* a recorded ``design_status`` (``forced`` or ``failing``) is kept.
"""

from __future__ import annotations

import types
import typing
from typing import Any

from pydantic import BaseModel

from .derived import complete
from .model import SCHEMA, SCHEMA_V1, Design, DesignCore, DesignState


def _known(annotation, value):
    """``value`` with every mapping key the annotation's model does not know dropped."""
    origin = typing.get_origin(annotation)
    if origin in (typing.Union, types.UnionType):
        for arg in typing.get_args(annotation):
            if arg is not type(None) and value is not None:
                return _known(arg, value)
        return value
    if isinstance(annotation, type) and issubclass(annotation, BaseModel) and isinstance(value, dict):
        fields = annotation.model_fields
        names = {f.alias or n: f for n, f in fields.items()}
        return {k: _known(names[k].annotation, v) for k, v in value.items() if k in names}
    if origin is list and isinstance(value, list):
        (arg,) = typing.get_args(annotation) or (Any,)
        return [_known(arg, v) for v in value]
    if origin is dict and isinstance(value, dict):
        args = typing.get_args(annotation)
        return {k: _known(args[1], v) for k, v in value.items()} if len(args) == 2 else value
    return value


def design_from_v1(data: dict) -> Design:
    """A ``windsheet.prediction/1`` dict (or an unmarked older one) as a :class:`Design`.

    Examples
    --------
    >>> old = {"schema": "windsheet.prediction/1", "job": {"number": "HL-1", "units": ["HL-1-01"]},
    ...        "hookup": {"name": "single", "joins": [], "terminals": ["A.start", "A.finish"]},
    ...        "strands": [{"id": "A", "turns": 10, "inductance_H": 1e-6, "resistance_20C_ohm": 0.1}],
    ...        "inductance_matrix_H": [[1e-6]], "insulation": {"verdict": "fail", "reasons": ["too close"]},
    ...        "terminal": {"inductance_H": 1e-6, "resistance_ohm": 0.1, "accept": {
    ...            "inductance_min_H": 0.9e-6, "inductance_max_H": 1.1e-6,
    ...            "resistance_min_ohm": 0.095, "resistance_max_ohm": 0.105}},
    ...        "qc_required": ["terminal.inductance", "ambient"], "design_status": {"state": "forced"}}
    >>> d = design_from_v1(old)
    >>> d.qc_required, d.state.state, d.connections.terminals[1].label
    (['terminal.inductance', 'ambient'], 'forced', 'T2')
    """
    kept = _known(DesignCore, {k: v for k, v in data.items() if k != "schema"})
    core = DesignCore.model_validate({**kept, "schema": SCHEMA})
    status = data.get("design_status") or {}
    state = None
    if status.get("state") in ("forced", "failing"):
        state = DesignState(state=status["state"], reasons=[str(r) for r in status.get("reasons") or []])
    required = data.get("qc_required")
    return complete(core, list(required) if required is not None else None, state)


def read_design(data: dict) -> Design:
    """A recorded design of any version: today's is validated as it is, an earlier one converted."""
    if isinstance(data, dict) and data.get("schema") == SCHEMA:
        return Design.model_validate(data)
    if isinstance(data, dict) and data.get("schema") == "windsheet.transformer/1":
        from .transformer_model import TransformerDesign

        return TransformerDesign.model_validate(data)
    if isinstance(data, dict) and data.get("schema") in (None, SCHEMA_V1):
        return design_from_v1(data)
    raise ValueError(f"not a windsheet prediction (schema {data.get('schema') if isinstance(data, dict) else None!r})")
