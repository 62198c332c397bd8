"""From a transformer order to its :class:`~windsheet.design.transformer_model.TransformerDesign`.

Composes: each winding section sized as a coil on the form as it stands
(:func:`windsheet.design.build.build_design`), then what lies between windings
from :mod:`windsheet.physics.transformer` and
:mod:`windsheet.physics.insulation_coordination`.  Holds no model of its own.
"""

from __future__ import annotations

import datetime as _dt
import math

from windsheet.common.errors import InputError
from windsheet.order.transformer import TransformerOrder, _winding_path, section_order
from windsheet.physics import heating
from windsheet.physics import insulation_coordination as ic
from windsheet.physics import transformer as tf
from windsheet.physics.conductor_capacitance import TAPE_EPS_R
from windsheet.physics.wire import conductor as conductor_data

from .construct import as_dict, construct
from .model import DesignState, Family, QcLine, QcPlan
from .qc_plan import DEFAULT_MIN_INSULATION_OHM
from .state_rules import state_from_checks
from .transformer_model import (TRANSFORMER_SCHEMA, Barrier, BuildLayer, Capacitance, CoreCheck, Leakage,
                                Regulation, Screen, TransformerConnections, TransformerDesign, WindingDuty,
                                WindingSummary)

#: Flux density within this share of the allowed is marginal (windsheet's own margin).
FLUX_MARGIN = 0.9
#: The leakage band of the sign-off: the MMF estimate is close for concentric windings, but the
#: real build (layer fill, bobbin, dressing) moves it more than the inductance tolerance.
LEAKAGE_BAND = 0.30
#: A floating winding's reference is unknown: the working voltage to it is the sum of both.
WORKING_VOLTAGE_BASIS = ("the largest voltage between a turn of one winding and a turn of the other: both "
                         "windings' voltages added (the reference of a floating or external winding is not known "
                         "to the design, so it is taken at its worst)")


def build_transformer(order: TransformerOrder, today: _dt.date | None = None) -> TransformerDesign:
    """Size a transformer order: every winding section, the barriers, the core, the whole.

    Parameters
    ----------
    order : windsheet.order.transformer.TransformerOrder
    today : datetime.date, optional
        The issue date printed when the order names none.

    Returns
    -------
    TransformerDesign
    """
    from .build import build_design

    doc = order.doc
    layers, sections, build_below = [], [], 0.0
    warnings: list[str] = []
    for k, sec in enumerate(order.sections):
        if k:
            prev = order.sections[k - 1].name
            for b in doc.barriers:
                if set(b.between) == {prev, sec.name} and b.tape is not None:
                    t = b.tape.wraps * b.tape.thickness
                    layers.append(BuildLayer(kind="barrier", label=f"barrier {prev}–{sec.name}", build_below_m=build_below,
                                             build_m=t))
                    build_below += t
            for s in doc.screens:
                if set(s.between) == {prev, sec.name}:
                    layers.append(BuildLayer(kind="screen", label=f"screen {prev}–{sec.name}", build_below_m=build_below,
                                             build_m=s.foil))
                    build_below += s.foil
        try:
            d = build_design(section_order(order, k, build_below), today, remedies=False)
        except InputError as exc:
            raise InputError(_winding_path(sec.winding, exc.path), f"{sec.label}: {exc.message}") from None
        sections.append(d)
        layers.append(BuildLayer(kind="section", label=sec.label, winding=sec.name, section=k,
                                 build_below_m=build_below, build_m=d.fit.build_m, turns=sec.turns))
        build_below += d.fit.build_m
        warnings += [f"{sec.label}: {w}" for w in d.warnings]
    windings = _windings(order, sections)
    core = _core(order, windings)
    leakage = _leakage(order, layers, sections)
    barriers = _barriers(order, windings)
    thermal = _thermal(order, windings, sections, build_below)
    regulation = _regulation(order, windings, leakage)
    capacitance = _capacitance(order, layers, sections)
    connections = _connections(order)
    plan = _qc_plan(order, windings, leakage, barriers)
    state = _state(windings, barriers, core, thermal)
    first = windings[0]
    family_key = "|".join(("transformer", doc.form.kind, f"{len(windings)} windings",
                           str(getattr(doc.form, "material", "")), first.wire.conductor))
    # Computed here, so put together without validating again (design/construct.py).
    return construct(TransformerDesign, {
        "schema": TRANSFORMER_SCHEMA,
        "job": {"number": doc.job.number, "part": doc.job.part, "customer": doc.job.customer,
                "quantity": doc.job.quantity, "revision": doc.job.revision, "issued_by": doc.job.issued_by,
                "issue_date": (doc.job.issue_date or today or _dt.date.today()).isoformat(),
                "units": order.units, "notes": doc.job.notes},
        "order_hash": order.sha256, "purpose": doc.purpose, "form": as_dict(sections[0].form),
        "sheet_units": "imperial" if order.imperial else "metric",
        "frequency_Hz": doc.frequency, "ambient_C": doc.ambient,
        "tolerances": {"inductance": doc.tolerances.inductance, "resistance": doc.tolerances.resistance,
                       "ratio": doc.tolerances.ratio},
        "windings": windings, "build": layers, "sections": sections, "barriers": barriers,
        "screens": [Screen(between=s.between, foil_m=s.foil, material=s.material, lead=s.lead) for s in doc.screens],
        "leakage": leakage, "regulation": regulation, "capacitance": capacitance, "core": core,
        "thermal": thermal, "connections": connections, "qc_plan": plan, "qc_required": plan.required,
        "state": state,
        "family": Family(key=family_key, label=f"{len(windings)}-winding transformer on "
                                                f"{getattr(doc.form, 'material', doc.form.kind)}"),
        "warnings": warnings,
        "cautions": ["A transformer's windings are a safety barrier only as built and tested: the product "
                     "standard (for small transformers IEC 61558-1 and its parts) and a licensed assessor "
                     "govern its distances, test voltages and marking."],
    })


