"""The order: one YAML file per job, parsed once into SI values.

This is the only place units are read.  Every fault raises
:class:`~windsheet.common.errors.InputError` naming the YAML path of the field and
what was expected.
"""


import hashlib
import math
import os
import re
from typing import Annotated, Any, Literal, Optional

from pydantic import Field, ValidationError, model_validator

from windsheet.common.errors import InputError, field_name, join_path
from windsheet.common.fileio import read_limited
from windsheet.common.yaml_reading import parse_yaml_bytes
from windsheet.physics.hookup import (NAMED_HOOKUPS, STRAND_IDS, HookupError, brought_out, check_hookup, named_hookup,
                                     pin_assignment)
from .fields import (Energy, Fraction, Frequency, Frequency0, PeakVoltage, PulseWidth, RiseTime, Temperature,
                     known_word, lowered, quantity)
# The order's parts live in .parts; those other modules take from here are named again on purpose.
from .parts import (_M, BobbinForm, CylinderForm, Form, Job, LayerTape, LeadRoutes,  # noqa: F401
                    MarginTape, ToroidForm, Winding, WireSpec)
from .units import SINE_CREST, parse_quantity, read_quantity

#: Orders are small; anything larger is not an order. [bytes]
MAX_ORDER_BYTES = 256 * 1024
MAX_DEPTH = 24


# ---------------------------------------------------------------- YAML, safely
def read_yaml_bytes(data: bytes, what: str = "order", max_bytes: int = MAX_ORDER_BYTES, label: str = ""):
    """Parse YAML bytes into a mapping, refusing anything hostile (see :mod:`windsheet.common.fileio`)."""
    doc = parse_yaml_bytes(data, label or what, max_bytes=max_bytes, max_depth=MAX_DEPTH)
    if not isinstance(doc, dict):
        raise InputError(label, f"expected the {what} to be a YAML mapping of sections, got {_yaml_kind(doc)}")
    return doc


def _yaml_kind(doc) -> str:
    if doc is None:
        return "nothing (the file is empty)"
    if isinstance(doc, list):
        return "a list"
    if isinstance(doc, str):
        return "a single piece of text"
    if isinstance(doc, (int, float)):
        return "a single number"
    return f"a single {type(doc).__name__} value"


class Duty(_M):
    """The working duty, its amplitudes as the engine reads them.

    ``voltage`` (and ``between_windings``) is the rms for a sine duty, the
    value for a dc duty; a sine voltage given as ``V peak`` is divided by
    sqrt(2).  A pulse duty gives its peak (and ``rise_time``); ``voltage`` is
    then the rms of the sine of that peak, so the quasi-static voltage map
    shows the pulse's peak between turns.  ``voltage_form`` records how the
    order gave the voltage: ``rms`` (also when no qualifier was written, read
    as rms as before), ``peak`` or ``dc``.  ``current`` is rms (dc for a dc duty).
    """

    voltage: Annotated[float, Field(ge=0.0, allow_inf_nan=False)]
    voltage_form: Literal["rms", "peak", "dc"] = "rms"
    waveform: Literal["sine", "dc", "pulse"] = "sine"
    frequency: Frequency0 = 0.0
    current: Annotated[float, Field(ge=0.0, allow_inf_nan=False)] = 0.0
    ambient: Temperature = 25.0
    operating_temperature: Optional[Temperature] = None
    between_windings: Optional[Annotated[float, Field(ge=0.0, allow_inf_nan=False)]] = None
    rise_time: Optional[RiseTime] = None
    #: Capacitance from the whole winding to ground, core or shield, for a fast edge's
    #: distribution; by default windsheet.physics.fast_front.DEFAULT_GROUND_CAPACITANCE_F (10 pF), stated.
    ground_capacitance: Optional[Annotated[float, quantity("capacitance")]] = None
    #: A pulse duty's repetition: pulses per second, and each pulse's width or the energy it leaves
    #: in the winding; the heating is computed from them (no current is assumed).
    #: ``current: voltage-driven`` says the winding sits across the duty voltage, so its current is
    #: the voltage over its impedance (a relay or solenoid coil); otherwise no current is assumed.
    voltage_driven: bool = False
    repetition_rate: Optional[Frequency] = None
    pulse_width: Optional[PulseWidth] = None
    pulse_energy: Optional[Energy] = None

    @model_validator(mode="before")
    @classmethod
    def _amplitudes(cls, data):
        return duty_amplitudes(data) if isinstance(data, dict) else data

    @model_validator(mode="after")
    def _pulse_train(self):
        given = [k for k in ("repetition_rate", "pulse_width", "pulse_energy") if getattr(self, k) is not None]
        if given and self.waveform != "pulse":
            raise InputError(f"duty.{given[0]}", "belongs to a pulse duty (waveform: pulse)")
        if self.pulse_width is not None and self.pulse_energy is not None:
            raise InputError("duty.pulse_energy", "give the pulse's width or its energy, not both: "
                             "the heating is computed from one of them")
        if self.pulse_width is not None and self.repetition_rate is not None \
                and self.pulse_width * self.repetition_rate >= 1.0:
            raise InputError("duty.pulse_width", "is as long as the repetition period or longer: "
                             "the pulses would overlap")
        return self

    @property
    def voltage_peak(self) -> float:
        """Peak of the duty voltage [V]: sqrt(2) x rms on ac, the value on dc."""
        return self.voltage * SINE_CREST if self.frequency > 0 else self.voltage


