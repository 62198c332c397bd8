"""Each job's state at its latest issue, read in a few queries whatever the register's size:
the listing, one job's state, and one page of the jobs matching the listing's filters.

A version-3 register keeps every job's state (:mod:`windsheet.records.stored_states`): the
whole listing reads the stored states, never the sign-offs; one job's state and a page
work theirs out from the records (a few rows), and so does the listing of an older
register, or of one where a job's records were changed outside windsheet.

A mixin of :class:`windsheet.records.register.Register` (``self.conn``, ``self.version``, ``self.label``).
"""

from __future__ import annotations

import json
from typing import Optional

from windsheet.common.errors import InputError
from windsheet.design.state_rules import recorded_state
from windsheet.records import register_schema as schema
from windsheet.records import stored_states
from .register_checks import _reads
from .register_listing import cells, job_cells


class JobStates:
    """The register's job states (see :class:`windsheet.records.register.Register`)."""

    def _latest_where(self, number=None, customer=None, since=None) -> tuple[str, tuple]:
        clauses, args = [], []
        if number is not None:
            clauses.append("i.job = ?")
            args.append(number)
        if customer:
            clauses.append("lower(coalesce(j.customer, '')) LIKE ? ESCAPE '\\'")
            args.append("%" + customer.strip().lower().replace("\\", "\\\\").replace("%", "\\%")
                        .replace("_", "\\_") + "%")
        if since:
            clauses.append("substr(i.issued_at, 1, 10) >= ?")
            args.append(since)
        return ("WHERE " + " AND ".join(clauses)) if clauses else "", tuple(args)

    def _listing_index(self) -> bool:
        if getattr(self, "_has_listing_index", None) is None:
            self._has_listing_index = self.version >= 2 and schema.has_listing_index(self.conn)
        return self._has_listing_index

    def _page_source(self, customer=None, since=None) -> tuple[str, tuple]:
        """``FROM … WHERE …`` of the latest issue of each job matching the filters, as ``l.id``.

        Without a date the issues' own rows are not read at all (the latest ids come from
        the index on ``(job, id)``, the customer from the jobs table): a page, and the count
        of all, cost the same whatever size the issue records are.
        """
        latest = "(SELECT job, MAX(id) AS id FROM issues GROUP BY job) l JOIN jobs j ON j.number = l.job"
        if since:
            latest += (f" JOIN issues i INDEXED BY {schema.LISTING_INDEX} ON i.job = l.job AND i.id = l.id"
                       if self._listing_index() else " JOIN issues i ON i.id = l.id")
        where, args = self._latest_where(None, customer, since)
        return f"FROM {latest} {where}", args

    def _stored(self) -> bool:
        """Whether every listed job's state is stored (version 3, no job changed outside windsheet)."""
        return self.version >= 3 and stored_states.complete(self.conn)

    def _states(self, number: Optional[str] = None, *, customer: Optional[str] = None,
                since: Optional[str] = None, limit: Optional[int] = None, offset: int = 0,
                live: bool = False) -> list[dict]:
        """Each job's state at its latest issued revision (one job, or all, newest issue first).

        Every job's (with or without the customer and date filters): read from the stored
        states when every job has one, unless ``live``. Otherwise worked out from the
        records in two queries whatever the register's size: the latest issue of each job
        (those of a customer, issued since a date, one page of them when ``limit`` is
        given), then every unit sign-off of those revisions, read in order so the last
        verdict of each serial stands.
        """
        if number is None and limit is None and not live and self._stored():
            return self._stored_states(customer, since)
        v2 = self.version >= 2
        design = "i.design_state" if v2 else "NULL"
        where, args = self._latest_where(number, customer, since)
        if limit is not None:
            # The page's issue ids first, from the index and the jobs table (no record is read
            # but the page's own), then the page's rows.
            source, page_args = self._page_source(customer, since)
            ids = [r[0] for r in self.conn.execute(
                f"SELECT l.id {source} ORDER BY l.id DESC LIMIT {int(limit)} OFFSET {int(offset)}", page_args)]
            where, args = f"WHERE i.id IN ({', '.join('?' * len(ids)) or 'NULL'})", tuple(ids)
        if self._listing_index():
            # Every column read here is in the covering index: no issue record is read.
            join = (f"(SELECT job, MAX(id) AS id FROM issues GROUP BY job) l "
                    f"JOIN issues i INDEXED BY {schema.LISTING_INDEX} ON i.job = l.job AND i.id = l.id "
                    "JOIN jobs j ON j.number = l.job")
        else:
            join = ("issues i JOIN jobs j ON j.number = i.job "
                    "JOIN (SELECT job, MAX(id) AS id FROM issues GROUP BY job) l ON l.id = i.id")
        latest = self.conn.execute(
            "SELECT i.job, i.id, i.revision, i.order_sha256, i.units_json, i.issued_at, i.issued_by, "
            f"{design}, j.part, j.customer FROM {join} {where} ORDER BY i.id DESC", args).fetchall()
        verdict = "u.unit_verdict" if v2 else "json_extract(u.measurements_json, '$.verdict')"
        if number is not None:
            only, only_args = "WHERE s.job = ? ", (number,)
        elif limit is not None or customer or since:
            # The page's jobs only (at most a page of them; SQLite takes 999 parameters at least).
            names = [row[0] for row in latest]
            if len(names) > 900:
                only, only_args = "", ()
            else:
                only, only_args = f"WHERE s.job IN ({', '.join('?' * len(names)) or 'NULL'}) ", tuple(names)
        else:
            only, only_args = "", ()
        units: dict = {}
        if only:
            rows = self.conn.execute(
                f"SELECT s.job, u.serial, {verdict}, u.verdict FROM unit_signoffs u "
                "JOIN signoffs s ON s.id = u.signoff_id "
                "JOIN (SELECT job, MAX(id) AS id FROM issues GROUP BY job) l ON l.job = s.job "
                + (f"JOIN issues i INDEXED BY {schema.LISTING_INDEX} ON i.job = l.job AND i.id = l.id "
                   if self._listing_index() else "JOIN issues i ON i.id = l.id ")
                + "AND i.revision = s.revision " + only + "ORDER BY u.id", only_args)
        else:
            # Every job's: each sign-off's revision compared here with its job's latest (already read),
            # cheaper than SQLite finding each job's latest issue again for 200,000 unit rows.
            revision = {row[0]: row[2] for row in latest}
            rows = ((job, serial, v, col) for job, rev, serial, v, col in self.conn.execute(
                f"SELECT s.job, s.revision, u.serial, {verdict}, u.verdict FROM unit_signoffs u "
                "JOIN signoffs s ON s.id = u.signoff_id ORDER BY u.id") if revision.get(job) == rev)
        for job, serial, v, col in rows:
            got = units.get(job)
            if got is None:
                units[job] = got = {}
            got[serial] = v or col
        out = []
        append, loads, no_units = out.append, json.loads, {}
        for job, iid, rev, sha, units_json, at, by, dstate, part, customer in latest:
            serials = loads(units_json)
            if not isinstance(serials, list):
                raise ValueError(f"issue {iid}: units_json is not a list")
            got = units.get(job, no_units)
            passed, failed, incomplete = [], [], []
            if got:  # one pass over the unit verdicts
                for serial, v in got.items():
                    if v == "pass":
                        passed.append(serial)
                    elif v == "fail":
                        failed.append(serial)
                    elif v == "incomplete":
                        incomplete.append(serial)
                passed.sort()
                failed.sort()
                incomplete.sort()
                state = ("failed" if failed else "incomplete" if incomplete
                         else "passed" if (set(serials) or set(got)) <= set(passed) else "issued")
                not_signed = [s for s in serials if s not in got]
            else:
                state, not_signed = "issued", list(serials)
            if dstate is None:  # a version-1 register read as it is
                dstate = recorded_state(self.issued_record(iid))["state"]
            append({"number": job, "revision": rev, "order_sha256": sha, "issued_at": at,
                    "issued_by": by, "state": state, "units": serials, "part": part, "customer": customer,
                    "units_passed": passed, "units_failed": failed, "units_incomplete": incomplete,
                    "units_not_signed": not_signed, "design_status": {"state": dstate}, "issue_id": iid})
        return out

    def _stored_states(self, customer=None, since=None) -> list[dict]:
        """Every job's state as stored, with the issue's listed columns (newest issue first)."""
        where, args = self._latest_where(None, customer, since)
        index = schema.LISTING_INDEX if self._listing_index() else ""
        out = []
        append, loads = out.append, json.loads
        for (job, iid, rev, customer, at, state, dstate, sha, units_json, by, part,
             tally_json) in self.conn.execute(stored_states.listing_query(index, where=where), args):
            serials, tally = loads(units_json), loads(tally_json)
            if not isinstance(serials, list):
                raise ValueError(f"issue {iid}: units_json is not a list")
            if dstate is None:  # written outside windsheet: read from the record, as the records' way does
                dstate = recorded_state(self.issued_record(iid))["state"]
            append({"number": job, "revision": rev, "order_sha256": sha, "issued_at": at,
                    "issued_by": by, "state": state, "units": serials, "part": part, "customer": customer,
                    "units_passed": tally["passed"], "units_failed": tally["failed"],
                    "units_incomplete": tally["incomplete"], "units_not_signed": tally["not_signed"],
                    "design_status": {"state": dstate}, "issue_id": iid})
        return out

    @_reads
    def listing_cells(self) -> list[tuple]:
        """Every job as the listing's cells (:func:`register_listing.cells`), newest first.

        From the stored states one scan of one table reads what the table shows and nothing
        more (no unit list, no JSON, no join): 50,000 jobs in a few hundredths of a second.
        """
        if not self._stored():
            return [job_cells(j) for j in self._states()]
        out = []
        append = out.append
        for job, iid, rev, customer, at, state, passed, total, dstate in self.conn.execute(
                stored_states.TABLE_QUERY):
            if dstate is None:
                dstate = recorded_state(self.issued_record(iid))["state"]
            append(cells(job, rev, customer, at, state, passed, total, dstate))
        return out

    @_reads
    def store_state(self, number: str) -> None:
        """Store the job's state worked out from its records (a writer, inside its transaction),
        and that of any job left without one (its records changed outside windsheet)."""
        if self.version < 3:
            return
        stored_states.store(self.conn, self._states(number, live=True))
        # Whether others lack theirs was seen when the register was opened (the writers' check).
        if getattr(self, "states_incomplete", False):
            for (other,) in self.conn.execute(f"SELECT DISTINCT job FROM issues WHERE job NOT IN "
                                              f"(SELECT job FROM {stored_states.TABLE})").fetchall():
                stored_states.store(self.conn, self._states(other, live=True))
            self.states_incomplete = False

    @_reads
    def job_state(self, number: str) -> dict:
        """State of a job at its latest issued revision: issued, passed, failed or incomplete."""
        found = self._states(number)
        if not found:
            raise InputError("job", f"job {number} is not in register {self.label}")
        st = found[0]
        st["design_status"] = recorded_state(self.issued_record(st["issue_id"]))
        return st

    @_reads
    def list_jobs(self) -> list[dict]:
        """Every job with its state, newest issue first."""
        return self._states()

    @_reads
    def list_jobs_page(self, page: int = 1, per_page: int = 100, *, state: Optional[str] = None,
                       customer: Optional[str] = None, since: Optional[str] = None) -> tuple[list[dict], int]:
        """One page of the jobs matching the filters (newest issue first), and how many match.

        ``customer`` is a case-insensitive part of the name, ``since`` a date
        (``YYYY-MM-DD``), ``state`` issued, passed, failed or incomplete; the
        filters are read as :func:`windsheet.records.register_listing.select` reads them.
        Without a state the page is cut in SQL: a page costs the same whatever the
        register's size; a state is known only from the sign-offs, so with one the
        customer's and date's jobs are read and the state's picked from them.
        """
        from .register_listing import select

        select([], state, customer, since)  # the filters' own refusals, as the listing's
        since = (since or "").strip() or None
        page, per_page = max(1, int(page)), max(1, int(per_page))
        if customer and not customer.isascii():
            # SQLite's lower() folds ASCII only: a name like 'Sørensen' is matched as the listing matches it.
            chosen = select(self._states(since=since), state, customer)
            return chosen[(page - 1) * per_page: page * per_page], len(chosen)
        if state is None:
            source, args = self._page_source(customer, since)
            total = self.conn.execute(f"SELECT count(*) {source}", args).fetchone()[0]
            return self._states(customer=customer, since=since, limit=per_page,
                                offset=(page - 1) * per_page), total
        chosen = select(self._states(customer=customer, since=since), state)
        return chosen[(page - 1) * per_page: page * per_page], len(chosen)
