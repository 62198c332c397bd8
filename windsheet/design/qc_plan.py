"""The QC plan (the lines every unit must be read for, each with how it is judged) and the design state.

One list, made once from the sized design, is stored in the prediction as
``qc_required``: the traveller's QC record prints exactly these lines and the
sign-off calls a unit INCOMPLETE while any of them is missing and not waived.
Keys are the sign-off's line keys (``terminal.inductance``,
``strand.B.resistance``, ``pair.A-B.series_opposing``, ``hipot`` ...).
"""

from __future__ import annotations

from windsheet.common.fmt import eng

from .bench_tests import MIN_Q_LINE, decay_minimum, q_tolerance
from .model import DesignState, QcLine, QcPlan
from .state_rules import state_from_checks

STRAND_IDS = "ABCD"


def required_lines(strands: int, has_joins: bool, hipot_required: bool, to_core: bool = True,
                   separate: bool = False) -> list[str]:
    """Keys of the QC lines a unit must carry before it can pass.

    Parameters
    ----------
    strands : int
        Strands wound together. [-]
    has_joins : bool
        The hookup joins strand ends (so pairs can be read before the joint).
    hipot_required : bool
        The design calls for a dielectric withstand (hipot) test.
    to_core : bool
        The winding sits on a core or a conductive former, so insulation to it
        is tested; on a plastic former the line is optional.
    separate : bool
        Separate windings on one core or form: each pair is read series-aiding
        and series-opposing through temporary links, as a polarity check.

    Returns
    -------
    keys : list of str
        Strand L and R (for the strand balance) and the pair readings before
        the joint (or, for separate windings, with temporary links) when there
        are two or more strands; terminal L and R; the ambient temperature (to
        correct R to 20 °C); continuity and insulation resistance between
        strands; insulation resistance to a core or conductive former; the
        hipot.  Common practice for wound components; the applicable standard
        and the customer's test plan govern.

    References
    ----------
    .. [1] IEC 60076-3 and IEC 61558-1 list insulation resistance and
       dielectric (withstand) tests as routine tests on every unit (memory).

    Examples
    --------
    >>> required_lines(1, False, True)
    ['terminal.inductance', 'terminal.resistance', 'ambient', 'insulation.to_core', 'hipot']
    >>> required_lines(1, False, True, to_core=False)
    ['terminal.inductance', 'terminal.resistance', 'ambient', 'hipot']
    """
    ids = STRAND_IDS[:strands]
    keys = []
    if strands > 1:
        for s in ids:
            keys += [f"strand.{s}.inductance", f"strand.{s}.resistance"]
        if has_joins or separate:
            for a, b in zip(ids, ids[1:]):
                keys += [f"pair.{a}-{b}.series_aiding", f"pair.{a}-{b}.series_opposing"]
    keys += ["terminal.inductance", "terminal.resistance", "ambient"]
    if strands > 1:
        keys += ["continuity.strand_to_strand", "insulation.strand_to_strand"]
    if to_core:
        keys.append("insulation.to_core")
    if hipot_required:
        keys.append("hipot")
    return keys


#: Optional lines, offered by the plan and judged when read; a unit passes without them.
OPTIONAL_LINES = ("insulation.to_core", "terminal.q", "strand.*.q", "ring.frequency", "ring.decay")


#: Insulation resistance below which a unit fails when the order gives no figure
#: (common practice for small windings at 500 V d.c.; the applicable standard governs).
DEFAULT_MIN_INSULATION_OHM = 100e6

#: The series-opposing (leakage) reading before the joint is a small difference
#: of large inductances; its band is this many times the inductance tolerance.
LEAKAGE_BAND_FACTOR = 2.0


def _band(value, tol):
    if value is None or tol is None:
        return None, None
    return value * (1 - tol), value * (1 + tol)


def leakage_band(predicted, tol_L):
    """The band of a series-opposing (leakage) reading before the joint: ±2× the inductance tolerance.

    Examples
    --------
    >>> [round(x * 1e6, 3) for x in leakage_band(2.0e-6, 0.1)]
    [1.6, 2.4]
    >>> leakage_band(0.0, 0.1)
    (None, None)
    """
    if predicted is None or predicted <= 0:
        return None, None
    return _band(predicted, LEAKAGE_BAND_FACTOR * tol_L)


