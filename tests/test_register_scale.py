"""The register scales, migrates, refuses damage in one line, and closes the crash window."""

from __future__ import annotations

from conftest import examples
import json
import os
import sqlite3
import subprocess
import sys
from functools import lru_cache
from pathlib import Path

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from windsheet.design.build import build_design
from windsheet.order.document import load_order
from windsheet.records import register as R

from conftest import redesign
from windsheet.cli.app import app
from windsheet.common.errors import InputError

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"
BIFILAR = SAMPLES / "hl-0412-bifilar-aiding.yaml"
runner = CliRunner()


def _recorded_v1(number, customer="Fenwick Process Controls", verdict="pass", units=2):
    """The few keys of a prediction as an earlier version recorded it."""
    return {"job": {"number": number, "part": "Sense coil", "customer": customer, "revision": "A",
                    "units": [f"{number}-{k:02d}" for k in range(1, units + 1)], "issued_by": "planner"},
            "insulation": {"verdict": verdict, "reasons": []}}


@lru_cache(maxsize=None)
def _base_design():
    return build_design(load_order(BIFILAR), remedies=False)


def _prediction(number, customer="Fenwick Process Controls", verdict="pass", units=2):
    """The bifilar sample's design as job ``number``, with its insulation verdict set."""
    old = _recorded_v1(number, customer, verdict, units)
    return redesign(_base_design(), job=old["job"], insulation=old["insulation"])


def _fill(reg, n, signed=True):
    for k in range(n):
        p = _prediction(f"HL-{k:05d}")
        reg.record_issue(p, "order", f"{k:064x}")
        if signed:
            result = {"job": p.job.number, "revision": "A", "verdict": "pass",
                      "units": [{"serial": s, "verdict": "pass", "lines": []} for s in p.job.units]}
            reg.record_signoff(result, f"{k:064x}", "QC")


def _ops(conn, fn):
    """SQLite virtual-machine steps a call takes (counted every 100 instructions)."""
    count = [0]

    def tick():
        count[0] += 1
        return 0
    conn.set_progress_handler(tick, 100)
    try:
        fn()
    finally:
        conn.set_progress_handler(None, 100)
    return count[0]


def test_listing_work_grows_linearly_with_the_register(tmp_path):
    # Independent check of scaling without a clock: SQLite's own instruction count. A per-job scan
    # of the sign-offs (the old plan) grows as jobs squared: 10x the jobs, about 100x the steps.
    steps = {}
    for n in (100, 1000):
        with R.open_register(tmp_path / f"r{n}.db") as reg:
            _fill(reg, n)
            steps[n] = _ops(reg.conn, reg.list_jobs)
            assert len(reg.list_jobs()) == n
    assert 5 < steps[1000] / steps[100] < 20, steps


def test_every_query_has_its_index(tmp_path):
    with R.open_register(tmp_path / "r.db") as reg:
        names = {r[1] for r in reg.conn.execute("SELECT type, name FROM sqlite_master WHERE type = 'index'")}
        assert {"issues_job_id", "signoffs_job_revision", "unit_signoffs_signoff", "sheets_state"} <= names
        # SQLite's planner: the unit sign-offs of a job's sign-off are found by index, never by a scan.
        plan = " ".join(r[3] for r in reg.conn.execute(
            "EXPLAIN QUERY PLAN SELECT serial FROM unit_signoffs WHERE signoff_id = 1"))
        assert "USING INDEX unit_signoffs_signoff" in plan, plan


def _version_1_register(path):
    """A register as windsheet wrote it before schema version 2."""
    conn = sqlite3.connect(path, isolation_level=None)
    conn.execute(f"PRAGMA application_id = {R.APPLICATION_ID}")
    conn.execute("BEGIN")
    for stmt in filter(str.strip, R._SCHEMA.split(";")):
        conn.execute(stmt)
    conn.execute("INSERT INTO meta VALUES ('application', ?)", (R.APPLICATION,))
    conn.execute("INSERT INTO meta VALUES ('schema_version', '1')")
    conn.execute("PRAGMA user_version = 1")
    now = "2026-11-01T09:00:00+00:00"
    p = _recorded_v1("HL-0001", verdict="fail")
    conn.execute("INSERT INTO jobs VALUES ('HL-0001', 'Sense coil', 'Fenwick Process Controls', ?)", (now,))
    conn.execute("INSERT INTO issues (job, revision, order_sha256, order_text, predictions_json, units_json, "
                 "issued_by, issued_at) VALUES ('HL-0001', 'A', 'ab', 'order', ?, ?, 'planner', ?)",
                 (json.dumps(p), json.dumps(p["job"]["units"]), now))
    conn.execute("INSERT INTO signoffs (job, issue_id, revision, order_sha256, inspector, verdict, result_json, "
                 "signed_at) VALUES ('HL-0001', 1, 'A', 'ab', 'QC', 'fail', '{}', ?)", (now,))
    for serial, verdict in (("HL-0001-01", "incomplete"), ("HL-0001-02", "pass")):
        conn.execute("INSERT INTO unit_signoffs (signoff_id, job, serial, verdict, measurements_json, inspector, "
                     "signed_at) VALUES (1, 'HL-0001', ?, ?, ?, 'QC', ?)",
                     (serial, "pass" if verdict == "pass" else "fail", json.dumps({"verdict": verdict}), now))
    conn.execute("COMMIT")
    conn.close()


