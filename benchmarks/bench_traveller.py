"""Benchmark of printing one traveller (``python benchmarks/run.py traveller``).

The budget is the whole command, ``windsheet traveller ORDER -o X.pdf``, at
most 2 s on a 2-core machine: a fresh process reads the order, sizes it,
writes the HTML, lays it out and writes the PDF, and records the issue.
Prints the medians of the whole command (wall and CPU time of the child
process) for every sample, the main sample again with the PDF worker off
(``WINDSHEET_PDF_WORKER=0``: everything in one process), and the split of one
in-process render into its steps (CPU time, so that other work sharing the
machine counts less).  The budget is judged on wall time, what the planner
waits for; CPU is printed beside it because the worker overlaps two cores.  Exits
1 if a PDF comes out empty or without its QC record.
"""

from __future__ import annotations

import io
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = sorted(p for p in (ROOT / "samples").glob("hl-*.yaml") if not p.name.endswith(".measured.yaml"))
MAIN = ROOT / "samples" / "hl-0412-bifilar-aiding.yaml"
BUDGET_S = 2.0
REPEAT = 5


def whole_command(order: Path, out: Path, register: Path, worker: bool = True) -> tuple[float, float]:
    """Wall and CPU time (user + system) of one ``windsheet traveller`` process. [s]"""
    env = dict(os.environ, WINDSHEET_PDF_WORKER="1" if worker else "0")
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    # windsheet.cli.launch is the console command's entry point (it forks the PDF worker early).
    subprocess.run([sys.executable, "-m", "windsheet.cli.launch", "traveller", str(order), "-o", str(out),
                    "--register", str(register)], check=True, capture_output=True, cwd=ROOT, env=env)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu


def steps(order: Path) -> dict:
    """CPU time of each step of one render, in this process (imports already done). [s]"""
    from windsheet.sheets import render
    from windsheet.order.document import load_order
    from windsheet.design.build import build_design

    out = {}
    t = time.process_time()
    p = build_design(load_order(order))
    out["size"] = time.process_time() - t
    t = time.process_time()
    html = render.render_traveller_html(p)
    out["html"] = time.process_time() - t
    t = time.process_time()
    pdf = render.render_pdf(html)
    out["pdf"] = time.process_time() - t
    out["bytes"] = pdf
    return out


def main() -> int:
    import pypdf

    bad = 0
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        print(f"whole command, median of {REPEAT} (budget {BUDGET_S:.1f} s):")
        for order in SAMPLES:
            runs = [whole_command(order, tmp / f"{order.stem}.pdf", tmp / "reg.db") for _ in range(REPEAT)]
            wall = statistics.median(r[0] for r in runs)
            cpu = statistics.median(r[1] for r in runs)
            pages = len(pypdf.PdfReader(tmp / f"{order.stem}.pdf").pages)
            mark = "" if wall <= BUDGET_S else "  OVER BUDGET"
            print(f"  {order.stem:28s} wall {wall:5.2f} s  cpu {cpu:5.2f} s  "
                  f"wall/budget {wall / BUDGET_S:4.2f}  {pages} pages{mark}")
        runs = [whole_command(MAIN, tmp / "one.pdf", tmp / "reg.db", worker=False) for _ in range(REPEAT)]
        print(f"  {MAIN.stem}, PDF worker off: wall {statistics.median(r[0] for r in runs):5.2f} s  "
              f"cpu {statistics.median(r[1] for r in runs):5.2f} s")
    steps(MAIN)  # imports and caches warm
    split = [steps(MAIN) for _ in range(REPEAT)]
    for key in ("size", "html", "pdf"):
        print(f"  in process, {MAIN.stem}: {key:4s} median {statistics.median(s[key] for s in split):.3f} s cpu")
    text = " ".join(pg.extract_text() for pg in pypdf.PdfReader(io.BytesIO(split[0]["bytes"])).pages)
    if "QC record" not in text:
        print("  the PDF has no QC record")
        bad = 1
    return bad


if __name__ == "__main__":
    sys.exit(main())
