"""Measured values from the test bench, read from YAML into SI floats.

Shape of the file (every quantity carries its unit)::

    job: HL-0412
    revision: B                 # optional; checked against the order
    inspector: R. Amadi         # optional; the command line may give it
    date: 2025-03-14            # optional
    instruments: LCR bridge ... # optional free text
    ambient: 21 degC            # default for every unit
    test_frequency: 1 kHz       # default for direct inductance readings
    units:
      - serial: HL-0412-01
        ambient: 22.5 degC      # optional override
        strands:
          A: {inductance: 61.2 uH, resistance: 1.182 ohm, turns: 120}
          B: {inductance: {resonant_frequency: 205 kHz, capacitor: 10 nF}, resistance: 1.190 ohm}
        before_joint:           # series-aiding / series-opposing pairs, read before joining
          A-B: {series_aiding: 243 uH, series_opposing: 2.4 uH}
        terminals: {inductance: 243 uH, resistance: 2.37 ohm}
        insulation: {strand_to_strand: 5 Gohm, to_core: 10 Gohm, test_voltage: 500 V}
        hipot: {voltage: 1500 V, duration: 60 s, leakage: 0.4 mA, result: pass}
        continuity: {A-B: open}     # or {strand_to_strand: shorted}
        wire_lot: R-2291            # optional traceability: the reel or lot (or {A: R-2291, B: R-2292})
        core_lot: GE50-1107         # the form's or core's lot
        instrument_ids: {lcr: LCR-07, ohmmeter: DMM-12, hipot: HV-03}

``wire_lot``, ``core_lot`` and ``instrument_ids`` may also be given once at the
top of the file for every unit; a unit's own value replaces the file's.

An inductance is either read directly (``61.2 uH``, optionally as
``{value: 61.2 uH, test_frequency: 10 kHz}``) or rung against a known
capacitor, ``{resonant_frequency: ..., capacitor: ...}`` (add
``stray_capacitance`` when the coil's own capacitance is not negligible
beside the capacitor; a capacitor 100 times larger keeps the error near 1 %).
Any inductance or resistance may be ``open`` when the meter shows no
continuity (an insulation resistance read ``open`` is above the tester's
range).  ``q`` is the LCR meter's Q at the test frequency, a plain number, or
its dissipation factor as ``D 0.035`` (or ``{D: 0.035}``).  ``ring`` is the
ring (surge comparison) test: ``{capacitor: 10 nF, frequency: 48.3 kHz,
decay: 0.82}``, decay the ratio of successive peaks of one polarity.
"""

from __future__ import annotations

import re
from typing import Annotated, Any, Literal, Optional, Union

from pydantic import BeforeValidator, ConfigDict, Field, ValidationError, field_validator, model_validator
from pydantic_core import PydanticCustomError

from windsheet.common.errors import InputError, join_path
from windsheet.order.units import parse_quantity
from windsheet.physics.wire import resistance_to_20C as resistance_at_20C  # noqa: F401 - re-exported for sign-off

from .reading_formulas import resonance_inductance
from .reading_types import (Capacitance, Current, Duration, Frequency, InstrumentIds, LotId, ReadingModel,
                            ReadingsHeader, Serial, Temperature, Text, Voltage, _quantity)

STRAND_ID = re.compile(r"^[A-Z]$")
PAIR_ID = re.compile(r"^([A-Z])-([A-Z])$")


def _resistance_or_open(value):
    if isinstance(value, str) and value.strip().lower() in ("open", "open circuit", "ol"):
        return {"open": True}
    try:
        return {"value": parse_quantity(value, "resistance", "", allow_zero=True)}
    except InputError as exc:
        raise PydanticCustomError("quantity", f"{exc.message} (or 'open' for no continuity)") from None


_Model = ReadingModel

class ResistanceReading(_Model):
    """A resistance reading: ``value`` in ohms, or ``open`` (no continuity)."""

    value: Optional[float] = None
    open: bool = False


Resistance = Annotated[ResistanceReading, BeforeValidator(_resistance_or_open)]
InsulationResistance = Annotated[float, _quantity("resistance")]


class _Parsed(float):
    """An inductance already parsed by the short form ``inductance: 61.2 uH``."""


def _inductance_value(value):
    if isinstance(value, _Parsed):
        return float(value)
    try:
        return parse_quantity(value, "inductance", "")
    except InputError as exc:
        raise PydanticCustomError("quantity", exc.message) from None


