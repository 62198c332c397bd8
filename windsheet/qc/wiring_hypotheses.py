"""Wiring hypotheses: what the terminals would read after one or two wiring mistakes.

Every wiring that one or two mistakes can make from the ordered hookup is
enumerated (a strand reversed, two ends swapped, a strand left out, a joint
open or shorted, a terminal on the wrong end, series instead of parallel) and
evaluated through the hookup network (network.py) with the coil's own strand
inductance matrix and resistances from the prediction.  A turn-count
hypothesis is re-sized by the engine at N - k ... N + k (a ``resize``
callable, sizing.strand_values_at_turns) and rejected when the resistance
disagrees beyond its tolerance.

A wiring is a node label for each strand end plus the two terminal nodes.
Node labels survive a mistake (a joint keeps its name whatever is soldered
into it), so a reading between two named points -- T1, T2 or a joint such as
``A.finish+B.start`` -- can be predicted under every hypothesis; that is how
readings that cannot tell candidates apart get a separating reading named.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Callable, Optional

import numpy as np

from windsheet.physics.hookup import STRAND_IDS, named_hookup
from windsheet.physics.network import terminal_reading

#: A hypothesis is the cause only when it sits this close to the readings in
#: log-ratio distance (about 15 %); beyond that the nearest is only a lead.
CLEAR_MATCH = math.log(1.15)

#: Resistance ratio of one wire-size step.  AWG (ASTM B258) steps the diameter
#: by 92**(1/39); IEC 60317 nominal diameters follow the R20 series, 10**(1/20),
#: which gives nearly the same 1.26 in resistance.
GAUGE_STEP_R = 92.0 ** (2.0 / 39.0)

#: Stands in for "infinite" in the distance when only one side reads open.
_OPEN_MISMATCH = 10.0


@dataclass(frozen=True)
class Wiring:
    """Node of every strand end (A.start, A.finish, B.start ...) and the terminal nodes."""

    node_of: tuple
    t1: int
    t2: int
    labels: tuple

    def canonical(self):
        seen = {}
        for k in (self.t1, self.t2, *self.node_of):
            seen.setdefault(k, len(seen))
        return (seen[self.t1], seen[self.t2], tuple(seen[k] for k in self.node_of))


def end_name(e: int) -> str:
    return f"{STRAND_IDS[e // 2]}.{'finish' if e % 2 else 'start'}"


def _parse_end(text: str) -> int:
    sid, _, which = text.strip().partition(".")
    return 2 * STRAND_IDS.index(sid.strip().upper()) + (which.strip().lower() == "finish")


def wiring_from(joins, terminals, strands: int) -> Wiring:
    """The labelled wiring of a hookup: nodes T1, T2 and one per joint."""
    groups = [[_parse_end(e) for e in g] for g in joins]
    node = {}
    labels = ["T1", "T2"]
    t_ends = [_parse_end(t) for t in terminals]
    for k, te in enumerate(t_ends):
        node[te] = k
    for g in groups:
        hit = [node[e] for e in g if e in node]
        if hit:
            idx = hit[0]
        else:
            idx = len(labels)
            labels.append("+".join(end_name(e) for e in g))
        for e in g:
            node[e] = idx
    for e in range(2 * strands):
        if e not in node:
            node[e] = len(labels)
            labels.append(f"{end_name(e)} (free)")
    return Wiring(tuple(node[e] for e in range(2 * strands)), 0, 1, tuple(labels))


def _fresh(w: Wiring, node_of, t1=None, t2=None, extra=()):
    return Wiring(tuple(node_of), w.t1 if t1 is None else t1, w.t2 if t2 is None else t2,
                  w.labels + tuple(extra))


def single_mistakes(w: Wiring, strands: int):
    """``(wiring, kind, text)`` for every single wiring mistake from ``w``."""
    out = []
    ends = range(2 * strands)
    n = len(w.labels)
    for s in range(strands):
        sid = STRAND_IDS[s]
        nd = list(w.node_of)
        nd[2 * s], nd[2 * s + 1] = nd[2 * s + 1], nd[2 * s]
        out.append((_fresh(w, nd), f"reversed:{sid}", f"strand {sid} reversed (start and finish swapped)"))
        # Left out: the neighbours joined past it; the strand itself floats.
        a, b = w.node_of[2 * s], w.node_of[2 * s + 1]
        nd = [a if k == b else k for k in w.node_of]
        nd[2 * s], nd[2 * s + 1] = n, n + 1
        t1 = a if w.t1 == b else w.t1
        t2 = a if w.t2 == b else w.t2
        out.append((_fresh(w, nd, t1, t2, (f"{sid}.start (loose)", f"{sid}.finish (loose)")),
                    f"left-out:{sid}", f"strand {sid} left out: its neighbours joined past it"))
    for e1, e2 in itertools.combinations(ends, 2):
        if e1 // 2 == e2 // 2 or w.node_of[e1] == w.node_of[e2]:
            continue
        nd = list(w.node_of)
        nd[e1], nd[e2] = nd[e2], nd[e1]
        out.append((_fresh(w, nd), f"swapped:{end_name(e1)}/{end_name(e2)}",
                    f"{end_name(e1)} and {end_name(e2)} swapped"))
    for e in ends:
        k = w.node_of[e]
        if sum(1 for x in w.node_of if x == k) >= 2 or k in (w.t1, w.t2):
            nd = list(w.node_of)
            nd[e] = n
            where = "its terminal" if k in (w.t1, w.t2) and w.node_of.count(k) == 1 else f"joint {w.labels[k]}"
            out.append((_fresh(w, nd, extra=(f"{end_name(e)} (loose)",)), f"open:{end_name(e)}",
                        f"{end_name(e)} not connected at {where}: an open joint"))
    used = sorted(set(w.node_of) | {w.t1, w.t2})
    for p, q in itertools.combinations(used, 2):
        nd = [p if k == q else k for k in w.node_of]
        t1 = p if w.t1 == q else w.t1
        t2 = p if w.t2 == q else w.t2
        out.append((_fresh(w, nd, t1, t2), f"short:{w.labels[p]}/{w.labels[q]}",
                    f"{w.labels[p]} shorted to {w.labels[q]}"))
    for t_name, which in (("T1", "t1"), ("T2", "t2")):
        for e in ends:
            k = w.node_of[e]
            if k in (w.t1, w.t2):
                continue
            kw = {which: k}
            out.append((_fresh(w, w.node_of, **kw), f"terminal:{t_name}@{end_name(e)}",
                        f"terminal {t_name} taken from {end_name(e)}"))
    return out


def hookup_alternatives(w: Wiring, strands: int, ordered_name: Optional[str]):
    """Whole-hookup mistakes: series instead of parallel and the reverse."""
    out = []
    names = ["series-aiding", "parallel"] + (["series-opposing"] if strands == 2 else [])
    for name in names:
        if name == ordered_name:
            continue
        joins, terms = named_hookup(name, strands)
        alt = wiring_from(joins, terms, strands)
        out.append((alt, f"hookup:{name}", f"wired {name} instead of {ordered_name or 'as ordered'}"))
    return out


def _joint_text(ordered: Wiring, w: Wiring) -> str:
    """The joints as this wiring makes them, where they differ from the order."""
    def groups(x: Wiring):
        g = {}
        for e, k in enumerate(x.node_of):
            g.setdefault(k, []).append(e)
        return g
    before, after = groups(ordered), groups(w)
    made = []
    for k, es in sorted(after.items()):
        if len(es) >= 2 and before.get(k) != es and k not in (w.t1, w.t2):
            made.append("+".join(end_name(e) for e in es))
    terms = []
    for t, old in ((w.t1, ordered.t1), (w.t2, ordered.t2)):
        tends = [end_name(e) for e in after.get(t, [])]
        if sorted(after.get(t, [])) != sorted(before.get(old, [])) and tends:
            terms.append(f"{'T1' if t == w.t1 else 'T2'} on {'+'.join(tends)}")
    bits = ([f"joint made {', '.join(made)}"] if made else []) + terms
    return f" ({'; '.join(bits)})" if bits else ""


# --- Evaluation ----------------------------------------------------------------------

def readings_of(w: Wiring, L, R, frequency, taps=()) -> dict:
    """Predicted terminal L, R and tap inductances for a wiring."""
    l, r = terminal_reading(L, R, w.node_of, w.t1, w.t2, frequency)
    out = {"L": l, "R": r}
    for key, (p, q) in taps:
        # No path between the points: the meter reads open, never an inductance.
        lt = terminal_reading(L, R, w.node_of, p, q, frequency)[0] if p is not None else None
        out[key] = float("inf") if lt is None else lt
    return out


def log_distance(measured: dict, expected: dict, floor: float = 0.0) -> float:
    """Euclidean distance of the natural-log ratios over the quantities read.

    Inductances below ``floor`` (a wiring whose fields cancel) count as ``floor``;
    an open circuit matches only an open circuit.
    """
    total = 0.0
    for q, m in measured.items():
        e = expected.get(q)
        if m is None or e is None:
            continue
        if math.isinf(m) or math.isinf(e):
            total += 0.0 if math.isinf(m) and math.isinf(e) else _OPEN_MISMATCH ** 2
            continue
        m, e = max(m, floor), max(e, floor)
        if m <= 0 or e <= 0:
            continue
        total += math.log(m / e) ** 2
    return math.sqrt(total)


def _resolve_taps(w: Wiring, taps: list) -> list:
    """``[(key, (node_from, node_to))]`` for tap readings named by point labels."""
    def node(label):
        label = label.strip()
        if label.upper() in ("T1", "T2"):
            return 0 if label.upper() == "T1" else 1
        want = sorted(_parse_end(e) for e in label.split("+"))
        for k, lab in enumerate(w.labels):
            if "+" in lab and sorted(_parse_end(e) for e in lab.split("+")) == want:
                return k
        return None
    out = []
    for t in taps:
        out.append((f"tap:{t['from']}>{t['to']}", (node(t["from"]), node(t["to"]))))
    return out


def tap_points(w: Wiring) -> list[str]:
    """Named points a meter can be clipped to: the terminals and the joints."""
    return [lab for lab in w.labels if lab in ("T1", "T2") or ("+" in lab and "(" not in lab)]


def enumerate_wirings(ordered: Wiring, strands: int, ordered_name, two: bool):
    """Distinct hypotheses ``(wiring, kind, text)``: single mistakes, hookup swaps and,
    when ``two``, every pair of single mistakes; one entry per distinct wiring."""
    seen = {ordered.canonical()}
    out = []

    def add(w, kind, text):
        c = w.canonical()
        if c not in seen:
            seen.add(c)
            out.append((w, kind, text))

    singles = single_mistakes(ordered, strands)
    for w, kind, text in singles + hookup_alternatives(ordered, strands, ordered_name):
        add(w, kind, text)
    if two:
        for w1, k1, x1 in singles:
            for w2, k2, x2 in single_mistakes(w1, strands):
                add(w2, f"{k1} & {k2}", f"{x1}, and {x2}")
    return out


def separating_readings(cands: list, L, R, frequency, tol_L: float, limit: int = 3,
                        taken=()) -> list[dict]:
    """Fewest tap readings (greedy) that tell the candidate wirings apart.

    Returns ``[{from, to, expected: {text: inductance}}]``; empty when no
    reading between the named points separates them.
    """
    sep = math.log(1 + max(0.05, tol_L))
    w0 = cands[0][0]
    points = tap_points(w0)
    pairs = [(p, q) for p, q in itertools.combinations(points, 2)
             if {p, q} != {"T1", "T2"} and {p, q} not in [set(t) for t in taken]]
    table = {}
    for p, q in pairs:
        key = [("t", (w0.labels.index(p), w0.labels.index(q)))]
        table[(p, q)] = [readings_of(w, L, R, frequency, key)["t"] for w, _, _ in cands]
    floor = 1e-3 * float(np.trace(np.asarray(L)))

    def value(c, i):
        v = table[c][i]
        return math.log(max(v, floor)) if v is not None and not math.isinf(v) else None

    def classes(chosen):
        """Groups of candidates that every chosen reading leaves within ``sep`` of each other."""
        parent = list(range(len(cands)))
        for i, j in itertools.combinations(range(len(cands)), 2):
            if all(value(c, i) is not None and value(c, j) is not None and abs(value(c, i) - value(c, j)) <= sep
                   or value(c, i) is None and value(c, j) is None for c in chosen):
                ri, rj = i, j
                while parent[ri] != ri:
                    ri = parent[ri]
                while parent[rj] != rj:
                    rj = parent[rj]
                parent[rj] = ri
        roots = set()
        for i in range(len(cands)):
            while parent[i] != i:
                i = parent[i]
            roots.add(i)
        return len(roots)

    chosen = []
    while pairs and len(chosen) < limit and classes(chosen) < len(cands):
        best = max(pairs, key=lambda pq: (classes(chosen + [pq]), -pairs.index(pq)))
        if classes(chosen + [best]) == classes(chosen):
            break
        chosen.append(best)
    if classes(chosen) < 2:
        return []
    return [{"from": p, "to": q, "expected": {cands[i][2]: (None if math.isinf(table[(p, q)][i])
                                                         else table[(p, q)][i]) for i in range(len(cands))}}
            for p, q in chosen]


# --- Turn count and wire size --------------------------------------------------------

def turn_hypotheses(measured: dict, turns: int, resize: Optional[Callable], reading: Callable,
                    tol_R: float) -> list[dict]:
    """Turn counts re-sized by the engine around the count the readings suggest.

    ``reading(L, R) -> {"L", "R"}`` gives what would be read with the engine's
    strand matrix ``L`` and resistances ``R``.  The local exponents of L and R
    in N come from the engine at N - k and N + k; the count fitted to the
    inductance (or, if none was read, the resistance) is re-sized at n - 1,
    n, n + 1.  A count whose resistance disagrees with the reading by more
    than the resistance tolerance is rejected: it cannot be the cause.
    """
    if not resize or not turns:
        return []
    k0 = max(1, round(0.05 * turns))
    try:
        lo, hi = reading(*resize(max(1, turns - k0))), reading(*resize(turns + k0))
        at_n = reading(*resize(turns))
    except Exception:  # noqa: BLE001 - a count that does not fit has no reading
        return []
    span = math.log((turns + k0) / max(1, turns - k0))
    q = "L" if measured.get("L") and at_n.get("L") and at_n["L"] > 0 else "R"
    m = measured.get(q)
    if not m or math.isinf(m) or not lo.get(q) or not hi.get(q) or lo[q] <= 0 or hi[q] <= 0:
        return []
    expo = math.log(hi[q] / lo[q]) / span
    if abs(expo) < 1e-6:
        return []
    n_fit = int(round(turns * math.exp(math.log(m / at_n[q]) / expo)))
    out = []
    for n in sorted({n_fit - 1, n_fit, n_fit + 1}):
        if n < 1 or n == turns or abs(n - turns) > 0.5 * turns:
            continue
        try:
            exp = reading(*resize(n))
        except Exception:  # noqa: BLE001
            continue
        r_m, r_e = measured.get("R"), exp.get("R")
        rejected = bool(r_m and r_e and not math.isinf(r_m) and abs(math.log(r_m / r_e)) > math.log(1 + tol_R))
        out.append({"basis": "turns", "turns": n, "expected": exp, "rejected": rejected,
                    "exponent": expo,
                    "finding": f"turn count off: the readings fit {n} turns per strand, {turns} ordered "
                               f"(engine re-sized; L ∝ N^{expo:.2f} here)"})
    return out


def gauge_hypotheses(ordered: dict) -> list[dict]:
    out = []
    for steps in (1, 2, -1, -2):
        if not ordered.get("R") or math.isinf(ordered["R"]):
            break
        size = "one wire size" if abs(steps) == 1 else "two wire sizes"
        way = "thinner" if steps > 0 else "thicker"
        out.append({"basis": f"gauge{steps:+d}",
                    "expected": {"L": ordered.get("L"), "R": ordered["R"] * GAUGE_STEP_R ** steps},
                    "finding": f"wrong wire: resistance is off by about {size} ({way} than ordered; "
                               f"one AWG or R20 step is x{GAUGE_STEP_R:.2f} in resistance)"})
    return out
