"""Diagnosis: which wiring, turn count or wire size explains the readings.

Ranks the hypotheses of wiring_hypotheses.py by log-ratio distance to the
readings.  A clear match names the strands and ends; several clear matches
that the readings cannot tell apart are listed together with the reading that
separates them and its value under each; a hypothesis the resistance rules
out is never reported (a turn count with the resistance on prediction).
"""

from __future__ import annotations

import math
from typing import Callable, Optional

import numpy as np

from windsheet.qc import wiring_hypotheses as wh


def _finding(scope, basis, text, likely, distance=None, d_ordered=None, **extra):
    out = {"scope": scope, "basis": basis, "finding": text, "likely": likely,
           "log_distance": distance, "log_distance_as_ordered": d_ordered}
    out.update(extra)
    return out


def _ordered_arrays(design):
    L = np.asarray(design.inductance_matrix_H, dtype=float)
    R = np.asarray([s.resistance_20C_ohm for s in design.strands], dtype=float)
    return L, R


def _turns(design) -> int:
    return design.strands[0].turns if design.strands else 0


def _pick(scored, d_ordered, tol_L, scope):
    """Report the nearest hypothesis, or the group the readings cannot separate."""
    if not scored or d_ordered <= scored[0][0]:
        return _finding(scope, "as ordered", "readings lie nearest the ordered wiring; no wiring fault, "
                        "turn count or wire size explains the miss (check the meter, test frequency "
                        "and temperature)", False, d_ordered, d_ordered)
    distance, best = scored[0]
    if distance > wh.CLEAR_MATCH:
        return _finding(scope, best["basis"], "readings match no expected fault closely; nearest: "
                        + best["finding"], False, distance, d_ordered)
    # Alike = expected readings within half the inductance tolerance of the best's.
    alike = math.log(1 + max(0.02, tol_L / 2))
    group = [h for d, h in scored if d <= wh.CLEAR_MATCH and d < d_ordered
             and wh.log_distance(best["expected"], h["expected"]) <= alike]
    return group


def _resistance_on_prediction(scope, measured, ordered, tol_R, hookup_name):
    """Inductance off with the resistance on prediction: the turns and wire are right."""
    L, R, Lo, Ro = measured.get("L"), measured.get("R"), ordered.get("L"), ordered.get("R")
    if not (L and R and Lo and Ro) or math.isinf(R) or abs(math.log(R / Ro)) > math.log(1 + tol_R):
        return None
    how = ("the strands of the non-inductive winding are laid looser than predicted (more leakage)"
           if hookup_name == "series-opposing" else
           "the winding is laid or spaced differently from the design, or the fixture adds inductance")
    return _finding(scope, "layup", f"resistance on prediction, so turns and wire are as ordered; the "
                    f"inductance reads {(L / Lo - 1) * 100:+.0f} %: {how}", False,
                    turns_ruled_out="the resistance rules out a turn count")


