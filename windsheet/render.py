"""The printable traveller: HTML from Jinja2 templates, PDF by WeasyPrint.

Rendering shows what the prediction dict (``windsheet.predict.predict``) says
and computes no physics.  It does choose words and layout: which procedure
steps a job needs, which cautions its duty calls for, how numbers are written
for people (``61.20 µH``, ``1.234 Ω``, ``12.30 m``).
"""

from __future__ import annotations

from pathlib import Path
from urllib.parse import unquote, urlsplit

import jinja2
from markupsafe import Markup

from .diagrams import cross_section_svg, winding_terminals, wiring_svg
from .errors import InputError
from .traceability import lot_rows, trace_text



def _templates_dir() -> Path:
    """The templates folder: inside the installed package, else the source tree's.

    The wheel maps the top-level ``templates/`` into ``windsheet/templates``
    (pyproject ``package-dir``); an editable install reads the folder in place.
    """
    from importlib.resources import files

    packaged = files("windsheet") / "templates"
    if packaged.is_dir():
        return Path(str(packaged)).resolve()
    return Path(__file__).resolve().parent.parent / "templates"


TEMPLATES_DIR = _templates_dir()

#: Page sizes by the CLI's ``--paper`` word; CSS ``@page size`` keywords.
PAPER_SIZES = {"a4": "A4", "letter": "letter"}

#: Section headings in job-flow order; the tests look for each in the PDF text.
SECTIONS = (
    "1 Specification",
    "2 Predictions",
    "3 Materials pick list",
    "4 Procedure",
    "5 Wiring diagram and cross-section",
    "6 Insulation check",
    "7 Cautions",
    "8 QC record",
)

#: Extra-low voltage band, IEC 61140: 50 V a.c. rms, 120 V ripple-free d.c.
ELV_AC_V = 50.0
ELV_DC_V = 120.0

#: Stored energy above which the sheet prints a boxed caution.  350 mJ is the
#: discharge-energy limit of IEC 60335-1 §8.1.4 (seen in a secondary copy);
#: used only to decide when to draw attention, never as a safe level.
STORED_ENERGY_CAUTION_J = 0.35

#: Units (serial numbers) per QC table; more units continue in further tables.
UNITS_PER_QC_TABLE = 4

DEFERRAL = ("These notes do not replace local electrical codes, the applicable "
            "product standard or licensed practice; where they differ, those govern.")

from .fmt import NBSP as _NBSP
from .fmt import OHM, celsius, eng, length, mass, percent  # noqa: F401 - used by the templates


def henry(v):
    return eng(v, "H")


def ohm(v):
    return eng(v, OHM)


def farad(v):
    return eng(v, "F", sig=3)


def hertz(v):
    return eng(v, "Hz", sig=3)


def volt(v, sig=3):
    return eng(v, "V", sig=sig)


def joule(v):
    return eng(v, "J", sig=3)


def band(lo, hi, fmt) -> str:
    """An accept band ``55.08 – 67.32 µH``, written with one formatter."""
    if lo is None and hi is None:
        return "—"
    return f"{fmt(lo)} – {fmt(hi)}"


FILTERS = {
    "eng": eng, "distance": length, "mass": mass, "percent": percent, "celsius": celsius,
    "henry": henry, "ohm": ohm, "farad": farad, "hertz": hertz, "volt": volt, "joule": joule,
}


# --- the Jinja2 environment and WeasyPrint ---------------------------------------

def environment(templates_dir: Path = TEMPLATES_DIR) -> jinja2.Environment:
    """Jinja2 with autoescape on for every template: order text prints as text."""
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir)),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
    )
    env.filters.update(FILTERS)
    return env


def _weasyprint():
    import weasyprint  # noqa: deferred: Pango loads on first use only

    return weasyprint


def templates_only_fetcher(templates_dir: Path = TEMPLATES_DIR):
    """A WeasyPrint URL fetcher that serves files under ``templates_dir`` only.

    The network, and every file outside the templates folder, is refused; a
    ``data:`` URL (content already in the document) is passed through.
    """
    urls = _weasyprint().urls
    root = Path(templates_dir).resolve()

    class TemplatesOnlyFetcher(urls.URLFetcher):
        def fetch(self, url, headers=None):
            scheme = urlsplit(url).scheme.lower()
            if scheme == "data":
                return super().fetch(url, headers)
            if scheme != "file":
                raise ValueError(f"refused to fetch {url!r}: the traveller loads no network resources")
            path = Path(unquote(urlsplit(url).path)).resolve()
            if not path.is_relative_to(root) or not path.is_file():
                raise ValueError(f"refused to fetch {url!r}: outside the templates folder")
            return urls.URLFetcherResponse(url, path.read_bytes())

    return TemplatesOnlyFetcher()


def render_pdf(html: str, templates_dir: Path = TEMPLATES_DIR) -> bytes:
    """Render traveller HTML to PDF bytes with WeasyPrint."""
    wp = _weasyprint()
    doc = wp.HTML(string=html, base_url=str(Path(templates_dir).resolve()) + "/",
                  url_fetcher=templates_only_fetcher(templates_dir))
    return doc.write_pdf()


