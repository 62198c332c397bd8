"""Benchmark of the strand-matrix engine (``make bench``; ``python benchmarks/run.py engine``).

Prints medians and ratios, never a pass/fail on time:

- :func:`windsheet.physics.inductance.strand_matrix` on the 200-layer, 4-strand,
  5,000-turn coil, and the whole ``build_design`` of an order for it;
- the 10-layer, 5,000-turn coils (one and two strands);
- how many kernels the engine evaluates against the group-pair loop it
  replaced, and that loop's time on coils it can still do quickly;
- a 5,000-turn target-inductance order: ``build_design`` time and engine runs,
  against the Newton search on sqrt(L) used before;
- orders at the edges of the work budget (windsheet.order.limits);
- the ratio to the plain double sum on a small coil.

Exits 1 if the fast and plain sums disagree by more than 1e-9 relative.
"""

from __future__ import annotations

import math
import sys
import time

import numpy as np
import yaml

from timing import median_time
from windsheet.order import limits
from windsheet.design import build as P
from windsheet.design import sizing as S
from windsheet.design import target_turns as T
from windsheet.physics.inductance import loop_self_inductance, maxwell_mutual, strand_matrix, strand_matrix_bruteforce
from windsheet.physics.layout import cylinder_layout
from windsheet.order.document import parse_order
from windsheet.order.wire_choice import resolve_wire

#: Largest relative disagreement allowed between the fast and the plain sum.
AGREEMENT = 1e-9


def ten_layer_coil(strands):
    """10 layers × 500 slots on a 40 mm form, 5,000 turns per strand."""
    overall = 0.10e-3
    traverse = 500 * strands * overall * 1.0001
    return cylinder_layout(0.040, traverse, 0.09e-3, overall, strands, 5000, layers=10)


