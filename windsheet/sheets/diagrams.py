"""SVG sketches for the traveller: the wiring diagram and the winding cross-section.

Both are drawn from what the engine returns (the hookup's joins and terminals,
the cross-section's slot map); nothing here knows any physics.  Elements carry
machine-readable ``data-*`` attributes so the drawings can be checked by
parsing them:

* ``data-strand="A"`` on each strand's group,
* ``data-end="A.start"`` on the circle marking each wire end,
* ``data-join="A.finish B.start"`` on the group of lines drawing one joint,
* ``data-terminal="T1"`` (with ``data-connects="A.start"``) on each terminal.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET

from windsheet.common.fmt import length

SVG_NS = "http://www.w3.org/2000/svg"

# Wiring-diagram geometry, in SVG user units (drawn at 1 unit = 1 px, scaled by CSS).
_ROW_H = 78.0
_TOP = 40.0
_START_X = 150.0
_FINISH_X = 370.0
_COIL_X0 = 205.0
_COIL_X1 = 315.0
_LANE_GAP = 13.0
_TERMINAL_PAD = 8.0
_TERMINAL_DROP = 12.0

#: Grey fills told apart in monochrome print; the letter in each circle is the real key.
STRAND_FILLS = {"A": "#ffffff", "B": "#c8c8c8", "C": "#8c8c8c", "D": "#4a4a4a"}
STRAND_TEXT = {"A": "#000000", "B": "#000000", "C": "#ffffff", "D": "#ffffff"}


def _el(parent, tag, **attrs):
    attrs = {k.replace("_", "-"): str(v) for k, v in attrs.items() if v is not None}
    return ET.SubElement(parent, tag, attrs)


def _text(parent, x, y, text, **attrs):
    t = _el(parent, "text", x=f"{x:.1f}", y=f"{y:.1f}", **attrs)
    t.text = text
    return t


#: Strand letters drawn as strokes, 7 units tall about their centre.  A path costs
#: the PDF renderer a fraction of a laid-out text run, and a cross-section has one per turn.
_STRAND_GLYPHS = {
    "A": "M-2.7 3.5L0-3.5L2.7 3.5M-1.6 0.9H1.6",
    "B": "M-2.2 0H0.4A1.75 1.75 0 0 0 0.4-3.5H-2.2V3.5H0.6A1.75 1.75 0 0 0 0.6 0",
    "C": "M2.4-2.3A2.9 3.5 0 1 0 2.4 2.3",
    "D": "M-2.3-3.5V3.5H-0.6A2.9 3.5 0 0 0-0.6-3.5Z",
}


def _strand_mark(root, parent, x, y, strand, colour="#000000"):
    """The strand's letter centred on (x, y): a stroked glyph, or text for any other name."""
    if strand not in _STRAND_GLYPHS:
        return _text(parent, x, y + 3.6, strand, text_anchor="middle", font_weight="bold",
                     font_size="10", fill=colour)
    ref = f"strand-{strand}"
    if root.find(f"./defs/path[@id='{ref}']") is None:
        defs = root.find("./defs")
        if defs is None:
            defs = ET.Element("defs")
            root.insert(0, defs)
        _el(defs, "path", id=ref, d=_STRAND_GLYPHS[strand], fill="none",
            stroke_linecap="round", stroke_linejoin="round")
    return _el(parent, "use", href=f"#{ref}", x=f"{x:.1f}", y=f"{y:.1f}", stroke=colour,
               stroke_width="1.5", data_mark=strand)


def _line(parent, x1, y1, x2, y2, **attrs):
    return _el(parent, "line", x1=f"{x1:.1f}", y1=f"{y1:.1f}", x2=f"{x2:.1f}", y2=f"{y2:.1f}",
               **attrs)


def _svg_root(width, height, label):
    ET.register_namespace("", SVG_NS)
    root = ET.Element("svg", {
        "xmlns": SVG_NS, "viewBox": f"0 0 {width:.0f} {height:.0f}",
        "width": f"{width:.0f}", "height": f"{height:.0f}",
        "role": "img", "aria-label": label,
        "font-family": "DejaVu Sans, sans-serif", "font-size": "11",
    })
    return root