def _stylesheet(templates_dir: Path) -> Markup:
    # Inlined so the HTML file stands alone; it is our own file, not order text.
    return Markup((Path(templates_dir) / "print.css").read_text(encoding="utf-8"))


def _page_size(paper: str) -> str:
    key = str(paper).strip().lower()
    if key not in PAPER_SIZES:
        raise InputError("--paper", f"expected one of {', '.join(PAPER_SIZES)}, got {paper!r}")
    return PAPER_SIZES[key]


# --- issuing -------------------------------------------------------------------------

def check_issuable(prediction: dict, force: bool = False) -> None:
    """Refuse to issue a traveller whose insulation check fails, unless forced."""
    ins = prediction.get("insulation") or {}
    if ins.get("verdict") == "fail" and not force:
        why = "; ".join(str(r) for r in ins.get("reasons") or []) or "see the insulation check"
        raise InputError("insulation", f"insulation check fails ({why}); "
                         "not issued — fix the order, or issue with --force")
    thermal = prediction.get("thermal") or {}
    if thermal.get("verdict") == "fail" and not force:
        # Enamel run over its thermal class ages fast: as much a fail as a voltage it cannot hold.
        raise InputError("duty.current", f"thermal check fails ({thermal.get('reason')}); "
                         "not issued — lower the current, use a heavier wire or a higher thermal class, "
                         "or issue with --force")


def render_traveller_html(prediction: dict, paper: str = "a4", forced: bool = False,
                          templates_dir: Path = TEMPLATES_DIR) -> str:
    """The traveller for one order as a standalone HTML document.

    Parameters
    ----------
    prediction : dict
        What ``windsheet.predict.predict`` returns.
    paper : {"a4", "letter"}
    forced : bool
        The sheet was issued with ``--force`` over a failing insulation check;
        printed prominently on the first page.
    """
    env = environment(templates_dir)
    ctx = traveller_context(prediction, forced=forced)
    ctx.update(page_size=_page_size(paper), paper=str(paper).lower(),
               stylesheet=_stylesheet(templates_dir), sections=SECTIONS)
    return env.get_template("traveller.html.j2").render(**ctx)


def order_files(path) -> list[Path]:
    """The order files a path names: the file itself, or a folder's ``*.yaml`` orders.

    Measured-values files (``*.measured.yaml``) in the folder are not orders.
    """
    path = Path(path)
    if path.is_dir():
        found = sorted(q for q in path.iterdir()
                       if q.suffix.lower() in (".yaml", ".yml") and q.is_file()
                       and not q.name.lower().endswith((".measured.yaml", ".measured.yml")))
        if not found:
            raise InputError(str(path), "no order files (*.yaml) in this folder")
        return found
    if not path.is_file():
        raise InputError(str(path), "no such order file or folder")
    return [path]


def traveller(prediction: dict, paper: str = "a4", forced: bool = False) -> tuple[str, bytes]:
    """HTML and PDF of one traveller."""
    html = render_traveller_html(prediction, paper=paper, forced=forced)
    return html, render_pdf(html)


# --- what goes on the sheet ----------------------------------------------------------

def traveller_context(p: dict, forced: bool = False) -> dict:
    """Everything the template shows, arranged for it; values straight from ``p``."""
    strands = p.get("strands") or []
    ids = [s["id"] for s in strands]
    hookup = p.get("hookup") or {}
    labels = {s["id"]: s.get("identification") for s in strands}
    ins = p.get("insulation") or {}
    return {
        "p": p,
        "job": p.get("job") or {},
        "forced": bool(forced),
        "verdict": ins.get("verdict") or "unknown",
        "strand_ids": ids,
        "terminal_names": terminal_names(hookup, ids),
        "joins_text": [" + ".join(j) for j in hookup.get("joins") or []],
        "wiring_svg": Markup(wiring_svg(hookup, ids, labels, lead_notes(p))),
        "cross_section_svg": Markup(cross_section_svg(p.get("cross_section") or {},
                                                      (p.get("form") or {}).get("kind") or "")),
        "section_wide": _widest_layer(p.get("cross_section") or {}) > 14,
        "form_rows": form_rows(p.get("form") or {}),
        "duty_rows": duty_rows(p.get("duty") or {}),
        "picks": pick_list(p),
        "steps": procedure_steps(p),
        "cautions": cautions(p),
        "deferral": DEFERRAL,
        "qc_items": qc_items(p),
        "unit_tables": unit_tables((p.get("job") or {}).get("units") or []),
        "insulation_rows": insulation_rows(ins),
        "duty_physics_rows": duty_physics_rows(p),
        "thermal": p.get("thermal") or {},
        "impulse_rows": impulse_rows(p.get("impulse")),
    }


