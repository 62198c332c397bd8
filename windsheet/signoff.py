"""Sign-off: bench readings against the prediction, with a diagnosis in shop words.

Pure evaluation: :func:`evaluate_signoff` takes the prediction dict (see
predict.py) and a :class:`~windsheet.measured.MeasuredFile` and returns a plain
JSON-ready dict.  It reads the prediction's numbers and never recomputes
physics; a wiring fault is recognised by which of the prediction's
``alternatives`` (what the terminals would read wired other ways) or fault
hypotheses lies nearest the readings in log-ratio.
"""

from __future__ import annotations

import math
from typing import Optional

from .errors import InputError, join_path
from .measured import (ALPHA_COPPER_20C, InductanceReading, MeasuredFile, UnitReadings,
                       coupling_coefficient, mutual_from_series, resistance_at_20C, unit_ambient,
                       unit_test_frequency)
from .traceability import unit_trace

#: Resistance ratio of one wire-size step.  AWG (ASTM B258) steps the diameter
#: by 92**(1/39); IEC 60317 nominal diameters follow the R20 series, 10**(1/20),
#: which gives nearly the same 1.26 in resistance.
GAUGE_STEP_R = 92.0 ** (2.0 / 39.0)

#: Insulation resistance below which a unit fails when the order gives no figure
#: (common practice for small windings at 500 V d.c.; the applicable standard governs).
DEFAULT_MIN_INSULATION_OHM = 100e6

#: A fault hypothesis is reported as the cause only when it sits this close to the
#: readings in log-ratio distance (about 15 %); beyond that the nearest is named as a lead.
CLEAR_MATCH = math.log(1.15)

HIPOT_CAUTION = ("Hipot and insulation testing use dangerous voltages: follow local codes, the "
                 "applicable standard and your licensed test procedure.")

# Shop words for "the terminals read like hookup X" given the ordered hookup.
_READS_LIKE = {
    "series-opposing": "a strand is reversed (finish joined to finish): the fields cancel",
    "one strand reversed": "a strand is reversed (finish joined to finish): its field opposes the others",
    "series-aiding": "the strands are in series aiding, finish joined to start",
    "parallel": "the strands are paralleled (starts joined, finishes joined) instead of in series",
    "single strand": "a strand is open or not joined: the terminals read one strand alone",
}
_READS_LIKE_WHEN = {
    ("series-opposing", "series-aiding"):
        "a strand is reversed (finish joined to start): the coil was ordered series-opposing, "
        "non-inductive, and reads as series-aiding",
    ("parallel", "series-aiding"):
        "the strands are joined in series instead of paralleled",
    ("parallel", "series-opposing"):
        "the strands are joined in series (finish to finish) instead of paralleled",
}


# --- Lines ----------------------------------------------------------------------------

def _band_result(value, lo, hi) -> str:
    if value is None:
        return "fail"
    if lo is not None and value < lo:
        return "fail"
    if hi is not None and value > hi:
        return "fail"
    return "pass"


def _line(key, item, unit, measured, predicted=None, lo=None, hi=None, *, result=None,
          reading=None, note=""):
    if result is None:
        result = "info" if lo is None and hi is None else _band_result(measured, lo, hi)
    deviation = None
    if measured is not None and predicted:
        deviation = measured / predicted - 1.0
    return {"key": key, "item": item, "unit": unit, "measured": measured, "predicted": predicted,
            "min": lo, "max": hi, "result": result, "deviation": deviation,
            "reading": reading or {}, "note": note}


def _band(value, tol):
    return value * (1 - tol), value * (1 + tol)


def _inductance_reading(reading: InductanceReading, default_f) -> dict:
    out = reading.describe()
    f = reading.frequency(default_f)
    out["test_frequency_Hz"] = f
    return out