def _to_string(root) -> str:
    return ET.tostring(root, encoding="unicode", short_empty_elements=True)


def parse_end(end: str) -> tuple[str, str]:
    """Split ``"A.finish"`` into ``("A", "finish")``."""
    strand, _, which = str(end).partition(".")
    if which not in ("start", "finish") or not strand:
        raise ValueError(f"not a strand end: {end!r} (expected like 'A.start')")
    return strand, which


def _clip(text: str, n: int) -> str:
    return text if len(text) <= n else text[: n - 1] + "…"


def _coil_path(x0, x1, y, bumps=5):
    """A row of half-circle bumps, the usual inductor symbol."""
    w = (x1 - x0) / bumps
    d = [f"M {x0:.1f} {y:.1f}"]
    for _ in range(bumps):
        d.append(f"a {w / 2:.2f} {w / 2:.2f} 0 0 1 {w:.2f} 0")
    return " ".join(d)


def winding_terminals(hookup: dict, strand_ids) -> list[str]:
    """The ends brought out as terminals, in T1, T2, … order (see :func:`windsheet.physics.hookup.brought_out`)."""
    from windsheet.physics.hookup import brought_out

    return brought_out(hookup.get("name") or "", hookup.get("terminals"), strand_ids)


def _nets(hookup):
    """Each joint as a tuple of ends, in the order the hookup lists them."""
    return [tuple(str(e) for e in join) for join in hookup.get("joins") or [] if len(join) >= 2]


