"""The command line follows the usual conventions: -h, --version, '-', formats by extension,
exit statuses, batches that carry on, a summary in the trade's words."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path
from types import SimpleNamespace

import yaml
from typer.testing import CliRunner

from windsheet import __version__
from windsheet.cli.app import app
from windsheet.cli.size_cmd import hookup_words

from conftest import sample_design

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"
SINGLE = SAMPLES / "hl-0410-single.yaml"
BIFILAR = SAMPLES / "hl-0412-bifilar-aiding.yaml"
runner = CliRunner()


def _cli_process(*args, stdin: bytes | None = None, cwd=None):
    """The command in a real process: where the process is the point (a binary PDF on a real
    standard output, a batch that starts worker processes)."""
    return subprocess.run([sys.executable, "-m", "windsheet.cli", *map(str, args)], input=stdin,
                          capture_output=True, cwd=cwd, timeout=300)


def _cli(*args, stdin: bytes | None = None):
    """The command in process (typer's runner): exit status, stdout and stderr as bytes."""
    res = runner.invoke(app, [str(a) for a in args], input=stdin)
    return SimpleNamespace(returncode=res.exit_code, stdout=res.stdout_bytes, stderr=res.stderr_bytes)


def test_short_help_and_version():
    res = runner.invoke(app, ["-h"])
    assert res.exit_code == 0 and "Usage:" in res.stdout and "size" in res.stdout
    res = runner.invoke(app, ["size", "-h"])
    assert res.exit_code == 0 and "standard input" in res.stdout
    res = runner.invoke(app, ["--version"])
    assert res.exit_code == 0 and res.stdout.strip() == f"windsheet {__version__}"


def test_size_reads_standard_input():
    res = _cli("size", "-", "--json", stdin=SINGLE.read_bytes())
    assert res.returncode == 0, res.stderr
    from_file = json.loads(_cli("size", SINGLE, "--json").stdout)
    # Same order, same prediction, whichever way it arrives.
    assert json.loads(res.stdout)["terminal"] == from_file["terminal"]


def test_traveller_to_standard_output_and_formats_by_extension(tmp_path):
    reg = tmp_path / "r.db"
    res = _cli_process("traveller", SINGLE, "-o", "-", "--register", reg)
    assert res.returncode == 0 and res.stdout[:5] == b"%PDF-", res.stderr
    assert not (tmp_path / "-").exists() and not (Path.cwd() / "-").exists()
    res = _cli("traveller", SINGLE, "-o", tmp_path / "t.html", "--register", reg)
    assert res.returncode == 0 and (tmp_path / "t.html").read_text(encoding="utf-8").lstrip().lower().startswith(
        "<!doctype html")
    res = _cli("traveller", SINGLE, "-o", tmp_path / "t.json", "--register", reg)
    assert res.returncode == 0 and json.loads((tmp_path / "t.json").read_text())["job"]["number"] == "HL-0410"
    # --format overrides the extension.
    res = _cli("traveller", SINGLE, "-o", tmp_path / "t2.pdf", "--format", "html", "--register", reg)
    assert res.returncode == 0 and b"<html" in (tmp_path / "t2.pdf").read_bytes()[:400].lower()
    res = _cli("traveller", SINGLE, "-o", tmp_path / "t.txt", "--register", reg)
    assert res.returncode == 2 and not (tmp_path / "t.txt").exists()
    assert res.stderr.decode().count("\n") == 1 and "--format" in res.stderr.decode()


def test_size_exits_1_on_an_insulation_fail(tmp_path):
    doc = yaml.safe_load(BIFILAR.read_text())
    doc["duty"]["voltage"] = "100 kV"
    f = tmp_path / "fail.yaml"
    f.write_text(yaml.safe_dump(doc))
    res = _cli("size", f, "--json")
    assert res.returncode == 1 and json.loads(res.stdout)["insulation"]["verdict"] == "fail"
    assert _cli("size", BIFILAR).returncode == 0


def test_batch_of_fifty_with_one_bad_order(tmp_path):
    folder = tmp_path / "jobs"
    folder.mkdir()
    for i in range(49):
        shutil.copy(SINGLE, folder / f"job-{i:02d}.yaml")
    (folder / "job-bad.yaml").write_text(SINGLE.read_text().replace("turns: 40,", "turns: forty,"))
    (folder / "job-00.measured.yaml").write_text("not an order")  # readings in the folder are skipped
    res = _cli("size", folder, "--json")
    assert res.returncode == 1
    lines = res.stdout.decode().splitlines()
    # JSON Lines: one object per sized order, each naming its file.
    results = [json.loads(x) for x in lines]
    assert len(results) == 49 and all(r["file"].endswith(".yaml") and r["strands"] for r in results)
    err = res.stderr.decode().splitlines()
    assert err[0].startswith(f"windsheet: {folder / 'job-bad.yaml'}: winding.turns:"), err
    assert err[-1] == f"windsheet: sized 49 of 50 orders; 1 refused ({folder / 'job-bad.yaml'})", err


def test_batch_takes_a_glob_the_shell_left_alone(tmp_path):
    for name in ("a.yaml", "b.yaml"):
        shutil.copy(SINGLE, tmp_path / name)
    res = _cli("size", tmp_path / "*.yaml", "--json")
    assert res.returncode == 0 and len(res.stdout.decode().splitlines()) == 2
    res = _cli("size", tmp_path / "*.yml")
    assert res.returncode == 2 and "no order files match" in res.stderr.decode()


def test_traveller_batch_writes_each_and_names_the_refused(tmp_path):
    folder = tmp_path / "jobs"
    folder.mkdir()
    shutil.copy(SINGLE, folder / "a.yaml")
    shutil.copy(BIFILAR, folder / "b.yaml")
    (folder / "c.yaml").write_text("job: [", encoding="utf-8")
    out = tmp_path / "sheets"
    res = _cli_process("traveller", folder, "-o", out, "--format", "html", "--jobs", "2", "--register",
                       tmp_path / "r.db")
    assert res.returncode == 1
    assert sorted(p.name for p in out.iterdir()) == ["a.html", "b.html"]
    assert "c.yaml" in res.stderr.decode().splitlines()[-1]


def test_summary_speaks_the_trade():
    res = runner.invoke(app, ["size", str(BIFILAR)])
    assert res.exit_code == 0
    text = res.stdout
    assert "A finish joined to B start" in text and "T1 A start, T2 B finish" in text
    # No Python literals in the human summary.
    assert "[[" not in text and "['" not in text and "']" not in text


def test_hookup_words_for_every_named_form():
    assert hookup_words(sample_design("hl-0415-noninductive")) == (
        "series-opposing — A finish joined to B finish; terminals T1 A start, T2 B start")
    assert hookup_words(sample_design("hl-0410-single")) == (
        "single — no joins; terminals T1 A start, T2 A finish")
    # Separate windings bring out every end: the summary names all four, as the traveller does.
    assert hookup_words(sample_design("hl-0421-toroid-choke")) == (
        "separate — no joins; terminals T1 A start, T2 A finish, T3 B start, T4 B finish")


def _issued_register(tmp_path):
    reg = tmp_path / "r.db"
    assert runner.invoke(app, ["traveller", str(BIFILAR), "-o", str(tmp_path / "t.html"),
                               "--register", str(reg)]).exit_code == 0
    return reg


def test_signoff_batch_pairs_readings_with_their_job_and_fails_on_the_reversed_unit(tmp_path):
    # The samples folder holds every order, both HL-0412 readings files and the HL-0431
    # transformer's; the reversed-strand file's unit -02 reads the leakage only (2.71 uH
    # against ~400 uH); the transformer's -02 is two turns short and -03 has no hipot reading.
    reg = _issued_register(tmp_path)
    res = _cli("signoff", SAMPLES, "--register", reg, "--json")
    # A readings file whose job has no issued traveller is refused by name and the batch goes on.
    assert res.returncode == 1, res.stderr
    assert res.stderr.decode().splitlines()[-1] == (
        "windsheet: signed off 2 of 3 readings files — units 7 pass, 1 fail, 0 incomplete; "
        f"1 refused ({SAMPLES / 'HL-0431.measured.yaml'})")
    assert runner.invoke(app, ["register", "--register", str(reg), "--issue",
                               str(SAMPLES / "hl-0431-isolation-transformer.yaml")]).exit_code == 0
    res = _cli("signoff", SAMPLES, "--register", reg, "--json")
    assert res.returncode == 1, res.stderr
    rows = [json.loads(line) for line in res.stdout.decode().splitlines()]
    by_file = {Path(r["file"]).name: r for r in rows}
    assert set(by_file) == {"HL-0412.measured.yaml", "HL-0412-reversed.measured.yaml", "HL-0431.measured.yaml"}
    assert (by_file["HL-0412.measured.yaml"]["units_passed"], by_file["HL-0412.measured.yaml"]["units_failed"]) == (4, 0)
    assert (by_file["HL-0412-reversed.measured.yaml"]["units_passed"],
            by_file["HL-0412-reversed.measured.yaml"]["units_failed"]) == (3, 1)
    assert res.stderr.decode().splitlines()[-1] == (
        "windsheet: signed off 3 of 3 readings files — units 8 pass, 2 fail, 1 incomplete")


def test_signoff_batch_names_readings_without_an_order_and_goes_on(tmp_path):
    reg = _issued_register(tmp_path)
    stray = yaml.safe_load((SAMPLES / "HL-0412.measured.yaml").read_text(encoding="utf-8"))
    stray["job"] = "HL-9999"
    (tmp_path / "stray.measured.yaml").write_text(yaml.safe_dump(stray), encoding="utf-8")
    res = _cli("signoff", BIFILAR, SAMPLES / "HL-0412.measured.yaml", tmp_path / "stray.measured.yaml",
               "--register", reg, "--dry-run")
    err = res.stderr.decode().splitlines()
    assert res.returncode == 1
    assert any("stray.measured.yaml" in e and "no order for job HL-9999" in e for e in err)
    assert err[-1].startswith("windsheet: signed off 1 of 2 readings files — units 4 pass, 0 fail")
    assert "stray.measured.yaml" in err[-1] and "(dry run: nothing recorded)" in err[-1]


def test_signoff_batch_writes_one_sheet_per_readings_file_into_a_folder(tmp_path):
    reg = _issued_register(tmp_path)
    sheets = tmp_path / "sheets"
    res = _cli("signoff", BIFILAR, f"{SAMPLES}/*.measured.yaml", "--register", reg, "-o", sheets, "--format", "html")
    assert res.returncode == 1, res.stderr
    assert sorted(p.name for p in sheets.iterdir()) == ["HL-0412-reversed.signoff.html", "HL-0412.signoff.html"]
    assert "FAIL" in (sheets / "HL-0412-reversed.signoff.html").read_text(encoding="utf-8")
