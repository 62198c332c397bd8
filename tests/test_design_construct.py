"""A design put together without validation (design/construct.py) is the design validation gives.

``build_design`` fills the Design with ``model_construct`` (its values were just
computed, so pydantic is not asked to check them, nor to build ~70 schemas at
start-up).  These tests hold the shortcut to the validating path: the same
values, the same types, the same JSON, on every sample order; and they check
the helper against pydantic's own validation and dump on a few models.
"""

import json
import warnings

import pytest

from conftest import sample_orders, transformer_orders
from windsheet.design.build import build_design
from windsheet.design.construct import as_dict, construct
from windsheet.design.model import Design, DesignCore, Energy, LayerRow, QcLine
from windsheet.order.document import load_order


def _types(value):
    """The Python type of every leaf, so an int standing where validation puts a float is seen."""
    if isinstance(value, dict):
        return {k: _types(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_types(v) for v in value]
    return type(value).__name__


@pytest.mark.parametrize("path", sample_orders(), ids=lambda p: p.stem)
def test_constructed_design_equals_the_validated_one(path):
    with warnings.catch_warnings():
        # pydantic warns when a dumped value is not the type its field declares.
        warnings.simplefilter("error")
        d = build_design(load_order(path))  # with remedies, as `windsheet size` runs
        validated = Design.model_validate(d.model_dump())
        assert validated == d
        assert _types(as_dict(validated)) == _types(as_dict(d))
        assert json.dumps(validated.model_dump(mode="json")) == json.dumps(d.model_dump(mode="json"))
    # The core alone, as the register and legacy reader validate it.
    assert DesignCore.model_validate(d.model_dump(include=set(DesignCore.model_fields))) == \
        construct(DesignCore, {k: getattr(d, k) for k in DesignCore.model_fields})


def test_construct_makes_numbers_the_declared_type_as_validation_does():
    np = pytest.importorskip("numpy")
    # pydantic's lax validation is the reference: an int or numpy number in a float field becomes a float.
    raw = {"magnetic_J": np.float32(0.25)}
    assert type(construct(Energy, raw).magnetic_J) is float
    assert construct(Energy, raw) == Energy.model_validate(raw)
    row = {"layer": np.int64(2), "turns": 40, "from_end": "start-end", "counter_start": 0, "counter_end": 40}
    built, validated = construct(LayerRow, row), LayerRow.model_validate(row)
    assert built == validated and type(built.layer) is int
    # Defaults are filled as validation fills them.
    assert construct(QcLine, {"key": "k", "label": "k", "judged": "record"}) == \
        QcLine(key="k", label="k", judged="record")


def test_as_dict_is_model_dump():
    d = build_design(load_order(sample_orders()[0]), remedies=False)
    for part in (d.hookup, d.winding, d.terminal, d.connections, d.qc_plan):
        assert as_dict(part) == part.model_dump()


@pytest.mark.parametrize("path", transformer_orders(), ids=lambda p: p.stem)
def test_constructed_transformer_design_equals_the_validated_one(path):
    from windsheet.design.transformer_build import build_transformer
    from windsheet.design.transformer_model import TransformerDesign
    from windsheet.order.reader import load_any_order

    with warnings.catch_warnings():
        warnings.simplefilter("error")
        d = build_transformer(load_any_order(path))
        validated = TransformerDesign.model_validate(d.model_dump())
        assert validated == d
        assert _types(as_dict(validated)) == _types(as_dict(d))
        assert json.dumps(validated.model_dump(mode="json")) == json.dumps(d.model_dump(mode="json"))
