"""Job register (SQLite), atomic output files and guarded YAML reading."""

import hashlib
import os
import signal
import sqlite3
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest
from typer.testing import CliRunner

from conftest import design_for_job
from windsheet.common import fileio, yaml_reading
from windsheet.common.errors import InputError
from windsheet.records.register import (APPLICATION_ID, SCHEMA_VERSION, DEFAULT_FILE, ENV_VAR, open_register,
                                resolve_register_path)

ROOT = Path(__file__).resolve().parents[1]
SAMPLES = ROOT / "samples"
IS_ROOT = hasattr(os, "geteuid") and os.geteuid() == 0


def prediction(number="HL-0412", revision="A", order_text="order v1", units=("HL-0412-01", "HL-0412-02")):
    return design_for_job(number, revision, units, hashlib.sha256(order_text.encode()).hexdigest(),
                          part="Sense coil", customer="Fenwick Process Controls", issued_by="R. Okafor")


def result(p, verdicts=("pass", "pass"), inspector="M. Lindqvist"):
    units = [{"serial": s, "verdict": v, "lines": [{"key": "terminal.inductance", "measured": 4e-4}],
              "diagnosis": []} for s, v in zip(p.job.units, verdicts)]
    return {"job": p.job.number, "revision": p.job.revision, "order_hash": p.order_hash,
            "inspector": inspector, "verdict": "pass" if all(v == "pass" for v in verdicts) else "fail",
            "units": units}


def count(path, table):
    with sqlite3.connect(path) as c:
        return c.execute(f"SELECT COUNT(*) FROM {table}").fetchone()[0]


def integrity(path):
    with sqlite3.connect(path) as c:
        return c.execute("PRAGMA integrity_check").fetchone()[0]


# ---------------------------------------------------------------- atomic files

