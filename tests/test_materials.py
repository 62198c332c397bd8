"""Bill of materials: totals against the jobs' own predictions, reels, and the three file formats."""

import csv
import io
import json
import math
from collections import defaultdict
from pathlib import Path

import pypdf
import pytest
from typer.testing import CliRunner

from windsheet.cli.app import app
from windsheet.records.materials import bill_csv, bill_of_materials, load_reels, wire_group
from windsheet.order.document import load_order
from windsheet.design.build import build_design

ROOT = Path(__file__).resolve().parents[1]
ORDERS = [ROOT / "samples" / n for n in ("hl-0410-single.yaml", "hl-0412-bifilar-aiding.yaml",
                                         "hl-0418-multilayer.yaml", "hl-0415-noninductive.yaml")]
runner = CliRunner()


@pytest.fixture(scope="module")
def predictions():
    return [build_design(load_order(f), remedies=False) for f in ORDERS]


def test_totals_equal_the_sum_over_jobs_of_quantity_strands_and_wire_length(predictions):
    bill = bill_of_materials(predictions)
    # Independent sum from the predictions: quantity × Σ strands wire length × (1 + scrap allowance).
    want_len, want_mass = defaultdict(float), defaultdict(float)
    for p in predictions:
        q = p.job.quantity
        scrap = p.winding.scrap_allowance
        d = p.wire.copper_diameter_m
        for s in p.strands:
            length = q * s.wire_length_m * (1 + scrap)
            want_len[wire_group(p.wire)] += length
            # IEC 60028: annealed copper 8.89 g/cm³ (all four samples are copper).
            want_mass[wire_group(p.wire)] += length * math.pi * d * d / 4 * 8890.0
    got = {w["group"]: w for w in bill["total"]["wire"]}
    assert set(got) == set(want_len)
    for g in want_len:
        assert got[g]["length_m"] == pytest.approx(want_len[g], rel=1e-12)
        assert got[g]["mass_kg"] == pytest.approx(want_mass[g], rel=1e-9)
    # Two samples share 0.50 mm grade 2 class 155 wire: grouped into one stock line.
    assert len(got) < len(predictions)
    # Forms and labels: one per unit ordered.
    assert sum(f["count"] for f in bill["total"]["forms"]) == sum(p.job.quantity for p in predictions)
    assert bill["total"]["labels"] == sum(p.job.quantity for p in predictions)


def test_tape_and_sleeving_follow_the_winding(predictions):
    bill = bill_of_materials(predictions)
    multilayer = next(j for j in bill["jobs"] if j["job"] == "HL-0418")
    p = next(p for p in predictions if p.job.number == "HL-0418")
    L, q = p.layers, p.job.quantity
    (tape,) = multilayer["tapes"]
    assert tape["wraps"] == q * (L - 1)
    # Each wrap is π × (form diameter + 2 × its height) plus 10 % overlap; heights k·build/L.
    d, b = p.form.diameter_m, p.fit.build_m
    want = q * sum(math.pi * (d + 2 * k * b / L) * 1.1 for k in range(1, L))
    assert tape["length_m"] == pytest.approx(want, rel=1e-12)
    single = next(j for j in bill["jobs"] if j["job"] == "HL-0410")
    assert single["tapes"] == []
    # Sleeving: terminals + joints per unit (common practice), each a lead length.
    bif = next(j for j in bill["jobs"] if j["job"] == "HL-0412")
    assert bif["sleeving"]["pieces"] == 4 * 3


def test_reels_are_whole_reels_of_the_listed_size(predictions, tmp_path):
    reels = tmp_path / "reels.csv"
    # Invented shop reel list: 0.25 kg reels of 0.5 mm grade 2.
    reels.write_text("size_mm,grade,reel_kg,source\n0.5,2,0.25,stores list 2026\n")
    bill = bill_of_materials(predictions, load_reels(reels))
    for w in bill["total"]["wire"]:
        if w["group"][1] == 0.0005 and w["group"][2] == 2:
            assert w["reels"] == math.ceil(w["mass_kg"] / 0.25) and w["reels"] >= 1
        else:
            assert w["reels"] is None


def test_cli_writes_csv_json_and_pdf(tmp_path, predictions):
    args = ["materials", *map(str, ORDERS)]
    for ext in ("csv", "json", "pdf"):
        r = runner.invoke(app, args + ["-o", str(tmp_path / f"bom.{ext}")])
        assert r.exit_code == 0, r.output
    rows = list(csv.DictReader(io.StringIO((tmp_path / "bom.csv").read_text())))
    total_m = sum(float(r["quantity"]) for r in rows if r["scope"] == "TOTAL" and r["category"] == "wire"
                  and r["unit"] == "m")
    # The CSV's wire total (rounded to the millimetre) against the predictions' own sum.
    want = sum(p.job.quantity * s.wire_length_with_scrap_m for p in predictions for s in p.strands)
    assert total_m == pytest.approx(want, abs=5e-3)
    doc = json.loads((tmp_path / "bom.json").read_text())
    assert doc["schema"] == "windsheet.materials/2" and len(doc["jobs"]) == 4
    text = "".join(pg.extract_text() for pg in pypdf.PdfReader(tmp_path / "bom.pdf").pages)
    assert "To pull from stores" in text and "HL-0418" in text
    assert bill_csv(bill_of_materials(predictions)) == (tmp_path / "bom.csv").read_text()


def test_bad_inputs_are_one_line_refusals(tmp_path):
    r = runner.invoke(app, ["materials", str(ORDERS[0]), "-o", str(tmp_path / "bom.txt")])
    assert r.exit_code == 2 and "expected a file ending in .csv, .json or .pdf" in r.output
    r = runner.invoke(app, ["materials", str(ORDERS[0]), str(ORDERS[0])])
    assert r.exit_code == 2 and "give each job once" in r.output
    bad = tmp_path / "reels.csv"
    bad.write_text("size_mm,reel_kg\n0.5,lots\n")
    r = runner.invoke(app, ["materials", str(ORDERS[0]), "--reels", str(bad)])
    assert r.exit_code == 2 and "line 2" in r.output
