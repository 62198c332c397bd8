"""Every register writer checks what the listing checks; a full disk is a full disk; report only reads."""

from __future__ import annotations

import os
import shutil
import sqlite3
import subprocess

import pytest
from typer.testing import CliRunner

from windsheet.cli.app import app
from windsheet.common.errors import InputError

from conftest import SAMPLES

runner = CliRunner()
SINGLE = SAMPLES / "hl-0410-single.yaml"
BIFILAR = SAMPLES / "hl-0412-bifilar-aiding.yaml"
MEASURED = SAMPLES / "HL-0412.measured.yaml"
IS_ROOT = hasattr(os, "geteuid") and os.geteuid() == 0


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def _damaged(tmp_path, sql):
    reg = tmp_path / "reg.db"
    assert run("traveller", BIFILAR, "-o", tmp_path / "t.html", "--register", reg).exit_code == 0
    conn = sqlite3.connect(reg)
    conn.execute(sql)
    conn.commit()
    conn.close()
    return reg


@pytest.mark.parametrize("sql, words", [
    # The probe's reproduction: text that is not UTF-8 in a listed column.
    ("update jobs set customer = cast(x'fffe41' as text)", "jobs.customer of row 1 is not valid UTF-8"),
    ("update issues set issued_by = cast(x'41c3' as text)", "issues.issued_by of row 1 is not valid UTF-8"),
    ("update issues set units_json = '{}'", "holds no valid JSON array in units_json"),
])
def test_a_register_the_listing_calls_damaged_is_written_by_no_command(tmp_path, sql, words):
    reg = _damaged(tmp_path, sql)
    listing = run("register", "--register", reg)
    assert listing.exit_code == 2 and "damaged" in listing.stderr
    before = reg.read_bytes()
    writers = {
        "register --issue": ("register", "--issue", SINGLE, "--register", reg),
        "traveller": ("traveller", SINGLE, "-o", tmp_path / "s.html", "--register", reg),
        "signoff": ("signoff", BIFILAR, MEASURED, "--register", reg),
    }
    for name, args in writers.items():
        res = run(*args)
        assert res.exit_code == 2, (name, res.output)
        assert res.stderr.startswith(f"windsheet: {reg}: register is damaged") and words in res.stderr, (name, res.stderr)
    assert reg.read_bytes() == before
    assert not (tmp_path / "s.html").exists()


def test_plain_text_beyond_ascii_is_not_damage(tmp_path):
    reg = _damaged(tmp_path, "update jobs set customer = 'Sørensen Ångström & Co'")
    assert run("register", "--issue", SINGLE, "--register", reg).exit_code == 0
    listing = run("register", "--register", reg)
    assert listing.exit_code == 0 and "Sørensen" in listing.stdout


# ------------------------------------------------------------------ a full disk
def test_an_io_error_on_a_nearly_full_disk_is_called_a_full_disk(tmp_path, monkeypatch):
    from windsheet.records import register

    label = str(tmp_path / "reg.db")
    io_error = sqlite3.OperationalError("disk I/O error")
    monkeypatch.setattr(shutil, "disk_usage", lambda p: shutil._ntuple_diskusage(10 << 20, 10 << 20, 4096))
    assert register._disk_fault(label, io_error).message.startswith("disk full: ")
    monkeypatch.setattr(shutil, "disk_usage", lambda p: shutil._ntuple_diskusage(10 << 20, 1 << 20, 8 << 20))
    said = register._disk_fault(label, io_error)
    assert said.message.startswith("disk I/O error") and "not of the register's content" in said.message
    assert register._disk_fault(label, sqlite3.OperationalError("database or disk is full")).message.startswith(
        "disk full")
    assert register._disk_fault(label, sqlite3.DatabaseError("file is not a database")) is None


