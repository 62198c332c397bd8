"""Sign-off of a transformer: its routine tests against the design's QC plan, with a diagnosis.

The readings (:mod:`windsheet.qc.transformer_readings`) are YAML like a coil's,
read winding by winding.  Every line is judged against the band of the design's
QC plan; the result has the coil sign-off's shape, so the register, the sheet
and the report take it as they take a coil's.

The diagnosis names what a shop finds at this stage: a winding reversed (its
polarity), a wrong tap, turns off by n (the ratio), a shorted turn (the
magnetising inductance collapsed while the resistances read as built), an open
winding.
"""

from __future__ import annotations

from typing import Optional

from windsheet.common.errors import InputError, join_path

from . import signoff_lines as sl
from .trace import unit_trace
from .transformer_readings import TransformerReadings, TransformerUnit



#: A magnetising inductance below this share of its prediction, with every resistance on
#: prediction, is read as a shorted turn (windsheet's own threshold).
SHORTED_TURN_INDUCTANCE = 0.5


def _fact(scope, basis, text, likely=True):
    return {"scope": scope, "basis": basis, "likely": likely, "finding": text,
            "log_distance": None, "log_distance_as_ordered": None}


def _plan_pair(design, head: str, key: str):
    """The plan's line for a pair read either way round (``sec1-primary`` is ``primary-sec1``)."""
    names = [w.name for w in design.windings] + ["core"]
    for a in names:
        for b in names:
            if key in (f"{a}-{b}", f"{b}-{a}"):
                for k in (f"{head}.{a}-{b}", f"{head}.{b}-{a}"):
                    if design.qc_plan.line(k) is not None:
                        return design.qc_plan.line(k)
    return None


def _band(design, key):
    ln = design.qc_plan.line(key)
    return (ln.low, ln.high) if ln is not None else (None, None)


