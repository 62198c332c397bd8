"""The order's parts as written in its YAML: the job, the form (a cylinder, a toroid or a bobbin
on a core, with its pin header, core gap and margin tape), the wire, and the winding (layers, tape,
lead routes, where it starts, its cover and a toroid's arrangement).

Split from :mod:`windsheet.order.document`, which assembles these with the duty, tolerances and
checks into one :class:`~windsheet.order.document.Order`; units are read here, once, by the
field types of :mod:`windsheet.order.fields`.
"""

# No ``from __future__ import annotations``: pydantic then reads evaluated annotations
# instead of compiling each one from a string at start-up (as in design.model).

import datetime as _dt
import math
import re
from typing import Annotated, Literal, Optional, Union

from pydantic import BaseModel, BeforeValidator, ConfigDict, Discriminator, Field, Tag

from windsheet.common.errors import InputError
from .fields import (Angle, Flag, Fraction, Ident, Inductance, Length, Length0, Text, Voltage, choice, known_word,
                     count_or_auto, lowered, strand_keys)
from .limits import JOB_UNITS
from .units import parse_quantity


class _M(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, str_strip_whitespace=True, defer_build=True)


class Job(_M):
    number: Ident
    part: Text
    customer: Text = ""
    quantity: Annotated[int, Field(ge=1, le=JOB_UNITS, strict=True)] = 1
    revision: Ident = "A"
    issued_by: Text = ""
    issue_date: Optional[_dt.date] = None
    units: Optional[list[Ident]] = None
    notes: Annotated[str, Field(max_length=2000)] = ""


class MarginTape(_M):
    """Tape laid at each end of the traverse, built up to the winding's height, for creepage."""
    width: Length
    #: Of one wrap; with it the traveller gives the wraps each layer takes.
    thickness: Optional[Length] = None
    material: Text = "margin tape"


_HEADER_ENDS = {"start-end": "start-end", "start": "start-end", "finish-end": "finish-end", "finish": "finish-end"}


def _header_end(v):
    if known_word(v, _HEADER_ENDS) is None:
        raise ValueError("expected start-end or finish-end")
    return _HEADER_ENDS[lowered(v)]


class PinHeader(_M):
    """A row of pins on the form, at one end: pin 1 first, the others ``pitch`` apart."""
    end: Annotated[Literal["start-end", "finish-end"], BeforeValidator(_header_end)] = "start-end"
    pitch: Length
    pins: Annotated[int, Field(ge=1, le=40, strict=True)]


class CoreGap(_M):
    """The core's gap as assembled, and the spacer that sets it."""
    thickness: Length0
    material: Optional[Text] = None


def _core_gap(v):
    """``gap: 0.3 mm`` or ``{thickness: 0.3 mm, material: polyester film}``."""
    return v if isinstance(v, (dict, CoreGap)) else {"thickness": v}


class CylinderForm(_M):
    kind: choice("cylinder")
    diameter: Length
    traverse: Length
    max_build: Optional[Length] = None
    material: Text = "non-magnetic former"
    #: The former conducts (a metal tube, carbon-filled plastic): insulation to it is then tested.
    conductive: Optional[Flag] = None
    #: Width at each end of the traverse (or ``{width, thickness, material}``).
    margin_tape: Optional[Union[Length, MarginTape]] = None
    #: Pins need a header to stand in: a plain tube has none.
    pin_header: Optional[PinHeader] = None


class ToroidForm(_M):
    kind: choice("toroid")
    inner_diameter: Length
    outer_diameter: Length
    height: Length
    al: Optional[Inductance] = None
    permeability: Optional[Annotated[float, Field(gt=0, le=1e6, allow_inf_nan=False)]] = None
    gap: Angle = math.radians(30.0)
    material: Text = "toroidal core"
    #: A core conducts unless the order says not (a plastic ring former: ``conductive: false``).
    conductive: Optional[Flag] = None
    #: A toroid's pins are on a header or base it is mounted on.
    pin_header: Optional[PinHeader] = None


class BobbinForm(_M):
    kind: choice("bobbin")
    al: Inductance
    width: Length
    height: Length
    diameter: Optional[Length] = None
    mean_turn_length: Optional[Length] = None
    material: Text = "bobbin on core"
    conductive: Optional[Flag] = None
    #: The core's gap as assembled (from the core's data; ``al`` is the AL at this gap); 0 = ungapped;
    #: or ``{thickness, material}`` naming the spacer.
    gap: Optional[Annotated[CoreGap, BeforeValidator(_core_gap)]] = None
    #: How the core goes together: E/I laminations interleaved (no gap), E/I butt-gapped with a
    #: spacer in the joint, or core halves with the gap ground in the centre leg.
    assembly: Optional[choice("interleaved", "butt-gapped", "ground-centre-leg")] = None
    margin_tape: Optional[Union[Length, MarginTape]] = None
    #: The bobbin's own pin row, drawn when given (a bobbin's pins are otherwise as its data sheet).
    pin_header: Optional[PinHeader] = None


