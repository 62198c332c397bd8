"""What the sign-off sheet shows: measured against predicted, arranged from the sign-off result."""

from __future__ import annotations

from windsheet.common.fmt import NBSP as _NBSP
from windsheet.common.fmt import OHM, celsius, eng
from .sheet_pdf import header_part
from windsheet.qc.trace import lot_rows, trace_text
from .traveller_sheet import DEFERRAL


#: Section headings of the sign-off sheet.
SIGNOFF_SECTIONS = ("1 Result", "2 Units", "3 Spread of the units", "4 Cautions", "5 Sign-off")


def measured_text(value, unit: str) -> str:
    """A sign-off value in the sheet's notation (the line's unit as sign-off names it)."""
    if value is None:
        return "—"
    if unit == "turns":
        return f"{int(value)}"
    if unit == "":
        return f"{float(value):.4f}"
    if unit == "s":
        return f"{float(value):g}{_NBSP}s"
    return eng(value, {"ohm": OHM}.get(unit, unit))


def _line_row(line: dict) -> dict:
    unit = line.get("unit") or ""
    lo, hi = line.get("min"), line.get("max")
    if lo is None and hi is None:
        accept = "—"
    elif hi is None:
        accept = f"≥ {measured_text(lo, unit)}"
    elif lo is None:
        accept = f"≤ {measured_text(hi, unit)}"
    else:
        accept = f"{measured_text(lo, unit)} – {measured_text(hi, unit)}"
    dev = line.get("deviation")
    measured = line.get("measured")
    return {
        "key": line.get("key"), "item": line.get("item"),
        "measured": measured_text(measured, unit) if measured is not None else (line.get("note") or "—"),
        "predicted": measured_text(line.get("predicted"), unit) if line.get("predicted") is not None else "",
        "accept": accept,
        "deviation": f"{dev * 100:+.1f}{_NBSP}%" if dev is not None else "",
        "result": line.get("result") or "info",
        "note": line.get("note") if measured is not None else "",
    }


def signoff_context(prediction, result: dict) -> dict:
    units = []
    for u in result.get("units") or []:
        units.append({"serial": u.get("serial"), "verdict": u.get("verdict"), "design_status": u.get("design_status"),
                      "ambient": celsius(u.get("ambient_C")) if u.get("ambient_C") is not None else "—",
                      "notes": u.get("notes"),
                      "trace": trace_text(u["trace"]) if lot_rows(u.get("trace")) else "",
                      "rows": [_line_row(x) for x in u.get("lines") or []],
                      "diagnosis": u.get("diagnosis") or []})
    spread = []
    for sp in result.get("spread") or []:
        unit = sp.get("unit") or ""
        rf = sp.get("range_fraction")
        spread.append({"item": sp.get("item"), "count": sp.get("count"),
                       "mean": measured_text(sp.get("mean"), unit if unit != "turns" else ""),
                       "min": measured_text(sp.get("min"), unit), "max": measured_text(sp.get("max"), unit),
                       "range": f"{rf * 100:.1f}{_NBSP}%" if rf is not None else "—"})
    same_order = (result.get("order_hash") == prediction.order_hash) if result.get("order_hash") else None
    from windsheet.design.state_rules import status_words

    design = result.get("design_status") or {"state": "ok", "reasons": []}
    return {"p": prediction, "r": result, "job": prediction.job, "units": units,
            # A design banner flags the running header as a forced issue does.
            "header_part": header_part(prediction.job, bool(status_words(design))),
            "spread": spread, "same_order": same_order, "design": design, "design_words": status_words(design),
            "apart": list(result.get("units_apart") or []),
            "cautions": list(result.get("cautions") or []), "deferral": DEFERRAL}


