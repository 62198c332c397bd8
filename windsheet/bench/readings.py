"""The bench form's fields and the measured-values document they make.

A field is a dotted path into one unit of a measured-values file
(``strands.A.inductance``, ``terminals.resistance``, ``hipot.result``); the text
typed is kept as typed and put into the document unchanged, so the units are
read by :mod:`windsheet.qc.measured` exactly as from a file.  The one rewriting is
of shape, not of value: a rung inductance typed as ``50.31 kHz / 100 nF`` becomes
``{resonant_frequency: 50.31 kHz, capacitor: 100 nF}``, and a turn count of
digits becomes a whole number, as YAML would read it.
"""

from __future__ import annotations

import re
from typing import Optional

#: Job-wide fields (stored with serial ""), in the measured file's top level.
JOB_FIELDS = ("ambient", "test_frequency", "instruments", "wire_lot", "core_lot", "instrument_ids")
#: Traceability fields: a reel or lot, or one per strand / instrument as "key: id; key: id".
_TRACE = ("wire_lot", "core_lot", "instrument_ids")
#: Sections a unit needs complete before it can be judged today (the terminals line).
_WHOLE = {"terminals": ("inductance", "resistance"),
          "hipot": ("voltage", "duration", "result"),
          "ring": ("capacitor",)}
_PAIR_PARTS = ("series_aiding", "series_opposing")
_INDUCTANCE = re.compile(r"(^strands\.[A-Z]\.inductance$)|(^terminals\.inductance$)|"
                         r"(^before_joint\.[A-Z]-[A-Z]\.series_(aiding|opposing)$)")
_FIELD = re.compile(r"^(strands\.[A-Z]\.(inductance|resistance|turns|q)|before_joint\.[A-Z]-[A-Z]\."
                    r"series_(aiding|opposing)|terminals\.(inductance|resistance|q)|ring\.(capacitor|frequency|decay)|"
                    r"insulation\.(strand_to_strand|to_core|test_voltage)|"
                    r"hipot\.(voltage|duration|leakage|result)|continuity\.strand_to_strand|ambient|waive|notes|wire_lot|core_lot|instrument_ids)$")


def is_unit_field(field: str) -> bool:
    """Whether ``field`` is one the form offers for a unit (anything else is refused)."""
    return bool(_FIELD.match(field))


def form_fields(prediction) -> frozenset:
    """Every unit field this job's form offers: a field for a strand, pair or line the job
    does not have (``strands.Z.inductance``, ``before_joint.B-A.*``) is not among them."""
    return frozenset(f for row in qc_rows(prediction, set()) for f, _ in row["fields"])


def qc_rows(prediction, required: set) -> list[dict]:
    """The QC record's rows, each with the unit fields it takes, and the plan's optional lines.

    Labels, predictions and accept bands are the traveller's own (render.qc_items),
    so the form and the printed sheet cannot disagree; each field's placeholder is
    this job's own prediction, written as it would be typed.
    """
    from windsheet.sheets.render import qc_items

    rows = []
    for it in qc_items(prediction, every=True):
        fields = _fields_for(it["key"], prediction)
        rows.append({**it, "fields": fields, "required": it["key"] in required})
    turns = prediction.strands[0].turns if prediction.strands else None
    extra = [("strand.turns", "Turns counted (where checked)", f"{turns or ''}",
              f"{turns} per strand" if turns else "record"),
             ("waive", "Lines waived, with the reason", "", "line: reason; …"),
             ("wire_lot", "Wire reel or lot (or per strand)", "", "R-2291, or A: R-2291; B: R-2305"),
             ("core_lot", "Form or core lot", "", "GE50-1107"),
             ("instrument_ids", "Instruments, where not the job's", "", "lcr: LCR-07; hipot: HV-03"),
             ("notes", "Notes", "", "")]
    for key, label, predicted, band in extra:
        if key not in {r["key"] for r in rows}:
            rows.append({"key": key, "label": label, "predicted": predicted, "band": band, "judged": False,
                         "fields": _fields_for(key, prediction), "required": key in required})
    return rows


def typed(value, unit: str) -> str:
    """A predicted value written as an inspector types it: ``1.920 mH``, ``100 Mohm``.

    Examples
    --------
    >>> typed(1.92e-3, "H"), typed(100e6, "ohm"), typed(1.0e-8, "F"), typed(None, "H")
    ('1.92 mH', '100 Mohm', '10 nF', '')
    """
    from windsheet.common.fmt import eng

    if value is None:
        return ""
    return eng(value, unit, sig=4, trim=True, sep=" ").replace("µ", "u")