def lead_notes(p: dict) -> list[tuple[str, str]]:
    """``(end, route in words)`` for every lead the prediction routes, joints named."""
    out = []
    for lead in p.get("leads") or []:
        how = lead.get("route_text") or lead.get("route") or ""
        if lead.get("joint"):
            how = f"{how} (joint {lead['joint']})"
        out.append((lead["lead"], how))
    return out


def _widest_layer(cross_section: dict) -> int:
    layers = cross_section.get("layers") or []
    return max([len(l.get("slots") or [] if isinstance(l, dict) else l) for l in layers] + [0])


def terminal_names(hookup: dict, strand_ids=()) -> list[tuple[str, str]]:
    """``[("T1", "A.start"), ...]``, numbered as on the wiring diagram."""
    return [(f"T{i + 1}", t) for i, t in enumerate(winding_terminals(hookup, strand_ids))]


def form_rows(form: dict) -> list[tuple[str, str]]:
    rows = [("Kind", form.get("kind") or "—")]
    what = form.get("material") or form.get("description")
    if what:
        rows.append(("Material", what))
    for key, label in (("diameter_m", "Winding diameter"), ("traverse_m", "Traverse"),
                       ("max_build_m", "Maximum build"), ("inner_diameter_m", "Inner diameter"),
                       ("outer_diameter_m", "Outer diameter"), ("height_m", "Height"),
                       ("width_m", "Window width"), ("mean_turn_length_m", "Mean turn length")):
        if form.get(key) is not None:
            rows.append((label, length(form[key])))
    if form.get("al_H") is not None:
        rows.append(("AL", eng(form["al_H"], "H/turn²", sig=3)))
    if form.get("permeability") is not None:
        rows.append(("Relative permeability", f"{float(form['permeability']):g}"))
    if form.get("gap_deg") is not None:
        rows.append(("Start–finish gap", f"{float(form['gap_deg']):.0f}°"))
    return rows


def is_dc(duty: dict) -> bool:
    return not duty.get("frequency_Hz")


def duty_rows(duty: dict) -> list[tuple[str, str]]:
    dc = is_dc(duty)
    rows = [("Voltage", eng(duty.get("voltage_V"), "V", trim=True) + (" d.c." if dc else " rms")
             + (" per winding" if duty.get("between_windings_V") is not None else ""))]
    if duty.get("between_windings_V") is not None:
        rows.append(("Between windings", eng(duty["between_windings_V"], "V", trim=True)
                     + (" d.c." if dc else " rms")))
    rows += [
            ("Frequency", "d.c." if dc else eng(duty.get("frequency_Hz"), "Hz", trim=True)),
            ("Current", eng(duty.get("current_A"), "A", trim=True) + ("" if dc else " rms")),
            ("Ambient", celsius(duty.get("ambient_C")))]
    if duty.get("operating_temperature_C") is not None:
        rows.append(("Operating temperature", celsius(duty["operating_temperature_C"])))
    return rows


def insulation_rows(ins: dict) -> list[tuple[str, str]]:
    """The check's figures, in the order a reader follows the argument."""
    rows = []

    def add(label, key, fmt):
        if ins.get(key) is not None:
            rows.append((label, fmt(ins[key])))

    add("Worst adjacent voltage", "worst_adjacent_Vpk", lambda v: volt(v) + " peak")
    add("Enamel breakdown (minimum, grade)", "breakdown_V", volt)
    add("Derating applied", "derating", lambda v: f"{float(v):g}")
    add("Allowed between adjacent turns", "allowed_Vpk", lambda v: volt(v) + " peak")
    add("Margin (allowed ÷ worst)", "margin", lambda v: f"{float(v):.2f}")
    add("Paschen minimum, air", "paschen_min_Vpk", lambda v: volt(v) + " peak")
    basis = {"estimated": "estimated", "measured": "measured"}.get(ins.get("pdiv_basis"), "")
    pair = (ins.get("pd_pair") or {}).get("where")
    if pair:
        rows.append(("Pair nearest partial discharge", f"{pair}, "
                     f"{volt((ins.get('pd_pair') or {}).get('voltage_Vpk'))} peak"))
    add(f"Its partial-discharge inception, 20 °C ({basis})" if basis else
        "Partial-discharge inception, 20 °C", "pdiv_Vpk", lambda v: volt(v) + " peak")
    add("Its partial-discharge inception, hot", "pdiv_hot_Vpk", lambda v: volt(v) + " peak")
    add("Worst layer-to-layer voltage", "layer_Vpk", lambda v: volt(v) + " peak")
    add("Layer tape rating", "tape_rating_V", volt)
    return rows


