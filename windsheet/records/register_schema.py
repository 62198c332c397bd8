"""The register's schema after version 1: what each version adds, the migration, the content checks.

Version 2 adds what lets the register scale and stay whole:

* ``issues.design_state`` and ``unit_signoffs.unit_verdict``: the design status
  and each unit's full verdict (pass, fail, incomplete) in columns, so listing
  10,000 jobs reads no JSON;
* an index for every query the register runs;
* ``reprints`` (a traveller printed again) and ``sheets`` (each written sheet's
  path and content hash, to close the crash window between the register's
  commit and the sheet's rename; see :mod:`windsheet.records.sheet_ledger`).

A version-1 register is migrated in place the first time it is opened for
writing, in one transaction: a crash leaves it at version 1, untouched.
Opened read-only it is read as it is.

Version 3 adds ``job_states``: each job's state kept by the writers in the same
transaction as the records it sums, and triggers that drop a job's stored state
whenever its records change (see :mod:`windsheet.records.stored_states`). A version-2
register is read as it is (each state worked out from the sign-offs) and upgraded by
the first writer: the states of every job worked out once and stored, in one
transaction, no record touched.

Version 4 adds a count of the changes to the listed tables, raised by triggers, and the
count at which a writer last saw every listed row checked (see
:mod:`windsheet.records.change_count`): a writer scans what the listing reads only
when a change was made outside windsheet since. An older register gets the whole
check from its first writer, which then adds the triggers.
"""

from __future__ import annotations

import json
import sqlite3

from windsheet.common.errors import InputError
from windsheet.records import change_count, stored_states

SCHEMA_VERSION = 4

#: Added by version 2; also part of a fresh register's schema.
V2_TABLES = """
CREATE TABLE IF NOT EXISTS reprints (
    id INTEGER PRIMARY KEY,
    issue_id INTEGER NOT NULL REFERENCES issues(id),
    printed_by TEXT,
    printed_at TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS sheets (
    id INTEGER PRIMARY KEY,
    kind TEXT NOT NULL,
    ref_id INTEGER NOT NULL,
    path TEXT NOT NULL,
    sha256 TEXT NOT NULL,
    staged TEXT,
    state TEXT NOT NULL CHECK (state IN ('pending', 'placed', 'unprinted')),
    recorded_at TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS sheets_state ON sheets(state);
CREATE INDEX IF NOT EXISTS issues_job_id ON issues(job, id);
CREATE INDEX IF NOT EXISTS signoffs_job_revision ON signoffs(job, revision, id);
CREATE INDEX IF NOT EXISTS unit_signoffs_signoff ON unit_signoffs(signoff_id);
CREATE INDEX IF NOT EXISTS reprints_issue ON reprints(issue_id);
"""

#: Columns version 2 adds to version-1 tables.
V2_COLUMNS = (("issues", "design_state", "TEXT"), ("unit_signoffs", "unit_verdict", "TEXT"))

#: Tables and columns every register of this version has; checked on opening.
REQUIRED = {
    "meta": {"key", "value"},
    "jobs": {"number", "part", "customer", "first_issued_at"},
    "issues": {"id", "job", "revision", "order_sha256", "order_text", "predictions_json", "units_json",
               "issued_by", "issued_at"},
    "signoffs": {"id", "job", "issue_id", "revision", "order_sha256", "inspector", "verdict", "result_json",
                 "signed_at"},
    "unit_signoffs": {"id", "signoff_id", "job", "serial", "verdict", "measurements_json", "inspector",
                      "signed_at"},
}
REQUIRED_V2 = {"issues": {"design_state"}, "unit_signoffs": {"unit_verdict"},
               "reprints": {"id", "issue_id", "printed_at"},
               "sheets": {"id", "kind", "ref_id", "path", "sha256", "staged", "state"}}
REQUIRED_V3 = {stored_states.TABLE: set(stored_states.COLUMNS)}

#: JSON columns and the JSON type each must hold.
JSON_COLUMNS = (("issues", "predictions_json", "object"), ("issues", "units_json", "array"),
                ("signoffs", "result_json", "object"), ("unit_signoffs", "measurements_json", "object"),
                (stored_states.TABLE, "tally_json", "object"))


def design_state_of(predictions: dict) -> str:
    """``ok``, ``marginal``, ``forced`` or ``failing``: the design state an issue is recorded with.

    Examples
    --------
    >>> design_state_of({"insulation": {"verdict": "pass"}})
    'ok'
    >>> design_state_of({"design_status": {"state": "forced"}})
    'forced'
    >>> design_state_of({"insulation": {"verdict": "pass"}, "thermal": {"verdict": "fail"}})
    'failing'
    """
    from windsheet.design.state_rules import recorded_state

    return recorded_state(predictions)["state"]


