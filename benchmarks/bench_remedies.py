"""Benchmark of the remedy search (``python benchmarks/run.py remedies``).

Sizes every sample order, and two failing taped orders (invented, as in
``tests/test_remedy_search.py``), with and without the remedy search, as
medians of five runs of CPU time, and prints the ratio and the number of
re-sizings the search made for each failing order against its budget.  The
samples all pass, so the search must cost them nothing (ratio about 1).
Exits 1 if a failing order gets no passing remedy, or the search exceeds its
budget.
"""

from __future__ import annotations

import time
from pathlib import Path

from timing import median_time
from windsheet.design import remedies
from windsheet.design.dispatch import size_any
from windsheet.order.document import parse_order
from windsheet.order.reader import load_any_order

REPEAT = 5
ROOT = Path(__file__).resolve().parents[1]

TAPED = """
job: {{number: HL-9611, part: "Relay coil, taped layers"}}
form: {{kind: cylinder, diameter: 20 mm, traverse: 50 mm}}
wire: {{size: 0.50 mm, grade: 2}}
winding: {{strands: 1, turns: 240, layers: 3, layer_tape: {{thickness: 0.08 mm, rating: 1 kV}},
          leads: {{finish: end-flange}}}}
hookup: single
duty: {{voltage: {volts}, frequency: 0 Hz}}
"""


def main() -> int:
    samples = [load_any_order(p) for p in sorted((ROOT / "samples").glob("hl-*.yaml"))]
    failing = [parse_order(TAPED.format(volts=v).encode()) for v in ("1.6 kV", "1.75 kV")]
    worst = 0
    for order in samples + failing:
        size_any(order)      # warm: lazy imports and caches are not the search's cost
    for name, orders in (("samples", samples), ("failing taped orders", failing)):
        t_off, _ = median_time(lambda: [size_any(o, remedies=False) for o in orders],
                               repeat=REPEAT, clock=time.process_time)
        t_on, _ = median_time(lambda: [size_any(o) for o in orders], repeat=REPEAT, clock=time.process_time)
        print(f"{name:22s} ({len(orders):2d}) without remedies median {t_off * 1e3:7.1f} ms, "
              f"with {t_on * 1e3:7.1f} ms, ratio {t_on / t_off:.2f}")
    for volts, order in zip(("1.6 kV", "1.75 kV"), failing):
        calls = []
        base = size_any(order, remedies=False)
        found = remedies.find_remedies(order, base, lambda o: calls.append(o) or size_any(o, remedies=False))
        passes = [r for r in found if r["verdict"] == "pass"]
        print(f"taped order at {volts} DC: {len(calls)} re-sizings (budget {remedies.BUDGET}), "
              f"{len(found)} remedies shown, {len(passes)} passing")
        if not passes or len(calls) > remedies.BUDGET:
            worst = 1
    return worst


if __name__ == "__main__":
    raise SystemExit(main())
