"""Sign-off lines: one reading against its band, and a unit's verdict from its lines.

A unit passes only what it has proven: every QC line the prediction requires
(``qc_required``, see qc_lines.py) must be read or waived in writing, else the
unit is INCOMPLETE, a verdict of its own that never counts as passed.
"""

from __future__ import annotations

from windsheet.common.errors import InputError
from .measured import InductanceReading, resistance_at_20C

#: Unit verdicts, worst first: a failed line outranks a missing one.
VERDICTS = ("fail", "incomplete", "pass")

#: Exit statuses of ``windsheet signoff``: 2 is reserved for bad input.
EXIT_STATUS = {"pass": 0, "fail": 1, "incomplete": 3}


def band_result(value, lo, hi) -> str:
    """``pass`` when ``lo <= value <= hi`` (either bound may be None), else ``fail``."""
    if value is None:
        return "fail"
    if lo is not None and value < lo:
        return "fail"
    if hi is not None and value > hi:
        return "fail"
    return "pass"


def line(key, item, unit, measured, predicted=None, lo=None, hi=None, *, result=None,
         reading=None, note=""):
    """One sign-off line as a JSON-ready dict; ``result`` is judged from the band if not given."""
    if result is None:
        result = "info" if lo is None and hi is None else band_result(measured, lo, hi)
    deviation = None
    if measured is not None and predicted:
        deviation = measured / predicted - 1.0
    return {"key": key, "item": item, "unit": unit, "measured": measured, "predicted": predicted,
            "min": lo, "max": hi, "result": result, "deviation": deviation,
            "reading": reading or {}, "note": note}


def band(value, tol):
    """``value * (1 -/+ tol)``."""
    return value * (1 - tol), value * (1 + tol)


def inductance_line(key, item, rd: dict, predicted, lo=None, hi=None, note=""):
    """An inductance line; an ``open`` reading fails as an open circuit."""
    if rd.get("open"):
        return line(key, item, "H", None, predicted, lo, hi, result="fail", reading={"open": True},
                    note="open circuit")
    return line(key, item, "H", rd["inductance_H"], predicted, lo, hi, reading=rd, note=note)


def inductance_reading(reading: InductanceReading, default_f) -> dict:
    """The reading in SI with the frequency it was taken at."""
    out = reading.describe()
    out["test_frequency_Hz"] = reading.frequency(default_f)
    return out


def freq_note(reading: dict) -> str:
    f = reading.get("test_frequency_Hz")
    if reading.get("open"):
        return "open circuit"
    if reading.get("method") == "ringing":
        return (f"rung at {reading['resonant_frequency_Hz'] / 1e3:.4g} kHz against "
                f"{reading['capacitor_F'] * 1e9:.4g} nF")
    return f"at {f / 1e3:.4g} kHz" if f else ""


def resistance_line(key, item, reading, ambient, predicted, tol_or_band, path, conductor="copper"):
    """A resistance line corrected to 20 °C with the conductor's own coefficient;
    ``tol_or_band`` is a fraction or (lo, hi).  None when no ambient temperature is
    known (an open circuit fails without one)."""
    lo, hi = (band(predicted, tol_or_band) if not isinstance(tol_or_band, tuple) else tol_or_band)
    if reading.open:
        return line(key, item, "ohm", None, predicted, lo, hi, result="fail",
                    reading={"open": True}, note="open circuit")
    if ambient is None:
        # Not judged (None): without the ambient the reading cannot be corrected to 20 °C, so the
        # line stays unread and the unit INCOMPLETE, never passed on an uncorrected value.
        return None
    from windsheet.physics.wire import conductor as conductor_data

    alpha = conductor_data(conductor)["temperature_coefficient_20C"]
    r20 = float(resistance_at_20C(reading.value, ambient, conductor=conductor))
    note = (f"{reading.value:.5g} Ω at {ambient:.3g} °C, corrected to 20 °C "
            f"(α {alpha}/K, {conductor})")
    return line(key, item, "ohm", r20, predicted, lo, hi,
                reading={"resistance_ohm": reading.value, "ambient_C": ambient}, note=note)


# --- Required lines ------------------------------------------------------------------

def _present(key: str, lines: list[dict], ambient) -> bool:
    if key == "ambient":
        return ambient is not None
    if key == "hipot":
        return any(x["key"] == "hipot.result" for x in lines)
    if key == "continuity.strand_to_strand":
        return any(x["key"].startswith("continuity.") for x in lines)
    return any(x["key"] == key for x in lines)


def missing_lines(required: list[str], lines: list[dict], ambient, strands=()) -> list[str]:
    """Required keys with no reading among ``lines``.

    ``continuity.strand_to_strand`` needs every pair of strands read (or one
    ``strand_to_strand`` reading, which the sign-off spreads over every pair).
    """
    missing = [k for k in required if not _present(k, lines, ambient)]
    if "continuity.strand_to_strand" in required and "continuity.strand_to_strand" not in missing:
        read = {x["key"] for x in lines if x["key"].startswith("continuity.")}
        want = {f"continuity.{a}-{b}" for a in strands for b in strands if a < b}
        if want - read:
            missing.append("continuity.strand_to_strand")
    return missing


def check_waivers(waive: dict, required: list[str], path: str) -> None:
    """A waiver names a required line and gives a reason; anything else is refused."""
    for key, reason in waive.items():
        if key not in required:
            raise InputError(f"{path}.{key}", "waives a line this traveller does not list; "
                                              f"its lines: {', '.join(required)}")
        if not str(reason).strip():
            raise InputError(f"{path}.{key}", "a waiver needs a reason, like 'hipot: tested by the customer'")


def waived_line(key: str, reason: str) -> dict:
    """The sheet's record of a waived line: no reading, the inspector's reason."""
    return line(key, f"Waived: {key}", "", None, result="waived", note=reason)


def unit_verdict(lines: list[dict], missing: list[str]) -> str:
    """``fail`` if any line fails, else ``incomplete`` if a required line is missing, else ``pass``."""
    if any(x["result"] == "fail" for x in lines):
        return "fail"
    return "incomplete" if missing else "pass"


def job_verdict(unit_verdicts: list[str]) -> str:
    """The worst unit verdict; a job with no units is incomplete."""
    for v in VERDICTS:
        if v in unit_verdicts:
            return v
    return "incomplete"