def duty_physics_rows(p: dict) -> list[tuple[str, str]]:
    """AC resistance, loss, temperatures and current density on the duty, as the prediction gives them."""
    t, ac, th = p.get("terminal") or {}, p.get("ac_resistance") or {}, p.get("thermal") or {}
    rows = []
    if t.get("resistance_ac_ohm") is not None and ac:
        f = ac.get("frequency_Hz")
        rows.append((f"Resistance at the duty frequency ({hertz(f)}), hot" if f else "Resistance on the d.c. duty, hot",
                     f"{ohm(t['resistance_ac_ohm'])} (AC/DC {float(ac.get('ratio', 1.0)):.3f}; {ac.get('model', '')})"))
    if t.get("loss_W") is not None:
        rows.append(("Copper loss at the duty current", eng(t["loss_W"], "W", sig=3)))
    if th:
        rows.append(("Temperature rise of the surface (still air)",
                     f"{float(th['surface_rise_K']):.1f} K, surface {celsius(th['surface_C'])}"))
        rows.append(("Hot spot (estimate) / mean winding",
                     f"{celsius(th['hot_spot_C'])} / {celsius(th['mean_C'])}"))
        rows.append(("Thermal check", f"{str(th.get('verdict', '')).upper()}: {th.get('reason', '')}"))
        lo, hi = th.get("current_density_range_A_per_mm2") or (None, None)
        rows.append(("Current density", f"{float(th['current_density_A_per_mm2']):.2f} A/mm²"
                     + (f" (common practice {lo:g}–{hi:g} A/mm² for natural cooling)" if lo else "")))
        rows.append(("Heat method", th.get("method", "")))
    return rows


def impulse_rows(imp) -> list[tuple[str, str]]:
    """The fast edge's share on the first turns, when the duty has one."""
    if not imp:
        return []
    rows = [("Fast edge", f"{volt(imp['edge_Vpk'])} peak"
             + (f", rise time {eng(imp['rise_time_s'], 's', sig=3)}" if imp.get("rise_time_s") else ""))]
    rows.append(("First turn under the edge", f"{volt(imp['first_turn_Vpk'])} peak "
                 f"(even share {volt(imp['first_turn_uniform_Vpk'])})"))
    rows.append(("Worst pair under the edge", f"{volt(imp['worst_pair_Vpk'])} peak, {imp.get('worst_pair_where')}"))
    if imp.get("alpha") is not None:
        rows.append(("Distribution constant α = √(Cg/Cs)", f"{float(imp['alpha']):.3g}"))
    rows.append(("Capacitance to ground / core / shield", farad(imp["ground_capacitance_F"])
                 + ("" if imp.get("ground_capacitance_given") else " (assumed: give duty.ground_capacitance)")))
    return rows


def pick_list(p: dict) -> list[dict]:
    """Materials to draw from stores, one row each, with the quantity to pick."""
    wire = p.get("wire") or {}
    w = p.get("winding") or {}
    form = p.get("form") or {}
    hookup = p.get("hookup") or {}
    job = p.get("job") or {}
    qty = int(job.get("quantity") or len(job.get("units") or []) or 1)
    picks = [{"item": "Form / core",
              "spec": form.get("material") or form.get("description") or form.get("kind") or "—",
              "qty": f"{qty}"}]
    for s in p.get("strands") or []:
        per_unit = s.get("wire_length_with_scrap_m")
        picks.append({
            "item": f"Wire, strand {s['id']}",
            "spec": f"{wire.get('label', '—')}; {s.get('identification') or 'no marking'}",
            "qty": f"{length(per_unit)} per unit (incl. {percent(w.get('scrap_allowance'))} scrap), "
                   f"{mass(s.get('mass_kg'))} per unit",
        })
    layers = int(p.get("layers") or w.get("layers") or 1)
    if (w.get("layer_tape_m") or 0) > 0 and layers > 1:
        rating = w.get("layer_tape_rating_V")
        picks.append({"item": "Layer tape",
                      "spec": f"{w.get('layer_tape_material') or 'insulating tape'}, "
                              f"{length(w['layer_tape_m'])} thick"
                              + (f", rated {volt(rating)}" if rating else "") + ", full traverse width",
                      "qty": f"{layers - 1} wrap(s) per unit"})
    ends = 2 * len(p.get("strands") or [])
    picks.append({"item": "Sleeving",
                  "spec": "over every joint and lead, rated for the duty and thermal class "
                          f"{(wire.get('thermal_class_C') or '—')} °C",
                  "qty": f"{len(hookup.get('joins') or [])} joint(s) + "
                         f"{len(hookup.get('terminals') or [])} lead(s) per unit"})
    if w.get("lead_length_m"):
        picks.append({"item": "Leads", "spec": f"{length(w['lead_length_m'])} left at each of "
                                              f"{ends} wire ends (included in wire length)",
                      "qty": f"{ends} ends per unit"})
    picks.append({"item": "Unit labels", "spec": "serial numbers " + _serial_span(job),
                  "qty": f"{qty}"})
    return picks


def _serial_span(job: dict) -> str:
    units = job.get("units") or []
    if not units:
        return "—"
    return units[0] if len(units) == 1 else f"{units[0]} … {units[-1]}"


# --- the procedure ------------------------------------------------------------------

def _step(title, detail="", record=()):
    return {"title": title, "detail": detail, "record": list(record)}


