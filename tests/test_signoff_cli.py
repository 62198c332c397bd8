"""The inspector's commands: dry run, reprints, design status, readings forms, CSV readings.

Readings are simulated from the engine (predict's strand matrix and
resistances through network.terminal_reading), never typed in.
"""

import csv
import io
import os

import numpy as np
import yaml
from typer.testing import CliRunner

from windsheet.qc import wiring_hypotheses as wh
from windsheet.cli.app import app
from windsheet.physics.network import terminal_reading
from windsheet.order.document import load_order
from windsheet.design.build import build_design

from conftest import SAMPLES

BIFILAR = SAMPLES / "hl-0412-bifilar-aiding.yaml"
runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def engine_values(p):
    """Every required reading of an as-ordered unit, keyed by CSV column, from the engine."""
    L = np.array(p.inductance_matrix_H)
    R = np.array([s.resistance_20C_ohm for s in p.strands])
    hk = p.hookup
    w = wh.wiring_from(hk.joins, hk.terminals, len(R))
    lt, rt = terminal_reading(L, R, w.node_of, w.t1, w.t2, 1e3)
    v = {"ambient [degC]": "20", "terminal.inductance [uH]": repr(float(lt * 1e6)), "terminal.resistance [ohm]": repr(float(rt)),
         "insulation.strand_to_strand [Gohm]": "20", "insulation.to_core [Gohm]": "20",
         "insulation.test_voltage [V]": "500", "continuity.A-B": "open",
         "hipot.voltage [V]": repr(float(p.hipot.voltage_V)), "hipot.duration [s]": repr(float(p.hipot.duration_s)),
         "hipot.result": "pass"}
    for i, s in enumerate("AB"):
        v[f"strand.{s}.inductance [uH]"] = repr(float(L[i, i] * 1e6))
        v[f"strand.{s}.resistance [ohm]"] = repr(float(R[i]))
    v["pair.A-B.series_aiding [uH]"] = repr(float(terminal_reading(L, R, [0, 1, 1, 2], 0, 2, 1e3)[0] * 1e6))
    v["pair.A-B.series_opposing [uH]"] = repr(float(terminal_reading(L, R, [0, 1, 2, 1], 0, 2, 1e3)[0] * 1e6))
    return v


def issued(tmp_path):
    reg = tmp_path / "reg.db"
    assert run("traveller", BIFILAR, "-o", tmp_path / "t.html", "--html", "--register", reg).exit_code == 0
    return reg


def filled_csv(tmp_path, p, mutate=None):
    form = tmp_path / "form.csv"
    assert run("readings-form", BIFILAR, "-o", form).exit_code == 0
    rows = list(csv.DictReader(io.StringIO(form.read_text())))
    values = engine_values(p)
    for k, row in enumerate(rows):
        row.update({c: values[c] for c in row if c in values})
        if mutate:
            mutate(k, row)
    out = io.StringIO()
    w = csv.DictWriter(out, fieldnames=list(rows[0]), lineterminator="\n")
    w.writeheader()
    w.writerows(rows)
    path = tmp_path / "readings.csv"
    path.write_text(out.getvalue())
    return path


def test_dry_run_leaves_the_register_byte_for_byte_unchanged(tmp_path):
    reg = issued(tmp_path)
    p = build_design(load_order(BIFILAR))
    readings = filled_csv(tmp_path, p)
    before = reg.read_bytes()
    names = sorted(os.listdir(tmp_path))
    r = run("signoff", BIFILAR, readings, "--inspector", "M. Lindqvist", "--register", reg, "--dry-run")
    assert r.exit_code == 0, r.output
    assert "nothing recorded" in r.output
    assert reg.read_bytes() == before
    assert sorted(os.listdir(tmp_path)) == names
    # The same readings recorded for real do change it.
    assert run("signoff", BIFILAR, readings, "--inspector", "M. Lindqvist", "--register", reg).exit_code == 0
    assert reg.read_bytes() != before


def test_csv_readings_from_the_form_sign_off_and_an_empty_form_is_incomplete(tmp_path):
    reg = issued(tmp_path)
    form = tmp_path / "empty.yaml"
    assert run("readings-form", BIFILAR, "-o", form).exit_code == 0
    doc = yaml.safe_load(form.read_text())
    assert [u["serial"] for u in doc["units"]] == build_design(load_order(BIFILAR)).job.units
    # The empty form loads and every unit is incomplete: exit 3, not a pass.
    r = run("signoff", BIFILAR, form, "--inspector", "M. Lindqvist", "--register", reg, "--dry-run")
    assert r.exit_code == 3, r.output
    assert "INCOMPLETE" in r.output


def test_a_missing_hipot_in_csv_is_incomplete_and_the_register_says_so(tmp_path):
    reg = issued(tmp_path)
    p = build_design(load_order(BIFILAR))

    def drop_hipot(k, row):
        if k == 0:
            row["hipot.result"] = row["hipot.voltage [V]"] = row["hipot.duration [s]"] = ""
    readings = filled_csv(tmp_path, p, drop_hipot)
    r = run("signoff", BIFILAR, readings, "--inspector", "M. Lindqvist", "--register", reg)
    assert r.exit_code == 3, r.output
    listing = run("register", "--register", reg).output
    assert "incomplete" in listing and "4/4 passed" not in listing