def _fields_for(key: str, prediction) -> list[tuple[str, str]]:
    """(field, placeholder) pairs for one QC row; placeholders from this job's prediction."""
    ids = prediction.strand_ids
    plan = prediction.qc_plan.line(key)
    predicted = plan.predicted if plan is not None else None
    if key == "strand.turns":
        return [(f"strands.{s}.turns", f"{s}: {prediction.strand(s).turns}") for s in ids]
    if key.endswith(".q") and key.split(".")[0] in ("strand", "terminal"):
        field = f"strands.{key.split('.')[1]}.q" if key.startswith("strand.") else "terminals.q"
        hint = f"{predicted:.3g} or D {1 / predicted:.3g}" if predicted else "Q, or D 0.05"
        return [(field, hint)]
    if key.startswith("strand."):
        _, sid, what = key.split(".")
        return [(f"strands.{sid}.{what}", typed(predicted, "H" if what == "inductance" else "ohm"))]
    if key.startswith("pair."):
        _, pair, what = key.split(".")
        return [(f"before_joint.{pair}.{what}", typed(predicted, "H"))]
    if key == "terminal.inductance":
        return [("terminals.inductance", typed(predicted, "H"))]
    if key == "terminal.resistance":
        return [("terminals.resistance", typed(predicted, "ohm"))]
    if key == "ring.frequency":
        rw = prediction.ring_wave
        return [("ring.capacitor", typed(rw.capacitor_F if rw else None, "F")),
                ("ring.frequency", typed(predicted, "Hz"))]
    if key == "ring.decay":
        return [("ring.decay", f"{predicted:.3g}" if predicted else "")]
    if key == "continuity.strand_to_strand":
        return [("continuity.strand_to_strand", "open / shorted")]
    if key == "insulation.strand_to_strand":
        return [("insulation.strand_to_strand", typed(plan.low if plan else None, "ohm"))]
    if key == "insulation.to_core":
        # The tester's voltage goes with it.
        return [("insulation.to_core", typed(plan.low if plan else None, "ohm")),
                ("insulation.test_voltage", "500 V")]
    if key in ("hipot", "hipot.result"):
        volts = plan.test_voltage_V if plan is not None else None
        dur = plan.duration_s if plan is not None else None
        return [("hipot.voltage", typed(volts, "V")), ("hipot.duration", f"{dur:g} s" if dur else ""),
                ("hipot.leakage", "leakage, mA"), ("hipot.result", "pass / fail")]
    if key == "ambient":
        return [("ambient", "21.5 degC")]
    if key == "waive":
        return [("waive", "hipot: tested at goods-in")]
    if key == "notes":
        return [("notes", "")]
    if key in _TRACE:
        return [(key, {"wire_lot": "R-2291", "core_lot": "GE50-1107", "instrument_ids": "lcr: LCR-07"}[key])]
    return []


def _value(field: str, text: str):
    if _INDUCTANCE.match(field) and "/" in text:
        f, _, c = text.partition("/")
        return {"resonant_frequency": f.strip(), "capacitor": c.strip()}
    if field.endswith(".turns") and text.isdigit():
        return int(text)
    if field in ("wire_lot", "instrument_ids") and ":" in text:
        # "A: R-2291; B: R-2305", the measured file's mapping in one line.
        pairs = [p.partition(":") for p in text.split(";") if p.strip()]
        if all(sep for _, sep, _ in pairs):
            return {k.strip(): r.strip() for k, _, r in pairs}
    if field == "waive" and ":" in text:
        # "line: reason; line: reason", the measured file's waive mapping in one line.
        pairs = [p.partition(":") for p in text.split(";") if p.strip()]
        if all(sep for _, sep, _ in pairs):
            return {k.strip(): r.strip() for k, _, r in pairs}
    return text


def _put(doc: dict, field: str, value) -> None:
    *head, last = field.split(".")
    for part in head:
        nxt = doc.setdefault(part, {})
        if not isinstance(nxt, dict):  # pragma: no cover - fields never nest under a value
            return
        doc = nxt
    doc[last] = value


def unit_document(serial: str, entries: dict, complete_only: bool = False) -> Optional[dict]:
    """One unit of the measured document from ``{field: text}``; None when nothing is entered.

    ``complete_only`` leaves out sections still half-entered (a pair with one of its two
    readings, a hipot without its result) so the rest can be judged while typing.
    """
    entries = {f: t for f, t in entries.items() if t.strip()}
    if not entries:
        return None
    unit = {"serial": serial}
    for field in sorted(entries):
        _put(unit, field, _value(field, entries[field].strip()))
    if complete_only:
        for section, parts in _WHOLE.items():
            if section in unit and not all(p in unit[section] for p in parts):
                del unit[section]
        pairs = unit.get("before_joint") or {}
        for pair in [k for k, v in pairs.items() if not all(p in v for p in _PAIR_PARTS)]:
            del pairs[pair]
        if "before_joint" in unit and not pairs:
            del unit["before_joint"]
    return unit