def _freq_note(reading: dict) -> str:
    f = reading.get("test_frequency_Hz")
    if reading.get("method") == "ringing":
        return (f"rung at {reading['resonant_frequency_Hz'] / 1e3:.4g} kHz against "
                f"{reading['capacitor_F'] * 1e9:.4g} nF")
    return f"at {f / 1e3:.4g} kHz" if f else ""


def _resistance_line(key, item, reading, ambient, predicted, tol_or_band, path):
    """A resistance line corrected to 20 degC; ``tol_or_band`` is a fraction or (lo, hi)."""
    lo, hi = (_band(predicted, tol_or_band) if not isinstance(tol_or_band, tuple) else tol_or_band)
    if reading.open:
        return _line(key, item, "ohm", None, predicted, lo, hi, result="fail",
                     reading={"open": True}, note="open circuit")
    if ambient is None:
        raise InputError(path, "needs the ambient temperature to correct it to 20 degC; "
                               "give 'ambient: 21 degC' for the unit or the whole file")
    r20 = float(resistance_at_20C(reading.value, ambient))
    note = f"{reading.value:.5g} ohm at {ambient:.3g} degC, corrected to 20 degC (alpha {ALPHA_COPPER_20C}/K)"
    return _line(key, item, "ohm", r20, predicted, lo, hi,
                 reading={"resistance_ohm": reading.value, "ambient_C": ambient}, note=note)


# --- Diagnosis ------------------------------------------------------------------------

def _log_distance(measured: dict, expected: dict) -> float:
    """Euclidean distance of the natural-log ratios over the quantities read."""
    total = 0.0
    for q, m in measured.items():
        e = expected.get(q)
        if m is None or e is None or m <= 0 or e <= 0:
            continue
        total += math.log(m / e) ** 2
    return math.sqrt(total)


def _turns_hypothesis(measured: dict, ordered: dict, turns: int):
    """Best-fitting turn count, taking L ~ N^2 and R ~ N (same wire, same form)."""
    parts = []
    if measured.get("L") and ordered.get("L"):
        parts.append((2.0, math.log(measured["L"] / ordered["L"])))
    if measured.get("R") and ordered.get("R"):
        parts.append((1.0, math.log(measured["R"] / ordered["R"])))
    if not parts:
        return None
    x = sum(a * y for a, y in parts) / sum(a * a for a, _ in parts)
    n = turns * math.exp(x)
    if round(n) == turns:
        return None
    expected = {"L": ordered.get("L") and ordered["L"] * math.exp(2 * x),
                "R": ordered.get("R") and ordered["R"] * math.exp(x)}
    return {"basis": "turns", "expected": expected, "turns": int(round(n)),
            "finding": f"turn count off: the readings fit about {int(round(n))} turns per strand, "
                       f"{turns} ordered"}


def _gauge_hypotheses(ordered: dict):
    out = []
    for steps in (1, 2, -1, -2):
        if not ordered.get("R"):
            break
        size = "one wire size" if abs(steps) == 1 else "two wire sizes"
        way = "thinner" if steps > 0 else "thicker"
        out.append({"basis": f"gauge{steps:+d}",
                    "expected": {"L": ordered.get("L"), "R": ordered["R"] * GAUGE_STEP_R ** steps},
                    "finding": f"wrong wire: resistance is off by about {size} ({way} than ordered; "
                               f"one AWG or R20 step is x{GAUGE_STEP_R:.2f} in resistance)"})
    return out


def _rank(measured: dict, ordered: dict, hypotheses: list[dict]):
    """Hypotheses nearest first.  The turn count is fitted (a free parameter) and
    can mimic a wiring fault -- one strand alone reads like half the turns -- so a
    fixed hypothesis that matches clearly is put ahead of it."""
    scored = [(_log_distance(measured, h["expected"]), h) for h in hypotheses]
    scored.sort(key=lambda t: t[0])
    fixed = [t for t in scored if t[1]["basis"] != "turns"]
    if fixed and fixed[0][0] <= CLEAR_MATCH and scored[0][1]["basis"] == "turns":
        scored.remove(fixed[0])
        scored.insert(0, fixed[0])
    d_ordered = _log_distance(measured, ordered)
    return scored, d_ordered


