"""Where the bench page touches the sign-off, the measured-values reader and the register.

Every call the web layer makes into the rest of windsheet goes through these few
functions, so a change of the sign-off's interface is met here and nowhere else.
The page never judges a reading itself: it builds the same measured-values
document a file would give and hands it to :func:`windsheet.qc.signoff.evaluate_signoff`.
"""

from __future__ import annotations

import json
from typing import Optional

from windsheet.records import drafts as _drafts
from windsheet.common.errors import InputError


def open_bench_register(path):
    """Open an existing register for the bench, adding the drafts table if it has none."""
    from windsheet.records.register import open_register

    reg = open_register(path, create=False)
    try:
        _drafts.migrate(reg)
    except BaseException:
        reg.close()
        raise
    return reg


#: Jobs on one page of the bench's job list.
JOBS_PER_PAGE = 100


def jobs(reg, page: int = 1, state=None, customer=None, since=None) -> tuple[list[dict], int]:
    """One page of the jobs (filtered as ``windsheet register`` filters), each with its state and
    the design state of its latest issue, and how many jobs match: a few queries per page, none per job."""
    from windsheet.design.state_rules import status_words

    found, total = reg.list_jobs_page(page, JOBS_PER_PAGE, state=state, customer=customer, since=since)
    return [dict(j, design=status_words(j.get("design_status") or {}) or "ok") for j in found], total


def issued(reg, number: str):
    """A job's state at its latest issue, and the design recorded at that issue."""
    from windsheet.design.dispatch import is_transformer_design

    state = reg.job_state(number)
    issue_id, prediction = reg.find_issue(number, state["revision"], state["order_sha256"])
    if is_transformer_design(prediction):
        # The page's fields are a coil's (strands, terminals); a transformer is read winding by winding.
        raise InputError("job", f"{number} is a transformer: write its readings form with "
                                "'windsheet readings-form' and sign it off with 'windsheet signoff'; "
                                "this page takes coils")
    state = dict(state, issue_id=issue_id)
    return state, prediction


def issued_order_text(reg, state: dict) -> str:
    """The order's text as recorded at issue (what the traveller was built from)."""
    row = reg.conn.execute("SELECT order_text FROM issues WHERE id = ?", (state["issue_id"],)).fetchone()
    return row[0] if row else ""


def design_status(design) -> str:
    """The issued design's state in words ("ok" when sound)."""
    from windsheet.design.state_rules import status_words

    return status_words(design.state) or "ok"


def required_lines(design) -> set:
    """QC line keys a sign-off cannot do without (the design's ``qc_required``)."""
    return set(design.qc_required)


def parse(document: dict):
    """The measured-values document, validated exactly as a file is (measured.py)."""
    from windsheet.qc.measured import measured_from_dict

    return measured_from_dict(document)


def evaluate(prediction, document: dict, inspector: Optional[str] = None,
             order_text: Optional[str] = None) -> dict:
    """The sign-off of ``document`` against the issued prediction (signoff.py).

    ``order_text`` is the order as issued; a sign-off whose diagnosis re-sizes the
    order at other turn counts gets it as the command line does.
    """
    from windsheet.qc.signoff import evaluate_signoff

    return evaluate_signoff(prediction, parse(document), inspector=inspector, resize=_resizer(order_text))


_ORDERS: dict = {}


def _resizer(order_text: Optional[str]):
    """``windsheet signoff``'s re-sizing of the issued order at other turn counts."""
    if not order_text:
        return None
    import functools

    from windsheet.order.document import parse_order
    from windsheet.design.sizing import strand_values_at_turns

    if order_text not in _ORDERS:
        if len(_ORDERS) > 16:
            _ORDERS.clear()
        _ORDERS[order_text] = parse_order(order_text.encode("utf-8"))
    return functools.partial(strand_values_at_turns, _ORDERS[order_text])


def record(reg, state: dict, document: dict, result: dict, inspector: str) -> int:
    """Record a sign-off as the CLI's ``signoff`` does, raw readings with each unit."""
    measured = parse(document)
    units = [u.model_dump(mode="json") for u in measured.units]
    return reg.record_signoff(result, state["order_sha256"], inspector, measured_units=units)


def latest_signoff(reg, number: str, revision: str) -> Optional[dict]:
    """The newest recorded sign-off result of a job revision, or None."""
    row = reg.conn.execute("SELECT result_json FROM signoffs WHERE job = ? AND revision = ?"
                           " ORDER BY id DESC LIMIT 1", (number, revision)).fetchone()
    return json.loads(row[0]) if row else None


def signoff_sheet_pdf(prediction, result: dict) -> bytes:
    """The sign-off sheet, as ``windsheet signoff -o`` writes it."""
    from windsheet.sheets.render import render_pdf, render_signoff_html

    return render_pdf(render_signoff_html(prediction, result, paper="a4"))


def load_drafts(reg, number: str, revision: str) -> dict:
    return _drafts.load_drafts(reg, number, revision)


def save_draft(reg, number, revision, serial, field, value, seen_version, saved_by=None) -> int:
    return _drafts.save_draft(reg, number, revision, serial, field, value, seen_version, saved_by)


StaleSave = _drafts.StaleSave
__all__ = ["open_bench_register", "jobs", "issued", "issued_order_text", "design_status", "required_lines", "parse",
           "evaluate", "record", "latest_signoff", "signoff_sheet_pdf", "load_drafts", "save_draft",
           "StaleSave", "InputError"]