def measured_document(job: str, revision: Optional[str], job_entries: dict, units: list[dict],
                      inspector: Optional[str] = None, date: Optional[str] = None) -> dict:
    """The measured-values document (the shape of a ``*.measured.yaml`` file)."""
    doc = {"job": job}
    if revision not in (None, "-"):
        doc["revision"] = revision
    if inspector:
        doc["inspector"] = inspector
    if date:
        doc["date"] = date
    for field in JOB_FIELDS:
        text = (job_entries.get(field) or "").strip()
        if text:
            doc[field] = _value(field, text)
    doc["units"] = units
    return doc


def field_of_path(path: str, unit_index: int = 0) -> Optional[tuple[str, str]]:
    """Which field a measured-file fault path names: ``("unit", field)``, ``("job", field)`` or None."""
    prefix = f"units[{unit_index}]."
    if path.startswith(prefix):
        rest = path[len(prefix):]
        parts = rest.split(".")
        for n in range(len(parts), 0, -1):
            cand = ".".join(parts[:n])
            if is_unit_field(cand):
                return ("unit", cand)
        # A section named whole (``terminals: is required``) points at its first field.
        for cand in ("terminals.inductance", "hipot.voltage"):
            if cand.startswith(rest + "."):
                return ("unit", cand)
        return None
    top = path.split(".")[0]
    if top in JOB_FIELDS:
        return ("job", top)
    return None


def csv_column(field: str) -> Optional[str]:
    """The sign-off's CSV readings column (a QC line key) that carries a unit field."""
    parts = field.split(".")
    head = parts[0]
    if head == "strands":
        return f"strand.{parts[1]}.{parts[2]}"
    if head == "before_joint":
        return f"pair.{parts[1]}.{parts[2]}"
    if head == "terminals":
        return f"terminal.{parts[1]}"
    if head in ("insulation", "hipot", "continuity", "ring", "wire_lot", "core_lot", "instrument_ids") \
            or field in ("ambient", "notes"):
        return field
    return None


def readings_csv_rows(document: dict) -> list[list[str]]:
    """A measured-values document as the sign-off's CSV readings (readings_form.py): one row a unit.

    Cells hold the quantities as typed, each with its own unit; a waiver is a
    ``waive.LINE`` column holding the reason.  A rung inductance is written as typed
    (``f / C``), which the CSV reader does not take: give such a job as YAML.
    """
    flat_units = []
    for unit in document.get("units") or []:
        flat = {"serial": unit["serial"]}
        for field, value in _flatten(unit):
            if field == "serial":
                continue
            if field.startswith("waive."):
                flat[field] = value
                continue
            if isinstance(value, dict) or field.endswith((".resonant_frequency", ".capacitor")):
                continue
            column = csv_column(field)
            if column:
                flat[column] = str(value)
        for field in ("strands", "terminals", "before_joint"):
            for path, v in _rung(unit.get(field)):
                flat[csv_column(f"{field}.{path}")] = f"{v['resonant_frequency']} / {v['capacitor']}"
        flat_units.append(flat)
    # The CSV has no file-wide ambient, test frequency, lots or instruments: each unit's row carries them
    # (a unit's own lot or instruments replace the file's, as in the measured-values file).
    for key in ("ambient", "test_frequency", *_TRACE):
        value = document.get(key)
        if not value:
            continue
        cells = ({f"{key}.{k}": str(v) for k, v in value.items()} if isinstance(value, dict)
                 else {key: str(value)})
        for flat in flat_units:
            if not any(c == key or c.startswith(key + ".") for c in flat):
                flat.update(cells)
    head = ["job", "revision", "inspector", "date", "instruments", "serial"]
    for flat in flat_units:
        head += [c for c in flat if c not in head]
    job_cells = {k: str(document.get(k) or "") for k in ("job", "revision", "inspector", "date", "instruments")}
    rows = [head]
    for flat in flat_units:
        rows.append([job_cells[c] if c in job_cells else flat.get(c, "") for c in head])
    return rows


def _flatten(node, prefix=""):
    for k, v in node.items():
        path = f"{prefix}{k}"
        if isinstance(v, dict) and not ("resonant_frequency" in v and "capacitor" in v):
            yield from _flatten(v, path + ".")
        else:
            yield path, v


def _rung(section, prefix=""):
    if not isinstance(section, dict):
        return
    for k, v in section.items():
        if isinstance(v, dict) and "resonant_frequency" in v and "capacitor" in v:
            yield f"{prefix}{k}", v
        elif isinstance(v, dict):
            yield from _rung(v, f"{prefix}{k}.")
