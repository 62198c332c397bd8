"""The QC report on a sample register of simulated sign-offs (invented data, demo only)."""

import json
import re
import sqlite3

import numpy as np
import pypdf
import pytest
from typer.testing import CliRunner

from windsheet.cli.app import app
from windsheet.records.demo_records import FAMILIES, build_sample_register

runner = CliRunner()


@pytest.fixture(scope="module")
def sample_register(tmp_path_factory):
    path = tmp_path_factory.mktemp("records") / "sample-register.db"
    build_sample_register(path)
    return path


def _ratios_from_sqlite(path, jobs, key):
    # Independent of the report: read the stored lines straight from the register's table.
    with sqlite3.connect(path) as c:
        rows = c.execute("SELECT job, measurements_json FROM unit_signoffs").fetchall()
    out = []
    for job, m in rows:
        if job in jobs:
            line = next(x for x in json.loads(m)["lines"] if x["key"] == key)
            out.append(line["measured"] / line["predicted"])
    return np.array(out)


def test_report_states_the_bias_per_family(sample_register):
    r = runner.invoke(app, ["report", "--register", str(sample_register), "--json"])
    assert r.exit_code == 0, r.output
    rep = json.loads(r.output)
    assert rep["units"] == sum(len(f[1]) * f[2] for f in FAMILIES)
    bifilar_jobs = FAMILIES[0][1]
    x = _ratios_from_sqlite(sample_register, bifilar_jobs, "terminal.inductance")
    fam = next(f for f in rep["families"] if f["label"].startswith("bifilar"))
    line = next(ln for ln in fam["lines"] if ln["key"] == "terminal.inductance")
    assert line["bias"]["n"] == len(x) == 32
    assert line["bias"]["bias"] == pytest.approx(x.mean() - 1, rel=1e-12)
    assert line["bias"]["sd"] == pytest.approx(x.std(ddof=1), rel=1e-12)
    # The chart's limits, from the same stored values with numpy (Montgomery's individuals chart).
    lim = line["chart"]["limits"]
    assert lim["ucl"] == pytest.approx(x.mean() + 3 * np.abs(np.diff(x)).mean() / 1.128, rel=1e-12)
    want = (f"inductance at terminals reads {(x.mean() - 1) * 100:+.1f} % ± {x.std(ddof=1) * 100:.1f} % "
            "over 32 units that passed")
    assert any(s.startswith("bifilar series-aiding on glass-epoxy tube") and s.endswith(want)
               for s in rep["statements"])
    # The simulated bias (+2.1 %, spread 0.8 %) is recovered within its standard error, about 0.15 %.
    assert line["bias"]["bias"] == pytest.approx(FAMILIES[0][3], abs=0.005)


def test_report_pdf_renders_with_its_charts(sample_register, tmp_path):
    out = tmp_path / "report.pdf"
    r = runner.invoke(app, ["report", "--register", str(sample_register), "-o", str(out)])
    assert r.exit_code == 0, r.output
    text = " ".join(pg.extract_text() for pg in pypdf.PdfReader(out).pages)
    assert "The shop's bias per family" in text
    # The charts' own text (limits, rules, σ estimate) is vector text in the PDF.
    for words in ("UCL", "LCL", "Rule 1: one point beyond 3σ", "7 in a row on one side", "d2 = 1.128"):
        assert words in text, words


def test_signoff_sheet_carries_the_family_chart(sample_register, tmp_path):
    import shutil

    from pathlib import Path
    reg = tmp_path / "reg.db"
    shutil.copy(sample_register, reg)
    root = Path(__file__).resolve().parents[1] / "samples"
    order = root / "hl-0412-bifilar-aiding.yaml"
    assert runner.invoke(app, ["register", "--issue", str(order), "--register", str(reg)]).exit_code == 0
    sheet = tmp_path / "s.html"
    r = runner.invoke(app, ["signoff", str(order), str(root / "HL-0412.measured.yaml"), "--register", str(reg),
                            "-o", str(sheet), "--html"])
    assert r.exit_code == 0, r.output
    html = sheet.read_text()
    assert 'data-chart="family"' in html and "data:image/svg+xml;base64," in html


def test_report_on_an_empty_register_is_refused(tmp_path):
    from windsheet.records.register import open_register
    open_register(tmp_path / "empty.db").close()
    r = runner.invoke(app, ["report", "--register", str(tmp_path / "empty.db")])
    assert r.exit_code == 2 and "no unit is signed off" in r.output


def test_a_miswired_unit_is_marked_and_moves_neither_the_bias_nor_the_limits(tmp_path):
    # HL-0412's reversed-strand readings: unit -02 reads the leakage only and fails; the other three pass.
    from conftest import SAMPLES
    from windsheet.sheets.control_chart import control_chart_svg

    reg = tmp_path / "r.db"
    order = SAMPLES / "hl-0412-bifilar-aiding.yaml"
    assert runner.invoke(app, ["register", "--issue", str(order), "--register", str(reg)]).exit_code == 0
    res = runner.invoke(app, ["signoff", str(order), str(SAMPLES / "HL-0412-reversed.measured.yaml"),
                              "--register", str(reg)])
    assert res.exit_code == 1, res.output
    rep = json.loads(runner.invoke(app, ["report", "--register", str(reg), "--json"]).output)
    fam = rep["families"][0]
    assert [(u["serial"], u["verdict"]) for u in fam["apart"]] == [("HL-0412-02", "fail")]
    # Independent of the report: the ratios straight from the register's table, the failed unit left out.
    with sqlite3.connect(reg) as c:
        rows = c.execute("SELECT serial, measurements_json FROM unit_signoffs ORDER BY id").fetchall()
    ratio = {serial: next(ln["measured"] / ln["predicted"] for ln in json.loads(m)["lines"]
                          if ln["key"] == "terminal.inductance") for serial, m in rows}
    good = np.array([r for serial, r in ratio.items() if serial != "HL-0412-02"])
    line = next(ln for ln in fam["lines"] if ln["key"] == "terminal.inductance")
    assert line["bias"]["n"] == 3
    assert line["bias"]["bias"] == pytest.approx(good.mean() - 1, rel=1e-12)
    assert line["chart"]["limits"]["ucl"] == pytest.approx(good.mean() + 3 * np.abs(np.diff(good)).mean() / 1.128,
                                                          rel=1e-12)
    # The leakage-only unit is some 99 % low: inside the bias it would have dragged it to about -25 %.
    assert ratio["HL-0412-02"] < 0.05 and abs(line["bias"]["bias"]) < 0.05
    assert line["statement"].endswith("over 3 units that passed (1 failed or incomplete, listed apart)")
    assert line["chart"]["excluded"] == [1]
    svg = control_chart_svg(line["chart"], "a title long enough to wrap " * 6)
    assert "failed or incomplete (not in the limits)" in svg and "MR-bar" in svg and "MR̄" not in svg
    # The title wraps onto a second line rather than running off the chart.
    lines = re.findall(r"<text[^>]*>([^<]*long enough[^<]*)</text>", svg)
    assert len(lines) >= 2 and " ".join(lines).split() == ("a title long enough to wrap " * 6).split()