_DUTY_FORMS = {
    # waveform -> {qualifier given: (form recorded, what the engine gets from the value)}
    "sine": {None: ("rms", 1.0), "rms": ("rms", 1.0), "peak": ("peak", 1.0 / SINE_CREST)},
    "dc": {None: ("dc", 1.0), "dc": ("dc", 1.0)},
    "pulse": {None: ("peak", None), "peak": ("peak", None)},
}
_CURRENT_FORMS = {"sine": (None, "rms", "peak"), "dc": (None, "dc"), "pulse": (None, "rms")}
_DUTY_EXAMPLES = {"sine": "'230 V' (rms), '230 V rms' or '325 V peak'", "dc": "'24 V' or '24 V dc'",
                  "pulse": "'600 V peak'"}


def duty_amplitudes(data: dict) -> dict:
    """The duty section with its voltages and current read into engine values [V], [A].

    Reads ``waveform`` (default: ``dc`` at 0 Hz, else ``sine``) and each
    amplitude's qualifier; a combination that contradicts itself (``24 V dc``
    at 50 Hz) is refused at the field.  Raises InputError with the field's path.
    """
    data = dict(data)
    if "voltage_form" in data:
        raise InputError("duty.voltage_form", "is read from the voltage as written ('230 V rms', "
                         "'325 V peak', '24 V dc'); leave it out")
    freq = 0.0
    if "frequency" in data:
        freq = parse_quantity(data["frequency"], "frequency", "duty.frequency", allow_zero=True)
    given = data.get("waveform")
    if given is not None and known_word(given, _DUTY_FORMS) is None:
        raise InputError("duty.waveform", "expected sine, dc or pulse")
    volts = read_quantity(data["voltage"], "voltage", "duty.voltage", allow_zero=True) if "voltage" in data else None
    waveform = lowered(given) if given is not None else (
        "dc" if freq == 0 and (volts is None or volts.qualifier in (None, "dc")) else "sine")
    if waveform == "sine" and freq == 0:
        raise InputError("duty.frequency", "an ac (sine) duty needs its frequency, like '50 Hz'; "
                         "for a dc duty write the voltage as '24 V dc'")
    if waveform == "dc" and freq > 0:
        raise InputError("duty.frequency", "a dc duty has no frequency: give 0 Hz or leave it out")
    if waveform == "pulse" and data.get("rise_time") is None:
        raise InputError("duty.rise_time", "a pulse duty needs its rise time, like '100 ns'")
    data["waveform"] = waveform
    for key in ("voltage", "between_windings"):
        reading = volts if key == "voltage" else (
            read_quantity(data[key], "voltage", f"duty.{key}", allow_zero=True) if data.get(key) is not None else None)
        if reading is None:
            continue
        forms = _DUTY_FORMS[waveform]
        if reading.qualifier == "dc" and freq > 0:
            raise InputError(f"duty.{key}", f"{data[key]!r} is dc, but duty.frequency is {data['frequency']!r}: "
                             "give 0 Hz for a dc duty, or the ac voltage as rms or peak")
        if reading.qualifier not in forms:
            raise InputError(f"duty.{key}", f"a {waveform} duty's voltage is written like "
                             f"{_DUTY_EXAMPLES[waveform]}; got {data[key]!r}")
        form, factor = forms[reading.qualifier]
        if factor is None:  # a pulse: the sine of the same peak on ac, the peak itself at 0 Hz
            factor = 1.0 / SINE_CREST if freq > 0 else 1.0
        data[key] = reading.value * factor
        if key == "voltage":
            data["voltage_form"] = form
    if "voltage_driven" in data:
        raise InputError("duty.voltage_driven", "is not a field: write current: voltage-driven")
    if isinstance(data.get("current"), str) and lowered(data["current"]) in ("voltage-driven", "voltage driven"):
        if waveform == "pulse":
            raise InputError("duty.current", "a pulse across an inductance has no steady current: give the "
                             "pulse's repetition_rate and pulse_width (or pulse_energy), or its rms current")
        data["current"], data["voltage_driven"] = 0.0, True
    if data.get("current") is not None and not data.get("voltage_driven"):
        amps = read_quantity(data["current"], "current", "duty.current", allow_zero=True)
        if amps.qualifier not in _CURRENT_FORMS[waveform]:
            raise InputError("duty.current", f"a {waveform} duty's current is its "
                             f"{'dc value' if waveform == 'dc' else 'rms'}, like '0.2 A'; got {data['current']!r}")
        data["current"] = amps.value / SINE_CREST if amps.qualifier == "peak" else amps.value
    return data


