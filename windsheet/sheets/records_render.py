"""Printed shop records: the bill of materials and the QC report (Jinja2 + WeasyPrint).

Formats what :mod:`windsheet.records.materials` and :mod:`windsheet.records.report` return;
computes nothing.
"""

from __future__ import annotations

from .render import TEMPLATES_DIR, _page_size, _stylesheet, environment
from .render import _svg_data_url as svg_data_url  # a data: URL: the sheet loads nothing from outside


def records_html(title: str, subtitle: str, doctype: str, sections: list[dict], notes=(),
                 paper: str = "a4", generated: str = "") -> str:
    """One records sheet as HTML: ``sections`` of ``heading``, ``paras``, ``tables`` and ``figures``."""
    for s in sections:
        s.setdefault("paras", [])
        s.setdefault("tables", [])
        s.setdefault("figures", [])
        s["paras"] = [{"cls": "", **para} for para in s["paras"]]
        for t in s["tables"]:
            t.setdefault("num", ())
            t.setdefault("caption", "")
    env = environment(TEMPLATES_DIR)
    return env.get_template("records.html.j2").render(
        title=title, subtitle=subtitle, generated=generated, doctype=doctype, sections=sections, notes=list(notes),
        paper=str(paper).lower(), page_size=_page_size(paper), stylesheet=_stylesheet(TEMPLATES_DIR))


def _q(value, unit):
    if value is None:
        return "—"
    if unit == "m":
        return f"{value:,.2f} m"
    if unit == "kg":
        return f"{value * 1e3:,.1f} g" if value < 1 else f"{value:,.3f} kg"
    return f"{value:,} {_singular(unit) if value == 1 else unit}"


#: A count of one is written in the singular on the printed bill ("1 reel"); the CSV keeps its unit words.
_SINGULAR = {"reels": "reel", "pieces": "piece", "wraps": "wrap", "labels": "label"}


def _singular(unit: str) -> str:
    return _SINGULAR.get(unit, unit)


def materials_html(bill: dict, paper: str = "a4") -> str:
    """The bill of materials sheet: the totals first (what to pull), then each job."""
    from windsheet.records.materials import bill_rows

    rows = bill_rows(bill)
    total = [[r["category"], r["item"], _q(r["quantity"], r["unit"])] for r in rows if r["scope"] == "TOTAL"]
    sections = [{"id": "total", "heading": "1 To pull from stores, all jobs",
                 "tables": [{"head": ["Category", "Item", "Quantity"], "rows": total, "num": (2,)}]}]
    job_tables = []
    for j in bill["jobs"]:
        job_tables.append({"caption": f"{j['job']} rev {j.get('revision') or '—'} — {j.get('part') or ''}, "
                                      f"{j['quantity']} unit(s), "
                                      + ", ".join(f"{w['winding'] + ' ' if w.get('winding') else ''}{w['strands']} "
                                                  "strand(s)" for w in j["wires"]),
                           "head": ["Category", "Item", "Quantity"], "num": (2,),
                           "rows": [[r["category"], r["item"], _q(r["quantity"], r["unit"])]
                                    for r in rows if r["scope"] == j["job"]]})
    sections.append({"id": "jobs", "heading": "2 Per job", "tables": job_tables})
    jobs = ", ".join(j["job"] for j in bill["jobs"])
    return records_html("Bill of materials", jobs, "Bill of materials", sections, bill.get("notes") or (), paper)


def report_html(report: dict, charts: dict, paper: str = "a4") -> str:
    """The QC report: the bias statements, per-line tables and the control charts.

    ``charts`` maps ``(family key, line key)`` to SVG text.
    """
    sections = [{"id": "bias", "heading": "1 The shop's bias per family",
                 "paras": [{"text": s, "cls": "statement"} for s in report["statements"]]
                 + [{"text": report["bias_note"]}]}]
    for k, fam in enumerate(report["families"], start=2):
        table = {"head": ["QC line", "Units passed", "Bias (mean − 1)", "SD of units", "Per job (n: mean − 1)"],
                 "num": (1, 2, 3), "rows": []}
        for line in fam["lines"]:
            b = line["bias"]
            per_job = "; ".join(f"{pj['job']} ({pj['n']}: {(pj['mean'] - 1) * 100:+.1f} %)" for pj in line["per_job"])
            table["rows"].append([line["item"], b["n"], f"{b['bias'] * 100:+.2f} %" if b["bias"] is not None else "—",
                                  f"{b['sd'] * 100:.2f} %" if b["sd"] is not None else "—", per_job])
        figures = [{"key": f"{fam['key']}::{lk}", "alt": f"control chart {lk}", "src": svg_data_url(svg)}
                   for (fk, lk), svg in charts.items() if fk == fam["key"]]
        paras = [{"text": f"Jobs: {', '.join(fam['jobs'])}."}]
        if fam.get("apart"):
            # Listed apart, and marked on the charts: they move neither the bias nor the limits.
            paras.append({"text": "Not in the statistics (failed or incomplete at sign-off): " + "; ".join(
                f"{u['job']} {u['serial']} ({u['verdict']})" for u in fam["apart"]) + "."})
        sections.append({"id": f"family-{k - 1}", "heading": f"{k} {fam['label']}",
                         "paras": paras, "tables": [table],
                         "figures": figures})
    subtitle = f"{report['units']} unit(s) signed off, {len(report['families'])} family(ies)"
    return records_html("QC report", subtitle, "QC report", sections, report.get("notes") or (), paper,
                        generated=f"Generated {report.get('generated_at') or ''}")
