"""Work budgets: orders beyond them are refused up front at the field to change; orders within are sized."""

import copy

import pytest
import yaml

from windsheet.order import limits
from windsheet.common.errors import InputError
from windsheet.physics.inductance import strand_matrix, strand_matrix_bruteforce
from windsheet.physics.layout import cylinder_layout
from windsheet.order.document import parse_order
from windsheet.design.build import build_design

from conftest import SAMPLES


def order(strands, turns, layers, slots, **winding):
    """A cylinder of 0.1 mm wire holding ``slots`` close-wound slots per layer."""
    return {"job": {"number": "HL-0990", "part": "Budget probe", "customer": "Harrowgate test bench",
                    "quantity": 1, "revision": "A"},
            "form": {"kind": "cylinder", "diameter": "40 mm", "traverse": f"{slots * strands * 0.10001:.5f} mm"},
            "wire": {"size": "0.09 mm", "grade": 1, "overall_diameter": "0.1 mm"},
            "winding": {"strands": strands, "turns": turns, "layers": layers, **winding},
            "hookup": "series-aiding" if strands > 1 else "single",
            "duty": {"voltage": "10 V", "frequency": "0 Hz"}}


def run(doc):
    return build_design(parse_order(yaml.safe_dump(doc, allow_unicode=True).encode()))


def refusal(doc):
    with pytest.raises(InputError) as exc:
        run(doc)
    return exc.value


def test_probe_order_of_four_strands_100k_turns_200_layers_is_refused_before_layout(monkeypatch):
    import windsheet.design.sizing as S
    monkeypatch.setattr(S, "place_turns", lambda *a: pytest.fail("laid out an order over budget"))
    err = refusal(order(4, 100_000, 200, 500))
    assert err.path == "winding.turns"
    assert "400000 turns in all" in err.message and f"{limits.TURNS_IN_ALL:,}" in err.message


def test_engine_work_over_budget_is_refused_with_what_to_change():
    # 4 strands x 12,600 turns x 200 layers = 10,080,000 > 10,000,000, 50,400 turns in all.
    err = refusal(order(4, 12_600, 200, 63))
    assert err.path == "winding.turns"
    assert "10,080,000 of work" in err.message and "fewer layers" in err.message


def test_at_the_budget_is_sized_and_one_over_is_refused(monkeypatch):
    monkeypatch.setattr(limits, "ENGINE_WORK", 2 * 30 * 3)
    assert run(order(2, 30, 3, 10)).winding.turns_per_strand == 30
    monkeypatch.setattr(limits, "ENGINE_WORK", 2 * 30 * 3 - 1)
    assert "of work" in refusal(order(2, 30, 3, 10)).message


def test_the_probes_800_turn_200_layer_order_is_sized():
    # 4 strands x 200 turns x 200 layers: 160,000 of work, well inside the budget.
    p = run(order(4, 200, 200, 1))
    assert p.layers == 200
    assert p.terminal.inductance_H > 0


def test_engine_agrees_with_the_double_sum_on_a_200_layer_coil():
    lay = cylinder_layout(0.040, 4 * 0.10001e-3, 0.09e-3, 0.1e-3, 4, 200, layers=200)
    # The Maxwell double sum over all 800 turns (Grover 1946) is the definition the engine regroups.
    assert strand_matrix(lay) == pytest.approx(strand_matrix_bruteforce(lay), rel=1e-9)


def test_target_needing_more_than_the_budget_is_refused_at_the_target(monkeypatch):
    # 20 mH needs about 913 turns in 11 layers (~10,000 of work); 200 µH about 99 turns in 2 (~200).
    monkeypatch.setattr(limits, "ENGINE_WORK", 2_000)
    doc = yaml.safe_load((SAMPLES / "hl-0424-target.yaml").read_text())
    doc["winding"] = {"strands": 1, "layers": "auto", "target_inductance": "20 mH"}
    doc["duty"]["frequency"] = "1 kHz"
    err = refusal(doc)
    assert err.path == "winding.target_inductance"
    assert "of work" in err.message
    # A target within the budget on the same form is still met.
    ok = copy.deepcopy(doc)
    ok["winding"]["target_inductance"] = "200 uH"
    assert run(ok).winding.target.error == pytest.approx(0, abs=0.05)


def test_a_traveller_beyond_the_sheet_budget_is_refused_and_nothing_is_written(tmp_path):
    from typer.testing import CliRunner

    from windsheet.cli.app import app

    doc = yaml.safe_load((SAMPLES / "hl-0410-single.yaml").read_text(encoding="utf-8"))
    doc["job"].pop("units", None)
    doc["job"]["quantity"] = limits.SHEET_UNITS + 1
    f = tmp_path / "big.yaml"
    f.write_text(yaml.safe_dump(doc), encoding="utf-8")
    reg, out = tmp_path / "r.db", tmp_path / "big.pdf"
    res = CliRunner().invoke(app, ["traveller", str(f), "-o", str(out), "--register", str(reg)])
    assert res.exit_code == 2 and res.stderr.startswith("windsheet: job.quantity: a traveller for 101 units")
    assert not out.exists() and not reg.exists()
    # The order itself still sizes: the budget is the sheet's, not the order's.
    assert CliRunner().invoke(app, ["size", str(f)]).exit_code == 0


def test_a_sign_off_sheet_beyond_the_sheet_budget_is_refused_before_anything_is_recorded(tmp_path):
    from typer.testing import CliRunner

    from windsheet.cli.app import app

    order = SAMPLES / "hl-0412-bifilar-aiding.yaml"
    reg = tmp_path / "r.db"
    assert CliRunner().invoke(app, ["register", "--issue", str(order), "--register", str(reg)]).exit_code == 0
    rows = "".join(f"  - serial: HL-0412-{k:03d}\n    terminals: {{inductance: 400 uH}}\n"
                   for k in range(limits.SHEET_UNITS + 1))
    m = tmp_path / "m.yaml"
    m.write_text(f"job: HL-0412\nrevision: A\ninspector: QC\nunits:\n{rows}", encoding="utf-8")
    before = reg.read_bytes()
    res = CliRunner().invoke(app, ["signoff", str(order), str(m), "--register", str(reg), "-o", str(tmp_path / "s.pdf")])
    assert res.exit_code == 2 and res.stderr.startswith("windsheet: units: a sign-off sheet for 101 units"), res.output
    assert reg.read_bytes() == before and not (tmp_path / "s.pdf").exists()
