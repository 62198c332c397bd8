"""The job register: an SQLite file recording issued travellers and sign-offs.

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

from .errors import InputError
from .fileio import require_regular_file
from .traceability import UNIT_LOTS_SCHEMA, ensure_table, insert_unit_lots

DEFAULT_FILE = "windsheet-register.db"
ENV_VAR = "WINDSHEET_REGISTER"
APPLICATION = "windsheet-register"
#: PRAGMA application_id, "WSHR" in ASCII: marks the file in its own header.
APPLICATION_ID = 0x57534852
SCHEMA_VERSION = 1
DEFAULT_TIMEOUT_S = 10.0

_SQLITE_MAGIC = b"SQLite format 3\x00"

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


# --- Recognising a register -----------------------------------------------------------

def _read_header(path: Path, label: str) -> bytes:
    try:
        with open(path, "rb") as fh:
            return fh.read(100)
    except PermissionError:
        raise InputError(label, "cannot read the register: permission denied") from None
    except IsADirectoryError:
        raise InputError(label, "is a folder, not a register file") from None
    except OSError as exc:
        raise InputError(label, f"cannot read the register: {exc.strerror or exc}") from None


def _check_header(header: bytes, label: str) -> None:
    if len(header) < 100 or not header.startswith(_SQLITE_MAGIC):
        raise InputError(label, "is not a windsheet register (not an SQLite database); "
                                "refusing to touch it — give another path with --register")
    app_id = int.from_bytes(header[68:72], "big")
    if app_id != APPLICATION_ID:
        raise InputError(label, "is an SQLite database but not a windsheet register; "
                                "refusing to touch it — give another path with --register")


def _check_contents(conn: sqlite3.Connection, label: str) -> None:
    try:
        ok = conn.execute("PRAGMA quick_check").fetchone()[0]
        row = conn.execute("SELECT value FROM meta WHERE key = 'application'").fetchone()
        version = conn.execute("PRAGMA user_version").fetchone()[0]
    except sqlite3.DatabaseError as exc:
        if _is_locked(exc):
            raise _locked_error(label) from None
        raise InputError(label, f"register is damaged or not a windsheet register ({exc})") from None
    if ok != "ok":
        raise InputError(label, f"register is damaged (integrity check: {ok}); restore it from a backup")
    if row is None or row[0] != APPLICATION:
        raise InputError(label, "is not a windsheet register (no application marker)")
    if version > SCHEMA_VERSION:
        raise InputError(label, f"register has schema version {version}, newer than this windsheet "
                                f"understands ({SCHEMA_VERSION}); upgrade windsheet")
    if version < 1:
        raise InputError(label, "register has no schema version; it is damaged")


def _is_locked(exc: Exception) -> bool:
    text = str(exc).lower()
    return "locked" in text or "busy" in text


def _locked_error(label: str) -> InputError:
    return InputError(label, "register is locked by another writer; waited, then gave up — "
                             "try again when the other sign-off has finished")


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
            conn.execute("INSERT INTO meta VALUES ('schema_version', ?)", (str(SCHEMA_VERSION),))
            conn.execute("INSERT INTO meta VALUES ('created_at', ?)", (_now(),))
            conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
            conn.execute("COMMIT")
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

class Register:
    """An open job register; use :func:`open_register`."""

    def __init__(self, conn: sqlite3.Connection, path: Path, timeout: float):
        self.conn = conn
        self.path = path
        self.label = str(path)
        self.timeout = timeout

    def close(self) -> None:
        self.conn.close()

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
            raise InputError(self.label, f"cannot write the register: {exc}") from None
        try:
            yield self.conn
        except BaseException:
            self.conn.execute("ROLLBACK")
            raise
        try:
            self.conn.execute("COMMIT")
        except sqlite3.OperationalError as exc:
            self.conn.execute("ROLLBACK")
            if _is_locked(exc):
                raise _locked_error(self.label) from None
            raise InputError(self.label, f"cannot write the register: {exc}") from None

    # -- issue -------------------------------------------------------------------------

    def record_issue(self, predictions: dict, order_text: str, order_sha256: Optional[str] = None,
                     revision: Optional[str] = None) -> int:
        """Record that a traveller was issued; returns the issue id.

        Re-issuing the same revision with the same content (a reprint) is
        recorded again.  The same revision with different content is refused:
        a changed order needs a new revision.
        """
        job = predictions.get("job") or {}
        number = job.get("number")
        if not number:
            raise InputError("job.number", "the prediction has no job number")
        revision = str(revision if revision is not None else (job.get("revision") or "-"))
        order_sha256 = order_sha256 or predictions.get("order_hash")
        if not order_sha256:
            raise InputError("order", "no order hash to record")
        with self.transaction() as c:
            for (sha,) in c.execute("SELECT DISTINCT order_sha256 FROM issues WHERE job = ? AND revision = ?",
                                    (number, revision)):
                if sha != order_sha256:
                    raise InputError("job.revision",
                                     f"revision {revision} of job {number} was issued with different order "
                                     f"content (sha256 {sha[:12]}…, now {order_sha256[:12]}…); "
                                     "give the changed order a new revision")
            now = _now()
            c.execute("INSERT OR IGNORE INTO jobs VALUES (?, ?, ?, ?)",
                      (number, job.get("part"), job.get("customer"), now))
            c.execute("UPDATE jobs SET part = ?, customer = ? WHERE number = ?",
                      (job.get("part"), job.get("customer"), number))
            cur = c.execute(
                "INSERT INTO issues (job, revision, order_sha256, order_text, predictions_json, units_json,"
                " issued_by, issued_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
                (number, revision, order_sha256, order_text, _dumps(predictions),
                 _dumps(list(job.get("units") or [])), job.get("issued_by"), now))
            return int(cur.lastrowid)

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

    def find_issue(self, number: str, revision: Optional[str], order_sha256: str) -> tuple[int, dict]:
        """The issue a sign-off of this order belongs to, and its recorded predictions.

        Raises the same refusals as :meth:`record_signoff`.
        """
        issue_id = self._issue_for(self.conn, number, str(revision or "-"), order_sha256)
        return issue_id, self.issued_predictions(issue_id)

    def record_signoff(self, result: dict, order_sha256: Optional[str] = None,
                       inspector: Optional[str] = None, measured_units: Optional[list] = None) -> int:
        """Record a sign-off (the dict from :func:`windsheet.signoff.evaluate_signoff`).

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
            issue_id = self._issue_for(c, number, revision, order_sha256)
            now = _now()
            cur = c.execute(
                "INSERT INTO signoffs (job, issue_id, revision, order_sha256, inspector, verdict, result_json,"
                " signed_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
                (number, issue_id, revision, order_sha256, inspector, result["verdict"], _dumps(result), now))
            signoff_id = int(cur.lastrowid)
            for k, unit in enumerate(units):
                raw = measured_units[k] if measured_units else None
                self._insert_unit(c, signoff_id, number, unit, raw, inspector, now)
            return signoff_id

    def _insert_unit(self, c, signoff_id, number, unit, raw, inspector, now):
        c.execute(
            "INSERT INTO unit_signoffs (signoff_id, job, serial, verdict, measurements_json, inspector,"
            " signed_at) VALUES (?, ?, ?, ?, ?, ?, ?)",
            (signoff_id, number, unit["serial"], unit["verdict"],
             _dumps({"readings": raw, "lines": unit.get("lines"), "diagnosis": unit.get("diagnosis")}),
             inspector, now))
        insert_unit_lots(c, signoff_id, number, unit["serial"], unit.get("trace"), now)

    # -- reading -----------------------------------------------------------------------

    def _latest_issue(self, number: str):
        return self.conn.execute(
            "SELECT id, revision, order_sha256, units_json, issued_at, issued_by FROM issues"
            " WHERE job = ? ORDER BY id DESC LIMIT 1", (number,)).fetchone()

    def job_state(self, number: str) -> dict:
        """State of a job at its latest issued revision: issued, passed or failed."""
        issue = self._latest_issue(number)
        if issue is None:
            raise InputError("job", f"job {number} is not in register {self.label}")
        issue_id, revision, sha, units_json, issued_at, issued_by = issue
        serials = json.loads(units_json)
        latest = {}
        for serial, verdict in self.conn.execute(
                "SELECT u.serial, u.verdict FROM unit_signoffs u JOIN signoffs s ON s.id = u.signoff_id"
                " WHERE s.job = ? AND s.revision = ? ORDER BY u.id", (number, revision)):
            latest[serial] = verdict
        failed = sorted(s for s, v in latest.items() if v == "fail")
        passed = sorted(s for s, v in latest.items() if v == "pass")
        everyone = set(serials) or set(latest)
        if failed:
            state = "failed"
        elif latest and everyone <= set(passed):
            state = "passed"
        else:
            state = "issued"
        return {"number": number, "revision": revision, "order_sha256": sha, "issued_at": issued_at,
                "issued_by": issued_by, "state": state, "units": serials,
                "units_passed": passed, "units_failed": failed,
                "units_not_signed": [s for s in serials if s not in latest]}

    def list_jobs(self) -> list[dict]:
        """Every job with its state, newest issue first."""
        rows = self.conn.execute(
            "SELECT j.number, j.part, j.customer, MAX(i.id) FROM jobs j JOIN issues i ON i.job = j.number"
            " GROUP BY j.number ORDER BY MAX(i.id) DESC").fetchall()
        out = []
        for number, part, customer, _ in rows:
            st = self.job_state(number)
            st.update(part=part, customer=customer)
            out.append(st)
        return out

    def job_history(self, number: str) -> dict:
        """Every issue and sign-off of a job, oldest first."""
        events = []
        for rid, rev, sha, at, by in self.conn.execute(
                "SELECT id, revision, order_sha256, issued_at, issued_by FROM issues WHERE job = ? ORDER BY id",
                (number,)):
            events.append({"event": "issued", "id": rid, "revision": rev, "order_sha256": sha, "at": at,
                           "by": by})
        for sid, rev, sha, insp, verdict, at in self.conn.execute(
                "SELECT id, revision, order_sha256, inspector, verdict, signed_at FROM signoffs"
                " WHERE job = ? ORDER BY id", (number,)):
            units = [{"serial": s, "verdict": v} for s, v in self.conn.execute(
                "SELECT serial, verdict FROM unit_signoffs WHERE signoff_id = ? ORDER BY id", (sid,))]
            events.append({"event": "signed off", "id": sid, "revision": rev, "order_sha256": sha,
                           "at": at, "by": insp, "verdict": verdict, "units": units})
        if not events:
            raise InputError("job", f"job {number} is not in register {self.label}")
        events.sort(key=lambda e: (e["at"], 0 if e["event"] == "issued" else 1, e["id"]))
        return {"number": number, "state": self.job_state(number), "events": events}

    def issued_predictions(self, issue_id: int) -> dict:
        row = self.conn.execute("SELECT predictions_json FROM issues WHERE id = ?", (issue_id,)).fetchone()
        if row is None:
            raise InputError("register", f"no issue {issue_id}")
        return json.loads(row[0])


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
    try:
        conn = sqlite3.connect(str(p), timeout=timeout, isolation_level=None)
    except sqlite3.Error as exc:
        raise InputError(label, f"cannot open the register: {exc}") from None
    try:
        conn.execute(f"PRAGMA busy_timeout = {int(timeout * 1000)}")
        _check_contents(conn, label)
        mode = conn.execute("PRAGMA journal_mode = WAL").fetchone()[0]
        if str(mode).lower() != "wal":
            raise InputError(label, f"register could not switch to WAL journaling (got {mode})")
        conn.execute("PRAGMA synchronous = FULL")
        conn.execute("PRAGMA foreign_keys = ON")
        ensure_table(conn)  # registers made before lots were recorded gain the table
    except sqlite3.OperationalError as exc:
        conn.close()
        if _is_locked(exc):
            raise _locked_error(label) from None
        raise InputError(label, f"cannot open the register: {exc}") from None
    except BaseException:
        conn.close()
        raise
    return Register(conn, p, timeout)


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
