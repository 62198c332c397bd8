"""Page faults of a rendered sheet, found from its layout.

WeasyPrint lays the HTML out into pages: the boxes the PDF is drawn from, so what is
measured here is what prints (no PDF is written or read back).  The checks:

* every SVG drawing's text lies inside the drawing's box, and no label is drawn over
  another or crossed by a line: text extents are measured with the font's own advance
  widths (DejaVu Sans, the font the drawings name), read with fontTools;
* no table is wider than the text block;
* no page is less than a fifth full, except the last (the lowest text or drawing on it);
* no figure caption sits on another page than its figure.
"""

from __future__ import annotations

import base64
import re
import subprocess
import xml.etree.ElementTree as ET
from functools import lru_cache


SVG = "{http://www.w3.org/2000/svg}"

# The font's vertical extent per em: DejaVu Sans ascends 0.928 and descends 0.236 of an em
# (its hhea table); labels are checked with a slightly tighter box, cap height to descender.
ASCENT, DESCENT = 0.76, 0.24


@lru_cache(maxsize=None)
def _font(bold: bool):
    from fontTools.ttLib import TTFont

    pattern = "DejaVu Sans:style=Bold" if bold else "DejaVu Sans:style=Book"
    path = subprocess.run(["fc-match", "-f", "%{file}", pattern], capture_output=True, text=True,
                          check=True).stdout.strip()
    font = TTFont(path, lazy=True)
    cmap = font.getBestCmap()
    hmtx = font["hmtx"]
    upem = font["head"].unitsPerEm
    return cmap, hmtx, upem


def text_width(text: str, size: float, bold: bool = False) -> float:
    """Advance width of ``text`` at ``size`` in DejaVu Sans (user units)."""
    cmap, hmtx, upem = _font(bold)
    total = 0
    for ch in text:
        glyph = cmap.get(ord(ch)) or cmap.get(ord("M"))
        total += hmtx[glyph][0]
    return total * size / upem


def _translate(el_chain) -> tuple[float, float]:
    dx = dy = 0.0
    for el in el_chain:
        t = el.get("transform") or ""
        for m in re.finditer(r"translate\(\s*([-\d.]+)[ ,]+([-\d.]+)\s*\)", t):
            dx += float(m.group(1))
            dy += float(m.group(2))
    return dx, dy


def _inherited(chain, name, default=None):
    for el in reversed(chain):
        v = el.get(name)
        if v is not None:
            return v
    return default


def text_boxes(svg: str) -> tuple[tuple[float, float], list[tuple[str, tuple[float, float, float, float]]]]:
    """The drawing's size and every text's box ``(x0, y0, x1, y1)`` in the drawing's units."""
    root = ET.fromstring(svg)
    vb = [float(v) for v in (root.get("viewBox") or f"0 0 {root.get('width')} {root.get('height')}").split()]
    boxes = []

    def walk(el, chain):
        chain = chain + [el]
        if el.tag == f"{SVG}text" and (el.text or "").strip():
            size = float(_inherited(chain, "font-size", "16"))
            bold = _inherited(chain, "font-weight") == "bold"
            anchor = _inherited(chain, "text-anchor", "start")
            dx, dy = _translate(chain)
            x, y = float(el.get("x", 0)) + dx, float(el.get("y", 0)) + dy
            w = text_width(el.text, size, bold)
            x0 = x - (w if anchor == "end" else w / 2 if anchor == "middle" else 0.0)
            boxes.append((el.text, (x0, y - ASCENT * size, x0 + w, y + DESCENT * size)))
        for child in el:
            walk(child, chain)

    walk(root, [])
    return (vb[2], vb[3]), boxes


def _lines(svg: str):
    root = ET.fromstring(svg)
    out = []

    def walk(el, chain):
        chain = chain + [el]
        if el.tag == f"{SVG}line":
            dx, dy = _translate(chain)
            out.append((float(el.get("x1")) + dx, float(el.get("y1")) + dy,
                        float(el.get("x2")) + dx, float(el.get("y2")) + dy))
        for child in el:
            walk(child, chain)

    walk(root, [])
    return out


def _segment_hits_box(seg, box) -> bool:
    """Does the segment pass through the inside of the box (Liang–Barsky clipping)?"""
    x1, y1, x2, y2 = seg
    bx0, by0, bx1, by1 = box
    dx, dy = x2 - x1, y2 - y1
    t0, t1 = 0.0, 1.0
    for p, q in ((-dx, x1 - bx0), (dx, bx1 - x1), (-dy, y1 - by0), (dy, by1 - y1)):
        if p == 0:
            if q < 0:
                return False
            continue
        r = q / p
        if p < 0:
            t0 = max(t0, r)
        else:
            t1 = min(t1, r)
        if t0 > t1:
            return False
    return True


def svg_faults(svg: str, name: str = "drawing") -> list[str]:
    """Text outside the drawing, labels overlapping each other, lines drawn across a label."""
    (w, h), boxes = text_boxes(svg)
    faults = []
    tol = 0.5
    for text, (x0, y0, x1, y1) in boxes:
        if x0 < -tol or y0 < -tol or x1 > w + tol or y1 > h + tol:
            faults.append(f"{name}: {text!r} runs outside the drawing ({x0:.0f}..{x1:.0f} of {w:.0f}, "
                          f"{y0:.0f}..{y1:.0f} of {h:.0f})")
    shrink = 0.6  # touching boxes of neighbouring labels are not an overlap
    inner = [(t, (a + shrink, b + shrink, c - shrink, d - shrink)) for t, (a, b, c, d) in boxes]
    for i, (ta, a) in enumerate(inner):
        for tb, b in inner[i + 1:]:
            if a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]:
                faults.append(f"{name}: labels {ta!r} and {tb!r} are drawn over each other")
    for seg in _lines(svg):
        for t, box in inner:
            if _segment_hits_box(seg, box):
                faults.append(f"{name}: a line is drawn across {t!r}")
                break
    return faults


