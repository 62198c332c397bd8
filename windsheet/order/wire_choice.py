"""The order's wire: a gauge, an IEC nominal diameter or a shop catalog row, resolved to a Wire.

Read once from the validated order; every fault names its field under ``wire``.
"""

from __future__ import annotations

import os
from pathlib import Path

from windsheet.common.errors import InputError
from .document import Order
from .units import parse_quantity


def _catalog_wire(order: Order, wires):
    spec = order.doc.wire
    size = spec.size.strip()
    base = Path(order.path).parent if order.path else Path.cwd()
    cat_path = (base / spec.catalog) if not os.path.isabs(spec.catalog) else Path(spec.catalog)
    try:
        catalog = wires.load_catalog(cat_path)
    except FileNotFoundError:
        raise InputError("wire.catalog", f"catalog file {spec.catalog!r} not found") from None
    except (OSError, UnicodeDecodeError):
        raise InputError("wire.catalog", f"catalog file {spec.catalog!r} cannot be read as CSV text") from None
    except ValueError as exc:
        raise InputError("wire.catalog", f"{spec.catalog}: {exc}") from None
    if size not in catalog:
        raise InputError("wire.size", f"{size!r} is not in catalog {spec.catalog!r}")
    w = catalog[size]
    if not (0 < w.copper_diameter < w.overall_diameter < 0.01 and w.breakdown > 0):
        raise InputError("wire.catalog", f"row {size!r} needs 0 < copper < overall diameter < 10 mm and breakdown > 0")
    if spec.conductor != "copper":
        import dataclasses
        w = dataclasses.replace(w, conductor=spec.conductor)
    return w


def resolve_wire(order: Order):
    """The order's wire as a :class:`windsheet.physics.wire.Wire` (SI).

    ``wire.size`` is a gauge (``28 SWG``, ``22 AWG``), a nominal diameter of
    IEC 60317-0-1 (``0.50 mm``) or a name in the shop catalog.  A diameter that
    is not a standard nominal diameter is refused, naming the nearest standard
    sizes, unless the order gives the datasheet's ``overall_diameter`` and
    ``breakdown``.  Gauge sizes take the next larger IEC row (the standard's
    rule for intermediate sizes) unless ``wire.standard: NEMA MW 1000``.
    """
    from windsheet.physics import wire as wires
    from windsheet.physics import wire_tables as tables

    spec = order.doc.wire
    if spec.catalog:
        return _catalog_wire(order, wires)
    size_text = spec.size.strip()
    try:
        size = tables.parse_gauge(size_text)
    except tables.NotInTable as exc:
        raise InputError("wire.size", str(exc)) from None
    if size is None:
        try:
            nominal = parse_quantity(size_text, "length", "wire.size")
        except InputError:
            raise InputError("wire.size", "expected a nominal copper diameter like '0.50 mm' or a gauge like "
                             f"'22 AWG' or '28 SWG'; got {size_text!r}") from None
        size = tables.Size("metric", None, nominal, size_text)
    if not 0.01e-3 <= size.diameter <= 6e-3:
        raise InputError("wire.size", f"magnet wire runs from 0.01 mm to 6 mm conductor diameter; got {size_text!r}")
    standard = spec.standard or tables.IEC
    if standard == tables.NEMA and size.system != "AWG":
        raise InputError("wire.standard", f"NEMA MW 1000 tabulates AWG sizes; {size_text!r} is not one "
                         "(use IEC 60317-0-1)")
    if spec.overall_diameter is not None and spec.overall_diameter <= size.diameter:
        raise InputError("wire.overall_diameter", f"must exceed the conductor diameter {size.diameter * 1e3:.3f} mm")
    name = {1: "single", 2: "heavy", 3: "triple"}[spec.grade] if standard == tables.NEMA else None
    label = f"{size.label} " + (f"{name} build" if name else wires.GRADE_NAMES[spec.grade])
    if spec.conductor == "aluminium":
        label = f"{label}, aluminium"
    try:
        return wires.standard_wire(size.diameter, spec.grade, thermal_class=spec.thermal_class, label=label,
                                   standard=standard, overall_d=spec.overall_diameter, breakdown=spec.breakdown,
                                   conductor=spec.conductor, size=size)
    except tables.NotInTable as exc:
        hint = "" if "give wire." in str(exc) else (
            "; or give the datasheet's wire.overall_diameter and wire.breakdown, or a shop catalog row")
        raise InputError("wire.size", f"{exc}{hint}") from None
