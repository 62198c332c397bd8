"""Sign-off: bench readings against the prediction, unit by unit, with a diagnosis.

:func:`evaluate_signoff` takes the issued :class:`~windsheet.design.model.Design` and a
:class:`~windsheet.qc.measured.MeasuredFile` and returns a plain JSON-ready dict.
Every line is judged against its band in the design's QC plan: the band the
traveller's QC record and the bench page print.
The chain inside sign-off:

* signoff_lines.py -- one reading against its band; required lines and the
  unit verdict (PASS, FAIL, INCOMPLETE);
* strand_balance.py -- strands compared with each other;
* wiring_hypotheses.py / signoff_diagnosis.py -- what one or two wiring
  mistakes, a turn count or a wire size would read, nearest named;
* signoff_text.py -- the terminal's text.

It never recomputes the design: hypotheses are evaluated with the
design's own strand matrix through the hookup network, and turn counts
through the engine's ``resize`` callable when the caller gives one.
"""

from __future__ import annotations

from typing import Callable, Optional

from windsheet.qc import signoff_lines as sl
from windsheet.common.errors import InputError, join_path
from .measured import MeasuredFile, UnitReadings, unit_ambient, unit_test_frequency
from .reading_formulas import coupling_coefficient, mutual_from_series
from windsheet.design.qc_plan import DEFAULT_MIN_INSULATION_OHM, leakage_band
from .signoff_diagnosis import diagnose_strand, diagnose_terminals
from .unit_diagnosis import one_diagnosis
from .signoff_text import history_lines, register_lines, summary_lines  # noqa: F401 - the CLI's
from .strand_balance import balance_lines, leakage_line
from .trace import unit_trace
from .wiring_hypotheses import GAUGE_STEP_R  # noqa: F401 - re-exported

HIPOT_CAUTION = ("Hipot and insulation testing use dangerous voltages: follow local codes, the "
                 "applicable standard and your licensed test procedure.")


def _fact(scope, basis, text):
    return {"scope": scope, "basis": basis, "likely": True, "finding": text,
            "log_distance": None, "log_distance_as_ordered": None}


def _conductor(design) -> str:
    # An aluminium winding is corrected to 20 °C with aluminium's coefficient, not copper's.
    return design.wire.conductor if design.wire else "copper"


def _bounds(design, key):
    """The band of the plan's line ``key``: ``(low, high)``, or two Nones when it has none."""
    ln = design.qc_plan.line(key)
    return (ln.low, ln.high) if ln is not None and ln.judged in ("band", "minimum") else (None, None)


def _waivable(design) -> list[str]:
    """Lines a waiver may name: the required ones, then the plan's optional ones."""
    return list(design.qc_required) + [ln.key for ln in design.qc_plan.lines if ln.key not in design.qc_required]


def _min_insulation(design) -> float:
    for key in ("insulation.to_core", "insulation.strand_to_strand"):
        ln = design.qc_plan.line(key)
        if ln is not None and ln.low is not None:
            return float(ln.low)
    ins = design.insulation
    return float((ins.ir_min_ohm if ins else None) or DEFAULT_MIN_INSULATION_OHM)


# --- Strands and pairs ----------------------------------------------------------------