def _form_kind(v):
    if not isinstance(v, (dict, BaseModel)):
        return "cylinder"  # any model refuses it at `form` as "expected a section of fields"
    kind = v.get("kind") if isinstance(v, dict) else getattr(v, "kind", None)
    return kind.strip().lower() if isinstance(kind, str) else None


Form = Annotated[Union[Annotated[CylinderForm, Tag("cylinder")], Annotated[ToroidForm, Tag("toroid")],
                       Annotated[BobbinForm, Tag("bobbin")]], Discriminator(_form_kind)]


def _conductor(v):
    if not isinstance(v, str) or v.strip().lower() not in ("copper", "aluminium", "aluminum"):
        raise ValueError("expected copper or aluminium")
    return "aluminium" if v.strip().lower().startswith("alumin") else "copper"


def _wire_standard(v):
    key = re.sub(r"[\s-]", "", str(v)).upper()
    for name in ("IEC 60317-0-1", "NEMA MW 1000"):
        if re.sub(r"[\s-]", "", name).upper() in key or (key == "IEC" and name.startswith("IEC")) or (
                key == "NEMA" and name.startswith("NEMA")):
            return name
    raise ValueError("expected IEC 60317-0-1 or NEMA MW 1000")


class WireSpec(_M):
    size: Annotated[str, Field(max_length=40)]
    grade: Literal[1, 2, 3] = 2
    conductor: Annotated[str, BeforeValidator(_conductor)] = "copper"
    standard: Optional[Annotated[str, BeforeValidator(_wire_standard)]] = None
    thermal_class: Literal[105, 120, 130, 155, 180, 200, 220, 240] = 155
    overall_diameter: Optional[Length] = None
    breakdown: Optional[Voltage] = None
    catalog: Optional[Annotated[str, Field(max_length=400)]] = None
    permittivity: Annotated[float, Field(ge=1.0, le=20.0, allow_inf_nan=False)] = 3.5


class LayerTape(_M):
    thickness: Length
    rating: Optional[Voltage] = None
    material: Text = "polyester tape"


class SectionWall(_M):
    """The wall between two sections of a sectioned winding: its thickness, material and strength."""
    thickness: Length = 1.0e-3
    material: Text = "glass-filled nylon"
    #: The material's short-time dielectric strength (IEC 60243-1), per metre: ``15 kV/mm`` is read
    #: as a voltage over a length.  Default 15 kV/mm (memory: the low end of glass-filled nylon and PBT
    #: datasheets, 15–30 kV/mm).
    strength: Optional[Voltage] = None
    #: The length the strength is given over (``strength: 15 kV`` with ``per: 1 mm``).
    per: Length = 1.0e-3
    #: Pollution degree and material group for the creepage over the wall (IEC 60664-1).
    pollution_degree: Annotated[int, Field(ge=1, le=3, strict=True)] = 2
    material_group: Literal["I", "II", "IIIa", "IIIb"] = "IIIa"


class LeadRoutes(_M):
    """How each lead and joint wire is dressed (see :mod:`windsheet.physics.leads`); unnamed routes
    take the default for the winding."""
    start: Optional[Literal["start-flange", "through-form"]] = None
    finish: Optional[Literal["over-top-layer", "end-flange", "down-start-flange"]] = None
    joint: Optional[Literal["back-over-winding", "end-flange"]] = None


def _spread(v):
    """``even``, or a sector angle like ``270 deg`` (radians)."""
    if isinstance(v, str) and v.strip().lower() == "even":
        return "even"
    try:
        angle = parse_quantity(v, "angle", "")
    except InputError:
        raise ValueError("expected even, or a sector angle like '270 deg'") from None
    if not 0.0 < angle < 2 * math.pi:
        raise ValueError("a sector is an angle above 0 deg and below 360 deg")
    return angle


def _direction(v):
    words = {"clockwise": "clockwise", "cw": "clockwise", "anticlockwise": "anticlockwise",
             "counterclockwise": "anticlockwise", "ccw": "anticlockwise"}
    key = re.sub(r"[\s-]", "", v).lower() if isinstance(v, str) else None
    if key not in words:
        raise ValueError("expected clockwise or anticlockwise")
    return words[key]


_ENDS = {"start-end": "start-end", "start": "start-end", "start-flange": "start-end",
         "finish-end": "finish-end", "finish": "finish-end", "finish-flange": "finish-end",
         "centre": "centre", "center": "centre", "middle": "centre"}


def _end(v):
    if known_word(v, _ENDS) is None:
        raise ValueError("expected start-end, finish-end or centre")
    return _ENDS[lowered(v)]