def _finding(scope, h, distance, d_ordered):
    sure = distance <= CLEAR_MATCH and distance < d_ordered
    text = h["finding"] if sure else f"readings match no expected fault closely; nearest: {h['finding']}"
    return {"scope": scope, "finding": text, "basis": h["basis"], "likely": sure,
            "log_distance": distance, "log_distance_as_ordered": d_ordered}


def _nearest(measured, ordered, hypotheses, turns):
    """Add the wrong-gauge and fitted-turns hypotheses, rank them all, and return
    ``(distance, best, distance_as_ordered)`` for the nearest, or None."""
    hyps = list(hypotheses) + _gauge_hypotheses(ordered)
    t = _turns_hypothesis(measured, ordered, turns) if turns else None
    if t:
        hyps.append(t)
    scored, d_ordered = _rank(measured, ordered, hyps)
    if not scored:
        return None
    distance, best = scored[0]
    return distance, best, d_ordered


def diagnose_terminals(prediction: dict, L: Optional[float], R: Optional[float], open_circuit=False):
    """Explain terminal readings that miss: nearest alternative hookup or fault.

    Parameters
    ----------
    prediction : dict
        The Prediction (reads ``terminal``, ``hookup``, ``alternatives``, ``strands``).
    L : float or None
        Terminal inductance read. [H]
    R : float or None
        Terminal resistance corrected to 20 degC. [ohm]
    open_circuit : bool
        The meter showed no continuity between the terminals.

    Returns
    -------
    finding : dict or None
        ``{scope, finding, basis, likely, log_distance, log_distance_as_ordered}``.
    """
    if open_circuit:
        return {"scope": "terminals", "basis": "open", "likely": True,
                "finding": "open circuit at the terminals: a strand broken, a lead not soldered, "
                           "or the joint not made", "log_distance": None, "log_distance_as_ordered": None}
    term = prediction["terminal"]
    ordered = {"L": term.get("inductance_H"), "R": term.get("resistance_ohm")}
    ordered_name = prediction.get("hookup", {}).get("name")
    measured = {"L": L, "R": R}
    hyps = []
    for name, alt in (prediction.get("alternatives") or {}).items():
        if name == ordered_name:
            continue
        text = _READS_LIKE_WHEN.get((ordered_name, name), _READS_LIKE.get(name, f"wired as {name}"))
        hyps.append({"basis": f"hookup:{name}", "finding": text,
                     "expected": {"L": alt.get("inductance_H"), "R": alt.get("resistance_ohm")}})
    nearest = _nearest(measured, ordered, hyps, _predicted_turns(prediction))
    if nearest is None:
        return None
    distance, best, d_ordered = nearest
    if d_ordered <= distance:
        return {"scope": "terminals", "basis": "as ordered", "likely": False,
                "finding": "terminal readings lie nearest the ordered hookup; no wiring fault "
                           "explains the miss (check the meter, test frequency and temperature)",
                "log_distance": d_ordered, "log_distance_as_ordered": d_ordered}
    return _finding("terminals", best, distance, d_ordered)


