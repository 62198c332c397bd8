"""Flux linked by each turn of a winding: the EMF side of the voltage map.

Pure functions on SI numbers.  Air core: every turn is a coaxial circle
(Maxwell's mutual inductance between turns, the round-wire loop's own
inductance for itself), as in :func:`windsheet.physics.inductance.strand_matrix`;
here the sum is kept turn by turn instead of being gathered by strand.
Cored windings (an AL value): the core carries one flux that every turn of a
strand links alike, so the EMF per turn is uniform along the strand.
"""

from __future__ import annotations

import numpy as np

from .inductance import loop_self_inductance, maxwell_mutual


def _window_sums(kernel, m0, slots_a, lo_b, hi_b):
    """``Σ_{s_b = lo_b}^{hi_b - 1} kernel[s_a - s_b - m0]`` for each ``s_a``, by prefix sums."""
    c = np.concatenate([[0.0], np.cumsum(kernel)])
    top = slots_a - lo_b - m0 + 1        # exclusive end index into kernel
    bottom = slots_a - (hi_b - 1) - m0   # first index
    return c[top] - c[bottom]


def turn_flux_linkage(layout, strand_current):
    """Flux linkage of every turn from the currents of all turns, air core.

    ``Λ_k = Σ_j M_kj I_strand(j)``: turn ``k``'s row of the turn-to-turn
    inductance matrix times the strand currents, with ``M_kk`` the loop's
    own inductance.  Turns of one (layer, strand) group share a radius and
    sit at ``z0 + slot·pitch``, so the mutual between two groups depends only
    on the slot offset: each offset's kernel is evaluated once and the row
    sums are windows over it (prefix sums).  Cost O(groups² × slots), memory
    O(turns); no N × N matrix.

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        A cylinder or bobbin layout (coaxial turns).
    strand_current : array_like, complex, shape (strands,)
        Current in each strand, start to finish. [A]

    Returns
    -------
    flux_linkage : ndarray, complex, shape (n_turns,)
        Flux linked by each turn, in the winding sense of its strand. [Wb]
        Summed over a strand's turns it is that strand's row of
        ``strand_matrix(layout) @ strand_current``.

    References
    ----------
    .. [1] J. C. Maxwell, A Treatise on Electricity and Magnetism, vol. 2,
       art. 701 (1873): mutual inductance of coaxial circles.
    .. [2] F. W. Grover, Inductance Calculations (1946): self-inductance of
       a circular loop of round wire; summation over the turns of a coil.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> from windsheet.physics.inductance import strand_matrix
    >>> lay = cylinder_layout(0.02, 5e-3, 0.45e-3, 0.5e-3, 1, 20)
    >>> lam = turn_flux_linkage(lay, [1.0])
    >>> bool(np.isclose(lam.sum().real, strand_matrix(lay)[0, 0], rtol=1e-12))
    True
    """
    if layout.kind == "toroid":
        raise ValueError("turn-by-turn flux linkage needs coaxial turns; on a core use "
                         "cored_turn_flux_linkage")
    current = np.asarray(strand_current, dtype=complex).reshape(layout.strands)
    groups = []
    for lay, s, radius, z0, lo, hi in layout.groups():
        sel = np.flatnonzero((layout.layer == lay) & (layout.strand == s))
        groups.append((s, radius, z0, lo, hi, sel, layout.slot[sel]))
    p = layout.pitch
    a_cu = layout.copper_diameter / 2.0
    acc = [np.zeros((layout.strands, g[5].size)) for g in groups]
    for ia, (sa, ra, za, lo_a, hi_a, sel_a, slots_a) in enumerate(groups):
        for ib in range(ia, len(groups)):
            sb, rb, zb, lo_b, hi_b, _, slots_b = groups[ib]
            m0 = lo_a - (hi_b - 1)
            dz = za - zb + np.arange(m0, hi_a - lo_b) * p
            with np.errstate(divide="ignore"):
                if ia == ib:
                    # Offset 0 of a group with itself is each turn's own inductance.
                    own = dz == 0.0
                    kernel = np.where(own, loop_self_inductance(ra, a_cu),
                                      maxwell_mutual(ra, rb, np.where(own, 1.0, dz)))
                else:
                    kernel = maxwell_mutual(ra, rb, dz)
            if not np.all(np.isfinite(kernel)):
                raise ValueError("two turns of the layout coincide")
            acc[ia][sb] += _window_sums(kernel, m0, slots_a, lo_b, hi_b)
            if ia != ib:
                # Reciprocity: seen from group b the same kernel runs backwards.
                acc[ib][sa] += _window_sums(kernel[::-1], -(hi_a - 1 - lo_b), slots_b, lo_a, hi_a)
    out = np.zeros(layout.n_turns, dtype=complex)
    for g, a in zip(groups, acc):
        out[g[5]] = a.T @ current
    return out


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
