"""The job register: an SQLite file that keeps the issued travellers and sign-offs.

Safety rules, in order of importance:

* A file that is not a windsheet register is refused and never written to:
  the 100-byte SQLite header is read as plain bytes first, so not even a
  journal-mode change touches a foreign file.
* Each command is one ``BEGIN IMMEDIATE`` transaction: a killed process loses
  only its own uncommitted work (SQLite's WAL journal rolls it back).
* A new register is built in a temporary file and linked into place, so a
  half-created register never exists under the real name.
* Writers wait a bounded time for one another, then give a clear message.
"""

from __future__ import annotations

import datetime as _dt
import json
import os
import sqlite3
import tempfile
from contextlib import contextmanager
from pathlib import Path
from typing import Optional

from windsheet.common.errors import InputError, quoted
from windsheet.records import register_schema as schema
from windsheet.common.fileio import require_regular_file
from .register_schema import SCHEMA_VERSION
from .register_checks import (APPLICATION, APPLICATION_ID, _check_contents, _check_header, _check_writable,  # noqa: F401
                              _disk_fault, _is_locked, _locked_error, _one_line, _read_header, _read_only_error,
                              _reads)
from .register_states import JobStates
from windsheet.records import change_count, stored_states
from .sheet_ledger import finish_pending, record_pending
from windsheet.design.state_rules import recorded_state
from .traceability import UNIT_LOTS_SCHEMA, ensure_table, insert_unit_lots

DEFAULT_FILE = "windsheet-register.db"
ENV_VAR = "WINDSHEET_REGISTER"
DEFAULT_TIMEOUT_S = 10.0

_SCHEMA = """
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE jobs (
    number TEXT PRIMARY KEY,
    part TEXT, customer TEXT,
    first_issued_at TEXT NOT NULL
);
CREATE TABLE issues (
    id INTEGER PRIMARY KEY,
    job TEXT NOT NULL REFERENCES jobs(number),
    revision TEXT NOT NULL,
    order_sha256 TEXT NOT NULL,
    order_text TEXT NOT NULL,
    predictions_json TEXT NOT NULL,
    units_json TEXT NOT NULL,
    issued_by TEXT,
    issued_at TEXT NOT NULL
);
CREATE INDEX issues_job ON issues(job, revision);
CREATE TABLE signoffs (
    id INTEGER PRIMARY KEY,
    job TEXT NOT NULL REFERENCES jobs(number),
    issue_id INTEGER NOT NULL REFERENCES issues(id),
    revision TEXT NOT NULL,
    order_sha256 TEXT NOT NULL,
    inspector TEXT,
    verdict TEXT NOT NULL CHECK (verdict IN ('pass', 'fail')),
    result_json TEXT NOT NULL,
    signed_at TEXT NOT NULL
);
CREATE INDEX signoffs_job ON signoffs(job);
CREATE TABLE unit_signoffs (
    id INTEGER PRIMARY KEY,
    signoff_id INTEGER NOT NULL REFERENCES signoffs(id),
    job TEXT NOT NULL,
    serial TEXT NOT NULL,
    verdict TEXT NOT NULL CHECK (verdict IN ('pass', 'fail')),
    measurements_json TEXT NOT NULL,
    inspector TEXT,
    signed_at TEXT NOT NULL
);
CREATE INDEX unit_signoffs_job ON unit_signoffs(job, serial);
"""



def resolve_register_path(option: Optional[str] = None) -> Path:
    """The register file: ``--register``, else ``$WINDSHEET_REGISTER``, else the working directory's."""
    if option:
        return Path(option)
    env = os.environ.get(ENV_VAR)
    if env:
        return Path(env)
    return Path.cwd() / DEFAULT_FILE


def _now() -> str:
    return _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds")


def _dumps(obj) -> str:
    try:
        return json.dumps(obj, allow_nan=False, sort_keys=True, separators=(",", ":"))
    except ValueError as exc:
        raise InputError("register", f"cannot record a value that is not finite: {exc}") from None


# --- Creating -------------------------------------------------------------------------