_OPEN_WORDS = ("open", "open circuit", "ol")


class InductanceReading(_Model):
    """An inductance read directly, rung against a known capacitor, or ``open`` (no path)."""

    value: Optional[Annotated[float, BeforeValidator(_inductance_value)]] = None
    open: bool = False
    resonant_frequency: Optional[Frequency] = None
    capacitor: Optional[Capacitance] = None
    #: Coil and fixture capacitance in parallel with the capacitor, if known.
    stray_capacitance: Optional[Capacitance] = None
    test_frequency: Optional[Frequency] = None

    @model_validator(mode="before")
    @classmethod
    def _direct_reading(cls, data):
        if isinstance(data, str) and data.strip().lower() in _OPEN_WORDS:
            return {"open": True}
        if data is None or isinstance(data, (str, int, float)):
            # Parse here so a fault is reported at the field the user wrote.
            try:
                return {"value": _Parsed(parse_quantity(data, "inductance", ""))}
            except InputError as exc:
                raise PydanticCustomError("quantity", exc.message) from None
        return data

    @model_validator(mode="after")
    def _one_method(self):
        rung = self.resonant_frequency is not None or self.capacitor is not None
        rung = rung or self.stray_capacitance is not None
        if self.open:
            if self.value is not None or rung:
                raise PydanticCustomError("reading", "an open reading has no value")
            return self
        if self.value is not None and rung:
            raise PydanticCustomError(
                "reading", "give either a value or resonant_frequency with capacitor, not both")
        if self.value is None:
            if self.resonant_frequency is None or self.capacitor is None:
                raise PydanticCustomError(
                    "reading", "expected an inductance like '61.2 uH', or "
                    "{resonant_frequency: 205 kHz, capacitor: 10 nF}")
            if self.test_frequency is not None:
                raise PydanticCustomError(
                    "reading", "a rung reading is taken at its resonant frequency; drop test_frequency")
        return self

    @property
    def method(self) -> str:
        return "open" if self.open else "direct" if self.value is not None else "ringing"

    @property
    def henries(self) -> float:
        """The inductance read [H]; infinite for an open circuit."""
        if self.open:
            return float("inf")
        if self.value is not None:
            return self.value
        return resonance_inductance(self.resonant_frequency,
                                    self.capacitor + (self.stray_capacitance or 0.0))

    def frequency(self, default: Optional[float]) -> Optional[float]:
        if self.value is None and not self.open:
            return self.resonant_frequency
        return self.test_frequency if self.test_frequency is not None else default

    def describe(self) -> dict:
        if self.open:
            return {"method": "open", "inductance_H": None, "open": True}
        out = {"method": self.method, "inductance_H": self.henries}
        if self.value is None:
            out.update(resonant_frequency_Hz=self.resonant_frequency, capacitor_F=self.capacitor,
                       stray_capacitance_F=self.stray_capacitance)
        return out


class QReading(_Model):
    """An LCR meter's Q at the test frequency (``35``), or its dissipation factor D = 1/Q (``D 0.0286``)."""

    q: Optional[Annotated[float, Field(gt=0, le=1e6, allow_inf_nan=False)]] = None
    d: Optional[Annotated[float, Field(gt=0, le=1e6, allow_inf_nan=False)]] = None

    @model_validator(mode="before")
    @classmethod
    def _forms(cls, data):
        if isinstance(data, bool):
            raise PydanticCustomError("q", _Q_FORMS)
        if isinstance(data, (int, float)):
            out = {"q": data}
        elif isinstance(data, str):
            m = re.fullmatch(r"\s*(?:(q|d)\s*[=:]?\s*)?([0-9]*\.?[0-9]+(?:[eE][-+]?[0-9]+)?)\s*", data, re.I)
            if not m:
                raise PydanticCustomError("q", _Q_FORMS)
            out = {(m.group(1) or "q").lower(): float(m.group(2))}
        elif isinstance(data, dict):
            out = {str(k).strip().lower(): v for k, v in data.items()}
            if any(isinstance(v, bool) or not isinstance(v, (int, float)) for v in out.values() if v is not None):
                raise PydanticCustomError("q", _Q_FORMS)
        else:
            raise PydanticCustomError("q", _Q_FORMS)
        if any(v is not None and not (0 < v <= 1e6) for v in out.values() if isinstance(v, (int, float))):
            raise PydanticCustomError("q", "Q and D are numbers above 0 (and at most 1e6)")
        return out

    @model_validator(mode="after")
    def _one(self):
        if (self.q is None) == (self.d is None):
            raise PydanticCustomError("q", _Q_FORMS)
        return self

    @property
    def value(self) -> float:
        """Q [-]."""
        return self.q if self.q is not None else 1.0 / self.d

    def describe(self) -> str:
        return f"D {self.d:g} read, Q = 1/D" if self.d is not None else f"Q {self.q:g} read"