@pytest.fixture
def small_disk(tmp_path):
    """A 1 MiB file system of its own (tmpfs), so filling it fills no one else's disk."""
    mnt = tmp_path / "disk"
    mnt.mkdir()
    if not IS_ROOT or subprocess.run(["mount", "-t", "tmpfs", "-o", "size=1m", "tmpfs", str(mnt)],
                                     capture_output=True).returncode != 0:
        pytest.skip("needs a small file system of its own (mount -t tmpfs, as root)")
    try:
        yield mnt
    finally:
        subprocess.run(["umount", str(mnt)], capture_output=True)


def _fill(folder):
    fd = os.open(folder / "filler", os.O_WRONLY | os.O_CREAT)
    try:
        while True:
            os.write(fd, b"\0" * 4096)
    except OSError:
        pass
    finally:
        os.close(fd)


def test_a_full_disk_is_reported_as_full_naming_the_file(small_disk, tmp_path):
    reg = small_disk / "reg.db"
    assert run("register", "--issue", SINGLE, "--register", reg).exit_code == 0
    before = reg.read_bytes()
    _fill(small_disk)
    for args in (("register", "--issue", BIFILAR, "--register", reg),
                 ("traveller", BIFILAR, "-o", tmp_path / "t.html", "--register", reg)):
        res = run(*args)
        assert res.exit_code == 2, res.output
        assert res.stderr.startswith(f"windsheet: {reg}: disk full: "), res.stderr
        assert "damaged" not in res.stderr
    sheet = run("traveller", BIFILAR, "-o", small_disk / "t.html", "--register", tmp_path / "other.db")
    assert sheet.stderr.startswith(f"windsheet: {small_disk / 't.html'}: disk full: "), sheet.stderr
    assert reg.read_bytes() == before
    assert not [p for p in small_disk.iterdir() if p.name.endswith(".tmp")]


# ------------------------------------------------------------------ report reads only
def test_report_works_on_a_read_only_register_and_leaves_it_as_it_was(tmp_path):
    from windsheet.records.demo_records import build_sample_register

    folder = tmp_path / "records"
    folder.mkdir()
    reg = folder / "reg.db"
    build_sample_register(reg)
    before, names = reg.read_bytes(), sorted(p.name for p in folder.iterdir())
    reg.chmod(0o444)
    folder.chmod(0o555)
    try:
        res = run("report", "--register", reg, "--json")
        listing = run("register", "--register", reg)
    finally:
        folder.chmod(0o755)
    assert res.exit_code == 0, res.output
    assert listing.exit_code == 0
    import json

    assert json.loads(res.stdout)["units"] > 0
    assert reg.read_bytes() == before and sorted(p.name for p in folder.iterdir()) == names


# ------------------------------------------------------------------ the check proportional to the work
def test_readers_check_what_they_read_and_register_check_checks_everything(tmp_path):
    reg = _damaged(tmp_path, "update issues set predictions_json = '{broken' where id = 1")
    # The listing reads no prediction (the design state is a column): it lists.
    listing = run("register", "--register", reg)
    assert listing.exit_code == 0 and "HL-0412" in listing.stdout
    # The job's history reads that record: refused at its row, one line.
    history = run("register", "HL-0412", "--register", reg)
    assert history.exit_code == 2 and "register is damaged" in history.stderr
    assert len(history.stderr.splitlines()) == 1
    # The whole check finds it, naming the row; a writer refuses before writing.
    check = run("register", "--check", "--register", reg)
    assert check.exit_code == 2
    assert check.stderr == (f"windsheet: {reg}: register is damaged: issues row 1 holds no valid JSON object "
                            "in predictions_json; restore it from a backup\n")
    # A writer that reads or touches that job's record refuses before writing: a reprint of its
    # traveller, its sign-off (both read or point at issue row 1).
    before = reg.read_bytes()
    for args in (("traveller", BIFILAR, "-o", tmp_path / "again.html", "--register", reg),
                 ("register", "--issue", BIFILAR, "--register", reg),
                 ("signoff", BIFILAR, MEASURED, "--register", reg)):
        res = run(*args)
        assert res.exit_code == 2 and "register is damaged" in res.stderr, (args, res.output)
        assert "issues row 1" in res.stderr and len(res.stderr.splitlines()) == 1, res.stderr
    assert reg.read_bytes() == before and not (tmp_path / "again.html").exists()
    # A writer of another job checks only what the listing reads and its own rows: it writes, and
    # the damaged record is kept as it was (never lost), still found by the whole check.
    assert run("register", "--issue", SINGLE, "--register", reg).exit_code == 0
    conn = sqlite3.connect(reg)
    assert conn.execute("SELECT predictions_json FROM issues WHERE id = 1").fetchone() == ("{broken",)
    assert conn.execute("SELECT job FROM issues ORDER BY id").fetchall() == [("HL-0412",), ("HL-0410",)]
    conn.close()
    assert run("register", "--check", "--register", reg).exit_code == 2