def _create(path: Path, label: str) -> None:
    """Build a fresh register beside ``path`` and link it in; never replaces a file."""
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(label, f"cannot create the register: folder {str(folder)!r} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".new", dir=folder)
    except PermissionError:
        raise InputError(label, "cannot create the register: no write permission in its folder") from None
    except OSError as exc:
        raise InputError(label, f"cannot create the register: {exc.strerror or exc}") from None
    os.close(fd)
    umask = os.umask(0)
    os.umask(umask)
    try:
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp's 0600 would lock out the other benches
        conn = sqlite3.connect(tmp, isolation_level=None)
        try:
            conn.execute("PRAGMA journal_mode = DELETE")
            conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
            conn.execute("BEGIN")
            for stmt in filter(str.strip, (_SCHEMA + ";" + UNIT_LOTS_SCHEMA).split(";")):
                conn.execute(stmt)
            conn.execute("INSERT INTO meta VALUES ('application', ?)", (APPLICATION,))
            conn.execute("INSERT INTO meta VALUES ('schema_version', '1')")
            conn.execute("INSERT INTO meta VALUES ('created_at', ?)", (_now(),))
            conn.execute("PRAGMA user_version = 1")
            conn.execute("COMMIT")
            # A fresh register takes the same steps as an old one: version 1, then each migration.
            schema.migrate(conn, 1, _now(), states=list)
        finally:
            conn.close()
        with open(tmp, "rb") as fh:
            os.fsync(fh.fileno())
        try:
            # link() fails if the name exists: a register made meanwhile by another bench wins.
            os.link(tmp, path)
        except FileExistsError:
            pass
        except OSError:
            # File systems without hard links: fall back to a guarded rename.
            if not path.exists():
                os.replace(tmp, path)
    finally:
        try:
            os.unlink(tmp)
        except OSError:
            pass


# --- The register ---------------------------------------------------------------------

class Register(JobStates):
    """An open job register; use :func:`open_register`."""

    #: Schema version of the open file (a read-only old register stays at its own).
    version = SCHEMA_VERSION
    #: Lines about sheets an interrupted run left, finished on opening (see sheet_ledger).
    repairs: list = []
    #: Opened for writing with a job lacking its stored state: the first write stores it.
    states_incomplete = False
    #: ``(change count,)`` at which this writer scanned every listed row (else ``None``).
    scanned_at = None

    def __init__(self, conn: sqlite3.Connection, path: Path, timeout: float):
        self.conn = conn
        self.path = path
        self.label = str(path)
        self.timeout = timeout

    def close(self) -> None:
        self.conn.close()

    def _check_changes(self) -> None:
        """Inside the write lock: what the listing reads of every row, when a listed row changed
        outside windsheet since the last writer's check (and since this one's scan on opening)."""
        if self.version < 4:
            return
        now = change_count.count(self.conn)
        if change_count.needs_check(self.conn, now) and (now,) != self.scanned_at:
            schema.check_listed(self.conn, self.label)
            self.scanned_at = (now,)

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    @contextmanager
    def transaction(self):
        """One ``BEGIN IMMEDIATE`` ... ``COMMIT``: the write lock is taken up front."""
        try:
            self.conn.execute("BEGIN IMMEDIATE")
        except sqlite3.OperationalError as exc:
            if _is_locked(exc):
                raise _locked_error(self.label) from None
            raise _disk_fault(self.label, exc) or InputError(self.label, f"cannot write the register: {exc}") from None
        try:
            self._check_changes()
            yield self.conn
            if self.version >= 4:
                change_count.mark_checked(self.conn)  # this writer's rows, and every one it checked
        except sqlite3.OperationalError as exc:
            self._rollback()
            fault = _disk_fault(self.label, exc)
            if fault is None:
                raise
            raise fault from None
        except sqlite3.DatabaseError as exc:
            # A page the write itself meets is damaged (the writers' check reads only what the listing
            # reads, and only after a change made outside windsheet): rolled back, refused in one line.
            self._rollback()
            raise self._damaged(exc) from None
        except BaseException:
            self._rollback()
            raise
        try:
            self.conn.execute("COMMIT")
        except sqlite3.OperationalError as exc:
            self._rollback()
            if _is_locked(exc):
                raise _locked_error(self.label) from None
            raise _disk_fault(self.label, exc) or InputError(self.label, f"cannot write the register: {exc}") from None
        except sqlite3.DatabaseError as exc:
            self._rollback()
            raise self._damaged(exc) from None

    def _damaged(self, exc: sqlite3.DatabaseError) -> InputError:
        return _disk_fault(self.label, exc) or InputError(
            self.label, f"register is damaged ({_one_line(exc)}); restore it from a backup")

    def _rollback(self) -> None:
        # SQLite may have rolled back already (a full disk does that); nothing is half-written either way.
        try:
            self.conn.execute("ROLLBACK")
        except sqlite3.DatabaseError:
            pass

    # -- issue -------------------------------------------------------------------------

    def record_issue(self, design, order_text: str, order_sha256: Optional[str] = None,
                     revision: Optional[str] = None, sheet=None) -> int:
        """Record that a traveller was issued; returns the issue id.

        Re-issuing the same revision with the same content (a reprint: the
        same traveller as A4, Letter or HTML) is recorded as a reprint of that
        issue, whose id is returned.  The same revision with different content
        is refused: a changed order needs a new revision.
        """
        return self.issue_or_reprint(design, order_text, order_sha256, revision, sheet)[0]

    def issue_or_reprint(self, design, order_text: str, order_sha256: Optional[str] = None,
                         revision: Optional[str] = None, sheet=None) -> tuple[int, str]:
        """Like :meth:`record_issue`; returns ``(issue id, "issued" or "reprinted")``.

        ``design`` is the :class:`~windsheet.design.model.Design` the traveller shows; it is
        stored whole, as its JSON, and sign-off judges the units against it.
        """
        job = design.job
        number = job.number
        if not number:
            raise InputError("job.number", "the prediction has no job number")
        revision = str(revision if revision is not None else (job.revision or "-"))
        order_sha256 = order_sha256 or design.order_hash
        if not order_sha256:
            raise InputError("order", "no order hash to record")
        with self.transaction() as c:
            self._check_job_records(c, number)
            for (sha,) in c.execute("SELECT DISTINCT order_sha256 FROM issues WHERE job = ? AND revision = ?",
                                    (number, revision)):
                if sha != order_sha256:
                    raise InputError("job.revision",
                                     f"revision {revision} of job {number} was issued with different order "
                                     f"content (sha256 {sha[:12]}…, now {order_sha256[:12]}…); "
                                     "give the changed order a new revision")
            now = _now()
            first = c.execute("SELECT id FROM issues WHERE job = ? AND revision = ? ORDER BY id LIMIT 1",
                              (number, revision)).fetchone()
            if first is not None:
                c.execute("INSERT INTO reprints (issue_id, printed_by, printed_at) VALUES (?, ?, ?)",
                          (first[0], job.issued_by, now))
                if sheet is not None:
                    record_pending(c, sheet, first[0], now)
                return int(first[0]), "reprinted"
            c.execute("INSERT OR IGNORE INTO jobs VALUES (?, ?, ?, ?)", (number, job.part, job.customer, now))
            c.execute("UPDATE jobs SET part = ?, customer = ? WHERE number = ?", (job.part, job.customer, number))
            cur = c.execute(
                "INSERT INTO issues (job, revision, order_sha256, order_text, predictions_json, units_json,"
                " issued_by, issued_at, design_state) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
                (number, revision, order_sha256, order_text, _dumps(design.as_json()),
                 _dumps(list(job.units)), job.issued_by, now, design.state.state))
            if sheet is not None:
                record_pending(c, sheet, cur.lastrowid, now)
            self.store_state(number)  # the job's state at its new issue, in the same transaction
            return int(cur.lastrowid), "issued"

    def _check_job_records(self, c, number: str) -> None:
        """The job's own issue records, checked before a writer adds to them (a reprint points at
        one): each holds a JSON object. Other jobs' records are ``register --check``'s."""
        bad = c.execute("SELECT id FROM issues WHERE job = ? AND NOT (json_valid(predictions_json) AND "
                        "json_type(predictions_json) = 'object') ORDER BY id LIMIT 1", (number,)).fetchone()
        if bad is not None:
            raise InputError(self.label, f"register is damaged: issues row {bad[0]} holds no valid JSON object "
                                         "in predictions_json; restore it from a backup")

    # -- sign-off ----------------------------------------------------------------------

    def _issue_for(self, c, number: str, revision: str, order_sha256: str) -> int:
        rows = c.execute("SELECT id, revision, order_sha256 FROM issues WHERE job = ? ORDER BY id",
                         (number,)).fetchall()
        if not rows:
            raise InputError("job.number", f"job {number} has no traveller issued in register {self.label}; "
                                           "issue the traveller first (or: windsheet register --issue ORDER.yaml)")
        same_rev = [r for r in rows if r[1] == revision]
        match = [r for r in same_rev if r[2] == order_sha256]
        if match:
            return int(match[-1][0])
        if same_rev:
            raise InputError("order", f"the order's content changed since revision {revision} of job {number} "
                                      f"was issued (sha256 {same_rev[-1][2][:12]}…, now {order_sha256[:12]}…); "
                                      "refusing to sign off — issue the changed order as a new revision")
        issued = ", ".join(sorted({r[1] for r in rows}))
        raise InputError("job.revision", f"revision {revision} of job {number} has not been issued "
                                         f"(issued: {issued}); issue its traveller first")

    @_reads
    def find_issue(self, number: str, revision: Optional[str], order_sha256: str):
        """The issue a sign-off of this order belongs to, and the design it was issued with.

        Raises the same refusals as :meth:`record_signoff`.
        """
        issue_id = self._issue_for(self.conn, number, str(revision or "-"), order_sha256)
        return issue_id, self.issued_design(issue_id)

    def record_signoff(self, result: dict, order_sha256: Optional[str] = None,
                       inspector: Optional[str] = None, measured_units: Optional[list] = None,
                       sheet=None) -> int:
        """Record a sign-off (the dict from :func:`windsheet.qc.signoff.evaluate_signoff`).

        ``measured_units`` optionally gives the raw readings per unit (same order
        as ``result["units"]``); each unit row stores them with its evaluated lines.
        Refused when the order content differs from the issued revision.
        """
        number = result.get("job")
        revision = str(result.get("revision") or "-")
        order_sha256 = order_sha256 or result.get("order_hash")
        inspector = inspector or result.get("inspector")
        units = result.get("units") or []
        with self.transaction() as c:
            self._check_job_records(c, number)
            issue_id = self._issue_for(c, number, revision, order_sha256)
            now = _now()
            cur = c.execute(
                "INSERT INTO signoffs (job, issue_id, revision, order_sha256, inspector, verdict, result_json,"
                " signed_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
                (number, issue_id, revision, order_sha256, inspector, _column_verdict(result["verdict"]),
             _dumps(result), now))
            signoff_id = int(cur.lastrowid)
            for k, unit in enumerate(units):
                raw = measured_units[k] if measured_units else None
                self._insert_unit(c, signoff_id, number, unit, raw, inspector, now)
            if sheet is not None:
                record_pending(c, sheet, signoff_id, now)
            self.store_state(number)  # the job's state with these units, in the same transaction
            return signoff_id

    def mark_sheet(self, sheet_id: int, state: str) -> None:
        """The sheet recorded as ``sheet_id`` is now ``placed`` (or ``unprinted``)."""
        with self.transaction() as c:
            c.execute("UPDATE sheets SET state = ? WHERE id = ?", (state, int(sheet_id)))

    def finish_sheets(self) -> list[str]:
        """Finish sheets a crashed run left pending (see :mod:`windsheet.records.sheet_ledger`)."""
        if self.version < 2 or self.conn.execute(
                "SELECT 1 FROM sheets WHERE state = 'pending' LIMIT 1").fetchone() is None:
            return []
        with self.transaction() as c:
            return finish_pending(c)

    def _insert_unit(self, c, signoff_id, number, unit, raw, inspector, now):
        c.execute(
            "INSERT INTO unit_signoffs (signoff_id, job, serial, verdict, measurements_json, inspector,"
            " signed_at, unit_verdict) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
            (signoff_id, number, unit["serial"], _column_verdict(unit["verdict"]),
             _dumps({"readings": raw, "lines": unit.get("lines"), "diagnosis": unit.get("diagnosis"),
                     "verdict": unit["verdict"], "waived": unit.get("waived") or {},
                     "design_status": unit.get("design_status")}),
             inspector, now, unit["verdict"]))
        insert_unit_lots(c, signoff_id, number, unit["serial"], unit.get("trace"), now)

    # -- reading -----------------------------------------------------------------------

    @_reads
    def job_history(self, number: str) -> dict:
        """Every issue and sign-off of a job, oldest first."""
        events = []
        for rid, rev, sha, at, by in self.conn.execute(
                "SELECT id, revision, order_sha256, issued_at, issued_by FROM issues WHERE job = ? ORDER BY id",
                (number,)):
            status = recorded_state(self.issued_record(rid))["state"]
            events.append({"event": "issued", "id": rid, "revision": rev, "order_sha256": sha, "at": at,
                           "by": by, "design_status": status})
            if self._has_reprints():
                for pid, pby, pat in self.conn.execute(
                        "SELECT id, printed_by, printed_at FROM reprints WHERE issue_id = ? ORDER BY id", (rid,)):
                    events.append({"event": "reprinted", "id": pid, "revision": rev, "order_sha256": sha,
                                   "at": pat, "by": pby, "design_status": status})
        for sid, rev, sha, insp, verdict, at in self.conn.execute(
                "SELECT id, revision, order_sha256, inspector, verdict, signed_at FROM signoffs"
                " WHERE job = ? ORDER BY id", (number,)):
            units = [{"serial": s, "verdict": _unit_verdict(v, m)} for s, v, m in self.conn.execute(
                "SELECT serial, verdict, measurements_json FROM unit_signoffs WHERE signoff_id = ? ORDER BY id",
                (sid,))]
            events.append({"event": "signed off", "id": sid, "revision": rev, "order_sha256": sha,
                           "at": at, "by": insp, "verdict": verdict, "units": units})
        if not events:
            raise InputError("job", f"job {number} is not in register {self.label}")
        order = {"issued": 0, "reprinted": 1}
        events.sort(key=lambda e: (e["at"], order.get(e["event"], 2), e["id"]))
        return {"number": number, "state": self.job_state(number), "events": events}

    def _has_reprints(self) -> bool:
        return self.conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'reprints'"
                                 ).fetchone() is not None

    @_reads
    def issued_record(self, issue_id: int) -> dict:
        """The design an issue was recorded with, as its stored JSON (any version)."""
        row = self.conn.execute("SELECT predictions_json FROM issues WHERE id = ?", (issue_id,)).fetchone()
        if row is None:
            raise InputError("register", f"no issue {issue_id}")
        try:
            p = json.loads(row[0])
        except ValueError:
            p = None
        if not isinstance(p, dict):  # refused at its row, as register --check names it
            raise InputError(self.label, f"register is damaged: issues row {issue_id} holds no valid JSON object "
                                         "in predictions_json; restore it from a backup")
        if not isinstance(p.get("job"), dict):
            raise ValueError(f"issue {issue_id}: its prediction is not a prediction")
        return p

    @_reads
    def issued_design(self, issue_id: int):
        """The :class:`~windsheet.design.model.Design` an issue was recorded with; an earlier
        version's record is read through :func:`windsheet.design.legacy.read_design`."""
        from windsheet.design.legacy import read_design

        return read_design(self.issued_record(issue_id))


