"""Flux linked by each turn of a winding: the EMF side of the voltage map.

Pure functions on SI numbers.  Air core: every turn is a coaxial circle
(Maxwell's mutual inductance between turns, the round-wire loop's own
inductance for itself), on the same kernel lattice as
:func:`windsheet.physics.inductance.strand_matrix`; here the sum is kept turn by
turn instead of being gathered by strand.
Cored windings (an AL value): the core carries one flux that every turn of a
strand links alike, so the EMF per turn is uniform along the strand.
"""

from __future__ import annotations

import numpy as np

from .inductance import (_aranges, _class_chunks, _group_table, _kernel_classes, _lattice_sums,
                         loop_self_inductance)


#: Turn look-ups done at once when summing a chunk of group pairs (bounds working memory).
_LOOKUPS = 1 << 21


def turn_flux_linkage(layout, strand_current, kernels=None):
    """Flux linkage of every turn from the strand currents, air core: :func:`turn_linkage_matrix` times them.

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        A cylinder or bobbin layout (coaxial turns).
    strand_current : array_like, complex, shape (strands,)
        Current in each strand, start to finish. [A]
    kernels : dict, optional
        A kernel cache shared with the layout's strand matrix.

    Returns
    -------
    flux_linkage : ndarray, complex, shape (n_turns,)
        Flux linked by each turn, in the winding sense of its strand. [Wb]

    References
    ----------
    See :func:`turn_linkage_matrix`.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> from windsheet.physics.inductance import strand_matrix
    >>> lay = cylinder_layout(0.02, 5e-3, 0.45e-3, 0.5e-3, 1, 20)
    >>> lam = turn_flux_linkage(lay, [1.0])
    >>> bool(np.isclose(lam.sum().real, strand_matrix(lay)[0, 0], rtol=1e-12))
    True
    """
    current = np.asarray(strand_current, dtype=complex).reshape(layout.strands)
    return turn_linkage_matrix(layout, kernels) @ current


def strand_sums(layout, linkage):
    """The strand inductance matrix gathered from the per-turn linkage matrix.

    ``L[s, s'] = Σ_{k in strand s} Λ[k, s']``: the same double sum as
    :func:`windsheet.physics.inductance.strand_matrix`, read off the turn-by-turn
    sums when those are needed anyway (an a.c. duty's voltage map).

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
    linkage : ndarray, shape (n_turns, strands)
        :func:`turn_linkage_matrix` of the layout. [H]

    Returns
    -------
    L : ndarray, shape (strands, strands)
        [H]

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> from windsheet.physics.inductance import strand_matrix
    >>> lay = cylinder_layout(0.02, 12e-3, 0.45e-3, 0.5e-3, 2, 20, layers=2)
    >>> bool(np.allclose(strand_sums(lay, turn_linkage_matrix(lay)), strand_matrix(lay), rtol=1e-12))
    True
    """
    S = layout.strands
    out = np.zeros((S, S))
    np.add.at(out, layout.strand, linkage)
    return out


