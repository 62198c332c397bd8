"""`windsheet size`: the JSON contract, the readable summary, and one-line errors for bad orders."""

import json

import pytest
import yaml
from typer.testing import CliRunner

from windsheet.cli.app import app

from conftest import SAMPLES, sample_orders

runner = CliRunner()
BIFILAR = SAMPLES / "hl-0412-bifilar-aiding.yaml"


def size_json(path):
    res = runner.invoke(app, ["size", str(path), "--json"])
    assert res.exit_code == 0, res.output
    return json.loads(res.stdout)


@pytest.mark.parametrize("order", sample_orders(), ids=lambda p: p.name)
def test_every_sample_sizes(order):
    p = size_json(order)
    for key in ("strands", "layers", "inductance_matrix_H", "terminal", "current_sheet_inductance_H",
                "worst_adjacent", "insulation"):
        assert key in p
    for s in p["strands"]:
        assert {"id", "turns", "wire_length_m", "resistance_20C_ohm", "inductance_H"} <= set(s)
    assert {"inductance_H", "resistance_ohm", "capacitance_F", "self_resonance_Hz"} <= set(p["terminal"])
    assert p["insulation"]["verdict"] in {"pass", "marginal", "fail"}
    assert p["worst_adjacent"]["voltage_Vpk"] > 0 and p["worst_adjacent"]["where"]


def test_bifilar_sample_values():
    p = size_json(BIFILAR)
    la, lb = p["strands"][0]["inductance_H"], p["strands"][1]["inductance_H"]
    # Common practice: two tightly coupled equal strands in series-aiding give about 4x one strand.
    assert p["terminal"]["inductance_H"] == pytest.approx(4 * la, rel=0.03)
    assert la == pytest.approx(lb, rel=1e-9)
    # Nagaoka current sheet within 1 % of the filament sum for a close-wound single layer (Rosa 1907).
    assert p["current_sheet_inductance_H"] == pytest.approx(la, rel=0.01)
    # Ohm's law: series strands add.
    assert p["terminal"]["resistance_ohm"] == pytest.approx(2 * p["strands"][0]["resistance_20C_ohm"], rel=1e-9)
    # Common practice: series-aiding neighbours sit about half the applied voltage apart (230 V rms).
    assert p["worst_adjacent"]["voltage_Vpk"] == pytest.approx(230 * 2 ** 0.5 / 2, rel=0.02)
    # IEC 60028: R = rho L / A with rho = 1/58 ohm mm^2/m.
    s = p["strands"][0]
    area = 3.141592653589793 * (0.5e-3) ** 2 / 4
    assert s["resistance_20C_ohm"] == pytest.approx(s["wire_length_m"] / 58e6 / area, rel=1e-3)


def test_readable_summary_is_aligned():
    res = runner.invoke(app, ["size", str(BIFILAR)])
    assert res.exit_code == 0
    labelled = [ln for ln in res.stdout.splitlines() if ln and not ln.startswith(" ")]
    starts = {len(ln) - len(ln[ln.index("  "):].lstrip()) for ln in labelled}
    # Every value starts in the same column, after the widest label.
    assert len(starts) == 1
    assert {"Terminals", "Worst adjacent", "Insulation", "Strand A", "Strand B"} <= {
        ln.split("  ")[0] for ln in labelled}


def write_variant(tmp_path, **changes):
    order = yaml.safe_load(BIFILAR.read_text())
    for dotted, value in changes.items():
        node = order
        keys = dotted.split("__")
        for k in keys[:-1]:
            node = node[k]
        if value is DELETE:
            del node[keys[-1]]
        else:
            node[keys[-1]] = value
    f = tmp_path / "order.yaml"
    f.write_text(yaml.safe_dump(order, allow_unicode=True))
    return f


DELETE = object()


