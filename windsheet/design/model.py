"""The sized design: one typed, versioned model that every output reads.

:func:`windsheet.design.build.build_design` fills it once from the order and
the physics; the traveller, the sign-off, the bench page, the bill of
materials, the register and ``windsheet size --json`` read its attributes and
never recount what it holds.  ``Design.model_dump(mode="json")`` is the JSON
of ``windsheet size --json``, marked ``"schema": "windsheet.prediction/2"``;
``windsheet schema prediction`` prints its JSON Schema (also committed as
``windsheet/design/prediction.schema.json``).

Units are in the field names, as in the JSON: ``_m`` metres, ``_H`` henries,
``_ohm`` ohms, ``_F`` farads, ``_Hz`` hertz, ``_V`` volts (rms or d.c. as the
duty gives), ``_Vpk`` volts peak, ``_C`` degrees Celsius, ``_K`` kelvin,
``_W`` watts, ``_J`` joules, ``_s`` seconds, ``_kg`` kilograms, ``_deg``
degrees of angle; a fraction (tolerance, derating) is a plain number.

Sections that predictions from before this model may lack are optional: an
issue recorded by an earlier version is read through
:func:`windsheet.design.legacy.design_from_v1`, which fills in the derived
facts (connections, QC plan, design state) by the same rules as a new design.
"""

# No ``from __future__ import annotations`` here: every annotation names a class defined above it,
# and pydantic reads evaluated annotations at once instead of compiling ~480 strings at start-up
# (design.model's import 44 → 27 ms).

from typing import Literal, Optional, Union

from pydantic import BaseModel, ConfigDict, Field, StrictBool, StrictFloat, StrictInt

SCHEMA = "windsheet.prediction/2"
SCHEMA_V1 = "windsheet.prediction/1"


class Part(BaseModel):
    """A section of the design: typed, closed to unknown fields, never changed once built."""

    model_config = ConfigDict(extra="forbid", frozen=True, defer_build=True)

    @classmethod
    def computed(cls, **values):
        """One made from values the code just computed: not validated again, so no schema is built
        (:func:`windsheet.design.construct.construct`; the tests hold it equal to the validated one)."""
        from .construct import construct

        return construct(cls, values)


# --- the order as sized ----------------------------------------------------------------

class Job(Part):
    number: str
    part: str = ""
    customer: str = ""
    quantity: Optional[int] = None
    revision: str = "A"
    issued_by: str = ""
    issue_date: Optional[str] = Field(None, description="ISO date the sheet is issued")
    units: list[str] = Field(default_factory=list, description="serial numbers")
    notes: str = ""


class PinHeader(Part):
    """A row of pins at one end of the form: pin 1 first, the rest ``pitch_m`` apart."""

    end: str = Field(description="start-end or finish-end")
    pitch_m: float
    pins: int


class Form(Part):
    kind: str = "cylinder"
    material: Optional[str] = None
    diameter_m: Optional[float] = None
    traverse_m: Optional[float] = None
    max_build_m: Optional[float] = None
    inner_diameter_m: Optional[float] = None
    outer_diameter_m: Optional[float] = None
    height_m: Optional[float] = None
    width_m: Optional[float] = None
    mean_turn_length_m: Optional[float] = None
    al_H: Optional[float] = Field(None, description="inductance per turn squared [H]")
    permeability: Optional[float] = None
    gap_deg: Optional[float] = Field(None, description="toroid: bare angle between start and finish [deg]")
    core_gap_m: Optional[float] = Field(None, description="bobbin core: gap as assembled [m]; 0 ungapped")
    margin_tape_m: Optional[float] = None
    margin_tape_material: Optional[str] = None
    conductive: Optional[bool] = Field(None, description="the core or former conducts (cores do unless the "
                                       "order says not): insulation to it is a required reading")
    margin_tape_thickness_m: Optional[float] = Field(None, description="one wrap of the margin tape [m]")
    core_gap_material: Optional[str] = Field(None, description="the spacer that sets the core gap")
    core_assembly: Optional[str] = Field(None, description="interleaved, butt-gapped or ground-centre-leg")
    pin_header: Optional[PinHeader] = None


