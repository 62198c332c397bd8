"""A transformer's bench readings: the readings file's model, parsed once with its units.

Each unit gives, per winding, its ``resistance``; for the first winding its ``inductance``
with the others open; for the others the open-circuit ``ratio`` to the first (a number,
or the two voltages read, ``12.7 V / 230 V``) and the ``polarity`` of the dotted end;
``taps`` (``{primary.tap1279: {ratio: 0.5751}}``); ``leakage`` (the first winding's
inductance with one other shorted); ``insulation`` and ``hipot`` between windings
(``primary-sec1``) and to the core (``primary-core``).
"""

from __future__ import annotations

import math
import re
from typing import Annotated, Any, Literal, Optional, Union

from pydantic import BeforeValidator, Field, ValidationError, model_validator
from pydantic_core import PydanticCustomError

from windsheet.common.errors import InputError

from .measured import HipotReading, InductanceReading, Resistance, _input_error_from
from .reading_types import InstrumentIds, LotId, ReadingModel, ReadingsHeader, Serial, Temperature, Text, _quantity

Insulation = Annotated[float, _quantity("resistance")]


def _ratio(value):
    """A ratio as a plain number, or as the two voltages read: ``12.7 V / 230 V``."""
    if isinstance(value, bool):
        raise PydanticCustomError("ratio", "expected a ratio like 0.0553, or '12.7 V / 230 V'")
    if isinstance(value, (int, float)):
        if not 0 < float(value) < 1e6 or not math.isfinite(float(value)):
            raise PydanticCustomError("ratio", "expected a ratio above 0")
        return float(value)
    if isinstance(value, str):
        m = re.fullmatch(r"\s*(.+?)\s*/\s*(.+?)\s*", value)
        if m:
            try:
                read = _parse_v(m.group(1))
                applied = _parse_v(m.group(2))
            except InputError as exc:
                raise PydanticCustomError("ratio", f"{exc.message} (a ratio reads like '12.7 V / 230 V')") from None
            return read / applied
    raise PydanticCustomError("ratio", "expected a ratio like 0.0553, or the two voltages read, like '12.7 V / 230 V'")


def _parse_v(text):
    from windsheet.order.units import parse_quantity

    return parse_quantity(text, "voltage", "")


def _polarity(value):
    if isinstance(value, str):
        word = value.strip().lower()
        if word in ("in phase", "in-phase", "same", "correct", "ok"):
            return "in phase"
        if word in ("reversed", "reverse", "out of phase", "anti-phase", "antiphase", "inverted"):
            return "reversed"
    raise PydanticCustomError("polarity", "expected 'in phase' or 'reversed'")


def _hipot_word(value):
    """``pass`` alone, or the full reading ``{voltage: 4 kV, duration: 60 s, result: pass}``."""
    return {"result": value} if isinstance(value, (str, bool)) else value


_M = ReadingModel


class WindingReadings(_M):
    resistance: Optional[Resistance] = None
    inductance: Optional[InductanceReading] = None
    ratio: Optional[Annotated[float, BeforeValidator(_ratio)]] = None
    polarity: Optional[Annotated[Literal["in phase", "reversed"], BeforeValidator(_polarity)]] = None


class TapReadings(_M):
    ratio: Annotated[float, BeforeValidator(_ratio)]


class TransformerUnit(_M):
    serial: Serial
    ambient: Optional[Temperature] = None
    windings: dict[str, WindingReadings] = Field(default_factory=dict)
    taps: dict[str, TapReadings] = Field(default_factory=dict)
    leakage: dict[str, InductanceReading] = Field(default_factory=dict)
    insulation: dict[str, Insulation] = Field(default_factory=dict)
    hipot: dict[str, Annotated[HipotReading, BeforeValidator(_hipot_word)]] = Field(default_factory=dict)
    waive: dict[str, Text] = Field(default_factory=dict)
    notes: Optional[Text] = None
    wire_lot: Optional[Union[LotId, dict[str, LotId]]] = None
    core_lot: Optional[LotId] = None
    instrument_ids: InstrumentIds = None

    @model_validator(mode="before")
    @classmethod
    def _blanks_unread(cls, data):
        # A line the form left empty is not read (the unit signs off incomplete), not an error.
        if isinstance(data, dict):
            data = dict(data)
            for head in ("windings", "taps", "leakage", "insulation", "hipot"):
                if isinstance(data.get(head), dict):
                    data[head] = {k: v for k, v in data[head].items() if v is not None}
                elif data.get(head, 0) is None:
                    del data[head]
            for k, v in list(data.get("taps", {}).items()):
                if isinstance(v, dict) and v.get("ratio") is None:
                    del data["taps"][k]
        return data


class TransformerReadings(ReadingsHeader):
    units: list[TransformerUnit] = Field(min_length=1, max_length=10_000)


def transformer_readings(data: Any) -> TransformerReadings:
    """Validate a transformer's readings document; faults raise InputError at their path."""
    if not isinstance(data, dict):
        raise InputError("measured", "expected a mapping with 'job' and 'units'")
    try:
        return TransformerReadings.model_validate(data)
    except ValidationError as exc:
        raise _input_error_from(exc) from None


def is_transformer_readings(data: Any) -> bool:
    """True when a readings document's units are read winding by winding."""
    units = data.get("units") if isinstance(data, dict) else None
    return isinstance(units, list) and any(isinstance(u, dict) and "windings" in u for u in units)