def open_register(path=None, timeout: float = DEFAULT_TIMEOUT_S, create: bool = True) -> Register:
    """Open (or create) the job register at ``path``.

    Parameters
    ----------
    path : str or Path, optional
        Register file; default by :func:`resolve_register_path`.
    timeout : float
        How long a writer waits for another to finish. [s]
    create : bool
        Create the register when the file does not exist.

    Raises
    ------
    InputError
        Foreign or damaged file (left untouched), newer schema, locked too long,
        missing folder or no permission.
    """
    p = resolve_register_path(str(path) if path is not None else None)
    label = str(p)
    require_regular_file(p, "register file")
    if not p.exists():
        if not create:
            raise InputError(label, "no register here yet; issue the job's traveller first "
                                    "(or: windsheet register --issue ORDER.yaml)")
        _create(p, label)
    _check_header(_read_header(p, label), label)
    _check_writable(p, label)
    try:
        conn = sqlite3.connect(str(p), timeout=timeout, isolation_level=None)
    except sqlite3.Error as exc:
        raise InputError(label, f"cannot open the register: {exc}") from None
    try:
        conn.execute(f"PRAGMA busy_timeout = {int(timeout * 1000)}")
        # Proportional to the work: the header (read above), version and structure, and what the
        # listing reads of every row (so a register it calls damaged is never written to); each
        # record a writer reads or touches is checked as it is read. A migration reads every record:
        # an older register gets the whole check first. The whole check is `register --check`.
        version = _check_contents(conn, label, whole_file=_migration_reads_records(conn))
        states_stored = False
        scanned_at = None
        if version < 2:
            schema.check_text(conn, label)
            schema.check_json(conn, label)
        elif version >= 4 and not change_count.needs_check(conn):
            # Nothing but windsheet's writers, who write only what they checked, changed a listed
            # row since the last writer's check (change_count): nothing to scan.
            states_stored = stored_states.complete(conn)
        else:
            scanned_at = (change_count.count(conn),)  # read before the scan
            states_stored = schema.check_listed(conn, label)
        mode = conn.execute("PRAGMA journal_mode = WAL").fetchone()[0]
        if str(mode).lower() != "wal":
            raise InputError(label, f"register could not switch to WAL journaling (got {mode})")
        conn.execute("PRAGMA synchronous = FULL")
        conn.execute("PRAGMA foreign_keys = ON")
        states_migrated = version < 3  # the migration stores every job's state
        version = schema.migrate(conn, version, _now(), states=lambda: _states_from_records(conn, p, timeout))
        ensure_table(conn)  # registers made before lots were recorded gain the table
        schema.ensure_listing_index(conn, version)
    except sqlite3.OperationalError as exc:
        conn.close()
        if _is_locked(exc):
            raise _locked_error(label) from None
        if "readonly" in str(exc).lower():
            raise _read_only_error(label) from None
        raise _disk_fault(label, exc) or InputError(label, f"cannot open the register: {exc}") from None
    except (sqlite3.DatabaseError, UnicodeError) as exc:
        conn.close()
        raise (_disk_fault(label, exc)
               or InputError(label, f"register is damaged ({_one_line(exc)}); restore it from a backup")) from None
    except BaseException:
        conn.close()
        raise
    reg = Register(conn, p, timeout)
    reg.version = version
    reg.scanned_at = scanned_at
    # A job left without its stored state (records changed outside windsheet; a migration stores
    # every one) is stored again by this writer's first write, in the same transaction.
    reg.states_incomplete = version >= 3 and not states_stored and not states_migrated
    try:
        reg.repairs = reg.finish_sheets()
    except BaseException:
        reg.close()
        raise
    return reg