def wiring_svg(hookup: dict, strand_ids, labels: dict | None = None, routes=None, pins=None,
               terminals=None) -> str:
    """Wiring diagram of a hookup as an SVG string.

    Every strand is a coil symbol on its own row, start on the left (with the
    polarity dot), finish on the right.  Each joint is drawn as its own lane of
    lines linking the named ends; the terminals are labelled T1, T2, … in the
    order the hookup lists them.  Works for any joins/terminals of up to four
    strands (or more), not just the named hookups.

    Parameters
    ----------
    hookup : dict
        ``{"name", "joins": [["A.finish", "B.start"], ...], "terminals": ["A.start", ...]}``
    strand_ids : sequence of str
        Strand identifiers in row order, e.g. ``["A", "B"]``.
    labels : dict, optional
        Strand id -> how to tell it apart (``"red enamel"``), printed beside the coil.
    routes : sequence of (str, str), optional
        ``(end, how its lead is dressed)`` pairs, printed under the diagram
        (``data-route`` on each line).
    pins : dict, optional
        Strand end -> pin (``{"A.start": "1"}``): printed under each terminal
        box, and as a pin box under a joint made on a pin.
    terminals : sequence of str, optional
        The ends brought out, in T1, T2, … order: the design's connections.
        Without it they follow from the hookup (a drawing on its own).
    """
    ids = [str(s) for s in strand_ids]
    labels = labels or {}
    row_y = {s: _TOP + i * _ROW_H for i, s in enumerate(ids)}
    end_xy = {}
    for s in ids:
        end_xy[f"{s}.start"] = (_START_X, row_y[s])
        end_xy[f"{s}.finish"] = (_FINISH_X, row_y[s])

    nets = _nets(hookup)
    for net in nets:
        for end in net:
            if end not in end_xy:
                raise ValueError(f"joint names {end!r}, which is not an end of strands {ids}")
    terminals = list(terminals) if terminals is not None else winding_terminals(hookup, ids)
    for t in terminals:
        if t not in end_xy:
            raise ValueError(f"terminal names {t!r}, which is not an end of strands {ids}")

    # Nets touching only starts route on the left, all others on the right.
    left_nets = [n for n in nets if all(parse_end(e)[1] == "start" for e in n)]
    right_nets = [n for n in nets if n not in left_nets]
    lane_x = {}
    for k, n in enumerate(left_nets):
        lane_x[n] = _START_X - 22.0 - k * _LANE_GAP
    for k, n in enumerate(right_nets):
        lane_x[n] = _FINISH_X + 22.0 + k * _LANE_GAP
    left_edge = min([_START_X - 22.0] + [x for x in lane_x.values() if x < _START_X]) - _TERMINAL_PAD
    right_edge = max([_FINISH_X + 22.0] + [x for x in lane_x.values() if x > _FINISH_X]) + _TERMINAL_PAD
    shift = 40.0 - left_edge  # keep the left terminals inside the viewBox
    width = right_edge + shift + 40.0
    height = _TOP + (len(ids) - 1) * _ROW_H + _TERMINAL_DROP + 17.0 + 12.0 + (12.0 if pins else 0.0)
    routes = list(routes or [])
    notes_y = height + 4.0
    height += 13.0 * len(routes) + (6.0 if routes else 0.0)

    root = _svg_root(width, height, f"Wiring diagram, hookup {hookup.get('name', '')}")
    top = _el(root, "g", transform=f"translate({shift:.1f},0)")

    for s in ids:
        y = row_y[s]
        g = _el(top, "g", data_strand=s)
        _line(g, _START_X, y, _COIL_X0, y, stroke="#000", stroke_width="1.6")
        _el(g, "path", d=_coil_path(_COIL_X0, _COIL_X1, y), fill="none", stroke="#000",
            stroke_width="2")
        _line(g, _COIL_X1, y, _FINISH_X, y, stroke="#000", stroke_width="1.6")
        # Polarity dot beside the first bump marks where the strand starts.
        _el(g, "circle", cx=f"{_COIL_X0 + 4:.1f}", cy=f"{y - 17:.1f}", r="3.6", fill="#000",
            data_polarity=f"{s}.start")
        mid = (_COIL_X0 + _COIL_X1) / 2
        _text(g, mid, y + 19, s, text_anchor="middle", font_weight="bold", font_size="12")
        if labels.get(s):
            # Kept narrow and central, clear of the terminal boxes hung below the ends.
            _text(g, mid, y + 31, _clip(str(labels[s]), 34), text_anchor="middle", font_size="8.5")
        for which, x in (("start", _START_X), ("finish", _FINISH_X)):
            end = f"{s}.{which}"
            _el(g, "circle", cx=f"{x:.1f}", cy=f"{y:.1f}", r="4", fill="#fff", stroke="#000",
                stroke_width="1.4", data_end=end)
            anchor = "start" if which == "start" else "end"
            dx = 6 if which == "start" else -6
            _text(g, x + dx, y - 8, f"{s} {which}", text_anchor=anchor, font_size="9.5")

    pins = dict(pins or {})
    for n_i, net in enumerate(nets):
        g, bottom = _draw_net(top, net, lane_x[net], end_xy, row_y, ids, n_i)
        on_pin = sorted({pins[e] for e in net if e in pins and e not in terminals})
        if on_pin:
            # A joint made on a pin: the pin hangs below the joint's lane.
            x = lane_x[net]
            y = bottom + _TERMINAL_DROP
            _el(g, "rect", x=f"{x - 16:.1f}", y=f"{y:.1f}", width="32", height="15", fill="#fff",
                stroke="#000", stroke_width="1.4", data_pin=" ".join(on_pin))
            _text(g, x, y + 11, "pin " + "/".join(on_pin), text_anchor="middle", font_size="8.5",
                  stroke="none", fill="#000")
            _line(g, x, bottom, x, y)

    for t_i, end in enumerate(terminals):
        t = _draw_terminal(top, f"T{t_i + 1}", end, end_xy)
        if end in pins:
            x, y = end_xy[end]
            _text(t, x, y + _TERMINAL_DROP + 28, f"pin {pins[end]}", text_anchor="middle",
                  font_size="9", data_pin=pins[end])
    for k, (end, how) in enumerate(routes):
        _text(root, 12.0, notes_y + 13.0 * k, _clip(f"{end} lead: {how}", 90), font_size="9",
              data_route=str(end))
    return _to_string(root)