class WireSpec(Part):
    label: str
    standard: Optional[str] = None
    copper_diameter_m: float
    overall_diameter_m: float
    grade: Optional[int] = None
    thermal_class_C: Optional[int] = None
    breakdown_V: Optional[float] = None
    source: Optional[str] = None
    conductor: str = "copper"
    min_overall_diameter_m: Optional[float] = None
    breakdown_test: Optional[str] = None
    sources: list[str] = Field(default_factory=list)


class OuterWrap(Part):
    """The cover over the finished winding."""

    material: str
    thickness_m: Optional[float] = None
    wraps: int
    overlap_m: Optional[float] = Field(None, description="past the seam, round a cylinder or bobbin [m]")
    overlap_fraction: Optional[float] = Field(None, description="of the tape's width, through a toroid's hole")


class TargetSearch(Part):
    """Turns found for an order given by target inductance."""

    inductance_H: float = Field(description="the ordered target [H]")
    turns_exact: float
    turns_chosen: int
    inductance_at_chosen_H: float
    error: float = Field(description="chosen / target - 1")
    fits: bool = True


class Winding(Part):
    strands: int
    turns_per_strand: int
    layers: int
    layer_style: Optional[str] = None
    strand_spacing: Optional[str] = None
    impregnation: str = "none"
    turns_in_layer: list[int] = Field(default_factory=list, description="turns per strand in each layer")
    layers_per_section: list[int] = Field(default_factory=list, description="a sectioned winding: the layers "
                                          "of each section, in winding order (turns_in_layer runs through them)")
    pitch_m: Optional[float] = None
    layer_tape_m: float = 0.0
    layer_tape_material: Optional[str] = None
    layer_tape_rating_V: Optional[float] = None
    lead_length_m: Optional[float] = None
    scrap_allowance: float = 0.0
    close_wound: bool = True
    target: Optional[TargetSearch] = None
    direction: str = "clockwise"
    spread: Optional[str] = None
    outer_wrap: Optional[OuterWrap] = None
    arrangement: Optional[str] = Field(None, description="several windings on a toroid: together or sectors")


class RingLayer(Part):
    layer: int
    turns: int
    pitch_deg: float
    radius_m: float
    build_m: float
    from_deg: float
    to_deg: float
    angles_deg: dict[str, list[float]] = Field(description="turn angles per strand, from the start [deg]")


class RingSector(Part):
    """One winding's own sector of the ring (arrangement: sectors)."""

    strand: str
    from_deg: float
    to_deg: float


class Ring(Part):
    """A toroid's turns round the ring, for its top view."""

    spread: Optional[str] = None
    sectors: list[RingSector] = Field(default_factory=list, description="each winding's sector, when in sectors")
    ring_radius_m: float
    wire_diameter_m: float
    span_deg: float
    gap_deg: float
    layers: list[RingLayer]


class Hookup(Part):
    name: str
    joins: list[list[str]] = Field(default_factory=list)
    terminals: list[str] = Field(default_factory=list, description="the hookup's two terminals")
    description: str = ""


class PinTermination(Part):
    pin: str
    ends: list[str]
    node: Optional[int] = Field(None, description="hookup node: pins with one node are joined only by the board")


