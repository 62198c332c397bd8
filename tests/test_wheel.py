"""The wheel carries everything a shop needs: built, installed outside the repo, and used from there.

A plain ``pip install .`` builds this same wheel.  The fresh environment gets
only the wheel; its dependencies come from the test environment's
site-packages through a path file, so the test needs no network and the
source tree's editable install is not on its path.
"""

from __future__ import annotations

import os
import shutil
import site
import subprocess
import sys
import sysconfig
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"


def _clean_env():
    # Nothing from the source tree on the installed environment's path.
    return {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "WINDSHEET_REGISTER")}


def _run(cmd, **kw):
    kw.setdefault("env", _clean_env())
    res = subprocess.run(cmd, capture_output=True, text=True, timeout=300, **kw)
    assert res.returncode == 0, (cmd, res.stdout[-2000:], res.stderr[-2000:])
    return res


@pytest.fixture(scope="module")
def installed(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("wheel")
    # Build from a copy of the tracked sources, so the repo gets no build/ or egg-info.
    src = tmp / "src"
    for name in ("pyproject.toml", "README.md", "LICENSE"):
        if (ROOT / name).exists():
            src.mkdir(exist_ok=True)
            shutil.copy2(ROOT / name, src / name)
    for folder in ("windsheet", "templates"):
        shutil.copytree(ROOT / folder, src / folder, ignore=shutil.ignore_patterns("__pycache__", "*.pyc"))
    dist = tmp / "dist"
    _run([sys.executable, "-m", "pip", "wheel", "--quiet", "--no-deps", "--no-build-isolation",
          "-w", str(dist), str(src)])
    wheel = next(dist.glob("windsheet-*.whl"))
    env = tmp / "env"
    _run([sys.executable, "-m", "venv", "--without-pip", str(env)])
    py = env / "bin" / "python"
    _run([sys.executable, "-m", "pip", "--python", str(py), "install", "--quiet", "--no-deps", str(wheel)])
    # Dependencies from this environment, after the fresh one's own site-packages.
    purelib = Path(_run([str(py), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"]).stdout.strip())
    deps = [p for p in site.getsitepackages() + [sysconfig.get_paths()["purelib"]] if Path(p).is_dir()]
    (purelib / "windsheet_test_deps.pth").write_text("\n".join(dict.fromkeys(deps)) + "\n", encoding="utf-8")
    return {"wheel": wheel, "env": env, "py": py, "work": tmp}


def test_wheel_holds_the_templates_and_tables(installed):
    names = set(zipfile.ZipFile(installed["wheel"]).namelist())
    for t in (ROOT / "templates").iterdir():
        if t.suffix in (".j2", ".css"):
            assert f"windsheet/templates/{t.name}" in names, t.name
    assert "windsheet/physics/data/iec60317_0_1_copper.csv" in names
    # Every module of every layer: a package left out of pyproject's list would import from nowhere.
    for module in (ROOT / "windsheet").rglob("*.py"):
        assert module.relative_to(ROOT).as_posix() in names, module


def test_installed_package_is_the_wheel_not_the_source_tree(installed):
    out = _run([str(installed["py"]), "-c", "import windsheet, windsheet.sheets.render as r; "
                "print(windsheet.__file__); print(r.TEMPLATES_DIR)"], cwd=installed["work"]).stdout.split("\n")
    assert str(installed["env"]) in out[0] and str(ROOT) not in out[0], out
    assert str(installed["env"]) in out[1] and out[1].endswith("templates"), out


def test_installed_wheel_renders_and_signs_off(installed):
    work, exe = installed["work"], installed["env"] / "bin" / "windsheet"
    env = _clean_env()
    reg = str(work / "reg.db")
    order = str(SAMPLES / "hl-0412-bifilar-aiding.yaml")
    _run([str(exe), "traveller", order, "-o", str(work / "t.pdf"), "--register", reg], cwd=work, env=env)
    assert (work / "t.pdf").read_bytes()[:5] == b"%PDF-"
    _run([str(exe), "traveller", order, "-o", str(work / "t.html"), "--html", "--register", reg], cwd=work, env=env)
    html = (work / "t.html").read_text(encoding="utf-8")
    assert "HL-0412" in html and "QC record" in html
    res = subprocess.run([str(exe), "signoff", order, str(SAMPLES / "HL-0412.measured.yaml"), "--register", reg,
                          "-o", str(work / "s.pdf")], capture_output=True, text=True, cwd=work, env=env, timeout=300)
    # Exit 0 (all pass) or 1 (a unit short of a pass) are verdicts; 2 or a crash would be a packaging fault.
    assert res.returncode in (0, 1) and "Traceback" not in res.stderr, res.stderr
    assert (work / "s.pdf").read_bytes()[:5] == b"%PDF-"