def _draw_net(parent, net, x_lane, end_xy, row_y, ids, n_i):
    """Lines from every end of one joint to its lane, and the lane itself; returns (group, lane's lowest y)."""
    g = _el(parent, "g", data_join=" ".join(net), stroke="#000", stroke_width="1.6",
            stroke_dasharray=None)
    on_left = x_lane < _START_X
    ys = []
    for end in net:
        x, y = end_xy[end]
        same_side = (x == _START_X) == on_left
        if same_side:
            _line(g, x, y, x_lane, y)
            ys.append(y)
        else:
            # Cross over in the gap above the row, clear of the coil symbol.
            y_ch = y - _ROW_H / 2 + 6.0 + 4.0 * (n_i % 4)
            _line(g, x, y, x, y_ch)
            _line(g, x, y_ch, x_lane, y_ch)
            ys.append(y_ch)
    _line(g, x_lane, min(ys), x_lane, max(ys))
    for y in ys:
        _el(g, "circle", cx=f"{x_lane:.1f}", cy=f"{y:.1f}", r="2.6", fill="#000", stroke="none")
    return g, max(ys)


def _draw_terminal(parent, label, end, end_xy):
    """A labelled terminal box hung straight below its wire end.

    Dropping it vertically keeps its lead clear of every joint's lane, so no
    line crosses a lane without a junction dot.
    """
    x, y = end_xy[end]
    g = _el(parent, "g", data_terminal=label, data_connects=end)
    top = y + _TERMINAL_DROP
    _line(g, x, y, x, top, stroke="#000", stroke_width="1.6")
    _el(g, "rect", x=f"{x - 14:.1f}", y=f"{top:.1f}", width="28", height="17",
        fill="#fff", stroke="#000", stroke_width="1.8", data_terminal_box=label)
    _text(g, x, top + 12.5, label, text_anchor="middle", font_weight="bold")
    return g


# --- cross-section ------------------------------------------------------------

def potential_grey(fraction: float) -> str:
    """Grey for a potential as a fraction of the highest: white at 0, dark grey at the top.

    Lightness falls in a straight line, so a greyscale print keeps the order.
    """
    f = min(max(float(fraction), 0.0), 1.0)
    level = int(round(255 - f * (255 - 64)))
    return f"#{level:02x}{level:02x}{level:02x}"


