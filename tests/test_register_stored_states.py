"""Each job's state kept in the register (schema version 3): stored by the writers in the same
transaction as the records, dropped by the register's triggers when the records change, worked out
from the records where it is missing, upgraded from version 2 without losing a record."""

from __future__ import annotations

import sqlite3

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from conftest import SAMPLES, design_for_job, examples
from windsheet.cli.app import app
from windsheet.common.errors import InputError
from windsheet.records import change_count, stored_states
from windsheet.records.register import open_register, open_register_readonly
from windsheet.records.register_listing import cells_table, job_cells, table_lines

runner = CliRunner()
UNITS = {"A": ["s1", "s2"], "B": ["s1", "s2", "s3"]}


def _sha(job, rev):
    return f"{job}{rev}".encode().hex().ljust(64, "0")


def _issue(reg, job, rev):
    return reg.record_issue(design_for_job(job, rev, UNITS[rev]), "order", _sha(job, rev))


def _signoff(reg, job, rev, verdicts):
    reg.record_signoff({"job": job, "revision": rev,
                        "verdict": "pass" if set(verdicts.values()) == {"pass"} else "fail",
                        "units": [{"serial": s, "verdict": v, "lines": []} for s, v in verdicts.items()]},
                       _sha(job, rev), "QC")


def _by_hand(log):
    """Each job's state from the operations alone, written out here as the README words the rule:
    the latest issued revision; the last verdict of each serial signed at that revision; any failed
    unit: failed; else any incomplete: incomplete; else every unit of the issue passed: passed;
    else issued."""
    latest, signed = {}, {}
    for op in log:
        if op[0] == "issue":
            _, job, rev = op
            if rev not in signed.setdefault(job, {}):  # a revision issued again is a reprint, not an issue
                signed[job][rev] = {}
                latest[job] = rev
        else:
            _, job, rev, verdicts = op
            signed[job][rev].update(verdicts)
    out = {}
    for job, rev in latest.items():
        got = signed[job][rev]
        units = set(UNITS[rev])
        if not got:
            state = "issued"
        elif "fail" in got.values():
            state = "failed"
        elif "incomplete" in got.values():
            state = "incomplete"
        elif units <= {s for s, v in got.items() if v == "pass"}:
            state = "passed"
        else:
            state = "issued"
        out[job] = (rev, state, sorted(s for s, v in got.items() if v == "pass"))
    return out


operations = st.lists(st.one_of(
    st.tuples(st.just("issue"), st.sampled_from(["HL-1", "HL-2", "HL-3"]), st.sampled_from("AB")),
    st.tuples(st.just("signoff"), st.sampled_from(["HL-1", "HL-2", "HL-3"]), st.sampled_from("AB"),
              st.dictionaries(st.sampled_from(["s1", "s2", "s3"]), st.sampled_from(["pass", "fail", "incomplete"]),
                              min_size=1, max_size=3))), min_size=1, max_size=10)


