"""One diagnosis per unit: the findings of every line gathered, each stated once, none contradicting another.

The sign-off's parts each explain what they see (a strand's turn count, the
terminals' wiring, the strand balance, a pair's coupling).  Here they are put
together with the findings that need several lines at once: a shorted turn
from the Q and ring-wave readings, and a tagging mistake from the strand and
pair readings (:mod:`windsheet.qc.tag_hypotheses`).  A finding that one of
these explains better is dropped, and a line saying that nothing explains the
miss never follows a finding that does.
"""

from __future__ import annotations

from windsheet.design.bench_tests import q_tolerance

from .tag_hypotheses import diagnose_tags, measured_from_lines

#: Findings that claim nothing explains the readings, or explain them by the layup alone.
_UNEXPLAINED = ("as ordered", "layup")


def _fact(scope, basis, text, **extra):
    out = {"scope": scope, "basis": basis, "likely": True, "finding": text, "log_distance": None,
           "log_distance_as_ordered": None}
    out.update(extra)
    return out


def _ratio(line):
    if line is None or line.get("measured") is None or not line.get("predicted"):
        return None
    return float(line["measured"]) / float(line["predicted"])


def _pct(x) -> str:
    return f"{x * 100:+.1f} %".replace("-", "−")


def _q_evidence(design, by) -> list[str]:
    """Q readings that fall below their band further than their own L and R readings explain."""
    tol_q = q_tolerance(float(design.tolerances.inductance or 0.1), float(design.tolerances.resistance or 0.05))
    out = []
    scopes = [("at the terminals", "terminal")] + [(f"of strand {s.id}", f"strand.{s.id}") for s in design.strands]
    for words, head in scopes:
        q = by.get(f"{head}.q")
        if q is None or q["result"] != "fail" or _ratio(q) is None:
            continue
        rl, rr = _ratio(by.get(f"{head}.inductance")), _ratio(by.get(f"{head}.resistance"))
        # Q = ωL/R: what the unit's own L and R readings would make of Q.
        explained = (rl or 1.0) / (rr or 1.0)
        if _ratio(q) >= explained * (1 - tol_q):
            continue
        moved = f"the inductance reads {_pct(rl - 1)}" if rl is not None else "the inductance is not read"
        out.append(f"Q {words} reads {_pct(_ratio(q) - 1)} against its prediction while {moved}")
    return out


def _ring_evidence(design, by) -> list[str]:
    """A ring that runs fast and dies early, as a shorted turn makes it."""
    f, d = by.get("ring.frequency"), by.get("ring.decay")
    fast = f is not None and f["result"] == "fail" and f["max"] is not None and f["measured"] > f["max"]
    damped = d is not None and d["result"] == "fail"
    lo_L = by.get("terminal.inductance")
    if fast and not damped and lo_L is not None and lo_L["result"] == "fail" and _ratio(lo_L) < 1:
        # A low inductance at the LCR meter rings fast too: fewer turns, not a short.
        return []
    parts = []
    if fast:
        parts.append(f"the ring runs {_pct(_ratio(f) - 1)} fast")
    if damped:
        parts.append(f"dies sooner (successive peaks {d['measured']:.3g}, at least {d['min']:.3g} expected)")
    return [" and ".join(parts)] if parts else []


def shorted_turn_finding(design, lines) -> dict | None:
    """"shorted turn (or turns)" when Q or the ring wave shows it, with what one shorted turn reads."""
    by = {ln["key"]: ln for ln in lines}
    evidence = _q_evidence(design, by) + _ring_evidence(design, by)
    if not evidence:
        return None
    text = ("shorted turn (or turns): " + "; ".join(evidence) + ". A shorted turn takes Q down and makes the "
            "ring run faster and die sooner, with the inductance at the LCR meter's frequency almost as it "
            "was; fewer turns would lower L and R together and leave Q and the ring's damping nearly as "
            "predicted")
    st = design.shorted_turn
    if st is not None:
        ring = ""
        if st.ring_frequency_Hz:
            ring = f", ring {st.ring_frequency_Hz / 1e3:.4g} kHz with peaks ratio {st.ring_decay:.3g}"
        elif design.ring_wave is not None:
            ring = ", no ring at all"
        text += (f". Predicted for one shorted turn ({st.where}): Q {st.q:.3g} ({_pct(st.q_change)}), "
                 f"L {_pct(st.inductance_change)} at {st.frequency_Hz / 1e3:g} kHz{ring}")
    return _fact("winding", "shorted turn", text + ". Quarantine the unit: a shorted turn runs hot in service")


