"""Measured-values forms: a pre-filled file to read into, and CSV readings.

``windsheet readings-form`` writes, for an order, a measured-values file with
the job's serial numbers and every required QC line left empty (YAML, or CSV
with ``--csv``).  Left empty, a line is "not read": the unit signs off
INCOMPLETE until it is filled in or waived.

The CSV form is one row per unit and one column per QC line, the unit in the
header: ``terminal.inductance [uH]``, ``strand.A.resistance [ohm]``,
``ambient [degC]``, ``hipot.result`` ...  A cell holds a number (in the
header's unit), a word where the line takes one (``open``, ``pass``), or a
quantity with its own unit.  Columns ``job``, ``revision``, ``inspector``,
``date`` and ``instruments`` must agree on every row.
"""

from __future__ import annotations

import csv
import io
import re

from windsheet.common.errors import InputError, quoted

#: Columns of a required line, with the unit written in the header.
_COLUMNS = {
    "inductance": "uH", "resistance": "ohm", "series_aiding": "uH", "series_opposing": "uH",
}
_FILE_FIELDS = ("job", "revision", "inspector", "date", "instruments")
_HEADER = re.compile(r"^\s*([^\[\]]+?)\s*(?:\[\s*([^\[\]]*?)\s*\])?\s*$")


def _columns_for(key: str, design) -> list[str]:
    """CSV columns (with units) that carry one required QC line."""
    ids = design.strand_ids
    if key == "ambient":
        return ["ambient [degC]"]
    if key == "hipot":
        return ["hipot.voltage [V]", "hipot.duration [s]", "hipot.leakage [mA]", "hipot.result"]
    if key == "continuity.strand_to_strand":
        return [f"continuity.{a}-{b}" for a in ids for b in ids if a < b]
    if key.startswith("insulation."):
        return [f"{key} [Gohm]"] + (["insulation.test_voltage [V]"] if key.endswith("to_core") else [])
    if key == "ring.frequency":
        return ["ring.capacitor [nF]", "ring.frequency [kHz]"]
    last = key.rsplit(".", 1)[-1]
    return [f"{key} [{_COLUMNS[last]}]"] if last in _COLUMNS else [key]


def _form_lines(design) -> list[str]:
    """The lines a form asks for: the required ones and the optional ones the traveller prints (the ring)."""
    return list(design.qc_required) + [ln.key for ln in design.qc_plan.lines
                                       if not ln.required and ln.printed and ln.key not in design.qc_required]


def csv_header(design) -> list[str]:
    cols = ["job", "revision", "inspector", "date", "serial"]
    for key in _form_lines(design):
        for c in _columns_for(key, design):
            if c not in cols:
                cols.append(c)
    return cols + ["notes"]


def csv_form(design) -> str:
    """The CSV form: header and one row per serial number, readings empty."""
    job = design.job
    head = csv_header(design)
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(head)
    for serial in job.units:
        row = {"job": job.number, "revision": job.revision or "", "serial": serial}
        w.writerow([row.get(c, "") for c in head])
    return buf.getvalue()


def yaml_form(design) -> str:
    """The YAML form: every required line of every unit, left empty."""
    job = design.job
    req = design.qc_required
    f_test = design.test.frequency_Hz
    hipot = design.qc_plan.line("hipot")
    ids = design.strand_ids
    out = [f"# Measured values for job {job.number} rev {job.revision}: fill in every empty line.",
           "# A line left empty is not read: the unit signs off INCOMPLETE.  To waive a line write",
           "#   waive: {hipot: \"reason\"}   under the unit.  Every quantity carries its unit.",
           f"job: {job.number}", f"revision: {job.revision or ''}".rstrip(),
           "inspector:           # who signs the units off", "date:                # 2026-12-03",
           "instruments:", f"test_frequency: {f_test / 1e3:g} kHz" if f_test else "test_frequency:",
           "units:"]
    strand_keys = [k for k in req if k.startswith("strand.")]
    pair_keys = [k for k in req if k.startswith("pair.")]
    for serial in job.units:
        out.append(f"  - serial: {serial}")
        if "ambient" in req:
            out.append("    ambient:           # e.g. 21.5 degC")
        if strand_keys:
            out.append("    strands:")
            for s in ids:
                out += [f"      {s}:", "        inductance:    # uH, strand alone",
                        "        resistance:    # ohm, at the ambient"]
        if pair_keys:
            out.append("    before_joint:      # series-aiding and series-opposing, before the joint is made")
            for k in dict.fromkeys(k.split(".")[1] for k in pair_keys):
                out += [f"      {k}:", "        series_aiding:", "        series_opposing:"]
        out += ["    terminals:", "      inductance:      # uH", "      resistance:      # ohm, at the ambient"]
        ins = [k.split(".")[1] for k in req if k.startswith("insulation.")]
        if ins:
            out.append("    insulation:")
            out += [f"      {k}:" for k in ins] + ["      test_voltage:    # e.g. 500 V"]
        if "continuity.strand_to_strand" in req:
            out.append("    continuity:")
            out += [f"      {a}-{b}:            # open or shorted" for a in ids for b in ids if a < b]
        if "hipot" in req:
            spec = (f"   # spec {hipot.test_voltage_V:.0f} V for {hipot.duration_s or 60:g} s"
                    if hipot is not None and hipot.test_voltage_V else "")
            out += [f"    hipot:{spec}", "      voltage:", "      duration:", "      leakage:", "      result:"]
        if "ring.frequency" in _form_lines(design) and design.ring_wave is not None:
            cap = design.ring_wave.capacitor_F * 1e9
            out += ["    ring:              # optional: the ring (surge comparison) test",
                    f"      capacitor: {cap:g} nF", "      frequency:       # e.g. 48.3 kHz",
                    "      decay:           # ratio of successive peaks, e.g. 0.82"]
    return "\n".join(out) + "\n"