# --- windings ----------------------------------------------------------------------------

def _windings(order: TransformerOrder, sections) -> list[WindingSummary]:
    doc = order.doc
    first_turns, first_volts = order.turns[0], doc.windings[0].duty.voltage
    al = getattr(doc.form, "al", None)
    out = []
    for i, w in enumerate(doc.windings):
        mine = [d for d, s in zip(sections, order.sections) if s.winding == i]
        r20 = sum(d.terminal.resistance_ohm for d in mine)
        rhot = sum(d.terminal.resistance_hot_ohm for d in mine)
        loss = sum(d.terminal.loss_W or 0.0 for d in mine)
        length = sum(s.wire_length_m for d in mine for s in d.strands)
        scrap = sum(s.wire_length_with_scrap_m for d in mine for s in d.strands)
        mass = sum(s.mass_kg for d in mine for s in d.strands)
        n = order.turns[i]
        # On a core the sections of a winding link the same flux: L = A_L N² of the whole.
        inductance = tf.magnetising_inductance(al, n) if al else sum(d.terminal.inductance_H for d in mine)
        verdicts = [d.insulation.verdict for d in mine]
        worst = "fail" if "fail" in verdicts else "marginal" if "marginal" in verdicts else "pass"
        out.append(WindingSummary(
            name=w.name, turns=n, strands=w.strands, wire=mine[0].wire, taps=list(w.taps),
            duty=WindingDuty(voltage_V=w.duty.voltage, current_A=w.duty.current, source=w.duty.source,
                             to_earth_V=w.duty.to_earth if w.duty.to_earth is not None else w.duty.voltage),
            sections=[s.label for s in order.sections if s.winding == i], identification=w.identification,
            triple_insulated=w.triple_insulated, resistance_20C_ohm=r20, resistance_hot_ohm=rhot,
            wire_length_m=length, wire_length_with_scrap_m=scrap, mass_kg=mass, inductance_H=inductance,
            turns_ratio=n / first_turns, open_circuit_voltage_V=tf.turns_ratio_voltage(first_volts, first_turns, n),
            loss_W=loss, current_density_A_per_mm2=max(d.thermal.current_density_A_per_mm2 for d in mine),
            insulation_verdict=worst))
    return out


