"""Neighbours from geometry: every pair of conductors close enough to stress each other.

Pure geometry on a :class:`windsheet.layout.Layout`.  A pair is a neighbour
when the insulation surfaces are closer than a stated gap
(:data:`NEIGHBOUR_GAP_FRACTION` of the overall diameter, beyond any layer
tape), diagonals included; each turn's next along its layer is one however
far; on a toroid the start and finish turns face each other across the gap.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .layout import TOROID_GAP_DEG, Layout

#: Conductors whose insulation surfaces are closer than this fraction of the
#: overall diameter (beyond any layer tape between them) are neighbours.  Half
#: a diameter takes in the diagonal of stacked layers (gap (√2 − 1)·d) and
#: every touching pair, and leaves out the next turn but one (gap d).
NEIGHBOUR_GAP_FRACTION = 0.5


@dataclass(frozen=True)
class Neighbours:
    """Pairs of conductors close enough to stress each other, one entry per pair.

    Attributes
    ----------
    i, j : ndarray of int
        Turn indices (into the layout arrays) of each pair.
    kind : ndarray of str
        ``"side"`` (same layer), ``"layer"`` (adjacent layers, directly over
        or diagonal) or ``"lead"`` (a toroid's start and finish across the gap).
    gap : ndarray
        Distance between the two insulation surfaces, tape included. [m]
    across_tape : ndarray of bool
        A layer tape lies between the two.
    """

    i: np.ndarray
    j: np.ndarray
    kind: np.ndarray
    gap: np.ndarray
    across_tape: np.ndarray

    @property
    def size(self) -> int:
        return int(self.i.size)


def neighbour_gap_limit(layout: Layout) -> float:
    """Largest surface-to-surface distance of a neighbour pair. [m]

    ``NEIGHBOUR_GAP_FRACTION × overall diameter``, plus the layer tape (which
    always separates layers that face each other across it).
    """
    tape = layout.tape if layout.layers > 1 else 0.0
    return NEIGHBOUR_GAP_FRACTION * layout.overall_diameter + tape


def _gap_spacing(layout: Layout, i, j):
    """Centre distance of a toroid's start and finish turns across the start-finish gap.

    Measured between the two turns where they cross the inside of the hole,
    at their real angles (:meth:`Layout.section_points`); a layout without
    angles takes a full layer's span of (360 − gap)/360 of the circumference,
    the closest case.
    """
    if layout.theta is not None:
        pts = layout.section_points()
        return np.maximum(np.hypot(*(pts[j] - pts[i]).T), layout.overall_diameter)
    span = np.abs(layout.z[j] - layout.z[i]) + layout.overall_diameter
    circumference = span * 360.0 / (360.0 - TOROID_GAP_DEG)
    return np.maximum(circumference - np.abs(layout.z[j] - layout.z[i]), layout.overall_diameter)


def neighbour_pairs(layout: Layout) -> Neighbours:
    """Every pair of conductors whose insulation surfaces are closer than
    :func:`neighbour_gap_limit`, diagonals included, plus each turn's next
    along its layer however far (spaced turns still stress each other).

    Found by a k-d tree over the turn centres in the (r, z) section, so the
    cost grows as N log N; computed once per layout and kept with it.

    Parameters
    ----------
    layout : Layout
        The winding.

    Returns
    -------
    Neighbours

    References
    ----------
    .. [1] J. L. Bentley, "Multidimensional binary search trees used for
       associative searching", Comm. ACM 18(9):509, 1975 (k-d tree;
       :class:`scipy.spatial.cKDTree`).

    Examples
    --------
    >>> from windsheet.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 2e-3, 0.45e-3, 0.5e-3, 1, 8)   # 2 nested layers of 4
    >>> nb = neighbour_pairs(lay)
    >>> int((nb.kind == "side").sum()), int((nb.kind == "layer").sum())
    (6, 7)
    """
    if "neighbours" in layout._memo:
        return layout._memo["neighbours"]
    from scipy.spatial import cKDTree

    d = layout.overall_diameter
    reach = (d + neighbour_gap_limit(layout)) * (1 + 1e-9)
    pts = layout.section_points()
    tree = cKDTree(pts)
    close = tree.query_pairs(reach, output_type="ndarray").reshape(-1, 2)
    # Next along each layer, however far; those within reach are found already.
    order = np.lexsort((layout.z, layout.layer))
    same = layout.layer[order[:-1]] == layout.layer[order[1:]]
    a, b = order[:-1][same], order[1:][same]
    far = np.hypot(*(pts[a] - pts[b]).T) > reach
    pairs = np.vstack([close, np.column_stack([a[far], b[far]])])
    pairs = pairs[np.lexsort((pairs.max(axis=1), pairs.min(axis=1)))]
    # Report each pair lower layer first, then along the traverse.
    a, b = pairs[:, 0], pairs[:, 1]
    swap = (layout.layer[a] > layout.layer[b]) | ((layout.layer[a] == layout.layer[b])
                                                  & (layout.z[a] > layout.z[b]))
    i, j = np.where(swap, b, a), np.where(swap, a, b)
    kind = np.where(layout.layer[i] == layout.layer[j], "side", "layer").astype(object)
    gap = np.maximum(np.hypot(*(pts[i] - pts[j]).T) - d, 0.0)
    across = (layout.layer[i] != layout.layer[j]) & (layout.tape > 0)
    if layout.kind == "toroid":
        first = np.flatnonzero(layout.index == 0)
        last = np.flatnonzero(layout.index == layout.turns_per_strand - 1)
        fi, la = np.repeat(first, last.size), np.tile(last, first.size)
        i, j = np.concatenate([i, fi]), np.concatenate([j, la])
        kind = np.concatenate([kind, np.full(fi.size, "lead", dtype=object)])
        gap = np.concatenate([gap, np.maximum(_gap_spacing(layout, fi, la) - d, 0.0)])
        across = np.concatenate([across, np.zeros(fi.size, dtype=bool)])
    out = Neighbours(i=i.astype(int), j=j.astype(int), kind=kind, gap=gap, across_tape=across)
    layout._memo["neighbours"] = out
    return out


def neighbours(layout: Layout):
    """Pairs of neighbouring conductors as ``(i, j, kind)`` (see :func:`neighbour_pairs`).

    Returns
    -------
    i, j : ndarray of int
        Turn indices (into the layout arrays) of each pair.
    kind : ndarray of str
        ``"side"``, ``"layer"`` or ``"lead"`` (a toroid's start and finish,
        which meet across the gap).
    """
    nb = neighbour_pairs(layout)
    return nb.i, nb.j, nb.kind