def plan_lines(core, required: list[str]) -> list[QcLine]:
    """The QC record's lines, in the order of ``required``: label, how each is judged, its band.

    Parameters
    ----------
    core : DesignCore
        The sized design (strands, pairs, terminal and its accept bands,
        tolerances, insulation, hipot).
    required : list of str
        The keys the record carries (:func:`required_lines`, or the list an
        earlier issue was recorded with).

    Returns
    -------
    lines : list of QcLine
        One per key; a key this version has no rule for is recorded only.
    """
    tol = core.tolerances
    ids = [s.id for s in core.strands]
    term, acc = core.terminal, core.terminal.accept
    ir_min = (core.insulation.ir_min_ohm if core.insulation else None) or DEFAULT_MIN_INSULATION_OHM
    lines = {}

    def add(key, label, judged, unit="", predicted=None, low=None, high=None, **kw):
        lines[key] = QcLine.computed(key=key, label=label, judged=judged, unit=unit, predicted=predicted,
                                     low=low, high=high, **kw)

    # One strand alone is what the terminals read; its own rows would repeat them.
    for s in core.strands if len(ids) > 1 else []:
        add(f"strand.{s.id}.inductance", f"Inductance, strand {s.id} alone", "band", "H", s.inductance_H,
            *_band(s.inductance_H, tol.inductance))
        add(f"strand.{s.id}.resistance", f"DC resistance, strand {s.id} (at 20 °C)", "band", "ohm",
            s.resistance_20C_ohm, *_band(s.resistance_20C_ohm, tol.resistance))
    separate = core.hookup.name == "separate"
    if (core.hookup.joins or separate) and len(ids) >= 2:
        for a, b in zip(ids, ids[1:]):
            pair = core.pairs.get(f"{a}-{b}")
            aid = pair.series_aiding_H if pair else None
            opp = pair.series_opposing_H if pair else None
            aid_label, opp_label = ((f"Polarity {a}+{b}: link {a}.finish to {b}.start, read series-aiding",
                                     f"Polarity {a}−{b}: link {a}.finish to {b}.finish, read series-opposing")
                                    if separate else (f"Before joint: {a}+{b} series-aiding",
                                                      f"Before joint: {a}−{b} series-opposing"))
            add(f"pair.{a}-{b}.series_aiding", aid_label,
                "band" if aid else "record", "H", aid, *(_band(aid, tol.inductance) if aid else (None, None)),
                note="temporary link, removed after the reading" if separate else "")
            lo, hi = leakage_band(opp, tol.inductance)
            add(f"pair.{a}-{b}.series_opposing", opp_label,
                "band" if lo is not None else "record", "H", opp, lo, hi,
                note=f"leakage band ±{LEAKAGE_BAND_FACTOR * tol.inductance * 100:.0f} %" if lo is not None
                else "leakage")
    target = acc.inductance_basis == "target"
    add("terminal.inductance", "Inductance at the terminals" + (" (band: ordered target ± tolerance)" if target else ""),
        "band", "H", term.inductance_H, acc.inductance_min_H, acc.inductance_max_H,
        note=f"{acc.prediction_offset * 100:+.2f} % from target" if target else "")
    add("terminal.resistance", "DC resistance at the terminals (at 20 °C)", "band", "ohm", term.resistance_ohm,
        acc.resistance_min_ohm, acc.resistance_max_ohm)
    if len(ids) > 1:
        add("continuity.strand_to_strand", "Continuity between strands", "expect", expect="open")
        add("insulation.strand_to_strand", "Insulation resistance, strand to strand", "minimum", "ohm",
            low=ir_min)
    add("insulation.to_core", "Insulation resistance to core/form", "minimum", "ohm", low=ir_min)
    _optional_lines(core, add)
    hipot = core.hipot
    if hipot is not None and hipot.voltage_V:
        dur = hipot.duration_s
        add("hipot", f"Hipot {eng(hipot.voltage_V, 'V', sig=3)}" + (f", {float(dur):g} s" if dur else "")
            + ": leakage, withstand", "expect", expect="withstands", test_voltage_V=hipot.voltage_V,
            duration_s=dur)
    add("ambient", "Ambient temperature at test", "record", "degC")
    # The record prints exactly the required lines, in their order; the optional ones follow.
    out = [lines.get(k) or QcLine.computed(key=k, label=k, judged="record") for k in required]
    # The ring lines are printed when the order asks for the ring test; the others are offered at the bench.
    return out + [ln.model_copy(update={"required": False, "printed": k.startswith("ring.")})
                  for k, ln in lines.items() if k not in required and _optional(k)]


def _optional(key: str) -> bool:
    return any(key == o or o.startswith("strand.*") and key.startswith("strand.") and key.endswith(o[8:])
               for o in OPTIONAL_LINES)


