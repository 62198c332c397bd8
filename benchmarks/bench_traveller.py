"""Benchmark of printing one traveller (``python benchmarks/run.py traveller``).

WeasyPrint's own layout is the floor of a traveller's cost, so the figure to
watch is a ratio: the CPU time of laying out the main sample's PDF over that
of a one-page render with the same stylesheet and fonts (median of both, in
this process).  Look at it whenever a sheet changes (DEVELOPERS.md); a sheet
that grows its layout work shows here first.

Also printed: the medians of the whole command, ``windsheet traveller ORDER -o
X.pdf`` (wall and CPU time of the child process), for every sample; the main
sample again with the PDF worker off (``WINDSHEET_PDF_WORKER=0``); and the
split of one in-process render into its steps.  Exits 1 if a PDF comes out
empty or without its QC record.
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
REPEAT = 5

# One page in the sheets' own stylesheet and fonts: the floor WeasyPrint sets.
ONE_PAGE = """<!DOCTYPE html><html><head><meta charset="utf-8"><style>{css}</style></head><body>
<h1>One page</h1><p>Layout floor: a heading, a paragraph and a small table in the sheets' own fonts.</p>
<table class="grid kv"><tr><td>Inductance</td><td>397.9 µH</td></tr><tr><td>Resistance</td><td>1.727 Ω</td></tr></table>
</body></html>"""


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


def one_page_process(html_path: Path) -> float:
    """CPU time of a fresh Python that imports WeasyPrint and renders one page. [s]"""
    code = ("import sys, weasyprint; weasyprint.HTML(filename=sys.argv[1]).write_pdf(sys.argv[1] + '.pdf')")
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run([sys.executable, "-c", code, str(html_path)], check=True, capture_output=True)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


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
    from windsheet.sheets import render

    bad = 0
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        print(f"whole command, median of {REPEAT}:")
        for order in SAMPLES:
            runs = [whole_command(order, tmp / f"{order.stem}.pdf", tmp / "reg.db") for _ in range(REPEAT)]
            wall = statistics.median(r[0] for r in runs)
            cpu = statistics.median(r[1] for r in runs)
            pages = len(pypdf.PdfReader(tmp / f"{order.stem}.pdf").pages)
            print(f"  {order.stem:28s} wall {wall:5.2f} s  cpu {cpu:5.2f} s  {pages} pages")
        runs = [whole_command(MAIN, tmp / "one.pdf", tmp / "reg.db", worker=False) for _ in range(REPEAT)]
        whole_cpu = statistics.median(r[1] for r in runs)
        print(f"  {MAIN.stem}, PDF worker off: wall {statistics.median(r[0] for r in runs):5.2f} s  "
              f"cpu {whole_cpu:5.2f} s")
        from windsheet.sheets.sheet_pdf import TEMPLATES_DIR

        page = tmp / "one-page.html"
        page.write_text(ONE_PAGE.replace("{css}", (TEMPLATES_DIR / "print.css").read_text(encoding="utf-8")),
                        encoding="utf-8")
        fresh = statistics.median(one_page_process(page) for _ in range(REPEAT))
        print(f"  one page in a fresh process (import WeasyPrint, render): cpu {fresh:5.2f} s; "
              f"whole traveller command / one page = {whole_cpu / fresh:.2f}")
    steps(MAIN)  # imports and caches warm
    split = [steps(MAIN) for _ in range(REPEAT)]
    for key in ("size", "html", "pdf"):
        print(f"  in process, {MAIN.stem}: {key:4s} median {statistics.median(s[key] for s in split):.3f} s cpu")
    from windsheet.sheets.sheet_pdf import TEMPLATES_DIR

    one = ONE_PAGE.replace("{css}", (TEMPLATES_DIR / "print.css").read_text(encoding="utf-8"))
    floor = []
    for _ in range(REPEAT):
        t = time.process_time()
        render.render_pdf(one)
        floor.append(time.process_time() - t)
    pdf_cpu = statistics.median(s["pdf"] for s in split)
    print(f"  in process, one page, same stylesheet: median {statistics.median(floor):.3f} s cpu; "
          f"{MAIN.stem} PDF layout / one page = {pdf_cpu / statistics.median(floor):.2f}")
    text = " ".join(pg.extract_text() for pg in pypdf.PdfReader(io.BytesIO(split[0]["bytes"])).pages)
    if "QC record" not in text:
        print("  the PDF has no QC record")
        bad = 1
    return bad


if __name__ == "__main__":
    sys.exit(main())