def _core(order: TransformerOrder, windings) -> CoreCheck:
    doc, form = order.doc, order.doc.form
    area = None
    if form.kind == "toroid":
        area = (form.outer_diameter - form.inner_diameter) / 2 * form.height
    elif doc.core.leg_width and doc.core.stack:
        area = doc.core.leg_width * doc.core.stack * doc.core.stacking_factor
    first = windings[0]
    if area is None:
        return CoreCheck(verdict="unknown", reason="core.leg_width and core.stack (or a toroid's section) are "
                                                   "needed to check the flux density: not checked")
    b = tf.peak_flux_density(first.duty.voltage_V, doc.frequency, first.turns, area)
    limit = doc.core.max_flux_density
    if limit is None:
        return CoreCheck(effective_area_m2=area, flux_density_T=b, verdict="unknown",
                         reason=f"peak flux density {b:.3g} T at {first.name}'s {first.duty.voltage_V:g} V; give "
                                "core.max_flux_density (from the core's data) to judge it")
    verdict = "fail" if b > limit else "marginal" if b > FLUX_MARGIN * limit else "pass"
    words = {"fail": "is over", "marginal": "is within 10 % of", "pass": "is within"}[verdict]
    return CoreCheck(effective_area_m2=area, flux_density_T=b, max_flux_density_T=limit, verdict=verdict,
                     reason=f"peak flux density {b:.3g} T (V = 4.44 f N A B at {first.name}'s "
                            f"{first.duty.voltage_V:g} V) {words} the core's {limit:.3g} T")


def _leakage(order: TransformerOrder, layers, sections) -> list[Leakage]:
    """The first winding's inductance with each other winding shorted in turn (MMF method)."""
    if order.doc.form.kind == "toroid":
        return []  # windings round a toroid are not concentric layers of one window: no closed form used
    n1 = order.turns[0]
    out = []
    height = max(d.fit.traverse_used_m for d in sections)
    mlt = sum(_section_mlt(d) for d in sections) / len(sections)
    for j in range(1, len(order.doc.windings)):
        nj = order.turns[j]
        segs = []
        for layer in layers:
            at = 0.0
            if layer.kind == "section":
                sec = order.sections[layer.section]
                if sec.winding == 0:
                    at = sec.turns
                elif sec.winding == j:
                    at = -sec.turns * n1 / nj
            segs.append((layer.build_m, at))
        out.append(Leakage(shorted=order.doc.windings[j].name,
                           inductance_H=tf.mmf_leakage_inductance(segs, mlt, height),
                           method="MMF across the build (Dowell 1966), mean turn and winding height of the "
                                  "sections; the first winding at 1 A, this one shorted, the others open"))
    return out


def _regulation(order: TransformerOrder, windings, leakage) -> list[Regulation]:
    if order.doc.purpose == "current":
        return []  # a current transformer is driven by its primary current: no voltage regulation
    first = windings[0]
    w = 2 * math.pi * order.doc.frequency
    by_name = {lk.shorted: lk.inductance_H for lk in leakage}
    out = []
    for sec in windings[1:]:
        if not sec.duty.current_A:
            continue
        ratio = sec.turns / first.turns
        r_eq = sec.resistance_hot_ohm + first.resistance_hot_ohm * ratio ** 2
        x_eq = w * by_name.get(sec.name, 0.0) * ratio ** 2
        v = sec.open_circuit_voltage_V
        out.append(Regulation(winding=sec.name, full_load_voltage_V=v, resistance_referred_ohm=r_eq,
                              reactance_referred_ohm=x_eq,
                              regulation=tf.regulation(v, sec.duty.current_A, r_eq, x_eq)))
    return out