def _migration_reads_records(conn: sqlite3.Connection) -> bool:
    """Whether opening for writing will migrate the register through version 2, which reads every
    record (read from its header's user_version). Version 3's migration reads what the listing reads."""
    return conn.execute("PRAGMA user_version").fetchone()[0] < 2


def _states_from_records(conn: sqlite3.Connection, p: Path, timeout: float) -> list[dict]:
    """Every job's state worked out from its records: what version 3's migration stores."""
    reg = Register(conn, p, timeout)
    reg.version = 2
    return reg._states(live=True)


def _sqlite_uri(p: Path, immutable: bool) -> str:
    return f"{p.resolve().as_uri()}?mode=ro" + ("&immutable=1" if immutable else "")


def open_register_readonly(path=None) -> Register:
    """Open an existing register for reading only (``signoff --dry-run``).

    The file is opened by SQLite in read-only mode, so not a byte of the
    register changes; a missing, foreign or damaged file is refused as by
    :func:`open_register`.
    """
    p = resolve_register_path(str(path) if path is not None else None)
    label = str(p)
    require_regular_file(p, "register file")
    if not p.exists():
        raise InputError(label, "no register here yet; issue the job's traveller first "
                                "(or: windsheet register --issue ORDER.yaml)")
    _check_header(_read_header(p, label), label)
    # With no write-ahead log beside it the file holds every commit: read it immutable, so SQLite
    # makes no -shm/-wal files (a dry run leaves the folder as it was; a read-only folder is no
    # obstacle). A live log (a writer at work) is read through, read-only.
    immutable = not Path(str(p) + "-wal").exists()
    try:
        conn = sqlite3.connect(_sqlite_uri(p, immutable), uri=True, isolation_level=None,
                               timeout=DEFAULT_TIMEOUT_S)
    except sqlite3.Error as exc:
        raise InputError(label, f"cannot read the register: {exc}") from None
    try:
        # Proportional to the work: the header, version and structure now; each row as it is read.
        version = _check_contents(conn, label, whole_file=False)
    except (sqlite3.OperationalError, UnicodeError) as exc:
        conn.close()
        if immutable:
            raise InputError(label, f"cannot read the register: {exc}") from None
        raise InputError(label, f"cannot read the register here ({exc}); its folder must let SQLite "
                                "make its shared-memory file") from None
    except BaseException:
        conn.close()
        raise
    reg = Register(conn, p, DEFAULT_TIMEOUT_S)
    reg.version = version
    return reg