def test_a_version_1_register_is_read_as_it_is_and_migrated_on_the_first_write(tmp_path):
    path = tmp_path / "old.db"
    _version_1_register(path)
    before = path.read_bytes()
    with R.open_register_readonly(path) as reg:
        jobs = reg.list_jobs()
    assert path.read_bytes() == before
    assert jobs[0]["state"] == "incomplete" and jobs[0]["design_status"]["state"] == "failing"
    with R.open_register(path) as reg:
        assert reg.version == 4
        cols = {r[1] for r in reg.conn.execute("PRAGMA table_info(unit_signoffs)")}
        assert "unit_verdict" in cols
        assert reg.conn.execute("SELECT design_state FROM issues").fetchone()[0] == "failing"
        assert [r[0] for r in reg.conn.execute("SELECT unit_verdict FROM unit_signoffs ORDER BY id")] == [
            "incomplete", "pass"]
        # The migrated register lists the same as the old one read as it was.
        assert [(j["number"], j["state"]) for j in reg.list_jobs()] == [(j["number"], j["state"]) for j in jobs]
    assert int.from_bytes(path.read_bytes()[60:64], "big") == 4


# ---------------------------------------------------------------- damage
def _issued_register(tmp_path):
    path = tmp_path / "reg.db"
    with R.open_register(path) as reg:
        _fill(reg, 3)
    return path


@pytest.mark.parametrize("damage, words", [
    ("DROP TABLE unit_signoffs", "table 'unit_signoffs' is missing"),
    ("UPDATE issues SET units_json = '{}' WHERE id = 3", "issues row 3 holds no valid JSON array"),
])
def test_damaged_contents_are_refused_in_one_line_before_anything_is_written(tmp_path, damage, words):
    path = _issued_register(tmp_path)
    conn = sqlite3.connect(path)
    conn.execute(damage)
    conn.commit()
    conn.close()
    before = path.read_bytes()
    res = runner.invoke(app, ["register", "--issue", str(BIFILAR), "--register", str(path)])
    assert res.exit_code == 2 and len(res.stderr.splitlines()) == 1, res.output
    assert words in res.stderr and res.exception is None or isinstance(res.exception, SystemExit)
    # Nothing committed first: the file is as it was.
    assert path.read_bytes() == before
    listing = runner.invoke(app, ["register", "--register", str(path)])
    assert listing.exit_code in (0, 2) and "Traceback" not in listing.output
    if listing.exit_code == 2:
        assert len(listing.stderr.splitlines()) == 1


@pytest.mark.parametrize("damage, row", [
    ("UPDATE issues SET predictions_json = '{broken' WHERE id = 2", 2),
    ("UPDATE issues SET predictions_json = '[]' WHERE id = 1", 1),
])
def test_another_jobs_damaged_record_is_kept_and_left_to_the_whole_check(tmp_path, damage, row):
    # A writer checks what the listing reads and the records it touches, not every job's JSON:
    # issuing HL-0412 writes; the damaged record of another job is kept as it was and
    # `register --check` names it; that job's own record is refused where it is read.
    path = _issued_register(tmp_path)
    conn = sqlite3.connect(path)
    conn.execute(damage)
    conn.commit()
    damaged = conn.execute("SELECT job, predictions_json FROM issues WHERE id = ?", (row,)).fetchone()
    conn.close()
    res = runner.invoke(app, ["register", "--issue", str(BIFILAR), "--register", str(path)])
    assert res.exit_code == 0, res.output
    conn = sqlite3.connect(path)
    assert conn.execute("SELECT job, predictions_json FROM issues WHERE id = ?", (row,)).fetchone() == damaged
    conn.close()
    check = runner.invoke(app, ["register", "--check", "--register", str(path)])
    assert check.exit_code == 2 and f"issues row {row} holds no valid JSON object" in check.stderr
    with R.open_register(path) as reg:
        with pytest.raises(InputError, match=f"issues row {row} holds no valid JSON object"):
            reg.job_history(damaged[0])


