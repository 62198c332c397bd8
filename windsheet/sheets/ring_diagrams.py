"""SVG drawings of a toroid winding: the ring from above, and a section through it.

Drawn from the prediction's ``ring`` (each layer's turn angles and radius,
from :func:`windsheet.physics.layout.toroid_layout`) and ``form`` (the core's size);
nothing here computes the layout.  Elements carry ``data-*`` attributes so the
drawings can be checked by parsing them:

* ``data-turn="A"`` (with ``data-layer``) on each turn mark of the top view,
* ``data-mark="start"`` / ``"finish"`` / ``"gap"`` / ``"sector"`` / ``"direction"``,
* ``data-layer-path`` on each layer's path round the core section.
"""

from __future__ import annotations

import math

from .diagrams import STRAND_FILLS, _el, _svg_root, _text, _to_string

_SIZE = 300.0


def _polar(cx, cy, radius, deg, clockwise):
    """Point at ``deg`` from 12 o'clock, turning clockwise (or not) as seen on the page."""
    a = math.radians(deg if clockwise else -deg)
    return cx + radius * math.sin(a), cy - radius * math.cos(a)


def _arc(cx, cy, radius, a0, a1, clockwise):
    x0, y0 = _polar(cx, cy, radius, a0, clockwise)
    x1, y1 = _polar(cx, cy, radius, a1, clockwise)
    large = 1 if abs(a1 - a0) > 180 else 0
    sweep = 1 if clockwise == (a1 > a0) else 0
    return f"M {x0:.1f} {y0:.1f} A {radius:.1f} {radius:.1f} 0 {large} {sweep} {x1:.1f} {y1:.1f}"


def ring_top_view_svg(ring: dict, form: dict, direction: str = "clockwise") -> str:
    """The ring seen from its top face: every turn, the start, the finish, the gap, any sector.

    Each turn is a tick across the core face; its wire inside the hole is a
    dot on its layer's circle, so the layers show building inward.  The
    start is at 12 o'clock and the arrow shows the winding direction as seen
    from the top face.
    """
    clockwise = direction != "anticlockwise"
    od, idia = float(form.get("outer_diameter_m") or 1), float(form.get("inner_diameter_m") or 0.5)
    cx = cy = _SIZE / 2
    # Room round the ring for the start, finish and sector labels, outside every turn's tick.
    scale = (_SIZE / 2 - 56) / (od / 2)
    r_out, r_in = od / 2 * scale, idia / 2 * scale
    root = _svg_root(_SIZE, _SIZE, "Toroid seen from the top face")
    _el(root, "circle", cx=f"{cx}", cy=f"{cy}", r=f"{r_out:.1f}", fill="#e6e6e6", stroke="#000",
        stroke_width="1.2")
    _el(root, "circle", cx=f"{cx}", cy=f"{cy}", r=f"{r_in:.1f}", fill="#fff", stroke="#000",
        stroke_width="1.2")
    layers = ring.get("layers") or []
    dot_r = max(min(float(ring.get("wire_diameter_m") or 0) * scale / 2, 5.0), 1.6)
    if ring.get("spread") == "sector" and layers:
        span = float(ring.get("span_deg") or 0)
        _el(root, "path", d=_arc(cx, cy, r_out + 7, 0, span, clockwise), fill="none", stroke="#000",
            stroke_width="2.4", data_mark="sector")
        _label(root, cx, cy, r_out + 16, span / 2, f"sector {span:.0f}°", clockwise)
    for sec in ring.get("sectors") or []:
        # Each winding's own sector: an arc outside the ring, named by its strand.
        a0, a1 = float(sec["from_deg"]), float(sec["to_deg"])
        _el(root, "path", d=_arc(cx, cy, r_out + 7, a0, a1, clockwise), fill="none", stroke="#000",
            stroke_width="2.4", data_mark="sector", data_strand=sec["strand"])
        _label(root, cx, cy, r_out + 14, (a0 + a1) / 2, sec["strand"], clockwise, bold=True, size=11.0)
    for layer in layers:
        rho = float(layer.get("radius_m") or 0) * scale
        for sid, angles in (layer.get("angles_deg") or {}).items():
            g = _el(root, "g", data_turn=sid, data_layer=str(layer["layer"]))
            for a in angles:
                x0, y0 = _polar(cx, cy, r_in, a, clockwise)
                x1, y1 = _polar(cx, cy, r_out, a, clockwise)
                _el(g, "line", x1=f"{x0:.1f}", y1=f"{y0:.1f}", x2=f"{x1:.1f}", y2=f"{y1:.1f}",
                    stroke="#000", stroke_width="0.8",
                    stroke_dasharray=None if layer["layer"] == 1 else "2 1.5")
                xd, yd = _polar(cx, cy, rho, a, clockwise)
                _el(g, "circle", cx=f"{xd:.1f}", cy=f"{yd:.1f}", r=f"{dot_r:.1f}",
                    fill=STRAND_FILLS.get(sid, "#fff"), stroke="#000", stroke_width="0.7")
    if layers:
        sectors = ring.get("sectors") or []
        ends = ([("start", float(sec["from_deg"])) for sec in sectors[:1]] if sectors else
                list(zip(("start", "finish"), _ends(layers))))
        for what, a in ends:
            x, y = _polar(cx, cy, r_out + 2, a, clockwise)
            xt, yt = _polar(cx, cy, r_out + 12, a, clockwise)
            _el(root, "line", x1=f"{x:.1f}", y1=f"{y:.1f}", x2=f"{xt:.1f}", y2=f"{yt:.1f}",
                stroke="#000", stroke_width="1.6", data_mark=what)
            if not sectors:
                _label(root, cx, cy, r_out + 15, a, what.upper(), clockwise, bold=True)
        gap = float(ring.get("gap_deg") or 0)
        if gap > 0 and not sectors:
            # The gap runs from the last turn on round to the start (360°); its label sits outside the ring.
            top = max(float(layer["to_deg"]) for layer in layers)
            _el(root, "path", d=_arc(cx, cy, (r_in + r_out) / 2, top + 2, 358, clockwise), fill="none",
                stroke="#000", stroke_width="1", stroke_dasharray="4 3", data_mark="gap")
            # Named in the middle of the hole, where no turn or mark is drawn.
            _text(root, cx, cy + 4, f"gap {gap:.0f}°", text_anchor="middle", font_size="9", font_weight="bold")
        x0, y0 = _polar(cx, cy, r_in - 10, 8, clockwise)
        x1, y1 = _polar(cx, cy, r_in - 10, 40, clockwise)
        _el(root, "path", d=_arc(cx, cy, r_in - 10, 8, 40, clockwise), fill="none", stroke="#000",
            stroke_width="1.4", data_mark="direction", data_direction=direction)
        _arrow_head(root, x1, y1, x0, y0)
    _text(root, 6, _SIZE - 6, f"seen from the top face; winding {direction}", font_size="9")
    return _to_string(root)


