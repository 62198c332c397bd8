"""Benchmark of the duty physics (``make bench ONLY=duty``).

First, whole orders of 200 layers sized at d.c. and at a.c. (the a.c. duty adds the
per-turn flux linkage to the voltage map), as the ratio a.c. / d.c. of medians: the
product's aim is at most 1.5.  Then, on a 50,000-turn coil (20 layers × 2,500 turns of 0.1 mm wire), medians of
three runs: the stress check alone, and with a fast edge's initial
distribution (sparse nodal solve over every neighbour pair); prints their
ratio.  Then the heat balance and the AC ratio of one order, which run on
every prediction.
"""

from __future__ import annotations

import statistics
import time
from types import SimpleNamespace

import numpy as np

from timing import median_time
from windsheet.physics import stress
from windsheet.physics.ac_resistance import winding_ac_ratio
from windsheet.physics.heating import winding_temperatures
from windsheet.physics.layout import cylinder_layout

AC_ORDERS = (  # (strands, turns per strand, layers, frequency): the coils and a heavier one
    (2, 200, 200, "50 Hz"), (1, 200, 200, "100 kHz"), (2, 12_000, 200, "50 Hz"),
)


def _order(strands, turns, layers, frequency):
    from windsheet.order.document import parse_order

    per_layer = -(-turns // layers)
    traverse = (per_layer * strands + 2) * 0.2e-3 * 1.2 * 1e3
    text = f"""
job: {{number: B-1, part: bench, customer: bench, quantity: 1, revision: A, issued_by: bench}}
form: {{kind: cylinder, diameter: 30 mm, traverse: {traverse:.2f} mm}}
wire: {{size: 0.20 mm, grade: 2}}
winding: {{strands: {strands}, turns: {turns}, layers: {layers}, layer_tape: 0.05 mm}}
hookup: {'single' if strands == 1 else 'series-aiding'}
duty: {{voltage: 10 V, frequency: {frequency}, current: 0.01 A}}
"""
    dc = text.replace(f"frequency: {frequency}", "frequency: 0 Hz").replace("10 V,", "10 V dc,")
    return parse_order(text.encode()), parse_order(dc.encode())


def ac_against_dc():
    from windsheet.design.build import build_design

    worst = 0.0
    for strands, turns, layers, f in AC_ORDERS:
        ac, dc = _order(strands, turns, layers, f)
        # CPU time of this process, the two interleaved: the ratio holds when the machine is shared.
        pairs = [(median_time(lambda: build_design(dc, remedies=False), repeat=1, clock=time.process_time)[0],
                  median_time(lambda: build_design(ac, remedies=False), repeat=1, clock=time.process_time)[0])
                 for _ in range(5)]
        t_dc = statistics.median(p[0] for p in pairs)
        t_ac = statistics.median(p[1] for p in pairs)
        ratio = statistics.median(a / d for d, a in pairs)
        worst = max(worst, ratio)
        print(f"{strands} strand(s) x {turns:,} turns x {layers} layers: d.c. {t_dc:.3f} s, "
              f"a.c. at {f} {t_ac:.3f} s (CPU, medians of 5): a.c. / d.c. = {ratio:.2f}")
    print(f"worst a.c. / d.c. = {worst:.2f} (aim: at most 1.5)")


def main():
    ac_against_dc()
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
