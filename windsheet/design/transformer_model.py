"""The sized transformer: windings of their own on one core, as one typed model.

Each winding section is a coil sized on the form as it stands when it is wound
(``sections``: full :class:`~windsheet.design.model.Design` records, so every
coil output — layer table, procedure, stress within the winding — reads them as
it reads any coil); the transformer adds what lies between windings: turns and
voltage ratios, magnetising and leakage inductance, regulation, the barriers
judged against IEC 60664-1, the screens, the core's flux density, the losses and
temperature of the whole, the QC plan of a transformer's routine tests and the
design state.  ``TransformerDesign.model_dump(mode="json")`` is the JSON of
``windsheet size --json`` for a transformer order, marked
``"schema": "windsheet.transformer/1"``.  Units are in the field names as in
:mod:`windsheet.design.model`.
"""

from __future__ import annotations

from typing import Literal, Optional

from pydantic import ConfigDict, Field

from .model import (Design, DesignState, Family, Form, Job, Part, PinLink, QcLine, QcPlan, TerminalLead, Thermal,
                    WireSpec)

TRANSFORMER_SCHEMA = "windsheet.transformer/1"


class WindingDuty(Part):
    voltage_V: float = Field(description="rms at the transformer's frequency [V]")
    current_A: float = 0.0
    source: Literal["mains", "selv", "earthed", "floating"] = "floating"
    to_earth_V: float = Field(description="its highest voltage to earth, rms: its own voltage unless the order "
                                          "says otherwise [V]")


class WindingSummary(Part):
    """One winding, all its sections together."""

    name: str
    turns: int
    strands: int = 1
    wire: WireSpec
    duty: WindingDuty
    taps: list[int] = Field(default_factory=list, description="turns from the start of each tap")
    sections: list[str] = Field(description="labels of its sections in the build (interleaved: name 1/2, name 2/2)")
    identification: str = ""
    triple_insulated: bool = False
    resistance_20C_ohm: float
    resistance_hot_ohm: float
    wire_length_m: float
    wire_length_with_scrap_m: float
    mass_kg: float
    inductance_H: float = Field(description="with every other winding open (magnetising, for the first) [H]")
    turns_ratio: float = Field(description="turns over the first winding's turns")
    open_circuit_voltage_V: float = Field(description="at the first winding's duty voltage [V]")
    loss_W: float = Field(description="at its duty current, hot, at the frequency [W]")
    current_density_A_per_mm2: float
    insulation_verdict: str = Field(description="the worst verdict within its own sections (turn to turn, layer to layer)")


class BuildLayer(Part):
    """One item of the build, innermost first: a winding section, a barrier or a screen."""

    kind: Literal["section", "barrier", "screen"]
    label: str
    winding: Optional[str] = None
    section: Optional[int] = Field(None, description="index into sections (kind section)")
    build_below_m: float = Field(description="radial build under it [m]")
    build_m: float = Field(description="its own radial build [m]")
    turns: Optional[int] = None


class Barrier(Part):
    """The insulation between two windings, judged against IEC 60664-1's tables."""

    between: list[str]
    insulation: Literal["functional", "basic", "supplementary", "reinforced"]
    working_voltage_V: float = Field(description="the largest voltage between a turn of one and of the other, rms [V]")
    impulse_voltage_V: float = Field(description="rated impulse voltage it must withstand [V peak]")
    clearance_required_m: float
    creepage_required_m: float
    creepage_m: float = Field(description="the distance the construction gives along the bobbin (margins) [m]")
    test_voltage_V: float = Field(description="a.c. withstand test voltage, 1 min [V rms]")
    tape_wraps: int = 0
    tape_thickness_m: float = 0.0
    tape_rating_V: Optional[float] = None
    tape_material: Optional[str] = None
    triple_insulated: bool = False
    pollution_degree: int
    material_group: str
    verdict: Literal["pass", "fail"]
    reasons: list[str] = Field(default_factory=list)
    basis: str = ""


class Screen(Part):
    between: list[str]
    foil_m: float
    material: str
    lead: str


class Leakage(Part):
    """The first winding's inductance with one other winding shorted (the rest open)."""

    shorted: str
    inductance_H: float
    method: str = ""


class Regulation(Part):
    winding: str
    full_load_voltage_V: float
    regulation: float = Field(description="fall from no load to its duty current, over the full-load voltage")
    resistance_referred_ohm: float
    reactance_referred_ohm: float


class Capacitance(Part):
    between: list[str]
    capacitance_F: float
    method: str = ""


class CoreCheck(Part):
    effective_area_m2: Optional[float] = None
    flux_density_T: Optional[float] = None
    max_flux_density_T: Optional[float] = None
    verdict: Literal["pass", "marginal", "fail", "unknown"]
    reason: str


class TransformerConnections(Part):
    terminals: list[TerminalLead]
    linked_pins: list[PinLink] = Field(default_factory=list)
    wire_ends_per_unit: int
    sleeving_pieces_per_unit: int


class TransformerDesign(Part):
    """A sized transformer order: every figure its outputs print, in SI units."""

    schema_: Literal["windsheet.transformer/1"] = Field(TRANSFORMER_SCHEMA, alias="schema")
    job: Job
    order_hash: Optional[str] = None
    purpose: Literal["voltage", "current"] = "voltage"
    form: Form
    sheet_units: Literal["metric", "imperial"] = "metric"
    frequency_Hz: float
    ambient_C: float
    tolerances: dict[str, float]
    windings: list[WindingSummary]
    build: list[BuildLayer]
    sections: list[Design]
    barriers: list[Barrier] = Field(default_factory=list)
    screens: list[Screen] = Field(default_factory=list)
    leakage: list[Leakage] = Field(default_factory=list)
    regulation: list[Regulation] = Field(default_factory=list)
    capacitance: list[Capacitance] = Field(default_factory=list)
    core: CoreCheck
    thermal: Optional[Thermal] = None
    connections: TransformerConnections
    qc_plan: QcPlan
    qc_required: list[str]
    state: DesignState
    family: Family
    warnings: list[str] = Field(default_factory=list)
    cautions: list[str] = Field(default_factory=list)

    model_config = ConfigDict(extra="forbid", frozen=True, defer_build=True, populate_by_name=True,
                              serialize_by_alias=True)

    def as_json(self) -> dict:
        return self.model_dump(mode="json")

    def winding(self, name: str) -> WindingSummary:
        return next(w for w in self.windings if w.name == name)

    @property
    def quantity(self) -> int:
        return int(self.job.quantity or len(self.job.units) or 1)

    def with_state(self, state: DesignState) -> "TransformerDesign":
        return self.model_copy(update={"state": state})


__all__ = ["TRANSFORMER_SCHEMA", "TransformerDesign", "WindingSummary", "BuildLayer", "Barrier", "Screen",
           "Leakage", "Regulation", "Capacitance", "CoreCheck", "TransformerConnections", "QcLine"]