def _optional_lines(core, add) -> None:
    """The Q lines (an LCR meter's Q or D at the test frequency) and the ring-wave lines."""
    tol = core.tolerances
    f = core.test.frequency_Hz
    at = f"at {eng(f, 'Hz', sig=3, trim=True)}"
    tol_q = q_tolerance(tol.inductance, tol.resistance)
    if len(core.strands) > 1:
        for s in core.strands:
            if s.q_test is not None and s.q_test >= MIN_Q_LINE:
                add(f"strand.{s.id}.q", f"Q, strand {s.id} alone ({at}; or D = 1/Q)", "minimum", "",
                    s.q_test, s.q_test * (1 - tol_q), note=f"band −{tol_q * 100:.0f} %: L and R tolerances")
    q = core.terminal.q_test
    if q is not None and q >= MIN_Q_LINE:
        add("terminal.q", f"Q at the terminals ({at}; or D = 1/Q)", "minimum", "", q, q * (1 - tol_q),
            note=_short_note(core.shorted_turn, q * (1 - tol_q)))
    ring = core.ring_wave
    if ring is not None and ring.frequency_Hz and ring.decay:
        lo, hi = _band(ring.frequency_Hz, ring.frequency_tolerance)
        cap = eng(ring.capacitor_F, "F", sig=3, trim=True)
        add("ring.frequency", f"Ring wave with {cap}: frequency", "band", "Hz", ring.frequency_Hz, lo, hi,
            note=f"band ±{ring.frequency_tolerance * 100:.1f} %: half the inductance tolerance")
        add("ring.decay", f"Ring wave with {cap}: ratio of successive peaks", "minimum", "", ring.decay,
            decay_minimum(ring.decay, ring.decrement_tolerance),
            note=f"log decrement +{ring.decrement_tolerance * 100:.1f} % at most")


def _signed(x) -> str:
    return f"{x * 100:+.1f} %".replace("-", "−")


def _short_note(short, q_low) -> str:
    """What one shorted turn at the worst place reads, and whether the Q band catches it."""
    if short is None:
        return ""
    text = (f"one shorted turn ({short.where}) reads Q {short.q:.3g} ({_signed(short.q_change)}), "
            f"L {_signed(short.inductance_change)}")
    if short.q_caught:
        return text + ": below the band"
    return (text + f": inside the band at this frequency; a short shows in Q from about "
            f"{eng(short.shows_from_Hz, 'Hz', sig=2, trim=True)}" + ("; the ring test catches it"
                                                                      if short.ring_caught else ""))


def plan_required(core) -> list[str]:
    """:func:`required_lines` for a sized design."""
    hipot = bool(core.cautions.hipot if core.cautions else True) and bool(core.hipot and core.hipot.voltage_V)
    # A record from before form.conductive has a core or not by its kind.
    conductive = core.form.conductive if core.form.conductive is not None else core.form.kind != "cylinder"
    return required_lines(len(core.strands) or 1, bool(core.hookup.joins), hipot, to_core=conductive,
                          separate=core.hookup.name == "separate")


def qc_plan(core, required: list[str] | None = None) -> QcPlan:
    """The design's QC plan; ``required`` keeps the list an earlier issue was recorded with."""
    return QcPlan.computed(lines=plan_lines(core, plan_required(core) if required is None else list(required)))


# --- Design state ----------------------------------------------------------------

def design_state(insulation, thermal) -> DesignState:
    """How the design stands at sizing: ``failing``, ``marginal`` or ``ok``, with the reasons.

    Failing when the insulation or the thermal check fails (a traveller is then
    issued only with ``--force``, and the state becomes ``forced``); marginal
    when either is marginal; ok otherwise.

    Examples
    --------
    >>> from windsheet.design.model import Insulation, Thermal
    >>> design_state(Insulation(verdict="marginal", reasons=["close to PD"]), None).state
    'marginal'
    >>> design_state(Insulation(verdict="pass"), None)
    DesignState(state='ok', reasons=[])
    """
    state, reasons = state_from_checks(insulation.verdict if insulation else None,
                                       insulation.reasons if insulation else None,
                                       thermal.verdict if thermal else None, thermal.reason if thermal else None)
    return DesignState.computed(state=state, reasons=reasons)


def issued_state(state: DesignState, forced: bool) -> DesignState:
    """The state a design is issued with: a failing design issued with ``--force`` is ``forced``."""
    if forced and state.state == "failing":
        return DesignState.computed(state="forced", reasons=state.reasons or ["the design check fails"])
    return state
