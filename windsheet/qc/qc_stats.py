"""QC statistics of signed-off units: measured over predicted, per line, job and family.

For each QC line (``terminal.inductance``, ``strand.A.resistance`` ...) the
ratio r = measured / predicted of every unit is the statistic: it takes out
the size of each coil, so jobs of one *family* (same form, same wire family,
same strand count and hookup) can be charted together.  The family's mean
r − 1 is the shop's own bias, the figure a planner uses to correct the next
order.

Only units that **passed** sign-off enter the bias, the centre line and the
limits: a miswired or failed unit measures the wiring fault, not the shop's
process, and one such unit would otherwise move the mean and widen the limits
(the usual practice of setting limits from an in-control period, Montgomery
sec. 6.4, Phase I; from memory).  Failed and incomplete units are still
charted, marked, and listed apart.

The control chart is the individuals (X) chart: centre line the mean, limits
±3σ with σ estimated from the average moving range of successive points,
σ̂ = MR-bar / d2, d2 = 1.128 for ranges of two (Montgomery, *Introduction to
Statistical Quality Control*, ch. 6; NIST/SEMATECH e-Handbook of Statistical
Methods, §6.3.2).  Signals are flagged by two run rules:

* **Rule 1, one point beyond 3σ** (Western Electric, *Statistical Quality
  Control Handbook*, 1956; Nelson's rule 1);
* **Rule 2, seven points in a row on one side of the centre line** (the
  run length used in the AIAG SPC reference manual; the Western Electric
  handbook uses eight and Nelson, 1984, nine — from memory).  A point
  exactly on the centre line ends a run.

Rendering (:mod:`windsheet.sheets.control_chart`, :mod:`windsheet.records.report`) draws
and prints what these functions return and computes nothing itself.
"""

from __future__ import annotations

import math
from typing import Optional

import numpy as np

#: d2 for moving ranges of two successive points (Montgomery, table of control chart constants).
D2_N2 = 1.128
#: Consecutive points on one side of the centre that make a run signal.
RUN_LENGTH = 7
RULE_BEYOND = "Rule 1: one point beyond 3σ (Western Electric)"
RULE_RUN = f"Rule 2: {RUN_LENGTH} in a row on one side of the centre (AIAG)"
SIGMA_NOTE = ("σ = MR-bar / d2, d2 = 1.128, from the units that passed (individuals chart; Montgomery; "
              "NIST/SEMATECH e-Handbook §6.3.2)")



def line_ratios(lines: list[dict]) -> dict[str, tuple[str, float]]:
    """``{key: (item, measured / predicted)}`` of a unit's evaluated lines that have both numbers.

    Examples
    --------
    >>> line_ratios([{"key": "terminal.inductance", "item": "L", "measured": 102.0, "predicted": 100.0},
    ...              {"key": "hipot.result", "item": "Hipot", "measured": None, "predicted": None}])
    {'terminal.inductance': ('L', 1.02)}
    """
    out = {}
    for line in lines or []:
        m, p = line.get("measured"), line.get("predicted")
        if isinstance(m, (int, float)) and isinstance(p, (int, float)) and not isinstance(m, bool) and p:
            r = float(m) / float(p)
            if math.isfinite(r):
                out[line["key"]] = (line.get("item") or line["key"], r)
    return out


def individuals_limits(x) -> dict:
    """Centre line and ±3σ limits of an individuals chart, σ from the average moving range.

    Parameters
    ----------
    x : array_like
        The points in time order (here ratios measured / predicted). [-]

    Returns
    -------
    limits : dict
        ``n``, ``centre`` (mean), ``mr_bar`` (mean of |x[i] − x[i−1]|),
        ``sigma`` (MR̄ / 1.128), ``ucl`` and ``lcl`` (centre ± 3σ); σ and the
        limits are None for fewer than two points.

    References
    ----------
    .. [1] D. C. Montgomery, Introduction to Statistical Quality Control,
       6th ed., Wiley, 2009, sec. 6.4 (control charts for individual measurements).
    .. [2] NIST/SEMATECH e-Handbook of Statistical Methods, sec. 6.3.2.

    Examples
    --------
    >>> d = individuals_limits([1.0, 1.02, 0.99, 1.01])
    >>> round(d["centre"], 4), round(d["sigma"], 5), round(d["ucl"], 4)
    (1.005, 0.02069, 1.0671)
    """
    x = np.asarray(x, dtype=float)
    n = int(x.size)
    centre = float(x.mean()) if n else None
    if n < 2:
        return {"n": n, "centre": centre, "mr_bar": None, "sigma": None, "ucl": None, "lcl": None}
    mr_bar = float(np.abs(np.diff(x)).mean())
    sigma = mr_bar / D2_N2
    return {"n": n, "centre": centre, "mr_bar": mr_bar, "sigma": sigma,
            "ucl": centre + 3 * sigma, "lcl": centre - 3 * sigma}


