"""The typed design: its committed JSON Schema, its JSON, the conversion of earlier records,
and one job's outputs agreeing with it and with each other.

The consistency checks compare every output with the model and the model with counts
written out here from the order itself (a strand has two ends; a separate winding brings
both out; one sleeve per lead brought out and per joint, common practice).
"""

import datetime
import json
import re
from functools import lru_cache
from pathlib import Path

import jsonschema
import pytest
import yaml
from typer.testing import CliRunner

from windsheet.cli.app import app
from windsheet.design.build import build_design
from windsheet.design.legacy import design_from_v1, read_design
from windsheet.design.model import Design
from windsheet.design.schema import committed_schema_text, schema_text
from windsheet.order.document import parse_order

from conftest import SAMPLES, sample_orders

runner = CliRunner()
DATA = Path(__file__).resolve().parent / "data"
TODAY = datetime.date(2026, 12, 4)

#: Orders of our own covering every hookup, the three forms and 1–4 strands (invented).
GENERATED = {
    "single-cylinder": """
job: {number: G-01, part: single, customer: X, quantity: 2, revision: A, issued_by: planner}
form: {kind: cylinder, diameter: 20 mm, traverse: 40 mm}
wire: {size: 0.30 mm, grade: 2}
winding: {strands: 1, turns: 80, layers: 2, layer_tape: 0.05 mm}
hookup: single
duty: {voltage: 24 V, frequency: 1 kHz, current: 0.1 A}
""",
    "bifilar-two-layers": """
job: {number: G-02, part: bifilar, customer: X, quantity: 3, revision: A, issued_by: planner}
form: {kind: cylinder, diameter: 30 mm, traverse: 40 mm}
wire: {size: 0.40 mm, grade: 2}
winding: {strands: 2, turns: 60, layers: 2}
hookup: series-aiding
duty: {voltage: 48 V, frequency: 50 Hz, current: 0.2 A}
""",
    "hairpin": """
job: {number: G-03, part: hairpin, customer: X, quantity: 1, revision: A, issued_by: planner}
form: {kind: cylinder, diameter: 25 mm, traverse: 60 mm}
wire: {size: 0.50 mm, grade: 2}
winding: {strands: 2, turns: 40, layers: 1}
hookup: series-opposing
duty: {voltage: 100 V, frequency: 50 Hz}
""",
    "parallel-trifilar": """
job: {number: G-04, part: parallel, customer: X, quantity: 4, revision: A, issued_by: planner}
form: {kind: cylinder, diameter: 25 mm, traverse: 60 mm}
wire: {size: 0.50 mm, grade: 2}
winding: {strands: 3, turns: 30, layers: 1}
hookup: parallel
duty: {voltage: 5 V, frequency: 10 kHz, current: 1 A}
""",
    "three-winding-toroid": """
job: {number: G-05, part: 3-winding choke, customer: X, quantity: 6, revision: A, issued_by: planner}
form: {kind: toroid, inner_diameter: 14.8 mm, outer_diameter: 25.3 mm, height: 10 mm, al: 4.2 uH}
wire: {size: 0.50 mm, grade: 2}
winding: {strands: 3, turns: 10}
hookup: separate
duty: {voltage: 2 V, between_windings: 100 V, frequency: 50 Hz, current: 1 A}
""",
    "custom-quadrifilar": """
job: {number: G-06, part: custom, customer: X, quantity: 2, revision: A, issued_by: planner}
form: {kind: cylinder, diameter: 20 mm, traverse: 40 mm}
wire: {size: 0.20 mm, grade: 2}
winding: {strands: 4, turns: 60, layers: 3}
hookup: {joins: [[A.finish, C.start], [C.finish, B.start], [B.finish, D.start]], terminals: [A.start, D.finish]}
duty: {voltage: 50 V, frequency: 1 kHz}
""",
    "pinned-bobbin": """
job: {number: G-07, part: bobbin, customer: X, quantity: 2, revision: A, issued_by: planner}
form: {kind: bobbin, al: 250 nH, gap: 0.3 mm, width: 15 mm, height: 5 mm, mean_turn_length: 52 mm}
wire: {size: 0.40 mm, grade: 2}
winding: {strands: 2, turns: 30}
hookup: series-aiding
terminations: {A.start: 1, A.finish: 2, B.start: 2, B.finish: 4}
duty: {voltage: 48 V, frequency: 100 kHz, current: 0.3 A}
""",
    "marginal-bifilar": """
job: {number: G-08, part: marginal, customer: X, quantity: 1, revision: A, issued_by: planner}
form: {kind: cylinder, diameter: 50 mm, traverse: 80 mm, material: "glass-epoxy tube, 50 mm OD"}
wire: {size: 0.50 mm, grade: 2}
winding: {strands: 2, turns: 60, layers: 1}
hookup: series-aiding
duty: {voltage: 600 V, frequency: 50 Hz, current: 0.2 A, ambient: 25 degC, operating_temperature: 60 degC}
""",
}