@pytest.mark.parametrize("changes, path, words", [
    ({"hookup": "series-sideways"}, "hookup", "unknown hookup"),
    ({"form__diameter": "-50 mm"}, "form.diameter", "positive"),
    ({"form__diameter": "0 mm"}, "form.diameter", "greater than zero"),
    ({"wire__size": "0.50 kg"}, "wire.size", "nominal copper diameter"),
    ({"wire__size": "99 AWG"}, "wire.size", "AWG"),
    ({"winding__turns": 900}, "winding.turns", "does not fit"),
    ({"form__traverse": "50 kg"}, "form.traverse", "expected a length"),
    ({"form__traverse": 80}, "form.traverse", "no unit"),
    ({"form__kind": "sphere"}, "form.kind", "cylinder, toroid or bobbin"),
    ({"winding__strands": 5}, "winding.strands", "less than or equal to 4"),
    ({"winding__colour": "red"}, "winding.colour", "not a known field"),
    ({"duty": DELETE}, "duty", "required"),
    ({"hookup": {"joins": [["A.finish", "C.start"]], "terminals": ["A.start", "B.finish"]}},
     "hookup.joins[0][1]", "does not exist"),
    ({"tolerances__inductance": "ten"}, "tolerances.inductance", "percentage"),
])
def test_bad_orders_exit_2_with_one_line(tmp_path, changes, path, words):
    f = write_variant(tmp_path, **changes)
    before = sorted(p.name for p in tmp_path.iterdir())
    res = runner.invoke(app, ["size", str(f), "--json"])
    assert res.exit_code == 2, res.output
    assert res.stdout == ""
    err = res.stderr.strip()
    assert "\n" not in err and "Traceback" not in err
    assert err.startswith(f"windsheet: {path}:"), err
    assert words in err
    assert sorted(p.name for p in tmp_path.iterdir()) == before


@pytest.mark.parametrize("text, words", [
    ("job: [unclosed\n", "not valid YAML"),
    ("- just\n- a list\n", "mapping"),
    ("a: &x [1, 2]\nb: *x\n", "aliases"),
    ("job: !!python/object/apply:os.system ['echo hi']\n", "job: the YAML tag !!python/object/apply"),
])
def test_malformed_yaml(tmp_path, text, words):
    f = tmp_path / "bad.yaml"
    f.write_text(text)
    res = runner.invoke(app, ["size", str(f)])
    assert res.exit_code == 2
    assert words in res.stderr and "\n" not in res.stderr.strip()


def test_missing_file():
    res = runner.invoke(app, ["size", "no/such/order.yaml"])
    assert res.exit_code == 2 and "file not found" in res.stderr


def test_a_list_where_a_pin_header_end_is_due_is_refused_in_one_line(tmp_path):
    # A hypothesis run of tests/test_hardening.py found this crash: a list is not hashable,
    # so the end's word lookup raised TypeError instead of a refusal naming the field.
    text = (SAMPLES / "hl-0430-mains-choke.yaml").read_text(encoding="utf-8")
    assert "pin_header: {end: start-end," in text
    order = tmp_path / "order.yaml"
    order.write_text(text.replace("pin_header: {end: start-end,", "pin_header: {end: [start-end],"),
                     encoding="utf-8")
    res = runner.invoke(app, ["size", str(order)])
    assert res.exit_code == 2, res.output
    assert res.exception is None or isinstance(res.exception, SystemExit)
    line = res.stderr.strip()
    assert "\n" not in line and "pin_header.end" in line and "start-end or finish-end" in line, line


def test_a_list_where_the_waveform_word_is_due_is_refused_in_one_line(tmp_path):
    # The same crash as the pin header's end, in the duty's word lookup (fields.known_word serves both).
    text = (SAMPLES / "hl-0410-single.yaml").read_text(encoding="utf-8")
    assert "duty: {" in text
    order = tmp_path / "order.yaml"
    order.write_text(text.replace("duty: {", "duty: {waveform: [sine], "), encoding="utf-8")
    res = runner.invoke(app, ["size", str(order)])
    assert res.exit_code == 2, res.output
    assert res.exception is None or isinstance(res.exception, SystemExit)
    line = res.stderr.strip()
    assert "\n" not in line and "duty.waveform" in line and "sine, dc or pulse" in line, line