def test_rendering_a_revision_again_is_a_reprint_not_an_issue(tmp_path):
    reg = issued(tmp_path)
    assert run("traveller", BIFILAR, "-o", tmp_path / "t.pdf", "--register", reg).exit_code == 0
    assert run("traveller", BIFILAR, "-o", tmp_path / "t2.pdf", "--paper", "letter", "--register", reg).exit_code == 0
    hist = run("register", "HL-0412", "--register", reg).output
    assert hist.count(" issued rev") == 1 and hist.count(" reprinted rev") == 2


def test_register_issue_follows_the_force_rule_and_the_status_travels(tmp_path):
    text = BIFILAR.read_text().replace("voltage: 230 V", "voltage: 4000 V")
    order = tmp_path / "hv.yaml"
    order.write_text(text)
    reg = tmp_path / "reg.db"
    refused = run("register", "--issue", order, "--register", reg)
    # The traveller's rule: a failing insulation check is not issued without --force.
    assert refused.exit_code == 2 and "--force" in refused.output
    assert run("register", "--issue", order, "--force", "--register", reg).exit_code == 0
    listing = run("register", "--register", reg).output.splitlines()
    # The listing's design column (windsheet.records.register_listing).
    assert listing[0].split()[-1] == "design" and listing[1].split()[-1] == "FORCED", listing
    p = build_design(load_order(order))
    readings = filled_csv(tmp_path, p)
    r = run("signoff", order, readings, "--inspector", "M. Lindqvist", "--register", reg, "--dry-run")
    assert "Design: FORCED" in r.output and "(design FORCED)" in r.output


def test_sheet_spread_over_passing_units_inspector_signs_and_celsius(tmp_path):
    from windsheet.qc.readings_file import load_measured
    from windsheet.sheets.render import render_signoff_html
    from windsheet.qc.signoff import evaluate_signoff

    p = build_design(load_order(BIFILAR))

    def fail_second(k, row):
        if k == 1:  # an open strand: the unit fails
            row["strand.B.resistance [ohm]"] = "open"
    readings = load_measured(filled_csv(tmp_path, p, fail_second))
    res = evaluate_signoff(p, readings, inspector="M. Lindqvist")
    html = render_signoff_html(p, res)
    assert res["units"][1]["verdict"] == "fail"
    # The spread covers the three passing units; the failed one is listed apart.
    assert all(sp["count"] == 3 for sp in res["spread"])
    assert "not included: HL-0412-02 (FAIL)" in html
    assert 'class="k s-signlabel">Inspector</span><span class="v s-issuer">M. Lindqvist' in html
    assert "degC" not in html and "°C" in html


def test_a_waiver_in_csv_passes_the_unit_and_is_kept_in_the_register(tmp_path):
    import json
    import sqlite3

    reg = issued(tmp_path)
    p = build_design(load_order(BIFILAR))
    reason = "withstand tested by the customer at goods-in"

    def waive_hipot(k, row):
        row["hipot.result"] = row["hipot.voltage [V]"] = row["hipot.duration [s]"] = ""
        row["waive.hipot"] = reason
    readings = filled_csv(tmp_path, p, waive_hipot)
    r = run("signoff", BIFILAR, readings, "--inspector", "M. Lindqvist", "--register", reg)
    assert r.exit_code == 0, r.output
    with sqlite3.connect(reg) as c:
        rows = [json.loads(m) for (m,) in c.execute("SELECT measurements_json FROM unit_signoffs")]
    assert len(rows) == 4 and all(m["waived"] == {"hipot": reason} for m in rows)


def test_a_bad_csv_cell_is_named_by_row_and_column(tmp_path):
    reg = issued(tmp_path)
    p = build_design(load_order(BIFILAR))

    def garble(k, row):
        if k == 2:
            row["terminal.inductance [uH]"] = "about 400"
    readings = filled_csv(tmp_path, p, garble)
    r = run("signoff", BIFILAR, readings, "--inspector", "M. Lindqvist", "--register", reg)
    # Bad input: one line naming the cell, exit 2, nothing recorded.
    assert r.exit_code == 2
    assert "row 4, column 'terminal.inductance [uH]'" in r.output and r.output.count("\n") == 1
    assert "signed off" not in run("register", "HL-0412", "--register", reg).output


def test_a_turn_count_in_csv_is_read_as_a_count():
    from windsheet.qc.measured import measured_from_dict
    from windsheet.qc.readings_form import measured_dict_from_csv

    text = "job,serial,strand.A.turns,strand.B.turns,terminal.inductance [uH]\nHL-0412,HL-0412-01,60,057,400\n"
    doc = measured_dict_from_csv(text)
    # 60 is the count the winder wrote; 057 keeps its leading zero so the reader refuses it, as in YAML.
    assert doc["units"][0]["strands"]["A"]["turns"] == 60 and doc["units"][0]["strands"]["B"]["turns"] == "057"
    doc["units"][0]["strands"].pop("B")
    assert measured_from_dict(doc).units[0].strands["A"].turns == 60
