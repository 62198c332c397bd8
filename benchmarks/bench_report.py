"""``windsheet report`` at 1,000, 10,000 and 50,000 jobs: the QC statistics in one grouped pass.

Each job is issued with a real sample's prediction (two families, alternating)
and signed off for three units whose terminal lines carry measured and
predicted values, one unit in fifty failed (a miswired unit: −33 % inductance).
Printed: the median wall time of ``windsheet report --json`` (a fresh process,
as a shop runs it) and of the statistics alone in process.  Medians of 3; no
pass/fail on time.
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
from pathlib import Path

from timing import median_time

ROOT = Path(__file__).resolve().parent.parent
SIZES = tuple(int(n) for n in os.environ.get("WINDSHEET_BENCH_JOBS", "1000,10000,50000").split(","))
UNITS_PER_JOB = 3


def _lines(p, k):
    """A unit's terminal lines: a small, repeatable scatter; every fiftieth unit miswired."""
    t = p.terminal
    off = ((k * 7919) % 101 - 50) / 5000.0
    bad = k % 50 == 49
    lr = (0.667 if bad else 1.02 + off) * t.inductance_H
    rr = (1.01 - off / 2) * t.resistance_ohm
    return "fail" if bad else "pass", [
        {"key": "terminal.inductance", "item": "Inductance at terminals", "unit": "H", "measured": lr,
         "predicted": t.inductance_H, "result": "fail" if bad else "pass"},
        {"key": "terminal.resistance", "item": "Resistance at terminals", "unit": "ohm", "measured": rr,
         "predicted": t.resistance_ohm, "result": "pass"}]


def _fill(path: Path, n: int, designs) -> None:
    from windsheet.records.register import open_register

    k = 0
    with open_register(path) as reg:
        reg.conn.execute("PRAGMA synchronous = OFF")  # building the bench file only
        for j in range(n):
            design = designs[j % len(designs)]
            number = f"HR-{j:05d}"
            units = [f"{number}-{u:02d}" for u in range(1, UNITS_PER_JOB + 1)]
            p = design.model_copy(update={"job": design.job.model_copy(update={"number": number, "units": units})})
            reg.record_issue(p, "order", f"{j:064x}")
            signed = []
            for s in units:
                verdict, lines = _lines(p, k)
                k += 1
                signed.append({"serial": s, "verdict": verdict, "lines": lines})
            reg.record_signoff({"job": number, "revision": p.job.revision,
                                "verdict": "fail" if any(u["verdict"] == "fail" for u in signed) else "pass",
                                "units": signed}, f"{j:064x}", "QC")


def main() -> int:
    from windsheet.design.build import build_design
    from windsheet.order.document import load_order
    from windsheet.records.register import open_register_readonly
    from windsheet.records.report import build_report, register_units

    designs = [build_design(load_order(ROOT / "samples" / name), remedies=False)
               for name in ("hl-0412-bifilar-aiding.yaml", "hl-0410-single.yaml")]
    cli = [sys.executable, "-m", "windsheet.cli"]
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
    print(f"{'jobs':>7}  {'units':>7}  {'report --json (CLI)':>20}  {'statistics':>11}")
    with tempfile.TemporaryDirectory() as tmp:
        for n in SIZES:
            path = Path(tmp) / f"r{n}.db"
            _fill(path, n, designs)
            wall = median_time(lambda: subprocess.run(cli + ["report", "--json", "--register", str(path)],
                                                      capture_output=True, check=True))[0]
            with open_register_readonly(path) as reg:
                units = register_units(reg.conn)
            stats = median_time(lambda: build_report(units))[0]
            print(f"{n:>7}  {len(units):>7}  {wall:>18.3f} s  {stats:>9.3f} s", flush=True)
    print(f"load average at the end {os.getloadavg()[0]:.1f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