def _capacitance(order: TransformerOrder, layers, sections) -> list[Capacitance]:
    """Between windings whose sections face each other in the build (none across a screen)."""
    out = []
    for k, lo in enumerate(layers):
        if lo.kind != "section":
            continue
        j = next((j for j in range(k + 1, len(layers)) if layers[j].kind in ("section", "screen")), None)
        if j is None or layers[j].kind == "screen" or layers[j].winding == lo.winding:
            continue
        hi = layers[j]
        da, db = sections[lo.section], sections[hi.section]
        films = sum((d.wire.overall_diameter_m - d.wire.copper_diameter_m) / 2 for d in (da, db))
        gap = sum(x.build_m for x in layers[k + 1:j]) + films
        mlt = _section_mlt(da) + math.pi * lo.build_m
        height = min(da.fit.traverse_used_m, db.fit.traverse_used_m)
        out.append(Capacitance(between=[lo.winding, hi.winding],
                               capacitance_F=tf.facing_layers_capacitance(mlt, height, gap, TAPE_EPS_R),
                               method="parallel plates across the facing layers: the barrier tape and both "
                                      f"enamel films, εr {TAPE_EPS_R:g}"))
    return out


def _section_mlt(d) -> float:
    turns = sum(s.turns for s in d.strands)
    return float(sum(s.wire_length_m for s in d.strands) - 2 * len(d.strands) * (d.winding.lead_length_m or 0.0)) \
        / max(turns, 1)


# --- barriers ----------------------------------------------------------------------------

def _working_voltage(a, b) -> float:
    return a.duty.to_earth_V + b.duty.to_earth_V


def _impulse(order: TransformerOrder, a, b, working: float) -> float:
    mains = [w for w in (a, b) if w.duty.source == "mains"]
    category = order.doc.insulation.overvoltage_category.upper()
    if mains:
        return ic.rated_impulse_voltage(max(w.duty.to_earth_V for w in mains), category)
    # Not fed from the mains: the clearance holds the working peak (IEC 60664-1, circuits not
    # directly connected to the mains; memory), never below the table's first row.
    return max(math.sqrt(2.0) * working, ic.IMPULSE_SERIES_V[0])


def _margin(order: TransformerOrder, name) -> float:
    w = order.winding(name)
    m = w.margin_tape
    return 0.0 if m is None else (m if isinstance(m, float) else m.width)


def _barriers(order: TransformerOrder, windings) -> list[Barrier]:
    doc = order.doc
    ins = doc.insulation
    group = {"i": "I", "ii": "II", "iiia": "IIIa", "iiib": "IIIb"}[ins.material_group]
    by = {w.name: w for w in windings}
    out = []
    for bar in doc.barriers:
        a, b = by[bar.between[0]], by[bar.between[1]]
        working = _working_voltage(a, b)
        impulse = _impulse(order, a, b, working)
        clear, creep = ic.barrier_distances(bar.insulation, working, impulse, ins.pollution_degree, group)
        given = bar.creepage if bar.creepage is not None else _margin(order, a.name) + _margin(order, b.name)
        test = ic.barrier_test_voltage(bar.insulation, working)
        tiw = a.triple_insulated or b.triple_insulated
        tape = bar.tape
        reasons = []
        if given + 1e-12 < creep:
            reasons.append(f"the creepage along the bobbin, {given * 1e3:.2f} mm (the margins of {a.name} and "
                           f"{b.name}), is under the {creep * 1e3:.2f} mm IEC 60664-1 Table F.4 asks for "
                           f"{bar.insulation} insulation at {working:.0f} V (pollution degree {ins.pollution_degree}, "
                           f"material group {group}): widen the margin tapes")
        if given + 1e-12 < clear:
            reasons.append(f"the clearance round the barrier, {given * 1e3:.2f} mm, is under the {clear * 1e3:.2f} mm "
                           f"Table F.2 asks for {impulse:.0f} V impulse"
                           + (" (reinforced: one impulse step higher)" if bar.insulation == "reinforced" else ""))
        layers_ok = ic.thin_sheet_layers_ok(bar.insulation, tape.rating if tape else None, tape.wraps if tape else 0,
                                            test, tiw)
        if not layers_ok:
            reasons.append(("no tape between them" if tape is None else
                            f"{tape.wraps} wrap(s) of tape rated {tape.rating or 0:.0f} V") +
                           f" do not make {bar.insulation} insulation for a {test:.0f} V test "
                           + ("(reinforced: three layers any two passing, or two each passing)"
                              if bar.insulation == "reinforced" else "(one layer passing, or two together)")
                           + ", and neither winding is triple-insulated")
        out.append(Barrier(
            between=list(bar.between), insulation=bar.insulation, working_voltage_V=working, impulse_voltage_V=impulse,
            clearance_required_m=clear, creepage_required_m=creep, creepage_m=given, test_voltage_V=test,
            tape_wraps=tape.wraps if tape else 0, tape_thickness_m=tape.thickness if tape else 0.0,
            tape_rating_V=tape.rating if tape else None, tape_material=tape.material if tape else None,
            triple_insulated=tiw, pollution_degree=ins.pollution_degree, material_group=group,
            verdict="fail" if reasons else "pass", reasons=reasons,
            basis=f"IEC 60664-1 Tables F.2 and F.4; working voltage: {WORKING_VOLTAGE_BASIS}; test voltage a "
                  "labelled default (2U + 1000 V, twice for reinforced); the product standard governs"))
    return out