def diagnose_strand(sid: str, strand_pred: dict, L: Optional[float], R: Optional[float],
                    open_circuit=False):
    """Explain a strand's readings that miss: wrong wire or turn count.

    Parameters
    ----------
    sid : str
        Strand name ("A").
    strand_pred : dict
        The prediction's entry for the strand (``inductance_H``, ``resistance_20C_ohm``, ``turns``).
    L, R : float or None
        Strand inductance [H] and resistance corrected to 20 degC [ohm].

    Returns
    -------
    finding : dict or None
    """
    scope = f"strand {sid}"
    if open_circuit:
        return {"scope": scope, "basis": "open", "likely": True,
                "finding": f"strand {sid} is open: broken wire or a lead not terminated",
                "log_distance": None, "log_distance_as_ordered": None}
    ordered = {"L": strand_pred.get("inductance_H"), "R": strand_pred.get("resistance_20C_ohm")}
    measured = {"L": L, "R": R}
    nearest = _nearest(measured, ordered, [], int(strand_pred.get("turns") or 0))
    if nearest is None:
        return None
    distance, best, d_ordered = nearest
    if d_ordered <= distance:
        return None
    f = _finding(scope, best, distance, d_ordered)
    f["finding"] = f"strand {sid}: {f['finding']}"
    return f


def _predicted_turns(prediction) -> int:
    strands = prediction.get("strands") or []
    return int(strands[0]["turns"]) if strands and strands[0].get("turns") else 0


# --- One unit ------------------------------------------------------------------------

def _strand_index(prediction):
    return {s["id"]: (i, s) for i, s in enumerate(prediction.get("strands") or [])}


def _pair_strands(key: str):
    a, b = key.split("-")
    return a, b


def _min_insulation(prediction) -> float:
    ins = prediction.get("insulation") or {}
    return float(ins.get("ir_min_ohm") or DEFAULT_MIN_INSULATION_OHM)


def evaluate_unit(prediction: dict, measured: MeasuredFile, unit: UnitReadings, index: int) -> dict:
    """Lines, verdict and diagnosis for one unit (see :func:`evaluate_signoff`)."""
    base = join_path("units", index)
    tol = prediction.get("tolerances") or {}
    tol_L = float(tol.get("inductance") or 0.0)
    tol_R = float(tol.get("resistance") or 0.0)
    ambient = unit_ambient(measured, unit)
    f_default = unit_test_frequency(measured, unit)
    if f_default is None:
        f_default = (prediction.get("test") or {}).get("frequency_Hz")
    strands = _strand_index(prediction)
    lines, findings = [], []
    strand_L = {}

    for sid, sr in unit.strands.items():
        path = join_path(base, "strands", sid)
        if sid not in strands:
            raise InputError(path, f"this order has strands {', '.join(strands) or 'none'}")
        _, sp = strands[sid]
        l_line = r_line = None
        if sr.inductance is not None:
            rd = _inductance_reading(sr.inductance, f_default)
            lo, hi = _band(sp["inductance_H"], tol_L)
            l_line = _line(f"strand.{sid}.inductance", f"Inductance, strand {sid} alone", "H",
                           rd["inductance_H"], sp["inductance_H"], lo, hi, reading=rd, note=_freq_note(rd))
            strand_L[sid] = rd["inductance_H"]
            lines.append(l_line)
        if sr.resistance is not None:
            r_line = _resistance_line(f"strand.{sid}.resistance", f"Resistance, strand {sid}",
                                      sr.resistance, ambient, sp["resistance_20C_ohm"], tol_R,
                                      join_path(path, "resistance"))
            lines.append(r_line)
        if sr.turns is not None:
            ok = sr.turns == int(sp["turns"])
            lines.append(_line(f"strand.{sid}.turns", f"Turns counted, strand {sid}", "turns",
                               sr.turns, sp["turns"], result="pass" if ok else "fail"))
            if not ok:
                findings.append({"scope": f"strand {sid}", "basis": "turn count", "likely": True,
                                 "finding": f"turn count off on strand {sid}: {sr.turns} counted, "
                                            f"{sp['turns']} ordered",
                                 "log_distance": None, "log_distance_as_ordered": None})
        if any(x is not None and x["result"] == "fail" for x in (l_line, r_line)):
            f = diagnose_strand(sid, sp, l_line and l_line["measured"], r_line and r_line["measured"],
                                open_circuit=bool(sr.resistance and sr.resistance.open))
            if f:
                findings.append(f)

    lines_pairs, pair_findings = _pair_lines(prediction, unit, base, strands, strand_L, tol_L, f_default)
    lines.extend(lines_pairs)
    findings.extend(pair_findings)

    t_lines, t_finding = _terminal_lines(prediction, unit, base, ambient, f_default)
    lines.extend(t_lines)
    if t_finding:
        findings.append(t_finding)

    ins_lines, ins_findings = _insulation_lines(prediction, unit, base, strands)
    lines.extend(ins_lines)
    findings.extend(ins_findings)

    verdict = "fail" if any(x["result"] == "fail" for x in lines) else "pass"
    return {"serial": unit.serial, "verdict": verdict, "lines": lines, "diagnosis": findings,
            "trace": unit_trace(measured, unit),
            "ambient_C": ambient, "notes": unit.notes}