def _tag_finding(design, lines) -> dict | None:
    if not any(ln["result"] == "fail" and ln["key"].split(".")[0] in ("strand", "pair") for ln in lines):
        return None
    found = diagnose_tags(design, measured_from_lines(lines))
    if found is None or found["kind"].startswith("broken"):
        return None
    text = found["text"]
    if design.hookup.name != "separate" and found["kind"].startswith("reversed"):
        text = text.replace("tags are swapped", "tags are swapped in the marking")
    return _fact("tags", f"tags:{found['kind']}", text, log_distance=found["distance"],
                 log_distance_as_ordered=found["distance_as_tagged"])


def _explained_by_tags(f: dict, kind: str) -> bool:
    """A finding the tagging mistake accounts for: opens, the pair's marking, the same wiring mistake."""
    basis = f.get("basis") or ""
    what = kind.split(":", 1)[1]
    return (basis in ("open", "marking", "leakage", "coupling", "balance")
            or basis == f"wiring:{kind}" or basis.startswith("wiring:") and what in basis
            or basis in _UNEXPLAINED)


def _one_turn_count(findings: list[dict]) -> list[dict]:
    """One turn-count finding: the strands' and the terminals' fits said once, the balance's kept first."""
    balanced = {f.get("strand") for f in findings if f.get("basis") == "balance" and f.get("turns_difference")}
    out = []
    for f in findings:
        if f.get("basis") != "turns":
            out.append(f)
            continue
        scope = f.get("scope") or ""
        # The balance names the one strand that differs; a fit of every strand at the terminals would not.
        if balanced and (scope == "terminals" or scope.removeprefix("strand ") in balanced):
            continue
        out.append(f)
    fits = [f for f in out if f.get("basis") == "turns" and f.get("turns") is not None]
    counts = {f["turns"] for f in fits}
    if len(fits) > 1 and len(counts) == 1:
        ids = [f["scope"].removeprefix("strand ") for f in fits if f["scope"].startswith("strand ")]
        where = (f"strand{'s' if len(ids) > 1 else ''} {' and '.join([', '.join(ids[:-1]), ids[-1]] if len(ids) > 1 else ids)}"
                 if ids else "")
        if any(f["scope"] == "terminals" for f in fits):
            where += (" and " if where else "") + "at the terminals"
        first = fits[0]
        merged = dict(first, scope="winding",
                      finding=f"turn count off on {where}: " + first["finding"].split("turn count off: ", 1)[-1])
        out = [merged if f is first else f for f in out if f not in fits[1:]]
    return out


def one_diagnosis(design, unit, lines: list[dict], findings: list[dict]) -> list[dict]:
    """The unit's findings, gathered: each stated once, none contradicting another.

    Parameters
    ----------
    design : windsheet.design.model.Design
    unit : windsheet.qc.measured.UnitReadings
    lines : list of dict
        The unit's evaluated lines.
    findings : list of dict
        What the sign-off's parts found, in order.

    Returns
    -------
    findings : list of dict
    """
    out = list(findings)
    tags = _tag_finding(design, lines)
    if tags is not None:
        kind = tags["basis"].split(":", 1)[1]
        out = [f for f in out if not _explained_by_tags(f, kind)] + [tags]
    short = shorted_turn_finding(design, lines)
    if short is not None:
        # The short explains L and R off their prediction: no turn count or layup is claimed beside it,
        # nor a strand "a turn or two short" that the balance could not tell from a shorted turn.
        out = [f for f in out if f.get("basis") not in _UNEXPLAINED + ("turns",) or f.get("scope") == "unit"]
        out = [f for f in out if not (f.get("basis") == "balance" and f.get("turns_difference") is not None
                                      and abs(f["turns_difference"]) < 2.5)]
        out.append(short)
    out = _one_turn_count(out)
    if any(f.get("likely") and f.get("basis") not in _UNEXPLAINED and f.get("scope") != "unit" for f in out):
        # Something explains the readings: a line saying nothing does (or that turns and wire are as
        # ordered) would contradict it.
        out = [f for f in out if f.get("basis") not in _UNEXPLAINED]
    seen, once = set(), []
    for f in out:
        if f["finding"] not in seen:
            seen.add(f["finding"])
            once.append(f)
    return once
