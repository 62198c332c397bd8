"""A transformer order: windings of their own on one core, read once into SI.

An order with a ``windings:`` list (instead of one ``wire`` and ``winding``) is a
transformer.  Each winding has its own wire, turns, strands, layers, taps and
duty; ``build`` gives the order they are wound in (a winding may be split into
sections, ``primary/2``, for interleaving); ``barriers`` the insulation between
windings; ``screens`` an electrostatic screen between two windings.  Every
winding section is also a coil order of its own on the form as it stands when
that section is wound (the builds below it added), so each is checked and sized
by the same rules as any coil: :func:`section_order` makes that order.

Faults raise :class:`~windsheet.common.errors.InputError` at the field's YAML
path (``windings[1].wire.size``, ``barriers[0].class``).
"""

from __future__ import annotations

import copy
import hashlib
import math
import re
from typing import Annotated, Literal, Optional, Union

import yaml
from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, ValidationError

from windsheet.common.errors import InputError, join_path

from .document import (BobbinForm, Form, Job, LayerTape, LeadRoutes, MarginTape, Order, ToroidForm, WireSpec,
                       _validation_to_input_error, parse_order, written_in_imperial)
from .fields import (Current, Fraction, FluxDensity, Frequency, Length, Length0, Temperature, Text, Voltage,
                     count_or_auto, lowered)

#: A transformer has from two to this many windings (a screen is not a winding).
MAX_WINDINGS = 6

SOURCES = ("mains", "selv", "earthed", "floating")


class _M(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, str_strip_whitespace=True, populate_by_name=True)


def _winding_name(v):
    if not isinstance(v, str) or not re.fullmatch(r"[a-z][a-z0-9_]{0,11}", v.strip().lower()):
        raise ValueError("expected a short name: a letter, then letters, digits or _ (up to 12), like 'primary' or 'sec1'")
    return v.strip().lower()


Name = Annotated[str, BeforeValidator(_winding_name)]


class WindingDuty(_M):
    """The winding's working voltage and current, rms at the transformer's frequency, and how it is referenced."""

    voltage: Voltage
    current: Current = 0.0
    #: mains: one end at the mains' neutral; selv: safety extra-low voltage; earthed: one end earthed;
    #: floating: no fixed reference (taken at its worst against the others).
    source: Annotated[Literal["mains", "selv", "earthed", "floating"], BeforeValidator(lowered)] = "floating"
    #: The winding's highest voltage to earth, rms, when it differs from its own voltage: a current
    #: transformer's primary bar sits at the line's voltage while a few millivolts lie along it; a
    #: winding connected line to line on a 230/400 V supply is 230 V from earth at either end.
    to_earth: Optional[Voltage] = None


def _turns(v):
    if isinstance(v, str) and v.strip().lower() == "auto":
        return "auto"
    if isinstance(v, bool) or not isinstance(v, int) or not 1 <= v <= 100_000:
        raise ValueError("expected a whole number of turns from 1 to 100000, or auto (from its voltage and the "
                         "first winding's volts per turn)")
    return v


class TransformerWinding(_M):
    name: Name
    wire: WireSpec
    turns: Annotated[Union[int, Literal["auto"]], BeforeValidator(_turns)]
    strands: Annotated[int, Field(ge=1, le=4, strict=True)] = 1
    layers: count_or_auto("layers", 1, 200) = "auto"
    layer_tape: Optional[Union[Length, LayerTape]] = None
    #: Turns from the start at which a tap is brought out.
    taps: list[Annotated[int, Field(ge=1, le=100_000, strict=True)]] = Field(default_factory=list, max_length=8)
    duty: WindingDuty
    #: Triple-insulated wire (its own type test makes the barrier to the windings it faces).
    triple_insulated: bool = False
    margin_tape: Optional[Union[Length, MarginTape]] = None
    identification: Text = ""
    lead_length: Length0 = 0.15
    #: How its leads are dressed, as a coil's ``winding.leads``.
    leads: LeadRoutes = LeadRoutes()


class CoreSpec(_M):
    """What the flux check needs: the core's effective area and the flux density allowed."""

    #: Width of the centre leg the bobbin sits on, and the stack of laminations (EI cores).
    leg_width: Optional[Length] = None
    stack: Optional[Length] = None
    #: Stacking factor of laminations (iron over stack), common practice 0.95.
    stacking_factor: Fraction = 0.95
    #: The flux density the design may reach at the working voltage (below saturation, within the
    #: loss the core's data allow).
    max_flux_density: Optional[FluxDensity] = None