class Tolerances(_M):
    inductance: Fraction = 0.10
    resistance: Fraction = 0.05
    #: Strands compared with each other (L and R); default half the L and R tolerances.
    strand_balance: Optional[Fraction] = None


class Insulation(_M):
    derating: Fraction = 0.25
    #: Least insulation resistance accepted strand to strand and to core (100 MΩ: common practice).
    min_resistance: Annotated[float, quantity("resistance")] = 100e6
    #: Measured PDIV (20 °C, peak) of touching turns of this wire as built; by default estimated.
    pdiv: Optional[PeakVoltage] = None
    #: Margin off the hot inception voltage beyond the air's density at the hot spot (computed).
    hot_pdiv_derating: Fraction = 0.15


class Test(_M):
    frequency: Frequency = 1e3
    #: The ring (surge comparison) test's capacitor; the traveller then asks for the ring wave.
    ring_capacitor: Optional[Annotated[float, quantity("capacitance")]] = None


class OrderDoc(_M):
    job: Job
    form: Form
    wire: WireSpec
    winding: Winding
    hookup: Any
    #: Strand end -> pin (``{A.start: 1, B.finish: 4}``), checked against the hookup in :class:`Order`.
    terminations: Any = None
    duty: Duty
    tolerances: Tolerances = Tolerances()
    insulation: Insulation = Insulation()
    test: Test = Test()