def check_register(path=None) -> dict:
    """The whole check of a register, read-only: every page (SQLite's ``integrity_check``),
    the text the listing reads and the JSON of every record.

    Returns counts of what was checked; a fault is an :class:`InputError` naming what is
    damaged, as the writers refuse it.  ``windsheet register --check``.
    """
    reg = open_register_readonly(path)
    try:
        conn = reg.conn
        try:
            ok = conn.execute("PRAGMA integrity_check(1)").fetchone()[0]
        except sqlite3.DatabaseError as exc:
            raise (_disk_fault(reg.label, exc) or InputError(
                reg.label, f"register is damaged ({_one_line(exc)}); restore it from a backup")) from None
        if ok != "ok":
            raise InputError(reg.label, f"register is damaged (integrity check: {str(ok)[:160]}); "
                                        "restore it from a backup")
        try:
            schema.check_text(conn, reg.label)
            schema.check_json(conn, reg.label)
            counts = {t: conn.execute(f"SELECT count(*) FROM {t}").fetchone()[0]
                      for t in ("jobs", "issues", "signoffs", "unit_signoffs")}
            if reg.version >= 3:
                _check_stored_states(reg)
        except sqlite3.DatabaseError as exc:
            raise InputError(reg.label, f"register is damaged ({_one_line(exc)}); restore it from a backup") from None
        return {"register": reg.label, "schema_version": reg.version, **counts}
    finally:
        reg.close()