def _strand_lines(design, unit, base, strands, ambient, f_default, tol_L, tol_R, resize):
    lines, findings, strand_L, strand_R = [], [], {}, {}
    for sid, sr in unit.strands.items():
        path = join_path(base, "strands", sid)
        if sid not in strands:
            raise InputError(path, f"this order has strands {', '.join(strands) or 'none'}")
        idx, sp = strands[sid]
        l_line = r_line = None
        if sr.inductance is not None:
            rd = sl.inductance_reading(sr.inductance, f_default)
            key = f"strand.{sid}.inductance"
            lo, hi = _bounds(design, key) if design.qc_plan.line(key) else sl.band(sp.inductance_H, tol_L)
            l_line = sl.inductance_line(key, f"Inductance, strand {sid} alone", rd, sp.inductance_H, lo, hi,
                                        note=sl.freq_note(rd))
            if not rd.get("open"):
                strand_L[sid] = rd["inductance_H"]
            lines.append(l_line)
        if sr.resistance is not None:
            key = f"strand.{sid}.resistance"
            r_line = sl.resistance_line(key, f"Resistance, strand {sid}", sr.resistance, ambient,
                                        sp.resistance_20C_ohm,
                                        _bounds(design, key) if design.qc_plan.line(key) else tol_R,
                                        join_path(path, "resistance"), _conductor(design))
            if r_line is not None:
                if r_line["measured"] is not None:
                    strand_R[sid] = r_line["measured"]
                lines.append(r_line)
        if sr.turns is not None:
            ok = sr.turns == sp.turns
            lines.append(sl.line(f"strand.{sid}.turns", f"Turns counted, strand {sid}", "turns",
                                 sr.turns, sp.turns, result="pass" if ok else "fail"))
            if not ok:
                findings.append(_fact(f"strand {sid}", "turn count",
                                      f"turn count off on strand {sid}: {sr.turns} counted, {sp.turns} ordered"))
        if any(x is not None and x["result"] == "fail" for x in (l_line, r_line)):
            f = diagnose_strand(sid, idx, design, l_line and l_line["measured"], r_line and r_line["measured"],
                                resize=resize, open_circuit=bool(sr.resistance and sr.resistance.open
                                                                 or sr.inductance and sr.inductance.open))
            if f:
                findings.append(f)
        if sr.q is not None:
            lines.append(_q_line(design, f"strand.{sid}.q", f"Q, strand {sid} alone", sr.q, f_default,
                                 join_path(path, "q")))
    return lines, findings, strand_L, strand_R


def _q_line(design, key, item, reading, f_unit, path):
    """A Q (or D) reading against the plan's Q line, at the test frequency it was predicted at."""
    f_design = design.test.frequency_Hz
    if f_unit and f_design and abs(f_unit / f_design - 1) > 0.01:
        raise InputError(path, f"Q is predicted at the traveller's test frequency, {f_design / 1e3:g} kHz; "
                               f"these readings are at {f_unit / 1e3:g} kHz: read Q at {f_design / 1e3:g} kHz")
    plan = design.qc_plan.line(key)
    rd = {"q": reading.q, "d": reading.d}
    if plan is None or plan.predicted is None:
        return sl.line(key, item, "", reading.value, None, reading=rd,
                       note=reading.describe() + "; no Q predicted for this issue: recorded only")
    return sl.line(key, item, "", reading.value, plan.predicted, plan.low, plan.high, reading=rd,
                   note=f"{reading.describe()} at {f_design / 1e3:g} kHz")