# --- heat ----------------------------------------------------------------------------------

def _thermal(order: TransformerOrder, windings, sections, build):
    """Temperatures of the whole winding: every winding's copper loss through the outer surface."""
    outer = sections[-1].thermal
    if outer is None or outer.surface_area_m2 is None:
        return None
    alpha = {w.name: conductor_data(w.wire.conductor)["temperature_coefficient_20C"] for w in windings}

    def loss_at(t):
        total = 0.0
        for w in windings:
            r = w.resistance_20C_ohm * (1 + alpha[w.name] * (t - 20.0))
            total += w.duty.current_A ** 2 * r
        return total

    temps = heating.winding_temperatures(loss_at, outer.surface_area_m2, outer.characteristic_length_m, build,
                                         order.doc.ambient)
    klass = min(w.wire.thermal_class_C or 155 for w in windings)
    verdict, reason = heating.thermal_verdict(temps["hot_spot_C"], klass, converged=temps["converged"])
    lo, hi = heating.CURRENT_DENSITY_RANGE_A_PER_MM2
    return {**temps, "surface_area_m2": outer.surface_area_m2,
            "characteristic_length_m": outer.characteristic_length_m, "method": heating.METHOD,
            "emissivity": heating.EMISSIVITY, "winding_conductivity_W_per_mK": heating.WINDING_CONDUCTIVITY,
            "thermal_class_C": klass, "verdict": verdict, "reason": reason,
            "current_density_A_per_mm2": max(w.current_density_A_per_mm2 for w in windings),
            "current_density_range_A_per_mm2": [lo, hi],
            "current_density_basis": "common practice for naturally cooled small windings (memory)"}


# --- connections, QC plan, state ------------------------------------------------------------

def _connections(order: TransformerOrder) -> TransformerConnections:
    """Every winding's start, taps and finish brought out, T1, T2, … in winding order."""
    ends = []
    for w, n in zip(order.doc.windings, order.turns):
        ends += [f"{w.name}.start"] + [f"{w.name}.tap{t}" for t in w.taps] + [f"{w.name}.finish"]
    terminals = [{"label": f"T{i + 1}", "end": e} for i, e in enumerate(ends)]
    return TransformerConnections(terminals=terminals, wire_ends_per_unit=len(ends),
                                  sleeving_pieces_per_unit=len(ends))