def evaluate_transformer_unit(design, readings: TransformerReadings, unit: TransformerUnit, index: int) -> dict:
    """Lines, verdict and diagnosis of one transformer unit."""
    base = join_path("units", index)
    ambient = unit.ambient if unit.ambient is not None else readings.ambient
    f_default = readings.test_frequency
    names = [w.name for w in design.windings]
    first = design.windings[0]
    lines, findings = [], []
    r_off = {}
    for name, wr in unit.windings.items():
        path = join_path(base, "windings", name)
        if name not in names:
            raise InputError(path, f"this transformer has windings {', '.join(names)}")
        w = design.winding(name)
        if wr.resistance is not None:
            key = f"winding.{name}.resistance"
            ln = sl.resistance_line(key, f"Resistance, {name}", wr.resistance, ambient, w.resistance_20C_ohm,
                                    _band(design, key), join_path(path, "resistance"), w.wire.conductor)
            lines.append(ln)
            if wr.resistance.open:
                findings.append(_fact(name, "open", f"{name} is open: a broken wire, or a lead or tap not terminated"))
            elif ln["measured"] is not None:
                r_off[name] = ln["measured"] / w.resistance_20C_ohm - 1
        if wr.inductance is not None:
            key = f"winding.{name}.inductance"
            rd = sl.inductance_reading(wr.inductance, f_default or design.sections[0].test.frequency_Hz)
            lo, hi = _band(design, key) if design.qc_plan.line(key) else (None, None)
            lines.append(sl.line(key, f"Inductance, {name}, the others open", "H", rd["inductance_H"],
                                 w.inductance_H, lo, hi, reading=rd, note=sl.freq_note(rd)))
        if wr.ratio is not None:
            key = f"winding.{name}.ratio"
            lo, hi = _band(design, key)
            lines.append(sl.line(key, f"Voltage ratio {name} / {first.name}", "", wr.ratio, w.turns_ratio, lo, hi,
                                 note=f"{w.turns} / {first.turns} turns"))
            if lines[-1]["result"] == "fail":
                turns = wr.ratio * first.turns
                off = round(turns) - w.turns
                findings.append(_fact(name, "turns", f"{name} reads as {turns:.1f} turns against {w.turns} ordered: "
                                      f"{'about ' + str(abs(off)) + ' turn(s) ' + ('more' if off > 0 else 'fewer') if off else 'a fraction of a turn off'}"
                                      f" (ratio {wr.ratio:.5f}, {w.turns_ratio:.5f} predicted)"
                                      + ("; or a tap taken as its end" if w.taps else "")))
        if wr.polarity is not None:
            key = f"winding.{name}.polarity"
            ok = wr.polarity == "in phase"
            lines.append(sl.line(key, f"Polarity of {name} against {first.name}", "", None,
                                 result="pass" if ok else "fail", reading={"polarity": wr.polarity}, note=wr.polarity))
            if not ok:
                findings.append(_fact(name, "polarity", f"winding {name} reversed: its start and finish tags are "
                                      "swapped, or it was wound the other way: the dotted ends are out of phase"))
    for key, tr in unit.taps.items():
        path = join_path(base, "taps", key)
        plan_key = f"winding.{key}.ratio"
        ln_plan = design.qc_plan.line(plan_key)
        if ln_plan is None:
            raise InputError(path, "no such tap; taps are named like primary.tap1279")
        lines.append(sl.line(plan_key, ln_plan.label, "", tr.ratio, ln_plan.predicted, ln_plan.low, ln_plan.high))
        if lines[-1]["result"] == "fail":
            name, _, tap = key.partition(".")
            at = tr.ratio * first.turns
            findings.append(_fact(name, "tap", f"wrong tap on {name}: it reads as turn {at:.0f}, the order taps turn "
                                  f"{tap[3:]}"))
    for name, rd_in in unit.leakage.items():
        key = f"leakage.{name}"
        ln_plan = design.qc_plan.line(key)
        if ln_plan is None:
            raise InputError(join_path(base, "leakage", name), "no leakage line for this winding")
        rd = sl.inductance_reading(rd_in, f_default or design.sections[0].test.frequency_Hz)
        lines.append(sl.line(key, ln_plan.label, "H", rd["inductance_H"], ln_plan.predicted, ln_plan.low, ln_plan.high,
                             reading=rd, note=ln_plan.note))
    for key, value in unit.insulation.items():
        ln_plan = _plan_pair(design, "insulation", key)
        if ln_plan is None:
            raise InputError(join_path(base, "insulation", key), "expected a pair like primary-sec1 or primary-core")
        lines.append(sl.line(ln_plan.key, ln_plan.label, "ohm", value, None, ln_plan.low, None))
        if lines[-1]["result"] == "fail":
            findings.append(_fact("insulation", key, f"insulation {key} is weak: a barrier or enamel damaged"))
    for key, h in unit.hipot.items():
        ln_plan = _plan_pair(design, "hipot", key)
        path = join_path(base, "hipot", key)
        if ln_plan is None:
            raise InputError(path, "no barrier between these windings is hipot-tested")
        if h.result is None:
            raise InputError(path, "expected 'pass' or 'fail', or {voltage: 4 kV, duration: 60 s, result: pass}")
        short = [f"{h.voltage:.4g} V, below the {ln_plan.test_voltage_V:.4g} V specified"
                 for _ in [0] if h.voltage is not None and h.voltage < ln_plan.test_voltage_V]
        short += [f"held {h.duration:.3g} s, under the {ln_plan.duration_s:.3g} s specified"
                  for _ in [0] if h.duration is not None and h.duration < ln_plan.duration_s]
        result = "fail" if short else h.result
        note = h.result if not short else f"{h.result} but " + "; ".join(short)
        lines.append(sl.line(ln_plan.key, ln_plan.label, "", None, result=result, reading=h.model_dump(exclude_none=True),
                             note=note))
        if h.result == "fail":
            findings.append(_fact("insulation", key, f"the barrier {key} broke down at hipot: quarantine the unit "
                                  "and investigate under your hipot procedure"))
        elif short:
            findings.append(_fact("insulation", key, f"hipot {key} not proven: " + "; ".join(short)))
    # A shorted turn: the first winding's inductance collapses (the short reflects as a near short)
    # while the resistances read as built.
    ind = next((x for x in lines if x["key"] == f"winding.{first.name}.inductance"), None)
    if ind and ind["measured"] is not None and ind["result"] == "fail" and \
            ind["measured"] < SHORTED_TURN_INDUCTANCE * first.inductance_H and \
            all(abs(v) < design.tolerances.get("resistance", 0.1) for v in r_off.values()):
        findings.append(_fact(first.name, "shorted turn", "shorted turn (or turns) likely: the magnetising inductance "
                              f"reads {ind['measured'] / first.inductance_H * 100:.0f} % of its prediction while every "
                              "resistance reads as built (fewer turns would lower the resistance too)"))
    required = design.qc_required
    waive = {**readings.waive, **unit.waive}
    sl.check_waivers(unit.waive, required, join_path(base, "waive"))
    missing_all = [k for k in required if not _present(k, lines, ambient)]
    waived = {k: v for k, v in waive.items() if k in missing_all}
    missing = [k for k in missing_all if k not in waived]
    lines += [sl.waived_line(k, r) for k, r in waived.items()]
    if missing:
        findings.append(_fact("unit", "incomplete", "not proven: required QC lines not read: " + ", ".join(missing)))
    return {"serial": unit.serial, "verdict": sl.unit_verdict(lines, missing), "lines": lines,
            "diagnosis": findings, "missing": missing, "waived": waived, "ambient_C": ambient,
            "notes": unit.notes, "design_status": design.state.state, "trace": unit_trace(readings, unit)}