def embedded_svgs(html: str) -> list[tuple[str, str]]:
    """Every drawing in a sheet: inline ``<svg>`` and ``data:`` images, with its label."""
    out = []
    for m in re.finditer(r"<svg\b.*?</svg>", html, re.S):
        label = re.search(r'aria-label="([^"]*)"', m.group(0))
        out.append((label.group(1) if label else "svg", m.group(0)))
    for m in re.finditer(r'<img[^>]*alt="([^"]*)"[^>]*src="data:image/svg\+xml;base64,([^"]+)"', html):
        out.append((m.group(1), base64.b64decode(m.group(2)).decode("utf-8")))
    return out


def layout(html: str):
    """Lay the sheet out once, as ``render_pdf`` does: WeasyPrint's document of pages."""
    from windsheet.sheets.sheet_pdf import lay_out

    return lay_out(html)


def _boxes(page):
    return [b for b in page._page_box.descendants() if getattr(b, "element", None) is not None]


def layout_faults(doc) -> list[str]:
    """Tables wider than the text block; text out of its table cell; captions on another page than their figure."""
    faults = []
    figure_pages, caption_pages, seen = {}, {}, set()
    for k, page in enumerate(doc.pages, start=1):
        pb = page._page_box
        left = pb.content_box_x()
        right = left + pb.width
        for b in _boxes(page):
            tag = b.element_tag
            if tag == "table" and (k, b.element) not in seen:
                x0, x1 = b.position_x, b.position_x + b.margin_width()
                if x1 > right + 0.5 or x0 < left - 0.5:
                    seen.add((k, b.element))
                    faults.append(f"page {k}: a table ({_first_text(b.element)!r}) runs "
                                  f"{max(x1 - right, left - x0):.0f} px outside the text block")
            if tag in ("td", "th") and hasattr(b, "descendants"):
                # Text that runs out of its table cell (a header kept on one line, say) overdraws the next.
                x1 = b.content_box_x() + b.width
                for t in b.descendants():
                    if type(t).__name__ == "TextBox" and t.position_x + t.width > x1 + 1.0:
                        faults.append(f"page {k}: {t.text!r} runs {t.position_x + t.width - x1:.0f} px out of "
                                      "its table cell")
                        break
            if tag in ("img", "svg"):
                fig = _ancestor(b.element, doc, "figure")
                if fig is not None:
                    figure_pages.setdefault(fig, set()).add(k)
            if tag == "figcaption":
                caption_pages.setdefault(b.element, set()).add(k)
    parent = _parents(doc)
    for cap, pages in caption_pages.items():
        fig = parent.get(cap)
        if fig is not None and figure_pages.get(fig) and not pages <= figure_pages[fig]:
            faults.append(f"the caption {_first_text(cap)[:50]!r} is on page {sorted(pages)} but its figure on "
                          f"page {sorted(figure_pages[fig])}")
    return faults


@lru_cache(maxsize=None)
def _parent_map(root):
    return {child: parent for parent in root.iter() for child in parent}


def _parents(doc):
    box = doc.pages[0]._page_box
    for b in box.descendants():
        el = getattr(b, "element", None)
        if el is not None:
            root = el
            break
    # Climb to the document's root element through the boxes' own tree.
    roots = [b.element for b in box.descendants() if getattr(b, "element_tag", None) == "html"]
    return _parent_map(roots[0] if roots else root)


def _ancestor(el, doc, tag):
    parent = _parents(doc)
    while el is not None:
        el = parent.get(el)
        if el is not None and el.tag == tag:
            return el
    return None


def _first_text(el) -> str:
    return re.sub(r"\s+", " ", "".join(el.itertext())).strip()[:60]


def page_fill(doc) -> list[float]:
    """How full each page is: the foot of its lowest text line or drawing over the text block's height.

    Read from the laid-out boxes, not the PDF's text: a drawing's own labels sit inside its
    box, where text read back from the PDF comes out at the wrong height (the SVG's transform).
    """
    out = []
    for page in doc.pages:
        pb = page._page_box
        top = pb.content_box_y()
        bottom = top + pb.height
        low = None
        for b in pb.descendants():
            kind = type(b).__name__
            if (kind == "TextBox" and b.text.strip()) or "Replaced" in kind:
                # Only the body: the running header and footer lie in the page's margins.
                if top <= b.position_y < bottom:
                    foot = b.position_y + b.margin_height()
                    low = foot if low is None else max(low, foot)
        out.append(0.0 if low is None else (min(low, bottom) - top) / (bottom - top))
    return out


def doc_faults(html: str, doc, min_fill: float = 0.2) -> list[str]:
    """Every page fault of one sheet, from its HTML and its laid-out document."""
    faults = []
    for name, svg in embedded_svgs(html):
        faults += svg_faults(svg, name)
    faults += layout_faults(doc)
    fill = page_fill(doc)
    for k, f in enumerate(fill[:-1], start=1):
        if f < min_fill:
            faults.append(f"page {k} of {len(fill)} is {f:.0%} full")
    return faults


def sheet_faults(html: str, min_fill: float = 0.2) -> tuple[list[str], object]:
    """Every page fault of one sheet, and the laid-out document it was found in."""
    doc = layout(html)
    return doc_faults(html, doc, min_fill), doc