class BarrierTape(_M):
    thickness: Length
    rating: Optional[Voltage] = None
    material: Text = "polyester tape"
    wraps: Annotated[int, Field(ge=1, le=20, strict=True)] = 1


class Barrier(_M):
    """The insulation between two windings next to each other in the build."""

    between: Annotated[list[Name], Field(min_length=2, max_length=2)]
    insulation: Annotated[Literal["functional", "basic", "supplementary", "reinforced"],
                          BeforeValidator(lowered)] = Field(alias="class")
    tape: Optional[BarrierTape] = None
    #: Creepage and clearance along the bobbin from one winding to the other; by default the two
    #: windings' margin tapes.
    creepage: Optional[Length0] = None


class Screen(_M):
    """An electrostatic screen: one wrap of foil between two windings, its ends insulated, one lead out."""

    between: Annotated[list[Name], Field(min_length=2, max_length=2)]
    foil: Length = 0.03e-3
    material: Text = "copper foil"
    lead: Text = "earth"


class TransformerInsulation(_M):
    pollution_degree: Literal[1, 2, 3] = 2
    #: The bobbin's and tapes' material group by CTI; unknown: IIIb, the worst.
    material_group: Annotated[Literal["i", "ii", "iiia", "iiib"], BeforeValidator(lowered)] = "iiib"
    overvoltage_category: Annotated[Literal["i", "ii", "iii", "iv"], BeforeValidator(lowered)] = "ii"
    min_resistance: Annotated[float, Field(gt=0)] = 100e6


class TransformerTolerances(_M):
    inductance: Fraction = 0.25
    resistance: Fraction = 0.10
    #: Turns (voltage) ratio of a secondary to the primary, open circuit.
    ratio: Fraction = 0.01


class TransformerDoc(_M):
    job: Job
    #: voltage: the first winding is driven by a voltage; current: a current transformer, driven by
    #: its primary's current (no regulation is computed).
    purpose: Annotated[Literal["voltage", "current"], BeforeValidator(lowered)] = "voltage"
    form: Form
    core: CoreSpec = CoreSpec()
    windings: Annotated[list[TransformerWinding], Field(min_length=2, max_length=MAX_WINDINGS)]
    build: Optional[list[Annotated[str, Field(max_length=20)]]] = None
    barriers: list[Barrier] = Field(default_factory=list)
    screens: list[Screen] = Field(default_factory=list)
    frequency: Frequency = 50.0
    ambient: Temperature = 25.0
    tolerances: TransformerTolerances = TransformerTolerances()
    insulation: TransformerInsulation = TransformerInsulation()
    test_frequency: Frequency = 1e3


class Section:
    """One pass of a winding in the build: ``index`` of ``count`` sections of ``turns`` turns."""

    def __init__(self, winding: int, name: str, index: int, count: int, turns: int):
        self.winding, self.name, self.index, self.count, self.turns = winding, name, index, count, turns

    @property
    def label(self) -> str:
        return self.name if self.count == 1 else f"{self.name} {self.index + 1}/{self.count}"