def _pair_lines(prediction, unit, base, strands, strand_L, tol_L, f_default):
    lines, findings = [], []
    for key, pr in unit.before_joint.items():
        path = join_path(base, "before_joint", key)
        a, b = _pair_strands(key)
        for s in (a, b):
            if s not in strands:
                raise InputError(path, f"strand {s} is not in this order")
        i, sa = strands[a]
        j, sb = strands[b]
        ra = _inductance_reading(pr.series_aiding, f_default)
        ro = _inductance_reading(pr.series_opposing, f_default)
        pp = (prediction.get("pairs") or {}).get("-".join(sorted((a, b)))) or {}
        La_p, Lo_p, k_p = pp.get("series_aiding_H"), pp.get("series_opposing_H"), pp.get("coupling")
        lo, hi = _band(La_p, tol_L) if La_p else (None, None)
        lines.append(_line(f"pair.{key}.series_aiding", f"Series-aiding {a}+{b}, before joint", "H",
                           ra["inductance_H"], La_p, lo, hi, reading=ra, note=_freq_note(ra)))
        lines.append(_line(f"pair.{key}.series_opposing", f"Series-opposing {a}-{b}, before joint", "H",
                           ro["inductance_H"], Lo_p, reading=ro,
                           note=_freq_note(ro) + "; leakage, for reference"))
        M = mutual_from_series(ra["inductance_H"], ro["inductance_H"])
        L1 = strand_L.get(a, sa["inductance_H"])
        L2 = strand_L.get(b, sb["inductance_H"])
        k = coupling_coefficient(M, L1, L2)
        src = "measured" if a in strand_L and b in strand_L else "predicted"
        lines.append(_line(f"pair.{key}.mutual", f"Mutual inductance {a}-{b}, (La - Lo)/4", "H", M,
                           pp.get("mutual_H")))
        k_lo = k_p * (1 - tol_L) if k_p is not None else None
        lines.append(_line(f"pair.{key}.coupling", f"Coupling {a}-{b}, M/sqrt(L{a} L{b})", "", k, k_p,
                           k_lo, None, note=f"strand inductances {src}"))
        if k < 0:
            findings.append({"scope": f"strands {a}-{b}", "basis": "marking", "likely": True,
                             "finding": f"start and finish of strand {a} or {b} are swapped in the marking: "
                                        "series-aiding read lower than series-opposing",
                             "log_distance": None, "log_distance_as_ordered": None})
        elif k_lo is not None and k < k_lo:
            leak_ratio = (1 - k) / (1 - k_p) if k_p < 1 else float("inf")
            findings.append({"scope": f"strands {a}-{b}", "basis": "coupling", "likely": True,
                             "finding": f"loose or spaced winding: strands {a} and {b} not laid tight "
                                        f"together (coupling {k:.3f}, {k_p:.3f} predicted; "
                                        f"leakage x{leak_ratio:.2g})",
                             "log_distance": None, "log_distance_as_ordered": None})
    return lines, findings


