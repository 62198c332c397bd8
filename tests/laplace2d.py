"""A small 2-D finite-difference Laplace solver, written for the tests only.

Independent of windsheet: it knows nothing of the models it checks.  The
potential lives on the nodes of a uniform square grid, the permittivity on
the cells; each edge between two nodes carries the mean permittivity of the
two cells it borders (the finite-integration scheme, second order for
piecewise-constant media).  Nodes inside a conductor are held at its
potential; the outer boundary is a symmetry plane (zero normal field) unless
a side is held at a potential.  The capacitance per unit length follows from
the stored energy, ``C' = 2 W' / V²``, ``W' = ½ ε0 Σ_edges ε_e Δφ²``.
"""

from __future__ import annotations

import numpy as np
# scipy is imported where it is used: a test worker that never solves a field never pays for it.

EPS0 = 8.8541878128e-12  # CODATA 2018 (memory)


class Grid:
    """Nodes at ``x0 + i h``, ``y0 + j h``, ``i < nx``, ``j < ny``.

    Materials are painted as functions ``inside(x, y)``; each edge's
    permittivity is averaged over its own dual cell (the ``h × h`` square
    centred on the edge), harmonically along the edge and arithmetically
    across it, which is exact for layers lying either way.
    """

    def __init__(self, x0, x1, y0, y1, h, supersample=6):
        self.h = h
        self.nx = int(round((x1 - x0) / h)) + 1
        self.ny = int(round((y1 - y0) / h)) + 1
        self.x = x0 + h * np.arange(self.nx)
        self.y = y0 + h * np.arange(self.ny)
        self._paint = []
        self.fixed = np.full((self.nx, self.ny), np.nan)      # nodes held at a potential
        self._ss = supersample

    def paint(self, inside, eps_r):
        """Where ``inside(x, y)``, the medium has relative permittivity ``eps_r`` (later paint wins)."""
        self._paint.append((inside, eps_r))

    def _eps_at(self, X, Y):
        e = np.ones_like(X)
        for inside, eps_r in self._paint:
            e = np.where(inside(X, Y), eps_r, e)
        return e

    def _edge_eps(self, along_x):
        k = (np.arange(self._ss) + 0.5) / self._ss - 0.5     # offsets in units of h
        if along_x:
            xs = self.x[:-1, None] + self.h * (k[None, :] + 0.5)   # along the edge
            ys = self.y[:, None] + self.h * k[None, :]             # across it
            X = xs[:, None, :, None] + 0 * ys[None, :, None, :]
            Y = ys[None, :, None, :] + 0 * xs[:, None, :, None]
            e = self._eps_at(X, Y)                                 # (nx-1, ny, along, across)
            w = 1.0 / np.mean(1.0 / e, axis=2)
        else:
            xs = self.x[:, None] + self.h * k[None, :]             # across
            ys = self.y[:-1, None] + self.h * (k[None, :] + 0.5)   # along
            X = xs[:, None, :, None] + 0 * ys[None, :, None, :]
            Y = ys[None, :, None, :] + 0 * xs[:, None, :, None]
            e = self._eps_at(X, Y)                                 # (nx, ny-1, across, along)
            w = 1.0 / np.mean(1.0 / e, axis=3)
        across = np.mean(w, axis=-1)
        # Edges on the outer boundary carry half a dual cell: a symmetry plane.
        if along_x:
            across[:, [0, -1]] *= 0.5
        else:
            across[[0, -1], :] *= 0.5
        return across

    def hold(self, inside, potential):
        """Nodes where ``inside(x, y)`` are held at ``potential``."""
        X, Y = np.meshgrid(self.x, self.y, indexing="ij")
        self.fixed[inside(X, Y)] = potential

    def solve(self):
        nx, ny = self.nx, self.ny
        ex = self._edge_eps(True)                                  # (nx-1, ny)
        ey = self._edge_eps(False)                                 # (nx, ny-1)
        idx = np.arange(nx * ny).reshape(nx, ny)
        rows, cols, vals = [], [], []
        diag = np.zeros(nx * ny)
        self._edges = ((idx[:-1, :].ravel(), idx[1:, :].ravel(), ex.ravel()),
                       (idx[:, :-1].ravel(), idx[:, 1:].ravel(), ey.ravel()))
        for a, b, w in self._edges:
            rows += [a, b]; cols += [b, a]; vals += [-w, -w]
            np.add.at(diag, a, w); np.add.at(diag, b, w)
        rows = np.concatenate(rows + [np.arange(nx * ny)])
        cols = np.concatenate(cols + [np.arange(nx * ny)])
        vals = np.concatenate(vals + [diag])
        from scipy.sparse import coo_matrix
        from scipy.sparse.linalg import spsolve

        A = coo_matrix((vals, (rows, cols)), shape=(nx * ny, nx * ny)).tocsr()
        fixed = self.fixed.ravel()
        known = ~np.isnan(fixed)
        free = ~known
        rhs = -A[free][:, known] @ fixed[known]
        phi = fixed.copy()
        phi[free] = spsolve(A[free][:, free].tocsc(), rhs)
        self.phi = phi.reshape(nx, ny)
        return self.phi

    def energy(self):
        """Stored energy per unit length, for the solved potential. [J/m]"""
        p = self.phi.ravel()
        w = 0.0
        for a, b, eps in self._edges:
            w += 0.5 * EPS0 * np.sum(eps * (p[a] - p[b]) ** 2)
        return w

    def at(self, x, y):
        """Potential interpolated (bilinear) at points."""
        from scipy.interpolate import RegularGridInterpolator

        f = RegularGridInterpolator((self.x, self.y), self.phi)
        return f(np.column_stack([np.ravel(x), np.ravel(y)])).reshape(np.shape(x))


def disc(cx, cy, radius):
    return lambda x, y: (x - cx) ** 2 + (y - cy) ** 2 < radius ** 2


def ring(cx, cy, inner, outer):
    return lambda x, y: ((x - cx) ** 2 + (y - cy) ** 2 < outer ** 2) & \
                        ((x - cx) ** 2 + (y - cy) ** 2 >= inner ** 2)