class Duty(Part):
    voltage_V: float = Field(description="rms (sine), d.c. or the pulse's peak, as voltage_form says [V]")
    voltage_form: Optional[str] = None
    waveform: Optional[str] = None
    between_windings_V: Optional[float] = None
    frequency_Hz: float = 0.0
    current_A: float = Field(0.0, description="terminal current on the duty, rms or d.c. [A]; 0 when "
                                               "current_basis is null (none given, none assumed)")
    current_given: bool = True
    current_basis: Optional[str] = Field(None, description="where current_A comes from: given, pulse width and "
                                         "repetition rate, pulse energy and repetition rate; null: not known")
    voltage_peak_V: Optional[float] = Field(None, description="peak of the duty voltage [V]")
    rise_time_s: Optional[float] = Field(None, description="the edge's rise time as ordered [s]")
    repetition_rate_Hz: Optional[float] = Field(None, description="pulse duty: pulses per second [Hz]")
    pulse_width_s: Optional[float] = Field(None, description="pulse duty: each pulse's width [s]")
    pulse_energy_J: Optional[float] = Field(None, description="pulse duty: energy each pulse leaves in the "
                                            "winding [J]")
    ambient_C: float = 25.0
    operating_temperature_C: Optional[float] = None
    operating_temperature_basis: Optional[str] = Field(None, description="given, heat balance, or ambient "
                                                       "(no current, or no steady temperature)")


class TestSetup(Part):
    frequency_Hz: float = Field(1000.0, description="the LCR meter's test frequency [Hz]")
    ring_capacitor_F: Optional[float] = Field(None, description="the ring (surge comparison) test's "
                                              "capacitor, when the order asks for the ring test [F]")


class Tolerances(Part):
    inductance: float = 0.1
    resistance: float = 0.05
    strand_balance: Optional[float] = None


class Placement(Part):
    end: str
    offset_m: float
    margin_m: float
    first_turn_m: float
    bare_start_m: float
    bare_finish_m: float


class Fit(Part):
    slots_per_layer: Optional[int] = None
    traverse_used_m: Optional[float] = None
    traverse_m: Optional[float] = None
    build_m: Optional[float] = None
    max_build_m: Optional[float] = None
    fits: bool = True
    notes: list[str] = Field(default_factory=list)
    placement: Optional[Placement] = None


# --- what it reads ---------------------------------------------------------------------

class Strand(Part):
    id: str
    turns: int
    identification: Optional[str] = None
    wire_length_m: Optional[float] = Field(None, description="turns plus both leads [m]")
    wire_length_with_scrap_m: Optional[float] = None
    mass_kg: Optional[float] = None
    resistance_20C_ohm: float
    resistance_hot_ohm: Optional[float] = None
    resistance_ac_ohm: Optional[float] = Field(None, description="hot, at the duty frequency [ohm]")
    loss_W: Optional[float] = None
    current_density_A_per_mm2: Optional[float] = None
    inductance_H: float
    current_A: Optional[float] = None
    resistance_ac_test_ohm: Optional[float] = Field(None, description="at the test frequency, 20 °C [ohm]")
    q_test: Optional[float] = Field(None, description="Q = ωL/R_ac at the test frequency, 20 °C; D = 1/Q")


class AcceptBands(Part):
    inductance_min_H: float
    inductance_max_H: float
    inductance_basis: Literal["prediction", "target"] = "prediction"
    inductance_centre_H: Optional[float] = None
    prediction_offset: float = 0.0
    resistance_min_ohm: float
    resistance_max_ohm: float


class Terminal(Part):
    inductance_H: float = Field(description="at the test frequency [H]")
    resistance_ohm: float = Field(description="at 20 °C [ohm]")
    resistance_hot_ohm: Optional[float] = None
    resistance_ac_ohm: Optional[float] = None
    loss_W: Optional[float] = None
    capacitance_F: Optional[float] = None
    self_resonance_Hz: Optional[float] = None
    capacitance_note: str = Field("", description="why no self-capacitance or self-resonance is predicted, "
                                                  "when none is (empty otherwise)")
    accept: AcceptBands
    resistance_ac_test_ohm: Optional[float] = Field(None, description="at the test frequency, 20 °C [ohm]")
    q_test: Optional[float] = Field(None, description="Q = ωL/R_ac at the test frequency, 20 °C; D = 1/Q")


