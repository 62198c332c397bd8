"""The register's commands against its size: what each pays at 10,000 and 50,000 jobs.

Readers (the listing, ``--lot``, the bench's job list) check the header, version and
structure on opening and each row as they read it; ``register --check`` reads every
page, text and record; a writer (``register --issue``) checks the header, version and
structure and what the listing reads of every row (never a record's JSON) before it
writes. Each job is issued with a real sample's prediction and signed off for four
units with their lots. Printed: median wall times of the command in a fresh process
(as a shop runs it; the file is in the page cache after the first run), of one page of
the bench's job list in process, and of ``--issue``'s register part in process (open
for writing with its check, record a new job: what the command pays beyond start-up and
sizing the order). ``--issue`` is split into start-up (a fresh process that imports the
command line), sizing the order cold (in a fresh process: importing the order and design
models, numpy, and sizing once) and the register part, beside ``python -c "import
numpy"``: start-up's goal is that ``windsheet size`` (start-up and sizing) take at most
twice that, and the bench prints what ``--issue`` would take then. Medians of 3; no
pass/fail on time. The load average is printed: the figures are wall times on whatever
else the machine is doing, so the listing and ``--issue`` are also given as the CPU time
of their process.
"""

from __future__ import annotations

import os
import resource
import statistics
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


#: Sizing an order cold, in a fresh process whose command line is already imported: the order's and
#: the design's models, numpy, one sizing. Prints its time. [s]
_SIZE_COLD = """
import time
from pathlib import Path
import windsheet.cli.app
t0 = time.perf_counter()
from windsheet.order.reader import load_any_order
from windsheet.design.dispatch import size_any
size_any(load_any_order(Path({order!r})))
print(time.perf_counter() - t0)
"""


def _child_cpu(fn, *args) -> float:
    """CPU time (user and system) of the processes ``fn(*args)`` runs: steadier than wall time on a
    machine others are using. [s]"""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    fn(*args)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime


def main() -> int:
    from windsheet.order.document import load_order
    from windsheet.design.build import build_design
    from windsheet.records.register import open_register, open_register_readonly
    from windsheet.bench import service

    prediction = build_design(load_order(ROOT / "samples" / "hl-0412-bifilar-aiding.yaml"))
    cli = [sys.executable, "-m", "windsheet.cli"]
    order = ROOT / "samples" / "hl-0410-single.yaml"
    numpy = median_time(subprocess.run, [sys.executable, "-c", "import numpy"])[0]
    start_up = median_time(subprocess.run, cli[:1] + ["-c", "import windsheet.cli.app"])[0]
    sizing = statistics.median(float(subprocess.run(cli[:1] + ["-c", _SIZE_COLD.format(order=str(order))],
                                                    capture_output=True, text=True, check=True).stdout)
                               for _ in range(3))
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; python -c 'import numpy' "
          f"{numpy:.2f} s; --issue's start-up (import the command line) {start_up:.2f} s, sizing "
          f"{order.name} cold {sizing:.2f} s")
    print(f"{'jobs':>7}  {'file':>7}  {'listing':>8}  {'(CPU)':>7}  {'--csv':>7}  {'--json':>7}  {'--lot':>7}  {'job page':>8}  "
          f"{'--check':>8}  {'--issue':>8}  {'(CPU)':>7}  {'register part':>13}")
    with tempfile.TemporaryDirectory() as tmp:
        for n in SIZES:
            path = Path(tmp) / f"r{n}.db"
            _fill(path, n, prediction)

            def run(*args):
                subprocess.run(cli + list(args) + ["--register", str(path)], capture_output=True, check=False)
            listing = median_time(run, "register")[0]
            listing_cpu = statistics.median(_child_cpu(run, "register") for _ in range(3))
            as_csv = median_time(run, "register", "--csv")[0]
            as_json = median_time(run, "register", "--json")[0]
            lot = median_time(run, "register", "--lot", "R-0007")[0]

            def page():
                with open_register_readonly(path) as reg:
                    jobs, total = service.jobs(reg, 3)
                    assert len(jobs) == service.JOBS_PER_PAGE and total == n
            job_page = median_time(page)[0]
            check = median_time(run, "register", "--check")[0]
            issue = median_time(run, "register", "--issue", str(order))[0]
            issue_cpu = statistics.median(_child_cpu(run, "register", "--issue", str(order)) for _ in range(3))
            made = iter(range(3))

            def register_part():
                number = f"HW-{next(made):05d}"
                p = prediction.model_copy(update={"job": prediction.job.model_copy(
                    update={"number": number, "units": [f"{number}-01"]})})
                with open_register(path, create=False) as reg:
                    assert reg.issue_or_reprint(p, "order", f"{n + 1:064x}")[1] == "issued"
            part = median_time(register_part)[0]
            print(f"{n:>7}  {path.stat().st_size / 1e6:>5.0f} MB  {listing:>6.2f} s  {listing_cpu:>5.2f} s  "
                  f"{as_csv:>5.2f} s  {as_json:>5.2f} s  {lot:>5.2f} s  {job_page:>6.3f} s  {check:>6.2f} s  "
                  f"{issue:>6.2f} s  {issue_cpu:>5.2f} s  {part:>11.3f} s", flush=True)
            path.unlink()
    print(f"--issue at {SIZES[-1]:,} jobs: start-up {start_up:.2f} s + sizing {sizing:.2f} s + register part "
          f"{part:.2f} s = {start_up + sizing + part:.2f} s (the whole command {issue:.2f} s); with start-up and "
          f"sizing at their goal (2 x import numpy = {2 * numpy:.2f} s) it would be {2 * numpy + part:.2f} s")
    print(f"load average at the end {os.getloadavg()[0]:.1f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