def cross_section_svg(cross_section: dict, kind: str = "cylinder", shade: bool = False,
                      placement: dict | None = None) -> str:
    """Sketch of the winding in section: layers, the strand in each slot, layer tape.

    ``cross_section["layers"]`` lists, per layer from the form outwards, the
    slots the engine chose to show (``{"slot": k, "strand": "A"}``); where the
    listed slot numbers jump, the slots in between are drawn as an ellipsis.
    ``placement`` (the prediction's ``fit.placement``) draws margin tape at
    both ends and says where the first turn lies.
    """
    layers = [layer.get("slots") or [] if isinstance(layer, dict) else layer
              for layer in cross_section.get("layers") or []]
    counts = [layer.get("turns") if isinstance(layer, dict) else None
              for layer in cross_section.get("layers") or []]
    full = max([c for c in counts if c] + [0])
    tape = bool(cross_section.get("tape_between_layers"))
    vmax = cross_section.get("potential_max_Vpk") if shade else None
    cell = 22.0 if vmax else 20.0
    gap_w = 26.0
    tape_h = 6.0 if tape else 0.0
    worst = {k for k, layer in enumerate(layers) if any(it.get("worst") for it in layer)} if vmax else set()
    shown = shown_layers(len(layers), worst)
    band_h = 30.0
    bands = sum(1 for a, b in zip(shown, shown[1:]) if b > a + 1)
    runs = {k: _with_gaps(layers[k]) for k in shown}
    width_cells = max([_run_width(r, cell, gap_w) for r in runs.values()] + [cell * 4])
    # Room on the left for margin tape clear of the layer labels and arrows.
    margin_l, margin_r = (76.0 if (placement or {}).get("margin_m") else 64.0), 136.0
    # The shading's key (five boxes) and the layer labels need their room whatever the winding's width.
    width = max(margin_l + width_cells + margin_r, margin_l + 5 * 52 + 12 if vmax else 0.0)
    build = len(shown) * (cell + tape_h) + bands * band_h
    base_y = 30.0 + build + 14.0
    height = base_y + (82.0 if vmax else 34.0)
    label = "Winding cross-section" + (" (toroid, inside wall)" if kind == "toroid" else "")
    root = _svg_root(width, height, label)

    surface = "core wall" if kind == "toroid" else "form surface"
    _el(root, "rect", x=f"{margin_l - 6:.1f}", y=f"{base_y:.1f}", width=f"{width_cells + 12:.1f}",
        height="10", fill="#e0e0e0", stroke="#000", stroke_width="1",
        data_surface=surface)
    _text(root, margin_l, base_y + 24, surface, font_size="9.5")

    y_top = base_y
    prev = None
    for lay in shown:
        if prev is not None and lay > prev + 1:
            # The layers not drawn: a band that says how many, so the count stays true.
            y_band = y_top - band_h / 2
            g = _el(root, "g", data_elided_layers=f"{prev + 2}-{lay}")
            for dy in (-9.0, 8.0):
                _line(g, margin_l - 6, y_band + dy, margin_l + width_cells + 6, y_band + dy, stroke="#000",
                      stroke_width="0.8", stroke_dasharray="6 3")
            _text(g, margin_l + width_cells / 2, y_band + 3.5,
                  f"layers {prev + 2}–{lay}: {lay - prev - 1} more layers, wound as those drawn",
                  text_anchor="middle", font_size="9", font_style="italic")
            y_top -= band_h
        elif prev is not None and tape:
            ty = y_top - tape_h / 2
            _el(root, "rect", x=f"{margin_l - 4:.1f}", y=f"{ty - (tape_h - 2) / 2:.1f}",
                width=f"{width_cells + 8:.1f}", height=f"{tape_h - 2:.1f}", fill="#ffffff",
                stroke="#000", stroke_width="1", stroke_dasharray="4 2",
                data_tape=f"{prev + 1}/{lay + 1}")
            y_top -= tape_h
        y = y_top - cell / 2 - 2.0
        y_top -= cell
        prev = lay
        run = runs[lay]
        g = _el(root, "g", data_layer=str(lay + 1))
        _text(g, 6, y + 4, f"L{lay + 1}", font_weight="bold")
        direction = "→" if lay % 2 == 0 else "←"
        _text(g, 34, y + 4, direction)
        x = margin_l
        for item in run:
            if item is None:
                _text(g, x + gap_w / 2, y + 4, "…", text_anchor="middle", data_elided="1")
                x += gap_w
                continue
            s = str(item["strand"])
            if vmax:
                # Shaded by potential; the strand letter sits in a white disc so it reads on any grey.
                frac = float(item.get("potential_Vpk") or 0.0) / vmax
                worst_turn = bool(item.get("worst"))
                _el(g, "circle", cx=f"{x + cell / 2:.1f}", cy=f"{y:.1f}", r=f"{cell / 2 - 1:.1f}",
                    fill=potential_grey(frac), stroke="#000", stroke_width="3.2" if worst_turn else "1.0",
                    data_slot=str(item["slot"]), data_strand=s,
                    data_potential=f"{float(item.get('potential_Vpk') or 0.0):.4g}",
                    data_worst="1" if worst_turn else None)
                _el(g, "circle", cx=f"{x + cell / 2:.1f}", cy=f"{y:.1f}", r="5.6", fill="#fff",
                    stroke="none")
                _strand_mark(root, g, x + cell / 2, y, s)
            else:
                _el(g, "circle", cx=f"{x + cell / 2:.1f}", cy=f"{y:.1f}", r=f"{cell / 2 - 1:.1f}",
                    fill=STRAND_FILLS.get(s, "#ffffff"), stroke="#000", stroke_width="1.2",
                    data_slot=str(item["slot"]), data_strand=s)
                _strand_mark(root, g, x + cell / 2, y, s, STRAND_TEXT.get(s, "#000000"))
            x += cell
        n = counts[lay] if lay < len(counts) else None
        if n:
            # A partial layer ends short, where its last turn lies, and says so.
            partial = n < full
            # Clear of the finish-end margin tape, where there is one.
            dx = 36 if (placement or {}).get("margin_m") and not partial else 6
            _text(g, x + dx, y + 4, f"{n} of {full} turns, partial" if partial else f"{n} turns",
                  font_size="9", font_weight="bold" if partial else None,
                  data_partial="1" if partial else None)
    layers_h = base_y - y_top
    _text(root, margin_l + width_cells, 14, "start end at left", text_anchor="end",
          font_size="9.5")
    _placement_marks(root, placement or {}, margin_l, width_cells, base_y, layers_h)
    if vmax:
        _potential_scale(root, margin_l, base_y + 34, vmax)
    return _to_string(root)


