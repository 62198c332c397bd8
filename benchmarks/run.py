"""``make bench``: run every ``benchmarks/bench_*.py`` in turn.

Each file has a ``main()`` that prints its figures (medians and ratios, never
a pass/fail on time) and returns 0, or 1 when a correctness check inside it
fails.  The exit status is the worst of them.
"""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent


def main(argv=None) -> int:
    sys.path.insert(0, str(HERE))  # the shared timing helper (timing.py)
    only = set((argv if argv is not None else sys.argv[1:]))
    worst = 0
    for path in sorted(HERE.glob("bench_*.py")):
        name = path.stem[len("bench_"):]
        if only and name not in only:
            continue
        print(f"== {name}", flush=True)
        spec = importlib.util.spec_from_file_location(path.stem, path)
        mod = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(mod)
        worst = max(worst, int(mod.main() or 0))
    return worst


if __name__ == "__main__":
    sys.exit(main())
