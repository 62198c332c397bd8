"""A writer scans what the listing reads only after a change made outside windsheet (schema version 4).

The register counts every row added, changed or removed in a listed table (triggers) and keeps the
count at which a writer last saw every listed row checked. These tests count the writers' scans
(``register_schema.check_listed``) and make each kind of change a shop's own script could make.
"""

from __future__ import annotations

import sqlite3

import pytest
from typer.testing import CliRunner

from conftest import SAMPLES
from test_register_stored_states import _issue, _register, _signoff, _tamper
from windsheet.cli.app import app
from windsheet.common.errors import InputError
from windsheet.records import change_count, register_schema, stored_states
from windsheet.records.register import open_register

runner = CliRunner()
ORDER = str(SAMPLES / "hl-0410-single.yaml")


@pytest.fixture
def scans(monkeypatch):
    """The writers' whole scans, counted."""
    seen = []
    real = register_schema.check_listed

    def counted(conn, label):
        seen.append(label)
        return real(conn, label)
    monkeypatch.setattr(register_schema, "check_listed", counted)
    return seen


def _counts(path):
    conn = sqlite3.connect(path)
    try:
        return change_count.count(conn), change_count.checked(conn)
    finally:
        conn.close()


def test_writers_after_writers_scan_nothing(tmp_path, scans):
    path = _register(tmp_path)
    now, checked = _counts(path)
    assert now == checked and now > 0  # the fill's own rows raised the count; each writer marked it
    for k in range(3):
        with open_register(path) as reg:
            _issue(reg, f"HL-1{k:03d}", "A")
            _signoff(reg, f"HL-1{k:03d}", "A", {"s1": "pass", "s2": "pass"})
        res = runner.invoke(app, ["register", "--issue", ORDER, "--register", str(path)])
        assert res.exit_code == 0, res.output
    assert scans == []
    after, checked = _counts(path)
    assert after == checked and after > now


def test_a_change_by_hand_is_scanned_once_by_the_next_writer(tmp_path, scans):
    path = _register(tmp_path)
    _tamper(path, "UPDATE jobs SET customer = 'Marlow Instruments' WHERE number = 'HL-0003'")
    now, checked = _counts(path)
    assert now == checked + 2  # one row changed outside windsheet, and the stored state it dropped
    with open_register(path) as reg:
        _issue(reg, "HL-2000", "A")
    assert len(scans) == 1  # on opening; the write that followed found the count where the scan left it
    with open_register(path) as reg:
        _issue(reg, "HL-2001", "A")
    assert len(scans) == 1


@pytest.mark.parametrize("sql", [
    # Issue 31's reproduction: the listing refuses this register, so every writer must.
    "UPDATE jobs SET customer = cast(x'fffe41' as text) WHERE number = 'HL-0002'",
    # A stored state written over by hand (no stale trigger watches job_states; the count does).
    "UPDATE job_states SET customer = cast(x'fffe41' as text) WHERE job = 'HL-0004'",
    "UPDATE job_states SET tally_json = '[]' WHERE job = 'HL-0001'",
])
def test_damage_made_by_hand_is_refused_by_every_writer(tmp_path, sql):
    path = _register(tmp_path)
    _tamper(path, sql)
    before = path.read_bytes()
    for args in (["register", "--issue", ORDER], ["traveller", ORDER, "-o", str(tmp_path / "t.html")]):
        res = runner.invoke(app, args + ["--register", str(path)])
        assert res.exit_code == 2 and len(res.stderr.splitlines()) == 1, res.output
        assert "register is damaged" in res.stderr
    assert path.read_bytes() == before
    assert not (tmp_path / "t.html").exists()


def test_damage_made_while_a_writer_has_the_register_open_is_refused_inside_its_write(tmp_path, scans):
    path = _register(tmp_path)
    with open_register(path) as reg:
        assert scans == []
        _tamper(path, "UPDATE jobs SET customer = cast(x'fffe41' as text) WHERE number = 'HL-0001'")
        count = _counts(path)[0]
        with pytest.raises(InputError, match="not valid UTF-8"):
            _issue(reg, "HL-3000", "A")
    assert scans and _counts(path)[0] == count  # scanned under the write lock; nothing written
    conn = sqlite3.connect(path)
    assert conn.execute("SELECT count(*) FROM issues WHERE job = 'HL-3000'").fetchone() == (0,)
    conn.close()


def test_a_count_removed_by_hand_means_a_scan_and_the_writer_restores_it(tmp_path, scans):
    path = _register(tmp_path)
    _tamper(path, "DELETE FROM meta WHERE key = 'changes'")
    assert _counts(path)[0] is None
    with open_register(path) as reg:
        _issue(reg, "HL-4000", "A")
    assert len(scans) == 1
    now, checked = _counts(path)
    assert now is not None and now == checked
    with open_register(path) as reg:
        _issue(reg, "HL-4001", "A")
    assert len(scans) == 1


def test_a_register_without_a_count_trigger_is_refused_in_one_line(tmp_path):
    path = _register(tmp_path)
    _tamper(path, "DROP TRIGGER change_count_unit_signoffs_insert")
    before = path.read_bytes()
    for args in (["register"], ["register", "--issue", ORDER]):
        res = runner.invoke(app, args + ["--register", str(path)])
        assert res.exit_code == 2 and len(res.stderr.splitlines()) == 1, res.output
        assert "trigger 'change_count_unit_signoffs_insert' is missing" in res.stderr
    assert path.read_bytes() == before


def test_a_version_3_register_gets_the_whole_check_then_the_count(tmp_path, scans):
    path = _register(tmp_path)
    conn = sqlite3.connect(path, isolation_level=None)
    for name in change_count.trigger_names():
        conn.execute(f"DROP TRIGGER {name}")
    conn.execute("DELETE FROM meta WHERE key IN ('changes', 'checked_changes')")
    conn.execute("UPDATE meta SET value = '3' WHERE key = 'schema_version'")
    conn.execute("PRAGMA user_version = 3")
    # Damage a version-3 register could hold unseen by any count: its first writer still refuses it.
    conn.execute("UPDATE jobs SET part = cast(x'c0' as text) WHERE number = 'HL-0005'")
    conn.close()
    res = runner.invoke(app, ["register", "--issue", ORDER, "--register", str(path)])
    assert res.exit_code == 2 and "register is damaged" in res.stderr, res.output
    _tamper(path, "UPDATE jobs SET part = 'Sense coil' WHERE number = 'HL-0005'")
    with open_register(path) as reg:
        assert reg.version == 4 and not change_count.missing_triggers(reg.conn)
        assert stored_states.complete(reg.conn) or reg.states_incomplete
        _issue(reg, "HL-5000", "A")
    assert len(scans) == 2  # the refused writer's and the upgrading writer's; none after
    with open_register(path) as reg:
        _issue(reg, "HL-5001", "A")
    assert len(scans) == 2 and _counts(path)[0] == _counts(path)[1]