def diagnose_terminals(design, L: Optional[float], R: Optional[float], *, taps=(),
                       resize: Optional[Callable] = None, open_circuit=False) -> dict:
    """Explain terminal readings that miss, from the real wiring alternatives.

    Parameters
    ----------
    design : windsheet.design.model.Design
        The Prediction (reads ``inductance_matrix_H``, ``strands``, ``hookup``,
        ``test``, ``tolerances``, ``terminal``).
    L : float or None
        Terminal inductance read. [H]
    R : float or None
        Terminal resistance corrected to 20 °C. [ohm]
    taps : sequence of dict
        Extra readings ``{"from", "to", "inductance_H"}`` between named points.
    resize : callable, optional
        ``resize(turns) -> (L matrix [H], R [ohm])`` from the engine; without it
        no turn-count hypothesis is made.
    open_circuit : bool
        The meter showed no continuity between the terminals.

    Returns
    -------
    finding : dict
        ``{scope, finding, basis, likely, log_distance, log_distance_as_ordered}``,
        plus ``candidates`` and ``separating_readings`` when the readings fit
        several wirings alike.
    """
    scope = "terminals"
    if open_circuit:
        return _finding(scope, "open", "open circuit at the terminals: a strand broken, a lead not "
                        "soldered, or a joint not made", True)
    strands = len(design.strands)
    tol_L, tol_R = float(design.tolerances.inductance or 0.1), float(design.tolerances.resistance or 0.05)
    f = float(design.test.frequency_Hz or 1e3)
    Lm, Rv = _ordered_arrays(design)
    floor = 1e-3 * float(np.trace(Lm))
    hook = design.hookup
    measured = {"L": L, "R": R}
    wiring_ok = strands >= 2 and hook.name != "separate" and hook.terminals
    hyps = []
    if wiring_ok:
        ordered_w = wh.wiring_from(hook.joins, hook.terminals, strands)
        tap_keys = wh._resolve_taps(ordered_w, list(taps))
        for key, (p, q), t in zip([k for k, _ in tap_keys], [x for _, x in tap_keys], taps):
            if p is not None and q is not None:
                measured[key] = t["inductance_H"]
        tap_keys = [(k, pq) for k, pq in tap_keys if None not in pq]
        expected_ordered = wh.readings_of(ordered_w, Lm, Rv, f, tap_keys)

        def scored_wirings(two):
            out = []
            for w, kind, text in wh.enumerate_wirings(ordered_w, strands, hook.name, two):
                exp = wh.readings_of(w, Lm, Rv, f, tap_keys)
                out.append({"basis": f"wiring:{kind}", "expected": exp, "wiring": w, "short": text,
                            "finding": text + wh._joint_text(ordered_w, w)})
            return out
        hyps = scored_wirings(False)
        # A wiring that reads exactly as ordered (the two terminal leads named the other way round)
        # is no fault the readings can show.
        hyps = [h for h in hyps if wh.log_distance(h["expected"], expected_ordered, floor) > 1e-9]
    else:
        expected_ordered = {"L": design.terminal.inductance_H, "R": design.terminal.resistance_ohm}
        tap_keys = []

    def reading(Lx, Rx):
        if wiring_ok:
            return wh.readings_of(ordered_w, Lx, Rx, f, tap_keys)
        if hook.name == "separate" or strands < 2:
            return {"L": float(np.asarray(Lx)[0, 0]), "R": float(Rx[0])}
        return {"L": None, "R": None}

    turn_h = wh.turn_hypotheses(measured, _turns(design), resize, reading, tol_R)
    fixed = hyps + wh.gauge_hypotheses(expected_ordered)
    d_ordered = wh.log_distance(measured, expected_ordered, floor)

    def rank(pool):
        scored = sorted(((wh.log_distance(measured, h["expected"], floor), h) for h in pool),
                        key=lambda t: t[0])
        return scored
    scored = rank(fixed + [t for t in turn_h if not t["rejected"]])
    if wiring_ok and (not scored or scored[0][0] > wh.CLEAR_MATCH):
        hyps2 = [h for h in scored_wirings(True) if wh.log_distance(h["expected"], expected_ordered, floor) > 1e-9]
        scored = rank(hyps2 + wh.gauge_hypotheses(expected_ordered) + [t for t in turn_h if not t["rejected"]])
    # A turn count is fitted (a free parameter): a fixed hypothesis that matches clearly goes first.
    fixed_clear = [t for t in scored if t[1]["basis"] != "turns" and t[0] <= wh.CLEAR_MATCH]
    if fixed_clear and scored[0][1]["basis"] == "turns":
        scored.remove(fixed_clear[0])
        scored.insert(0, fixed_clear[0])
    picked = _pick(scored, d_ordered, tol_L, scope)
    rejected = [t for t in turn_h if t["rejected"]]
    if isinstance(picked, dict) and not picked["likely"]:
        picked = _resistance_on_prediction(scope, measured, expected_ordered, tol_R, hook.name) or picked
    if isinstance(picked, dict):
        if rejected and picked["basis"] != "turns":
            picked["turns_ruled_out"] = "the resistance rules out a turn count"
        return picked
    picked.sort(key=lambda h: (_priority(h["basis"]), wh.log_distance(measured, h["expected"], floor)))
    best = picked[0]
    distance = wh.log_distance(measured, best["expected"], floor)
    if len(picked) == 1 or not wiring_ok or any(h["basis"] == "turns" or h["basis"].startswith("gauge")
                                                 for h in picked):
        return _finding(scope, best["basis"], best["finding"], True, distance, d_ordered, turns=best.get("turns"))
    cands = [(h["wiring"], h["basis"], h["short"]) for h in picked[:6]]
    seps = wh.separating_readings(cands, Lm, Rv, f, tol_L, taken=[(t["from"], t["to"]) for t in taps])
    if not seps:
        # No reading between the named points tells them apart: name the simplest
        # mistake and say which others read the same.
        twins = "; ".join(h["short"] for h in picked[1:6])
        return _finding(scope, best["basis"], f"{best['finding']} (reads the same as: {twins}; check the "
                        "strand markings)", True, distance, d_ordered, candidates=[h["finding"] for h in picked[:6]])
    names = "; ".join(h["finding"] for h in picked[:6])
    ask = "; then ".join(
        f"read the inductance from {s['from']} to {s['to']} (expected "
        + ", ".join((f"{v * 1e6:.4g} µH" if v is not None else "open") + f" if {k}"
                    for k, v in s["expected"].items()) + ")"
        for s in seps)
    text = f"the readings cannot tell these wirings apart: {names}. To separate them, {ask}"
    return _finding(scope, "ambiguous", text, False, distance, d_ordered,
                    candidates=[h["finding"] for h in picked[:6]],
                    separating_readings=[{"from": s["from"], "to": s["to"],
                                          "expected_H": s["expected"]} for s in seps])


