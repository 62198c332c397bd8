"""SVG sketches of a transformer: its windings with their dots and terminals, and the build in the window.

Drawn from the design only.  Machine-readable attributes: ``data-winding`` on
each winding's group, ``data-dot`` on the dot at its start, ``data-terminal``
(with ``data-connects``) on each terminal, ``data-build`` on each item of the
build section.
"""

from __future__ import annotations

from windsheet.common.fmt import length

from .diagrams import _coil_path, _el, _line, _svg_root, _text, _to_string

_ROW = 84.0
_TOP = 34.0


def transformer_svg(design) -> str:
    """The windings as coil symbols either side of the core: first winding left, the others right.

    Each winding's start carries the dot (all windings are wound the same way from their
    starts, so the dotted ends are in phase); every brought-out end, taps included, is a
    terminal box labelled T1, T2, … as the termination table numbers it.
    """
    ends = {t.end: t.label for t in design.connections.terminals}
    first, others = design.windings[0], design.windings[1:]
    rows = max(1, len(others))
    height = _TOP + rows * _ROW + 26
    root = _svg_root(420, height, "Wiring diagram of the transformer: windings, dots and terminals")
    # The core: two bars between the sides.
    _line(root, 205, _TOP - 14, 205, height - 22, stroke="#000", stroke_width="2.4")
    _line(root, 215, _TOP - 14, 215, height - 22, stroke="#000", stroke_width="2.4")
    span = rows * _ROW - 30
    _coil(root, first, ends, x=170, y0=_TOP, length=span, side="left")
    for k, w in enumerate(others):
        _coil(root, w, ends, x=250, y0=_TOP + k * _ROW, length=_ROW - 30, side="right")
    _text(root, 210, height - 6, "core", text_anchor="middle", font_size="9")
    return _to_string(root)


def _coil(root, w, ends, x, y0, length, side):
    g = _el(root, "g", data_winding=w.name)
    y1 = y0 + length
    # A vertical coil: bumps towards the core.
    path = _coil_path(0, length, 0, bumps=max(3, min(8, int(length / 12))))
    _el(g, "path", d=path, fill="none", stroke="#000", stroke_width="2",
        transform=f"translate({x:.1f},{y0:.1f}) rotate(90)" if side == "right" else
        f"translate({x:.1f},{y1:.1f}) rotate(-90)")
    dot_x = x + (-10 if side == "left" else 10)
    _el(g, "circle", cx=f"{dot_x:.1f}", cy=f"{y0 + 6:.1f}", r="3.6", fill="#000", data_dot=f"{w.name}.start")
    name_x = x + (-58 if side == "left" else 58)
    _text(g, name_x, (y0 + y1) / 2 + 4, w.name, text_anchor="middle", font_weight="bold")
    lead_x = x + (-34 if side == "left" else 34)
    points = [(f"{w.name}.start", y0)] + [(f"{w.name}.tap{t}", y0 + length * t / w.turns) for t in w.taps] + \
        [(f"{w.name}.finish", y1)]
    for end, y in points:
        label = ends.get(end, "?")
        _line(g, x, y, lead_x, y, stroke="#000", stroke_width="1.4")
        bx = lead_x + (-26 if side == "left" else 0)
        t = _el(g, "g", data_terminal=label, data_connects=end)
        _el(t, "rect", x=f"{bx:.1f}", y=f"{y - 8:.1f}", width="26", height="16", fill="#fff", stroke="#000",
            stroke_width="1.2")
        _text(t, bx + 13, y + 4, label, text_anchor="middle", font_size="10", font_weight="bold")


def build_svg(design) -> str:
    """Section through one side of the window: the form at the bottom, each build item a band."""
    width, height = 420.0, 60.0 + 24.0 * len(design.build)
    root = _svg_root(width, height, "Section through the window: the build, form at the bottom")
    _line(root, 30, height - 20, width - 30, height - 20, stroke="#000", stroke_width="2")
    _text(root, width / 2, height - 6, "form / bobbin", text_anchor="middle", font_size="9")
    y = height - 20
    band_h = (height - 50) / max(len(design.build), 1)
    for b in design.build:
        top = y - band_h
        fill = {"section": "#ffffff", "barrier": "#d8d8d8", "screen": "#8c8c8c"}[b.kind]
        g = _el(root, "g", data_build=b.label)
        _el(g, "rect", x="30", y=f"{top:.1f}", width=f"{width - 60:.1f}", height=f"{band_h - 2:.1f}", fill=fill,
            stroke="#000", stroke_width="1", stroke_dasharray="4 2" if b.kind == "barrier" else None)
        words = (f"{b.label}: {b.turns} turns, {length(b.build_m)}" if b.kind == "section"
                 else f"{b.label}, {length(b.build_m)}")
        _text(g, width / 2, top + band_h / 2 + 3, words, text_anchor="middle", font_size="10",
              fill="#fff" if b.kind == "screen" else "#000")
        y = top
    return _to_string(root)