def _strand_list(ids):
    if len(ids) <= 1:
        return "".join(ids)
    return ", ".join(ids[:-1]) + " and " + ids[-1]


def procedure_steps(p: dict) -> list[dict]:
    """The winding procedure for this order, step by step, from its own fields.

    Which steps appear depends on the order: strand count, layers and layer
    tape, toroid or cylinder, whether the hookup has joints, the duty.
    """
    form = p.get("form") or {}
    wire = p.get("wire") or {}
    w = p.get("winding") or {}
    hookup = p.get("hookup") or {}
    strands = p.get("strands") or []
    ids = [s["id"] for s in strands]
    kind = form.get("kind") or "cylinder"
    toroid = kind == "toroid"
    n = len(ids)
    joins = hookup.get("joins") or []
    turns_in_layer = list(w.get("turns_in_layer") or [])
    layers = len(turns_in_layer) or int(p.get("layers") or 1)
    tape = (w.get("layer_tape_m") or 0) > 0 and layers > 1
    lead = length(w.get("lead_length_m")) if w.get("lead_length_m") else "the lead length in the pick list"
    steps = []

    inspect = (f"Check it against the specification ({', '.join(v for _, v in form_rows(form)[1:]) or kind}). "
               "No burrs, cracks or sharp edges where wire will lie.")
    if toroid:
        inspect += " Break or cover sharp core edges; the coating must be whole."
    steps.append(_step("Prepare and inspect the form", inspect, ["form OK"]))
    steps.append(_step(
        "Check the wire against the pick list",
        f"{wire.get('label', '—')}: expect overall Ø {length(wire.get('overall_diameter_m'))}, "
        f"copper Ø {length(wire.get('copper_diameter_m'))}. Measure the overall diameter.",
        ["overall Ø measured"]))

    if n == 1:
        start_text = (f"Anchor the start of strand {ids[0]} leaving {lead}; "
                      f"tag it \"{ids[0]} start\".")
    else:
        marks = "; ".join(f"{s['id']}: {s.get('identification') or 'tag it'}" for s in strands)
        start_text = (f"Anchor the starts of strands {_strand_list(ids)} side by side, "
                      f"in that order from the start end, each leaving {lead}. "
                      f"Tag every start (\"A start\", …). Telling the strands apart: {marks}.")
    if toroid:
        start_text += (" Mark the start position on the core; the finish must stop short of it "
                       "by the gap shown below.")
    routes = {lead["lead"]: lead for lead in p.get("leads") or []}
    start_routes = sorted({routes[f"{s}.start"]["route_text"] for s in ids if f"{s}.start" in routes})
    if start_routes:
        start_text += f" Start lead{'s' if n > 1 else ''}: {'; '.join(start_routes)}."
    steps.append(_step("Anchor and label the start" + ("s" if n > 1 else ""), start_text))

    for lay in range(layers):
        t = turns_in_layer[lay] if lay < len(turns_in_layer) else w.get("turns_per_strand")
        direction = "from the start end" if lay % 2 == 0 else "back towards the start end"
        if toroid:
            direction = "round the core in the winding direction"
        together = ("" if n == 1 else
                    f", strands {_strand_list(ids)} side by side in every turn (never crossed)")
        pitch = ("close-wound, turns touching" if w.get("close_wound")
                 else f"pitch {length(w.get('pitch_m'))} per turn")
        title = "Wind" if layers == 1 else f"Wind layer {lay + 1} of {layers}"
        per = " per strand" if n > 1 else ""
        steps.append(_step(title, f"{t} turns{per} {direction}{together}; {pitch}.",
                           ["turns counted"]))
        if tape and lay < layers - 1:
            steps.append(_step(f"Tape over layer {lay + 1}",
                               f"One wrap of {w.get('layer_tape_material') or 'layer tape'}, "
                               f"{length(w['layer_tape_m'])} thick, over "
                               f"the full traverse, overlapping at the seam; no wire visible."))
    if toroid:
        gap = form.get("gap_deg")
        gap_text = f"about {float(gap):.0f}°" if gap is not None else "the gap in the specification"
        steps.append(_step("Leave the start/finish gap",
                           f"Stop so that {gap_text} of the core stays bare between the starts and "
                           "the finishes (common practice: 20–30°); start and finish leads must "
                           "not touch or cross.", ["gap checked"]))
    finish_routes = sorted({f"{end}: {r['route_text']}" for end, r in routes.items()
                            if end.endswith(".finish")})
    steps.append(_step("Secure the finish" + ("es" if n > 1 else ""),
                       f"Tape or tie the finish{'es' if n > 1 else ''} leaving {lead}; "
                       f"tag every finish (\"A finish\", …)."
                       + (f" Route: {'; '.join(finish_routes)}." if finish_routes else "")))

    if n == 1:
        steps.append(_step("Continuity check",
                           f"{ids[0]} start to {ids[0]} finish must be continuous.", ["✓"]))
    else:
        steps.append(_step(
            "Identify every end by continuity, before any joint",
            "Each strand's start to its own finish: continuous. Every pair of strands: open "
            "(no continuity). Correct any tag that does not agree.",
            [f"{s} ✓" for s in ids]))
    steps.append(_step("Measure each strand alone",
                       f"Inductance and DC resistance of strand{'s' if n > 1 else ''} "
                       f"{_strand_list(ids)}, with the ambient temperature; record in the QC record.",
                       ["ambient °C"]))
    alternatives = p.get("alternatives") or {}
    if joins and n >= 2:
        pairs = list(zip(ids, ids[1:]))
        expect = ""
        if n == 2:
            got = [f"{name} ≈ {henry(alternatives[name].get('inductance_H'))}"
                   for name in ("series-aiding", "series-opposing") if name in alternatives]
            expect = f" Expect {'; '.join(got)}." if got else ""
        how = "; ".join(f"{a} finish to {b} start (aiding), then {a} finish to {b} finish (opposing)"
                        for a, b in pairs)
        steps.append(_step(
            "Measure series-aiding and series-opposing before joining",
            f"Link temporarily and measure at the test frequency, pair by pair: {how}. Remove the "
            f"links.{expect} Aiding must read well above opposing; if not, a start and finish "
            "are swapped in the tags.",
            [f"{a}+{b} aiding / opposing" for a, b in pairs]))
        for j in joins:
            via = [routes[e]["route_text"] for e in j if e in routes and e.endswith(".finish")
                   and routes[e].get("joint") and ".start" in routes[e]["joint"]]
            steps.append(_step(f"Make the joint {' + '.join(j)}",
                               "Per the wiring diagram: strip the enamel, twist, solder; "
                               "sleeve the joint." + (f" Joint lead {via[0]}." if via else ""),
                               ["joined"]))
    sleeve = ", ".join(f"{t} = {end}" for t, end in terminal_names(hookup, ids))
    steps.append(_step("Sleeve and terminate",
                       f"Sleeve every lead; terminate and mark the terminals: {sleeve}.",
                       ["marked"]))
    cau = p.get("cautions") or {}
    hipot = p.get("hipot") or {}
    if cau.get("hipot") and hipot.get("voltage_V"):
        dur = hipot.get("duration_s")
        where = "between the winding and the core/form" + (
            " and between the separate windings" if hookup.get("name") == "separate" else "")
        steps.append(_step(
            "Hipot test (authorised tester only)",
            f"{volt(hipot['voltage_V'])}{f' for {float(dur):g} s' if dur else ''} {where}. "
            f"Basis: {hipot.get('basis', '—')}. See the cautions.",
            ["leakage", "result"]))
    steps.append(_step("Final measurements",
                       "Terminal inductance and DC resistance at the terminals "
                       f"{' – '.join(t for t, _ in terminal_names(hookup, ids))}; insulation resistance; "
                       "record against each serial number in the QC record.", ["recorded"]))
    for i, s in enumerate(steps):
        s["number"] = i + 1
    return steps


