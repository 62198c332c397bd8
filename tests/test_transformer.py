"""Transformer orders: the order language, the sized design against published references, the JSON.

References: the turns ratio exactly (Faraday's law, one flux through both windings); magnetising
inductance A_L N² (core makers' definition, common practice); leakage against the concentric
closed form (checked itself against a filament sum in tests/test_transformer_physics.py);
clearance and creepage against IEC 60664-1 Table F.2 and F.4 rows (sources in
windsheet/physics/data/iec60664_1_*.csv).
"""

import copy
import json
import math
from functools import lru_cache

import jsonschema
import pytest
import yaml
from typer.testing import CliRunner

from windsheet.cli.app import app
from windsheet.common.errors import InputError
from windsheet.design.schema import committed_schema_text, schema_text
from windsheet.design.transformer_build import build_transformer
from windsheet.order.reader import parse_any_order
from windsheet.physics import transformer as tf

from conftest import SAMPLES

runner = CliRunner()
ISOLATION = SAMPLES / "hl-0431-isolation-transformer.yaml"
SENSE = SAMPLES / "hl-0434-current-sense-toroid.yaml"
CONTROL = SAMPLES / "hl-0437-tapped-control-transformer.yaml"
TRANSFORMERS = (ISOLATION, SENSE, CONTROL)


def _doc(path):
    return yaml.safe_load(path.read_text())


def _size(doc):
    return build_transformer(parse_any_order(yaml.safe_dump(doc, sort_keys=False).encode(), "t.yaml"))


@lru_cache(maxsize=None)
def sample(path):
    return build_transformer(parse_any_order(path.read_bytes(), str(path)))


# --- the three samples --------------------------------------------------------------------

@pytest.mark.parametrize("path", TRANSFORMERS, ids=lambda p: p.stem)
def test_samples_size_and_pass(path):
    d = sample(path)
    assert d.state.state == "ok", d.state.reasons
    assert all(b.verdict == "pass" for b in d.barriers)


