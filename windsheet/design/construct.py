"""A design's models filled from values the code itself just computed, without validating them again.

Validating a :class:`~windsheet.design.model.Design` makes pydantic build the
schema of all of its ~70 models first: about a third of ``windsheet size``'s own
time.  A design that :mod:`windsheet.design.build` just computed needs no
checking, so it is put together field by field (``model_construct``, nested
models built the same way) and the schemas are built only when something reads
JSON back or writes it (the register, ``size --json``, ``windsheet schema``).
``tests/test_design_construct.py`` holds that, on every sample, the constructed
design equals the validated one and dumps the same JSON.
"""

from __future__ import annotations

import numbers
import typing
from functools import lru_cache

from pydantic import BaseModel

_NONE = type(None)


def construct(cls: type[BaseModel], data) -> BaseModel:
    """An instance of ``cls`` from ``data`` (a dict, keyed by field name or alias, or a model), unvalidated.

    Nested models, lists and dicts of models are built the same way; numbers are
    made the Python type the field declares (``float``, ``int``), as validation
    would; defaults fill what ``data`` leaves out.

    Examples
    --------
    >>> from windsheet.design.model import Energy
    >>> construct(Energy, {"magnetic_J": 2}).magnetic_J
    2.0
    """
    if type(data) is cls:
        return data
    if isinstance(data, BaseModel):
        data = dict(data)
    fields, aliases = _fields(cls)
    values = {}
    for key, value in data.items():
        name = aliases.get(key, key)
        values[name] = _convert(fields[name], value)
    return cls.model_construct(**values)


def as_dict(model: BaseModel, include: typing.Optional[set[str]] = None) -> dict:
    """``model`` as plain dicts and lists, keyed by field name: ``model_dump()`` without building a serializer.

    Examples
    --------
    >>> from windsheet.design.model import Energy
    >>> as_dict(Energy(magnetic_J=0.5))
    {'magnetic_J': 0.5}
    """
    return {name: _plain(getattr(model, name)) for name in type(model).model_fields
            if include is None or name in include}


def _plain(value):
    if isinstance(value, BaseModel):
        return as_dict(value)
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    return value


@lru_cache(maxsize=None)
def _fields(cls: type[BaseModel]) -> tuple[dict, dict]:
    # pydantic resolved the annotations when it made the class; a forward reference it could not
    # is resolved here, once per model.
    fields = {name: f.annotation for name, f in cls.model_fields.items()}
    if any(isinstance(tp, (str, typing.ForwardRef)) for tp in fields.values()):
        hints = typing.get_type_hints(cls)
        fields = {name: hints[name] for name in fields}
    aliases = {f.alias: name for name, f in cls.model_fields.items() if f.alias}
    return fields, aliases


def _convert(tp, value):
    if value is None:
        return None
    origin = typing.get_origin(tp)
    if origin is typing.Annotated:
        return _convert(typing.get_args(tp)[0], value)
    if origin is typing.Union:
        args = [a for a in typing.get_args(tp) if a is not _NONE]
        if len(args) == 1:
            return _convert(args[0], value)
        return _scalar(value)  # unions here are of scalars only (a setting's value)
    if origin is list:
        (item,) = typing.get_args(tp)
        return [_convert(item, v) for v in value]
    if origin is dict:
        _, item = typing.get_args(tp)
        return {k: _convert(item, v) for k, v in value.items()}
    if isinstance(tp, type) and issubclass(tp, BaseModel):
        return construct(tp, value)
    if tp is float and isinstance(value, numbers.Real) and not isinstance(value, bool):
        return float(value)
    if tp is int and isinstance(value, numbers.Integral) and not isinstance(value, bool):
        return int(value)
    return _scalar(value)


def _scalar(value):
    # A numpy scalar that slipped through becomes the Python number it stands for.
    item = getattr(value, "item", None)
    return item() if item is not None and type(value).__module__ == "numpy" else value