# --- cautions -------------------------------------------------------------------------

def cautions(p: dict) -> list[dict]:
    """Cautions the duty calls for; each ends by deferring to the governing rules."""
    duty = p.get("duty") or {}
    cau = p.get("cautions") or {}
    hipot = p.get("hipot") or {}
    out = []
    v = cau.get("highest_V") if cau.get("highest_V") is not None else duty.get("voltage_V")
    if cau.get("above_elv"):
        limit = cau.get("elv_limit_V") or (ELV_DC_V if is_dc(duty) else ELV_AC_V)
        out.append({"level": "warning", "title": "Above extra-low voltage",
                    "text": f"The highest working voltage, {eng(v, 'V', trim=True)}"
                            f"{' d.c.' if is_dc(duty) else ' rms'}, "
                            f"exceeds the extra-low-voltage limit of {eng(limit, 'V', trim=True)} "
                            f"(IEC 61140: 50 V a.c. rms, 120 V ripple-free d.c.). Treat the "
                            "finished coil and its leads as hazardous live when energised."})
    if cau.get("hipot"):
        out.append({"level": "warning", "title": "Hipot test",
                    "text": f"Test voltage {volt(hipot.get('voltage_V'))}: only trained, authorised "
                            "staff, in a marked test area, with an interlocked tester; one hand rule; "
                            "discharge and earth the winding after the test before touching it."})
    energy = cau.get("stored_energy_J")
    if energy is None:
        energy = (p.get("energy") or {}).get("magnetic_J")
    if energy is not None and energy >= STORED_ENERGY_CAUTION_J:
        out.append({"level": "warning", "title": "Stored magnetic energy",
                    "text": f"At the duty current the coil stores {joule(energy)} (½LI²). Opening "
                            "the circuit while current flows drives a high voltage across the "
                            "break: de-energise before disconnecting."})
    elif energy is not None:
        out.append({"level": "note", "title": "Stored magnetic energy",
                    "text": f"{joule(energy)} at the duty current (½LI²)."})
    if cau.get("hot_surface"):
        out.append({"level": "warning", "title": "Hot surface",
                    "text": f"On its duty the winding's surface is computed to reach about "
                            f"{celsius(cau.get('surface_C'))} (in still air): it burns on contact. Let it "
                            "cool before handling, and keep it guarded where people can touch it."})
    out.append({"level": "note", "title": "Ring-test fixtures",
                "text": "The capacitor of a ring (resonance) test fixture holds charge after the "
                        "test: discharge it through a resistor before handling (energy ½CV²)."})
    return out