def columns(conn: sqlite3.Connection, table: str) -> set:
    return {r[1] for r in conn.execute(f"PRAGMA table_info({table})")}


def check_structure(conn: sqlite3.Connection, version: int, label: str) -> None:
    """Refuse, in one line, a register missing a table or column its version has."""
    need = dict(REQUIRED)
    for since, added in ((2, REQUIRED_V2), (3, REQUIRED_V3)):
        if version >= since:
            for t, cols in added.items():
                need[t] = need.get(t, set()) | cols
    for table, cols in need.items():
        missing = cols - columns(conn, table)
        if missing == cols:
            raise InputError(label, f"register is damaged: table {table!r} is missing; restore it from a backup")
        if missing:
            raise InputError(label, f"register is damaged: table {table!r} lacks column(s) "
                                    f"{', '.join(sorted(missing))}; restore it from a backup")
    # Without its triggers a stored state could outlive a change to the records it sums (3), and a
    # change made outside windsheet could escape the next writer's check (4).
    gone = ((stored_states.missing_triggers(conn) if version >= 3 else [])
            + (change_count.missing_triggers(conn) if version >= 4 else []))
    if gone:
        raise InputError(label, f"register is damaged: trigger {gone[0]!r} is missing; restore it from a backup")


def check_json(conn: sqlite3.Connection, label: str) -> None:
    """Refuse a register whose JSON columns do not hold the JSON they should (one line).

    Run before anything is written, in SQLite's own JSON functions: a
    100 MB register is checked in a fraction of a second without loading it.
    One scan per table: each text is parsed once (``json_valid``) and its kind read
    from its first character; a row that scan doubts is then judged by ``json_type``.
    """
    tables: dict = {}
    for table, col, kind in JSON_COLUMNS:
        tables.setdefault(table, []).append((col, kind))
    opens = {"object": "{", "array": "["}
    present = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
    for table, cols in tables.items():
        if table not in present:
            continue
        doubt = " OR ".join(f"NOT json_valid({c}) OR substr(ltrim(substr({c}, 1, 64)), 1, 1) != '{opens[k]}'"
                            for c, k in cols)
        try:
            for (row_id,) in conn.execute(f"SELECT rowid FROM {table} WHERE {doubt}"):
                for col, kind in cols:
                    ok = conn.execute(f"SELECT CASE WHEN json_valid({col}) THEN json_type({col}) = ? ELSE 0 END "
                                      f"FROM {table} WHERE rowid = ?", (kind, row_id)).fetchone()[0]
                    if not ok:
                        raise InputError(label, f"register is damaged: {table} row {row_id} holds no valid JSON "
                                                f"{kind} in {col}; restore it from a backup")
        except sqlite3.OperationalError as exc:
            if "decode" in str(exc).lower() or "utf" in str(exc).lower():
                raise InputError(label, f"register is damaged: {table} holds text that is not valid UTF-8; "
                                        "restore it from a backup") from None
            raise


#: A covering index of what the listing reads of each issue: the listing, a page of the bench's job
#: list and the writers' text check read it instead of the issue records, whose JSON (tens of kB)
#: comes before these columns. Not a schema change: a register without it is read as before.
LISTING_INDEX = "issues_listing"
LISTING_INDEX_SQL = (f"CREATE INDEX IF NOT EXISTS {LISTING_INDEX} ON issues(job, id, revision, order_sha256, "
                     "issued_at, issued_by, design_state, units_json)")


def has_listing_index(conn: sqlite3.Connection) -> bool:
    return conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'index' AND name = ?",
                        (LISTING_INDEX,)).fetchone() is not None


def ensure_listing_index(conn: sqlite3.Connection, version: int) -> None:
    """Add the listing's covering index to a version-2 register that lacks it (one pass, once)."""
    if version < 2 or has_listing_index(conn):
        return
    conn.execute("BEGIN IMMEDIATE")
    try:
        conn.execute(LISTING_INDEX_SQL)
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise


#: The text columns the register's listing and the bench's job list read, by table: a writer checks
#: them before it writes, so a register the listing refuses as damaged is never written to.
LISTED_TEXT = {
    "jobs": ("number", "part", "customer", "first_issued_at"),
    "issues": ("job", "revision", "order_sha256", "units_json", "issued_by", "issued_at", "design_state"),
    "signoffs": ("job", "revision", "inspector", "verdict", "signed_at"),
    "unit_signoffs": ("job", "serial", "verdict", "unit_verdict", "inspector", "signed_at"),
    stored_states.TABLE: ("job", "revision", "customer", "issued_at", "design_state", "state", "tally_json"),
}