# ---------------------------------------------------------------- the order
class Order:
    """A validated order: the parsed document plus derived, checked pieces."""

    def __init__(self, doc: OrderDoc, source: bytes, path: str | None):
        self.doc = doc
        self.source = source
        self.path = path
        self.sha256 = hashlib.sha256(source).hexdigest()
        self.hookup_name, self.joins, self.terminals = _hookup(doc.hookup, doc.winding.strands)
        w = doc.winding
        if (w.turns is None) == (w.target_inductance is None):
            raise InputError("winding", "give either turns (per strand) or target_inductance, not both or neither")
        if isinstance(w.layer_tape, LayerTape):
            self.tape, self.tape_rating, self.tape_material = (w.layer_tape.thickness, w.layer_tape.rating,
                                                               w.layer_tape.material)
        else:
            self.tape, self.tape_rating, self.tape_material = (w.layer_tape or 0.0), None, "polyester tape"
        f = doc.form
        if isinstance(f, ToroidForm):
            if f.outer_diameter <= f.inner_diameter:
                raise InputError("form.outer_diameter", "must be larger than form.inner_diameter")
            if (f.al is None) == (f.permeability is None):
                raise InputError("form", "a toroid needs either al (like '2.2 uH', per turn squared) or permeability")
            if not 0 <= math.degrees(f.gap) < 180:
                raise InputError("form.gap", "expected an angle between 0 deg and 180 deg, like '30 deg'")
        if isinstance(f, BobbinForm) and (f.diameter is None) == (f.mean_turn_length is None):
            raise InputError("form", "a bobbin needs either diameter or mean_turn_length")
        self.pins = []
        if doc.terminations is not None:
            out = brought_out(self.hookup_name, self.terminals, self.strand_ids)
            try:
                self.pins = pin_assignment(doc.terminations, self.joins, self.terminals, out, w.strands)
            except HookupError as exc:
                raise InputError(exc.where, str(exc)) from None
        m = getattr(f, "margin_tape", None)
        self.margin, self.margin_material = ((m.width, m.material) if isinstance(m, MarginTape)
                                             else (m or 0.0, "margin tape"))
        self.margin_thickness = m.thickness if isinstance(m, MarginTape) else None
        _check_construction(doc, self.pins, self.hookup_name)
        if isinstance(f, ToroidForm) and "start" in w.model_fields_set:
            raise InputError("winding.start", "applies to a cylinder or bobbin; a toroid starts at the mark "
                             "on its top face and leaves form.gap free")
        if w.start.end == "centre" and w.start.offset:
            raise InputError("winding.start.offset", "a centred winding takes no offset; "
                             "give from: start-end or finish-end with the offset")
        job = doc.job
        if job.units is not None and len(job.units) != job.quantity:
            raise InputError("job.units", f"lists {len(job.units)} serial numbers for a quantity of {job.quantity}")
        if job.units is not None and len(set(job.units)) != len(job.units):
            raise InputError("job.units", "serial numbers must be unique")
        _check_fractions(doc)
        if doc.duty.between_windings is not None and self.hookup_name != "separate":
            raise InputError("duty.between_windings", f"applies to separate windings only; this order's strands "
                             f"are joined ({self.hookup_name}), so there is no voltage between windings — "
                             "leave it out")

    @property
    def units(self) -> list[str]:
        j = self.doc.job
        return list(j.units) if j.units else [f"{j.number}-{k:02d}" for k in range(1, j.quantity + 1)]

    @property
    def strand_ids(self) -> list[str]:
        return list(STRAND_IDS[: self.doc.winding.strands])


