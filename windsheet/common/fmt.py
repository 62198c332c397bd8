"""Numbers written for people: SI prefixes, significant figures, shop units."""

from __future__ import annotations

import contextvars
import math

_PREFIXES = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}
NBSP = "\u00a0"
OHM = "Ω"


def eng(value, unit: str = "", sig: int = 4, trim: bool = False, sep: str = NBSP) -> str:
    """Write ``value`` in engineering notation with an SI prefix: ``61.20 µH``.

    ``sig`` significant figures; ``trim`` drops trailing zeros (for duty
    values a customer wrote: ``230 V``, ``50 Hz``).  ``None`` prints as a dash.
    ``sep`` joins number and unit: a no-break space on paper, a space in a terminal.
    """
    if value is None:
        return "—"
    v = float(value)
    if not math.isfinite(v):
        return "∞" + (sep + unit if unit else "") if v > 0 else "—"
    if v == 0:
        return "0" + (sep + unit if unit else "")
    exp3 = int(math.floor(math.log10(abs(v)) / 3.0) * 3)
    exp3 = max(-12, min(9, exp3))
    mant = v / 10.0 ** exp3
    text = _sig_text(mant, sig)
    if abs(float(text)) >= 1000.0 and exp3 < 9:
        exp3 += 3
        text = _sig_text(v / 10.0 ** exp3, sig)
    if trim and "." in text:
        text = text.rstrip("0").rstrip(".")
    return text + sep + _PREFIXES[exp3] + unit if unit or _PREFIXES[exp3] else text


def _sig_text(x: float, sig: int) -> str:
    if x == 0:
        return "0"
    decimals = max(0, sig - 1 - int(math.floor(math.log10(abs(x)))))
    text = f"{x:.{decimals}f}"
    # Rounding up can add a digit (999.96 -> 1000.0); keep the figure count.
    if decimals and len(text.replace("-", "").replace(".", "").lstrip("0")) > sig:
        text = f"{x:.{decimals - 1}f}"
    return text


def _thousandths(value, sig, big, small):
    """``big`` units from 1 up, ``small`` (thousandths) below: 12.30 m, 569.4 mm."""
    if value is None:
        return "—"
    v = float(value)
    if abs(v) >= 1.0:
        return _sig_text(v, sig) + NBSP + big
    return _sig_text(v * 1e3, sig) + NBSP + small


#: The unit system a sheet is written in: ``metric``, ``imperial`` (inches and °F only), or ``both``
#: (inches and °F first, millimetres and °C beside them, for a shop that asks for both).
#: ``True`` (the older setting) reads as ``both``.
IMPERIAL = contextvars.ContextVar("windsheet_sheet_units", default="metric")
SYSTEMS = ("metric", "imperial", "both")


def system() -> str:
    """The unit system the sheet being written uses (:data:`IMPERIAL`)."""
    v = IMPERIAL.get()
    if v is True:
        return "both"
    return v if v in SYSTEMS else "metric"


def _decimals(x: float, places: int) -> str:
    """``x`` to ``places`` decimals, trailing zeros dropped: 0.050 → 0.05, 50.0 → 50."""
    text = f"{x:.{places}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def _mm(v: float, fine: bool) -> str:
    """Millimetres to the reading of the tool that measures them; metres from a metre."""
    if abs(v) >= 1.0:
        return _decimals(v, 2) + NBSP + "m"          # tape measure: a centimetre
    mm = v * 1e3
    # Micrometer (0.001 mm) for wire and film; caliper (0.01 mm) below 10 mm, rule or caliper
    # (0.1 mm) above; common practice for what each tool reads.
    places = 3 if fine else (2 if abs(mm) < 10 else 1)
    return _decimals(mm, places) + NBSP + "mm"


def _inches(v: float, fine: bool) -> str:
    inches = v / 0.0254
    if abs(inches) >= 36.0:
        return _decimals(inches / 12, 1) + NBSP + "ft"
    # Micrometer (0.0001 in) for wire and film, caliper (0.001 in) to a foot, 0.1 in above.
    places = 4 if fine else (3 if abs(inches) < 12 else 1)
    return _decimals(inches, places) + NBSP + "in"


def length(value_m, sig: int = 4, fine: bool = False) -> str:
    """A length as the shop measures and writes it, in the sheet's unit system.

    Precision is that of the tool that reads it (common practice): ``fine``
    lengths (wire diameters, tape and film thickness) to a micrometer's
    0.001 mm (0.0001 in); others to a caliper's 0.01 mm below 10 mm and 0.1 mm
    above; a metre and over in metres to the centimetre.  Trailing zeros are
    dropped.  In ``imperial`` only inches (feet from a yard); in ``both``
    inches first, millimetres beside them.  ``sig`` is kept for callers; the
    precision comes from the tool.

    Examples
    --------
    >>> length(0.05e-3, fine=True), length(0.3e-3), length(0.150), length(12.3)
    ('0.05\xa0mm', '0.3\xa0mm', '150\xa0mm', '12.3\xa0m')
    """
    if value_m is None:
        return "—"
    v = float(value_m)
    units = system()
    if units == "metric":
        return _mm(v, fine)
    if units == "imperial":
        return _inches(v, fine)
    return f"{_inches(v, fine)} ({_mm(v, fine)})"


def mass(value_kg, sig: int = 3) -> str:
    """A mass in grams (kilograms above 1 kg); ounces and pounds in imperial."""
    if value_kg is None:
        return "—"
    units = system()
    metric = _thousandths(value_kg, sig, "kg", "g")
    if units == "metric":
        return metric
    oz = float(value_kg) / 0.028349523125
    imperial = (_sig_text(oz / 16, sig) + NBSP + "lb") if oz >= 16 else (_sig_text(oz, sig) + NBSP + "oz")
    return imperial if units == "imperial" else f"{imperial} ({metric})"


def percent(fraction, sig: int = 3) -> str:
    if fraction is None:
        return "—"
    text = _sig_text(float(fraction) * 100.0, sig)
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text + NBSP + "%"


def _degrees(value: float, unit: str) -> str:
    return _decimals(value, 1) + NBSP + unit


def celsius(value) -> str:
    """A temperature given in °C, written in the sheet's system: °F in imperial, both in ``both``."""
    if value is None:
        return "—"
    c = float(value)
    units = system()
    if units == "metric":
        return _degrees(c, "°C")
    f = _degrees(c * 9 / 5 + 32, "°F")
    return f if units == "imperial" else f"{f} ({_degrees(c, '°C')})"


def kelvin(rise) -> str:
    """A temperature difference: K in metric, °F of difference (9/5 K) in imperial."""
    if rise is None:
        return "—"
    k = float(rise)
    units = system()
    if units == "metric":
        return _degrees(k, "K")
    f = _degrees(k * 9 / 5, "°F")
    return f if units == "imperial" else f"{f} ({_degrees(k, 'K')})"