class HookupReading(Part):
    inductance_H: float
    resistance_ohm: float


class PairReading(Part):
    """What two strands read linked before the joint."""

    series_aiding_H: Optional[float] = None
    series_opposing_H: Optional[float] = None
    mutual_H: Optional[float] = None
    coupling: Optional[float] = None


class ShortedTurn(Part):
    """What the terminals read with one turn shorted at the winding's worst place for the test.

    The worst place: of the first, middle and last turns of each strand in the
    inner, middle and outer layers, the one whose short changes Q least.
    """

    where: str
    strand: str
    layer: int
    turn: int = Field(description="the turn's number along its strand, 1 = the start")
    loop_inductance_H: float = Field(description="the shorted turn's own inductance [H]")
    loop_resistance_ohm: float = Field(description="its resistance at the test frequency, 20 °C [ohm]")
    mutual_H: float = Field(description="mutual inductance between the turn and the rest of the winding, "
                                        "per terminal ampere [H]")
    frequency_Hz: float = Field(description="the test frequency [Hz]")
    inductance_H: float = Field(description="terminal inductance read with the short [H]")
    resistance_ac_ohm: float = Field(description="terminal series resistance read with the short [ohm]")
    q: float = Field(description="terminal Q read with the short")
    inductance_change: float = Field(description="with the short / without − 1")
    q_change: float = Field(description="with the short / without − 1")
    q_caught: bool = Field(description="the Q reading falls below the Q line's band")
    shows_from_Hz: float = Field(description="where the turn's reactance equals its resistance: well below, a "
                                             "short hides in L and Q [Hz]")
    ring_frequency_Hz: Optional[float] = Field(None, description="ring frequency with the short (null: it no "
                                               "longer rings) [Hz]")
    ring_decay: Optional[float] = None
    ring_caught: Optional[bool] = Field(None, description="the ring reading falls outside its lines")
    model: str = ""
    contact: str = ""


class RingWave(Part):
    """The ring (surge comparison) test: the order's capacitor discharged into the winding."""

    capacitor_F: float
    winding_capacitance_F: Optional[float] = None
    frequency_Hz: Optional[float] = Field(None, description="damped frequency of the ring (null: overdamped) [Hz]")
    decay: Optional[float] = Field(None, description="ratio of successive peaks of one polarity")
    inductance_H: Optional[float] = Field(None, description="the winding's inductance at the ring frequency [H]")
    resistance_ac_ohm: Optional[float] = Field(None, description="its AC resistance there, 20 °C [ohm]")
    frequency_tolerance: float = Field(description="half the inductance tolerance: f ∝ L^-1/2")
    decrement_tolerance: float = Field(description="of the log decrement ln(1/decay): the resistance "
                                                   "tolerance plus half the inductance's")
    method: str = ""


# --- stress ----------------------------------------------------------------------------

class WorstPair(Part):
    voltage_Vpk: float
    where: Optional[str] = None
    strands: Optional[list[Optional[str]]] = None
    turns: Optional[list[Optional[int]]] = None
    layer: Optional[int] = None
    layers: Optional[list[Optional[int]]] = None
    kind: Optional[str] = Field(None, description="side, layer, lead, …")


class Impulse(Part):
    """A fast edge's initial (capacitive) distribution over the turns."""

    edge_Vpk: float
    rise_time_s: Optional[float] = None
    first_turn_Vpk: float
    first_turn_uniform_Vpk: float
    first_turn_uniform_winding_Vpk: Optional[float] = None
    worst_pair_Vpk: float
    worst_pair_where: Optional[str] = None
    alpha: Optional[float] = None
    series_capacitance_F: Optional[float] = None
    ground_capacitance_F: float
    ground_capacitance_given: bool = False
    method: str = ""


