"""What each command imports at start-up, read from ``sys.modules`` in a fresh process (never a timing).

Start-up time is measured in ``make bench`` (benchmarks/bench_startup.py); here
only which heavy libraries a command loads is checked.
"""

import json
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "samples" / "hl-0412-bifilar-aiding.yaml"

# Runs the CLI as the console entry does, and at exit (the entry leaves through the exit handlers)
# reports which of the watched modules it loaded.
CHILD = """
import atexit, json, sys
sys.argv = ["windsheet", *sys.argv[1:]]
from windsheet.cli.app import main


def report():
    watched = ["numpy", "pydantic", "scipy", "scipy.spatial", "scipy.constants", "scipy.special", "yaml",
               "typer._adapters", "windsheet.order.document", "windsheet.qc.measured", "windsheet.qc.signoff",
               "windsheet.order.transformer", "windsheet.design.transformer_model", "importlib.metadata", "email",
               "rich"]
    # The design's models whose pydantic schema (validator and serializer) was built.
    model = sys.modules.get("windsheet.design.model")
    built = sorted(n for n, c in vars(model).items() if isinstance(c, type) and c.__module__ == model.__name__
                   and getattr(c, "__pydantic_complete__", False)) if model else []
    print(json.dumps({"loaded": [m for m in watched if m in sys.modules], "built": built}), file=sys.stderr)


atexit.register(report)
main()
"""


def run(*args, built=False):
    proc = subprocess.run([sys.executable, "-c", CHILD, *map(str, args)], capture_output=True,
                          text=True, cwd=ROOT, timeout=120)
    report = json.loads(proc.stderr.strip().splitlines()[-1])
    if built:
        return proc.returncode, set(report["loaded"]), proc.stdout, report["built"]
    return proc.returncode, set(report["loaded"]), proc.stdout


@pytest.fixture(scope="module")
def register(tmp_path_factory):
    db = tmp_path_factory.mktemp("reg") / "r.db"
    code, _, _ = run("register", "--issue", SAMPLE, "--register", db)
    assert code in (0, None)
    return db


def check_no_heavy_imports(loaded):
    # typer is held below 0.29 (pyproject), whose parameter parsing would load pydantic.
    assert not loaded & {"numpy", "pydantic", "scipy", "windsheet.order.document", "windsheet.qc.measured",
                         "windsheet.qc.signoff"}, loaded


@pytest.mark.parametrize("args, shows", [((), "HL-0412"), (("HL-0412",), "issued")])
def test_register_listing_loads_neither_numpy_nor_pydantic(register, args, shows):
    code, loaded, out = run("register", *args, "--register", register)
    assert code in (0, None)
    assert shows in out  # the listing really ran
    check_no_heavy_imports(loaded)


def test_size_does_not_load_scipy():
    code, loaded, out = run("size", SAMPLE)
    assert code in (0, None)
    assert "HL-0412" in out
    # numpy, pydantic and yaml do the work; scipy is a test reference only.
    assert {"numpy", "pydantic", "yaml"} <= loaded
    assert not any(m.startswith("scipy") for m in loaded), loaded
    # A coil order never builds the transformer's models.
    assert not loaded & {"windsheet.order.transformer", "windsheet.design.transformer_model"}, loaded


def test_a_transformer_order_loads_its_own_models():
    code, loaded, out = run("size", ROOT / "samples" / "hl-0431-isolation-transformer.yaml")
    assert code in (0, None) and "HL-0431" in out
    assert {"windsheet.order.transformer", "windsheet.design.transformer_model"} <= loaded


def test_size_builds_no_design_schema_and_reads_no_package_metadata():
    code, loaded, out, built = run("size", SAMPLE, built=True)
    assert code in (0, None) and "HL-0412" in out and "Terminals" in out  # the summary really printed
    # The design is put together from computed values (design/construct.py): no model's schema is built.
    assert built == [], built
    # pydantic's plugin loader stands aside (cli/app.py), so no distribution metadata is read.
    assert not loaded & {"importlib.metadata", "email"}, loaded
    # typer's help formatter is for --help only.
    assert "rich" not in loaded


def test_size_json_builds_the_schema_it_dumps_with():
    # The JSON needs pydantic's serializer, so the Design's schema is built there, and only there.
    code, _, out, built = run("size", SAMPLE, "--json", built=True)
    assert code in (0, None) and json.loads(out)["job"]["number"] == "HL-0412"
    assert "Design" in built


def test_a_run_converts_only_its_own_commands():
    # main() hands typer only the named command's module (typer converts every registered
    # signature on each run); help, --version and a misspelt command get the whole app.
    from windsheet.cli.app import COMMAND_MODULES, app, app_for

    def names(a):
        return sorted(i.name or i.callback.__name__.replace("_", "-") for i in a.registered_commands)

    assert sorted(COMMAND_MODULES) == names(app)
    for name, module in COMMAND_MODULES.items():
        one = app_for([name, "--help"])
        assert name in names(one)
        assert names(one) == sorted(n for n, m in COMMAND_MODULES.items() if m is module)
    for argv in ([], ["--help"], ["--version"], ["sise"]):
        assert app_for(argv) is app


# The console entry with an exit handler and an object whose teardown would show on stderr.
LEAVE = """
import atexit, sys
marker = sys.argv[1]
atexit.register(lambda: open(marker, "w").write("ran"))
class Loud:
    def __del__(self):
        sys.stderr.write("torn down\\n")
kept = Loud()
sys.argv = ["windsheet", *sys.argv[2:]]
from windsheet.cli.app import main
main()
"""


@pytest.mark.parametrize("args, status", [(("wires",), 0), (("size", "missing.yaml"), 2),
                                          (("size", str(SAMPLE), "--json"), 0)])
def test_a_command_leaves_without_teardown_keeping_its_status_output_and_exit_handlers(tmp_path, args, status):
    # cli/app.leave: os._exit after the exit handlers and a flush; the subprocess is the point.
    from typer.testing import CliRunner

    from windsheet.cli.app import app

    marker = tmp_path / "atexit"
    proc = subprocess.run([sys.executable, "-c", LEAVE, str(marker), *args], capture_output=True, text=True,
                          cwd=ROOT, timeout=120)
    assert proc.returncode == status, proc.stderr
    assert marker.read_text() == "ran"
    assert "torn down" not in proc.stderr  # the interpreter was not torn down
    same = CliRunner().invoke(app, list(args))
    assert (proc.stdout, proc.stderr) == (same.stdout, same.stderr)  # every line, through real pipes


@pytest.mark.skipif(not Path("/dev/full").exists(), reason="needs Linux's /dev/full")
def test_output_that_cannot_be_written_is_one_line_not_a_traceback():
    # A full disk behind standard output (Linux's /dev/full answers every write with ENOSPC).
    with open("/dev/full", "w") as full:
        proc = subprocess.run([sys.executable, "-m", "windsheet.cli", "wires"], stdout=full, stderr=subprocess.PIPE,
                              text=True, cwd=ROOT, timeout=120)
    assert proc.returncode == 1
    assert proc.stderr == "windsheet: cannot write the output: No space left on device\n"