def run_rule_signals(x, centre: float, sigma: Optional[float], run: int = RUN_LENGTH) -> list[dict]:
    """Points that break a run rule: one beyond 3σ; ``run`` in a row on one side of the centre.

    Returns
    -------
    signals : list of dict
        ``rule`` (its name as the chart prints it) and ``points`` (0-based
        indices; for a run, every point of it from the ``run``-th on).

    Examples
    --------
    >>> [s["points"] for s in run_rule_signals([1, 1, 1, 1, 1, 1, 1, 0, 9], 0.5, 1.0)]
    [[8], [6]]
    """
    x = np.asarray(x, dtype=float)
    out = []
    if sigma is not None and sigma > 0:
        beyond = np.flatnonzero(np.abs(x - centre) > 3 * sigma).tolist()
        if beyond:
            out.append({"rule": RULE_BEYOND, "points": beyond})
    side = np.sign(x - centre)
    flagged, count = [], 0
    for i in range(len(x)):
        count = count + 1 if i and side[i] != 0 and side[i] == side[i - 1] else (1 if side[i] != 0 else 0)
        if count >= run:
            flagged.append(i)
    if flagged:
        out.append({"rule": RULE_RUN if run == RUN_LENGTH else f"Rule 2: {run} in a row on one side of the centre",
                    "points": flagged})
    return out


def bias(x) -> dict:
    """The family's bias: mean of r − 1, the units' sample standard deviation (n − 1), and n.

    Examples
    --------
    >>> b = bias([1.02, 1.03, 1.01]); round(b["bias"], 4), round(b["sd"], 4), b["n"]
    (0.02, 0.01, 3)
    """
    x = np.asarray(x, dtype=float)
    n = int(x.size)
    return {"bias": float(x.mean() - 1.0) if n else None, "sd": float(x.std(ddof=1)) if n > 1 else None, "n": n}


def bias_text(label: str, item: str, b: dict, apart: int = 0) -> str:
    """The sentence the report prints, e.g. ``bifilar … : inductance reads +2.1 % ± 0.8 % over 37 units``.

    Examples
    --------
    >>> bias_text("bifilar on 50 mm glass-epoxy", "terminal inductance", {"bias": 0.021, "sd": 0.008, "n": 37})
    'bifilar on 50 mm glass-epoxy: terminal inductance reads +2.1 % ± 0.8 % over 37 units that passed'
    >>> bias_text("bifilar", "terminal inductance", {"bias": None, "sd": None, "n": 0}, apart=2)
    'bifilar: terminal inductance: no unit has passed yet (2 failed or incomplete, listed apart)'
    """
    tail = f" ({apart} failed or incomplete, listed apart)" if apart else ""
    if b.get("bias") is None:
        return f"{label}: {item}: no unit has passed yet{tail}"
    spread = f" ± {b['sd'] * 100:.1f} %" if b.get("sd") is not None else ""
    return (f"{label}: {item} reads {b['bias'] * 100:+.1f} %{spread} over {b['n']} unit{'s' if b['n'] != 1 else ''}"
            f" that passed{tail}")