def _check_construction(doc: OrderDoc, pins, hookup_name: str) -> None:
    """Pins, the core's assembly, a toroid's arrangement and the cover: what the shop can build."""
    f, w = doc.form, doc.winding
    header = getattr(f, "pin_header", None)
    if pins and header is None and not isinstance(f, BobbinForm):
        raise InputError("terminations", f"a plain {f.kind} has no pins to terminate on: give form.pin_header "
                         "(end, pitch, pins) for the header the pins stand in, or leave the leads free")
    if header is not None:
        for t in pins:
            name = str(t["pin"])
            if not (name.isdigit() and 1 <= int(name) <= header.pins):
                raise InputError(f"terminations.{t['ends'][0]}", f"pin {name} is not on the header: "
                                 f"form.pin_header has pins 1 to {header.pins}")
    if isinstance(f, BobbinForm) and f.assembly is not None:
        gap = f.gap.thickness if f.gap is not None else None
        if f.assembly == "interleaved" and gap:
            raise InputError("form.assembly", "an interleaved E/I stack has no gap: give assembly: butt-gapped "
                             "for a spacer in the joint, or gap: 0")
        if f.assembly != "interleaved" and not gap:
            raise InputError("form.gap", f"a {f.assembly} core needs its gap, like 0.3 mm")
        if f.assembly == "ground-centre-leg" and f.gap.material:
            raise InputError("form.gap.material", "a gap ground in the centre leg has no spacer")
    arr = w.arrangement
    if arr.kind == "sectors":
        if not isinstance(f, ToroidForm):
            raise InputError("winding.arrangement", "sectors are for windings on a toroid")
        if w.strands < 2:
            raise InputError("winding.arrangement", "sectors share the ring between several windings; "
                             "one winding is wound together")
        if hookup_name != "separate":
            raise InputError("winding.arrangement", "each sector is a winding of its own: hookup: separate")
        if arr.sectors is not None:
            if len(arr.sectors) != w.strands:
                raise InputError("winding.arrangement.sectors", f"give one angle per winding ({w.strands})")
            if sum(arr.sectors) + w.strands * f.gap > 2 * math.pi + 1e-9:
                raise InputError("winding.arrangement.sectors", "the sectors and a form.gap between each pair "
                                 "take more than the whole ring (360 deg)")
    elif arr.sectors is not None:
        raise InputError("winding.arrangement.sectors", "sectors are given with arrangement sectors")
    wrap = w.outer_wrap
    if wrap is not None and wrap.overlap is not None:
        toroid = isinstance(f, ToroidForm)
        if toroid and wrap.overlap.length is not None:
            raise InputError("winding.outer_wrap.overlap", "tape through a toroid's hole overlaps by a share of "
                             "its width, like 50 %")
        if not toroid and wrap.overlap.fraction is not None:
            raise InputError("winding.outer_wrap.overlap", "a wrap round a cylinder or bobbin overlaps its seam "
                             "by a length, like 10 mm")
        if wrap.overlap.fraction is not None and not 0 < wrap.overlap.fraction < 1:
            raise InputError("winding.outer_wrap.overlap", "expected a share of the tape's width above 0 % and "
                             "below 100 %")


#: The narrowest tolerance band read: a bench LCR meter's or milliohm meter's basic accuracy is
#: about 0.1 % (common practice), so a narrower band is judged on the meter's error. [1]
MIN_TOLERANCE = 0.001


def _check_fractions(doc: OrderDoc):
    """Percentages whose meaning ends at 100 %: a 150 % tolerance accepts a negative inductance;
    a 0 % tolerance is a band no reading can meet."""
    tol, ins = doc.tolerances, doc.insulation
    for path, value in (("tolerances.inductance", tol.inductance), ("tolerances.resistance", tol.resistance),
                        ("tolerances.strand_balance", tol.strand_balance),
                        ("insulation.hot_pdiv_derating", ins.hot_pdiv_derating)):
        if value is None:
            continue
        if value >= 1.0:
            raise InputError(path, f"expected a percentage below 100 %, got {value * 100:g} %")
        if path.startswith("tolerances.") and value < MIN_TOLERANCE:
            raise InputError(path, f"expected a tolerance of at least {MIN_TOLERANCE * 100:g} % (a bench meter's "
                                   f"accuracy; a narrower band is judged on the meter's error), got {value * 100:g} %")
    if not 0 < ins.derating <= 1.0:
        raise InputError("insulation.derating", "expected the share of the breakdown voltage allowed in service, "
                         f"above 0 % and at most 100 % (common practice 25 %), got {ins.derating * 100:g} %")


