import os
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"


@pytest.fixture(autouse=True)
def _register_in_tmp(tmp_path, monkeypatch):
    # No test may touch a register in the working tree.
    monkeypatch.setenv("WINDSHEET_REGISTER", str(tmp_path / "register.db"))
    yield


def sample_orders():
    return sorted(p for p in SAMPLES.glob("*.yaml") if not p.name.endswith(".measured.yaml"))