def _order_text(name):
    path = SAMPLES / f"{name}.yaml"
    return path.read_text() if path.exists() else GENERATED[name]


CASES = [p.stem for p in sample_orders()] + list(GENERATED)


@lru_cache(maxsize=None)
def design(name) -> Design:
    return build_design(parse_order(_order_text(name).encode(), f"{name}.yaml"), today=TODAY)


@lru_cache(maxsize=None)
def traveller_html(name) -> str:
    from windsheet.sheets.render import render_traveller_html

    d = design(name)
    return render_traveller_html(d, forced=d.state.state == "failing")


# --- the schema ---------------------------------------------------------------------------

def test_committed_schema_is_the_models():
    # A change of the JSON must be deliberate: regenerate prediction.schema.json and review it.
    assert committed_schema_text() == schema_text()


def test_schema_command_prints_the_committed_schema():
    res = runner.invoke(app, ["schema", "prediction"])
    assert res.exit_code == 0 and res.output == committed_schema_text()
    assert runner.invoke(app, ["schema", "orders"]).exit_code == 2


@pytest.mark.parametrize("name", CASES)
def test_size_json_validates_against_the_committed_schema(name, tmp_path):
    order = tmp_path / f"{name}.yaml"
    order.write_text(_order_text(name))
    res = runner.invoke(app, ["size", str(order), "--json"])
    out = json.loads(res.stdout)
    assert out["schema"] == "windsheet.prediction/2"
    # jsonschema, a reference implementation of JSON Schema draft 2020-12.
    jsonschema.Draft202012Validator(json.loads(committed_schema_text())).validate(out)
    # The JSON reads back as the same design (the command dates it today).
    skip = {"job": {"issue_date"}}
    assert Design.model_validate(out).model_dump(exclude=skip) == design(name).model_dump(exclude=skip)


@pytest.mark.parametrize("name", CASES)
def test_the_json_round_trips(name):
    d = design(name)
    assert read_design(json.loads(json.dumps(d.as_json()))) == d


def test_a_schema_violation_is_caught():
    # The validator is not vacuous: a design with a negative-count strand list fails it.
    out = design("hl-0412-bifilar-aiding").as_json()
    out["strands"][0]["turns"] = "sixty"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.Draft202012Validator(json.loads(committed_schema_text())).validate(out)


# --- a record written by the earlier version ---------------------------------------------

def _close(a, b, rel=1e-12):
    if isinstance(a, dict):
        return a.keys() == b.keys() and all(_close(a[k], b[k], rel) for k in a)
    if isinstance(a, list):
        return len(a) == len(b) and all(_close(x, y, rel) for x, y in zip(a, b))
    if isinstance(a, float) and isinstance(b, float):
        return a == pytest.approx(b, rel=rel)
    return a == b


def test_a_version_1_record_reads_as_todays_design():
    # tests/data/hl-0412.prediction-v1.json: windsheet size --json of the HL-0412 sample as the
    # version before the typed model wrote it (schema windsheet.prediction/1).
    old = json.loads((DATA / "hl-0412.prediction-v1.json").read_text())
    assert old["schema"] == "windsheet.prediction/1"
    got = design_from_v1(old)
    new = design("hl-0412-bifilar-aiding")
    # The record keeps the lines it was issued with; today an air coil on a plain tube no longer
    # requires insulation to core (it is offered as an optional line).
    assert got.qc_required == old["qc_required"]
    assert new.qc_required == [k for k in old["qc_required"] if k != "insulation.to_core"]
    # Q and the shorted turn are predicted from this version on; the record has none.
    # The same sizing otherwise, to the last digits a different order of summation moves.
    later = {"q_test": None, "resistance_ac_test_ohm": None}
    # The terminal capacitance is taken from the low-frequency map, leads added, from issue 29 on:
    # the record keeps the value it was issued with, today's is within 3 % of it.
    issued = {"capacitance_F": got.terminal.capacitance_F, "self_resonance_Hz": got.terminal.self_resonance_Hz}
    assert new.terminal.capacitance_F == pytest.approx(got.terminal.capacitance_F, rel=0.03)
    assert _close(got.terminal.model_dump(), new.terminal.model_copy(update={**later, **issued}).model_dump())
    assert _close([s.model_dump() for s in got.strands],
                  [s.model_copy(update=later).model_dump() for s in new.strands])
    assert _close(got.model_dump()["pairs"], new.model_dump()["pairs"])
    assert got.shorted_turn is None and got.ring_wave is None
    # From issue 29 on a lead's worst voltage counts the leads it lies beside, not only the turns it
    # crosses: the joint lead, at half the 230 V rms, against the 0 V start lead beside it is
    # 230/2·√2 V peak (circuit theory), above the record's 158.9 V against the turns.
    joint_lead = next(k for k, e in enumerate(new.connections.ends) if e.name == "A.finish")
    assert new.connections.ends[joint_lead].lead_Vpk == pytest.approx(230 / 2 * 2 ** 0.5, rel=1e-6)
    assert got.connections.ends[joint_lead].lead_Vpk < new.connections.ends[joint_lead].lead_Vpk
    ends = list(new.connections.ends)
    ends[joint_lead] = ends[joint_lead].model_copy(update={"lead_Vpk": got.connections.ends[joint_lead].lead_Vpk})
    assert got.connections == new.connections.model_copy(update={"ends": ends})
    assert _close([ln.model_dump() for ln in got.qc_plan.lines if ln.key != "insulation.to_core"],
                  [ln.model_dump() for ln in new.qc_plan.lines if ln.required])
    assert got.state == new.state and got.family == new.family