#: Above this many layers the section is a cut-away: the first layers and the last, the count between.
CUTAWAY_LAYERS = 8


def shown_layers(n: int, keep=()) -> list[int]:
    """Layers (0-based) a cross-section draws: all up to :data:`CUTAWAY_LAYERS`, else the first three,
    the last two and any in ``keep`` (the worst pair's), the rest stated as a count.

    Examples
    --------
    >>> shown_layers(5)
    [0, 1, 2, 3, 4]
    >>> shown_layers(29, keep={14})
    [0, 1, 2, 14, 27, 28]
    """
    if n <= CUTAWAY_LAYERS:
        return list(range(n))
    return sorted({0, 1, 2, n - 2, n - 1} | {k for k in keep if 0 <= k < n})


def _placement_marks(root, place, x0, width, base_y, build):
    """Margin tape as hatched blocks at both ends; the first turn's position in words."""
    margin = place.get("margin_m") or 0.0
    if margin:
        for x in (x0 - 30.0, x0 + width + 6.0):
            _el(root, "rect", x=f"{x:.1f}", y=f"{base_y - build:.1f}", width="24", height=f"{build:.1f}",
                fill="url(#margin-hatch)", stroke="#000", stroke_width="1", data_margin=f"{margin:.6g}")
        pat = _el(_el(root, "defs"), "pattern", id="margin-hatch", width="5", height="5",
                  patternUnits="userSpaceOnUse", patternTransform="rotate(45)")
        _line(pat, 0, 0, 0, 5, stroke="#000", stroke_width="1.2")
    lines = ([f"first turn {length(place['first_turn_m'])} from the start end"]
             if place.get("first_turn_m") is not None else []) + ([f"margin tape {length(margin)} each end"]
                                                                   if margin else [])
    height = float(root.get("height"))
    for k, words in enumerate(lines):
        _text(root, 6, height + 11 + 12 * k, words, font_size="9", data_placement=str(k + 1))
    if lines:
        height += 12 * len(lines) + 4
        root.set("height", f"{height:.1f}")
        root.set("viewBox", f"0 0 {root.get('viewBox').split()[2]} {height:.1f}")


def _potential_scale(root, x0, y0, vmax, steps=5):
    """The key to the shading: five greys from 0 V to the highest potential, each labelled, the words below."""
    from windsheet.common.fmt import eng

    g = _el(root, "g", data_scale="potential")
    for k in range(steps):
        f = k / (steps - 1)
        _el(g, "rect", x=f"{x0 + k * 52:.1f}", y=f"{y0:.1f}", width="48", height="10",
            fill=potential_grey(f), stroke="#000", stroke_width="0.8")
        _text(g, x0 + k * 52 + 24, y0 + 21, eng(f * vmax, "V", sig=3, trim=True, sep=" "), text_anchor="middle",
              font_size="9")
    _text(g, x0, y0 + 33, "peak, against the 0 V end; thick ring = worst pair", font_size="9")


def _with_gaps(layer_slots):
    """Slots in drawing order with ``None`` where listed slot numbers skip."""
    out = []
    items = sorted(layer_slots, key=lambda it: (int(it["slot"]), str(it["strand"])))
    prev = None
    for it in items:
        slot = int(it["slot"])
        if prev is not None and slot > prev + 1:
            out.append(None)
        out.append(it)
        prev = slot
    return out


def _run_width(run, cell, gap_w):
    return sum(gap_w if it is None else cell for it in run)