class TransformerOrder:
    """A validated transformer order: the document, each winding's turns, the build as sections."""

    def __init__(self, doc: TransformerDoc, raw: dict, source: bytes, path: str | None):
        self.doc, self.raw, self.source, self.path = doc, raw, source, path
        self.sha256 = hashlib.sha256(source).hexdigest()
        self.imperial = written_in_imperial(raw)
        names = [w.name for w in doc.windings]
        for i, n in enumerate(names):
            if n in names[:i]:
                raise InputError(join_path("windings", i, "name"), f"{n!r} names two windings")
        self.turns = _resolve_turns(doc)
        self.sections = _build(doc, self.turns)
        for i, w in enumerate(doc.windings):
            for k, tap in enumerate(w.taps):
                if tap >= self.turns[i]:
                    raise InputError(join_path("windings", i, "taps", k),
                                     f"a tap at turn {tap} lies beyond the winding's {self.turns[i]} turns")
            if w.strands > 1 and w.taps:
                raise InputError(join_path("windings", i, "taps"), "a winding of parallel strands takes no taps here")
        order_of = [s.name for s in self.sections]
        for b, barrier in enumerate(doc.barriers):
            a, c = barrier.between
            for k, n in enumerate((a, c)):
                if n not in names:
                    raise InputError(join_path("barriers", b, "between", k), f"no winding is named {n!r}")
            if not _adjacent(order_of, a, c):
                raise InputError(join_path("barriers", b, "between"),
                                 f"{a} and {c} do not lie next to each other in the build ({', '.join(order_of)})")
        for s, screen in enumerate(doc.screens):
            for k, n in enumerate(screen.between):
                if n not in names:
                    raise InputError(join_path("screens", s, "between", k), f"no winding is named {n!r}")
        if isinstance(doc.form, BobbinForm) and (doc.form.diameter is None) == (doc.form.mean_turn_length is None):
            raise InputError("form", "a bobbin needs either diameter or mean_turn_length")
        if isinstance(doc.form, ToroidForm) and doc.form.al is None:
            raise InputError("form.al", "a transformer's toroid needs its al (inductance per turn squared)")
        job = doc.job
        if job.units is not None and len(job.units) != job.quantity:
            raise InputError("job.units", f"lists {len(job.units)} serial numbers for a quantity of {job.quantity}")
        self.winding_names = names

    @property
    def units(self) -> list[str]:
        j = self.doc.job
        return list(j.units) if j.units else [f"{j.number}-{k:02d}" for k in range(1, j.quantity + 1)]

    def winding(self, name: str) -> TransformerWinding:
        return next(w for w in self.doc.windings if w.name == name)


def _adjacent(order, a, b) -> bool:
    return any({x, y} == {a, b} for x, y in zip(order, order[1:]))


def _resolve_turns(doc: TransformerDoc) -> list[int]:
    """Each winding's turns; ``auto`` from its voltage at the first winding's volts per turn."""
    first = doc.windings[0]
    if first.turns == "auto":
        raise InputError("windings[0].turns", "the first winding sets the volts per turn: give its turns")
    out = []
    for i, w in enumerate(doc.windings):
        if w.turns == "auto":
            n = math.ceil(first.turns * w.duty.voltage / first.duty.voltage - 1e-9)
            if not 1 <= n <= 100_000:
                raise InputError(join_path("windings", i, "turns"), f"auto gives {n} turns; give the turns")
            out.append(int(n))
        else:
            out.append(int(w.turns))
    return out


