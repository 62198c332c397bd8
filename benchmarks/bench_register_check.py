"""The register's checks against its size: what each command pays at 10,000 and 50,000 jobs.

Readers (the listing, ``--lot``, the bench's job list) check the header, version and
structure on opening and each row as they read it; ``register --check`` reads every
page, text and record; a writer (``register --issue``) checks the header, version and
structure and what the listing reads of every row (never a record's JSON) before it
writes. Each job is issued with a real sample's prediction and signed off for four
units with their lots. Printed: median wall times of the command in a fresh process
(as a shop runs it; the file is in the page cache after the first run), of one page of
the bench's job list in process, and of ``--issue``'s register part in process (open
for writing with its check, record a new job: what the command pays beyond start-up and
sizing the order). Medians of 3; no pass/fail on time. The load average is printed: the
figures are wall times on whatever else the machine is doing.
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
from pathlib import Path

from timing import median_time

ROOT = Path(__file__).resolve().parent.parent
SIZES = tuple(int(n) for n in os.environ.get("WINDSHEET_BENCH_JOBS", "10000,50000").split(","))


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
                                "units": [{"serial": s, "verdict": "pass", "lines": [],
                                           "trace": {"wire_lot": {"": f"R-{k % 500:04d}"}}} for s in units]},
                               f"{k:064x}", "QC")


def main() -> int:
    from windsheet.order.document import load_order
    from windsheet.design.build import build_design
    from windsheet.records.register import open_register, open_register_readonly
    from windsheet.bench import service

    prediction = build_design(load_order(ROOT / "samples" / "hl-0412-bifilar-aiding.yaml"))
    cli = [sys.executable, "-m", "windsheet.cli"]
    order = ROOT / "samples" / "hl-0410-single.yaml"
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
    print(f"{'jobs':>7}  {'file':>7}  {'listing':>8}  {'--lot':>7}  {'job page':>8}  {'--check':>8}  "
          f"{'--issue':>8}  {'register part':>13}")
    with tempfile.TemporaryDirectory() as tmp:
        for n in SIZES:
            path = Path(tmp) / f"r{n}.db"
            _fill(path, n, prediction)

            def run(*args):
                subprocess.run(cli + list(args) + ["--register", str(path)], capture_output=True, check=False)
            listing = median_time(run, "register")[0]
            lot = median_time(run, "register", "--lot", "R-0007")[0]

            def page():
                with open_register_readonly(path) as reg:
                    jobs, total = service.jobs(reg, 3)
                    assert len(jobs) == service.JOBS_PER_PAGE and total == n
            job_page = median_time(page)[0]
            check = median_time(run, "register", "--check")[0]
            issue = median_time(run, "register", "--issue", str(order))[0]
            made = iter(range(3))

            def register_part():
                number = f"HW-{next(made):05d}"
                p = prediction.model_copy(update={"job": prediction.job.model_copy(
                    update={"number": number, "units": [f"{number}-01"]})})
                with open_register(path, create=False) as reg:
                    assert reg.issue_or_reprint(p, "order", f"{n + 1:064x}")[1] == "issued"
            part = median_time(register_part)[0]
            print(f"{n:>7}  {path.stat().st_size / 1e6:>5.0f} MB  {listing:>6.2f} s  {lot:>5.2f} s  "
                  f"{job_page:>6.3f} s  {check:>6.2f} s  {issue:>6.2f} s  {part:>11.3f} s", flush=True)
            path.unlink()
    print(f"load average at the end {os.getloadavg()[0]:.1f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