def test_a_version_1_record_keeps_its_recorded_lines_and_forced_status():
    old = json.loads((DATA / "hl-0412.prediction-v1.json").read_text())
    old["qc_required"] = ["terminal.inductance", "terminal.resistance", "ambient"]
    old["design_status"] = {"state": "forced", "reasons": ["recorded reason"]}
    old["a_key_a_later_version_dropped"] = 1
    got = design_from_v1(old)
    assert got.qc_required == ["terminal.inductance", "terminal.resistance", "ambient"]
    assert [ln.key for ln in got.qc_plan.lines if ln.required] == got.qc_required
    assert got.state.state == "forced" and got.state.reasons == ["recorded reason"]


# --- one job, every output agreeing --------------------------------------------------------

def _expected_counts(name):
    """Ends, leads brought out and sleeves per unit, counted from the order text itself."""
    order = yaml.safe_load(_order_text(name))
    strands = int(order["winding"].get("strands", 1))   # one strand unless the order says
    hookup = order["hookup"]
    joins = {"single": 0, "series-aiding": strands - 1, "series-opposing": 1, "parallel": 2, "separate": 0}
    if isinstance(hookup, dict):
        n_joins, leads = len(hookup["joins"]), len(hookup["terminals"])
    else:
        n_joins, leads = joins[hookup], 2 * strands if hookup == "separate" else 2
    return {"ends": 2 * strands, "leads": leads, "joints": n_joins, "sleeves": leads + n_joins,
            "quantity": int(order["job"]["quantity"])}


def _qc_rows(html):
    return {m.group(1): (m.group(2), m.group(3), m.group(4)) for m in re.finditer(
        r'<tr data-qc="([^"]+)"><td>(.*?)</td><td class="num">(.*?)</td><td class="num">(.*?)</td>', html)}


def _pick(html, item):
    m = re.search(rf"<td><b>{re.escape(item)}</b></td><td>.*?</td><td>(.*?)</td>", html, re.S)
    return m.group(1) if m else None


@pytest.mark.parametrize("name", CASES)
def test_the_design_counts_the_ends_as_the_order_says(name):
    d, want = design(name), _expected_counts(name)
    c = d.connections
    assert c.wire_ends_per_unit == want["ends"] == len(c.ends)
    assert len(c.terminals) == want["leads"] and len(c.joints) == want["joints"]
    assert c.sleeving_pieces_per_unit == want["sleeves"]
    assert [t.label for t in c.terminals] == [f"T{i}" for i in range(1, want["leads"] + 1)]


@pytest.mark.parametrize("name", CASES)
def test_traveller_pick_list_leads_and_terminals_agree_with_the_design(name):
    d, html = design(name), traveller_html(name)
    c = d.connections
    assert _pick(html, "Sleeving").startswith(f"{c.sleeving_pieces_per_unit} piece(s) per unit")
    assert _pick(html, "Leads") == f"{c.wire_ends_per_unit} ends per unit"
    # Every terminal the design brings out is named on the sheet and in size's summary.
    from windsheet.cli.size_cmd import summary_lines

    summary = "\n".join(summary_lines(d))
    for t in c.terminals:
        assert f">{t.label}<" in html or f"{t.label} " in html
        assert f"{t.label} {t.end.replace('.', ' ')}" in summary
    # The QC record prints the plan: its lines, in order, each with the plan's band.
    rows = _qc_rows(html)
    printed = [ln.key for ln in d.qc_plan.lines if ln.printed]
    assert list(rows) == printed == d.qc_required + [k for k in printed if k.startswith("ring.")]
    from windsheet.sheets.traveller_sheet import qc_items

    for it in qc_items(d):
        assert rows[it["key"]][2] == it["band"].replace("&", "&amp;")