def _pair_lines(design, unit, base, strands, strand_L, tol_L, f_default):
    lines, findings = [], []
    for key, pr in unit.before_joint.items():
        path = join_path(base, "before_joint", key)
        a, b = key.split("-")
        for s in (a, b):
            if s not in strands:
                raise InputError(path, f"strand {s} is not in this order")
        pp = design.pairs.get("-".join(sorted((a, b))))
        La_p, Lo_p, k_p = (pp.series_aiding_H, pp.series_opposing_H, pp.coupling) if pp else (None, None, None)
        ra = sl.inductance_reading(pr.series_aiding, f_default) if pr.series_aiding else None
        ro = sl.inductance_reading(pr.series_opposing, f_default) if pr.series_opposing else None
        when = "with temporary links" if design.hookup.name == "separate" else "before joint"
        if ra:
            plan_key = f"pair.{'-'.join(sorted((a, b)))}.series_aiding"
            lo, hi = (_bounds(design, plan_key) if design.qc_plan.line(plan_key)
                      else sl.band(La_p, tol_L) if La_p else (None, None))
            lines.append(sl.inductance_line(f"pair.{key}.series_aiding", f"Series-aiding {a}+{b}, {when}", ra,
                                            La_p, lo, hi, note=sl.freq_note(ra)))
        if ro:
            plan = design.qc_plan.line(f"pair.{'-'.join(sorted((a, b)))}.series_opposing")
            band = ((plan.low, plan.high) if plan is not None and plan.judged == "band"
                    else leakage_band(Lo_p, tol_L))
            if ro.get("open"):
                lines.append(sl.inductance_line(f"pair.{key}.series_opposing",
                                                f"Series-opposing {a}−{b}, {when}", ro, Lo_p, *band))
            else:
                lines.append(leakage_line(f"pair.{key}.series_opposing", f"Series-opposing {a}−{b}, {when}",
                                          ro["inductance_H"], Lo_p, band, ro, sl.freq_note(ro)))
            if lines[-1]["result"] == "fail" and not ro.get("open"):
                findings.append(_fact(f"strands {a}-{b}", "leakage",
                                      f"series-opposing {a}−{b} reads {lines[-1]['deviation'] * 100:+.0f} % "
                                      f"against its prediction: strands {a} and {b} differ (see the balance) "
                                      "or are not laid tight together"))
        if not (ra and ro) or ra.get("open") or ro.get("open"):
            continue
        M = mutual_from_series(ra["inductance_H"], ro["inductance_H"])
        L1 = strand_L.get(a, strands[a][1].inductance_H)
        L2 = strand_L.get(b, strands[b][1].inductance_H)
        k = coupling_coefficient(M, L1, L2)
        src = "measured" if a in strand_L and b in strand_L else "predicted"
        lines.append(sl.line(f"pair.{key}.mutual", f"Mutual inductance {a}-{b}, (La - Lo)/4", "H", M,
                             pp.mutual_H if pp else None))
        k_lo = k_p * (1 - tol_L) if k_p is not None else None
        lines.append(sl.line(f"pair.{key}.coupling", f"Coupling {a}-{b}, M/sqrt(L{a} L{b})", "", k, k_p,
                             k_lo, None, note=f"strand inductances {src}"))
        if k < 0:
            findings.append(_fact(f"strands {a}-{b}", "marking",
                                  f"start and finish of strand {a} or {b} are swapped in the marking: "
                                  "series-aiding read lower than series-opposing"))
        elif k_lo is not None and k < k_lo:
            leak_ratio = (1 - k) / (1 - k_p) if k_p < 1 else float("inf")
            findings.append(_fact(f"strands {a}-{b}", "coupling",
                                  f"loose or spaced winding: strands {a} and {b} not laid tight together "
                                  f"(coupling {k:.3f}, {k_p:.3f} predicted; leakage x{leak_ratio:.2g})"))
    return lines, findings


# --- Terminals, insulation ------------------------------------------------------------

def _terminal_lines(design, unit, base, ambient, f_default, resize):
    term = design.terminal
    acc = term.accept
    t = unit.terminals
    lines = []
    l_line = r_line = None
    if t.inductance is not None:
        rd = sl.inductance_reading(t.inductance, f_default)
        note = sl.freq_note(rd)
        if acc.inductance_basis == "target":
            note += (f"; band is the ordered target ± tolerance, prediction "
                     f"{acc.prediction_offset * 100:+.2f} % from target")
        lo, hi = _bounds(design, "terminal.inductance")
        l_line = sl.inductance_line("terminal.inductance", "Inductance at terminals", rd,
                                    acc.inductance_centre_H or term.inductance_H, lo, hi, note=note)
        lines.append(l_line)
    if t.resistance is not None:
        r_line = sl.resistance_line("terminal.resistance", "Resistance at terminals", t.resistance, ambient,
                                    term.resistance_ohm, _bounds(design, "terminal.resistance"),
                                    join_path(base, "terminals", "resistance"), _conductor(design))
        if r_line is not None:
            lines.append(r_line)
    finding = None
    if any(x is not None and x["result"] == "fail" for x in (l_line, r_line)):
        taps = [{"from": tp.from_, "to": tp.to, "inductance_H": tp.henries} for tp in unit.taps]
        finding = diagnose_terminals(design, l_line and l_line["measured"], r_line and r_line["measured"],
                                     taps=taps, resize=resize,
                                     open_circuit=bool(t.resistance and t.resistance.open
                                                       or t.inductance and t.inductance.open))
    if t.q is not None:
        lines.append(_q_line(design, "terminal.q", "Q at terminals", t.q, f_default,
                             join_path(base, "terminals", "q")))
    for tp in unit.taps:
        open_ = tp.inductance == "open" or tp.inductance.open
        lines.append(sl.line(f"tap.{tp.from_}>{tp.to}", f"Inductance {tp.from_} to {tp.to}", "H",
                             None if open_ else tp.henries, note="open" if open_ else "extra reading for the diagnosis"))
    return lines, finding


