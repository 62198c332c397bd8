"""Strand balance: strands of one design compared with each other, not only with the prediction.

Each strand's reading is divided by its own prediction, so strands that are
meant to differ (an outer layer reads more) still compare like for like; the
ratio is then compared with the other strands' median.  A strand a few turns
short reads inside its own band but out of balance with its twin.
"""

from __future__ import annotations

import math
from statistics import median
from typing import Callable, Optional

import numpy as np

from .signoff_lines import line

#: Balance tolerance as a fraction of the order's tolerance when the order sets
#: none (``tolerances.strand_balance``): strands wound side by side from one
#: spool agree far better than the design agrees with the bench (common practice).
BALANCE_FRACTION = 0.5


def balance_tolerances(design) -> tuple[float, float]:
    """Balance tolerances for strand L and R [fraction]."""
    tol = design.tolerances
    if tol.strand_balance is not None:
        return float(tol.strand_balance), float(tol.strand_balance)
    return (BALANCE_FRACTION * float(tol.inductance or 0.1), BALANCE_FRACTION * float(tol.resistance or 0.05))


def turn_exponents(design, resize: Optional[Callable]) -> Optional[tuple[float, float]]:
    """Local exponents of a strand's L and R in its turn count, from the engine at N -/+ k."""
    n = design.strands[0].turns if design.strands else 0
    if not resize or n < 2:
        return None
    k = max(1, round(0.05 * n))
    try:
        (L1, R1), (L2, R2) = resize(n - k), resize(n + k)
    except Exception:  # noqa: BLE001 - a count that does not fit has no exponent
        return None
    span = math.log((n + k) / (n - k))
    a = math.log(float(np.asarray(L2)[0, 0]) / float(np.asarray(L1)[0, 0])) / span
    b = math.log(float(R2[0]) / float(R1[0])) / span
    return a, b


def _ratios(design, values, key):
    out = {}
    for s in design.strands:
        v = values.get(s.id)
        # A reading of zero (a short) is no basis for a ratio; its own line fails it.
        if v is not None and getattr(s, key) and math.isfinite(v) and v > 0:
            out[s.id] = v / getattr(s, key)
    return out


def _deviations(ratios: dict) -> dict:
    """Each strand's ratio against the median of the others'."""
    out = {}
    for sid, r in ratios.items():
        others = [v for k, v in ratios.items() if k != sid]
        if others:
            out[sid] = r / median(others) - 1.0
    return out


def balance_lines(design, strand_L: dict, strand_R: dict,
                  resize: Optional[Callable] = None) -> tuple[list[dict], list[dict]]:
    """Balance lines for strand L and R, and a finding for the strand out of balance.

    Parameters
    ----------
    design : windsheet.design.model.Design
        The issued design (``strands``, ``tolerances``).
    strand_L, strand_R : dict
        Measured strand inductance [H] and resistance at 20 °C [ohm] by strand id.
    resize : callable, optional
        ``resize(turns) -> (L, R)`` from the engine, for the likely difference in turns.

    Returns
    -------
    lines, findings : list of dict
    """
    strands = design.strands
    if len(strands) < 2:
        return [], []
    tol_bL, tol_bR = balance_tolerances(design)
    rl, rr = _ratios(design, strand_L, "inductance_H"), _ratios(design, strand_R, "resistance_20C_ohm")
    dl, dr = _deviations(rl), _deviations(rr)
    lines = []
    for sid in [s.id for s in strands]:
        if sid in dl:
            lines.append(line(f"balance.{sid}.inductance", f"Balance, strand {sid} inductance against the others",
                              "", dl[sid], None, -tol_bL, tol_bL, note="ratio to prediction, against the "
                              "other strands' median"))
        if sid in dr:
            lines.append(line(f"balance.{sid}.resistance", f"Balance, strand {sid} resistance against the others",
                              "", dr[sid], None, -tol_bR, tol_bR, note="ratio to prediction, against the "
                              "other strands' median"))
    if not any(x["result"] == "fail" for x in lines):
        return lines, []
    # The odd one out: furthest from its own prediction (with two strands, the
    # one that moved; the other reads as designed).
    def off(sid):
        return math.hypot(math.log(rl.get(sid, 1.0)), math.log(rr.get(sid, 1.0)))
    failing = {x["key"].split(".")[1] for x in lines if x["result"] == "fail"}
    sid = max(failing, key=off)
    others = ", ".join(s.id for s in strands if s.id != sid)
    dL = rl.get(sid, 1.0) / median([v for k, v in rl.items() if k != sid] or [1.0]) - 1
    dR = rr.get(sid, 1.0) / median([v for k, v in rr.items() if k != sid] or [1.0]) - 1
    parts = ([f"{dL * 100:+.1f} % inductance"] if sid in rl else []) + \
            ([f"{dR * 100:+.1f} % resistance"] if sid in rr else [])
    text = f"strand {sid} out of balance: {' and '.join(parts)} against strand(s) {others}"
    expo = turn_exponents(design, resize)
    dn = None
    if expo:
        a, b = expo
        ys = ([(a, math.log(1 + dL))] if sid in rl else []) + ([(b, math.log(1 + dR))] if sid in rr else [])
        x = sum(c * y for c, y in ys) / sum(c * c for c, _ in ys)
        n = strands[0].turns
        dn = n * (math.exp(x) - 1)
        if abs(dn) >= 0.5:
            text += (f"; likely {abs(dn):.0f} turn{'s' if round(abs(dn)) != 1 else ''} "
                     f"{'fewer' if dn < 0 else 'more'} ({n + round(dn)} of {n}; engine: L ∝ N^{a:.2f}, "
                     f"R ∝ N^{b:.2f})")
            if dn < 0 and round(abs(dn)) <= 2:
                text += _or_shorted(design, sid)
    finding = {"scope": f"strand {sid}", "basis": "balance", "likely": True, "finding": text,
               "strand": sid, "turns_difference": dn, "log_distance": None, "log_distance_as_ordered": None}
    return lines, [finding]


def _or_shorted(design, sid: str) -> str:
    """A turn or two short reads at the LCR meter much as a shorted turn does: say so, and what tells them apart."""
    st = getattr(design, "shorted_turn", None)
    how = (f"a Q reading at {st.shows_from_Hz / 1e3:.2g} kHz or above, or the ring test," if st is not None
           else "a Q reading or the ring test")
    return f", or a shorted turn in strand {sid}, which reads alike at this frequency: {how} tells them apart"


def leakage_line(key, item, measured, predicted, band, reading, note):
    """The series-opposing reading before the joint against its band (the QC plan's leakage band)."""
    lo, hi = band
    if predicted is None or predicted <= 0 or lo is None:
        return line(key, item, "H", measured, predicted, reading=reading, note=note)
    return line(key, item, "H", measured, predicted, lo, hi, reading=reading,
                note=note + f"; leakage band ±{(hi / predicted - 1) * 100:.0f} %")