@pytest.mark.parametrize("name", CASES)
def test_bill_of_materials_counts_the_designs_sleeving(name):
    from windsheet.records.materials import bill_of_materials, bill_json_ready

    d, want = design(name), _expected_counts(name)
    bill = bill_json_ready(bill_of_materials([d]))
    job = bill["jobs"][0]
    assert job["sleeving"]["pieces"] == want["quantity"] * d.connections.sleeving_pieces_per_unit
    assert job["quantity"] == want["quantity"] == d.quantity
    assert [w["strands"] for w in job["wires"]] == [len(d.strands)]


@pytest.mark.parametrize("name", CASES)
def test_bench_page_rows_carry_the_plans_bands(name):
    from windsheet.bench.readings import qc_rows
    from windsheet.sheets.traveller_sheet import qc_items

    d = design(name)
    by_key = {it["key"]: it for it in qc_items(d)}
    rows = {r["key"]: r for r in qc_rows(d, set(d.qc_required))}
    for ln in d.qc_plan.lines:
        # The bench offers every line of the plan, the optional ones too; the traveller prints the printed ones.
        assert rows[ln.key]["band"] == qc_items(d, every=True)[[i["key"] for i in qc_items(d, every=True)].index(
            ln.key)]["band"]
        if ln.printed:
            assert rows[ln.key]["band"] == by_key[ln.key]["band"]
        assert rows[ln.key]["judged"] == (ln.judged != "record") and rows[ln.key]["required"] == ln.required


def _readings_as_planned(d):
    """A unit reading every plan line at its predicted value (resistances at 20 °C)."""
    q = lambda v, unit: f"{v!r} {unit}"  # noqa: E731
    unit = {"serial": d.job.units[0], "ambient": "20 degC",
            "terminals": {"inductance": q(d.terminal.inductance_H, "H"), "resistance": q(d.terminal.resistance_ohm, "ohm")},
            "insulation": {"to_core": "50 Gohm", "test_voltage": "500 V"}}
    if len(d.strands) > 1:
        unit["strands"] = {s.id: {"inductance": q(s.inductance_H, "H"), "resistance": q(s.resistance_20C_ohm, "ohm")}
                           for s in d.strands}
        unit["insulation"]["strand_to_strand"] = "50 Gohm"
        unit["continuity"] = {"strand_to_strand": "open"}
    pairs = {k.split(".")[1] for k in d.qc_required if k.startswith("pair.")}
    if pairs:
        unit["before_joint"] = {k: {"series_aiding": q(d.pairs[k].series_aiding_H, "H"),
                                    "series_opposing": q(d.pairs[k].series_opposing_H, "H")} for k in pairs}
    hipot = d.qc_plan.line("hipot")
    if hipot is not None:
        unit["hipot"] = {"voltage": f"{hipot.test_voltage_V} V", "duration": f"{hipot.duration_s} s",
                         "leakage": "0.05 mA", "result": "pass"}
    return {"job": d.job.number, "revision": d.job.revision, "units": [unit]}


@pytest.mark.parametrize("name", CASES)
def test_signoff_judges_each_line_against_the_plans_band(name):
    from windsheet.qc.measured import measured_from_dict
    from windsheet.qc.signoff import evaluate_signoff

    d = design(name)
    result = evaluate_signoff(d, measured_from_dict(_readings_as_planned(d)))
    unit = result["units"][0]
    assert unit["verdict"] == "pass", [x for x in unit["lines"] if x["result"] == "fail"] or unit["missing"]
    lines = {x["key"]: x for x in unit["lines"]}
    judged = [ln for ln in d.qc_plan.lines if ln.judged in ("band", "minimum") and ln.key in lines]
    assert judged, "no judged line was read"
    for ln in judged:
        assert (lines[ln.key]["min"], lines[ln.key]["max"]) == (ln.low, ln.high), ln.key
    assert unit["design_status"] == d.state.state


@pytest.mark.parametrize("name", ["hl-0412-bifilar-aiding", "marginal-bifilar", "three-winding-toroid"])
def test_register_lists_the_designs_state(name, tmp_path):
    order = tmp_path / f"{name}.yaml"
    order.write_text(_order_text(name))
    reg = tmp_path / "r.db"
    args = ["register", "--issue", str(order), "--register", str(reg)]
    d = design(name)
    res = runner.invoke(app, args + (["--force"] if d.state.state == "failing" else []))
    assert res.exit_code == 0, res.output
    listed = json.loads(runner.invoke(app, ["register", "--register", str(reg), "--json"]).stdout)
    want = "forced" if d.state.state == "failing" else d.state.state
    assert listed[0]["design_status"]["state"] == want
    if name == "marginal-bifilar":
        # The traveller carries the MARGINAL banner; the register says the same.
        assert d.insulation.verdict == "marginal" and want == "marginal"
        assert "MARGINAL" in traveller_html(name)