def test_text_that_is_not_utf8_is_damage(tmp_path):
    path = _issued_register(tmp_path)
    conn = sqlite3.connect(path)
    conn.execute("UPDATE jobs SET customer = CAST(X'FFFE41' AS TEXT) WHERE number = 'HL-00001'")
    conn.commit()
    conn.close()
    res = runner.invoke(app, ["register", "--register", str(path)])
    assert res.exit_code == 2 and res.stderr.startswith(f"windsheet: {path}: register is damaged"), res.output
    assert len(res.stderr.splitlines()) == 1


@settings(max_examples=examples(25), deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(offsets=st.lists(st.integers(100, 40_000), min_size=1, max_size=6), byte=st.integers(0, 255))
# Found on a clean run: a zeroed byte in the second page, which the listing reads past but --issue's
# write meets (a traceback before the writers' transaction said "damaged" in one line).
@example(offsets=[4097], byte=0)
def test_random_damage_is_refused_or_read_never_a_traceback(tmp_path_factory, offsets, byte):
    tmp = tmp_path_factory.mktemp("damage")
    path = _issued_register(tmp)
    data = bytearray(path.read_bytes())
    for off in offsets:
        if off < len(data):
            data[off] = byte
    path.write_bytes(bytes(data))
    for args in (["register"], ["register", "HL-00001"], ["register", "--issue", str(BIFILAR)]):
        before = path.read_bytes()
        res = runner.invoke(app, args + ["--register", str(path)])
        assert res.exception is None or isinstance(res.exception, SystemExit), (args, res.exception)
        assert res.exit_code in (0, 2), (args, res.output)
        if res.exit_code == 2:
            assert len(res.stderr.splitlines()) == 1 and "Traceback" not in res.stderr, res.stderr
            # A refused register is not written to.
            assert path.read_bytes() == before


# ---------------------------------------------------------------- read-only
def test_a_read_only_register_lists_and_refuses_writing_in_one_line(tmp_path, monkeypatch):
    path = _issued_register(tmp_path)
    # Root may write anyway; take the permission as the system would report it to a shop user.
    monkeypatch.setattr(R.os, "access", lambda p, mode: not (mode & os.W_OK))
    res = runner.invoke(app, ["register", "--register", str(path)])
    assert res.exit_code == 0 and "HL-00001" in res.stdout, res.output
    res = runner.invoke(app, ["register", "--issue", str(BIFILAR), "--register", str(path)])
    assert res.exit_code == 2 and "register is read-only" in res.stderr and "damaged" not in res.stderr
    assert len(res.stderr.splitlines()) == 1


# ---------------------------------------------------------------- listing
def test_listing_is_a_table_with_filters_csv_and_json(tmp_path):
    path = tmp_path / "reg.db"
    with R.open_register(path) as reg:
        reg.record_issue(_prediction("HL-0001", customer="Marlow Instruments"), "o", "a" * 64)
        reg.record_issue(_prediction("HL-0002", customer="Fenwick Process Controls", verdict="fail"), "o", "b" * 64)
        reg.record_signoff({"job": "HL-0001", "revision": "A", "verdict": "pass",
                            "units": [{"serial": s, "verdict": "pass"} for s in ("HL-0001-01", "HL-0001-02")]},
                           "a" * 64, "QC")
    lines = runner.invoke(app, ["register", "--register", str(path)]).stdout.splitlines()
    assert lines[0].split() == ["job", "rev", "customer", "issued", "state", "passed/total", "design"]
    # Aligned: every row's state column starts where the header's does.
    col = lines[0].index("state")
    assert all(line[col:].split()[0] in ("issued", "passed") for line in lines[1:]), lines
    assert "2/2" in lines[2] and "FAILING" in lines[1]
    only = runner.invoke(app, ["register", "--register", str(path), "--state", "passed"]).stdout
    assert "HL-0001" in only and "HL-0002" not in only
    only = runner.invoke(app, ["register", "--register", str(path), "--customer", "fenwick"]).stdout
    assert "HL-0002" in only and "HL-0001" not in only
    assert "(no jobs)" in runner.invoke(app, ["register", "--register", str(path), "--since", "2999-01-01"]).stdout
    csv_text = runner.invoke(app, ["register", "--register", str(path), "--csv"]).stdout
    assert csv_text.splitlines()[0] == "job,rev,customer,issued,state,passed/total,design"
    data = json.loads(runner.invoke(app, ["register", "--register", str(path), "--json"]).stdout)
    assert {j["number"] for j in data} == {"HL-0001", "HL-0002"}
    bad = runner.invoke(app, ["register", "--register", str(path), "--since", "last week"])
    assert bad.exit_code == 2 and bad.stderr.startswith("windsheet: --since:")


def test_issue_prints_only_what_it_recorded(tmp_path):
    path = tmp_path / "reg.db"
    with R.open_register(path) as reg:
        _fill(reg, 5, signed=False)
    res = runner.invoke(app, ["register", "--issue", str(BIFILAR), "--register", str(path)])
    assert res.exit_code == 0 and res.stdout == "" and res.stderr.startswith("issued HL-0412 rev A"), res.output


# ---------------------------------------------------------------- the crash window
KILL_BETWEEN_COMMIT_AND_RENAME = r"""
import os, sys
import windsheet.common.fileio as f
real = f.place_file
def place_then_die(tmp, target):
    if str(target).endswith("sheet.html"):
        os._exit(9)          # as kill -9: after the register's commit, before the rename
    return real(tmp, target)
f.place_file = place_then_die
import windsheet.records.sheet_ledger as led
led.place_file = place_then_die
from windsheet.cli.app import main
sys.argv = ["windsheet"] + sys.argv[1:]
main()
"""


def test_a_sign_off_killed_between_commit_and_rename_is_finished_on_the_next_run(tmp_path):
    from windsheet.order.document import load_order
    from windsheet.design.build import build_design
    from windsheet.qc.readings_form import csv_form

    reg = tmp_path / "reg.db"
    assert runner.invoke(app, ["register", "--issue", str(BIFILAR), "--register", str(reg)]).exit_code == 0
    readings = tmp_path / "m.csv"
    readings.write_text(csv_form(build_design(load_order(BIFILAR))), encoding="utf-8")
    sheet = tmp_path / "sheet.html"
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    res = subprocess.run([sys.executable, "-c", KILL_BETWEEN_COMMIT_AND_RENAME, "signoff", str(BIFILAR),
                          str(readings), "--inspector", "QC", "--register", str(reg), "-o", str(sheet),
                          "--html"], capture_output=True, text=True, env=env, timeout=300)
    assert res.returncode == 9, res.stderr
    # The record is committed, the sheet is not in place, the staged file is left behind.
    with R.open_register_readonly(reg) as r:
        assert r.conn.execute("SELECT count(*) FROM signoffs").fetchone()[0] == 1
        pending = r.conn.execute("SELECT path, sha256, staged FROM sheets WHERE state = 'pending'").fetchall()
    assert not sheet.exists() and len(pending) == 1 and Path(pending[0][2]).exists()
    # The next run that writes the register finishes the sheet from the staged file.
    with R.open_register(reg) as r:
        assert any("finished the signoff sheet" in m for m in r.repairs), r.repairs
        assert r.conn.execute("SELECT state FROM sheets").fetchone()[0] == "placed"
    import hashlib
    assert hashlib.sha256(sheet.read_bytes()).hexdigest() == pending[0][1]
    assert not Path(pending[0][2]).exists()
    assert not [q for q in tmp_path.iterdir() if q.name.endswith(".tmp")]


def test_temp_files_of_a_crashed_writer_are_cleaned_up(tmp_path):
    from windsheet.common.fileio import _temp_prefix, atomic_write_bytes

    # A pid that cannot be running: beyond the kernel's pid_max.
    dead = tmp_path / (_temp_prefix("t.pdf").rsplit("-", 1)[0] + "-4194399.abcd.tmp")
    dead.write_bytes(b"half a sheet")
    live = tmp_path / (_temp_prefix("t.pdf") + "efgh.tmp")  # this process: alive
    live.write_bytes(b"being written")
    atomic_write_bytes(tmp_path / "t.pdf", b"%PDF-")
    assert not dead.exists() and live.exists() and (tmp_path / "t.pdf").read_bytes() == b"%PDF-"
