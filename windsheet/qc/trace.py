"""The reel, lot and instrument ids a measured unit names, and how a sheet writes them.

Standard library only: the register's lot search (records/traceability.py)
and the sign-off sheet read these without loading the measured-values models.
"""

from __future__ import annotations


def unit_trace(measured, unit) -> dict:
    """The traceability of one measured unit, file-level values filling its gaps.

    Parameters
    ----------
    measured : windsheet.qc.measured.MeasuredFile
        The whole file (its top-level ``wire_lot``, ``core_lot``,
        ``instrument_ids`` apply to every unit).
    unit : windsheet.qc.measured.UnitReadings
        The unit; its own values replace the file's.

    Returns
    -------
    trace : dict
        ``wire_lot`` ({strand id or "" for all strands: lot}), ``core_lot``
        (text or None) and ``instrument_ids`` ({role: id}); empty when none given.

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> f = NS(wire_lot="R-1", core_lot=None, instrument_ids={"lcr": "LCR-7"})
    >>> u = NS(wire_lot={"B": "R-2"}, core_lot="C-9", instrument_ids=None)
    >>> unit_trace(f, u)
    {'wire_lot': {'B': 'R-2'}, 'core_lot': 'C-9', 'instrument_ids': {'lcr': 'LCR-7'}}
    """
    wire = unit.wire_lot if unit.wire_lot is not None else measured.wire_lot
    if isinstance(wire, str):
        wire = {"": wire}
    return {"wire_lot": dict(wire or {}),
            "core_lot": unit.core_lot if unit.core_lot is not None else measured.core_lot,
            "instrument_ids": dict((unit.instrument_ids if unit.instrument_ids is not None
                                    else measured.instrument_ids) or {})}


def lot_rows(trace: dict) -> list[tuple[str, str, str]]:
    """``(kind, role, lot)`` rows of a trace, as the register stores them.

    Examples
    --------
    >>> lot_rows({"wire_lot": {"": "R-1"}, "core_lot": "C-9", "instrument_ids": {"lcr": "LCR-7"}})
    [('wire', '', 'R-1'), ('core', '', 'C-9'), ('instrument', 'lcr', 'LCR-7')]
    """
    trace = trace or {}
    rows = [("wire", role, lot) for role, lot in sorted((trace.get("wire_lot") or {}).items())]
    if trace.get("core_lot"):
        rows.append(("core", "", trace["core_lot"]))
    rows += [("instrument", role, i) for role, i in sorted((trace.get("instrument_ids") or {}).items())]
    return rows


def trace_text(trace: dict) -> str:
    """One line for a sheet: ``wire R-1; core C-9; lcr LCR-7`` (or "—").

    Examples
    --------
    >>> trace_text({"wire_lot": {"A": "R-1", "B": "R-2"}, "core_lot": None, "instrument_ids": {}})
    'wire A R-1, B R-2'
    """
    parts = []
    wire = (trace or {}).get("wire_lot") or {}
    if wire:
        parts.append("wire " + ", ".join(f"{r} {lot}".strip() for r, lot in sorted(wire.items())))
    if (trace or {}).get("core_lot"):
        parts.append(f"core {trace['core_lot']}")
    ids = (trace or {}).get("instrument_ids") or {}
    if ids:
        parts.append("instruments " + ", ".join(f"{r} {i}" for r, i in sorted(ids.items())))
    return "; ".join(parts) or "—"


KINDS = ("wire", "core", "instrument")
