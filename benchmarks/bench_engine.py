"""Benchmark of the strand-matrix engine (``make bench``; ``python benchmarks/run.py engine``).

Times :func:`windsheet.inductance.strand_matrix` on a 10-layer, 5,000-turn
coil (one and two strands), then checks it against the plain double sum on a
small coil.  Exits 1 if the two disagree by more than 1e-9 relative.
"""

from __future__ import annotations

import sys
import time

import numpy as np

from windsheet.inductance import strand_matrix, strand_matrix_bruteforce
from windsheet.layout import cylinder_layout

#: Largest relative disagreement allowed between the fast and the plain sum.
AGREEMENT = 1e-9


def best_time(fn, *args, repeat=3):
    """Best wall time of ``repeat`` calls, and the last result. [s]"""
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn(*args)
        best = min(best, time.perf_counter() - t0)
    return best, out


def large_coil(strands):
    """10 layers × 500 slots on a 40 mm form, 5,000 turns per strand."""
    overall = 0.10e-3
    traverse = 500 * strands * overall * 1.0001
    return cylinder_layout(0.040, traverse, 0.09e-3, overall, strands, 5000, layers=10)


def small_coil():
    """3 layers × 40 turns, bifilar, with layer tape."""
    return cylinder_layout(0.020, 40 * 2 * 0.5e-3 * 1.0001, 0.45e-3, 0.5e-3, 2, 120,
                           layers=3, tape=50e-6)


def max_relative_difference(a, b):
    return float(np.max(np.abs(a - b) / np.abs(b)))


def main() -> int:
    for strands in (1, 2):
        lay = large_coil(strands)
        seconds, L = best_time(strand_matrix, lay)
        print(f"strand_matrix, {lay.layers} layers x {lay.turns_in_layer[0]} slots, "
              f"{strands} strand(s), {lay.n_turns} turns: {seconds * 1e3:.1f} ms "
              f"(best of 3); L_AA = {L[0, 0]:.6g} H")
    lay = small_coil()
    fast_s, fast = best_time(strand_matrix, lay)
    plain_s, plain = best_time(strand_matrix_bruteforce, lay)
    diff = max_relative_difference(fast, plain)
    print(f"small coil, {lay.layers} layers x {lay.turns_in_layer[0]} turns, {lay.strands} strands: "
          f"fast {fast_s * 1e3:.2f} ms, double sum {plain_s * 1e3:.2f} ms, "
          f"max relative difference {diff:.2e}")
    if not diff <= AGREEMENT:
        print(f"FAIL: fast and plain sums differ by more than {AGREEMENT:g}", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