def turn_linkage_matrix(layout, kernels=None):
    """Flux linked by every turn per ampere in each strand, air core.

    ``Λ[k, s] = Σ_{j in strand s} M_kj``: turn ``k``'s row of the turn-to-turn
    inductance matrix summed over each strand's turns, with ``M_kk`` the
    loop's own inductance; times the strand currents it is each turn's flux
    linkage.  The sum runs on the engine's lattice
    (:func:`windsheet.physics.inductance.strand_matrix`): turns of one (layer,
    strand) group share a radius and sit one pitch apart, so Maxwell's kernel
    between two groups lies on a lattice ``|ρ + i p|`` fixed by their radius
    pair and offset; each class's kernel is evaluated once, in one vectorised
    call, and each turn's sum over another group is two look-ups in the
    lattice's running sum.  Cost O(kernels) plus O(turns × groups) look-ups,
    all in numpy; memory bounded by chunks; no N × N matrix.

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        A cylinder or bobbin layout (coaxial turns).
    kernels : dict, optional
        The kernel cache the strand matrix of this layout filled
        (:func:`windsheet.physics.inductance.strand_matrix`): its kernels are
        then not evaluated again.

    Returns
    -------
    linkage : ndarray, shape (n_turns, strands)
        Flux linked by each turn per ampere in each strand, in the winding
        sense of the turn's strand. [H]  Summed over a strand's turns it is
        that strand's row of ``strand_matrix(layout)``.

    References
    ----------
    .. [1] J. C. Maxwell, A Treatise on Electricity and Magnetism, vol. 2,
       art. 701 (1873): mutual inductance of coaxial circles.
    .. [2] F. W. Grover, Inductance Calculations (1946): self-inductance of
       a circular loop of round wire; summation over the turns of a coil.

    Examples
    --------
    A strand's end turns link less than its middle ones (a solenoid's field falls at its ends):

    >>> from windsheet.physics.layout import cylinder_layout
    >>> lam = turn_linkage_matrix(cylinder_layout(0.02, 5e-3, 0.45e-3, 0.5e-3, 1, 9))[:, 0]
    >>> bool(lam[0] < lam[4] and np.isclose(lam[0], lam[-1], rtol=1e-12))
    True
    """
    if layout.kind == "toroid":
        raise ValueError("turn-by-turn flux linkage needs coaxial turns; on a core use "
                         "cored_turn_flux_linkage")
    S, p = layout.strands, layout.pitch
    strand, radius, z0, lo, hi = _group_table(layout)
    n_groups = strand.size
    # The turns of each group, in one array ordered by group.
    key = {(int(lay), int(s)): k for k, (lay, s, *_rest) in enumerate(layout.groups())}
    gid = _group_ids(layout, key)
    order = np.argsort(gid, kind="stable")
    count = np.bincount(gid, minlength=n_groups)
    start = np.cumsum(count) - count
    slot_sorted = layout.slot[order].astype(np.int64)

    ia, ib = np.triu_indices(n_groups)
    cls, c, swap, r_lo, r_hi, u = _kernel_classes(radius, z0, ia, ib, p)
    x0, x1 = np.where(swap, lo[ib], lo[ia]), np.where(swap, hi[ib], hi[ia])
    y0, y1 = np.where(swap, lo[ia], lo[ib]), np.where(swap, hi[ia], hi[ib])
    n_cls = r_lo.size
    lat_lo = np.full(n_cls, np.iinfo(np.int64).max)
    lat_hi = np.full(n_cls, np.iinfo(np.int64).min)
    np.minimum.at(lat_lo, cls, x0 - (y1 - 1) + c)
    np.maximum.at(lat_hi, cls, (x1 - 1) - y0 + c)

    acc = np.zeros(layout.n_turns * S)
    by_cls = np.argsort(cls, kind="stable")
    first_pair = np.searchsorted(cls[by_cls], np.arange(n_cls + 1))
    for k0, k1 in _class_chunks(lat_hi - lat_lo + 1):
        C1, base = _lattice_sums(r_lo[k0:k1], r_hi[k0:k1], u[k0:k1], lat_lo[k0:k1], lat_hi[k0:k1], p,
                                 kernels, times=1)
        pairs = by_cls[first_pair[k0]:first_pair[k1]]
        # Each pair sums both ways: the turns of each group over the other's. The running-sum
        # indices of the partners of a turn at slot t are K ± t: the group in the lattice's x role
        # runs it forwards, the one in the y role backwards (see the engine's kernel classes).
        kk = cls[pairs] - k0
        off = base[kk] - lat_lo[k0:k1][kk] + c[pairs]
        a, b, sw = ia[pairs], ib[pairs], swap[pairs]
        back = a != b
        receiver = np.concatenate([a, b[back]])
        source = np.concatenate([b, a[back]])
        x_role = np.concatenate([~sw, sw[back]])
        off = np.concatenate([off, off[back]])
        lo_s, hi_s = lo[source], hi[source]
        k_up = np.where(x_role, off - lo_s + 1, off + hi_s)
        k_down = np.where(x_role, off - hi_s + 1, off + lo_s)
        sign = np.where(x_role, 1, -1)
        column = strand[source]
        sizes = count[receiver]
        bounds = np.searchsorted(np.cumsum(sizes), np.arange(_LOOKUPS, sizes.sum() + _LOOKUPS, _LOOKUPS),
                                 side="right")
        for q0, q1 in zip(np.concatenate([[0], bounds[:-1]]), bounds):
            if q1 <= q0:
                continue
            first = start[receiver[q0:q1]]
            pos, k = _aranges(first, first + count[receiver[q0:q1]])
            k += q0
            st = sign[k] * slot_sorted[pos]
            value = C1[k_up[k] + st] - C1[k_down[k] + st]
            acc += np.bincount(order[pos] * S + column[k], weights=value, minlength=acc.size)
    # Each turn's own inductance (the lattice leaves the point where a turn meets itself at zero).
    acc[np.arange(layout.n_turns) * S + layout.strand] += loop_self_inductance(layout.r, layout.copper_diameter / 2)
    if not np.all(np.isfinite(acc)):
        raise ValueError("two turns of the layout coincide")
    return acc.reshape(layout.n_turns, S)


def _group_ids(layout, key):
    """The group index of every turn, from its (layer, strand)."""
    lut = np.full((int(layout.layer.max()) + 1, layout.strands), -1, dtype=np.int64)
    for (lay, s), k in key.items():
        lut[lay, s] = k
    return lut[layout.layer, layout.strand]


def cored_turn_flux_linkage(layout, strand_matrix_H, strand_current):
    """Flux linkage of every turn of a winding on a magnetic core.

    The core's flux is shared by every turn, so a strand's flux linkage
    ``(L @ I)_s`` divides evenly among its ``N_s`` turns: the EMF per turn is
    uniform along each strand.

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        The winding.
    strand_matrix_H : array_like, shape (strands, strands)
        Strand inductance matrix of the cored winding (AL·N², any leakage
        terms included). [H]
    strand_current : array_like, complex, shape (strands,)
        Current in each strand. [A]

    Returns
    -------
    flux_linkage : ndarray, complex, shape (n_turns,)
        Flux linked by each turn. [Wb]

    References
    ----------
    .. [1] Faraday's law for a winding on a closed magnetic circuit: each
       turn links the core flux, common practice (e.g. C. W. T. McLyman,
       Transformer and Inductor Design Handbook).

    Examples
    --------
    >>> from windsheet.physics.layout import toroid_layout
    >>> lay = toroid_layout(0.02, 0.04, 0.01, 0.45e-3, 0.5e-3, 1, 10)
    >>> lam = cored_turn_flux_linkage(lay, [[4.2e-6 * 100]], [1.0])
    >>> bool(np.allclose(lam, 4.2e-5))
    True
    """
    L = np.asarray(strand_matrix_H, dtype=float).reshape(layout.strands, layout.strands)
    current = np.asarray(strand_current, dtype=complex).reshape(layout.strands)
    per_strand = (L @ current) / np.bincount(layout.strand, minlength=layout.strands)
    return per_strand[layout.strand]
