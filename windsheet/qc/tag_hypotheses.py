"""Tag hypotheses: what the strand and pair readings would be if the end tags were put on wrong.

Before the strands are joined (or, for separate windings, with temporary
links) every reading is taken between tags: a strand alone between its start
and finish tags; a pair series-aiding with ``A.finish`` linked to ``B.start``
and read from ``A.start`` to ``B.finish``; series-opposing with the finishes
linked and read between the starts.  A tag on the wrong wire moves the meter's
clips and the links to other wire ends.  Each hypothesis (a strand's start and
finish tags swapped; two tags of different strands swapped; a strand broken)
is solved through the same nodal analysis as the wiring hypotheses
(:func:`windsheet.physics.network.terminal_reading`) with the coil's own strand
matrix, and the nearest that fits the readings clearly is named.
"""

from __future__ import annotations

import itertools
import math
from typing import Optional

import numpy as np

from windsheet.physics.hookup import STRAND_IDS
from windsheet.physics.network import terminal_reading

from .wiring_hypotheses import CLEAR_MATCH, log_distance


def end_name(e: int) -> str:
    return f"{STRAND_IDS[e // 2]}.{'finish' if e % 2 else 'start'}"


def _reading(L, R, wire_of_tag, links, probe, frequency, broken=()):
    """(L, R) between the tags ``probe`` with the tag pairs ``links`` joined; (inf, inf) when open."""
    ends = len(wire_of_tag)
    parent = list(range(ends + len(broken)))

    def find(x):
        while parent[x] != x:
            x = parent[x]
        return x

    for x, y in links:
        parent[find(wire_of_tag[x])] = find(wire_of_tag[y])
    node_of = [find(e) for e in range(ends)]
    # A broken strand's branch ends at a node of its own, apart from its finish lead: it carries no current.
    for k, s in enumerate(broken):
        node_of[2 * s + 1] = ends + k
    l, r = terminal_reading(L, R, node_of, find(wire_of_tag[probe[0]]), find(wire_of_tag[probe[1]]), frequency)
    return (float("inf"), float("inf")) if l is None else (l, r)


def tag_readings(L, R, frequency, wire_of_tag, pairs, broken=()) -> dict:
    """Every strand-alone and pair reading under one tagging.

    Parameters
    ----------
    L : ndarray, shape (S, S)
        Strand inductance matrix. [H]
    R : ndarray, shape (S,)
        Strand resistances. [ohm]
    frequency : float
        [Hz]
    wire_of_tag : sequence of int, length 2 S
        The wire end each tag is on (A.start = 0, A.finish = 1, B.start = 2, ...).
    pairs : list of (int, int)
        The strand pairs read series-aiding and series-opposing.
    broken : sequence of int
        Strands broken inside.

    Returns
    -------
    readings : dict
        ``A.L``, ``A.R``, ... and ``A-B.aid``, ``A-B.opp`` [H, ohm]; ``inf`` when open.
    """
    out = {}
    for s in range(len(R)):
        lv, rv = _reading(L, R, wire_of_tag, [], (2 * s, 2 * s + 1), frequency, broken)
        out[f"{STRAND_IDS[s]}.L"], out[f"{STRAND_IDS[s]}.R"] = lv, rv
    for a, b in pairs:
        name = f"{STRAND_IDS[a]}-{STRAND_IDS[b]}"
        out[f"{name}.aid"] = _reading(L, R, wire_of_tag, [(2 * a + 1, 2 * b)], (2 * a, 2 * b + 1), frequency,
                                      broken)[0]
        out[f"{name}.opp"] = _reading(L, R, wire_of_tag, [(2 * a + 1, 2 * b + 1)], (2 * a, 2 * b), frequency,
                                      broken)[0]
    return out