def _hookup(raw, strands):
    try:
        if isinstance(raw, str):
            name = raw.strip().lower()
            if name not in NAMED_HOOKUPS:
                raise HookupError("hookup", f"unknown hookup {raw!r}; expected one of {', '.join(NAMED_HOOKUPS)} "
                                  "or a mapping {joins: [[A.finish, B.start]], terminals: [A.start, B.finish]}")
            joins, terms = named_hookup(name, strands)
            if name != "separate":
                check_hookup(joins, terms, strands)
            return name, joins, terms
        if isinstance(raw, dict):
            extra = set(raw) - {"joins", "terminals"}
            if extra:
                raise HookupError(f"hookup.{field_name(sorted(map(str, extra))[0])}",
                                  "unknown field; a hookup has joins and terminals")
            if "terminals" not in raw:
                raise HookupError("hookup.terminals", "is required: the two strand ends brought out, like [A.start, B.finish]")
            joins = raw.get("joins") or []
            if not isinstance(joins, list):
                raise HookupError("hookup.joins", "expected a list of joins, like [[A.finish, B.start]]")
            terms = raw["terminals"]
            check_hookup(joins, terms, strands)
            norm = lambda e: f"{e.split('.')[0].strip().upper()}.{e.split('.')[1].strip().lower()}"  # noqa: E731
            return "custom", [[norm(e) for e in j] for j in joins], [norm(e) for e in terms]
        raise HookupError("hookup", f"expected one of {', '.join(NAMED_HOOKUPS)} or a mapping with joins and terminals")
    except HookupError as exc:
        raise InputError(exc.where, str(exc)) from None


_FRIENDLY = {
    "missing": "is required",
    "extra_forbidden": "is not a known field",
    "model_type": "expected a section of fields (name: value)",
    "model_attributes_type": "expected a section of fields (name: value)",
    "dict_type": "expected a mapping (name: value)",
    "string_type": "expected text",
    "list_type": "expected a list",
    "int_type": "expected a whole number, like 60",
    "int_from_float": "expected a whole number, like 60",
    "int_parsing": "expected a whole number, like 60",
}


def _validation_to_input_error(exc: ValidationError) -> InputError:
    err = exc.errors()[0]
    loc = [p for p in err["loc"] if p not in ("cylinder", "toroid", "bobbin")
           and not (isinstance(p, str) and p.startswith(("function-", "int", "literal", "LayerTape", "constrained")))]
    loc = [p for p in loc if p not in ("float", "str", "bool", "[key]")]
    path = join_path(*loc)
    kind = err["type"]
    msg = _FRIENDLY.get(kind) or err["msg"]
    if msg.startswith("Value error, "):
        msg = msg[len("Value error, "):]
    if kind == "union_tag_invalid" or kind == "union_tag_not_found":
        msg = "expected kind: cylinder, toroid or bobbin"
        path = path or "form"
        if not path.endswith("kind"):
            path = f"{path}.kind"
    if kind == "extra_forbidden":
        msg = "is not a known field (check the spelling)"
    return InputError(path, msg)


def parse_order(data: bytes, path: str | None = None, raw: dict | None = None) -> Order:
    """Validate an order from the bytes of its YAML file (``raw``: those bytes already parsed, not parsed again)."""
    if raw is None:
        raw = read_yaml_bytes(data, "order", label=path or "order")
    raw = {str(k): v for k, v in raw.items()}
    try:
        doc = OrderDoc.model_validate(raw)
    except ValidationError as exc:
        raise _validation_to_input_error(exc) from None
    order = Order(doc, data, path)
    order.imperial = written_in_imperial(raw)
    return order


_IMPERIAL = re.compile(r"^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*(in|inch|inches|mil|mils|thou|ft|foot|feet)\s*$",
                       re.IGNORECASE)


def written_in_imperial(raw) -> bool:
    """Whether the order writes a length in inches (mil, ft) or a wire size in AWG.

    The sheets then print inches (and the AWG size) beside millimetres.
    """
    if isinstance(raw, dict):
        return any(written_in_imperial(v) for v in raw.values())
    if isinstance(raw, list):
        return any(written_in_imperial(v) for v in raw)
    return isinstance(raw, str) and (bool(_IMPERIAL.match(raw)) or
                                     bool(re.fullmatch(r"\s*\d+(/0)?\s*awg\s*", raw, re.IGNORECASE)))


def load_order(path) -> Order:
    """Read and validate the order at ``path``."""
    return parse_order(read_limited(path, MAX_ORDER_BYTES), os.fspath(path))
