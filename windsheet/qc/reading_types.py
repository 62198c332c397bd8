"""The field types of a readings file: quantities parsed at the edge, text, lot ids, the file's header.

Shared by the coil's readings (:mod:`windsheet.qc.measured`) and a transformer's
(:mod:`windsheet.qc.transformer_readings`), so both read a quantity, a serial or a
lot id the same way and refuse it in the same words.
"""

from __future__ import annotations

import datetime as _dt
import re
from typing import Annotated, Optional, Union

from pydantic import AfterValidator, BaseModel, BeforeValidator, ConfigDict, Field
from pydantic_core import PydanticCustomError

from windsheet.common.errors import InputError
from windsheet.order.units import parse_quantity


def _quantity(dimension: str, *, allow_zero: bool = False, form=None):
    def parse(value):
        try:
            return parse_quantity(value, dimension, "", allow_zero=allow_zero, form=form)
        except InputError as exc:
            raise PydanticCustomError("quantity", exc.message) from None
    return BeforeValidator(parse)


def _text(max_len: int):
    def check(value):
        if isinstance(value, (_dt.date, _dt.datetime)):
            return value.isoformat()
        if isinstance(value, bool) or not isinstance(value, (str, int)):
            raise PydanticCustomError("text", "expected text")
        value = str(value).strip()
        if len(value) > max_len:
            raise PydanticCustomError("text", f"longer than {max_len} characters")
        if any((ord(c) < 32 and c not in "\t") or 127 <= ord(c) < 160 for c in value):
            raise PydanticCustomError("text", "contains control characters; expected plain text on one line")
        return value
    return BeforeValidator(check)


Inductance = Annotated[float, _quantity("inductance")]
Capacitance = Annotated[float, _quantity("capacitance")]
Frequency = Annotated[float, _quantity("frequency")]
Voltage = Annotated[float, _quantity("voltage")]
Current = Annotated[float, _quantity("current", allow_zero=True)]
Duration = Annotated[float, _quantity("time")]
Temperature = Annotated[float, _quantity("temperature")]
Text = Annotated[str, _text(200)]


def _lot_id(value):
    if isinstance(value, bool) or not isinstance(value, (str, int)):
        raise PydanticCustomError("lot", "expected a reel, lot or instrument id like 'R-2291'")
    value = str(value).strip()
    if not LOT_ID.match(value):
        raise PydanticCustomError("lot", "expected a reel, lot or instrument id of letters, digits and "
                                         "'. _ / : # -', at most 64 characters, like 'R-2291'")
    return value


#: Reel, lot and instrument ids: printable, no spaces at the ends, so a search matches exactly.
LOT_ID = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._/:#-]{0,63}$")
LotId = Annotated[str, BeforeValidator(_lot_id)]


def _instrument_map(value):
    if value is not None and not isinstance(value, dict):
        raise PydanticCustomError("ids", "expected each instrument's id by what it measures, like "
                                         "{lcr: LCR-07, hipot: HV-03} (on the bench page: 'lcr: LCR-07; hipot: HV-03')")
    return value


InstrumentIds = Annotated[Optional[dict[str, LotId]], BeforeValidator(_instrument_map)]


def _serial_present(value):
    if not value:
        raise PydanticCustomError("serial", "expected a serial number like 'HL-0412-01'")
    return value


#: A unit's serial number: plain text, not empty.
Serial = Annotated[str, _text(200), AfterValidator(_serial_present)]


class ReadingModel(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class ReadingsHeader(ReadingModel):
    """What a readings file says once for all its units; ``units`` follows in each file's own model."""

    job: Text
    revision: Optional[Text] = None
    inspector: Optional[Text] = None
    date: Optional[Text] = None
    instruments: Optional[Text] = None
    ambient: Optional[Temperature] = None
    test_frequency: Optional[Frequency] = None
    wire_lot: Optional[Union[LotId, dict[str, LotId]]] = None
    core_lot: Optional[LotId] = None
    instrument_ids: InstrumentIds = None
    #: QC lines waived for every unit of the file, each with the reason.
    waive: dict[str, Text] = Field(default_factory=dict)