def _label(root, cx, cy, radius, deg, text, clockwise, bold=False, inward=False, size=9.0):
    """A label at ``deg`` just beyond ``radius`` (inside it with ``inward``), set off the ring on its own side.

    Anchored by where it falls (right of the ring: from its start; left: to its end; top or bottom:
    centred), so it runs away from the ring and no turn's tick crosses it.
    """
    x, y = _polar(cx, cy, radius, deg, clockwise)
    dx, dy = x - cx, y - cy
    if inward:
        dx, dy = -dx, -dy
    anchor = "middle" if abs(dx) < 0.35 * radius else ("start" if dx > 0 else "end")
    baseline = y + (size * 0.75 if dy > 0.35 * radius else 0.0 if dy < -0.35 * radius else size * 0.35)
    if inward:
        baseline = y + size * 0.35
    return _text(root, x, baseline, text, text_anchor=anchor, font_size=f"{size:g}",
                 font_weight="bold" if bold else None)


def _ends(layers):
    """Angles of the very first and the very last turn (first strand's start, last strand's finish)."""
    first_layer, last_layer = layers[0], layers[-1]
    ids = sorted((first_layer.get("angles_deg") or {}))
    start = (first_layer["angles_deg"][ids[0]] or [0])[0]
    finish = (last_layer["angles_deg"][ids[-1]] or [0])[-1]
    return float(start), float(finish)


def _arrow_head(root, x, y, fx, fy, size=5.0):
    ang = math.atan2(y - fy, x - fx)
    pts = [(x, y)] + [(x - size * math.cos(ang + s), y - size * math.sin(ang + s)) for s in (0.45, -0.45)]
    _el(root, "polygon", points=" ".join(f"{a:.1f},{b:.1f}" for a, b in pts), fill="#000")


def ring_section_svg(ring: dict, form: dict) -> str:
    """A cut through the ring: the core's section and each layer's path round it.

    The hole (the ring's axis side) is at the left; each layer's wire runs
    round the section at its build, and its conductors stack on the inside
    wall, where the turns crowd.
    """
    od, idia = float(form.get("outer_diameter_m") or 1), float(form.get("inner_diameter_m") or 0.5)
    h = float(form.get("height_m") or 0.01)
    w = (od - idia) / 2
    layers = ring.get("layers") or []
    d = float(ring.get("wire_diameter_m") or 0)
    build = max([float(layer.get("build_m") or 0) for layer in layers] + [d]) + d / 2
    scale = min(150.0 / (w + 2 * build), 130.0 / (h + 2 * build))
    width, height = 250.0, 150.0 + 40
    x0 = 70.0 + build * scale
    y0 = 20.0 + build * scale
    root = _svg_root(width, height, "Section through the ring")
    _el(root, "rect", x=f"{x0:.1f}", y=f"{y0:.1f}", width=f"{w * scale:.1f}", height=f"{h * scale:.1f}",
        fill="#e6e6e6", stroke="#000", stroke_width="1.2", data_mark="core")
    _text(root, x0 + w * scale / 2, y0 + h * scale / 2 + 4, "core", text_anchor="middle", font_size="9.5")
    for layer in layers:
        off = (float(layer.get("build_m") or 0)) * scale
        _el(root, "rect", x=f"{x0 - off:.1f}", y=f"{y0 - off:.1f}", width=f"{w * scale + 2 * off:.1f}",
            height=f"{h * scale + 2 * off:.1f}", rx=f"{off:.1f}", fill="none", stroke="#000",
            stroke_width="0.9", stroke_dasharray=None if layer["layer"] == 1 else "3 2",
            data_layer_path=str(layer["layer"]))
        cxw = x0 - off
        r = max(d * scale / 2, 1.5)
        for k in range(3):
            cy = y0 + h * scale * (0.25 + 0.25 * k)
            _el(root, "circle", cx=f"{cxw:.1f}", cy=f"{cy:.1f}", r=f"{r:.1f}", fill="#fff", stroke="#000",
                stroke_width="0.8")
        _text(root, cxw - r - 3, y0 + h * scale + off + 12 if layer["layer"] == 1 else y0 - off - 4,
              f"L{layer['layer']}", text_anchor="end", font_size="8.5", font_weight="bold")
    _text(root, 6, y0 + h * scale / 2 + 4, "hole ←", font_size="9.5")
    _text(root, width - 6, y0 + h * scale / 2 + 4, "→ outside", text_anchor="end", font_size="9.5")
    _text(root, 6, height - 6, "layers build inward on the hole's wall", font_size="9")
    return _to_string(root)