def _require_utf8(label: str, table: str, cols, rowid, values) -> None:
    """Refuse, naming the row, a listed column read as bytes that are not UTF-8."""
    for col, value in zip(cols, values):
        if isinstance(value, bytes):
            try:
                value.decode("utf-8")
            except UnicodeDecodeError:
                raise InputError(label, f"register is damaged: {table}.{col} of row {rowid} is not "
                                        "valid UTF-8 text; restore it from a backup") from None


def check_text(conn: sqlite3.Connection, label: str) -> None:
    """Refuse a register whose listed text columns hold bytes that are not UTF-8 (one line).

    Only rows with a character outside printable ASCII are read into Python (a
    ``GLOB`` in SQLite finds them), so a register of plain text is checked in
    one scan without decoding anything.
    """
    for table, wanted in LISTED_TEXT.items():
        cols = [c for c in wanted if c in columns(conn, table)]
        if not cols:
            continue
        odd = " OR ".join(f"{c} GLOB '*[^ -~]*'" for c in cols)
        # The issues' listed columns all sit in the listing's covering index: read it, not the records.
        indexed = f" INDEXED BY {LISTING_INDEX}" if table == "issues" and has_listing_index(conn) else ""
        old_factory = conn.text_factory
        conn.text_factory = bytes
        try:
            for row in conn.execute(f"SELECT rowid, {', '.join(cols)} FROM {table}{indexed} WHERE {odd}"):
                _require_utf8(label, table, cols, row[0], row[1:])
        finally:
            conn.text_factory = old_factory


def migrate(conn: sqlite3.Connection, version: int, now: str, *, states) -> int:
    """Bring a register up to :data:`SCHEMA_VERSION` in one transaction; returns the new version.

    ``states`` is called inside the transaction, once the version-2 columns are filled, and
    gives every job's state worked out from its records (stored as version 3's ``job_states``).
    No record is changed but by version 2's backfill of its two new columns.
    """
    if version >= SCHEMA_VERSION:
        return version
    conn.execute("BEGIN IMMEDIATE")
    try:
        if version < 2:
            _to_version_2(conn)
        if version < 3:
            stored_states.create(conn)
            stored_states.store(conn, states())
        change_count.create(conn)  # after the opening writer's whole check of what the listing reads
        conn.execute("INSERT OR REPLACE INTO meta VALUES ('schema_version', ?)", (str(SCHEMA_VERSION),))
        conn.execute("INSERT OR REPLACE INTO meta VALUES ('migrated_at', ?)", (now,))
        conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    return SCHEMA_VERSION


def _to_version_2(conn: sqlite3.Connection) -> None:
    for table, col, kind in V2_COLUMNS:
        if col not in columns(conn, table):
            conn.execute(f"ALTER TABLE {table} ADD COLUMN {col} {kind}")
    for stmt in filter(str.strip, V2_TABLES.split(";")):
        conn.execute(stmt)
    # Backfill: each issue's design status from its prediction, each unit's verdict from its JSON.
    rows = conn.execute("SELECT id, predictions_json FROM issues WHERE design_state IS NULL").fetchall()
    for rid, pj in rows:
        try:
            state = design_state_of(json.loads(pj))
        except (ValueError, TypeError):
            state = "ok"
        conn.execute("UPDATE issues SET design_state = ? WHERE id = ?", (state, rid))
    conn.execute(
        "UPDATE unit_signoffs SET unit_verdict = COALESCE(CASE WHEN json_valid(measurements_json) THEN "
        "json_extract(measurements_json, '$.verdict') END, verdict) WHERE unit_verdict IS NULL")


#: What the listing (and the bench's job list) reads of each table, and where it is read cheaply:
#: ``(table, index to read or "", text columns, clause that passes a row without decoding it)``.
#: A writer checks exactly these before it writes (:func:`check_listed`).
LISTING_READS = (
    ("jobs", "", ("number", "part", "customer"), ""),
    ("issues", LISTING_INDEX, ("job", "revision", "order_sha256", "units_json", "issued_by", "issued_at",
                               "design_state"), ""),
    ("signoffs", "signoffs_job_revision", ("job", "revision"), ""),
    # 200,000 unit rows at 50,000 jobs: SQLite passes the plain ones itself (a serial of printable
    # ASCII, a verdict of the three words), Python decodes the rest.
    ("unit_signoffs", "", ("serial", "verdict", "unit_verdict"),
     "serial GLOB '*[^ -~]*' OR coalesce(unit_verdict, verdict) NOT IN ('pass', 'fail', 'incomplete')"
     " OR verdict NOT IN ('pass', 'fail')"),
)

