"""Benchmark of reading quantities and orders at the edge (``python benchmarks/run.py units``).

Prints the median time of one quantity read, of refusing the expressions a
units library would evaluate (``9**9**9 mm``), of parsing a sample order, and
of a fresh process's first read; then the same first read through pint's
registry for comparison (pint is a test dependency, not imported by windsheet).
Exits 1 if an expression is not refused, or windsheet imports pint.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
from pathlib import Path

from timing import median_time

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "samples" / "hl-0412-bifilar-aiding.yaml"
EXPRESSIONS = ("9**9**9 mm", "9**9**8 mm", "25*2 mm", "40 mm + 10 mm")


def fresh_process(code):
    """Median wall time of ``code`` in a fresh interpreter, as it reports it. [s]"""
    out = []
    for _ in range(5):
        res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=ROOT)
        out.append(float(res.stdout.strip()))
    return statistics.median(out)


def main() -> int:
    from windsheet.common.errors import InputError
    from windsheet.order.document import parse_order
    from windsheet.order.units import read_quantity

    bad = 0
    read = median_time(lambda: read_quantity("61.2 uH", "inductance", "f"), repeat=2000)[0]
    print(f"read_quantity('61.2 uH'): median {read * 1e6:.1f} us")
    for text in EXPRESSIONS:
        def refuse(text=text):
            try:
                read_quantity(text, "length", "form.diameter")
            except InputError:
                return
            raise AssertionError(text)
        try:
            t = median_time(refuse, repeat=200)[0]
        except AssertionError:
            print(f"FAIL: {text!r} was accepted")
            bad = 1
            continue
        print(f"refuse {text!r}: median {t * 1e6:.1f} us")
    data = SAMPLE.read_bytes()
    order = median_time(lambda: parse_order(data, str(SAMPLE)), repeat=50)[0]
    print(f"parse_order({SAMPLE.name}): median {order * 1e3:.2f} ms")

    first = fresh_process(
        "import time; t=time.perf_counter(); from windsheet.order.units import read_quantity; "
        "read_quantity('50 mm', 'length', 'f'); import sys; assert 'pint' not in sys.modules; "
        "print(time.perf_counter()-t)")
    via_pint = fresh_process(
        "import time; t=time.perf_counter(); import pint; r=pint.UnitRegistry(); "
        "r.Quantity('50 mm').to('m'); print(time.perf_counter()-t)")
    print(f"fresh process, import + first read: windsheet {first * 1e3:.1f} ms, "
          f"pint registry {via_pint * 1e3:.0f} ms (ratio {via_pint / first:.0f}x)")
    return bad


if __name__ == "__main__":
    sys.exit(main())