def _ring_lines(design, unit, base):
    """The ring wave against the plan's ring lines; a ring with another capacitor cannot be judged."""
    r = unit.ring
    if r is None:
        return []
    path = join_path(base, "ring")
    rw = design.ring_wave
    if rw is None or not rw.frequency_Hz or design.qc_plan.line("ring.frequency") is None:
        raise InputError(join_path(path, "capacitor"), "this traveller asks for no ring test (the order's "
                                                       "test.ring_capacitor): the ring cannot be judged")
    if abs(r.capacitor / rw.capacitor_F - 1) > 0.02:
        raise InputError(join_path(path, "capacitor"),
                         f"the traveller's ring test uses {rw.capacitor_F * 1e9:.4g} nF; a ring with "
                         f"{r.capacitor * 1e9:.4g} nF cannot be judged against it")
    if r.frequency is None and r.decay is None:
        raise InputError(path, "give the ring's frequency or its decay (ratio of successive peaks), or both")
    lines = []
    cap = f"with {rw.capacitor_F * 1e9:.4g} nF"
    if r.frequency is not None:
        ln = design.qc_plan.line("ring.frequency")
        lines.append(sl.line("ring.frequency", f"Ring frequency {cap}", "Hz", r.frequency, ln.predicted,
                             ln.low, ln.high, reading={"capacitor_F": r.capacitor}, note=ln.note))
    if r.decay is not None:
        ln = design.qc_plan.line("ring.decay")
        lines.append(sl.line("ring.decay", f"Ring decay {cap} (ratio of successive peaks)", "", r.decay,
                             ln.predicted, ln.low, ln.high, reading={"capacitor_F": r.capacitor}, note=ln.note))
    return lines


_IR = (("strand_to_strand", "Insulation resistance strand to strand",
        "insulation between strands is weak: enamel nicked or pinched at a crossover"),
       ("to_core", "Insulation resistance to core",
        "insulation to core is weak: enamel scraped at a core edge or lead exit"))


def _insulation_lines(design, unit, base, strands):
    lines, findings = [], []
    ir_min = _min_insulation(design)
    ins = unit.insulation
    if ins is not None:
        tv = f" at {ins.test_voltage:.4g} V d.c." if ins.test_voltage else ""
        for key, label, words in _IR:
            value = getattr(ins, key)
            if value is None:
                continue
            if value == "open":
                # Above the tester's range: more than any minimum it can show.
                lines.append(sl.line(f"insulation.{key}", label, "ohm", None, None, ir_min, None, result="pass",
                                     reading={"open": True}, note=("open: above the tester's range " + tv).strip()))
                continue
            lines.append(sl.line(f"insulation.{key}", label, "ohm", value, None, ir_min, None, note=tv.strip()))
            if lines[-1]["result"] == "fail":
                findings.append(_fact("insulation", key, words))
    for key, state in unit.continuity.items():
        if state is None:
            continue
        pairs = ([f"{a}-{b}" for a in strands for b in strands if a < b]
                 if key == "strand_to_strand" else [key])
        for pair in pairs:
            a, b = pair.split("-")
            for s in (a, b):
                if s not in strands:
                    raise InputError(join_path(base, "continuity", key), f"strand {s} is not in this order")
            lines.append(sl.line(f"continuity.{pair}", f"Continuity strand {a} to {b}", "", None,
                                 result="pass" if state == "open" else "fail", reading={"state": state}, note=state))
            if state == "shorted":
                findings.append(_fact(f"strands {a}-{b}", "continuity",
                                      f"shorted strands: {a} and {b} touch through damaged insulation (nicked "
                                      "enamel, a pinched crossover or a stray strand at a joint)"))
    h = unit.hipot
    if h is not None and h.complete:
        spec = design.qc_plan.line("hipot")
        v_spec = spec.test_voltage_V if spec else (design.hipot.voltage_V if design.hipot else None)
        t_spec = spec.duration_s if spec else (design.hipot.duration_s if design.hipot else None)
        lines.append(sl.line("hipot.voltage", "Hipot voltage applied", "V", h.voltage, v_spec, v_spec, None,
                             note=design.hipot.basis if design.hipot else ""))
        lines.append(sl.line("hipot.duration", "Hipot duration", "s", h.duration, t_spec, t_spec, None))
        if h.leakage is not None:
            lines.append(sl.line("hipot.leakage", "Hipot leakage current", "A", h.leakage))
        lines.append(sl.line("hipot.result", "Hipot withstand", "", None, result=h.result,
                             reading={"result": h.result}, note=h.result))
        if h.result == "fail":
            findings.append(_fact("insulation", "hipot", "insulation broke down at hipot: quarantine the unit "
                                  "and investigate under your hipot procedure"))
        elif v_spec and h.voltage < v_spec:
            findings.append(_fact("insulation", "hipot voltage",
                                  f"hipot applied at {h.voltage:.4g} V, below the {v_spec:.4g} V specified: "
                                  "repeat the test at the specified voltage"))
    return lines, findings


