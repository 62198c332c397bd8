"""What the job page shows: each unit's readings judged by the sign-off, line by line.

Nothing here judges a reading: a unit's entries become a one-unit measured-values
document, :func:`service.evaluate` judges it, and the lines it returns are laid
against the QC rows they belong to.  A fault the reader or the sign-off reports
is shown at the field it names, and that field is left out so the rest can
still be judged.
"""

from __future__ import annotations

from typing import Optional

from windsheet.common.errors import InputError
from windsheet.bench import service
from .readings import field_of_path, measured_document, qc_rows, unit_document

#: The cell, under each unit's verdict, of lines no QC row of the form takes.
OTHER = "other"
#: At most this many faulty fields are peeled off one unit before giving up.
_MAX_FAULTS = 40


def row_of_line(line_key: str) -> str:
    """The QC row a sign-off line belongs to."""
    parts = line_key.split(".")
    if parts[0] == "strand" and parts[-1] == "turns":
        return "strand.turns"
    if parts[0] == "pair" and parts[-1] in ("series_opposing", "mutual", "coupling"):
        return f"pair.{parts[1]}.series_opposing"
    if parts[0] == "continuity":
        return "continuity.strand_to_strand"
    if parts[0] == "hipot":
        return "hipot"
    return line_key


def preview_unit(prediction, revision: str, job_entries: dict, serial: str,
                 entries: dict, order_text: Optional[str] = None) -> dict:
    """Judge what has been entered for one unit so far.

    Returns a dict with ``state`` ("empty", "waiting", "judged" or "error"),
    ``unit`` (the sign-off's unit dict when judged), ``errors`` (field -> message),
    ``job_errors`` and ``message``.
    """
    number = prediction.job.number
    entries, job_entries = dict(entries), dict(job_entries)
    errors, job_errors = {}, {}
    out = {"errors": errors, "job_errors": job_errors, "unit": None, "message": ""}
    for _ in range(_MAX_FAULTS):
        unit = unit_document(serial, entries)
        if unit is None:
            return dict(out, state="empty")
        doc = measured_document(number, revision, job_entries, [unit])
        try:
            result = service.evaluate(prediction, doc, order_text=order_text)
        except InputError as exc:
            where = field_of_path(exc.path)
            if where is None:
                return dict(out, state="error", message=str(exc))
            kind, field = where
            if kind == "job":
                job_errors[field] = exc.message
                job_entries.pop(field, None)
            elif _in_document(unit, field):
                errors[field] = exc.message
                entries.pop(field)
            elif field.split(".")[0] not in ("terminals", "hipot") and field.split(".")[0] in unit:
                # A part of a section left empty (the ring's capacitor): said at that field, the section left out.
                errors[field] = exc.message
                section = field.split(".")[0] + "."
                for f in [f for f in entries if f.startswith(section)]:
                    entries.pop(f)
            else:
                return dict(out, state="waiting",
                            message="enter the terminal inductance and resistance to judge this unit")
            continue
        return dict(out, state="judged", unit=result["units"][0])
    return dict(out, state="error", message="too many faulty entries")


def _in_document(unit: dict, field: str) -> bool:
    node = unit
    for part in field.split("."):
        if not isinstance(node, dict) or part not in node:
            return False
        node = node[part]
    return True


def cell_texts(preview: dict, rows: list[dict]) -> dict:
    """``{row key: [{"text", "cls"}]}`` for one unit: its lines' verdicts and its field faults."""
    from windsheet.sheets.render import measured_text

    cells = {r["key"]: [] for r in rows}
    cells[OTHER] = []
    field_row = {f: r["key"] for r in rows for f, _ in r["fields"]}
    for field, message in preview["errors"].items():
        cells[field_row.get(field, OTHER)].append(
            {"text": f"{field}: {message}", "cls": "error"})
    unit = preview.get("unit") or {}
    for line in unit.get("lines") or []:
        key = row_of_line(line["key"])
        value = measured_text(line["measured"], line["unit"]) if line["measured"] is not None \
            else (line.get("note") or "")
        word = {"info": "read"}.get(line["result"], str(line["result"]).upper())
        text = f"{word} {value}".strip()
        if key != line["key"] or key not in cells:
            text = f"{line['item']}: {text}"
        cells[key if key in cells else OTHER].append({"text": text, "cls": line["result"]})
    return cells


def unit_summary(preview: dict) -> dict:
    """The unit's verdict and diagnosis in words."""
    state = preview["state"]
    if state == "judged":
        u = preview["unit"]
        return {"verdict": str(u["verdict"]).upper(), "cls": u["verdict"],
                "findings": [d["finding"] for d in u.get("diagnosis") or []]}
    if state == "empty":
        return {"verdict": "no readings", "cls": "empty", "findings": []}
    return {"verdict": "not judged yet" if state == "waiting" else "fault", "cls": state,
            "findings": [preview["message"]]}


def job_view(prediction, state: dict, drafts: dict, order_text: Optional[str] = None) -> dict:
    """Everything the job page shows, judged afresh from the saved drafts."""
    required = service.required_lines(prediction)
    rows = qc_rows(prediction, required)
    serials = list(state["units"])
    job_entries = {f: d["value"] for (s, f), d in drafts.items() if s == ""}
    units = []
    job_errors = {}
    for i, serial in enumerate(serials):
        entries = {f: d["value"] for (s, f), d in drafts.items() if s == serial}
        pv = preview_unit(prediction, state["revision"], job_entries, serial, entries, order_text)
        job_errors.update(pv["job_errors"])
        units.append({"index": i, "serial": serial, "cells": cell_texts(pv, rows),
                      "summary": unit_summary(pv),
                      "values": {f: drafts.get((serial, f), {"value": "", "version": 0}) for r in rows
                                 for f, _ in r["fields"]}})
    job_fields = job_wide_fields(prediction)
    job_values = {f: drafts.get(("", f), {"value": "", "version": 0}) for f, _, _ in job_fields}
    return {"rows": rows, "units": units, "job_fields": job_fields, "job_values": job_values,
            "job_errors": job_errors}


def job_wide_fields(prediction) -> list[tuple[str, str, str]]:
    """The fields for every unit: (field, label, placeholder), the test frequency the traveller's own.

    One instruments field for the job (``instrument_ids``); a unit names its own only where it
    differs (its row replaces the job's, as in the measured-values file).
    """
    from .readings import typed

    return [("ambient", "Ambient", "21.5 degC"),
            ("test_frequency", "LCR test frequency", typed(prediction.test.frequency_Hz, "Hz")),
            ("instrument_ids", "Instruments (every unit, unless its own row says)", "lcr: LCR-07; hipot: HV-03")]


def signoff_document(prediction, state: dict, drafts: dict, inspector: str,
                     date: Optional[str]) -> dict:
    """The whole job's measured-values document, every unit with an entry, as a file would give it."""
    number = prediction.job.number
    job_entries = {f: d["value"] for (s, f), d in drafts.items() if s == ""}
    units = []
    for serial in state["units"]:
        entries = {f: d["value"] for (s, f), d in drafts.items() if s == serial}
        unit = unit_document(serial, entries)
        if unit is not None:
            units.append(unit)
    return measured_document(number, state["revision"], job_entries, units, inspector=inspector,
                             date=date)
