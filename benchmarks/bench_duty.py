"""Benchmark of the duty physics (``make bench ONLY=duty``).

On a 50,000-turn coil (20 layers × 2,500 turns of 0.1 mm wire), medians of
three runs: the stress check alone, and with a fast edge's initial
distribution (sparse nodal solve over every neighbour pair); prints their
ratio.  Then the heat balance and the AC ratio of one order, which run on
every prediction.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np

from timing import median_time
from windsheet.physics import stress
from windsheet.physics.ac_resistance import winding_ac_ratio
from windsheet.physics.heating import winding_temperatures
from windsheet.physics.layout import cylinder_layout

def main():
    lay = cylinder_layout(0.02, 0.3, 0.1e-3, 0.118e-3, 1, 50_000, layers=20)
    net = SimpleNamespace(end_potential=np.array([[0, 1]], dtype=complex), inductance=1.0)
    edge = {"held": {(0, 0): 1.0, (0, 1): 0.0}, "ties": [], "ground_F": 10e-12, "ground_given": False,
            "rise_time_s": 1e-7, "series_turns": 50_000}
    t_plain, _ = median_time(lambda: stress.assess(lay, net, 600.0, 0.0, 2000.0))
    t_edge, out = median_time(lambda: stress.assess(lay, net, 600.0, 0.0, 2000.0, edge=edge))
    print(f"stress check, 50,000 turns:            {t_plain * 1e3:8.1f} ms")
    print(f"  with a fast edge's distribution:     {t_edge * 1e3:8.1f} ms  (ratio {t_edge / t_plain:.2f}; "
          f"first turn {out['impulse']['first_turn_Vpk']:.1f} V of 600 V)")
    t_heat, _ = median_time(lambda: winding_temperatures(
        lambda t: 2.0 * (1 + 0.00393 * (t - 20)) * winding_ac_ratio(100e3, 0.5e-3, 1.7241e-8, 5, 0.55e-3)["ratio"],
        0.01, 0.05, 3e-3, 25.0), repeat=20)
    print(f"heat balance with AC ratio, one order: {t_heat * 1e3:8.2f} ms")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
