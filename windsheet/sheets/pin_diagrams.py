"""The pin header as an SVG: its pins in a row at their pitch, pin 1 marked, each with the ends it takes.

Drawn from the design's ``form.pin_header`` and ``terminations``; nothing here knows any
physics.  Each pin carries ``data-pin``; each label ``data-pin-ends``.
"""

from __future__ import annotations

from windsheet.common.fmt import length
from .diagrams import _el, _svg_root, _text, _to_string


def pin_header_svg(header: dict, terminations: list[dict], terminal_of: dict | None = None) -> str:
    """The header seen from above, at its end of the form: pins 1 … n left to right.

    Parameters
    ----------
    header : dict
        ``{"end", "pitch_m", "pins"}``.
    terminations : list of dict
        ``{"pin", "ends"}`` per pin used.
    terminal_of : dict, optional
        Strand end -> terminal label (``"A.start": "T1"``), printed under its end.
    """
    terminal_of = terminal_of or {}
    n = int(header["pins"])
    used = {str(t["pin"]): list(t["ends"]) for t in terminations}
    step = 56.0
    x0 = 34.0
    width = max(x0 * 2 + step * (n - 1), 200.0)
    height = 112.0
    root = _svg_root(width, height, f"Pin header at the {header['end'].replace('-', ' ')}")
    _el(root, "rect", x=f"{x0 - 26:.1f}", y="22", width=f"{step * (n - 1) + 52:.1f}", height="34", fill="#e6e6e6",
        stroke="#000", stroke_width="1.2", data_mark="header")
    # Pin 1's corner is marked on the part; the drawing marks it the same way.
    _el(root, "polygon", points=f"{x0 - 26:.1f},22 {x0 - 14:.1f},22 {x0 - 26:.1f},34", fill="#000",
        data_mark="pin-1")
    for k in range(n):
        name = str(k + 1)
        x = x0 + k * step
        ends = used.get(name, [])
        _el(root, "circle", cx=f"{x:.1f}", cy="39", r="7", fill="#fff" if ends else "#bbb", stroke="#000",
            stroke_width="1.4", data_pin=name)
        _text(root, x, 16, name, text_anchor="middle", font_weight="bold", font_size="10")
        for j, end in enumerate(ends):
            label = end + (f" ({terminal_of[end]})" if end in terminal_of else "")
            _text(root, x, 72 + 11 * j, label, text_anchor="middle", font_size="8.5", data_pin_ends=name)
    _text(root, 6, height - 6, f"▲ pin 1 · grey: unused · pitch {length(header['pitch_m'])}", font_size="9")
    return _to_string(root)
