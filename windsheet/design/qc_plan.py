"""The QC lines every unit must be read for, and the design's issue status.

One list, made once from the sized design, is stored in the prediction as
``qc_required``: the traveller's QC record prints exactly these lines and the
sign-off calls a unit INCOMPLETE while any of them is missing and not waived.
Keys are the sign-off's line keys (``terminal.inductance``,
``strand.B.resistance``, ``pair.A-B.series_opposing``, ``hipot`` ...).
"""

from __future__ import annotations

STRAND_IDS = "ABCD"


def required_lines(strands: int, has_joins: bool, hipot_required: bool) -> list[str]:
    """Keys of the QC lines a unit must carry before it can pass.

    Parameters
    ----------
    strands : int
        Strands wound together. [-]
    has_joins : bool
        The hookup joins strand ends (so pairs can be read before the joint).
    hipot_required : bool
        The design calls for a dielectric withstand (hipot) test.

    Returns
    -------
    keys : list of str
        Strand L and R (for the strand balance) and the pair readings before
        the joint when there are two or more strands; terminal L and R; the
        ambient temperature (to correct R to 20 °C); continuity and insulation
        resistance between strands; insulation resistance to core or form; the
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
    """
    ids = STRAND_IDS[:strands]
    keys = []
    if strands > 1:
        for s in ids:
            keys += [f"strand.{s}.inductance", f"strand.{s}.resistance"]
        if has_joins:
            for a, b in zip(ids, ids[1:]):
                keys += [f"pair.{a}-{b}.series_aiding", f"pair.{a}-{b}.series_opposing"]
    keys += ["terminal.inductance", "terminal.resistance", "ambient"]
    if strands > 1:
        keys += ["continuity.strand_to_strand", "insulation.strand_to_strand"]
    keys.append("insulation.to_core")
    if hipot_required:
        keys.append("hipot")
    return keys


def prediction_required_lines(p: dict) -> list[str]:
    """``qc_required`` of a prediction, or the list made from its design when absent."""
    if p.get("qc_required") is not None:
        return list(p["qc_required"])
    strands = len(p.get("strands") or []) or 1
    joins = bool((p.get("hookup") or {}).get("joins"))
    hip = p.get("hipot") or {}
    hipot = bool((p.get("cautions") or {}).get("hipot", True) and hip.get("voltage_V"))
    return required_lines(strands, joins, hipot)


# --- Design status ----------------------------------------------------------------

def design_fails(p: dict) -> bool:
    """True when the design fails a check that stops a traveller being issued (insulation or heating)."""
    return ((p.get("insulation") or {}).get("verdict") == "fail"
            or (p.get("thermal") or {}).get("verdict") == "fail")


def design_status(p: dict, forced: bool = False) -> dict:
    """How the design stands at issue: ``ok``, ``forced`` or ``failing``.

    ``forced`` is a failing design issued on purpose with ``--force``;
    ``failing`` one that fails without a recorded force (an older register).
    """
    if not design_fails(p):
        return {"state": "ok", "reasons": []}
    ins = p.get("insulation") or {}
    reasons = [str(r) for r in ins.get("reasons") or []] if ins.get("verdict") == "fail" else []
    thermal = p.get("thermal") or {}
    if thermal.get("verdict") == "fail":
        reasons.append(f"thermal check fails: {thermal.get('reason') or 'over the thermal class'}")
    return {"state": "forced" if forced else "failing",
            "reasons": reasons or ["the design check fails"]}


def status_of(p: dict) -> dict:
    """The design status stored with an issued prediction, else judged from it."""
    st = p.get("design_status")
    return dict(st) if st else design_status(p, forced=False)


def status_words(st: dict) -> str:
    """Shop words for a design status, empty when the design is sound."""
    if st.get("state") == "forced":
        return "FORCED: design fails its " + _which(st) + ", issued with --force"
    if st.get("state") == "failing":
        return "FAILING DESIGN: fails its " + _which(st)
    return ""


def _which(st: dict) -> str:
    thermal = any(str(r).startswith("thermal check fails") for r in st.get("reasons") or [])
    others = any(not str(r).startswith("thermal check fails") for r in st.get("reasons") or [])
    return ("insulation and thermal checks" if thermal and others else "thermal check" if thermal
            else "insulation check")
