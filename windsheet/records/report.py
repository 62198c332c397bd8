"""The shop's QC report from its register: bias per family, control charts.

Reads every unit signed off in the register (the latest sign-off of each
unit counts), groups them by family (the design's ``family``, recorded with the
issue; :func:`windsheet.design.family.family_of` for an earlier version's record)
and hands them to :mod:`windsheet.qc.qc_stats`.  This
module only gathers and packages; the statistics are qc_stats', the drawing
sheets/control_chart's.
"""

from __future__ import annotations

import datetime as _dt
import json

#: The QC lines charted and stated by default; the report's tables list every line.
CHART_LINES = ("terminal.inductance", "terminal.resistance")

BIAS_NOTE = ("Bias is the mean of measured / predicted − 1 over the family's units that passed sign-off (a "
             "failed or miswired unit measures its fault, not the process: it is charted, marked, and listed "
             "apart); ± is the units' "
             "sample standard deviation (n − 1), not an uncertainty of the mean. Resistance is compared "
             "at 20 °C. A planner may correct the next order of the family by it; a family of few units, "
             "or a chart with signals, is not yet a stable basis.")


def register_units(conn) -> list[dict]:
    """Every signed-off unit (its latest sign-off), in sign-off order, with its family and lines."""
    fam_by_issue = issue_families(conn)
    latest: dict = {}
    loads = json.loads
    for uid, job, serial, at, mjson, issue_id in conn.execute(
            "SELECT u.id, u.job, u.serial, u.signed_at, u.measurements_json, s.issue_id FROM unit_signoffs u"
            " JOIN signoffs s ON s.id = u.signoff_id ORDER BY u.signed_at, u.id"):
        latest.pop((job, serial), None)  # a re-test supersedes, and takes its own place in time
        m = loads(mjson) or {}
        latest[(job, serial)] = {"job": job, "serial": serial, "signed_at": at,
                                 "family": fam_by_issue[issue_id], "verdict": m.get("verdict") or "pass",
                                 "lines": m.get("lines") or []}
    return list(latest.values())


def issue_families(conn) -> dict:
    """``{issue id: (key, label)}`` of every issue signed off, in one query (not one per issue):
    the family read from its recorded design, made for an older record that has none."""
    from windsheet.design.family import family_of

    out = {}
    for issue_id, fam in conn.execute("SELECT id, json_extract(predictions_json, '$.family') FROM issues"
                                      " WHERE id IN (SELECT issue_id FROM signoffs)"):
        fam = json.loads(fam) if fam is not None else None
        if isinstance(fam, dict) and fam.get("key") is not None:
            out[issue_id] = (fam["key"], fam.get("label"))
        else:
            raw = conn.execute("SELECT predictions_json FROM issues WHERE id = ?", (issue_id,)).fetchone()[0]
            out[issue_id] = family_of(json.loads(raw))
    return out


def build_report(units: list[dict], chart_lines=CHART_LINES) -> dict:
    """The report's content (JSON-ready): statements, families with their statistics and charts' data."""
    from windsheet.qc.qc_stats import family_statistics

    families = family_statistics(units)
    statements = [line["statement"] for fam in families for line in fam["lines"] if line["key"] in chart_lines]
    return {"schema": "windsheet.report/1",
            "generated_at": _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds"),
            "units": len(units), "chart_lines": list(chart_lines), "statements": statements,
            "bias_note": BIAS_NOTE, "families": families,
            "notes": ["Each point is one unit's latest sign-off, in the order signed off.",
                      "Control limits are ±3σ of an individuals chart over the units that passed; σ from "
                      "the average moving range (MR-bar / 1.128). Limits from fewer than some 20 units are provisional (Montgomery "
                      "recommends 20–25 subgroups before limits are fixed; from memory).",
                      "These statistics describe the shop's own records; they are not a calibration."]}


def report_from_register(reg, chart_lines=CHART_LINES) -> dict:
    """:func:`build_report` of an open :class:`windsheet.records.register.Register`."""
    rep = build_report(register_units(reg.conn), chart_lines)
    rep["register"] = str(reg.path)
    return rep


def family_chart(reg, design, result: dict, line_key: str = "terminal.inductance"):
    """The chart data of a sign-off's family with its new units appended, and its title; or None.

    The units of ``result`` (not yet recorded) follow the register's units of the same family.
    """
    from windsheet.qc.qc_stats import family_statistics

    fam = (design.family.key, design.family.label)
    units = [u for u in register_units(reg.conn)
             if u["family"][0] == fam[0] and not (u["job"] == result.get("job")
                                                   and u["serial"] in {x["serial"] for x in result["units"]})]
    units += [{"job": result.get("job"), "serial": u["serial"], "signed_at": None, "family": fam,
               "verdict": u.get("verdict") or "pass", "lines": u.get("lines") or []}
              for u in result.get("units") or []]
    for f in family_statistics(units):
        for line in f["lines"]:
            if line["key"] == line_key and line["chart"]["limits"]["n"] >= 2:
                return line["chart"], f"{f['label']}: {line['item']} (this job's units last)"
    return None