# --- QC record -------------------------------------------------------------------------

def _tol_band(value, tol, fmt) -> str:
    # Same arithmetic as the sign-off's band: predicted x (1 -/+ tolerance).
    if value is None or tol is None:
        return "—"
    return band(value * (1 - tol), value * (1 + tol), fmt)


def qc_items(p: dict) -> list[dict]:
    """What the inspector measures on every unit, with what it should read.

    Keys follow the sign-off's line keys.  ``judged`` items get pass/fail
    boxes; the others are only recorded (they feed the sign-off's diagnosis).
    """
    from .qc_lines import prediction_required_lines
    from .signoff import DEFAULT_MIN_INSULATION_OHM

    term = p.get("terminal") or {}
    acc = term.get("accept") or {}
    tol = p.get("tolerances") or {}
    tol_L, tol_R = tol.get("inductance"), tol.get("resistance")
    strands = p.get("strands") or []
    ids = [s["id"] for s in strands]
    ins = p.get("insulation") or {}

    def item(key, label, predicted="", accept="record", judged=True):
        return {"key": key, "label": label, "predicted": predicted, "band": accept,
                "judged": judged}

    items = []
    # One strand alone is what the terminals read; its own rows would repeat them.
    for s in strands if len(strands) > 1 else []:
        sid = s["id"]
        alone = " alone" if len(strands) > 1 else ""
        items.append(item(f"strand.{sid}.inductance", f"Inductance, strand {sid}{alone}",
                          henry(s.get("inductance_H")), _tol_band(s.get("inductance_H"), tol_L, henry)))
        items.append(item(f"strand.{sid}.resistance", f"DC resistance, strand {sid} (at 20 °C)",
                          ohm(s.get("resistance_20C_ohm")),
                          _tol_band(s.get("resistance_20C_ohm"), tol_R, ohm)))
    if (p.get("hookup") or {}).get("joins") and len(strands) >= 2:
        pairs = p.get("pairs") or {}
        for a, b in zip(ids, ids[1:]):
            aid = (pairs.get(f"{a}-{b}") or {}).get("series_aiding_H")
            opp = (pairs.get(f"{a}-{b}") or {}).get("series_opposing_H")
            items.append(item(f"pair.{a}-{b}.series_aiding", f"Before joint: {a}+{b} series-aiding",
                              henry(aid) if aid else "", _tol_band(aid, tol_L, henry) if aid else "record",
                              judged=bool(aid)))
            items.append(item(f"pair.{a}-{b}.series_opposing", f"Before joint: {a}−{b} series-opposing",
                              henry(opp) if opp else "", "record (leakage)", judged=False))
    items += [
        item("terminal.inductance", "Inductance at the terminals" + (
             " (band: ordered target ± tolerance)" if acc.get("inductance_basis") == "target" else ""),
             henry(term.get("inductance_H")) + (
             f" ({acc['prediction_offset'] * 100:+.2f}{_NBSP}% from target)"
             if acc.get("inductance_basis") == "target" else ""),
             band(acc.get("inductance_min_H"), acc.get("inductance_max_H"), henry)),
        item("terminal.resistance", "DC resistance at the terminals (at 20 °C)",
             ohm(term.get("resistance_ohm")),
             band(acc.get("resistance_min_ohm"), acc.get("resistance_max_ohm"), ohm)),
    ]
    ir_min = ins.get("ir_min_ohm") or DEFAULT_MIN_INSULATION_OHM
    if len(strands) > 1:
        items.append(item("continuity.strand_to_strand", "Continuity between strands", "open", "open"))
        items.append(item("insulation.strand_to_strand", "Insulation resistance, strand to strand", "",
                          f"≥ {eng(ir_min, OHM, sig=3, trim=True)}"))
    items.append(item("insulation.to_core", "Insulation resistance to core/form", "",
                      f"≥ {eng(ir_min, OHM, sig=3, trim=True)}"))
    hipot = p.get("hipot") or {}
    if (p.get("cautions") or {}).get("hipot") and hipot.get("voltage_V"):
        dur = hipot.get("duration_s")
        items.append(item("hipot", f"Hipot {volt(hipot['voltage_V'])}"
                          + (f", {float(dur):g} s" if dur else "") + ": leakage, withstand",
                          "", "withstands"))
    items.append(item("ambient", "Ambient temperature at test", "", "record (°C)", judged=False))
    # The record prints exactly the lines the prediction requires, in its order.
    by_key = {i["key"]: i for i in items}
    return [by_key.get(k) or item(k, k) for k in prediction_required_lines(p)]