@pytest.mark.parametrize("path", TRANSFORMERS, ids=lambda p: p.stem)
def test_size_json_validates_against_the_committed_transformer_schema(path):
    res = runner.invoke(app, ["size", str(path), "--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.stdout)
    assert out["schema"] == "windsheet.transformer/1"
    # jsonschema, the reference validator for JSON Schema draft 2020-12.
    jsonschema.Draft202012Validator(json.loads(committed_schema_text("transformer"))).validate(out)


def test_committed_transformer_schema_is_the_models():
    assert committed_schema_text("transformer") == schema_text("transformer")
    res = runner.invoke(app, ["schema", "transformer"])
    assert res.exit_code == 0 and res.output == committed_schema_text("transformer")


# --- physics against references -------------------------------------------------------------

@pytest.mark.parametrize("path", TRANSFORMERS, ids=lambda p: p.stem)
def test_turns_ratio_exactly(path):
    d = sample(path)
    first = d.windings[0]
    for w in d.windings:
        # Faraday's law with one flux: V2 = V1 N2 / N1.
        assert w.open_circuit_voltage_V == pytest.approx(first.duty.voltage_V * w.turns / first.turns, rel=1e-15)
        assert w.turns_ratio == pytest.approx(w.turns / first.turns, rel=1e-15)


def test_auto_turns_round_up_from_the_volts_per_turn():
    d = sample(ISOLATION)
    # 12.6 V at 230 V / 1280 turns: 70.12 turns, rounded up to 71 (never short of the voltage).
    assert [w.turns for w in d.windings] == [1280, math.ceil(1280 * 12.6 / 230), math.ceil(1280 * 12.6 / 230)]


@pytest.mark.parametrize("path", TRANSFORMERS, ids=lambda p: p.stem)
def test_magnetising_inductance_is_al_n_squared(path):
    d = sample(path)
    al = _doc(path)["form"]["al"]
    al_H = float(al.split()[0]) * 1e-6  # every sample writes its AL in uH
    for w in d.windings:
        # A_L N², the core maker's inductance factor (common practice).
        assert w.inductance_H == pytest.approx(al_H * w.turns ** 2, rel=1e-12)


def test_leakage_of_two_windings_is_the_concentric_closed_form():
    d = sample(CONTROL)
    pri, bar, sec = d.build
    assert (pri.kind, bar.kind, sec.kind) == ("section", "barrier", "section")
    first = d.windings[0]
    mlt = sum(_section_mlt(s) for s in d.sections) / 2
    height = max(s.fit.traverse_used_m for s in d.sections)
    # µ0 N² MLT (a/3 + g + b/3) / h (MMF method, McLyman ch. 17).
    expected = tf.leakage_inductance_concentric(first.turns, mlt, height, pri.build_m, sec.build_m, bar.build_m)
    assert d.leakage[0].inductance_H == pytest.approx(expected, rel=1e-12)


def _section_mlt(s):
    turns = sum(x.turns for x in s.strands)
    return (sum(x.wire_length_m for x in s.strands) - 2 * len(s.strands) * s.winding.lead_length_m) / turns


def test_interleaving_lowers_the_leakage():
    doc = _doc(ISOLATION)
    doc["windings"] = doc["windings"][:2]
    doc["windings"][0]["turns"] = 1280
    doc["barriers"] = [{"between": ["primary", "sec1"], "class": "basic",
                        "tape": {"thickness": "0.05 mm", "rating": "3 kV", "wraps": 2}}]
    plain = _size({**doc, "build": ["primary", "sec1"]})
    split = dict(doc)
    split["build"] = ["primary/2", "sec1", "primary/2"]
    split["barriers"] = []
    inter = _size(split)
    assert [b.label for b in inter.build if b.kind == "section"] == ["primary 1/2", "sec1", "primary 2/2"]
    # MMF method: halving the peak ampere-turns roughly quarters the stored energy.
    assert inter.leakage[0].inductance_H < 0.5 * plain.leakage[0].inductance_H
    # Both halves in series: the winding's resistance is theirs added.
    halves = [s for s, b in zip(inter.sections, [b for b in inter.build if b.kind == "section"])
              if b.winding == "primary"]
    assert inter.winding("primary").resistance_20C_ohm == pytest.approx(
        sum(h.terminal.resistance_ohm for h in halves), rel=1e-12)


# IEC 60664-1 Table F.4 (seen): 250 V row, pollution degree 2, material group III: 2.5 mm; reinforced twice.
# Table F.2 (seen, pollution degree 2): 4 kV impulse 3.0 mm; 230 V mains, category II, is 2.5 kV (Table F.1),
# reinforced one step higher: 4 kV.
def test_reinforced_barrier_distances_are_the_table_rows():
    bar = sample(ISOLATION).barriers[0]
    assert bar.insulation == "reinforced"
    assert bar.working_voltage_V == pytest.approx(230.0 + 12.6)
    assert bar.impulse_voltage_V == 2500.0
    assert bar.creepage_required_m == pytest.approx(2 * 2.5e-3)
    assert bar.clearance_required_m == pytest.approx(3.0e-3)


def test_a_margin_narrower_than_the_tables_creepage_fails_and_names_the_margin():
    doc = _doc(ISOLATION)
    for w in doc["windings"]:
        w["margin_tape"] = "2 mm"
    d = _size(doc)
    bar = d.barriers[0]
    # 2 + 2 mm of margin against the 5.0 mm reinforced creepage (Table F.4, twice the 2.5 mm row).
    assert bar.verdict == "fail" and any("margin" in r and "4.00 mm" in r and "5.00 mm" in r for r in bar.reasons)
    assert d.state.state == "failing"
    path = SAMPLES.parent / "narrow.yaml"
    try:
        path.write_text(yaml.safe_dump(doc))
        res = runner.invoke(app, ["size", str(path)])
    finally:
        path.unlink()
    assert res.exit_code == 1 and "widen the margin tapes" in res.stdout


def test_tape_layers_against_the_reinforced_test_voltage():
    doc = _doc(ISOLATION)
    doc["barriers"][0]["tape"]["wraps"] = 2
    doc["barriers"][0]["tape"]["rating"] = "2 kV"
    bar = _size(doc).barriers[0]
    # Two wraps of 2 kV tape against a 2.97 kV reinforced test: neither passes alone (common practice, memory).
    assert bar.verdict == "fail" and any("wrap(s)" in r for r in bar.reasons)
    doc["windings"][1]["triple_insulated"] = True
    # Triple-insulated wire on one side makes the barrier on its own.
    assert not any("wrap(s)" in r for r in _size(doc).barriers[0].reasons)


def test_flux_density_from_the_volts_per_turn():
    d = sample(ISOLATION)
    # V = 4.44 f N A B: 230 V, 50 Hz, 1280 turns, 25 mm x 30 mm x 0.95 of iron.
    area = 25e-3 * 30e-3 * 0.95
    assert d.core.flux_density_T == pytest.approx(230.0 / (4.44288 * 50.0 * 1280 * area), rel=1e-4)
    doc = _doc(ISOLATION)
    doc["core"]["max_flux_density"] = "1.0 T"
    worse = _size(doc)
    assert worse.core.verdict == "fail" and worse.state.state == "failing"


# --- the order language -------------------------------------------------------------------

@pytest.mark.parametrize("change, path, words", [
    (lambda d: d["windings"][1].update(name="primary"), "windings[1].name", "names two windings"),
    (lambda d: d.update(build=["primary", "sec9", "sec2"]), "build[1]", "name"),
    (lambda d: d.update(build=["primary/2", "sec1", "sec2"]), "build", "primary"),
    (lambda d: d["windings"][0].update(taps=[5000]), "windings[0].taps[0]", "beyond"),
    (lambda d: d["barriers"][0].update(between=["primary", "sec2"]), "barriers[0].between", "next to each other"),
    (lambda d: d["windings"][1]["wire"].update(size="0.33 mm"), "windings[1].wire.size", ""),
    (lambda d: d["barriers"][0].update({"class": "double"}), "barriers[0].class", ""),
    (lambda d: d.update(wire={"size": "0.5 mm"}), "wire", "under windings"),
    (lambda d: d["windings"][0].update(turns="auto"), "windings[0].turns", "volts per turn"),
])
def test_bad_transformer_orders_are_refused_at_their_field(change, path, words):
    doc = _doc(ISOLATION)
    change(doc)
    with pytest.raises(InputError) as exc:
        _size(doc)
    assert exc.value.path == path and words in exc.value.message


def test_a_winding_that_does_not_fit_is_refused_at_its_winding():
    doc = _doc(ISOLATION)
    doc["windings"][2]["turns"] = 3000
    with pytest.raises(InputError) as exc:
        _size(doc)
    assert exc.value.path.startswith("windings[2]") and "sec2" in exc.value.message


def test_refusal_through_the_command_line_is_one_line(tmp_path):
    doc = _doc(ISOLATION)
    doc["windings"][1]["wire"]["size"] = "0.33 mm"
    path = tmp_path / "bad.yaml"
    path.write_text(yaml.safe_dump(doc))
    res = runner.invoke(app, ["size", str(path)])
    assert res.exit_code == 2
    assert res.stderr.count("\n") == 1 and res.stderr.startswith("windsheet: windings[1].wire.size:")


# --- bill of materials and pick list --------------------------------------------------------

def test_bill_of_materials_draws_every_winding_and_the_barrier_tape():
    from windsheet.records.materials import bill_of_materials
    from windsheet.sheets.transformer_sheet import pick_list

    d = sample(ISOLATION)
    q = d.quantity
    (job,) = bill_of_materials([d])["jobs"]
    assert [w["winding"] for w in job["wires"]] == [w.name for w in d.windings]
    for row, w in zip(job["wires"], d.windings):
        assert row["length_m"] == pytest.approx(q * w.wire_length_with_scrap_m, rel=1e-12)
        assert row["mass_kg"] == pytest.approx(q * w.mass_kg, rel=1e-12)
    # Barrier tape: each wrap one circumference at its height on the bobbin, plus 10 % overlap:
    # (MLT + 2π (h_below + k t)) × 1.1, summed over the wraps, times the quantity.
    bar = next(b for b in d.barriers if b.tape_wraps)
    layer = next(b for b in d.build if b.kind == "barrier" and b.label.endswith(f"{bar.between[0]}–{bar.between[1]}"))
    mlt = d.form.mean_turn_length_m
    want = q * sum((mlt + 2 * math.pi * (layer.build_below_m + k * bar.tape_thickness_m)) * 1.1
                   for k in range(bar.tape_wraps))
    tape = next(t for t in job["tapes"] if t["where"] == f"barrier {bar.between[0]}–{bar.between[1]}")
    assert tape["wraps"] == q * bar.tape_wraps and tape["length_m"] == pytest.approx(want, rel=1e-12)
    # Margin tape: two strips per wound section (common practice), one spec here.
    assert sum(m["strips"] for m in job["margin_tape"]) == 2 * q * sum(b.kind == "section" for b in d.build)
    # The pick list reads the same rows: the sheet and the bill agree.
    picks = {p["item"]: p for p in pick_list(d)}
    assert f"{tape['wraps'] // q} wrap(s) per unit" == picks[f"Barrier tape, {bar.between[0]}–{bar.between[1]}"]["qty"]
    assert picks["Sleeving"]["qty"] == f"{d.connections.sleeving_pieces_per_unit} piece(s) per unit"