_Q_FORMS = "expected Q as a number like '35', or the dissipation factor as 'D 0.0286'"


def _decay(value):
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise PydanticCustomError("decay", "expected the ratio of successive peaks, a number like 0.82")
    try:
        x = float(value)
    except ValueError:
        raise PydanticCustomError("decay", "expected the ratio of successive peaks, a number like 0.82") from None
    if not 0 < x <= 1:
        raise PydanticCustomError("decay", "the ratio of successive peaks lies above 0 and at most 1, like 0.82")
    return x


class RingReading(_Model):
    """A ring (surge comparison) test: the capacitor, the ring's frequency and its decay."""

    capacitor: Capacitance
    frequency: Optional[Frequency] = None
    #: Ratio of successive peaks of one polarity.
    decay: Optional[Annotated[float, BeforeValidator(_decay)]] = None


class StrandReadings(_Model):
    inductance: Optional[InductanceReading] = None
    resistance: Optional[Resistance] = None
    q: Optional[QReading] = None
    turns: Optional[Annotated[int, Field(strict=True, ge=1, le=1_000_000)]] = None


class PairReadings(_Model):
    series_aiding: Optional[InductanceReading] = None
    series_opposing: Optional[InductanceReading] = None


class TerminalReadings(_Model):
    inductance: Optional[InductanceReading] = None
    resistance: Optional[Resistance] = None
    q: Optional[QReading] = None


class TapReading(_Model):
    """An extra inductance read between two points of the wired coil.

    Points are ``T1`` / ``T2`` (the terminals as ordered) or a joint named by
    its strand ends as ordered, e.g. ``A.finish+B.start``.
    """

    model_config = ConfigDict(extra="forbid", frozen=True, populate_by_name=True)
    from_: Text = Field(alias="from")
    to: Text
    #: ``open`` when the meter finds no path between the two points.
    inductance: Union[Literal["open"], InductanceReading]

    @field_validator("inductance", mode="before")
    @classmethod
    def _open_word(cls, value):
        if isinstance(value, str) and value.strip().lower() in ("open", "open circuit", "ol"):
            return "open"
        return value

    @property
    def henries(self) -> float:
        """The inductance read [H]; infinite for an open circuit."""
        return float("inf") if self.inductance == "open" else self.inductance.henries


def _over_range(value):
    # An insulation tester's "open" (OL) is a reading above its range.
    if isinstance(value, str) and value.strip().lower() in _OPEN_WORDS:
        return "open"
    return value


InsulationOrOpen = Annotated[Union[Literal["open"], InsulationResistance], BeforeValidator(_over_range)]


class InsulationReadings(_Model):
    strand_to_strand: Optional[InsulationOrOpen] = None
    to_core: Optional[InsulationOrOpen] = None
    # An insulation-resistance tester applies dc: '500 V' or '500 V dc'.
    test_voltage: Optional[Annotated[float, _quantity("voltage", form="dc")]] = None


class HipotReading(_Model):
    voltage: Optional[Voltage] = None
    duration: Optional[Duration] = None
    leakage: Optional[Current] = None
    result: Optional[Literal["pass", "fail"]] = None

    @property
    def complete(self) -> bool:
        return None not in (self.voltage, self.duration, self.result)

    @field_validator("result", mode="before")
    @classmethod
    def _result_words(cls, value):
        if value is None:
            return None
        if isinstance(value, bool):
            raise PydanticCustomError("result", "expected 'pass' or 'fail'")
        if isinstance(value, str):
            word = value.strip().lower()
            if word in ("pass", "passed", "ok"):
                return "pass"
            if word in ("fail", "failed", "breakdown", "flashover"):
                return "fail"
        raise PydanticCustomError("result", "expected 'pass' or 'fail'")


ContinuityWord = Literal["open", "shorted"]


def _continuity_word(value):
    if value is None:
        return None
    if isinstance(value, str):
        word = value.strip().lower()
        if word in ("open", "none", "no continuity", "isolated"):
            return "open"
        if word in ("shorted", "short", "continuity", "closed"):
            return "shorted"
    raise PydanticCustomError("continuity", "expected 'open' (strands isolated) or 'shorted'")