class AcResistance(Part):
    ratio: float = Field(description="AC/DC resistance, taken")
    dowell: Optional[float] = None
    round_wire: Optional[float] = None
    skin_depth_m: Optional[float] = None
    model: str = ""
    frequency_Hz: float = 0.0
    temperature_C: Optional[float] = None


class Thermal(Part):
    """The heat balance on the duty; temperatures null when not computed (no current) or run away."""

    loss_W: Optional[float] = None
    surface_rise_K: Optional[float] = None
    surface_rise_basis: Optional[str] = Field(
        None, description="which rise governed: 'balance' (convection and radiation) or 'empirical' "
                          "(McLyman's rule, hotter on small coils)")
    surface_C: Optional[float] = None
    hot_spot_C: Optional[float] = None
    mean_C: Optional[float] = None
    converged: Optional[bool] = Field(description="false: thermal runaway; null: not computed")
    missing: Optional[str] = Field(None, description="what the order must give for the heating to be computed")
    surface_area_m2: Optional[float] = None
    characteristic_length_m: Optional[float] = None
    method: str = ""
    emissivity: Optional[float] = None
    winding_conductivity_W_per_mK: Optional[float] = None
    thermal_class_C: Optional[int] = None
    verdict: str = Field(description="pass, marginal, fail or unknown")
    reason: str = ""
    operating_temperature_given_C: Optional[float] = None
    current_density_A_per_mm2: Optional[float] = None
    current_density_range_A_per_mm2: list[float] = Field(default_factory=list)
    current_density_basis: Optional[str] = None


class LeadRoute(Part):
    lead: str = Field(description="the strand end whose wire this is, like 'A.finish'")
    route: str
    route_text: str = ""
    joint: Optional[str] = Field(None, description="the join it carries, like 'A.finish + B.start'")
    beside_turns: int = 0
    beside_leads: list[str] = Field(default_factory=list,
                                    description="the other leads it lies beside where it leaves the winding")
    worst_Vpk: float = Field(0.0, description="its worst voltage against a turn or a lead it touches [V peak]")
    where: Optional[str] = None


class Capacitance(Part):
    self_F: Optional[float] = None
    strand_to_strand_F: Optional[float] = None
    layer_to_layer_F: Optional[float] = None
    terminal_F: Optional[float] = Field(None, description="the winding's terminal capacitance, from its "
                                        "low-frequency voltage map (not the duty's), leads included [F]")
    leads_F: Optional[float] = Field(None, description="what the leads lying together add to terminal_F [F]")
    method: str = ""


class PdPair(Part):
    where: Optional[str] = None
    voltage_Vpk: float = 0.0


Setting = Union[StrictBool, StrictInt, StrictFloat, str]


class Remedy(Part):
    """An order change, as the order writes it, with what windsheet got by sizing it again."""

    set: dict[str, Setting]
    verdict: str
    worst_Vpk: Optional[float] = None
    pdiv_Vpk: Optional[float] = None


