"""Bill of materials across jobs: what to pull from stores for a set of orders.

Reads designs only (a coil's :class:`windsheet.design.model.Design` or a
transformer's :class:`windsheet.design.transformer_model.TransformerDesign`: one
wire per winding, layer tape per section, barrier tape); nothing here computes
physics or counts what the design holds (its sleeving pieces, its quantity).
Wire is grouped by standard, size, grade, conductor and thermal class; each
group's length and mass are the jobs' ``wire_length_with_scrap_m`` and
``mass_kg`` times the job quantity, summed over strands.  Reels are counted
where the shop's reel list gives the reel size of that wire.
"""

from __future__ import annotations

import csv
import io
import math
from typing import Iterable, Optional

from windsheet.common.errors import InputError

#: Tape laid over each layer: one circumference plus this share of it (a shop setting, assumed).
TAPE_OVERLAP = 0.10


def wire_group(wire) -> tuple:
    """The stock item a job's wire is drawn as: (standard, size [m], grade, conductor, thermal class [°C]).

    Examples
    --------
    >>> from windsheet.design.model import WireSpec
    >>> wire_group(WireSpec(label="0.500 mm grade 2", standard="IEC 60317-0-1", copper_diameter_m=5.0e-4,
    ...                     overall_diameter_m=5.66e-4, grade=2, thermal_class_C=155))
    ('IEC 60317-0-1', 0.0005, 2, 'copper', 155)
    """
    # Rounded to 0.1 µm so the same nominal size read two ways groups together.
    return (wire.standard, round(float(wire.copper_diameter_m), 7), wire.grade, wire.conductor or "copper",
            wire.thermal_class_C)


def job_wire(p) -> dict:
    """One job's wire: per unit and for the job's quantity, scrap included.

    Returns
    -------
    row : dict
        ``group`` (see :func:`wire_group`), ``label``, ``strands``, ``quantity``,
        ``length_per_unit_m``, ``length_m`` and ``mass_kg`` (conductor mass;
        the enamel is not weighed) for the whole job.
    """
    qty = p.quantity
    per_unit = sum(float(s.wire_length_with_scrap_m) for s in p.strands)
    mass_unit = sum(float(s.mass_kg) for s in p.strands)
    return {"group": wire_group(p.wire), "label": p.wire.label, "strands": len(p.strands),
            "quantity": qty, "length_per_unit_m": per_unit, "length_m": qty * per_unit,
            "mass_kg": qty * mass_unit}


def _transformer_wires(p) -> list[dict]:
    qty = p.quantity
    out = []
    for w in p.windings:
        out.append({"group": wire_group(w.wire), "label": w.wire.label, "strands": w.strands, "winding": w.name,
                    "quantity": qty, "length_per_unit_m": float(w.wire_length_with_scrap_m),
                    "length_m": qty * float(w.wire_length_with_scrap_m), "mass_kg": qty * float(w.mass_kg)})
    return out


def _transformer_tapes(p, overlap: float) -> list[dict]:
    """Layer tape within each section and the barrier tape between windings, one wrap at its height."""
    qty = p.quantity
    base = _base_perimeter(p.form)
    out = []
    for b in p.build:
        if b.kind == "section":
            s = p.sections[b.section]
            t = job_tape(s, overlap)
            if t is not None and base is not None:
                # The section sits on the build below it: its wraps are that much longer.
                t["length_m"] += qty * (s.layers - 1) * 2 * math.pi * b.build_below_m * (1 + overlap)
            if t is not None:
                out.append({**t, "where": f"layers of {b.label}"})
        elif b.kind == "barrier":
            bar = next((x for x in p.barriers if b.label.endswith(f"{x.between[0]}–{x.between[1]}")), None)
            if bar is None or not bar.tape_wraps:
                continue
            wraps = qty * bar.tape_wraps
            length = None if base is None else sum(
                (base + 2 * math.pi * (b.build_below_m + k * bar.tape_thickness_m)) * (1 + overlap)
                for k in range(bar.tape_wraps)) * qty
            rated = f", rated {bar.tape_rating_V / 1e3:g} kV" if bar.tape_rating_V else ""
            out.append({"spec": f"{bar.tape_material or 'insulating tape'}, {bar.tape_thickness_m * 1e6:.0f} µm "
                                f"thick{rated}", "where": f"barrier {bar.between[0]}–{bar.between[1]}",
                        "wraps": wraps, "length_m": length, "quantity": qty})
    return out


def job_wires(p) -> list[dict]:
    """Every wire a job draws: a coil's one, a transformer's one per winding (see :func:`job_wire`)."""
    return _transformer_wires(p) if hasattr(p, "windings") else [job_wire(p)]