def _check_stored_states(reg: Register) -> None:
    """Every stored job state against the state its records give (``register --check``)."""
    worked_out = {st["number"]: stored_states.row_of(st) for st in reg._states(live=True)}
    for row in reg.conn.execute(f"SELECT {', '.join(stored_states.COLUMNS)} FROM {stored_states.TABLE} "
                                "ORDER BY issue_id"):
        want = worked_out.get(row[1])
        if want is None or tuple(row) != want:
            col, stored, records = next(((c, a, b) for c, a, b in zip(stored_states.COLUMNS, row, want or row)
                                         if a != b), ("issue_id", row[0], None))
            raise InputError(reg.label, f"register is damaged: the stored state of job {quoted(row[1])} differs "
                                        f"from its records ({col}: stored {quoted(stored)}, from the records "
                                        f"{quoted(records)}); restore it from a backup")


def _column_verdict(verdict: str) -> str:
    """The verdict columns hold pass or fail: a unit not proven (incomplete) is not passed.
    The full verdict is kept in the JSON beside it."""
    return "pass" if verdict == "pass" else "fail"


def _unit_verdict(column: str, measurements_json: str) -> str:
    try:
        return json.loads(measurements_json).get("verdict") or column
    except (ValueError, AttributeError):
        return column


def record_issue(register: Register, *args, **kwargs) -> int:
    """Module-level alias of :meth:`Register.record_issue`."""
    return register.record_issue(*args, **kwargs)


def record_signoff(register: Register, *args, **kwargs) -> int:
    """Module-level alias of :meth:`Register.record_signoff`."""
    return register.record_signoff(*args, **kwargs)


def list_jobs(register: Register) -> list[dict]:
    return register.list_jobs()


def job_history(register: Register, number: str) -> dict:
    return register.job_history(number)