class Insulation(Part):
    verdict: str = Field("unknown", description="pass, marginal or fail (unknown: not checked)")
    reasons: list[str] = Field(default_factory=list)
    worst_adjacent_Vpk: Optional[float] = None
    enamel_Vpk: Optional[float] = Field(None, description="worst peak across enamel alone: touching conductors and lead pairs, no air or rated tape between [V peak]")
    breakdown_V: Optional[float] = None
    derating: Optional[float] = None
    allowed_Vpk: Optional[float] = None
    margin: Optional[float] = None
    paschen_min_Vpk: Optional[float] = None
    pdiv_Vpk: Optional[float] = None
    pdiv_hot_Vpk: Optional[float] = None
    pdiv_basis: Optional[str] = None
    pd_pair: Optional[PdPair] = None
    pd_safety_factor: Optional[float] = None
    layer_Vpk: float = 0.0
    tape_rating_V: Optional[float] = None
    impregnation: Optional[str] = None
    duty: Optional[str] = Field(None, description="ac or dc")
    pdiv_touching_Vpk: Optional[float] = None
    pdiv_max_film_Vpk: Optional[float] = Field(None, description="the pd pair's inception at 20 °C with the "
                                               "thickest film the standard allows, shown beside pdiv_Vpk "
                                               "(judged at the thinnest) [V peak]")
    pdiv_film_m: Optional[float] = Field(None, description="enamel film a side the inception is judged at: "
                                         "half the standard's minimum increase [m]")
    pdiv_hot_spot_C: Optional[float] = Field(None, description="temperature whose air density sets the hot "
                                             "inception voltage [degC]")
    pdiv_density_factor: Optional[float] = Field(None, description="hot over 20 °C inception of the pd pair "
                                                 "from the air's density alone (Paschen; physics) [-]")
    pdiv_hot_margin: Optional[float] = Field(None, description="margin taken off beyond the density "
                                             "(insulation.hot_pdiv_derating) [-]")
    layer_style: Optional[str] = None
    ir_min_ohm: Optional[float] = Field(None, description="least insulation resistance accepted [ohm]")
    remedies: Optional[list[Remedy]] = None


class Hipot(Part):
    voltage_V: Optional[float] = None
    duration_s: Optional[float] = None
    basis: str = ""


class Energy(Part):
    magnetic_J: float = 0.0


class Cautions(Part):
    above_elv: bool = False
    highest_V: Optional[float] = None
    elv_limit_V: Optional[float] = None
    hipot: bool = True
    stored_energy_J: Optional[float] = None
    surface_C: Optional[float] = None
    hot_surface: bool = False
    hot_surface_limit_C: Optional[float] = None


class SectionSlot(Part):
    slot: int
    strand: str
    potential_Vpk: Optional[float] = None
    worst: Optional[bool] = None


class SectionLayer(Part):
    layer: int
    turns: int
    slots: list[SectionSlot]
    elided: bool = False


class CrossSection(Part):
    """The slots drawn in the winding's cross-section: each layer's first and last few."""

    layers: list[SectionLayer] = Field(default_factory=list)
    tape_between_layers: bool = False
    kind: Optional[str] = None
    sections: int = Field(1, description="a sectioned winding: its first section's layers are the ones drawn")
    potential_max_Vpk: Optional[float] = None


# --- facts derived once from the above --------------------------------------------------

class StrandEnd(Part):
    """One strand end, and everything the sheets say of it."""

    name: str = Field(description="like 'A.start'")
    strand: str
    terminal: Optional[str] = Field(None, description="'T1', 'T2', … when brought out as a terminal")
    joint: Optional[int] = Field(None, description="index of its joint in connections.joints")
    pin: Optional[str] = None
    route: Optional[str] = None
    route_text: Optional[str] = Field(None, description="how its lead is laid, in words")
    crosses_turns: int = Field(0, description="turns its lead lies against on its route")
    lead_Vpk: Optional[float] = Field(None, description="the most its lead holds off against those turns [V peak]")
    sleeve_when_laid: bool = Field(False, description="its sleeving goes on when the lead is laid, "
                                   "before the turns it crosses")


class TerminalLead(Part):
    """A lead brought out of the winding, numbered as on the wiring diagram."""

    label: str = Field(description="'T1', 'T2', …")
    end: str
    pin: Optional[str] = None


class Joint(Part):
    ends: list[str]
    pins: list[str] = Field(default_factory=list)


class PinLink(Part):
    """One hookup node spread over several pins: only the board joins them, so the bench links them."""

    pins: list[str]
    ends: list[str]