def coil(strands, turns, layers):
    """Close-wound 0.1 mm wire on a 40 mm form, ``layers`` full layers."""
    slots = -(-turns // layers)
    return cylinder_layout(0.040, slots * strands * 0.1e-3 * 1.0001, 0.09e-3, 0.1e-3, strands, turns,
                           layers=layers)


def order(strands, turns, layers, **winding):
    """The same coil as an order, for a whole ``build_design``."""
    slots = -(-turns // layers) if layers != "auto" else winding.pop("slots")
    return parse_order(yaml.safe_dump({
        "job": {"number": "HL-0999", "part": "Bench coil", "customer": "Harrowgate bench", "quantity": 1,
                "revision": "A"},
        "form": {"kind": "cylinder", "diameter": "40 mm", "traverse": f"{slots * strands * 0.10001:.5f} mm"},
        "wire": {"size": "0.09 mm", "grade": 1, "overall_diameter": "0.1 mm"},
        "winding": {"strands": strands, "layers": layers, **({"turns": turns} if turns else {}), **winding},
        "hookup": "series-aiding" if strands > 1 else "single",
        "duty": {"voltage": "10 V", "frequency": "0 Hz"}}).encode())


def group_pair_loop(layout):
    """The engine before kernel classes: a Python loop over every pair of
    (layer, strand) groups, one kernel per slot offset of each pair."""
    groups = list(layout.groups())
    p, a_cu = layout.pitch, layout.copper_diameter / 2
    L = np.zeros((layout.strands, layout.strands))
    for ia, (_, sa, ra, za, lo_a, hi_a) in enumerate(groups):
        for ib in range(ia, len(groups)):
            _, sb, rb, zb, lo_b, hi_b = groups[ib]
            m = np.arange(lo_a - (hi_b - 1), hi_a - lo_b)
            count = np.minimum(hi_b, hi_a - m) - np.maximum(lo_b, lo_a - m)
            dz = za - zb + m * p
            if ia == ib:
                off = m != 0
                total = count[off] @ maxwell_mutual(ra, rb, dz[off]) + count[~off].sum() * loop_self_inductance(ra, a_cu)
            else:
                total = count @ maxwell_mutual(ra, rb, dz)
            L[sa, sb] += total
            if ia != ib:
                L[sb, sa] += total
    return L


def group_pair_kernels(layout):
    """Kernels the group-pair loop evaluates: one per slot offset of every group pair."""
    groups = list(layout.groups())
    n = np.array([g[5] - g[4] for g in groups])
    i, j = np.triu_indices(n.size)
    return int(np.sum(n[i] + n[j] - 1))


def kernels_evaluated(layout):
    """Kernels the engine evaluates for ``layout`` (counted by wrapping maxwell_mutual)."""
    import windsheet.physics.inductance as ind
    count, real = [0], ind.maxwell_mutual

    def counting(r1, r2, dz):
        count[0] += np.size(dz)
        return real(r1, r2, dz)

    ind.maxwell_mutual = counting
    try:
        ind.strand_matrix(layout)
    finally:
        ind.maxwell_mutual = real
    return count[0]


def newton_runs(o, wire):
    """Engine runs of the search used before: Newton steps on sqrt(L) from 10 turns, then n ± 1."""
    target, runs, n = o.doc.winding.target_inductance, 0, 10
    for _ in range(12):
        got = S.terminal_inductance(o, wire, n)
        runs += 1
        nxt = max(1, int(round(n * math.sqrt(target / got))))
        if nxt == n:
            break
        n = nxt
    for k in {max(1, n - 1), n, n + 1}:
        S.terminal_inductance(o, wire, k)
        runs += 1
    return runs, n


def engine_runs(o, wire):
    """Engine runs of :func:`windsheet.design.target_turns.solve_turns`, and its answer."""
    runs, real = [0], S.terminal_inductance

    def counting(*args):
        runs[0] += 1
        return real(*args)

    S.terminal_inductance = counting
    try:
        n, _ = T.solve_turns(o, wire)
    finally:
        S.terminal_inductance = real
    return runs[0], n


def max_relative_difference(a, b):
    return float(np.max(np.abs(a - b) / np.abs(b)))


def main() -> int:
    big = coil(4, 5000, 200)
    seconds, L = median_time(strand_matrix, big)
    print(f"strand_matrix, 200 layers x 25 slots x 4 strands, 5,000 turns per strand: {seconds:.3f} s "
          f"(median of 3); L_AA = {L[0, 0]:.6g} H")
    k_now, k_loop = kernels_evaluated(big), group_pair_kernels(big)
    print(f"  kernels evaluated: {k_now:,}; the group-pair loop evaluated {k_loop:,} "
          f"({k_loop / k_now:.1f}x as many)")
    seconds, _ = median_time(P.build_design, order(4, 5000, 200))
    print(f"  predict of the same order (layout, engine, network, stress): {seconds:.3f} s (median of 3)")

    for strands in (1, 2):
        lay = ten_layer_coil(strands)
        seconds, L = median_time(strand_matrix, lay, repeat=5)
        loop_s, _ = median_time(group_pair_loop, lay)
        print(f"strand_matrix, 10 layers x 500 slots, {strands} strand(s), {lay.n_turns} turns: "
              f"{seconds * 1e3:.1f} ms (median of 5); group-pair loop {loop_s * 1e3:.1f} ms "
              f"({loop_s / seconds:.1f}x); L_AA = {L[0, 0]:.6g} H")
    lay = coil(4, 1000, 50)
    seconds, _ = median_time(strand_matrix, lay, repeat=5)
    loop_s, _ = median_time(group_pair_loop, lay, repeat=1)
    print(f"strand_matrix, 50 layers x 20 slots x 4 strands: {seconds * 1e3:.1f} ms; group-pair loop "
          f"{loop_s * 1e3:.0f} ms ({loop_s / seconds:.0f}x)")

    o = order(1, None, "auto", target_inductance="900 mH", slots=250)
    wire = resolve_wire(o)
    seconds, p = median_time(P.build_design, o)
    runs, n = engine_runs(o, wire)
    t0 = time.perf_counter()
    old_runs, old_n = newton_runs(o, wire)
    old_s = time.perf_counter() - t0
    solve_s, _ = median_time(T.solve_turns, o, wire)
    print(f"target 900 mH -> {n} turns, {p.layers} layers: build_design {seconds:.3f} s (median of 3); "
          f"turn search {solve_s:.3f} s in {runs} engine runs, against {old_runs} runs and {old_s:.3f} s "
          f"for Newton steps on sqrt(L) ({old_s / solve_s:.1f}x; same answer: {old_n == n})")

    for strands, turns, layers in ((4, 12_400, 200), (4, 25_000, 100), (1, 100_000, 100)):
        seconds, _ = median_time(P.build_design, order(strands, turns, layers))
        work = limits.engine_work(turns, layers, strands)
        print(f"predict at the budget edge, {strands} x {turns:,} turns x {layers} layers "
              f"(work {work:,} of {limits.ENGINE_WORK:,}; {strands * turns:,} of {limits.TURNS_IN_ALL:,} "
              f"turns in all): {seconds:.2f} s (median of 3)")

    lay = cylinder_layout(0.020, 40 * 2 * 0.5e-3 * 1.0001, 0.45e-3, 0.5e-3, 2, 120, layers=3, tape=50e-6)
    fast_s, fast = median_time(strand_matrix, lay, repeat=5)
    plain_s, plain = median_time(strand_matrix_bruteforce, lay, repeat=5)
    small = coil(4, 300, 10)
    fast2_s, fast2 = median_time(strand_matrix, small, repeat=5)
    plain2_s, plain2 = median_time(strand_matrix_bruteforce, small, repeat=3)
    diff = max(max_relative_difference(fast, plain), max_relative_difference(fast2, plain2))
    print(f"small coils against the double sum: 3 layers x 40 x 2 strands fast {fast_s * 1e3:.2f} ms, "
          f"double sum {plain_s * 1e3:.2f} ms ({plain_s / fast_s:.0f}x); 10 layers x 30 x 4 strands "
          f"fast {fast2_s * 1e3:.2f} ms, double sum {plain2_s * 1e3:.0f} ms ({plain2_s / fast2_s:.0f}x); "
          f"max relative difference {diff:.2e}")
    if not diff <= AGREEMENT:
        print(f"FAIL: fast and plain sums differ by more than {AGREEMENT:g}", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
