"""Shared by the bench page's route and browser tests."""

from __future__ import annotations

from pathlib import Path

import yaml
from typer.testing import CliRunner

from windsheet.cli.app import app

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"
ORDER = SAMPLES / "hl-0412-bifilar-aiding.yaml"


def issue_with_traveller(folder: Path, order: Path = ORDER) -> Path:
    """A register with ``order`` issued by ``windsheet traveller`` (HTML, to keep it quick)."""
    reg = folder / "register.db"
    res = CliRunner().invoke(app, ["traveller", str(order), "-o", str(folder / "t.html"),
                                   "--register", str(reg)])
    assert res.exit_code == 0, res.output
    return reg


def fields_of_file(path: Path) -> tuple[dict, list[tuple[str, dict]]]:
    """A measured-values file as the bench form's fields: job-wide ones, and each unit's.

    Written here, apart from the bench's own code, from the file format's description
    (measured.py's docstring), so the two can be compared.
    """
    doc = yaml.safe_load(path.read_text())
    def mapping(v):
        return "; ".join(f"{k}: {x}" for k, x in v.items()) if isinstance(v, dict) else str(v)
    job = {k: mapping(doc[k]) for k in ("ambient", "test_frequency", "instruments", "wire_lot", "core_lot",
                                        "instrument_ids") if k in doc}
    units = []
    for u in doc["units"]:
        f = {}
        for sid, s in (u.get("strands") or {}).items():
            for what, v in s.items():
                if isinstance(v, dict):
                    v = f"{v['resonant_frequency']} / {v['capacitor']}"
                f[f"strands.{sid}.{what}"] = str(v)
        for pair, p in (u.get("before_joint") or {}).items():
            for what, v in p.items():
                f[f"before_joint.{pair}.{what}"] = str(v)
        for section in ("terminals", "insulation", "hipot"):
            for what, v in (u.get(section) or {}).items():
                f[f"{section}.{what}"] = str(v)
        for pair, state in (u.get("continuity") or {}).items():
            # A two-strand coil has one pair: strand_to_strand is that pair.
            f["continuity.strand_to_strand"] = state
        if u.get("waive"):
            f["waive"] = "; ".join(f"{k}: {v}" for k, v in u["waive"].items())
        if "ambient" in u:
            f["ambient"] = str(u["ambient"])
        for k in ("wire_lot", "core_lot", "instrument_ids"):
            if k in u:
                f[k] = mapping(u[k])
        units.append((u["serial"], f))
    return job, units
