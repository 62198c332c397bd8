"""The rule that sets a design's state from its checks (standard library only).

Shared by :func:`windsheet.design.qc_plan.design_state` and the register, which
reads the state of a recorded design without loading the design model (the
register listing must start fast).
"""

from __future__ import annotations


def state_from_checks(insulation_verdict, insulation_reasons, thermal_verdict, thermal_reason) -> tuple[str, list]:
    """``(state, reasons)``: ``failing`` when either check fails, ``marginal`` when either is marginal, else ``ok``.

    Examples
    --------
    >>> state_from_checks("pass", ["fine"], "fail", "hot spot 190 °C over class 155")
    ('failing', ['thermal check fails: hot spot 190 °C over class 155'])
    >>> state_from_checks("marginal", ["near PD"], "pass", "")
    ('marginal', ['near PD'])
    """
    for worst in ("fail", "marginal"):
        if worst in (insulation_verdict, thermal_verdict):
            reasons = [str(r) for r in insulation_reasons or []] if insulation_verdict == worst else []
            if thermal_verdict == worst:
                word = "fails" if worst == "fail" else "marginal"
                reasons.append(f"thermal check {word}: {thermal_reason or 'over the thermal class'}")
            return ("failing" if worst == "fail" else "marginal"), reasons
    return "ok", []


def recorded_state(prediction: dict) -> dict:
    """``{"state", "reasons"}`` of a design as recorded in a register, any version.

    Examples
    --------
    >>> recorded_state({"schema": "windsheet.prediction/2", "state": {"state": "forced", "reasons": ["x"]}})
    {'state': 'forced', 'reasons': ['x']}
    >>> recorded_state({"insulation": {"verdict": "fail", "reasons": ["too close"]}})
    {'state': 'failing', 'reasons': ['too close']}
    >>> recorded_state({"design_status": {"state": "forced"}, "insulation": {"verdict": "fail"}})
    {'state': 'forced', 'reasons': []}
    """
    p = prediction if isinstance(prediction, dict) else {}
    st = p.get("state") if p.get("schema") == "windsheet.prediction/2" else p.get("design_status")
    if isinstance(st, dict) and st.get("state"):
        return {"state": str(st["state"]), "reasons": [str(r) for r in st.get("reasons") or []]}
    ins, th = p.get("insulation") or {}, p.get("thermal") or {}
    state, reasons = state_from_checks(ins.get("verdict"), ins.get("reasons"), th.get("verdict"), th.get("reason"))
    return {"state": state, "reasons": reasons}


def status_words(state) -> str:
    """Shop words for a design state, empty when the design is sound.

    Examples
    --------
    >>> status_words({"state": "forced", "reasons": ["thermal check fails: hot"]})
    'FORCED: design fails its thermal check, issued with --force'
    >>> status_words({"state": "marginal", "reasons": []})
    'MARGINAL: design is close to a limit; see the insulation and heating checks'
    """
    st = state if isinstance(state, dict) else {"state": state.state, "reasons": state.reasons}
    if st.get("state") == "forced":
        return "FORCED: design fails its " + _which(st) + ", issued with --force"
    if st.get("state") == "failing":
        return "FAILING DESIGN: fails its " + _which(st)
    if st.get("state") == "marginal":
        return "MARGINAL: design is close to a limit; see the insulation and heating checks"
    return ""


def _which(st: dict) -> str:
    thermal = any(str(r).startswith("thermal check fails") for r in st.get("reasons") or [])
    others = any(not str(r).startswith("thermal check fails") for r in st.get("reasons") or [])
    return ("insulation and thermal checks" if thermal and others else "thermal check" if thermal
            else "insulation check")
