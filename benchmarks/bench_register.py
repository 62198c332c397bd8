"""Register listing at 100, 1,000 and 10,000 jobs: flat per job, not quadratic.

Each job is issued with a real sample's prediction (about 10 kB of JSON, as a
shop's register holds) and signed off for its units. Printed: the median wall
time of ``windsheet register`` (a fresh process, as a shop runs it) and of
``Register.list_jobs`` in process, per job, and of ``register --issue`` at the
largest size. Medians of 3; no pass/fail on time.
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
from pathlib import Path

from timing import median_time

ROOT = Path(__file__).resolve().parent.parent
SIZES = (100, 1_000, 10_000)


def _fill(path: Path, n: int, design) -> None:
    from windsheet.records.register import open_register

    with open_register(path) as reg:
        reg.conn.execute("PRAGMA synchronous = OFF")  # building the bench file only
        for k in range(n):
            number = f"HB-{k:05d}"
            units = [f"{number}-{u:02d}" for u in range(1, 5)]
            p = design.model_copy(update={"job": design.job.model_copy(update={"number": number, "units": units})})
            reg.record_issue(p, "order", f"{k:064x}")
            reg.record_signoff({"job": number, "revision": p.job.revision, "verdict": "pass",
                                "units": [{"serial": s, "verdict": "pass", "lines": []} for s in units]},
                               f"{k:064x}", "QC")


def main() -> int:
    from windsheet.order.document import load_order
    from windsheet.design.build import build_design
    from windsheet.records.register import open_register_readonly

    prediction = build_design(load_order(ROOT / "samples" / "hl-0412-bifilar-aiding.yaml"))
    cli = [sys.executable, "-m", "windsheet.cli"]
    print(f"{'jobs':>7}  {'register (CLI)':>15}  {'list_jobs':>10}  {'per job':>9}  file")
    per_job = {}
    with tempfile.TemporaryDirectory() as tmp:
        for n in SIZES:
            path = Path(tmp) / f"r{n}.db"
            _fill(path, n, prediction)
            wall = median_time(lambda: subprocess.run(cli + ["register", "--register", str(path)],
                                                      capture_output=True, check=True))[0]

            def listing():
                with open_register_readonly(path) as reg:
                    assert len(reg.list_jobs()) == n
            inproc = median_time(listing)[0]
            per_job[n] = inproc / n
            print(f"{n:>7}  {wall:>13.3f} s  {inproc:>8.3f} s  {per_job[n] * 1e6:>6.1f} µs  "
                  f"{path.stat().st_size / 1e6:.0f} MB", flush=True)
        order = ROOT / "samples" / "hl-0410-single.yaml"
        big = Path(tmp) / f"r{SIZES[-1]}.db"
        issue = median_time(lambda: subprocess.run(cli + ["register", "--issue", str(order), "--register", str(big)],
                                                   capture_output=True), repeat=1)[0]
        print(f"register --issue at {SIZES[-1]:,} jobs: {issue:.3f} s (sizes the order, checks and records)")
    ratio = per_job[SIZES[-1]] / per_job[SIZES[0]]
    print(f"per-job time, {SIZES[-1]:,} against {SIZES[0]} jobs: {ratio:.2f}x (1 is flat; quadratic would be "
          f"{SIZES[-1] / SIZES[0]:.0f}x)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