class WindingStart(_M):
    """Where the winding sits on the traverse: ``offset`` in from the named end (inside any margin tape)."""
    end: Annotated[Literal["start-end", "finish-end", "centre"], BeforeValidator(_end)] = Field("start-end", alias="from")
    offset: Length0 = 0.0


def _start(v):
    """``start-end``, ``finish-end`` or ``centre``; a length (in from the start end); or ``{from, offset}``."""
    if isinstance(v, str) and lowered(v) in _ENDS:
        return {"from": v}
    if isinstance(v, (str, int, float)) and not isinstance(v, bool):
        return {"offset": v}
    if not isinstance(v, (dict, WindingStart)):
        raise ValueError("expected start-end, finish-end, centre, an offset like '2 mm', or {from: start-end, offset: 2 mm}")
    return v


class Overlap(_M):
    length: Optional[Length] = None
    fraction: Optional[Fraction] = None


def _overlap(v):
    """A length past the seam (``10 mm``), or a share of the tape's width (``50 %``)."""
    if isinstance(v, (dict, Overlap)):
        return v
    return {"fraction": v} if isinstance(v, str) and v.strip().endswith("%") else {"length": v}


class OuterWrap(_M):
    """The cover over the finished winding: tape, how many wraps, and the overlap at the seam."""
    material: Text = "polyester tape"
    thickness: Optional[Length] = None
    wraps: Annotated[int, Field(ge=1, le=20, strict=True)] = 2
    #: Past the seam (a length), or of the tape's width when wound through a toroid's hole (``50 %``).
    overlap: Optional[Annotated[Overlap, BeforeValidator(_overlap)]] = None


def _outer_wrap(v):
    if isinstance(v, str) and lowered(v) == "none":
        return None
    return v


def _arrangement(v):
    """``together``, ``sectors`` (even), or ``{sectors: [120 deg, 120 deg, 120 deg]}``."""
    if isinstance(v, str) and lowered(v) in ("together", "sectors"):
        return {"kind": lowered(v)}
    if isinstance(v, dict) and set(map(str, v)) == {"sectors"}:
        return {"kind": "sectors", "sectors": v["sectors"]}
    if isinstance(v, (dict, Arrangement)):
        return v
    raise ValueError("expected together, sectors, or {sectors: [120 deg, 120 deg, ...]} (one angle per winding)")


class Arrangement(_M):
    kind: Literal["together", "sectors"] = "together"
    sectors: Optional[list[Angle]] = None


class Winding(_M):
    # Strict: YAML reads "yes" as true, and true must not count as 1 turn.
    strands: Annotated[int, Field(ge=1, le=4, strict=True)] = 1
    turns: Optional[Annotated[int, Field(ge=1, le=100_000, strict=True)]] = None
    target_inductance: Optional[Inductance] = None
    layers: count_or_auto("layers", 1, 200) = "auto"
    pitch: Optional[Length] = None
    layer_tape: Optional[Union[Length, LayerTape]] = None
    lead_length: Length0 = 0.15
    scrap_allowance: Fraction = 0.10
    identification: Optional[Annotated[dict[Literal["A", "B", "C", "D"], Text], BeforeValidator(strand_keys)]] = None
    coupling: Annotated[float, Field(ge=0.0, le=1.0, allow_inf_nan=False)] = 1.0
    # Untaped close-wound layers nest, taped or spaced ones stack, unless the order says.
    layer_style: Optional[Literal["nested", "stacked"]] = None
    strand_spacing: Literal["together", "even"] = "together"
    impregnation: Literal["none", "varnish", "potted"] = "none"
    leads: LeadRoutes = LeadRoutes()
    # Toroids: turns spread evenly round the core (less the gap), or over a sector.
    spread: Optional[Annotated[Union[Literal["even"], float], BeforeValidator(_spread)]] = None
    # Seen from the start end (a toroid: from its top face); see the README's convention.
    direction: Annotated[Literal["clockwise", "anticlockwise"], BeforeValidator(_direction)] = "clockwise"
    # Cylinders and bobbins: where the first turn goes (default: hard against the start end).
    start: Annotated[WindingStart, BeforeValidator(_start)] = WindingStart()
    #: The cover over the winding; ``none`` for none (a potted part, say).
    outer_wrap: Annotated[Optional[OuterWrap], BeforeValidator(_outer_wrap)] = OuterWrap()
    #: Several windings on a toroid: side by side in every turn, or each in its own sector.
    arrangement: Annotated[Arrangement, BeforeValidator(_arrangement)] = Arrangement()
    #: Cylinders and bobbins: the traverse divided by walls into sections wound one after another.
    sections: Annotated[int, Field(ge=1, le=32, strict=True)] = 1
    section_wall: SectionWall = SectionWall()