def test_a_writer_checks_what_the_listing_reads_and_no_record_json(tmp_path):
    """The writers' check reads the listing's columns and never an issue's prediction or a
    sign-off's result (the columns that make a register large)."""
    from windsheet.records import register_schema as schema

    reg = tmp_path / "reg.db"
    assert run("traveller", BIFILAR, "-o", tmp_path / "t.html", "--register", reg).exit_code == 0
    assert run("signoff", BIFILAR, MEASURED, "--register", reg).exit_code == 0
    conn = sqlite3.connect(reg)
    seen = []
    conn.set_trace_callback(seen.append)
    schema.check_listed(conn, str(reg))
    conn.set_trace_callback(None)
    reads = " ".join(seen)
    for record in ("predictions_json", "order_text", "result_json", "measurements_json"):
        assert record not in reads, record
    # Each issue's columns come from the covering index (SQLite's own query plan).
    issues_read = next(q for q in seen if "FROM issues" in q and "units_json" in q and "group_concat" in q)
    plan = " ".join(r[3] for r in conn.execute("EXPLAIN QUERY PLAN " + issues_read))
    assert "COVERING INDEX issues_listing" in plan, plan
    # And it refuses what the listing refuses: a unit's serial that is not UTF-8.
    conn.execute("UPDATE unit_signoffs SET serial = cast(x'48ff' as text) WHERE id = 2")
    conn.commit()
    with pytest.raises(InputError, match="unit_signoffs.serial of row 2 is not valid UTF-8"):
        schema.check_listed(conn, str(reg))
    conn.close()
    assert run("register", "--register", reg).exit_code == 2


def test_register_check_on_a_whole_register_counts_what_it_checked(tmp_path):
    reg = tmp_path / "reg.db"
    assert run("traveller", BIFILAR, "-o", tmp_path / "t.html", "--register", reg).exit_code == 0
    assert run("signoff", BIFILAR, MEASURED, "--register", reg).exit_code == 0
    before = reg.read_bytes()
    res = run("register", "--check", "--register", reg, "--json")
    assert res.exit_code == 0, res.output
    import json

    # One job, one issue, one sign-off of the sample's four units (samples/HL-0412.measured.yaml).
    assert {k: v for k, v in json.loads(res.stdout).items() if k != "register"} == {
        "schema_version": 4, "jobs": 1, "issues": 1, "signoffs": 1, "unit_signoffs": 4}
    assert reg.read_bytes() == before


def test_a_scribbled_page_is_found_by_register_check(tmp_path):
    reg = tmp_path / "reg.db"
    assert run("traveller", BIFILAR, "-o", tmp_path / "t.html", "--register", reg).exit_code == 0
    data = bytearray(reg.read_bytes())
    page = int.from_bytes(data[16:18], "big")
    data[page * 2 + 8: page * 3] = b"\xa5" * (page - 8)  # scribble over page 3
    reg.write_bytes(bytes(data))
    res = run("register", "--check", "--register", reg)
    assert res.exit_code == 2 and "register is damaged" in res.stderr and "Traceback" not in res.output


