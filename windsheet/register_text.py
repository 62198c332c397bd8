"""The register as text for ``windsheet register``: the job listing and one job's history.

Kept apart from :mod:`windsheet.signoff` so that listing the register loads
neither numpy nor pydantic (start-up is part of the product).
"""

from __future__ import annotations


def register_lines(jobs: list[dict]) -> list[str]:
    """One line per job for ``windsheet register``."""
    if not jobs:
        return ["(register is empty)"]
    out = []
    for j in jobs:
        n_units = len(j["units"])
        out.append(f"{j['number']:<12} rev {j['revision']:<4} {j['state']:<7} "
                   f"{len(j['units_passed'])}/{n_units} passed  {j.get('part') or ''}")
    return out


def history_lines(history: dict) -> list[str]:
    """A job's events, oldest first, for ``windsheet register JOB``."""
    st = history["state"]
    out = [f"{history['number']}: {st['state']} (rev {st['revision']}, "
           f"{len(st['units_passed'])}/{len(st['units'])} units passed)"]
    for e in history["events"]:
        if e["event"] == "issued":
            out.append(f"  {e['at']}  issued rev {e['revision']}  sha256 {e['order_sha256'][:12]}…"
                       + (f"  by {e['by']}" if e.get("by") else ""))
        else:
            units = ", ".join(f"{u['serial']} {u['verdict']}" for u in e["units"])
            out.append(f"  {e['at']}  signed off rev {e['revision']}: {e['verdict']}  by {e.get('by') or '—'}"
                       f"  ({units})")
    return out