def _qc_plan(order: TransformerOrder, windings, leakage, barriers) -> QcPlan:
    tol = order.doc.tolerances
    ir_min = order.doc.insulation.min_resistance or DEFAULT_MIN_INSULATION_OHM
    first = windings[0]
    lines = []
    for w in windings:
        r = w.resistance_20C_ohm
        lines.append(QcLine(key=f"winding.{w.name}.resistance", label=f"DC resistance, {w.name} (at 20 °C)",
                            judged="band", unit="ohm", predicted=r, low=r * (1 - tol.resistance),
                            high=r * (1 + tol.resistance)))
    L = first.inductance_H
    lines.append(QcLine(key=f"winding.{first.name}.inductance", label=f"Inductance of {first.name}, the others open "
                        "(magnetising)", judged="band", unit="H", predicted=L, low=L * (1 - tol.inductance),
                        high=L * (1 + tol.inductance)))
    for w in windings[1:]:
        lines.append(QcLine(key=f"winding.{w.name}.ratio", label=f"Voltage ratio {w.name} / {first.name}, open circuit",
                            judged="band", unit="", predicted=w.turns_ratio, low=w.turns_ratio * (1 - tol.ratio),
                            high=w.turns_ratio * (1 + tol.ratio), note=f"{w.turns} / {first.turns} turns"))
        lines.append(QcLine(key=f"winding.{w.name}.polarity", label=f"Polarity of {w.name} against {first.name} "
                            "(dotted ends)", judged="expect", expect="in phase"))
        for tap in w.taps:
            r = tap / first.turns
            lines.append(QcLine(key=f"winding.{w.name}.tap{tap}.ratio", label=f"Voltage ratio {w.name} tap at turn "
                                f"{tap} / {first.name}", judged="band", unit="", predicted=r, low=r * (1 - tol.ratio),
                                high=r * (1 + tol.ratio)))
    for tap in first.taps:
        r = tap / first.turns
        lines.append(QcLine(key=f"winding.{first.name}.tap{tap}.ratio", label=f"Voltage ratio, {first.name} start to "
                            f"tap at turn {tap} / whole {first.name}", judged="band", unit="", predicted=r,
                            low=r * (1 - tol.ratio), high=r * (1 + tol.ratio)))
    for lk in leakage:
        v = lk.inductance_H
        lines.append(QcLine(key=f"leakage.{lk.shorted}", label=f"Leakage inductance: {first.name} with {lk.shorted} "
                            "shorted", judged="band", unit="H", predicted=v, low=v * (1 - LEAKAGE_BAND),
                            high=v * (1 + LEAKAGE_BAND), note=f"leakage band ±{LEAKAGE_BAND * 100:.0f} % (MMF estimate)"))
    names = [w.name for w in windings]
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            lines.append(QcLine(key=f"insulation.{a}-{b}", label=f"Insulation resistance, {a} to {b}",
                                judged="minimum", unit="ohm", low=ir_min))
    if order.doc.form.kind in ("toroid", "bobbin"):
        for a in names:
            lines.append(QcLine(key=f"insulation.{a}-core", label=f"Insulation resistance, {a} to core",
                                judged="minimum", unit="ohm", low=ir_min))
    for bar in barriers:
        a, b = bar.between
        lines.append(QcLine(key=f"hipot.{a}-{b}", label=f"Hipot {a} to {b}, {bar.test_voltage_V:.0f} V 60 s "
                            f"({bar.insulation})", judged="expect", expect="withstands", test_voltage_V=bar.test_voltage_V,
                            duration_s=60.0))
    lines.append(QcLine(key="ambient", label="Ambient temperature at test", judged="record", unit="degC"))
    return QcPlan(lines=lines)


def _state(windings, barriers, core, thermal) -> DesignState:
    fails, marginals = [], []
    for b in barriers:
        if b.verdict == "fail":
            fails += [f"barrier {b.between[0]}–{b.between[1]} ({b.insulation}): {r}" for r in b.reasons]
    for w in windings:
        if w.insulation_verdict == "fail":
            fails.append(f"{w.name}: its own insulation check (turn to turn, layer to layer) fails")
        elif w.insulation_verdict == "marginal":
            marginals.append(f"{w.name}: its own insulation check is marginal")
    if core.verdict == "fail":
        fails.append(f"core: {core.reason}")
    elif core.verdict == "marginal":
        marginals.append(f"core: {core.reason}")
    th_v = thermal["verdict"] if thermal else None
    th_r = thermal["reason"] if thermal else ""
    state, reasons = state_from_checks("fail" if fails else "marginal" if marginals else "pass", fails or marginals,
                                       th_v, th_r)
    return DesignState(state=state, reasons=reasons)