def job_tapes(p, overlap: float = TAPE_OVERLAP) -> list[dict]:
    """Every tape a job lays: a coil's layer tape, a transformer's layer and barrier tape."""
    if hasattr(p, "windings"):
        return _transformer_tapes(p, overlap)
    t = job_tape(p, overlap)
    return [t] if t is not None else []


def job_margin_tape(p) -> list[dict]:
    """Margin tape: two strips per wound section (one at each end of its traverse), built to its height."""
    sections = p.sections if hasattr(p, "windings") else [p]
    out = []
    for s in sections:
        f = s.form
        if f.margin_tape_m and f.kind != "toroid":
            out.append({"spec": f"{f.margin_tape_material or 'margin tape'}, {f.margin_tape_m * 1e3:g} mm wide",
                        "strips": 2 * p.quantity, "quantity": p.quantity})
    return _sum_by_spec(out, ("strips",))


def _base_perimeter(form) -> Optional[float]:
    if form.kind == "toroid":
        return None  # tape round a toroid's section spirals the whole ring: not estimated
    if form.diameter_m:
        return math.pi * float(form.diameter_m)
    if form.mean_turn_length_m:
        return float(form.mean_turn_length_m)
    return None


def job_tape(p, overlap: float = TAPE_OVERLAP) -> Optional[dict]:
    """Layer tape of one job: wraps, width and length, or None when the winding has none.

    A wrap over layer k (of L) lies at height k·b/L on the form (b the build);
    its length is the form's perimeter plus 2π times that height, plus the overlap.
    """
    w = p.winding
    # The wraps the layer table calls for (a sectioned winding's within each section).
    rows = [r for r in getattr(p, "layer_plan", []) if r.tape_after == "layer-tape"]
    if not w.layer_tape_m > 0 or not rows:
        return None
    qty = p.quantity
    base = _base_perimeter(p.form)
    build = float(p.fit.build_m or 0.0)
    layers = w.layers_per_section or [p.layers]
    length = None
    if base is not None:
        length = qty * sum((base + 2 * math.pi * r.layer * build / layers[(r.section or 1) - 1]) * (1 + overlap)
                           for r in rows)
    sec = getattr(p, "sections", None)
    width = sec.width_m if sec else p.fit.traverse_m
    return {"spec": f"{w.layer_tape_material or 'insulating tape'}, {w.layer_tape_m * 1e6:.0f} µm thick"
                    + (f", {width * 1e3:.1f} mm wide" if width else ""),
            "wraps": qty * len(rows), "length_m": length, "quantity": qty}


def job_sleeving(p) -> dict:
    """Sleeving: the design's pieces per unit (one over each terminal lead and each joint), each a lead length
    (common practice)."""
    qty = p.quantity
    pieces = p.connections.sleeving_pieces_per_unit
    if hasattr(p, "windings"):
        # One size for the job: the bore of the thickest wire, the longest lead.
        od = max(float(s.wire.overall_diameter_m) for s in p.sections)
        lead = max(float(s.winding.lead_length_m or 0.0) for s in p.sections)
        bore, cls = od, min(w.wire.thermal_class_C or 0 for w in p.windings) or None
    else:
        od = float(p.wire.overall_diameter_m)
        lead = float(p.winding.lead_length_m or 0.0)
        # A joint holds two wires side by side: the bore must take both.
        bore = 2 * od if p.connections.joints else od
        cls = p.wire.thermal_class_C
    return {"spec": f"sleeving, bore at least {bore * 1e3:.2f} mm" + (f", class {cls} °C" if cls else ""),
            "pieces": qty * pieces, "pieces_per_unit": pieces, "length_m": qty * pieces * lead, "quantity": qty}


def job_form(p) -> dict:
    """The form or core: one per unit, described by kind, material and size."""
    f = p.form
    dims = []
    for key, name in (("diameter_m", "Ø"), ("inner_diameter_m", "ID"), ("outer_diameter_m", "OD"),
                      ("height_m", "h"), ("traverse_m", "traverse"), ("width_m", "window")):
        if getattr(f, key):
            dims.append(f"{name} {getattr(f, key) * 1e3:g} mm")
    spec = f"{f.kind or 'form'}, {f.material or '—'}" + (f", {' '.join(dims)}" if dims else "")
    return {"spec": spec, "count": p.quantity}


def job_labels(p) -> dict:
    """Unit labels: one per serial number (or per unit when the order lists none)."""
    serials = list(p.job.units)
    return {"count": max(len(serials), p.quantity), "serials": serials}


# --- Reels ---------------------------------------------------------------------------

