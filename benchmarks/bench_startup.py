"""Benchmark of start-up (``make bench ONLY=startup``; ``python benchmarks/run.py startup``).

Median wall time and CPU time (user + system, the steadier figure on a shared
machine), over fresh processes, of ``windsheet size`` on a sample, of
``python -c "import numpy"`` (the floor any numpy tool pays), their ratios
against the 2× goal, of importing the four libraries ``size`` cannot run without
(numpy, PyYAML, typer, and pydantic with one model made and validated: the floor
of this design), and of listing the register.  Runs are interleaved so
that a busy machine slows all of them alike.  Prints figures only; exits 1
if a command fails.
"""

from __future__ import annotations

import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "samples" / "hl-0412-bifilar-aiding.yaml"
REPEAT = 15
AIM = 2.0  # issue 32's goal
LIBRARIES = "its libraries (numpy, PyYAML, typer, one pydantic model)"
# Importing pydantic loads its model machinery only when the first model class is made: the floor
# makes and validates one (with plugins off, as windsheet runs it).
_FLOOR = ("import os, sys, types; os.environ['PYDANTIC_DISABLE_PLUGINS'] = '__all__'\n"
          # windsheet's stand-in for pydantic's plugin loader (cli/app.py), so neither pays importlib.metadata
          "m = types.ModuleType('pydantic.plugin._loader'); m.get_plugins = lambda: ()\n"
          "m.PYDANTIC_ENTRY_POINT_GROUP = 'pydantic'; sys.modules[m.__name__] = m\n"
          "import numpy, yaml, typer\nfrom pydantic import BaseModel\n"
          "class Order(BaseModel):\n    turns: int\nOrder(turns=1)\n")
# An installed tool runs from byte-code that pip compiled; a shell that sets
# PYTHONDONTWRITEBYTECODE would instead time the compiler on every run.
ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def windsheet_command() -> list[str]:
    """The installed console script beside this Python, else the module."""
    script = Path(sys.executable).with_name("windsheet")
    return [str(script)] if script.exists() else [sys.executable, "-m", "windsheet.cli"]


def _children_cpu() -> float:
    use = resource.getrusage(resource.RUSAGE_CHILDREN)
    return use.ru_utime + use.ru_stime


def wall_time(cmd) -> tuple[float, float]:
    """Wall time and CPU time (user + system) of one run of ``cmd`` in a fresh process. [s]"""
    c0, t0 = _children_cpu(), time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, cwd=ROOT, env=ENV)
    return time.perf_counter() - t0, _children_cpu() - c0


def main() -> int:
    ws = windsheet_command()
    with tempfile.TemporaryDirectory() as tmp:
        reg = str(Path(tmp) / "register.db")
        commands = {
            "python -c 'import numpy'": [sys.executable, "-c", "import numpy"],
            # The libraries size cannot run without, imported and nothing else: what windsheet's own
            # code adds is size's time beyond this one.
            LIBRARIES: [sys.executable, "-c", _FLOOR],
            "windsheet size (sample)": ws + ["size", str(SAMPLE)],
            "windsheet register (listing)": ws + ["register", "--register", reg],
        }
        try:
            subprocess.run(ws + ["register", "--issue", str(SAMPLE), "--register", reg], check=True,
                           capture_output=True, cwd=ROOT, env=ENV)
            for cmd in commands.values():  # warm the file cache and the byte-code
                wall_time(cmd)
            times = {name: [] for name in commands}
            cpus = {name: [] for name in commands}
            for _ in range(REPEAT):
                for name, cmd in commands.items():
                    wall, cpu = wall_time(cmd)
                    times[name].append(wall)
                    cpus[name].append(cpu)
        except subprocess.CalledProcessError as exc:
            print(f"FAIL: {' '.join(exc.cmd)} exited {exc.returncode}", file=sys.stderr)
            return 1
    med = {name: statistics.median(t) for name, t in times.items()}
    cpu = {name: statistics.median(t) for name, t in cpus.items()}
    for name, t in med.items():
        print(f"{name:<58} median {t * 1e3:7.0f} ms wall  (min {min(times[name]) * 1e3:.0f} ms), "
              f"{cpu[name] * 1e3:5.0f} ms CPU  ({REPEAT} runs)")
    numpy_ = "python -c 'import numpy'"
    for what, m in (("wall", med), ("CPU", cpu)):
        ratio = m["windsheet size (sample)"] / m[numpy_]
        print(f"size / import numpy = {ratio:.2f} {what} ({'within' if ratio <= AIM else 'over'} the {AIM:.0f}× goal)")
    for what, m in (("wall", med), ("CPU", cpu)):
        print(f"size / import of its libraries = {m['windsheet size (sample)'] / m[LIBRARIES]:.2f} {what}; "
              f"the libraries alone / import numpy = {m[LIBRARIES] / m[numpy_]:.2f} {what}")
    print(f"register listing / import numpy = {med['windsheet register (listing)'] / med[numpy_]:.2f} wall")
    return 0


if __name__ == "__main__":
    sys.exit(main())