def _build(doc: TransformerDoc, turns: list[int]) -> list[Section]:
    """The build order as sections; by default the windings in the order listed."""
    names = [w.name for w in doc.windings]
    entries = doc.build if doc.build is not None else names
    parsed = []
    for k, entry in enumerate(entries):
        m = re.fullmatch(r"\s*([A-Za-z][A-Za-z0-9_]{0,11})\s*(?:/\s*([1-9]))?\s*", str(entry))
        if not m or m.group(1).lower() not in names:
            raise InputError(join_path("build", k), f"expected a winding's name, or name/2 for one of its halves; "
                             f"windings: {', '.join(names)}")
        parsed.append((m.group(1).lower(), int(m.group(2) or 1)))
    sections = []
    for i, name in enumerate(names):
        parts = [c for n, c in parsed if n == name]
        if not parts:
            raise InputError("build", f"winding {name!r} is not in the build")
        count = parts[0]
        if any(c != count for c in parts) or len(parts) != count:
            raise InputError("build", f"winding {name!r} appears {len(parts)} time(s): write it once, or {name}/N "
                             "exactly N times to split it into N sections")
        if turns[i] % count:
            raise InputError(join_path("windings", i, "turns"),
                             f"{turns[i]} turns do not split into {count} equal sections")
    seen: dict = {}
    for name, count in parsed:
        i = names.index(name)
        index = seen.get(name, 0)
        seen[name] = index + 1
        sections.append(Section(i, name, index, count, turns[i] // count))
    return sections


def parse_transformer(raw: dict, source: bytes, path: str | None) -> TransformerOrder:
    """Validate a transformer order's mapping."""
    if "winding" in raw or "wire" in raw or "hookup" in raw:
        extra = next(k for k in ("winding", "wire", "hookup") if k in raw)
        raise InputError(extra, "a transformer order gives each winding's wire and turns under windings; "
                         f"remove the top-level {extra}")
    try:
        doc = TransformerDoc.model_validate(raw)
    except ValidationError as exc:
        raise _validation_to_input_error(exc) from None
    return TransformerOrder(doc, raw, source, path)


def section_order(order: TransformerOrder, section: int, build_below: float) -> Order:
    """The coil order of one winding section, on the form as it stands when that section is wound.

    Parameters
    ----------
    order : TransformerOrder
    section : int
        Index of the section in the build.
    build_below : float
        Radial build of everything wound before it (windings, barriers, screens). [m]

    Returns
    -------
    Order
        A single-winding order (hookup ``single``, or ``parallel`` for parallel strands), sized and
        checked like any coil; a refusal is reported at the transformer's own field.
    """
    sec = order.sections[section]
    w = order.doc.windings[sec.winding]
    raw_form = copy.deepcopy(order.raw["form"])
    form = order.doc.form
    if isinstance(form, BobbinForm):
        if form.diameter is not None:
            raw_form["diameter"] = f"{(form.diameter + 2 * build_below) * 1e3:.6f} mm"
        else:
            # The bobbin's mean turn is over the whole window (surface diameter MLT/π − height): with the
            # window's height cut by the build below, MLT + π·build keeps the surface where it is now.
            raw_form["mean_turn_length"] = f"{(form.mean_turn_length + math.pi * build_below) * 1e3:.6f} mm"
        room = form.height - build_below
        if room <= 0:
            raise InputError(join_path("windings", sec.winding), f"{sec.label} has no room left in the window: the "
                             f"windings below it build {build_below * 1e3:.2f} mm of its {form.height * 1e3:.2f} mm")
        raw_form["height"] = f"{room * 1e3:.6f} mm"
    elif isinstance(form, ToroidForm):
        raw_form["inner_diameter"] = f"{(form.inner_diameter - 2 * build_below) * 1e3:.6f} mm"
        raw_form["outer_diameter"] = f"{(form.outer_diameter + 2 * build_below) * 1e3:.6f} mm"
        raw_form["height"] = f"{(form.height + 2 * build_below) * 1e3:.6f} mm"
    else:
        raw_form["diameter"] = f"{(form.diameter + 2 * build_below) * 1e3:.6f} mm"
    raw_form.pop("margin_tape", None)
    raw_w = order.raw["windings"][sec.winding]
    winding = {"strands": w.strands, "turns": sec.turns, "layers": raw_w.get("layers", "auto"),
               "lead_length": raw_w.get("lead_length", "150 mm")}
    for key in ("layer_tape", "leads"):
        if key in raw_w:
            winding[key] = raw_w[key]
    if w.identification:
        winding["identification"] = {"A": w.identification}
    if "margin_tape" in raw_w and not isinstance(form, ToroidForm):
        raw_form["margin_tape"] = raw_w["margin_tape"]
    job = dict(order.raw["job"])
    coil = {"job": job, "form": raw_form, "wire": raw_w["wire"], "winding": winding,
            "hookup": "single" if w.strands == 1 else "parallel",
            "duty": {"voltage": f"{w.duty.voltage * sec.turns / order.turns[sec.winding]!r} V",
                     "frequency": f"{order.doc.frequency!r} Hz",
                     "current": f"{w.duty.current!r} A", "ambient": f"{order.doc.ambient!r} degC"},
            "tolerances": {"inductance": f"{order.doc.tolerances.inductance * 100!r} %",
                           "resistance": f"{order.doc.tolerances.resistance * 100!r} %"},
            "test": {"frequency": f"{order.doc.test_frequency!r} Hz"}}
    text = yaml.safe_dump(coil, allow_unicode=True, sort_keys=False).encode()
    try:
        return parse_order(text, order.path)
    except InputError as exc:
        raise InputError(_winding_path(sec.winding, exc.path), exc.message) from None


def _winding_path(index: int, path: str) -> str:
    """A coil order's field path as the transformer order writes it."""
    head, _, rest = path.partition(".")
    if head in ("wire", "duty"):
        return join_path("windings", index, path)
    if head == "winding":
        return join_path("windings", index) + (f".{rest}" if rest else "")
    if head == "form":
        return join_path("windings", index) + f" (on the form as wound, {path})"
    return path


def transformer_source_hash(order: TransformerOrder) -> str:
    return order.sha256