def _present(key, lines, ambient):
    if key == "ambient":
        return ambient is not None
    return any(x["key"] == key for x in lines)


def evaluate_transformer_signoff(design, readings: TransformerReadings, inspector: Optional[str] = None) -> dict:
    """Every unit's readings against the transformer's design (the coil sign-off's result shape)."""
    job = design.job
    if readings.job != job.number:
        raise InputError("job", f"is {readings.job!r} but the order is job {job.number!r}")
    if readings.revision is not None and str(readings.revision) != str(job.revision):
        raise InputError("revision", f"is {readings.revision!r} but the order is revision {job.revision!r}")
    sl.check_waivers(readings.waive, design.qc_required, "waive")
    seen = {}
    for i, u in enumerate(readings.units):
        if u.serial in seen:
            raise InputError(join_path("units", i, "serial"), f"{u.serial!r} is listed twice")
        seen[u.serial] = i
        if job.units and u.serial not in job.units:
            raise InputError(join_path("units", i, "serial"), f"{u.serial!r} is not a serial number of this job")
    units = [evaluate_transformer_unit(design, readings, u, i) for i, u in enumerate(readings.units)]
    count = {v: sum(u["verdict"] == v for u in units) for v in sl.VERDICTS}
    signed = {u["serial"] for u in units}
    from .signoff import HIPOT_CAUTION, spread_of_units

    return {
        "schema": "windsheet.signoff/2",
        "job": job.number, "part": job.part, "customer": job.customer, "revision": job.revision,
        "order_hash": design.order_hash, "inspector": inspector or readings.inspector, "date": readings.date,
        "instruments": readings.instruments, "design_status": design.state.model_dump(),
        "verdict": sl.job_verdict([u["verdict"] for u in units]), "units": units,
        "units_passed": count["pass"], "units_failed": count["fail"], "units_incomplete": count["incomplete"],
        "units_not_signed": [s for s in job.units if s not in signed], "spread": spread_of_units(units),
        "units_apart": [{"serial": u["serial"], "verdict": u["verdict"]} for u in units if u["verdict"] != "pass"],
        "insulation_minimum_ohm": min((ln.low for ln in design.qc_plan.lines if ln.judged == "minimum"), default=None),
        "cautions": [HIPOT_CAUTION] if any(u.hipot or u.insulation for u in readings.units) else [],
    }


__all__ = ["evaluate_transformer_signoff"]
