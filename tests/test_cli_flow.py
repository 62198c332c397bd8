"""The whole job through the command line: issue, sign off with a sheet, read the register."""

import io

from pypdf import PdfReader
from typer.testing import CliRunner

from windsheet.cli.app import app

from conftest import SAMPLES

runner = CliRunner()
ORDER = SAMPLES / "hl-0412-bifilar-aiding.yaml"


def pdf_text(path):
    return "\n".join(p.extract_text() for p in PdfReader(io.BytesIO(path.read_bytes())).pages)


def test_issue_signoff_sheet_and_register(tmp_path):
    reg = str(tmp_path / "reg.db")
    res = runner.invoke(app, ["traveller", str(ORDER), "-o", str(tmp_path / "t.pdf"), "--register", reg])
    assert res.exit_code == 0, res.output
    sheet = tmp_path / "reversed.pdf"
    res = runner.invoke(app, ["signoff", str(ORDER), str(SAMPLES / "HL-0412-reversed.measured.yaml"),
                              "--register", reg, "-o", str(sheet)])
    # Exit status 1: a unit failed (sample HL-0412-02 was built with strand B reversed).
    assert res.exit_code == 1, res.output
    text = pdf_text(sheet)
    assert "HL-0412-02" in text and "FAIL" in text and "reversed" in text
    res = runner.invoke(app, ["register", "--register", reg])
    assert res.exit_code == 0 and "failed" in res.stdout and "HL-0412" in res.stdout


def test_signoff_sheet_into_missing_folder_records_nothing(tmp_path):
    reg = str(tmp_path / "reg.db")
    assert runner.invoke(app, ["register", "--issue", str(ORDER), "--register", reg]).exit_code == 0
    res = runner.invoke(app, ["signoff", str(ORDER), str(SAMPLES / "HL-0412.measured.yaml"),
                              "--register", reg, "-o", str(tmp_path / "nowhere" / "s.pdf")])
    assert res.exit_code == 2 and "does not exist" in res.stderr
    res = runner.invoke(app, ["register", "HL-0412", "--register", reg])
    assert "signed off" not in res.stdout


def test_demo_renders_travellers_and_signoff_sheets(tmp_path, monkeypatch):
    # The one demo render of the suite (it sizes and prints every sample): every check on it is here.
    # Its sheets are laid out through the tests' cache, so the traveller and page-fault tests read
    # the same layouts instead of making them again (sheet_cache.py; a PDF is a function of its HTML).
    import sheet_cache
    from windsheet.sheets import render

    monkeypatch.setattr(render, "render_pdf", sheet_cache.render_pdf)
    out = tmp_path / "demo"
    res = runner.invoke(app, ["demo", "--out", str(out)])
    assert res.exit_code == 0, res.output
    orders = [p for p in SAMPLES.glob("*.yaml") if not p.name.endswith(".measured.yaml")]
    for o in orders:
        assert (out / f"{o.stem}.pdf").read_bytes().startswith(b"%PDF")
        assert (out / f"{o.stem}.html").read_text().lstrip().lower().startswith("<!doctype html")
    assert (out / "HL-0412-signoff.pdf").exists() and (out / "HL-0412-reversed-signoff.html").exists()
    assert str(out.resolve()) in res.stdout


def test_refused_issue_leaves_the_old_sheet_and_no_new_one(tmp_path):
    reg = str(tmp_path / "reg.db")
    out = tmp_path / "t.pdf"
    assert runner.invoke(app, ["traveller", str(ORDER), "-o", str(out), "--register", reg]).exit_code == 0
    old = out.read_bytes()
    # Same job and revision, different content: the register refuses it, so the sheet must not change.
    changed = tmp_path / "changed.yaml"
    changed.write_text(ORDER.read_text().replace("turns: 60", "turns: 58"))
    res = runner.invoke(app, ["traveller", str(changed), "-o", str(out), "--register", reg])
    assert res.exit_code == 2 and "\n" not in res.stderr.strip()
    assert out.read_bytes() == old
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(["reg.db", "t.pdf", "changed.yaml"]
                                                                + [p.name for p in tmp_path.glob("reg.db-*")])
