"""Benchmark of the stress map (``make bench``; ``python benchmarks/run.py stress``).

On a 50,000-turn coil (20 layers × 2,500 turns of 0.1 mm wire) times, as
medians of five runs: the neighbour search (cell list, every pair within the
stated gap), the inductance engine (:func:`windsheet.physics.inductance.strand_matrix`),
the per-turn flux linkage, and the whole stress check (voltage map, leads,
partial-discharge inception per pair, capacitance, verdict).  Prints the
ratio of the neighbour search to the inductance engine.  Exits 1 if the
search finds a pair count other than the geometry gives.
"""

from __future__ import annotations

import dataclasses
import sys
from types import SimpleNamespace

import numpy as np

from timing import median_time
from windsheet.physics import stress
from windsheet.physics.flux_linkage import turn_flux_linkage
from windsheet.physics.inductance import strand_matrix
from windsheet.physics.layout import cylinder_layout
from windsheet.physics.neighbours import neighbour_pairs
from windsheet.physics.leads import lead_routes

REPEAT = 5


def coil():
    """20 nested layers × 2,500 turns of 0.1 mm (0.09 mm copper) on a 40 mm former: 50,000 turns."""
    overall = 0.10e-3
    return cylinder_layout(0.040, 2500 * overall * 1.0001, 0.09e-3, overall, 1, 50_000, layers=20)


def main() -> int:
    lay = coil()
    fresh = lambda: dataclasses.replace(lay, _memo={})  # noqa: E731 - no cached neighbours
    t_nb, nb = median_time(lambda: neighbour_pairs(fresh()), repeat=REPEAT)
    t_L, L = median_time(lambda: strand_matrix(lay), repeat=3)
    t_flux, _ = median_time(lambda: turn_flux_linkage(lay, [1.0]), repeat=3)
    net = SimpleNamespace(end_potential=np.array([[0.0, 1.0]], dtype=complex),
                          strand_current=np.array([1.0 + 0j]), inductance=float(L[0, 0]))
    leads = lead_routes(lay, [], ["A.start", "A.finish"])

    def whole():
        layout = fresh()
        drops = stress.winding_drops(layout, net, 50.0, 2.7, lead_length=0.15)
        return stress.assess(layout, net, 230.0, 50.0, 2000.0, drops=drops, leads=leads)

    t_all, out = median_time(whole, repeat=3)
    print(f"{lay.n_turns} turns, {lay.layers} layers ({lay.layer_style}): "
          f"{nb.size} neighbour pairs")
    print(f"neighbour search (cell list)  median {t_nb * 1e3:8.1f} ms")
    print(f"inductance engine             median {t_L * 1e3:8.1f} ms")
    print(f"per-turn flux linkage         median {t_flux * 1e3:8.1f} ms")
    print(f"whole stress check            median {t_all * 1e3:8.1f} ms "
          f"(worst {out['worst_adjacent']['voltage_Vpk']:.1f} V peak, {out['insulation']['verdict']})")
    print(f"neighbour search / inductance engine = {t_nb / t_L:.3f}")
    # Nested layers: 2,499 side pairs per layer, 2 × 2,500 − 1 touching pairs per layer pair.
    expected = 20 * 2499 + 19 * (2 * 2500 - 1)
    if nb.size != expected:
        print(f"FAIL: {nb.size} neighbour pairs, the geometry gives {expected}", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