def hypotheses(strands: int, separate: bool):
    """``(kind, wire_of_tag, broken, text)`` for every single tagging mistake, and each broken strand.

    A reversal puts the later strand first: with two strands, A reversed and
    B reversed read alike, and A is taken as marked.
    """
    word = "winding" if separate else "strand"
    ident = list(range(2 * strands))
    out = []
    for s in reversed(range(strands)):
        w = ident.copy()
        w[2 * s], w[2 * s + 1] = w[2 * s + 1], w[2 * s]
        out.append((f"reversed:{STRAND_IDS[s]}", w, (),
                    f"{word} {STRAND_IDS[s]} reversed: its start and finish tags are swapped"))
    # Finish tags first: two mistakes that read alike are named in this order.
    for e1, e2 in sorted(itertools.combinations(range(2 * strands), 2), key=lambda p: (-(p[0] % 2 + p[1] % 2), p)):
        if e1 // 2 == e2 // 2:
            continue
        w = ident.copy()
        w[e1], w[e2] = w[e2], w[e1]
        same = e1 % 2 == e2 % 2
        what = (f"the {'finish' if e1 % 2 else 'start'} tags of {word}s {STRAND_IDS[e1 // 2]} and "
                f"{STRAND_IDS[e2 // 2]} are swapped" if same else f"the tags {end_name(e1)} and {end_name(e2)} "
                f"are swapped")
        out.append((f"swapped:{end_name(e1)}/{end_name(e2)}", w, (), what))
    for s in range(strands):
        out.append((f"broken:{STRAND_IDS[s]}", ident, (s,), f"{word} {STRAND_IDS[s]} is open: broken wire "
                                                            "or a lead not terminated"))
    return out


def diagnose_tags(design, measured: dict) -> Optional[dict]:
    """The tagging mistake (or broken strand) the strand and pair readings fit, if one fits clearly.

    Parameters
    ----------
    design : windsheet.design.model.Design
        The issued design (strand matrix, resistances at 20 °C, test frequency).
    measured : dict
        ``A.L``, ``A.R``, ``A-B.aid``, ``A-B.opp`` ... as read (``inf`` for open);
        missing keys are not read.

    Returns
    -------
    finding : dict or None
        ``{kind, text, distance, distance_as_tagged}``; None when the readings
        lie nearest the tags as marked or fit nothing clearly.
    """
    S = len(design.strands)
    if S < 2 or not measured:
        return None
    L = np.asarray(design.inductance_matrix_H, float)
    R = np.asarray([s.resistance_20C_ohm for s in design.strands], float)
    f = float(design.test.frequency_Hz or 1e3)
    pairs = sorted({tuple(STRAND_IDS.index(x) for x in k.split(".")[0].split("-"))
                    for k in measured if "-" in k})
    floor = 1e-3 * float(np.trace(L))
    as_tagged = tag_readings(L, R, f, list(range(2 * S)), pairs)
    d0 = log_distance(measured, as_tagged, floor)
    scored = []
    for kind, w, broken, text in hypotheses(S, design.hookup.name == "separate"):
        exp = tag_readings(L, R, f, w, pairs, broken)
        scored.append((log_distance(measured, exp, floor), kind, text))
    scored.sort(key=lambda t: t[0])
    best = scored[0]
    if best[0] > CLEAR_MATCH or best[0] >= d0:
        return None
    # Two mistakes that read alike cannot be told apart by these readings: name the first, say so.
    alike = [t for t in scored[1:] if t[0] - best[0] < 1e-6 and not t[1].startswith("broken")]
    text = best[2] + (f" (or {'; or '.join(t[2] for t in alike[:2])}: these readings cannot tell them apart)"
                      if alike else "")
    return {"kind": best[1], "text": text, "distance": best[0], "distance_as_tagged": d0}


def measured_from_lines(lines: list[dict]) -> dict:
    """The strand and pair readings of a unit's sign-off lines, as :func:`diagnose_tags` takes them."""
    out = {}
    for ln in lines:
        parts = ln["key"].split(".")
        opened = bool((ln.get("reading") or {}).get("open"))
        value = float("inf") if opened else ln.get("measured")
        if value is None:
            continue
        if parts[0] == "strand" and parts[-1] in ("inductance", "resistance"):
            out[f"{parts[1]}.{'L' if parts[-1] == 'inductance' else 'R'}"] = value
        elif parts[0] == "pair" and parts[-1] in ("series_aiding", "series_opposing"):
            a, b = parts[1].split("-")
            if a > b:
                continue
            out[f"{parts[1]}.{'aid' if parts[-1] == 'series_aiding' else 'opp'}"] = value
    return {k: v for k, v in out.items() if v is not None and (math.isinf(v) or v > 0)}