def _terminal_lines(prediction, unit, base, ambient, f_default):
    term = prediction["terminal"]
    acc = term.get("accept") or {}
    t = unit.terminals
    rd = _inductance_reading(t.inductance, f_default)
    l_line = _line("terminal.inductance", "Inductance at terminals", "H", rd["inductance_H"],
                   term["inductance_H"], acc.get("inductance_min_H"), acc.get("inductance_max_H"),
                   reading=rd, note=_freq_note(rd))
    r_line = _resistance_line("terminal.resistance", "Resistance at terminals", t.resistance, ambient,
                              term["resistance_ohm"],
                              (acc.get("resistance_min_ohm"), acc.get("resistance_max_ohm")),
                              join_path(base, "terminals", "resistance"))
    finding = None
    if l_line["result"] == "fail" or r_line["result"] == "fail":
        finding = diagnose_terminals(prediction, l_line["measured"], r_line["measured"],
                                     open_circuit=t.resistance.open)
    return [l_line, r_line], finding


def _insulation_lines(prediction, unit, base, strands):
    lines, findings = [], []
    ir_min = _min_insulation(prediction)
    ins = unit.insulation
    if ins is not None:
        tv = f" at {ins.test_voltage:.4g} V d.c." if ins.test_voltage else ""
        for key, label, words in (
                ("strand_to_strand", "Insulation resistance strand to strand",
                 "insulation between strands is weak: enamel nicked or pinched at a crossover"),
                ("to_core", "Insulation resistance to core",
                 "insulation to core is weak: enamel scraped at a core edge or lead exit")):
            value = getattr(ins, key)
            if value is None:
                continue
            line = _line(f"insulation.{key}", label, "ohm", value, None, ir_min, None, note=tv.strip())
            lines.append(line)
            if line["result"] == "fail":
                findings.append({"scope": "insulation", "basis": key, "likely": True, "finding": words,
                                 "log_distance": None, "log_distance_as_ordered": None})
    for key, state in unit.continuity.items():
        pairs = ([f"{a}-{b}" for a in strands for b in strands if a < b]
                 if key == "strand_to_strand" else [key])
        for pair in pairs:
            a, b = _pair_strands(pair)
            for s in (a, b):
                if s not in strands:
                    raise InputError(join_path(base, "continuity", key), f"strand {s} is not in this order")
            lines.append(_line(f"continuity.{pair}", f"Continuity strand {a} to {b}", "", None,
                               result="pass" if state == "open" else "fail",
                               reading={"state": state}, note=state))
            if state == "shorted":
                findings.append({"scope": f"strands {a}-{b}", "basis": "continuity", "likely": True,
                                 "finding": f"shorted strands: {a} and {b} touch through damaged "
                                            "insulation (nicked enamel, a pinched crossover or a "
                                            "stray strand at a joint)",
                                 "log_distance": None, "log_distance_as_ordered": None})
    if unit.hipot is not None:
        h = unit.hipot
        spec = prediction.get("hipot") or {}
        v_spec, t_spec = spec.get("voltage_V"), spec.get("duration_s")
        lines.append(_line("hipot.voltage", "Hipot voltage applied", "V", h.voltage, v_spec, v_spec, None,
                           note=spec.get("basis", "")))
        lines.append(_line("hipot.duration", "Hipot duration", "s", h.duration, t_spec, t_spec, None))
        if h.leakage is not None:
            lim = spec.get("leakage_max_A")
            lines.append(_line("hipot.leakage", "Hipot leakage current", "A", h.leakage, None, None, lim))
        lines.append(_line("hipot.result", "Hipot withstand", "", None,
                           result=h.result, reading={"result": h.result}, note=h.result))
        if h.result == "fail":
            findings.append({"scope": "insulation", "basis": "hipot", "likely": True,
                             "finding": "insulation broke down at hipot: quarantine the unit and "
                                        "investigate under your hipot procedure",
                             "log_distance": None, "log_distance_as_ordered": None})
        elif v_spec and h.voltage < v_spec:
            findings.append({"scope": "insulation", "basis": "hipot voltage", "likely": True,
                             "finding": f"hipot applied at {h.voltage:.4g} V, below the {v_spec:.4g} V "
                                        "specified: repeat the test at the specified voltage",
                             "log_distance": None, "log_distance_as_ordered": None})
    return lines, findings