@settings(max_examples=examples(25), deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(ops=operations)
def test_stored_states_are_the_states_of_the_records(tmp_path_factory, ops):
    path = tmp_path_factory.mktemp("states") / "reg.db"
    log = []
    with open_register(path) as reg:
        for op in ops:
            if op[0] == "issue":
                _issue(reg, op[1], op[2])
            elif op[1] in {o[1] for o in log if o[0] == "issue" and o[2] == op[2]}:
                _signoff(reg, op[1], op[2], op[3])
            else:
                continue  # a revision not issued is refused, as test_register holds
            log.append(op)
        stored = reg.list_jobs()
        worked_out = reg._states(live=True)
        assert stored_states.complete(reg.conn)
    # The stored states (what the listing reads) against the rule worked out by hand from the log.
    assert {j["number"]: (j["revision"], j["state"], j["units_passed"]) for j in stored} == _by_hand(log)
    # Every listed fact as the records give it, and the table's cells the same.
    assert stored == worked_out
    with open_register_readonly(path) as reg:
        assert reg.listing_cells() == [job_cells(j) for j in worked_out]
    assert runner.invoke(app, ["register", "--check", "--register", str(path)]).exit_code == 0


def _register(tmp_path, n=6):
    path = tmp_path / "reg.db"
    with open_register(path) as reg:
        for k in range(n):
            job = f"HL-{k:04d}"
            _issue(reg, job, "A")
            _signoff(reg, job, "A", {"s1": "pass", "s2": "pass" if k % 3 else "fail"})
    return path


def _tamper(path, sql):
    """One change made by hand, outside windsheet, as a shop's own script or a damaged disk would."""
    conn = sqlite3.connect(path)
    conn.execute(sql)
    conn.commit()
    conn.close()


def test_a_change_outside_windsheet_drops_the_stored_state_and_the_listing_reads_the_records(tmp_path):
    path = _register(tmp_path)
    conn = sqlite3.connect(path)
    # HL-0001 passed; its second unit's verdict is changed by hand to failed.
    assert conn.execute("SELECT state FROM job_states WHERE job = 'HL-0001'").fetchone() == ("passed",)
    conn.execute("UPDATE unit_signoffs SET unit_verdict = 'fail', verdict = 'fail' "
                 "WHERE job = 'HL-0001' AND serial = 's2'")
    conn.commit()
    # The trigger dropped the stored row: never a stale PASS.
    assert conn.execute("SELECT count(*) FROM job_states WHERE job = 'HL-0001'").fetchone() == (0,)
    conn.close()
    res = runner.invoke(app, ["register", "--register", str(path)])
    line = next(x for x in res.stdout.splitlines() if x.startswith("HL-0001"))
    assert line.split()[-3:-1] == ["failed", "1/2"], line
    # The next writer (of another job) stores it again, from the records.
    with open_register(path) as reg:
        _issue(reg, "HL-0100", "A")
        assert stored_states.complete(reg.conn)
        assert reg.conn.execute("SELECT state FROM job_states WHERE job = 'HL-0001'").fetchone() == ("failed",)
    assert runner.invoke(app, ["register", "--check", "--register", str(path)]).exit_code == 0


def test_the_whole_listing_reads_no_sign_off_and_the_writers_check_none(tmp_path):
    from windsheet.records import register_schema as schema

    path = _register(tmp_path, 40)
    with open_register_readonly(path) as reg:
        seen = []
        reg.conn.set_trace_callback(seen.append)
        rows = reg.listing_cells()
        jobs = reg.list_jobs()
        reg.conn.set_trace_callback(None)
        assert rows == [job_cells(j) for j in reg._states(live=True)] and len(jobs) == 40
        # The filters read the stored states as the records' way reads them (the bench's state filter).
        for customer, since in (("fenwick", None), (None, "2026-01-01"), ("nobody", None), (None, "2999-01-01")):
            assert reg._states(customer=customer, since=since) == reg._states(customer=customer, since=since,
                                                                              live=True)
        assert reg.list_jobs_page(2, 7, state="failed")[1] == 14  # HL-0000, -0003, … -0039: every third
        conn = reg.conn
        # Each: a count of the stored rows against the jobs, then one query (and once, whether the
        # covering index is there): a fixed number of queries whatever the register's size.
        assert len(seen) == 7, seen
        assert not [q for q in seen if "signoffs" in q], seen
        seen.clear()
        conn.set_trace_callback(seen.append)
        schema.check_listed(conn, str(path))
        conn.set_trace_callback(None)
        assert not [q for q in seen if "signoffs" in q], seen
        # The table reads one table newest issue first by its own key (no sort, no join); --json
        # reads the issues' other columns from their covering index (SQLite's own query plans).
        plan = [r[3] for r in conn.execute("EXPLAIN QUERY PLAN " + stored_states.TABLE_QUERY)]
        assert plan == ["SCAN job_states"], plan
        plan = " ".join(r[3] for r in conn.execute(
            "EXPLAIN QUERY PLAN " + stored_states.listing_query(schema.LISTING_INDEX)))
        assert "TEMP B-TREE" not in plan and "COVERING INDEX issues_listing" in plan, plan


def test_register_check_finds_a_stored_state_that_is_not_its_records(tmp_path):
    path = _register(tmp_path)
    # HL-0000 failed a unit; its stored state is written over as passed (no trigger watches this table).
    _tamper(path, "UPDATE job_states SET state = 'passed', units_passed = 2 WHERE job = 'HL-0000'")
    res = runner.invoke(app, ["register", "--check", "--register", str(path)])
    assert res.exit_code == 2 and len(res.stderr.splitlines()) == 1
    assert ("stored state of job 'HL-0000' differs from its records (state: stored 'passed', from the records "
            "'failed')") in res.stderr


def test_register_check_finds_a_stored_customer_that_is_not_the_jobs(tmp_path):
    path = _register(tmp_path)
    _tamper(path, "UPDATE job_states SET customer = 'Someone Else' WHERE job = 'HL-0002'")
    res = runner.invoke(app, ["register", "--check", "--register", str(path)])
    assert res.exit_code == 2 and "job 'HL-0002' differs from its records (customer: stored 'Someone Else'" in res.stderr
    # A job's customer changed by hand in the jobs table drops its stored row (a trigger): listed as changed.
    _tamper(path, "UPDATE jobs SET customer = 'Marlow Instruments' WHERE number = 'HL-0003'")
    listed = runner.invoke(app, ["register", "--register", str(path)]).stdout
    assert "Marlow Instruments" in next(x for x in listed.splitlines() if x.startswith("HL-0003"))


def test_a_register_without_its_triggers_is_refused_in_one_line(tmp_path):
    path = _register(tmp_path)
    _tamper(path, "DROP TRIGGER job_states_stale_unit_signoffs_update")
    before = path.read_bytes()
    for args in (["register"], ["register", "--issue", str(SAMPLES / "hl-0410-single.yaml")]):
        res = runner.invoke(app, args + ["--register", str(path)])
        assert res.exit_code == 2 and len(res.stderr.splitlines()) == 1, res.output
        assert "trigger 'job_states_stale_unit_signoffs_update' is missing" in res.stderr
    assert path.read_bytes() == before


def _as_version_2(path):
    """The register as windsheet wrote it at schema version 2: no stored states, no triggers."""
    conn = sqlite3.connect(path, isolation_level=None)
    for name in stored_states.trigger_names() + change_count.trigger_names():
        conn.execute(f"DROP TRIGGER {name}")
    conn.execute("DELETE FROM meta WHERE key IN ('changes', 'checked_changes')")
    conn.execute(f"DROP TABLE {stored_states.TABLE}")
    conn.execute("UPDATE meta SET value = '2' WHERE key = 'schema_version'")
    conn.execute("PRAGMA user_version = 2")
    conn.close()


def _records(path):
    conn = sqlite3.connect(path)
    try:
        return {t: conn.execute(f"SELECT * FROM {t} ORDER BY rowid").fetchall()
                for t in ("jobs", "issues", "signoffs", "unit_signoffs", "unit_lots", "reprints", "sheets")}
    finally:
        conn.close()


def test_a_version_2_register_is_read_as_it_is_and_upgraded_by_the_first_writer_losing_nothing(tmp_path):
    path = _register(tmp_path)
    with open_register_readonly(path) as reg:
        listed_v3 = reg.list_jobs()
    _as_version_2(path)
    records = _records(path)
    before = path.read_bytes()
    # Read-only: read as it is, the states worked out from the records, not a byte changed.
    with open_register_readonly(path) as reg:
        assert reg.version == 2 and reg.list_jobs() == listed_v3
        table = cells_table(reg.listing_cells())
    assert table == table_lines(listed_v3)
    assert path.read_bytes() == before
    # A migration that fails part-way leaves version 2 as it was.
    import windsheet.records.register as R

    real = R._states_from_records

    def fail(*a):
        raise InputError("test", "stopped part-way")
    R._states_from_records = fail
    try:
        with pytest.raises(InputError, match="stopped part-way"):
            open_register(path)
    finally:
        R._states_from_records = real
    with open_register_readonly(path) as reg:
        assert reg.version == 2
    # The first writer upgrades it in one transaction: every record kept, every state stored.
    with open_register(path) as reg:
        assert reg.version == 4 and stored_states.complete(reg.conn)
        assert reg.list_jobs() == listed_v3
    assert _records(path) == records
    res = runner.invoke(app, ["register", "--register", str(path)])
    assert res.stdout.splitlines() == table_lines(listed_v3)
    assert runner.invoke(app, ["register", "--check", "--register", str(path)]).exit_code == 0


@pytest.mark.parametrize("sql, refused", [
    # JSON that starts with a space is still an array: the first-character test only passes the plain case.
    ("UPDATE issues SET units_json = ' [\"s1\", \"s2\"]' WHERE id = 2", None),
    ("UPDATE issues SET units_json = ' {}' WHERE id = 2", "issues row 2 holds no valid JSON array in units_json"),
    ("UPDATE job_states SET tally_json = '[]' WHERE issue_id = 3",
     "job_states row 3 holds no valid JSON object in tally_json"),
    ("UPDATE job_states SET job = cast(x'48ff' as text) WHERE issue_id = 4", "job_states.job of row 4 is not valid UTF-8"),
])
def test_the_writers_check_reads_the_listed_json_and_text(tmp_path, sql, refused):
    from windsheet.records import register_schema as schema

    path = _register(tmp_path)
    conn = sqlite3.connect(path)
    conn.execute(sql)
    conn.commit()
    if refused is None:
        schema.check_listed(conn, str(path))
    else:
        with pytest.raises(InputError, match=refused):
            schema.check_listed(conn, str(path))
    conn.close()
    before = path.read_bytes()
    res = runner.invoke(app, ["register", "--issue", str(SAMPLES / "hl-0410-single.yaml"), "--register", str(path)])
    assert res.exit_code == (0 if refused is None else 2), res.output
    if refused is not None:
        assert len(res.stderr.splitlines()) == 1 and path.read_bytes() == before
