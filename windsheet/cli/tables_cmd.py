"""``windsheet wires``: the wire tables at the command line."""

from __future__ import annotations

from typing import Optional

import typer

from .common import guarded, to_json
from windsheet.common.errors import InputError


def register(app: typer.Typer) -> None:
    """Add ``wires`` to the command line."""
    app.command("wires")(wires_cmd)


# ---------------------------------------------------------------- wire tables
def _wire_lines(records: list[dict], conductor: str) -> list[str]:
    """Aligned text of wire-table rows, millimetres and volts for the shop."""
    from windsheet.physics.wire import dc_resistance

    def mm(x):
        return "—" if x is None else f"{x * 1e3:.3f}"
    head = ("standard", "nominal mm", "grade", "min incr", "min OD", "max OD", "breakdown V", "test",
            f"Ω/m 20°C {conductor}", "least sure")
    out = [head]
    for r in records:
        d = r["nominal_diameter_m"]
        size = r["series"] if r["standard"].startswith("NEMA") else mm(d)
        rpm = float(dc_resistance(1.0, d, conductor=conductor))
        out.append((r["standard"], size, str(r["grade"]), mm(r["min_increase_m"]), mm(r["min_overall_diameter_m"]),
                    mm(r["max_overall_diameter_m"]), "—" if r["min_breakdown_V"] is None else f"{r['min_breakdown_V']:.0f}",
                    r["breakdown_test"] or "—", f"{rpm:.4g}", r["least_sure"] or "—"))
    widths = [max(len(row[i]) for row in out) for i in range(len(head))]
    return ["  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip() for row in out]


@guarded
def wires_cmd(size: Optional[list[str]] = typer.Argument(None, help="One size: '0.5 mm', '28 SWG' or '22 AWG'."),
              smallest: Optional[str] = typer.Option(None, "--from", help="Smallest nominal diameter, like '0.1 mm'."),
              largest: Optional[str] = typer.Option(None, "--to", help="Largest nominal diameter, like '0.5 mm'."),
              grade: Optional[int] = typer.Option(None, "--grade", min=1, max=3, help="Grade 1, 2 or 3."),
              standard: Optional[str] = typer.Option(None, "--standard", help="iec (IEC 60317-0-1) or nema (NEMA MW 1000)."),
              conductor: str = typer.Option("copper", "--conductor", help="copper or aluminium (resistance column)."),
              as_json: bool = typer.Option(False, "--json", help="Print the rows as JSON (SI units).")):
    """List the wire tables (IEC 60317-0-1 grades, NEMA MW 1000 builds), or everything known for one size."""
    from windsheet.physics import wire_tables as tables
    from windsheet.order.units import parse_quantity

    cond = conductor.strip().lower().replace("aluminum", "aluminium")
    if cond not in ("copper", "aluminium"):
        raise InputError("--conductor", f"expected copper or aluminium, got {conductor!r}")
    std = None
    if standard:
        key = standard.strip().lower()
        std = tables.IEC if key.startswith("iec") else tables.NEMA if key.startswith("nema") else None
        if std is None:
            raise InputError("--standard", f"expected iec or nema, got {standard!r}")
    if size:
        text = " ".join(size)
        try:
            report = size_report(text)
        except tables.NotInTable as exc:
            raise InputError("size", str(exc)) from None
        rows = [r for r in report["rows"] if (grade is None or r["grade"] == grade)
                and (std is None or r["standard"] == std)]
        if as_json:
            typer.echo(to_json({**report, "rows": rows}))
            return
        typer.echo(f"{report['size']}: conductor diameter {report['diameter_m'] * 1e3:.4f} mm "
                   f"({report['diameter_source']})")
        typer.echo("\n".join(_wire_lines(rows, cond)))
        for r in rows:
            rule = f" — {r['rule']}" if r["rule"] else ""
            typer.echo(f"{r['standard']} grade {r['grade']}{rule}:")
            for q, s in r["sources"].items():
                typer.echo(f"  {q}: {s['source']} ({s['sureness']})")
        return
    lo = parse_quantity(smallest, "length", "--from") if smallest else 0.0
    hi = parse_quantity(largest, "length", "--to") if largest else float("inf")
    records = [tables.row_record(r) for r in tables.listing(std, grade, lo, hi)]
    if as_json:
        typer.echo(to_json(records))
    else:
        typer.echo("\n".join(_wire_lines(records, cond)))


def size_report(text: str) -> dict:
    """Everything the tables know of one size as written (``'0.5 mm'``, ``'28 SWG'``, ``'22 AWG'``).

    Raises :class:`NotInTable` for a metric diameter that is not a nominal
    diameter of IEC 60317-0-1 (the message names the nearest sizes).
    """
    from windsheet.order.units import parse_quantity
    from windsheet.physics.wire_tables import (IEC, NotInTable, Size, awg_nominal_diameter, iec_row, nema_row,
                                               parse_gauge, row_for, row_record, swg_table)

    size = parse_gauge(text)
    if size is None:
        size = Size("metric", None, parse_quantity(text, "length", "size"), text.strip())
        iec_row(size.diameter, 1)  # refuses a diameter outside the standard, naming the nearest
    rows = []
    for g in (1, 2, 3):
        try:
            rows.append(row_for(size, g, IEC))
        except NotInTable:
            pass
        if size.system == "AWG":
            try:
                rows.append(nema_row(size.number, g))
            except NotInTable:
                pass
    src = {"AWG": awg_nominal_diameter(size.number)[1] if size.system == "AWG" else "", "SWG": swg_table()[size.number][1] if size.system == "SWG" else "",
           "metric": IEC}[size.system]
    return {"size": size.text, "system": size.system, "diameter_m": size.diameter, "diameter_source": src,
            "rows": [row_record(r) for r in rows]}