def test_atomic_write_replaces_and_interrupted_write_keeps_old(tmp_path, monkeypatch):
    target = tmp_path / "HL-0412.html"
    fileio.atomic_write_text(target, "old traveller")
    assert target.read_text() == "old traveller"

    real_fdopen = os.fdopen

    class HalfWriter:
        def __init__(self, fh):
            self.fh = fh

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.fh.close()

        def write(self, data):
            self.fh.write(data[: len(data) // 2])
            self.fh.flush()
            raise OSError(28, "No space left on device")

    monkeypatch.setattr(fileio.os, "fdopen", lambda fd, mode: HalfWriter(real_fdopen(fd, mode)))
    with pytest.raises(InputError) as exc:
        fileio.atomic_write_text(target, "new traveller " * 1000)
    assert str(target) in str(exc.value)
    assert target.read_text() == "old traveller"
    assert [p.name for p in tmp_path.iterdir()] == ["HL-0412.html"]  # no temp file left


def test_atomic_write_interrupted_at_rename_keeps_old(tmp_path, monkeypatch):
    target = tmp_path / "HL-0412.pdf"
    fileio.atomic_write_bytes(target, b"%PDF old")

    def boom(src, dst):
        raise KeyboardInterrupt

    monkeypatch.setattr(fileio.os, "replace", boom)
    with pytest.raises(KeyboardInterrupt):
        fileio.atomic_write_bytes(target, b"%PDF new")
    assert target.read_bytes() == b"%PDF old"
    assert len(list(tmp_path.iterdir())) == 1


def test_atomic_write_to_missing_folder_names_the_path(tmp_path):
    target = tmp_path / "no-such-folder" / "out.json"
    with pytest.raises(InputError) as exc:
        fileio.atomic_write_text(target, "{}")
    assert exc.value.path == str(target) and "does not exist" in exc.value.message


@pytest.mark.skipif(IS_ROOT, reason="root ignores folder permissions")
def test_atomic_write_without_permission_names_the_path(tmp_path):
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(0o500)
    try:
        with pytest.raises(InputError) as exc:
            fileio.atomic_write_text(folder / "out.json", "{}")
        assert exc.value.path == str(folder / "out.json")
    finally:
        folder.chmod(0o700)


# ---------------------------------------------------------------- hostile YAML (common practice)

@pytest.mark.parametrize("raw, words", [
    (b"a: &a [x, x]\nb: &b [*a, *a]\nc: [*b, *b]\n", "aliases"),             # alias bomb
    (b"a: " + b"[" * 500 + b"]" * 500, "nested"),
    (b"a: 1\na: 2\n", "appears twice"),
    (b"a: !!python/object/apply:os.system ['true']\n", "YAML tag"),
    (b"\x89PNG\r\n\x1a\n\x00\x00binary", "UTF-8"),
    (b"a: [1, 2\n", "not valid YAML"),
])
def test_hostile_yaml_is_refused(tmp_path, raw, words):
    path = tmp_path / "bad.measured.yaml"
    path.write_bytes(raw)
    with pytest.raises(InputError) as exc:
        yaml_reading.read_yaml_file(path)
    # A refusal names the file, or the field when it has one (a tag on 'a').
    assert words in exc.value.message and exc.value.path == ("a" if words == "YAML tag" else str(path))


def test_multi_megabyte_yaml_is_refused(tmp_path):
    path = tmp_path / "big.yaml"
    path.write_bytes(b"# " + b"x" * 3_000_000 + b"\n")
    with pytest.raises(InputError) as exc:
        yaml_reading.read_yaml_file(path)
    assert "larger than" in exc.value.message


# ---------------------------------------------------------------- register basics

def test_register_path_option_env_default(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    monkeypatch.delenv(ENV_VAR, raising=False)
    assert resolve_register_path() == tmp_path / DEFAULT_FILE
    monkeypatch.setenv(ENV_VAR, str(tmp_path / "env.db"))
    assert resolve_register_path() == tmp_path / "env.db"
    assert resolve_register_path(str(tmp_path / "opt.db")) == tmp_path / "opt.db"


def test_new_register_carries_marker_and_schema_version(tmp_path):
    path = tmp_path / "reg.db"
    open_register(path).close()
    header = path.read_bytes()[:100]
    # SQLite file format: application_id at offset 68, user_version at 60 (sqlite.org/fileformat.html).
    assert int.from_bytes(header[68:72], "big") == APPLICATION_ID
    assert int.from_bytes(header[60:64], "big") == SCHEMA_VERSION == 4
    with sqlite3.connect(path) as c:
        assert c.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
        assert dict(c.execute("SELECT key, value FROM meta"))["application"] == "windsheet-register"


def test_issue_signoff_states_and_history(tmp_path):
    path = tmp_path / "reg.db"
    p = prediction()
    with open_register(path) as reg:
        reg.record_issue(p, "order v1")
        assert reg.list_jobs()[0]["state"] == "issued"
        reg.record_signoff(result(p, ("pass", "fail")))
        assert reg.list_jobs()[0]["state"] == "failed"
        reg.record_signoff(result(p, ("pass", "pass")))
        st = reg.list_jobs()[0]
        assert st["state"] == "passed" and st["units_passed"] == ["HL-0412-01", "HL-0412-02"]
        # Who issued it, as issued (the listing's unit tally once overwrote it with the tally).
        assert st["issued_by"] == "R. Okafor" and reg.job_state("HL-0412")["issued_by"] == "R. Okafor"
        events = reg.job_history("HL-0412")["events"]
    assert [e["event"] for e in events] == ["issued", "signed off", "signed off"]
    assert [e["verdict"] for e in events[1:]] == ["fail", "pass"]


def test_partial_signoff_leaves_job_issued(tmp_path):
    p = prediction()
    with open_register(tmp_path / "reg.db") as reg:
        reg.record_issue(p, "order v1")
        r = result(p)
        r["units"] = r["units"][:1]
        reg.record_signoff(r)
        st = reg.list_jobs()[0]
    assert st["state"] == "issued" and st["units_not_signed"] == ["HL-0412-02"]


def test_signoff_of_changed_order_is_refused_until_new_revision(tmp_path):
    path = tmp_path / "reg.db"
    p1 = prediction(order_text="order v1")
    p2 = prediction(order_text="order v2 (turns changed)")
    with open_register(path) as reg:
        reg.record_issue(p1, "order v1")
        with pytest.raises(InputError) as exc:
            reg.record_signoff(result(p2))
        assert "changed since revision A" in exc.value.message and "new revision" in exc.value.message
        # The same revision may not be re-issued with other content.
        with pytest.raises(InputError):
            reg.record_issue(p2, "order v2 (turns changed)")
        p2b = prediction(revision="B", order_text="order v2 (turns changed)")
        reg.record_issue(p2b, "order v2 (turns changed)")
        reg.record_signoff(result(p2b))
        assert reg.list_jobs()[0]["revision"] == "B"
    assert count(path, "signoffs") == 1


def test_signoff_of_unissued_job_is_refused(tmp_path):
    with open_register(tmp_path / "reg.db") as reg:
        with pytest.raises(InputError) as exc:
            reg.record_signoff(result(prediction()))
    assert "no traveller issued" in exc.value.message


# ---------------------------------------------------------------- foreign and damaged files

FOREIGN = {
    "text": b"job,part\nHL-0412,coil\n",
    "binary": bytes(range(256)) * 8,
    "empty": b"",
}


@pytest.mark.parametrize("kind", sorted(FOREIGN))
def test_foreign_file_is_refused_unchanged(tmp_path, kind):
    path = tmp_path / "reg.db"
    path.write_bytes(FOREIGN[kind])
    before = path.read_bytes()
    with pytest.raises(InputError) as exc:
        open_register(path)
    assert "not a windsheet register" in exc.value.message
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["reg.db"]


def test_foreign_sqlite_database_is_refused_unchanged(tmp_path):
    path = tmp_path / "stock.db"
    with sqlite3.connect(path) as c:
        c.execute("CREATE TABLE bins (part TEXT, qty INTEGER)")
        c.execute("INSERT INTO bins VALUES ('bobbin', 40)")
    before = path.read_bytes()
    with pytest.raises(InputError) as exc:
        open_register(path)
    assert "SQLite database but not a windsheet register" in exc.value.message
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["stock.db"]


def test_damaged_register_is_refused(tmp_path):
    path = tmp_path / "reg.db"
    with open_register(path) as reg:
        reg.record_issue(prediction(), "order v1")
    data = bytearray(path.read_bytes())
    page = int.from_bytes(data[16:18], "big")
    data[page + 8: page * 3] = b"\xa5" * (page * 2 - 8)  # scribble over pages 2 and 3
    path.write_bytes(bytes(data))
    with pytest.raises(InputError) as exc:
        open_register(path)
    assert "damaged" in exc.value.message


def test_newer_schema_is_refused(tmp_path):
    path = tmp_path / "reg.db"
    open_register(path).close()
    with sqlite3.connect(path) as c:
        c.execute("PRAGMA user_version = 7")
    with pytest.raises(InputError) as exc:
        open_register(path)
    assert "newer" in exc.value.message


# ---------------------------------------------------------------- faults across processes

CHILD_PRELUDE = textwrap.dedent("""
    import hashlib, sys, time
    sys.path.insert(0, TESTS)
    from conftest import design_for_job
    from windsheet.records import register as R
    path = sys.argv[1]
    def prediction():
        return design_for_job("HL-0412", "A", ["HL-0412-01", "HL-0412-02"],
                              hashlib.sha256(b"order v1").hexdigest())
    def result(tag):
        p = prediction()
        return {"job": "HL-0412", "revision": "A", "order_hash": p.order_hash, "inspector": tag,
                "verdict": "pass", "units": [{"serial": s, "verdict": "pass", "lines": [], "diagnosis": []}
                                             for s in p.job.units]}
""")


def run_child(body, *args):
    prelude = CHILD_PRELUDE.replace("TESTS", repr(str(Path(__file__).resolve().parent)))
    return subprocess.Popen([sys.executable, "-c", prelude + textwrap.dedent(body), *map(str, args)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def test_register_survives_a_process_killed_mid_write(tmp_path):
    path = tmp_path / "reg.db"
    with open_register(path) as reg:
        reg.record_issue(prediction(order_text="order v1"), "order v1")
        for _ in range(3):
            reg.record_signoff(result(prediction(order_text="order v1")))
    child = run_child("""
        reg = R.open_register(path)
        real = R.Register._insert_unit
        def stall(self, *a, **k):
            real(self, *a, **k)
            print("inside", flush=True)   # rows written, transaction still open
            time.sleep(60)
        R.Register._insert_unit = stall
        reg.record_signoff(result("killed"))
        print("committed", flush=True)
    """, path)
    try:
        assert child.stdout.readline().strip() == "inside"
        child.send_signal(signal.SIGKILL)
        child.wait(timeout=30)
    finally:
        if child.poll() is None:
            child.kill()
    assert child.returncode == -signal.SIGKILL
    with open_register(path) as reg:
        history = reg.job_history("HL-0412")
        reg.record_signoff(result(prediction(order_text="order v1"), inspector="after the crash"))
    signed = [e for e in history["events"] if e["event"] == "signed off"]
    assert len(signed) == 3 and all(e["by"] != "killed" for e in signed)
    assert count(path, "unit_signoffs") == 8 and count(path, "signoffs") == 4
    assert integrity(path) == "ok"


def test_two_benches_signing_off_at_once(tmp_path):
    path = tmp_path / "reg.db"
    with open_register(path) as reg:
        reg.record_issue(prediction(order_text="order v1"), "order v1")
    body = """
        tag = sys.argv[2]
        for i in range(40):
            with R.open_register(path, timeout=30) as reg:
                reg.record_signoff(result(f"{tag}-{i}"))
        print("done", flush=True)
    """
    benches = [run_child(body, path, tag) for tag in ("bench1", "bench2")]
    outs = [b.communicate(timeout=300) for b in benches]
    assert [b.returncode for b in benches] == [0, 0], [o[1] for o in outs]
    assert count(path, "signoffs") == 80 and count(path, "unit_signoffs") == 160
    with sqlite3.connect(path) as c:
        names = {r[0] for r in c.execute("SELECT inspector FROM signoffs")}
    assert names == {f"bench{b}-{i}" for b in (1, 2) for i in range(40)}
    assert integrity(path) == "ok"


def test_locked_register_times_out_with_a_clear_message(tmp_path):
    path = tmp_path / "reg.db"
    p = prediction()
    with open_register(path) as reg:
        reg.record_issue(p, "order v1")
    holder = sqlite3.connect(path, isolation_level=None)
    holder.execute("BEGIN IMMEDIATE")
    try:
        with open_register(path, timeout=0.2) as reg:
            with pytest.raises(InputError) as exc:
                reg.record_signoff(result(p))
    finally:
        holder.execute("ROLLBACK")
        holder.close()
    assert "locked by another writer" in exc.value.message
    assert count(path, "signoffs") == 0
    with open_register(path, timeout=0.2) as reg:
        reg.record_signoff(result(p))
    assert count(path, "signoffs") == 1


# ---------------------------------------------------------------- the commands on the samples

ORDER = SAMPLES / "hl-0412-bifilar-aiding.yaml"


@pytest.fixture()
def cli():
    from windsheet.cli.app import app
    runner = CliRunner()
    return lambda *args: runner.invoke(app, [str(a) for a in args])


def test_signoff_commands_on_samples(tmp_path, cli):
    reg = tmp_path / "reg.db"
    refused = cli("signoff", ORDER, SAMPLES / "HL-0412.measured.yaml", "--register", reg)
    assert refused.exit_code == 2 and not reg.exists()
    assert cli("register", "--issue", ORDER, "--register", reg).exit_code == 0
    good = cli("signoff", ORDER, SAMPLES / "HL-0412.measured.yaml", "--register", reg, "--json")
    assert good.exit_code == 0, good.output
    bad = cli("signoff", ORDER, SAMPLES / "HL-0412-reversed.measured.yaml", "--register", reg,
              "--inspector", "T. Vance")
    assert bad.exit_code == 1
    assert "HL-0412-02: FAIL" in bad.output and "strand A reversed" in bad.output
    listing = cli("register", "--register", reg)
    assert listing.exit_code == 0 and "failed" in listing.output
    history = cli("register", "HL-0412", "--register", reg)
    assert history.exit_code == 0 and history.output.count("signed off") == 2


def test_bad_measured_file_writes_nothing(tmp_path, cli):
    reg = tmp_path / "reg.db"
    assert cli("register", "--issue", ORDER, "--register", reg).exit_code == 0
    before = count(reg, "signoffs")
    text = (SAMPLES / "HL-0412.measured.yaml").read_text().replace("0.8698 ohm", "0.8698")
    bad = tmp_path / "bad.measured.yaml"
    bad.write_text(text)
    out = cli("signoff", ORDER, bad, "--register", reg)
    assert out.exit_code == 2
    assert "units[0].strands.B.resistance" in out.output
    assert count(reg, "signoffs") == before