#: What the listing reads of a version-3 register whose every job has its stored state: the
#: jobs, the issues' covering index and the stored states; no sign-off is read.
STORED_READS = LISTING_READS[:2] + ((stored_states.TABLE, "", LISTED_TEXT[stored_states.TABLE], ""),)


#: The JSON the listing reads (each issue's unit list, each stored state's serials): column, kind.
LISTED_JSON = {"issues": ("units_json", "array"), stored_states.TABLE: ("tally_json", "object")}


def _not_json(col: str, kind: str) -> str:
    """An SQL test true when ``col`` holds no JSON of ``kind``: the first character decides the plain
    case, ``json_type`` (a second parse) only a text that starts otherwise (with a space, say)."""
    first = {"array": "[", "object": "{"}[kind]
    return (f"(NOT json_valid({col}) OR (substr({col}, 1, 1) != '{first}' AND json_type({col}) != '{kind}'))")


def _ascii(text) -> bool:
    """Whether a value read as bytes (or a number, or NULL) is plain ASCII."""
    return text is None or (text if isinstance(text, bytes) else str(text).encode()).isascii()


def check_listed(conn: sqlite3.Connection, label: str) -> bool:
    """Refuse a register whose listing would be refused: the writers' check (one line).

    Reads what the listing reads, every row of it — the jobs' names, the issues'
    columns in their covering index (``issues_listing``) and each issue's unit list
    being a JSON array; then each job's stored state (version 3, every job stored) or,
    where the listing works the states out, the sign-offs' job and revision and the
    units' serials and verdicts — and never a record's JSON: at 50,000 jobs a tenth of
    a second, where the whole check (:func:`check_text`, :func:`check_json`, every
    page) takes seconds. A table's listed text is joined in SQLite and tested with
    ``bytes.isascii``; a row that is not plain ASCII is decoded column by column.
    Returns whether every job's state is stored (what it read).
    """
    indexes = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type = 'index'")}
    stored = stored_states.has_table(conn) and stored_states.complete(conn)
    reads = [(table, index if index in indexes else "", [c for c in wanted if c in columns(conn, table)], plain)
             for table, index, wanted, plain in (STORED_READS if stored else LISTING_READS)]
    old_factory = conn.text_factory
    conn.text_factory = bytes
    try:
        for table, index, cols, plain in reads:
            source = f"{table} INDEXED BY {index}" if index else table
            listed_json = LISTED_JSON.get(table)
            bad_json = (_not_json(*listed_json[:2]) if listed_json else "0")
            if plain:
                rows = conn.execute(f"SELECT rowid FROM {source} WHERE {plain}")
                doubtful, some_bad_json = [r[0] for r in rows], 0
            else:
                # Each listed column of the whole table as one string, tested in C, in the same scan
                # as the table's JSON: rows come into Python one by one only when some byte is not
                # ASCII (an embedded NUL is kept, and is ASCII).
                joined = " || ".join(f"coalesce({c}, '')" for c in cols)
                doubtful = []
                aggregates = ", ".join(f"group_concat({c}, '')" for c in cols)
                *texts, some_bad_json = conn.execute(
                    f"SELECT {aggregates}, max({bad_json}) FROM {source}").fetchone()
                if not all(map(_ascii, texts)):
                    doubtful = [r[0] for r in conn.execute(f"SELECT rowid, {joined} FROM {source}")
                                if not _ascii(r[1])]
            for rowid in doubtful:
                row = conn.execute(f"SELECT {', '.join(cols)} FROM {table} WHERE rowid = ?", (rowid,)).fetchone()
                _require_utf8(label, table, cols, rowid, row)
            if some_bad_json:
                col, kind = listed_json
                bad = conn.execute(f"SELECT rowid FROM {source} WHERE {bad_json} LIMIT 1").fetchone()
                raise InputError(label, f"register is damaged: {table} row {bad[0]} holds no valid JSON {kind} "
                                        f"in {col}; restore it from a backup")
        return stored
    except sqlite3.OperationalError as exc:
        if "decode" in str(exc).lower() or "utf" in str(exc).lower():
            raise InputError(label, "register is damaged: a listed text is not valid UTF-8; "
                                    "restore it from a backup") from None
        raise
    finally:
        conn.text_factory = old_factory
