import os
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"


#: Test modules that read the same laid-out sample sheets (sheet_cache.py): one worker runs them all,
#: so each sheet is laid out once in the run, not once per module.
SHEET_MODULES = ("tests/test_cli_flow.py", "tests/test_page_faults.py", "tests/test_traveller.py")


def pytest_xdist_make_scheduler(config, log):
    if config.getoption("dist") != "loadscope":
        return None
    from xdist.scheduler import LoadScopeScheduling

    class SheetsTogether(LoadScopeScheduling):
        def _split_scope(self, nodeid):
            if nodeid.startswith(SHEET_MODULES):
                return "sample sheets"
            return super()._split_scope(nodeid)

    return SheetsTogether(config, log)


@pytest.fixture(autouse=True)
def _register_in_tmp(tmp_path, monkeypatch):
    # No test may touch a register in the working tree.
    monkeypatch.setenv("WINDSHEET_REGISTER", str(tmp_path / "register.db"))
    yield


def _orders():
    return sorted(p for p in SAMPLES.glob("*.yaml") if not p.name.endswith(".measured.yaml"))


def _is_transformer(path) -> bool:
    # A transformer order lists its windings at the top level.
    return any(line.startswith("windings:") for line in path.read_text().splitlines())


def sample_orders():
    """The sample coil orders."""
    return [p for p in _orders() if not _is_transformer(p)]


def transformer_orders():
    """The sample transformer orders."""
    return [p for p in _orders() if _is_transformer(p)]


def redesign(design, **changes):
    """``design`` with some of its sized values changed (nested dicts merge), its derived facts made again.

    For tests that need a design in a state no sample order gives (a failing check,
    a hostile customer name); the model itself is immutable.
    """
    from windsheet.design.derived import complete
    from windsheet.design.model import DesignCore

    def merge(base, new):
        if isinstance(base, dict) and isinstance(new, dict):
            return {**base, **{k: merge(base.get(k), v) for k, v in new.items()}}
        return new

    data = design.model_dump(include=set(DesignCore.model_fields))
    for key, value in changes.items():
        data[key] = merge(data.get(key), value)
    return complete(DesignCore.model_validate(data))


_SAMPLE_DESIGNS: dict = {}


def sample_design(stem="hl-0412-bifilar-aiding"):
    """A sample order's design, sized once per test process (without remedies)."""
    if stem not in _SAMPLE_DESIGNS:
        from windsheet.design.build import build_design
        from windsheet.order.document import load_order

        _SAMPLE_DESIGNS[stem] = build_design(load_order(SAMPLES / f"{stem}.yaml"), remedies=False)
    return _SAMPLE_DESIGNS[stem]


def design_for_job(number, revision="A", units=(), order_hash=None, **job):
    """The bifilar sample's design issued as another job: for register tests that need many jobs."""
    base = sample_design()
    new_job = base.job.model_copy(update={"number": number, "revision": revision, "units": list(units), **job})
    return base.model_copy(update={"job": new_job, "order_hash": order_hash})


#: ``make test-long`` (WINDSHEET_LONG=1) runs ten times the property tests' examples.
LONG = bool(os.environ.get("WINDSHEET_LONG"))


def examples(n: int) -> int:
    """A property test's example count: ``n`` on every change, ten times that in the nightly run."""
    return n * 10 if LONG else n
