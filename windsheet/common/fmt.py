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


#: Set while a sheet is written for an order given in inches: lengths then
#: carry inches (feet above a metre) beside the millimetres.
IMPERIAL = contextvars.ContextVar("windsheet_imperial_lengths", default=False)


def length(value_m, sig: int = 4) -> str:
    """A length as the shop writes it: millimetres below a metre, metres above.

    With :data:`IMPERIAL` set, inches follow in brackets (feet from a metre):
    ``12.70 mm (0.500 in)``; 1 in = 25.4 mm exactly.
    """
    metric = _thousandths(value_m, sig, "m", "mm")
    if not IMPERIAL.get() or value_m is None:
        return metric
    inches = float(value_m) / 0.0254
    if abs(inches) >= 39.37:
        return f"{metric} ({inches / 12:.1f}{NBSP}ft)"
    return f"{metric} ({inches:.4f}{NBSP}in)" if abs(inches) < 0.1 else f"{metric} ({inches:.3f}{NBSP}in)"


def mass(value_kg, sig: int = 3) -> str:
    """A mass in grams (kilograms above 1 kg)."""
    return _thousandths(value_kg, sig, "kg", "g")


def percent(fraction, sig: int = 3) -> str:
    if fraction is None:
        return "—"
    text = _sig_text(float(fraction) * 100.0, sig)
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text + NBSP + "%"


def celsius(value) -> str:
    if value is None:
        return "—"
    text = f"{float(value):.1f}".rstrip("0").rstrip(".")
    return text + NBSP + "°C"