# --- One unit ------------------------------------------------------------------------

def evaluate_unit(design, measured: MeasuredFile, unit: UnitReadings, index: int,
                  resize: Optional[Callable] = None) -> dict:
    """Lines, verdict and diagnosis for one unit (see :func:`evaluate_signoff`)."""
    base = join_path("units", index)
    tol_L, tol_R = float(design.tolerances.inductance or 0.0), float(design.tolerances.resistance or 0.0)
    ambient = unit_ambient(measured, unit)
    f_default = unit_test_frequency(measured, unit)
    if f_default is None:
        f_default = design.test.frequency_Hz
    strands = {s.id: (i, s) for i, s in enumerate(design.strands)}
    lines, findings, strand_L, strand_R = _strand_lines(design, unit, base, strands, ambient, f_default,
                                                        tol_L, tol_R, resize)
    b_lines, b_findings = balance_lines(design, strand_L, strand_R, resize)
    lines += b_lines
    findings += b_findings
    p_lines, p_findings = _pair_lines(design, unit, base, strands, strand_L, tol_L, f_default)
    lines += p_lines
    findings += p_findings
    t_lines, t_finding = _terminal_lines(design, unit, base, ambient, f_default, resize)
    lines += t_lines
    if t_finding:
        findings.append(t_finding)
    lines += _ring_lines(design, unit, base)
    i_lines, i_findings = _insulation_lines(design, unit, base, strands)
    lines += i_lines
    findings += i_findings
    findings = one_diagnosis(design, unit, lines, findings)

    required = design.qc_required
    waive = {**measured.waive, **unit.waive}
    sl.check_waivers(unit.waive, _waivable(design), join_path(base, "waive"))
    missing_all = sl.missing_lines(required, lines, ambient, list(strands))
    # An optional line not read may be waived too: the reason is kept with the unit.
    unread = missing_all + sl.missing_lines([k for k in _waivable(design) if k not in required], lines, ambient,
                                            list(strands))
    waived = {k: v for k, v in waive.items() if k in unread}
    missing = [k for k in missing_all if k not in waived]
    lines += [sl.waived_line(k, r) for k, r in waived.items()]
    if ambient is None and (unit.terminals.resistance is not None
                            or any(sr.resistance is not None for sr in unit.strands.values())):
        findings.append(_fact("unit", "incomplete", "resistance read but not judged: no ambient temperature "
                                                    "to correct it to 20 °C; give 'ambient: 21 degC'"))
        missing += [k for k in ("ambient",) if k not in missing]
    if missing:
        findings.append(_fact("unit", "incomplete", "not proven: required QC lines not read: " + ", ".join(missing)))
    return {"serial": unit.serial, "verdict": sl.unit_verdict(lines, missing), "lines": lines,
            "diagnosis": findings, "missing": missing, "waived": waived, "ambient_C": ambient,
            "notes": unit.notes, "design_status": design.state.state, "trace": unit_trace(measured, unit)}


# --- All units ------------------------------------------------------------------------

