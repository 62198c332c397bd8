"""``windsheet size``: the prediction of one order or a batch, as a summary or JSON."""

from __future__ import annotations

import json

import typer

from windsheet.common.errors import InputError

from .common import count, eng, guarded, internal_fault, to_json


def register(app: typer.Typer) -> None:
    """Add ``size`` to the command line."""
    app.command()(size)


def summary_lines(p) -> list[str]:
    """The readable, aligned summary of a sized design."""
    rows = []

    def row(label, value):
        rows.append((label, value))

    j = p.job
    row("Job", f"{j.number} rev {j.revision} — {j.part} (qty {j.quantity})")
    row("Wire", p.wire.label + f", overall {eng(p.wire.overall_diameter_m, 'm')}")
    w = p.winding
    layers = ", ".join(str(n) for n in w.turns_in_layer)
    row("Winding", f"{count(w.strands, 'strand')} × {w.turns_per_strand} turns, "
        f"{count(w.layers, 'layer')} ({layers} turns per strand), pitch {eng(w.pitch_m, 'm')}")
    if w.target:
        t = w.target
        row("Target", f"{eng(t.inductance_H, 'H')} → {t.turns_exact:.2f} turns exact, "
            f"{t.turns_chosen} chosen give {eng(t.inductance_at_chosen_H, 'H')} ({t.error * 100:+.2f} %)")
    fit = p.fit
    row("Fit", f"{fit.slots_per_layer} slots per layer, traverse used {eng(fit.traverse_used_m, 'm')}"
        + (f" of {eng(fit.traverse_m, 'm')}" if fit.traverse_m else "")
        + f", build {eng(fit.build_m, 'm')}")
    place = fit.placement
    if place and (place.margin_m or place.bare_start_m > 1e-5):
        row("Placement", f"first turn {eng(place.first_turn_m, 'm')} from the start end"
            + (f", margin tape {eng(place.margin_m, 'm')} each end" if place.margin_m else ""))
    row("Hookup", hookup_words(p))
    if p.terminations:
        row("Pins", ", ".join(f"pin {t.pin} {' + '.join(t.ends)}" for t in p.terminations))
    for s in p.strands:
        row(f"Strand {s.id}", f"{eng(s.inductance_H, 'H')}, {eng(s.resistance_20C_ohm, 'Ω')} at 20 °C, "
            f"{s.wire_length_m:.2f} m ({s.wire_length_with_scrap_m:.2f} m with scrap), "
            f"{s.mass_kg * 1e3:.1f} g")
    t = p.terminal
    own = "each winding: " if p.hookup.name == "separate" and len(p.strands) > 1 else ""
    d = p.duty
    hot = {"given": "", "heat balance": " (heat balance)",
           "ambient": " (ambient: nothing heats it)" if d.current_basis is None else " (ambient: no steady temperature)"}
    row("Terminals", own + f"L {eng(t.inductance_H, 'H')} (accept {eng(t.accept.inductance_min_H, 'H')} … "
        f"{eng(t.accept.inductance_max_H, 'H')}), R {eng(t.resistance_ohm, 'Ω')} at 20 °C, "
        f"{eng(t.resistance_hot_ohm, 'Ω')} at {d.operating_temperature_C:.0f} °C"
        + hot.get(d.operating_temperature_basis or "given", ""))
    if d.current_basis and d.current_basis != "given":
        row("Current", f"{eng(d.current_A, 'A')} rms, from the {d.current_basis}")
    if t.accept.inductance_basis == "target":
        row("", f"L accept band is the ordered target ± tolerance; prediction "
            f"{t.accept.prediction_offset * 100:+.2f} % from target")
    if t.capacitance_note:
        row("", f"C and self-resonance not predicted: {t.capacitance_note}")
    else:
        row("", f"C {eng(t.capacitance_F, 'F')}, self-resonance {eng(t.self_resonance_Hz, 'Hz')}")
    if t.resistance_ac_ohm is not None and t.loss_W is not None and p.ac_resistance and p.duty.frequency_Hz:
        row("", f"R {eng(t.resistance_ac_ohm, 'Ω')} at {eng(p.duty.frequency_Hz, 'Hz')} "
            f"(AC/DC {p.ac_resistance.ratio:.3f}), loss {eng(t.loss_W, 'W')} at the duty current")
    if p.current_sheet_inductance_H:
        row("Cross-check", f"current sheet (Nagaoka) {eng(p.current_sheet_inductance_H, 'H')}, with Rosa's "
            f"correction {eng(p.current_sheet_rosa_corrected_H, 'H')} (strand A)")
    th = p.thermal
    if th and th.hot_spot_C is not None:
        row("Heating", f"{th.verdict.upper()} — surface +{th.surface_rise_K:.1f} K, hot spot "
            f"{th.hot_spot_C:.0f} °C (class {th.thermal_class_C or '—'}), "
            f"{th.current_density_A_per_mm2:.2f} A/mm²")
    elif th:
        # No temperature to give: a runaway, or nothing to heat the winding with.
        row("Heating", ("RUNAWAY — " if th.converged is False else "NOT JUDGED — ") + th.reason)
    imp = p.impulse
    if imp:
        row("Fast edge", f"first turn {eng(imp.first_turn_Vpk, 'V')} peak (even share "
            f"{eng(imp.first_turn_uniform_Vpk, 'V')}), worst pair {eng(imp.worst_pair_Vpk, 'V')} peak"
            + (f", α {imp.alpha:.3g}" if imp.alpha is not None else ""))
    wa = p.worst_adjacent
    row("Worst adjacent", f"{eng(wa.voltage_Vpk, 'V')} peak — {wa.where}")
    ins = p.insulation
    sec = p.sections
    if sec is not None:
        row("Sections", f"{sec.count} × {eng(sec.width_m, 'm')}, walls {eng(sec.wall_thickness_m, 'm')} "
                        f"{sec.wall_material}; layers {', '.join(map(str, sec.layers_per_section))}; "
                        f"walls {sec.verdict.upper()}, worst {max(w.across_Vpk for w in sec.walls):.0f} V peak across "
                        f"(allowed {sec.walls[0].allowed_Vpk:.0f} V peak), crossover "
                        f"{max(w.crossover_Vpk for w in sec.walls):.0f} V peak (sleeved)")
    row("Insulation", f"{ins.verdict.upper()}" + "".join(f"\n{'':16}  {r}" for r in ins.reasons))
    row("Hipot", f"{eng(p.hipot.voltage_V, 'V')} for {p.hipot.duration_s:.0f} s — {p.hipot.basis}")
    if p.state.state != "ok":
        row("Design", p.state.state.upper())
    for wtext in p.warnings:
        row("Note", wtext)
    width = max(len(k) for k, _ in rows)
    return [f"{k:<{width}}  {v}" for k, v in rows]