class Connections(Part):
    """The ends a hookup brings out: per strand end, the terminals, the joints and the sleeving."""

    ends: list[StrandEnd]
    terminals: list[TerminalLead]
    joints: list[Joint]
    linked_pins: list[PinLink] = Field(default_factory=list)
    wire_ends_per_unit: int = Field(description="two per strand, each with its lead length")
    sleeving_rating_Vpk: Optional[float] = Field(None, description="least voltage the sleeving must hold off: "
                                                 "the highest of any lead against the turns it crosses and the "
                                                 "terminal voltage [V peak]")
    sleeving_pieces_per_unit: int = Field(description="one over each terminal lead and one over each joint")


class QcLine(Part):
    """One reading the traveller asks for, and how the sign-off judges it."""

    key: str
    label: str
    judged: Literal["band", "minimum", "expect", "record"] = Field(
        description="band: within [low, high]; minimum: at least low; expect: reads as the expected "
                    "word (open, withstands); record: written down only")
    unit: str = Field("", description="H, ohm, degC, or '' for a word")
    predicted: Optional[float] = None
    low: Optional[float] = None
    high: Optional[float] = None
    expect: Optional[str] = None
    required: bool = True
    printed: bool = Field(True, description="the traveller's QC record prints it: every required line, and "
                                            "the optional lines the order asks for (the ring wave)")
    note: str = ""
    test_voltage_V: Optional[float] = Field(None, description="hipot: the test voltage [V]")
    duration_s: Optional[float] = Field(None, description="hipot: how long it is held [s]")


class LayerRow(Part):
    """One layer as the operator winds it: a row of the layer table."""

    layer: int
    turns: int = Field(description="turns per strand in this layer")
    from_end: str = Field(description="where the layer starts: start-end or finish-end (a toroid: start-mark, "
                          "or the end of the layer below)")
    counter_start: int = Field(description="the turn counter at the layer's first turn, counted per strand from "
                               "the start of the winding")
    counter_end: int = Field(description="the turn counter at the layer's last turn")
    tape_after: Optional[str] = Field(None, description="what goes over it: layer-tape, outer-wrap, crossover "
                                      "(the wire crosses the wall to the next section), or null")
    margin_wraps: Optional[int] = Field(None, description="margin-tape wraps at each end built up with this layer")
    section: Optional[int] = Field(None, description="a sectioned winding: the section (1 = the start's); layer "
                                   "then counts within it, and from_end is the section's own start or finish side")


class QcPlan(Part):
    lines: list[QcLine]

    def line(self, key: str) -> Optional[QcLine]:
        """The plan's line for ``key``, or None."""
        return next((ln for ln in self.lines if ln.key == key), None)

    @property
    def required(self) -> list[str]:
        return [ln.key for ln in self.lines if ln.required]


class Family(Part):
    """The family a job belongs to for the QC statistics: same form, wire family, strands and hookup."""

    key: str
    label: str


class DesignState(Part):
    """How the design stands: ok, marginal, failing, or forced (a failing design issued with --force)."""

    state: Literal["ok", "marginal", "failing", "forced"]
    reasons: list[str] = Field(default_factory=list)


class WallCheck(Part):
    """One wall of a sectioned winding: the voltage across it and what it must withstand."""

    wall: int = Field(description="1: between sections 1 and 2")
    across_Vpk: float = Field(description="largest voltage between turns facing the wall on either side [V peak]")
    allowed_Vpk: float = Field(description="thickness × strength × derating [V peak]")
    crossover_Vpk: float = Field(description="the crossover wire against the turns beside its wall; it is "
                                 "sleeved for this [V peak]")
    creepage_needed_m: Optional[float] = Field(None, description="IEC 60664-1 creepage for the voltage "
                                               "across the wall (null: above the table's 2000 V rms) [m]")
    creepage_available_m: float = Field(description="over the wall's top, face to face [m]")
    verdict: str = Field(description="pass, marginal or fail")
    reason: str = ""