def load_reels(path) -> list[dict]:
    """The shop's reel list, a CSV file: ``size_mm, reel_kg`` and optionally ``standard, grade,
    conductor, thermal_class, source``.  A blank optional field matches any wire."""
    from windsheet.common.fileio import read_csv_rows

    rows = read_csv_rows(path, "reel list")
    out = []
    for i, r in enumerate(rows, start=2):
        try:
            size = float(r.get("size_mm") or "")
            reel = float(r.get("reel_kg") or "")
        except ValueError:
            raise InputError(str(path), f"line {i}: expected size_mm and reel_kg as numbers") from None
        if not (0 < size < 10 and 0 < reel < 1000):
            raise InputError(str(path), f"line {i}: size_mm must be in (0, 10) and reel_kg in (0, 1000)")
        grade = (r.get("grade") or "").strip()
        tc = (r.get("thermal_class") or "").strip()
        out.append({"size_m": round(size * 1e-3, 7), "reel_kg": reel,
                    "standard": (r.get("standard") or "").strip() or None,
                    "grade": int(grade) if grade.isdigit() else None,
                    "conductor": (r.get("conductor") or "").strip().lower() or None,
                    "thermal_class": int(tc) if tc.isdigit() else None,
                    "source": (r.get("source") or "").strip() or str(path)})
    return out


def reel_for(group: tuple, reels: Iterable[dict]) -> Optional[dict]:
    """The first reel row matching a wire group, or None."""
    standard, size, grade, conductor, tc = group
    for r in reels or ():
        if (r["size_m"] == size and r["standard"] in (None, standard) and r["grade"] in (None, grade)
                and r["conductor"] in (None, conductor) and r["thermal_class"] in (None, tc)):
            return r
    return None


# --- The bill ------------------------------------------------------------------------

def _wire_total(rows: list[dict], reels) -> list[dict]:
    groups: dict = {}
    for r in rows:
        g = groups.setdefault(r["group"], {"group": r["group"], "label": r["label"], "jobs": [],
                                          "length_m": 0.0, "mass_kg": 0.0})
        g["jobs"].append(r["job"])
        g["length_m"] += r["length_m"]
        g["mass_kg"] += r["mass_kg"]
    for g in groups.values():
        _add_reels(g, reels)
    return list(groups.values())


def _add_reels(row: dict, reels) -> None:
    reel = reel_for(row["group"], reels)
    row["reel_kg"] = reel["reel_kg"] if reel else None
    row["reels"] = math.ceil(row["mass_kg"] / reel["reel_kg"] - 1e-9) if reel else None
    row["reel_source"] = reel["source"] if reel else None


def bill_of_materials(predictions: list[dict], reels: Optional[list[dict]] = None,
                      tape_overlap: float = TAPE_OVERLAP) -> dict:
    """Bill of materials per job and in total.

    Parameters
    ----------
    predictions : list of Design
        One design per job (:func:`windsheet.design.build.build_design`).
    reels : list of dict, optional
        The shop's reel list (:func:`load_reels`).
    tape_overlap : float
        Share of a wrap's circumference added as overlap. [-]

    Returns
    -------
    bill : dict
        ``jobs`` (each: ``job``, ``part``, ``quantity``, ``wires`` (one per
        winding of a transformer), ``tapes``, ``margin_tape``, ``sleeving``,
        ``form``, ``labels``) and ``total`` (wire by group,
        tape and sleeving by specification, forms by specification, labels),
        lengths in metres and masses in kilograms.

    """
    jobs, wires = [], []
    for p in predictions:
        job = p.job
        job_wire_rows = [{**w, "job": job.number} for w in job_wires(p)]
        for w in job_wire_rows:
            _add_reels(w, reels)
        wires += job_wire_rows
        jobs.append({"job": job.number, "part": job.part, "customer": job.customer,
                     "revision": job.revision, "quantity": p.quantity, "wires": job_wire_rows,
                     "tapes": job_tapes(p, tape_overlap), "margin_tape": job_margin_tape(p),
                     "sleeving": job_sleeving(p), "form": job_form(p),
                     "labels": job_labels(p)})
    return {"schema": "windsheet.materials/2", "jobs": jobs,
            "total": {"wire": _wire_total(wires, reels),
                      "tape": _sum_by_spec([t for j in jobs for t in j["tapes"]], ("wraps", "length_m")),
                      "margin_tape": _sum_by_spec([m for j in jobs for m in j["margin_tape"]], ("strips",)),
                      "sleeving": _sum_by_spec([j["sleeving"] for j in jobs], ("pieces", "length_m")),
                      "forms": _sum_by_spec([j["form"] for j in jobs], ("count",)),
                      "labels": sum(j["labels"]["count"] for j in jobs)},
            "notes": ["Wire length and mass include each order's scrap allowance; mass is the conductor's "
                      "(enamel not weighed).",
                      "Reels are whole reels of the size in the shop's reel list; wire without a listed "
                      "reel size shows no reel count.",
                      f"Layer tape: each wrap one circumference at its layer plus {tape_overlap:.0%} overlap "
                      "(a shop setting); toroids' tape is counted in wraps only.",
                      "Sleeving: one piece per terminal lead and per joint, each the lead length "
                      "(common practice)."]}