def _end(end: str) -> str:
    # "A.finish" -> "A finish": the words the bench uses.
    return end.replace(".", " ")


def hookup_words(p) -> str:
    """The hookup as a winder says it, every terminal numbered as on the traveller:
    ``series-aiding — A finish joined to B start; terminals T1 A start, T2 B finish``."""
    joins = "; ".join(" joined to ".join(_end(e) for e in j.ends) for j in p.connections.joints)
    terms = ", ".join(f"{t.label} {_end(t.end)}" for t in p.connections.terminals)
    return f"{p.hookup.name} — " + (f"{joins}; " if joins else "no joins; ") + f"terminals {terms}"


def size(orders: list[str] = typer.Argument(..., help="Order files (YAML), folders of orders or globs; "
                                            "'-' reads one order from standard input."),
         as_json: bool = typer.Option(False, "--json", help="Print the whole prediction as JSON (SI units); "
                                      "several orders print one JSON object per line (JSON Lines).")):
    """Size coil orders: turns, layers, fit, wire, resistance, inductance, stress.

    Exit 0 when every order sizes and none fails its insulation check, 1 when one fails it
    (or, in a batch, when any order is refused), 2 for bad input to a single order.
    """
    from .batch import expand_orders, load_order_arg, progress

    try:
        files = expand_orders(orders)
    except InputError as exc:
        typer.echo(f"windsheet: {exc}", err=True)
        raise typer.Exit(2) from None
    if len(files) == 1:
        p = _size_one(files[0])
        typer.echo(to_json(p.as_json()) if as_json else "\n".join(describe(p)))
        raise typer.Exit(1 if _insulation_fails(p) else 0)
    from windsheet.design.dispatch import size_any

    refused, failing = [], []
    with progress(len(files), "sizing") as step:
        for f in files:
            try:
                p = size_any(load_order_arg(f))
            except InputError as exc:
                # Named by its file; the batch carries on.
                msg = str(exc)
                typer.echo(f"windsheet: {msg if msg.startswith(f) else f'{f}: {msg}'}", err=True)
                refused.append(f)
                step()
                continue
            except Exception as exc:  # a bug must not cost the rest of the batch its summary
                typer.echo(f"windsheet: {f}: {internal_fault(exc)}", err=True)
                refused.append(f)
                step()
                continue
            if _insulation_fails(p):
                failing.append(f)
            if as_json:
                typer.echo(json.dumps({"file": f, **p.as_json()}, ensure_ascii=False, allow_nan=False, default=str))
            else:
                typer.echo(f"== {f}\n" + "\n".join(describe(p)) + "\n")
            step()
    sized = len(files) - len(refused)
    tail = f"; {len(refused)} refused ({', '.join(refused)})" if refused else ""
    tail += f"; {len(failing)} fail the insulation check ({', '.join(failing)})" if failing else ""
    typer.echo(f"windsheet: sized {sized} of {len(files)} orders{tail}", err=True)
    raise typer.Exit(1 if refused or failing else 0)


@guarded
def _size_one(arg: str):
    from .batch import load_order_arg
    from windsheet.design.dispatch import size_any

    return size_any(load_order_arg(arg))


def describe(p) -> list[str]:
    """The summary of a coil's design, or of a transformer's."""
    from windsheet.design.dispatch import is_transformer_design

    if is_transformer_design(p):
        from .transformer_summary import transformer_summary_lines

        return transformer_summary_lines(p)
    return summary_lines(p)


def _insulation_fails(p) -> bool:
    from windsheet.design.dispatch import is_transformer_design

    if is_transformer_design(p):
        return (any(b.verdict == "fail" for b in p.barriers)
                or any(w.insulation_verdict == "fail" for w in p.windings))
    return p.insulation.verdict == "fail"