# --- All units ------------------------------------------------------------------------

def spread_of_units(units: list[dict]) -> list[dict]:
    """Mean and range over the units of every numeric measured line."""
    by_key: dict[str, dict] = {}
    for u in units:
        for line in u["lines"]:
            v = line["measured"]
            if v is None or line["unit"] == "turns":
                continue
            entry = by_key.setdefault(line["key"], {"key": line["key"], "item": line["item"],
                                                    "unit": line["unit"], "values": []})
            entry["values"].append(float(v))
    out = []
    for entry in by_key.values():
        vals = entry.pop("values")
        mean = sum(vals) / len(vals)
        entry.update(count=len(vals), mean=mean, min=min(vals), max=max(vals),
                     range=max(vals) - min(vals),
                     range_fraction=(max(vals) - min(vals)) / abs(mean) if mean else None)
        out.append(entry)
    return out


def _check_job(prediction: dict, measured: MeasuredFile):
    job = prediction.get("job") or {}
    if measured.job != job.get("number"):
        raise InputError("job", f"is {measured.job!r} but the order is job {job.get('number')!r}")
    rev = job.get("revision")
    if measured.revision is not None and rev is not None and str(measured.revision) != str(rev):
        raise InputError("revision", f"is {measured.revision!r} but the order is revision {rev!r}")
    serials = list(job.get("units") or [])
    seen = {}
    for i, u in enumerate(measured.units):
        path = join_path("units", i, "serial")
        if u.serial in seen:
            raise InputError(path, f"{u.serial!r} is listed twice (also units[{seen[u.serial]}])")
        seen[u.serial] = i
        if serials and u.serial not in serials:
            shown = ", ".join(serials[:4]) + (" ..." if len(serials) > 4 else "")
            raise InputError(path, f"{u.serial!r} is not a serial number of this job ({shown})")


def evaluate_signoff(prediction: dict, measured: MeasuredFile, inspector: Optional[str] = None) -> dict:
    """Evaluate every unit's readings against the prediction.

    Parameters
    ----------
    prediction : dict
        The Prediction of the order (predict.py); only its numbers are read.
    measured : MeasuredFile
        The bench readings (measured.py), already in SI.
    inspector : str, optional
        Overrides the inspector named in the file.

    Returns
    -------
    result : dict
        JSON-ready: ``job``, ``revision``, ``order_hash``, ``inspector``, ``date``,
        ``verdict`` ("pass" when every unit passes), ``units`` (each with
        ``serial``, ``verdict``, ``lines``, ``diagnosis``), ``spread``,
        ``units_passed``, ``units_failed``, ``units_not_signed`` and ``cautions``.

    References
    ----------
    .. [1] IEC 60028 (copper resistance at 20 degC); F. W. Grover, Inductance
       Calculations (1946), ch. 1 (M from series-aiding and -opposing readings).
    """
    _check_job(prediction, measured)
    units = [evaluate_unit(prediction, measured, u, i) for i, u in enumerate(measured.units)]
    job = prediction.get("job") or {}
    signed = {u["serial"] for u in units}
    passed = sum(u["verdict"] == "pass" for u in units)
    cautions = [HIPOT_CAUTION] if any(u.hipot or u.insulation for u in measured.units) else []
    return {
        "schema": "windsheet.signoff/1",
        "job": job.get("number"), "part": job.get("part"), "customer": job.get("customer"),
        "revision": job.get("revision"), "order_hash": prediction.get("order_hash"),
        "inspector": inspector or measured.inspector, "date": measured.date,
        "instruments": measured.instruments,
        "verdict": "pass" if passed == len(units) else "fail",
        "units": units,
        "units_passed": passed, "units_failed": len(units) - passed,
        "units_not_signed": [s for s in (job.get("units") or []) if s not in signed],
        "spread": spread_of_units(units),
        "insulation_minimum_ohm": _min_insulation(prediction),
        "cautions": cautions,
    }


