"""Neighbours from geometry: every pair of conductors close enough to stress each other.

Pure geometry on a :class:`windsheet.physics.layout.Layout`.  A pair is a neighbour
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

    Parameters
    ----------
    layout : Layout
        The winding (its overall wire diameter [m], layers and tape [m]).

    Returns
    -------
    gap : float
        Largest distance between two insulation surfaces that still makes a
        neighbour pair. [m]

    References
    ----------
    Plain geometry: half a diameter takes in the diagonal of stacked layers,
    whose surfaces are (√2 − 1)·d = 0.414·d apart, and leaves out the turn
    but one, d apart.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> one = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 5, layers=1)
    >>> round(neighbour_gap_limit(one) * 1e3, 3)          # 0.5 × 0.5 mm
    0.25
    >>> two = cylinder_layout(0.02, 2e-3, 0.45e-3, 0.5e-3, 1, 8, tape=50e-6)
    >>> round(neighbour_gap_limit(two) * 1e3, 3)          # 0.25 mm + 0.05 mm of tape
    0.3
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


def _compress(cells):
    """Renumber integer cell coordinates so that any gap of two or more becomes two.

    Adjacency (a difference of 0 or 1) is all the search needs, and the
    renumbered coordinates stay below twice the number of points, so a combined
    cell key cannot overflow however long the traverse is in cells.
    """
    values, inverse = np.unique(cells, return_inverse=True)
    steps = np.minimum(np.diff(values), 2)
    return np.concatenate([[0], np.cumsum(steps)])[inverse.reshape(-1)]


def _expand(start_a, count_a, start_b, count_b):
    """Every (a, b) index pair of the products of the runs ``[start_a, +count_a)`` × ``[start_b, +count_b)``."""
    m = count_a * count_b
    run = np.repeat(np.arange(m.size), m)
    local = np.arange(int(m.sum())) - np.repeat(np.cumsum(m) - m, m)
    return (start_a[run] + local // count_b[run], start_b[run] + local % count_b[run])


#: Cells compared with each cell besides itself: the forward half of its eight
#: neighbours, so each pair of cells is looked at once.
_FORWARD_CELLS = ((0, 1), (1, -1), (1, 0), (1, 1))


def close_pairs(x, y, reach):
    """Every pair of points in the plane no farther apart than ``reach``.

    A cell list: the plane is cut into square cells of side ``reach``, the
    points are sorted by cell, and each cell's points are compared with its own
    and with those of its forward neighbour cells, all in array operations.
    The cost grows as N times the points per cell.

    Parameters
    ----------
    x, y : ndarray
        Coordinates of the points. [m]
    reach : float
        Largest distance of a pair (inclusive). [m]

    Returns
    -------
    pairs : ndarray of int, shape (n, 2)
        Indices ``(i, j)``, ``i < j``, of each pair, in no particular order.

    References
    ----------
    .. [1] R. W. Hockney and J. W. Eastwood, Computer Simulation Using
       Particles, McGraw-Hill, 1981, §8-4 (chaining mesh).
    .. [2] M. P. Allen and D. J. Tildesley, Computer Simulation of Liquids,
       Oxford, 1987, §5.3.2 (cell structures and linked lists).

    Examples
    --------
    >>> close_pairs(np.array([0.0, 1.0, 2.5, 0.0]), np.array([0.0, 0.0, 0.0, 1.0]), 1.0).tolist()
    [[0, 1], [0, 3]]
    """
    x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    if x.size < 2:
        return np.empty((0, 2), dtype=int)
    # A cell a shade wider than the reach, so rounding never puts two points
    # within reach two cells apart.
    side = reach * (1 + 1e-6)
    cx = _compress(np.floor((x - x.min()) / side).astype(np.int64))
    cy = _compress(np.floor((y - y.min()) / side).astype(np.int64))
    width = int(cy.max()) + 3  # a spare row each side: cy ± 1 never aliases another column
    key = cx * width + cy
    order = np.argsort(key, kind="stable")
    cells, start, count = np.unique(key[order], return_index=True, return_counts=True)
    found = [_expand(start, count, start, count)]
    for dx, dy in _FORWARD_CELLS:
        at = np.searchsorted(cells, cells + dx * width + dy)
        at = np.minimum(at, cells.size - 1)
        hit = cells[at] == cells + dx * width + dy
        found.append(_expand(start[hit], count[hit], start[at[hit]], count[at[hit]]))
    a = np.concatenate([f[0] for f in found])
    b = np.concatenate([f[1] for f in found])
    a, b = order[a], order[b]
    keep = (a != b) & ((x[a] - x[b]) ** 2 + (y[a] - y[b]) ** 2 <= reach * reach)
    # Within one cell each pair came twice, once each way round.
    keep &= (a < b) | (key[a] != key[b])
    a, b = a[keep], b[keep]
    return np.column_stack([np.minimum(a, b), np.maximum(a, b)])


def neighbour_pairs(layout: Layout) -> Neighbours:
    """Every pair of conductors whose insulation surfaces are closer than
    :func:`neighbour_gap_limit`, diagonals included, plus each turn's next
    along its layer however far (spaced turns still stress each other).

    Found by a cell list over the turn centres in the (r, z) section
    (:func:`close_pairs`), so the cost grows as N; computed once per layout
    and kept with it.

    Parameters
    ----------
    layout : Layout
        The winding.

    Returns
    -------
    Neighbours

    References
    ----------
    .. [1] R. W. Hockney and J. W. Eastwood, Computer Simulation Using
       Particles, McGraw-Hill, 1981, §8-4 (chaining mesh).
    .. [2] M. P. Allen and D. J. Tildesley, Computer Simulation of Liquids,
       Oxford, 1987, §5.3.2 (cell structures and linked lists).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 2e-3, 0.45e-3, 0.5e-3, 1, 8)   # 2 nested layers of 4
    >>> nb = neighbour_pairs(lay)
    >>> int((nb.kind == "side").sum()), int((nb.kind == "layer").sum())
    (6, 7)
    """
    if "neighbours" in layout._memo:
        return layout._memo["neighbours"]
    d = layout.overall_diameter
    reach = (d + neighbour_gap_limit(layout)) * (1 + 1e-9)
    pts = layout.section_points()
    close = close_pairs(pts[:, 0], pts[:, 1], reach)
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

    Parameters
    ----------
    layout : Layout
        The winding.

    Returns
    -------
    i, j : ndarray of int
        Turn indices (into the layout arrays) of each pair. [-]
    kind : ndarray of str
        ``"side"``, ``"layer"`` or ``"lead"`` (a toroid's start and finish,
        which meet across the gap).

    References
    ----------
    As :func:`neighbour_pairs`.

    Examples
    --------
    Five close-wound turns in one layer: each touches the next (4 pairs); the
    turn but one is a whole diameter away, beyond the half-diameter limit.

    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 5, layers=1)
    >>> i, j, kind = neighbours(lay)
    >>> i.tolist(), j.tolist(), sorted(set(kind))
    ([0, 1, 2, 3], [1, 2, 3, 4], ['side'])
    """
    nb = neighbour_pairs(layout)
    return nb.i, nb.j, nb.kind
