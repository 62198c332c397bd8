"""``windsheet size`` of a transformer order: the readable summary."""

from __future__ import annotations

from .common import eng


def transformer_summary_lines(d) -> list[str]:
    """The aligned summary of a transformer's design."""
    rows = []

    def row(label, value):
        rows.append((label, value))

    j = d.job
    row("Job", f"{j.number} rev {j.revision} — {j.part} (qty {j.quantity})")
    row("Build", ", ".join(f"{b.label} {eng(b.build_m, 'm')}" for b in d.build)
        + f"; {eng(sum(b.build_m for b in d.build), 'm')} in all")
    for w in d.windings:
        taps = f", taps at {', '.join(str(t) for t in w.taps)}" if w.taps else ""
        row(f"Winding {w.name}", f"{w.turns} turns of {w.wire.label}{taps}; {eng(w.resistance_20C_ohm, 'Ω')} at "
            f"20 °C, L {eng(w.inductance_H, 'H')} (others open), {eng(w.open_circuit_voltage_V, 'V')} open circuit "
            f"({w.duty.source}, {eng(w.duty.voltage_V, 'V')} {eng(w.duty.current_A, 'A')})")
    for r in d.regulation:
        row("Regulation", f"{r.winding}: {r.regulation * 100:.1f} % at its rated current")
    for lk in d.leakage:
        row("Leakage", f"{d.windings[0].name} with {lk.shorted} shorted: {eng(lk.inductance_H, 'H')}")
    for c in d.capacitance:
        row("Capacitance", f"{c.between[0]}–{c.between[1]}: {eng(c.capacitance_F, 'F')}")
    row("Core", f"{d.core.verdict.upper()} — {d.core.reason}")
    for b in d.barriers:
        row("Barrier", f"{b.between[0]}–{b.between[1]} {b.insulation}: {b.verdict.upper()}; working "
            f"{eng(b.working_voltage_V, 'V')}, creepage {b.creepage_m * 1e3:.2f} mm of "
            f"{b.creepage_required_m * 1e3:.2f} mm, clearance needs {b.clearance_required_m * 1e3:.2f} mm, "
            f"test {eng(b.test_voltage_V, 'V')}"
            + "".join(f"\n{'':18}{r}" for r in b.reasons))
    if d.thermal:
        th = d.thermal
        row("Heating", f"{th.verdict.upper()} — hot spot {th.hot_spot_C:.0f} °C (class {th.thermal_class_C}), "
            f"loss {eng(th.loss_W, 'W')}")
    row("Design", d.state.state.upper() + "".join(f"\n{'':18}{r}" for r in d.state.reasons))
    for w in d.warnings:
        row("Note", w)
    width = max(len(k) for k, _ in rows)
    return [f"{k:<{width}}  {v}" for k, v in rows]