def spread_of_units(units: list[dict]) -> list[dict]:
    """Mean and range over the passing units of every numeric measured line."""
    by_key: dict[str, dict] = {}
    for u in units:
        if u["verdict"] != "pass":
            continue
        for ln in u["lines"]:
            v = ln["measured"]
            if v is None or ln["unit"] == "turns":
                continue
            entry = by_key.setdefault(ln["key"], {"key": ln["key"], "item": ln["item"], "unit": ln["unit"],
                                                  "values": []})
            entry["values"].append(float(v))
    out = []
    for entry in by_key.values():
        vals = entry.pop("values")
        mean = sum(vals) / len(vals)
        entry.update(count=len(vals), mean=mean, min=min(vals), max=max(vals), range=max(vals) - min(vals),
                     range_fraction=(max(vals) - min(vals)) / abs(mean) if mean else None)
        out.append(entry)
    return out


def _check_job(design, measured: MeasuredFile):
    job = design.job
    if measured.job != job.number:
        raise InputError("job", f"is {measured.job!r} but the order is job {job.number!r}")
    rev = job.revision
    if measured.revision is not None and rev is not None and str(measured.revision) != str(rev):
        raise InputError("revision", f"is {measured.revision!r} but the order is revision {rev!r}")
    sl.check_waivers(measured.waive, _waivable(design), "waive")
    serials = list(job.units)
    seen = {}
    for i, u in enumerate(measured.units):
        path = join_path("units", i, "serial")
        if u.serial in seen:
            raise InputError(path, f"{u.serial!r} is listed twice (also units[{seen[u.serial]}])")
        seen[u.serial] = i
        if serials and u.serial not in serials:
            shown = ", ".join(serials[:4]) + (" ..." if len(serials) > 4 else "")
            raise InputError(path, f"{u.serial!r} is not a serial number of this job ({shown})")


def evaluate_signoff(design, measured: MeasuredFile, inspector: Optional[str] = None,
                     resize: Optional[Callable] = None) -> dict:
    """Evaluate every unit's readings against the issued design.

    Parameters
    ----------
    design : windsheet.design.model.Design
        The design the traveller was issued with; only its numbers and QC plan are read.
    measured : MeasuredFile
        The bench readings (measured.py), already in SI.
    inspector : str, optional
        Overrides the inspector named in the file.
    resize : callable, optional
        ``resize(turns) -> (L matrix [H], R [ohm])``, the engine re-sizing the
        order at another turn count (sizing.strand_values_at_turns); without
        it no turn count is claimed.

    Returns
    -------
    result : dict
        JSON-ready: ``job``, ``revision``, ``order_hash``, ``inspector``, ``date``,
        ``design_status``, ``verdict`` ("pass", "fail" or "incomplete"), ``units``
        (each with ``serial``, ``verdict``, ``lines``, ``diagnosis``, ``missing``,
        ``waived``), ``spread`` (passing units only), ``units_passed``,
        ``units_failed``, ``units_incomplete``, ``units_not_signed``, ``cautions``.

    References
    ----------
    .. [1] IEC 60028 (copper resistance at 20 °C); F. W. Grover, Inductance
       Calculations (1946), ch. 1 (M from series-aiding and -opposing readings).
    """
    _check_job(design, measured)
    units = [evaluate_unit(design, measured, u, i, resize) for i, u in enumerate(measured.units)]
    job = design.job
    signed = {u["serial"] for u in units}
    count = {v: sum(u["verdict"] == v for u in units) for v in sl.VERDICTS}
    cautions = [HIPOT_CAUTION] if any(u.hipot or u.insulation for u in measured.units) else []
    return {
        "schema": "windsheet.signoff/2",
        "job": job.number, "part": job.part, "customer": job.customer,
        "revision": job.revision, "order_hash": design.order_hash,
        "inspector": inspector or measured.inspector, "date": measured.date,
        "instruments": measured.instruments,
        "design_status": design.state.model_dump(),
        "verdict": sl.job_verdict([u["verdict"] for u in units]),
        "units": units,
        "units_passed": count["pass"], "units_failed": count["fail"], "units_incomplete": count["incomplete"],
        "units_not_signed": [s for s in job.units if s not in signed],
        "spread": spread_of_units(units),
        "units_apart": [{"serial": u["serial"], "verdict": u["verdict"]} for u in units if u["verdict"] != "pass"],
        "insulation_minimum_ohm": _min_insulation(design),
        "cautions": cautions,
    }


def exit_status(result: dict) -> int:
    """0 when every unit passes, 1 when any fails, 3 when none fails but some are incomplete."""
    return sl.EXIT_STATUS[result["verdict"]]