def _sum_by_spec(items: list[dict], keys: tuple) -> list[dict]:
    out: dict = {}
    for it in items:
        row = out.setdefault(it["spec"], {"spec": it["spec"], **{k: 0 for k in keys}})
        for k in keys:
            row[k] = None if row[k] is None or it.get(k) is None else row[k] + it[k]
    return list(out.values())


# --- Output --------------------------------------------------------------------------

def _group_text(group: tuple, label=None) -> str:
    standard, size, grade, conductor, tc = group
    # The order's own name for the wire (e.g. '22 AWG ...') with the copper size it resolved to.
    name = label if label and "mm" in label else (
        f"{label} ({size * 1e3:.3f} mm)" if label else f"{size * 1e3:.3f} mm grade {grade}")
    return f"{name} {conductor}, class {tc}, {standard}"


def bill_rows(bill: dict) -> list[dict]:
    """Flat rows (scope, category, item, quantity, unit) for the CSV and the printed sheet."""
    rows = []

    def add(scope, category, item, quantity, unit):
        rows.append({"scope": scope, "category": category, "item": item, "quantity": quantity, "unit": unit})

    def wire_rows(scope, w):
        text = _group_text(w["group"], w.get("label"))
        add(scope, "wire", text, round(w["length_m"], 3), "m")
        add(scope, "wire", text, round(w["mass_kg"], 5), "kg")
        if w.get("reels") is not None:
            add(scope, "wire", text + f" on {w['reel_kg']:g} kg reels", w["reels"], "reels")

    for j in bill["jobs"]:
        scope = j["job"]
        for w in j["wires"]:
            wire_rows(scope, w)
        for tp in j["tapes"]:
            item = tp["spec"] + (f" ({tp['where']})" if tp.get("where") else "")
            add(scope, "tape", item, tp["wraps"], "wraps")
            if tp["length_m"] is not None:
                add(scope, "tape", item, round(tp["length_m"], 3), "m")
        for m in j["margin_tape"]:
            add(scope, "margin tape", m["spec"], m["strips"], "strips")
        add(scope, "sleeving", j["sleeving"]["spec"], j["sleeving"]["pieces"], "pieces")
        add(scope, "sleeving", j["sleeving"]["spec"], round(j["sleeving"]["length_m"], 3), "m")
        add(scope, "form", j["form"]["spec"], j["form"]["count"], "pcs")
        add(scope, "labels", ", ".join(j["labels"]["serials"]) or "unit labels", j["labels"]["count"], "labels")
    t = bill["total"]
    for w in t["wire"]:
        wire_rows("TOTAL", w)
    for tp in t["tape"]:
        add("TOTAL", "tape", tp["spec"], tp["wraps"], "wraps")
        if tp["length_m"] is not None:
            add("TOTAL", "tape", tp["spec"], round(tp["length_m"], 3), "m")
    for m in t["margin_tape"]:
        add("TOTAL", "margin tape", m["spec"], m["strips"], "strips")
    for s in t["sleeving"]:
        add("TOTAL", "sleeving", s["spec"], s["pieces"], "pieces")
        add("TOTAL", "sleeving", s["spec"], round(s["length_m"], 3), "m")
    for f in t["forms"]:
        add("TOTAL", "form", f["spec"], f["count"], "pcs")
    add("TOTAL", "labels", "unit labels", t["labels"], "labels")
    return rows


def bill_csv(bill: dict) -> str:
    """The bill as CSV text: ``scope, category, item, quantity, unit`` (metres, kilograms, counts)."""
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=["scope", "category", "item", "quantity", "unit"], lineterminator="\n")
    w.writeheader()
    w.writerows(bill_rows(bill))
    return buf.getvalue()


def bill_json_ready(bill: dict) -> dict:
    """The bill with tuples spelt out, for JSON."""
    def fix(w):
        s, size, g, c, tc = w["group"]
        return {**w, "group": {"standard": s, "size_m": size, "grade": g, "conductor": c, "thermal_class_C": tc}}
    jobs = [{**j, "wires": [fix(w) for w in j["wires"]]} for j in bill["jobs"]]
    return {**bill, "jobs": jobs, "total": {**bill["total"], "wire": [fix(w) for w in bill["total"]["wire"]]}}