# --- Reading a CSV -----------------------------------------------------------------

def _path_of(key: str, where: str) -> list[str]:
    parts = key.split(".")
    head = parts[0]
    if key in ("serial", "ambient", "test_frequency", "notes"):
        return [key]
    if head == "terminal" and len(parts) == 2:
        return ["terminals", parts[1]]
    if head == "strand" and len(parts) == 3:
        return ["strands", parts[1], parts[2]]
    if head == "pair" and len(parts) == 3:
        return ["before_joint", parts[1], parts[2]]
    if head in ("insulation", "hipot") and len(parts) == 2:
        return [head, parts[1]]
    if head == "continuity" and len(parts) == 2:
        return ["continuity", parts[1]]
    if head == "ring" and len(parts) == 2:
        return ["ring", parts[1]]
    if head in ("wire_lot", "instrument_ids") and len(parts) <= 2 or key == "core_lot":
        return parts
    if head == "waive" and len(parts) >= 2:
        return ["waive", ".".join(parts[1:])]
    raise InputError(where, f"unknown column {quoted(key)}; expected a QC line like 'terminal.inductance [uH]'")


def measured_from_csv(text: str, label: str = "readings.csv"):
    """Validated measured values from CSV text; a fault names its row and column."""
    from .measured import measured_from_dict

    columns: dict = {}
    doc = measured_dict_from_csv(text, label, columns)
    try:
        return measured_from_dict(doc)
    except InputError as exc:
        m = re.match(r"^units\[(\d+)\]\.?(.*)$", exc.path or "")
        if not m:
            raise
        k, rest = int(m.group(1)), m.group(2)
        col = next((c for path, c in columns.items() if rest == path or rest.startswith(path + ".")), None)
        where = f"{label}: row {k + 2}" + (f", column {quoted(col)}" if col else (f", {rest}" if rest else ""))
        raise InputError(where, exc.message) from None


def measured_dict_from_csv(text: str, label: str = "readings.csv", columns=None) -> dict:
    """A measured-values document (as from YAML) built from CSV rows.

    ``columns``, when given, is filled with the dotted document path of each
    column (``terminals.inductance``) against the header that gave it.
    """
    from windsheet.order.limits import JOB_UNITS

    # Count lines before parsing: a file with more rows than any job has units would
    # otherwise be read and validated in full (seconds) only to be refused.
    lines = sum(1 for ln in text.splitlines() if ln.strip())
    if lines - 1 > JOB_UNITS:
        raise InputError(label, f"{lines - 1} rows is more than a job's units (at most {JOB_UNITS}); "
                                "expected a header row and one row per unit")
    reader = csv.reader(io.StringIO(text, newline=""), strict=True)
    try:
        rows = list(reader)
    except csv.Error as exc:
        problem = (f"a cell is longer than {csv.field_size_limit()} characters" if "field limit" in str(exc)
                   else "a quote is not closed" if "end of data" in str(exc)
                   else f"not readable as CSV ({str(exc)[:80]})")
        raise InputError(f"{label}: line {reader.line_num}", f"{problem}; expected one row per unit") from None
    rows = [r for r in rows if any(c.strip() for c in r)]
    if len(rows) < 2:
        raise InputError(label, "expected a header row and one row per unit")
    cols = []
    for k, h in enumerate(rows[0]):
        m = _HEADER.match(h or "")
        if not m:
            raise InputError(f"{label}:column {k + 1}", f"cannot read header {quoted(h)}; expected 'name [unit]'")
        name, unit = m.group(1), m.group(2)
        cols.append((name, unit, None if name in _FILE_FIELDS else _path_of(name, f"{label}:{h if len(h) <= 40 else h[:39] + chr(8230)}")))
        if columns is not None and cols[-1][2]:
            columns[".".join(cols[-1][2])] = h.strip()
    if not any(c[0] == "serial" for c in cols):
        raise InputError(label, "needs a 'serial' column")
    doc: dict = {}
    units = []
    for i, row in enumerate(rows[1:], start=2):
        unit: dict = {}
        for (name, u, path), cell in zip(cols, row):
            cell = cell.strip()
            if not cell:
                continue
            if path is None:
                if doc.get(name, cell) != cell:
                    raise InputError(f"{label}:row {i}:{name}", f"is {quoted(cell)} but an earlier row has {quoted(doc[name])}")
                doc[name] = cell
                continue
            value = f"{cell} {u}" if u and re.match(r"^[-+]?[\d.]+(e[-+]?\d+)?$", cell, re.I) else cell
            if path[-1] == "turns" and re.fullmatch(r"[1-9]\d{0,6}", cell):
                value = int(cell)  # a count, as YAML would read it (leading zeros stay text and are refused)
            node = unit
            for p in path[:-1]:
                node = node.setdefault(p, {})
            node[path[-1]] = value
        units.append(unit)
    doc["units"] = units
    return doc
