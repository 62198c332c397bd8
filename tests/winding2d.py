"""A 2-D field solution of a winding's cross-section, written for the tests only.

Every turn is a copper disc inside its enamel ring, laid where the layout puts
it (axial position across, radius up), held at its turn's potential; any layer
tape is a sheet of its own permittivity between the layers; everything else is
air, and the outer boundary is a symmetry plane (no field leaves, so the
winding floats: no ground, only the field between its own conductors).  The
former, the flanges and the leads are left out.  The stored energy per unit
length ``W'`` gives the winding's capacitance per unit length of turn,
``C' = 2 W' / V²`` for 1 V across the terminals.

It uses the finite-difference solver of tests/laplace2d.py and nothing of the
capacitance models it checks; only the turns' places and potentials are
taken from windsheet (they are its input, not what is checked).
"""

from __future__ import annotations

import math

import numpy as np
from scipy.spatial import cKDTree

from laplace2d import Grid

COPPER_EPS = 1e6     # painted in copper so each edge's average finds the surface within its cell


class _WindingGrid(Grid):
    """A Grid painted from a nearest-centre search: thousands of discs at the cost of one."""

    def __init__(self, x0, x1, y0, y1, h, centres, r_cu, r_ov, eps_r, tapes, tape_eps, supersample):
        super().__init__(x0, x1, y0, y1, h, supersample)
        self._tree = cKDTree(centres)
        self._r_cu, self._r_ov, self._eps = r_cu, r_ov, eps_r
        self._tapes, self._tape_eps = tapes, tape_eps

    def _eps_at(self, X, Y):
        e = np.ones_like(X)
        for lo, hi, x_lo, x_hi in self._tapes:
            e = np.where((Y > lo) & (Y < hi) & (X > x_lo) & (X < x_hi), self._tape_eps, e)
        dist, _ = self._tree.query(np.column_stack([X.ravel(), Y.ravel()]), distance_upper_bound=self._r_ov)
        dist = dist.reshape(X.shape)
        e = np.where(dist < self._r_ov, self._eps, e)
        return np.where(dist < self._r_cu, COPPER_EPS, e)


def winding_capacitance_per_length(z, r, potential, copper_diameter, overall_diameter, eps_r=3.5,
                                   tapes=(), tape_eps_r=3.2, h=None, margin=None, supersample=6):
    """Field solution of a winding's cross-section: ``2 W' / V²`` for 1 V across the terminals. [F/m]

    z, r : the turns' centres [m]; potential : each turn's potential [V per V across the terminals];
    tapes : ``(r_low, r_high, z_low, z_high)`` sheets [m]; h : grid step (default a fifth of the film);
    margin : air round the winding to the boundary (default 1.5 overall diameters).
    """
    z, r = np.asarray(z, float), np.asarray(r, float)
    v = np.real(np.asarray(potential))
    R, rc = overall_diameter / 2, copper_diameter / 2
    h = (R - rc) / 5 if h is None else h
    # A whole number of steps to the overall diameter, and the first turn's centre on a node: turns
    # a whole number of diameters apart (a row, stacked layers) then sit alike on the grid, and the
    # solution converges steadily as the step falls instead of wandering with where the grid cuts
    # the contacts.
    h = overall_diameter / max(1, round(overall_diameter / h))
    margin = 1.5 * overall_diameter if margin is None else margin
    n = math.ceil((R + margin) / h)
    z0, r0 = z[np.argmin(z)], r[np.argmin(r)]
    g = _WindingGrid(z0 - n * h, z0 + (math.ceil((z.max() - z0 + R + margin) / h)) * h,
                     r0 - n * h, r0 + (math.ceil((r.max() - r0 + R + margin) / h)) * h, h,
                     np.column_stack([z, r]), rc, R, eps_r, tapes, tape_eps_r, supersample)
    X, Y = np.meshgrid(g.x, g.y, indexing="ij")
    dist, which = g._tree.query(np.column_stack([X.ravel(), Y.ravel()]))
    inside = (dist < rc).reshape(X.shape)
    g.fixed[inside] = v[which.reshape(X.shape)[inside]]
    g.solve()
    return 2.0 * g.energy()


def layout_tapes(layout):
    """The layer tape sheets of a stacked, taped layout: one under every layer but the first,
    across the traverse the winding uses and one overall diameter beyond each end. [m]"""
    if layout.tape <= 0 or layout.layers < 2:
        return ()
    R = layout.overall_diameter / 2
    z_lo, z_hi = layout.z.min() - 3 * R, layout.z.max() + 3 * R
    out = []
    for lay in range(1, layout.layers):
        top_below = layout.r[layout.layer == lay - 1].max() + R
        out.append((top_below, top_below + layout.tape, z_lo, z_hi))
    return tuple(out)


def layout_capacitance_per_length(layout, potential, eps_r=3.5, tape_eps_r=3.2, **kw):
    """:func:`winding_capacitance_per_length` of a windsheet layout's cross-section. [F/m]"""
    return winding_capacitance_per_length(layout.z, layout.r, potential, layout.copper_diameter,
                                          layout.overall_diameter, eps_r, layout_tapes(layout),
                                          tape_eps_r, **kw)
