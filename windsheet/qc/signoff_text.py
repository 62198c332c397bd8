"""Sign-off as text for the terminal: the summary, the register listing, a job's history."""

from __future__ import annotations

from windsheet.design.state_rules import status_words


def summary_lines(result: dict, eng) -> list[str]:
    """Readable lines of a sign-off; ``eng(value, unit)`` formats a number (the CLI's)."""
    out = [f"Sign-off {result['job']} rev {result['revision']} — {result.get('part') or ''}".rstrip(" —"),
           f"Inspector {result.get('inspector') or '—'}, {result.get('date') or 'undated'}: "
           f"{result['units_passed']} passed, {result['units_failed']} failed"
           + (f", {result['units_incomplete']} incomplete" if result.get('units_incomplete') else "")
           + (f", not signed: {', '.join(result['units_not_signed'])}" if result['units_not_signed'] else "")]
    words = status_words(result.get("design_status") or {})
    if words:
        out.insert(1, f"Design: {words}")
    shown_unit = {"ohm": "Ω"}
    for u in result["units"]:
        out.append(f"{u['serial']}: {u['verdict'].upper()}"
                   + (f"  (design {u['design_status'].upper()})" if u.get("design_status") not in (None, "ok") else ""))
        for line in u["lines"]:
            if line["measured"] is None:
                value = line.get("note") or "—"
            elif line["unit"] in ("", "turns"):
                value = f"{line['measured']:.4g}" if isinstance(line["measured"], float) else str(line["measured"])
            else:
                value = eng(line["measured"], shown_unit.get(line["unit"], line["unit"]))
            band = ""
            if line["min"] is not None or line["max"] is not None:
                u_ = shown_unit.get(line["unit"], line["unit"]) if line["unit"] not in ("", "turns") else ""
                lo = eng(line["min"], u_) if u_ else (f"{line['min']:.4g}" if line["min"] is not None else "")
                hi = eng(line["max"], u_) if u_ else (f"{line['max']:.4g}" if line["max"] is not None else "")
                band = f"  [{lo or '—'} … {hi or '—'}]"
            mark = {"pass": "ok", "fail": "FAIL", "info": "", "waived": "wvd"}[line["result"]]
            out.append(f"  {mark:<4} {line['item']:<44} {value}{band}")
        for d in u["diagnosis"]:
            out.append(f"  -> {d['finding']}")
    for c in result.get("cautions") or []:
        out.append(f"Caution: {c}")
    verdict = f"Verdict: {result['verdict'].upper()}"
    not_signed = result.get("units_not_signed") or []
    if not_signed:
        # A verdict over the units read only: say plainly that the job is not finished.
        total = len(result["units"]) + len(not_signed)
        verdict += (f" for the {len(result['units'])} unit(s) read; {len(not_signed)} of {total} units "
                    f"not signed: {', '.join(not_signed[:10])}{' …' if len(not_signed) > 10 else ''}")
    out.append(verdict)
    return out


def register_lines(jobs: list[dict]) -> list[str]:
    """One line per job for ``windsheet register``."""
    if not jobs:
        return ["(register is empty)"]
    out = []
    for j in jobs:
        n_units = len(j["units"])
        design = (j.get("design_status") or {}).get("state", "ok")
        out.append(f"{j['number']:<12} rev {j['revision']:<4} {j['state']:<10} "
                   f"{len(j['units_passed'])}/{n_units} passed  "
                   + (f"design {design.upper()}  " if design != "ok" else "") + f"{j.get('part') or ''}")
    return out


def history_lines(history: dict) -> list[str]:
    """A job's events, oldest first, for ``windsheet register JOB``."""
    st = history["state"]
    out = [f"{history['number']}: {st['state']} (rev {st['revision']}, "
           f"{len(st['units_passed'])}/{len(st['units'])} units passed)"]
    for e in history["events"]:
        if e["event"] in ("issued", "reprinted"):
            design = e.get("design_status") or "ok"
            out.append(f"  {e['at']}  {e['event']} rev {e['revision']}  sha256 {e['order_sha256'][:12]}…"
                       + (f"  by {e['by']}" if e.get("by") else "")
                       + (f"  design {design.upper()}" if design != "ok" else ""))
        else:
            units = ", ".join(f"{u['serial']} {u['verdict']}" for u in e["units"])
            out.append(f"  {e['at']}  signed off rev {e['revision']}: {e['verdict']}  by {e.get('by') or '—'}"
                       f"  ({units})")
    return out