def line_chart(points: list[dict]) -> dict:
    """Everything a control chart of one line shows, from its points in time order.

    ``points`` are dicts with ``ratio``, ``job``, ``serial`` (and ``signed_at``,
    and ``passed``: False for a unit that failed or is incomplete).  The limits
    and the run rules use the units that passed; ``excluded`` holds the indices
    of the others, which are drawn and marked but move nothing.

    Examples
    --------
    >>> c = line_chart([{"ratio": r, "passed": r < 1.5} for r in (1.0, 1.02, 3.0, 0.99)])
    >>> c["excluded"], round(c["limits"]["centre"], 4), c["limits"]["n"]
    ([2], 1.0033, 3)
    """
    used = [i for i, p in enumerate(points) if p.get("passed", True)]
    x = [points[i]["ratio"] for i in used]
    lim = individuals_limits(x)
    signals = run_rule_signals(x, lim["centre"], lim["sigma"]) if x else []
    for sig in signals:
        sig["points"] = [used[j] for j in sig["points"]]
    return {"points": points, "limits": lim, "signals": signals, "sigma_estimate": SIGMA_NOTE,
            "rules": [RULE_BEYOND, RULE_RUN],
            "excluded": [i for i, p in enumerate(points) if not p.get("passed", True)]}


def family_statistics(units: list[dict]) -> list[dict]:
    """QC statistics of every family and line.

    Parameters
    ----------
    units : list of dict
        Signed-off units in time order, each ``job``, ``serial``, ``signed_at``,
        ``family`` (key, label), ``lines`` (the sign-off's evaluated lines) and
        ``verdict`` (only ``pass`` units enter the statistics; a unit without
        one counts as passed).

    Returns
    -------
    families : list of dict
        ``key``, ``label``, ``jobs``, ``apart`` (the units that did not pass:
        ``job``, ``serial``, ``verdict``) and ``lines``: per QC line ``key``,
        ``item``, ``bias`` (:func:`bias`, over passed units), ``statement``
        (:func:`bias_text`), ``per_job`` (each job's ``n``, ``mean`` and ``sd``
        of the passed units' ratio) and ``chart`` (:func:`line_chart`).
    """
    # One grouped pass: each unit's ratios go straight to their family, line and job, so the work is
    # the units' lines once over (scanning a line's points for every job was quadratic in jobs).
    fams: dict = {}
    for u in units:
        key, label = u["family"]
        fam = fams.get(key)
        if fam is None:
            fam = fams[key] = {"key": key, "label": label, "jobs": {}, "lines": {}, "apart": []}
        fam["jobs"].setdefault(u["job"], None)
        passed = (u.get("verdict") or "pass") == "pass"
        if not passed:
            fam["apart"].append({"job": u["job"], "serial": u["serial"], "verdict": u.get("verdict")})
        for lkey, (item, r) in line_ratios(u["lines"]).items():
            line = fam["lines"].get(lkey)
            if line is None:
                line = fam["lines"][lkey] = {"key": lkey, "item": item, "points": [], "by_job": {}}
            line["points"].append({"ratio": r, "job": u["job"], "serial": u["serial"],
                                   "signed_at": u.get("signed_at"), "passed": passed})
            if passed:
                line["by_job"].setdefault(u["job"], []).append(r)
    out = []
    for fam in fams.values():
        lines = []
        for line in fam["lines"].values():
            x = [p["ratio"] for p in line["points"] if p["passed"]]
            apart = len(line["points"]) - len(x)
            b = bias(x)
            per_job = []
            for job in fam["jobs"]:
                xs = line["by_job"].get(job)
                if xs:
                    # One array per job (its mean and sd as bias() gives them, the mean not taken twice).
                    xa = np.asarray(xs, dtype=float)
                    mean = xa.mean()
                    per_job.append({"job": job, "n": int(xa.size), "mean": float(mean),
                                    "sd": float(xa.std(ddof=1)) if xa.size > 1 else None})
            lines.append({"key": line["key"], "item": line["item"], "bias": b,
                          "statement": bias_text(fam["label"], line["item"].lower(), b, apart),
                          "per_job": per_job, "chart": line_chart(line["points"])})
        out.append({"key": fam["key"], "label": fam["label"], "jobs": list(fam["jobs"]), "apart": fam["apart"],
                    "lines": lines})
    return out