def unit_tables(units: list[str]) -> list[list[str]]:
    """Serial numbers in groups, one QC table per group."""
    units = [str(u) for u in units] or ["—"]
    return [units[i:i + UNITS_PER_QC_TABLE] for i in range(0, len(units), UNITS_PER_QC_TABLE)]


# --- sign-off sheet ----------------------------------------------------------------------

#: Section headings of the sign-off sheet.
SIGNOFF_SECTIONS = ("1 Result", "2 Units", "3 Spread of the units", "4 Cautions", "5 Sign-off")


def measured_text(value, unit: str) -> str:
    """A sign-off value in the sheet's notation (the line's unit as sign-off names it)."""
    if value is None:
        return "—"
    if unit == "turns":
        return f"{int(value)}"
    if unit == "":
        return f"{float(value):.4f}"
    if unit == "s":
        return f"{float(value):g}{_NBSP}s"
    return eng(value, {"ohm": OHM}.get(unit, unit))


def _line_row(line: dict) -> dict:
    unit = line.get("unit") or ""
    lo, hi = line.get("min"), line.get("max")
    if lo is None and hi is None:
        accept = "—"
    elif hi is None:
        accept = f"≥ {measured_text(lo, unit)}"
    elif lo is None:
        accept = f"≤ {measured_text(hi, unit)}"
    else:
        accept = f"{measured_text(lo, unit)} – {measured_text(hi, unit)}"
    dev = line.get("deviation")
    measured = line.get("measured")
    return {
        "key": line.get("key"), "item": line.get("item"),
        "measured": measured_text(measured, unit) if measured is not None else (line.get("note") or "—"),
        "predicted": measured_text(line.get("predicted"), unit) if line.get("predicted") is not None else "",
        "accept": accept,
        "deviation": f"{dev * 100:+.1f}{_NBSP}%" if dev is not None else "",
        "result": line.get("result") or "info",
        "note": line.get("note") if measured is not None else "",
    }


def signoff_context(prediction: dict, result: dict) -> dict:
    units = []
    for u in result.get("units") or []:
        units.append({"serial": u.get("serial"), "verdict": u.get("verdict"), "design_status": u.get("design_status"),
                      "ambient": celsius(u.get("ambient_C")) if u.get("ambient_C") is not None else "—",
                      "notes": u.get("notes"),
                      "trace": trace_text(u["trace"]) if lot_rows(u.get("trace")) else "",
                      "rows": [_line_row(x) for x in u.get("lines") or []],
                      "diagnosis": u.get("diagnosis") or []})
    spread = []
    for sp in result.get("spread") or []:
        unit = sp.get("unit") or ""
        rf = sp.get("range_fraction")
        spread.append({"item": sp.get("item"), "count": sp.get("count"),
                       "mean": measured_text(sp.get("mean"), unit if unit != "turns" else ""),
                       "min": measured_text(sp.get("min"), unit), "max": measured_text(sp.get("max"), unit),
                       "range": f"{rf * 100:.1f}{_NBSP}%" if rf is not None else "—"})
    same_order = (result.get("order_hash") == prediction.get("order_hash")) if result.get("order_hash") else None
    from .qc_lines import status_words

    design = result.get("design_status") or {"state": "ok", "reasons": []}
    return {"p": prediction, "r": result, "job": prediction.get("job") or {}, "units": units,
            "spread": spread, "same_order": same_order, "design": design, "design_words": status_words(design),
            "apart": list(result.get("units_apart") or []),
            "cautions": list(result.get("cautions") or []), "deferral": DEFERRAL}


def _svg_data_url(svg: str) -> str:
    import base64

    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode("utf-8")).decode("ascii")


def render_signoff_html(prediction: dict, signoff_result: dict, paper: str = "a4",
                        templates_dir: Path = TEMPLATES_DIR, qc_chart_svg: str | None = None) -> str:
    """The sign-off sheet (measured against predicted, diagnosis, verdict) as HTML.

    ``signoff_result`` is what :func:`windsheet.signoff.evaluate_signoff` returns.
    """
    env = environment(templates_dir)
    ctx = signoff_context(prediction, signoff_result)
    ctx.update(page_size=_page_size(paper), paper=str(paper).lower(),
               stylesheet=_stylesheet(templates_dir), sections=SIGNOFF_SECTIONS,
               qc_chart=_svg_data_url(qc_chart_svg) if qc_chart_svg else None)
    return env.get_template("signoff.html.j2").render(**ctx)


__all__ = ["render_traveller_html", "render_signoff_html", "render_pdf", "traveller",
           "check_issuable", "order_files", "eng", "SECTIONS", "SIGNOFF_SECTIONS", "PAPER_SIZES",
           "procedure_steps", "cautions", "qc_items"]