def test_the_listing_reads_the_covering_index_and_lists_the_same(tmp_path):
    from conftest import design_for_job
    from windsheet.records import register_schema as schema
    from windsheet.records.register import open_register, open_register_readonly

    reg = tmp_path / "reg.db"
    with open_register(reg) as r:
        for k in range(30):
            r.record_issue(design_for_job(f"HL-{k:04d}", units=[f"HL-{k:04d}-01"],
                                          customer="Fenwick" if k % 2 else "Marlow"), "order", f"{k:064x}")
        assert schema.has_listing_index(r.conn)
        plans = []
        r.conn.set_trace_callback(plans.append)
        jobs = r.list_jobs()
        r.conn.set_trace_callback(None)
        plan = [row[3] for row in r.conn.execute("EXPLAIN QUERY PLAN " + next(q for q in plans if "units_json" in q))]
        # Every issue column the listing reads comes from the index: no issue record is read.
        assert any("COVERING INDEX issues_listing" in p for p in plan), plan
        page, total = r.list_jobs_page(2, 10, customer="fenwick", since="2026-01-01")
        r.conn.execute("DROP INDEX issues_listing")
    with open_register_readonly(reg) as r:
        assert r.list_jobs() == jobs
        assert r.list_jobs_page(2, 10, customer="fenwick", since="2026-01-01") == (page, total)
    assert total == 15 and [j["number"] for j in page] == [f"HL-{k:04d}" for k in (9, 7, 5, 3, 1)]


def test_the_whole_listing_and_one_jobs_state_agree_on_revisions_and_re_tests(tmp_path):
    """The whole listing tallies unit verdicts against each job's latest revision itself; one job's
    state (and a page) has SQLite pick them. Both must give the states worked out by hand here."""
    from conftest import design_for_job
    from windsheet.records.register import open_register

    def signoff(reg, number, rev, sha, verdicts):
        reg.record_signoff({"job": number, "revision": rev, "verdict": "pass" if set(verdicts.values()) == {"pass"}
                            else "fail", "units": [{"serial": s, "verdict": v, "lines": []}
                                                   for s, v in verdicts.items()]}, sha, "QC")

    with open_register(tmp_path / "reg.db") as reg:
        # HL-0001: passed at revision A, then revision B issued: A's sign-offs do not count.
        reg.record_issue(design_for_job("HL-0001", "A", ["a1", "a2"]), "o", "1" * 64)
        signoff(reg, "HL-0001", "A", "1" * 64, {"a1": "pass", "a2": "pass"})
        reg.record_issue(design_for_job("HL-0001", "B", ["a1", "a2"]), "o", "2" * 64)
        # HL-0002: a unit failed, then passed its re-test: the last verdict of each serial stands.
        reg.record_issue(design_for_job("HL-0002", "A", ["b1", "b2"]), "o", "3" * 64)
        signoff(reg, "HL-0002", "A", "3" * 64, {"b1": "pass", "b2": "fail"})
        signoff(reg, "HL-0002", "A", "3" * 64, {"b2": "pass"})
        # HL-0003: one unit passed, one not signed; HL-0004: one incomplete.
        reg.record_issue(design_for_job("HL-0003", "A", ["c1", "c2"]), "o", "4" * 64)
        signoff(reg, "HL-0003", "A", "4" * 64, {"c1": "pass"})
        reg.record_issue(design_for_job("HL-0004", "A", ["d1"]), "o", "5" * 64)
        signoff(reg, "HL-0004", "A", "5" * 64, {"d1": "incomplete"})
        listed = {j["number"]: (j["revision"], j["state"], j["units_passed"], j["units_not_signed"])
                  for j in reg.list_jobs()}
        assert listed == {"HL-0001": ("B", "issued", [], ["a1", "a2"]),
                          "HL-0002": ("A", "passed", ["b1", "b2"], []),
                          "HL-0003": ("A", "issued", ["c1"], ["c2"]),
                          "HL-0004": ("A", "incomplete", [], [])}
        for number, (rev, state, passed, not_signed) in listed.items():
            one = reg.job_state(number)
            assert (one["revision"], one["state"], one["units_passed"], one["units_not_signed"]) == listed[number]
        page, total = reg.list_jobs_page(1, 3)
        assert total == 4 and [(j["number"], j["state"]) for j in page] == [
            ("HL-0004", "incomplete"), ("HL-0003", "issued"), ("HL-0002", "passed")]