_KIND_ORDER = ("wiring:reversed", "wiring:left-out", "wiring:open", "wiring:terminal", "wiring:short",
               "wiring:swapped", "wiring:hookup")


def _priority(basis: str) -> int:
    """Simplest mistake first: one strand reversed before two ends swapped, single before double."""
    if " & " in basis:
        return len(_KIND_ORDER) + 1
    for i, k in enumerate(_KIND_ORDER):
        if basis.startswith(k):
            return i
    return len(_KIND_ORDER)


def diagnose_strand(sid: str, index: int, design, L: Optional[float], R: Optional[float],
                    *, resize: Optional[Callable] = None, open_circuit=False) -> Optional[dict]:
    """Explain one strand's readings that miss: wrong wire or turn count.

    Parameters
    ----------
    sid : str
        Strand name ("A").
    index : int
        Its position in the design's strands.
    design : windsheet.design.model.Design
        The issued design.
    L, R : float or None
        Strand inductance [H] and resistance corrected to 20 °C [ohm].
    resize : callable, optional
        As for :func:`diagnose_terminals`.

    Returns
    -------
    finding : dict or None
    """
    scope = f"strand {sid}"
    if open_circuit:
        return _finding(scope, "open", f"strand {sid} is open: broken wire or a lead not terminated", True)
    sp = design.strands[index]
    tol_L, tol_R = float(design.tolerances.inductance or 0.1), float(design.tolerances.resistance or 0.05)
    ordered = {"L": sp.inductance_H, "R": sp.resistance_20C_ohm}
    measured = {"L": L, "R": R}

    def reading(Lx, Rx):
        return {"L": float(np.asarray(Lx)[index, index]), "R": float(np.asarray(Rx)[index])}

    turn_h = [t for t in wh.turn_hypotheses(measured, sp.turns, resize, reading, tol_R)
              if not t["rejected"]]
    pool = wh.gauge_hypotheses(ordered) + turn_h
    scored = sorted(((wh.log_distance(measured, h["expected"]), h) for h in pool), key=lambda t: t[0])
    d_ordered = wh.log_distance(measured, ordered)
    picked = _pick(scored, d_ordered, tol_L, scope)
    if isinstance(picked, dict):
        if picked["basis"] == "as ordered":
            return None
        picked["finding"] = f"strand {sid}: {picked['finding']}"
        return picked
    best = picked[0]
    return _finding(scope, best["basis"], f"strand {sid}: {best['finding']}", True,
                    wh.log_distance(measured, best["expected"]), d_ordered, turns=best.get("turns"))