class UnitReadings(_Model):
    serial: Serial
    ambient: Optional[Temperature] = None
    test_frequency: Optional[Frequency] = None
    strands: dict[str, StrandReadings] = Field(default_factory=dict)
    before_joint: dict[str, PairReadings] = Field(default_factory=dict)
    terminals: TerminalReadings = Field(default_factory=TerminalReadings)
    insulation: Optional[InsulationReadings] = None
    hipot: Optional[HipotReading] = None
    continuity: dict[str, Optional[Annotated[ContinuityWord, BeforeValidator(_continuity_word)]]] = Field(
        default_factory=dict)
    taps: list[TapReading] = Field(default_factory=list, max_length=64)
    ring: Optional[RingReading] = None
    #: QC lines the inspector waives for this unit, each with the reason.
    waive: dict[str, Text] = Field(default_factory=dict)
    notes: Optional[Text] = None
    # Traceability (windsheet.records.traceability): stored per unit in the register.
    wire_lot: Optional[Union[LotId, dict[str, LotId]]] = None
    core_lot: Optional[LotId] = None
    instrument_ids: InstrumentIds = None



class MeasuredFile(ReadingsHeader):
    units: list[UnitReadings] = Field(min_length=1, max_length=10_000)


# --- Derived per-unit values (SI) ---------------------------------------------------

def unit_ambient(measured: MeasuredFile, unit: UnitReadings) -> Optional[float]:
    """Ambient temperature for a unit [degC]: its own, else the file's."""
    return unit.ambient if unit.ambient is not None else measured.ambient


def unit_test_frequency(measured: MeasuredFile, unit: UnitReadings) -> Optional[float]:
    """Default test frequency for a unit's direct readings [Hz]."""
    return unit.test_frequency if unit.test_frequency is not None else measured.test_frequency


# --- Loading -------------------------------------------------------------------------

_FRIENDLY = {
    "missing": "is required",
    "extra_forbidden": "is not a known field",
    "dict_type": "expected a mapping of fields",
    "model_type": "expected a mapping of fields",
    "model_attributes_type": "expected a mapping of fields",
    "list_type": "expected a list",
    "int_type": "expected a whole number",
    "int_from_float": "expected a whole number",
    "string_type": "expected text",
    "too_short": "must not be empty",
    "too_long": "has too many entries",
    "literal_error": "expected one of the listed words",
    "greater_than_equal": "must be at least 1",
    "less_than_equal": "is too large",
}


def _input_error_from(exc: ValidationError, prefix: str = "") -> InputError:
    err = exc.errors(include_url=False)[0]
    loc = [p for p in err["loc"] if not (isinstance(p, str) and p.startswith("function-"))]
    path = join_path(*( [prefix] if prefix else []), *loc) if loc else prefix
    message = err["msg"] if err["type"] not in _FRIENDLY else _FRIENDLY[err["type"]]
    if err["type"] in ("int_type", "int_from_float") and isinstance(err.get("input"), str):
        message = "expected a whole number (turns counted, no unit)"
    return InputError(path or "measured", message)


def _check_keys(data: dict) -> None:
    units = data.get("units")
    if not isinstance(units, list):
        return
    for i, unit in enumerate(units):
        if not isinstance(unit, dict):
            continue
        for section, pattern, example in (("strands", STRAND_ID, "A"),
                                          ("before_joint", PAIR_ID, "A-B"),
                                          ("continuity", PAIR_ID, "A-B"),
                                          ("wire_lot", STRAND_ID, "A")):
            block = unit.get(section)
            if not isinstance(block, dict):
                continue
            for key in block:
                ok = isinstance(key, str) and (pattern.match(key) or
                                               (section == "continuity" and key == "strand_to_strand"))
                if ok and pattern is PAIR_ID and key != "strand_to_strand":
                    a, b = PAIR_ID.match(key).groups()
                    ok = a != b
                if not ok:
                    raise InputError(join_path("units", i, section, str(key)),
                                     f"expected a strand name like '{example}'")


def measured_from_dict(data: Any) -> MeasuredFile:
    """Validate a loaded measured-values document; faults raise InputError with their path."""
    if not isinstance(data, dict):
        raise InputError("measured", "expected a mapping with 'job' and 'units'")
    _check_keys(data)
    try:
        return MeasuredFile.model_validate(data)
    except ValidationError as exc:
        raise _input_error_from(exc) from None