def exit_status(result: dict) -> int:
    """0 when every unit passes, 1 when any fails (the CLI's contract)."""
    return 0 if result["verdict"] == "pass" else 1


# --- Text summary for the terminal ----------------------------------------------------

def summary_lines(result: dict, eng) -> list[str]:
    """Readable lines of a sign-off; ``eng(value, unit)`` formats a number (the CLI's)."""
    out = [f"Sign-off {result['job']} rev {result['revision']} — {result.get('part') or ''}".rstrip(" —"),
           f"Inspector {result.get('inspector') or '—'}, {result.get('date') or 'undated'}: "
           f"{result['units_passed']} passed, {result['units_failed']} failed"
           + (f", not signed: {', '.join(result['units_not_signed'])}" if result['units_not_signed'] else "")]
    shown_unit = {"ohm": "Ω"}
    for u in result["units"]:
        out.append(f"{u['serial']}: {u['verdict'].upper()}")
        for line in u["lines"]:
            if line["measured"] is None:
                value = line.get("note") or "—"
            elif line["unit"] in ("", "turns"):
                value = f"{line['measured']:.4g}" if isinstance(line["measured"], float) else str(line["measured"])
            else:
                value = eng(line["measured"], shown_unit.get(line["unit"], line["unit"]))
            band = ""
            if line["min"] is not None or line["max"] is not None:
                u_ = shown_unit.get(line["unit"], line["unit"]) if line["unit"] not in ("", "turns") else ""
                lo = eng(line["min"], u_) if u_ else (f"{line['min']:.4g}" if line["min"] is not None else "")
                hi = eng(line["max"], u_) if u_ else (f"{line['max']:.4g}" if line["max"] is not None else "")
                band = f"  [{lo or '—'} … {hi or '—'}]"
            mark = {"pass": "ok", "fail": "FAIL", "info": ""}[line["result"]]
            out.append(f"  {mark:<4} {line['item']:<44} {value}{band}")
        for d in u["diagnosis"]:
            out.append(f"  -> {d['finding']}")
    for c in result.get("cautions") or []:
        out.append(f"Caution: {c}")
    out.append(f"Verdict: {result['verdict'].upper()}")
    return out


def register_lines(jobs: list[dict]) -> list[str]:
    """One line per job for ``windsheet register``."""
    if not jobs:
        return ["(register is empty)"]
    out = []
    for j in jobs:
        n_units = len(j["units"])
        out.append(f"{j['number']:<12} rev {j['revision']:<4} {j['state']:<7} "
                   f"{len(j['units_passed'])}/{n_units} passed  {j.get('part') or ''}")
    return out


def history_lines(history: dict) -> list[str]:
    """A job's events, oldest first, for ``windsheet register JOB``."""
    st = history["state"]
    out = [f"{history['number']}: {st['state']} (rev {st['revision']}, "
           f"{len(st['units_passed'])}/{len(st['units'])} units passed)"]
    for e in history["events"]:
        if e["event"] == "issued":
            out.append(f"  {e['at']}  issued rev {e['revision']}  sha256 {e['order_sha256'][:12]}…"
                       + (f"  by {e['by']}" if e.get("by") else ""))
        else:
            units = ", ".join(f"{u['serial']} {u['verdict']}" for u in e["units"])
            out.append(f"  {e['at']}  signed off rev {e['revision']}: {e['verdict']}  by {e.get('by') or '—'}"
                       f"  ({units})")
    return out