class Sections(Part):
    """A sectioned winding: sections wound one after another, walls between them."""

    count: int
    width_m: float = Field(description="each section's width [m]")
    wall_thickness_m: float
    wall_material: str = ""
    wall_strength_V_per_m: float = Field(description="the wall material's short-time dielectric strength [V/m]")
    wall_strength_given: bool = False
    layers_per_section: list[int] = Field(default_factory=list)
    turns_per_section: list[int] = Field(default_factory=list, description="turns per strand in each section")
    walls: list[WallCheck] = Field(default_factory=list)
    crossover_sleeves_per_unit: int = Field(0, description="one sleeve through each wall's slot for each strand")
    crossover_Vpk: float = Field(0.0, description="the highest voltage a crossover meets: its sleeving's least "
                                 "rating [V peak]")
    verdict: str = Field("pass", description="the worst wall's verdict")
    basis: str = ""


# --- the whole -------------------------------------------------------------------------

class DesignCore(Part):
    """What sizing gives: the order as sized and every figure the physics computes."""

    schema_: Literal["windsheet.prediction/2"] = Field(SCHEMA, alias="schema")
    job: Job
    order_hash: Optional[str] = None
    form: Form = Field(default_factory=Form)
    wire: Optional[WireSpec] = None
    winding: Optional[Winding] = None
    ring: Optional[Ring] = None
    sheet_units: Literal["metric", "imperial"] = "metric"
    hookup: Hookup
    terminations: list[PinTermination] = Field(default_factory=list)
    duty: Optional[Duty] = None
    test: TestSetup = Field(default_factory=TestSetup)
    tolerances: Tolerances = Field(default_factory=Tolerances)
    fit: Optional[Fit] = None
    strands: list[Strand]
    layers: int = 1
    inductance_matrix_H: list[list[float]]
    coupling_matrix: list[list[float]] = Field(default_factory=list)
    terminal: Terminal
    current_sheet_inductance_H: Optional[float] = None
    current_sheet_rosa_corrected_H: Optional[float] = None
    alternatives: dict[str, HookupReading] = Field(default_factory=dict)
    pairs: dict[str, PairReading] = Field(default_factory=dict)
    worst_adjacent: Optional[WorstPair] = None
    impulse: Optional[Impulse] = None
    ac_resistance: Optional[AcResistance] = None
    thermal: Optional[Thermal] = None
    leads: list[LeadRoute] = Field(default_factory=list)
    capacitance: Optional[Capacitance] = None
    insulation: Optional[Insulation] = None
    hipot: Optional[Hipot] = None
    energy: Optional[Energy] = None
    cautions: Optional[Cautions] = None
    cross_section: Optional[CrossSection] = None
    sections: Optional[Sections] = None
    warnings: list[str] = Field(default_factory=list)
    shorted_turn: Optional[ShortedTurn] = None
    ring_wave: Optional[RingWave] = None

    model_config = ConfigDict(extra="forbid", frozen=True, defer_build=True, populate_by_name=True,
                              serialize_by_alias=True)


class Design(DesignCore):
    """A sized coil order: every figure the outputs print, in SI units, and the facts derived from them."""

    connections: Connections
    layer_plan: list[LayerRow] = Field(default_factory=list, description="each layer as wound: the layer table")
    qc_plan: QcPlan
    qc_required: list[str] = Field(description="keys of the QC lines every unit must be read for")
    state: DesignState
    family: Family

    def as_json(self) -> dict:
        """The JSON-ready dict of ``windsheet size --json``."""
        return self.model_dump(mode="json")

    @property
    def strand_ids(self) -> list[str]:
        return [s.id for s in self.strands]

    def strand(self, sid: str) -> Optional[Strand]:
        return next((s for s in self.strands if s.id == sid), None)

    @property
    def quantity(self) -> int:
        """Units to build: ``job.quantity``, else the serial count, else 1."""
        return int(self.job.quantity or len(self.job.units) or 1)

    def with_state(self, state: DesignState) -> "Design":
        """This design with another state: how it was issued (``forced``) is known only at issue."""
        return self.model_copy(update={"state": state})
