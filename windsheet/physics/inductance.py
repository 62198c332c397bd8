"""Inductance by the filament method: Maxwell's circles, summed strand by strand.

Pure functions on SI numbers (numpy-vectorised where it makes sense).  The
air-core engine, :func:`strand_matrix`, sums Maxwell's mutual inductance of
coaxial circles over every pair of turns and gathers the result by strand.
The handbook formulas (Nagaoka, Lundin, Wheeler, Brooks, Rosa) and cored
windings are in :mod:`windsheet.physics.coil_formulas`.

Complete elliptic integrals are evaluated by Gauss's arithmetic-geometric
mean, taking the modulus k and its complement k′ separately and summing the
series for K − E term by term (all terms positive), so neither end of the
modulus range cancels.  numpy alone does it, vectorised, about twice as fast
as one scipy call per element, and without loading ``scipy.special``.
"""

from __future__ import annotations

import math

import numpy as np

#: Permeability of free space. [H/m]  (The 2019 SI value differs by < 1e-9.)
MU0 = 4e-7 * math.pi


# ---------------------------------------------------------------------------
# Filaments and loops
# ---------------------------------------------------------------------------

def _agm_elliptic(k, kp):
    """``K(k)`` and ``(K(k) − E(k)) / k²`` by Gauss's arithmetic-geometric mean.

    ``a₀ = 1, b₀ = k′, c₀ = k``; ``K = π / (2 a_∞)`` and
    ``K − E = K Σ 2ⁿ⁻¹ cₙ²``.  The recurrence is run on ``tₙ = cₙ / k`` with
    ``tₙ₊₁ = tₙ² k / (4 aₙ₊₁)`` (from ``aₙ² − bₙ² = cₙ²``), never on the
    difference ``aₙ − bₙ``.  Converges quadratically: five to eight steps
    for ``k′`` down to 1e-10.

    Parameters
    ----------
    k, kp : ndarray
        Modulus and complementary modulus, ``k² + k′² = 1``, each given to
        full relative precision. [1]

    Returns
    -------
    K, KmE_over_k2 : ndarray
        ``K(k)`` and ``(K(k) − E(k)) / k²``. [1]

    References
    ----------
    .. [1] NIST Digital Library of Mathematical Functions, §19.8(i).

    Examples
    --------
    ``K(0) = π/2`` and ``(K − E)/k² → π/4`` as ``k → 0``; ``K(1/√2) =
    1.854075`` (DLMF §19.20 via Γ(1/4)²/(4√π)):

    >>> import numpy as np
    >>> K, kme = _agm_elliptic(np.array([0.0, 2 ** -0.5]), np.array([1.0, 2 ** -0.5]))
    >>> print(np.round(K, 6), round(float(kme[0]), 6))
    [1.570796 1.854075] 0.785398
    """
    a = np.ones_like(k)
    b = np.array(kp, dtype=float, copy=True)
    t = np.ones_like(k)
    s = np.full_like(k, 0.5)
    w = 0.5
    for _ in range(40):
        c = t * k
        if not np.any(c > 1e-9):     # the next term is below 1e-36 of the sum
            break
        a_next = 0.5 * (a + b)
        np.sqrt(a * b, out=b)
        t *= c / (4.0 * a_next)
        a = a_next
        w *= 2.0
        s += w * t * t
    K = (0.5 * math.pi) / a
    return K, K * s


def maxwell_mutual(r1, r2, dz):
    """Mutual inductance of two coaxial circular filaments.

    Evaluated in Maxwell's second (Landen-transformed) form,
    ``M = 2 µ0 √(r1 r2) [K(k1) − E(k1)] / √k1`` with
    ``k1 = (1 − k′)/(1 + k′)`` and ``k′² = ((r1−r2)² + dz²) / ((r1+r2)² +
    dz²)``.  Both ``k1`` and its complement ``2√k′/(1 + k′)`` are formed
    without a difference, and ``K − E`` comes from the arithmetic-geometric
    mean as a sum of positive terms, so the result keeps full relative
    precision for close turns (k → 1) and for distant ones (k → 0), where the
    usual form ``µ0 √(r1 r2) [(2/k − k)K − (2/k)E]`` cancels.

    Parameters
    ----------
    r1, r2 : float or ndarray
        Radii of the two circles. [m]
    dz : float or ndarray
        Axial distance between their planes. [m]

    Returns
    -------
    M : float or ndarray
        Mutual inductance. [H]  Infinite when the circles coincide.

    References
    ----------
    .. [1] J. C. Maxwell, A Treatise on Electricity and Magnetism, vol. 2,
       art. 701 (1873).
    .. [2] NIST Digital Library of Mathematical Functions, §19.34 (mutual
       inductance of coaxial circles), §19.8(i) (AGM) and §19.8(ii)
       (Landen's transformation).
    .. [3] F. W. Grover, Inductance Calculations, Van Nostrand (1946),
       coaxial circular filaments.

    Examples
    --------
    Two 100 mm circles 1 mm apart; Maxwell's close-circle form
    ``µ0 a (ln(8a/r) − 2)`` (Treatise art. 705) gives 588.69 nH:

    >>> print(f"{maxwell_mutual(0.1, 0.1, 1e-3) * 1e9:.2f} nH")
    588.70 nH

    Far apart, the dipole limit ``µ0 π a² b² / (2 d³)`` (common practice)
    gives 1.974e-14 H for 10 mm circles 1 m apart:

    >>> print(f"{maxwell_mutual(0.01, 0.01, 1.0):.3e} H")
    1.973e-14 H
    """
    r1, r2, dz = np.asarray(r1, float), np.asarray(r2, float), np.asarray(dz, float)
    far2 = (r1 + r2) ** 2 + dz ** 2
    kp = np.sqrt(((r1 - r2) ** 2 + dz ** 2) / far2)      # k′ = nearest / farthest distance
    k1 = (4.0 * r1 * r2 / far2) / (1.0 + kp) ** 2         # (1 − k′)/(1 + k′) without cancellation
    same = kp == 0.0
    # Coinciding circles (k1 = 1) would take the mean ~30 steps to reach 0; they are infinite.
    K, kme = _agm_elliptic(np.where(same, 0.0, k1), np.where(same, 1.0, 2.0 * np.sqrt(kp) / (1.0 + kp)))
    m = np.where(same, np.inf, 2.0 * MU0 * np.sqrt(r1 * r2) * k1 ** 1.5 * kme)
    return m[()] if m.ndim == 0 else m


def loop_self_inductance(R, a):
    """Low-frequency self-inductance of a circular loop of round wire.

    ``L = µ0 R [ln(8R/a) − 7/4]``: the external term ``ln(8R/a) − 2`` plus
    the internal ``1/4`` of a uniformly distributed current.

    Parameters
    ----------
    R : float or ndarray
        Loop radius, to the wire centre. [m]
    a : float or ndarray
        Wire (copper) radius. [m]

    Returns
    -------
    L : float or ndarray
        Self-inductance. [H]

    References
    ----------
    .. [1] F. W. Grover, Inductance Calculations, Van Nostrand (1946),
       circular ring of round wire.
    .. [2] E. B. Rosa and F. W. Grover, "Formulas and tables for the
       calculation of mutual and self-inductance", Bull. Bureau of Standards
       8 (1912).

    Examples
    --------
    A 100 mm loop of 1 mm wire; by hand from Grover's formula,
    4π·1e-7 × 0.05 × (ln 800 − 1.75) = 310.05 nH:

    >>> print(f"{loop_self_inductance(0.05, 0.5e-3) * 1e9:.2f} nH")
    310.05 nH
    """
    R, a = np.asarray(R, float), np.asarray(a, float)
    out = MU0 * R * (np.log(8.0 * R / a) - 1.75)
    return out[()] if out.ndim == 0 else out


# ---------------------------------------------------------------------------
# Strand-by-strand matrix, filament method (air core)
# ---------------------------------------------------------------------------

def _check_air_core(layout):
    if layout.kind == "toroid":
        raise ValueError("the filament method needs coaxial turns; a toroid's strand "
                         "matrix comes from cored_strand_matrix")


#: Grid on which the offset ``δ mod pitch`` between two groups is matched, as a
#: fraction of the pitch: offsets closer than ~1e-12 pitch share their kernels.
_OFFSET_GRID = 2 ** 40
_HALF = _OFFSET_GRID // 2
#: Lattice points handled at once; bounds the engine's working memory (~100 MB).
_CHUNK = 1 << 18


def _group_table(layout):
    """The layout's (layer, strand) groups as arrays: strand, radius, z0, slot_lo, slot_hi."""
    rows = list(layout.groups())
    strand = np.array([g[1] for g in rows], dtype=np.int64)
    radius = np.array([g[2] for g in rows], dtype=float)
    z0 = np.array([g[3] for g in rows], dtype=float)
    lo = np.array([g[4] for g in rows], dtype=np.int64)
    hi = np.array([g[5] for g in rows], dtype=np.int64)
    return strand, radius, z0, lo, hi


def _aranges(start, stop):
    """Concatenated ``arange(start[i], stop[i])`` and the segment each value belongs to."""
    n = stop - start
    seg = np.repeat(np.arange(n.size), n)
    first = np.cumsum(n) - n
    return start[seg] + np.arange(seg.size) - first[seg], seg


def _double_prefix(values, seg_len, times=2):
    """Second (or ``times``-th) cumulative sums of each segment of ``values``, with leading zeros.

    For a segment ``g(0..n-1)`` the result ``C2`` has ``C2[t] = Σ_{u<t} Σ_{i<u} g(i)``
    for ``t = 0..n+1`` (``times=1``: ``C1[t] = Σ_{i<t} g(i)`` for ``t = 0..n``, one
    leading zero).  Segments are padded to a common length within power-of-two
    size buckets so that no sum runs across segments (a global running sum would
    lose the small segments' digits to the large ones').

    Returns
    -------
    C2 : ndarray (flat), base : ndarray of int
        The sums and where each segment's ``C2[0]`` sits in them.
    """
    width = seg_len + times
    bucket = np.ceil(np.log2(width)).astype(np.int64)
    starts = np.cumsum(seg_len) - seg_len
    base = np.empty(seg_len.size, dtype=np.int64)
    parts, offset = [], 0
    for b in _distinct(bucket):
        rows = np.flatnonzero(bucket == b)
        w = int(width[rows].max())
        block = np.zeros((rows.size, w))
        col, row = _aranges(np.zeros(rows.size, dtype=np.int64), seg_len[rows])
        block[row, col + times] = values[starts[rows][row] + col]
        for _ in range(times):
            np.cumsum(block, axis=1, out=block)
        base[rows] = offset + np.arange(rows.size) * w
        parts.append(block.ravel())
        offset += block.size
    return np.concatenate(parts), base


def _kernel_classes(radius, z0, ia, ib, pitch):
    """Sort group pairs into kernel classes (radius pair, offset mod pitch).

    Within a class the axial distance of every turn pair is ``|ρ + i p|`` for
    an integer ``i``, so the class needs Maxwell's kernel on one lattice only.
    An offset above half a pitch is folded onto ``p − ρ`` by reflection
    (``M`` is even in ``dz``), which turns ``i`` into ``−1 − i`` and is done
    by swapping the pair's roles.

    Returns
    -------
    cls : ndarray of int
        Class of each pair.
    c : ndarray of int
        Lattice shift: the pair's turn at slot ``x`` (first group) and ``y``
        (second) sit ``|ρ + (x − y + c) p|`` apart, after any swap.
    swap : ndarray of bool
        Whether the pair's roles were swapped by the fold.
    r_lo, r_hi, u : ndarray
        Per class: the two radii [m] and the offset ρ on the grid [p / 2⁴⁰].
    """
    r_ids, r_of = np.unique(radius, return_inverse=True)
    u_full = np.rint((z0[ia] - z0[ib]) / pitch * _OFFSET_GRID).astype(np.int64)
    q = np.floor_divide(u_full, _OFFSET_GRID)
    u = u_full - q * _OFFSET_GRID
    swap = u > _HALF
    u = np.where(swap, _OFFSET_GRID - u, u)
    c = np.where(swap, -q - 1, q)
    ra, rb = r_of[ia], r_of[ib]
    u_ids, u_of = np.unique(u, return_inverse=True)
    n_r, n_u = r_ids.size, u_ids.size
    key = (np.minimum(ra, rb) * n_r + np.maximum(ra, rb)) * n_u + u_of
    k_ids, cls = np.unique(key, return_inverse=True)
    return (cls.ravel(), c, swap, r_ids[k_ids // n_u // n_r], r_ids[k_ids // n_u % n_r],
            u_ids[k_ids % n_u])


def _fold(i, u):
    """Index of the lattice point at the same ``|dz|`` with ``i ≥ 0`` where the
    class is symmetric: ``ρ = 0`` (``i ↔ −i``) or ``ρ = p/2`` (``i ↔ −1 − i``)."""
    return np.where(i < 0, np.where(u == 0, -i, np.where(u == _HALF, -1 - i, i)), i)


def _kernel_lattice(r_lo, r_hi, u, e_lo, e_hi, pitch):
    """Maxwell's kernel at ``dz = ρ + j p`` for ``j`` in ``[e_lo, e_hi]`` of each class, flat.

    The point where two turns share one circle (``r_lo = r_hi``, ``dz = 0``)
    is left at zero: it is a turn's own inductance, added by the caller.
    """
    j, k = _aranges(e_lo, e_hi + 1)
    dz = u[k] * (pitch / _OFFSET_GRID) + j * pitch
    kernel = np.zeros(j.size)
    live = (r_lo[k] != r_hi[k]) | (dz != 0.0)
    kernel[live] = maxwell_mutual(r_lo[k][live], r_hi[k][live], dz[live])
    return kernel


def _cached_kernel_lattice(r_lo, r_hi, u, e_lo, e_hi, pitch, cache):
    """As :func:`_kernel_lattice`, taking what ``cache`` already holds and adding the rest."""
    keys = list(zip(r_lo.tolist(), r_hi.tolist(), u.tolist()))
    got = [cache.get((pitch,) + key) for key in keys]
    miss = np.array([g is None or g[0] > a or g[1] < b for g, a, b in zip(got, e_lo.tolist(), e_hi.tolist())],
                    dtype=bool)
    if miss.any():
        # Widen each missed class to cover what the cache held, so it is evaluated once more at most.
        lo_m, hi_m = e_lo[miss].copy(), e_hi[miss].copy()
        for n, idx in enumerate(np.flatnonzero(miss)):
            if got[idx] is not None:
                lo_m[n], hi_m[n] = min(lo_m[n], got[idx][0]), max(hi_m[n], got[idx][1])
        fresh = _kernel_lattice(r_lo[miss], r_hi[miss], u[miss], lo_m, hi_m, pitch)
        ends = np.cumsum(hi_m - lo_m + 1)
        for n, idx in enumerate(np.flatnonzero(miss)):
            got[idx] = cache[(pitch,) + keys[idx]] = (int(lo_m[n]), int(hi_m[n]),
                                                      fresh[ends[n] - (hi_m[n] - lo_m[n] + 1):ends[n]])
    return np.concatenate([g[2][a - g[0]:b - g[0] + 1] for g, a, b in zip(got, e_lo.tolist(), e_hi.tolist())])


def _lattice_sums(r_lo, r_hi, u, lat_lo, lat_hi, pitch, cache=None, times=2):
    """Double (``times=1``: single) prefix sums of Maxwell's kernel on each class's lattice.

    Each distinct ``|dz|`` of a class is evaluated once (and, with a
    ``cache`` shared between calls, once across them).
    """
    lo_f, hi_f = _fold(lat_lo, u), _fold(lat_hi, u)
    crosses = ((u == 0) | (u == _HALF)) & (lat_lo < 0) & (lat_hi >= 0)
    e_lo = np.where(crosses, 0, np.minimum(lo_f, hi_f))
    e_hi = np.maximum(lo_f, hi_f)
    if cache is None:
        kernel = _kernel_lattice(r_lo, r_hi, u, e_lo, e_hi, pitch)
    else:
        kernel = _cached_kernel_lattice(r_lo, r_hi, u, e_lo, e_hi, pitch, cache)
    e_base = np.cumsum(e_hi - e_lo + 1) - (e_hi - e_lo + 1)
    i, k = _aranges(lat_lo, lat_hi + 1)
    return _double_prefix(kernel[e_base[k] + _fold(i, u[k]) - e_lo[k]], lat_hi - lat_lo + 1, times)


def _distinct(values):
    """Sorted distinct integers, as ``np.unique`` gives them.

    A plain ``np.unique`` call imports ``numpy.ma`` (10–25 ms of start-up);
    these index arrays need only a sort.
    """
    v = np.sort(np.asarray(values).ravel())
    return v[np.concatenate([[True], v[1:] != v[:-1]])] if v.size else v


def _class_chunks(length):
    """Split classes (in order) into runs of about ``_CHUNK`` lattice points."""
    ends = np.searchsorted(np.cumsum(length), np.arange(_CHUNK, length.sum() + _CHUNK, _CHUNK),
                           side="right")
    edges = _distinct(np.concatenate([[0], np.maximum(ends, 1), [length.size]]))
    return zip(edges[:-1], edges[1:])


def strand_matrix(layout, kernels=None):
    """Air-core inductance matrix between the strands of a layer winding.

    Filament method: every turn is a coaxial circle at its wire centre; the
    mutual inductance of each pair of turns is Maxwell's, each turn's own is
    that of a round-wire loop of the copper radius (low frequency, uniform
    current); the turn-by-turn sum is gathered by strand.

    Turns of one (layer, strand) group share a radius and sit one pitch
    apart over a contiguous slot range.  Between two groups the axial
    distances therefore lie on a lattice ``|ρ + i p|`` fixed by the two
    radii and by the groups' offset ``ρ`` modulo the pitch (strands wound
    side by side share these classes).  Maxwell's kernel is evaluated once
    per distinct (radius pair, offset class, ``|dz|``), in one vectorised
    call; each group pair's sum over its two slot ranges is then four
    look-ups in the lattice's second cumulative sum.  Cost is
    O(layers × turns per strand × strands) kernels plus O(groups²) look-ups.

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        A cylinder or bobbin layout (coaxial turns).
    kernels : dict, optional
        A cache of kernel values to share between calls, e.g. across the
        steps of a search over turn counts on one form: layouts that differ
        in a few turns then evaluate only the kernels new to them.  Keys
        hold the radii and pitch, so any layouts may share it.

    Returns
    -------
    L : ndarray, shape (strands, strands)
        Self- (diagonal) and mutual inductances of the strands, each strand
        taken from its start to its finish. [H]

    References
    ----------
    .. [1] J. C. Maxwell, A Treatise on Electricity and Magnetism, vol. 2,
       art. 701 (1873).
    .. [2] F. W. Grover, Inductance Calculations (1946): summation of
       mutual inductances of the turns of a coil.

    Examples
    --------
    Ten turns of 0.8 mm wire at 1 mm pitch on a 10 mm radius; Rosa's
    round-wire correction gives 1999.2 nH for this coil (see
    :func:`rosa_corrected_inductance`):

    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.0192, 0.0099, 0.0008, 0.0008, 1, 10, pitch=0.001)
    >>> print(f"{strand_matrix(lay)[0, 0] * 1e9:.1f} nH")
    1998.5 nH
    """
    _check_air_core(layout)
    S, p = layout.strands, layout.pitch
    strand, radius, z0, lo, hi = _group_table(layout)
    ia, ib = np.triu_indices(strand.size)
    cls, c, swap, r_lo, r_hi, u = _kernel_classes(radius, z0, ia, ib, p)
    # After a swap the pair's second group plays the first (x) role.
    x0, x1 = np.where(swap, lo[ib], lo[ia]), np.where(swap, hi[ib], hi[ia])
    y0, y1 = np.where(swap, lo[ia], lo[ib]), np.where(swap, hi[ia], hi[ib])
    n_cls = r_lo.size
    lat_lo = np.full(n_cls, np.iinfo(np.int64).max)
    lat_hi = np.full(n_cls, np.iinfo(np.int64).min)
    np.minimum.at(lat_lo, cls, x0 - (y1 - 1) + c)               # each class's lattice range
    np.maximum.at(lat_hi, cls, (x1 - 1) - y0 + c)

    by_cls = np.argsort(cls, kind="stable")
    first_pair = np.searchsorted(cls[by_cls], np.arange(n_cls + 1))
    total = np.empty(cls.size)
    for k0, k1 in _class_chunks(lat_hi - lat_lo + 1):
        C2, base = _lattice_sums(r_lo[k0:k1], r_hi[k0:k1], u[k0:k1], lat_lo[k0:k1], lat_hi[k0:k1], p, kernels)
        sel = by_cls[first_pair[k0]:first_pair[k1]]
        kk = cls[sel] - k0

        def c2(t):
            return C2[base[kk] + t - lat_lo[k0:k1][kk]]

        xa, xb, ya, yb, cc = x0[sel], x1[sel], y0[sel], y1[sel], c[sel]
        # Σ_{x∈[xa,xb), y∈[ya,yb)} g(x − y + c) by inclusion–exclusion on C2.
        total[sel] = c2(xb - ya + cc + 1) - c2(xa - ya + cc + 1) - c2(xb - yb + cc + 1) + c2(xa - yb + cc + 1)

    # Pairs of turns at dz = 0 on one circle: a turn's own inductance, or a fault.
    on_circle = (r_lo[cls] == r_hi[cls]) & (u[cls] == 0)
    meet = np.where(on_circle, np.maximum(0, np.minimum(x1, y1 - c) - np.maximum(x0, y0 - c)), 0)
    own = ia == ib
    if np.any(meet[~own] > 0):
        raise ValueError("two turns of the layout coincide")
    total[own] += (hi - lo)[ia[own]] * loop_self_inductance(radius[ia[own]], layout.copper_diameter / 2)

    sa, sb = strand[ia], strand[ib]
    L = np.bincount(sa * S + sb, weights=total, minlength=S * S).reshape(S, S)
    L += np.bincount(sb * S + sa, weights=np.where(own, 0.0, total), minlength=S * S).reshape(S, S)
    return L


def strand_matrix_bruteforce(layout):
    """Same as :func:`strand_matrix` by the plain double sum over all turns.

    O(turns²) in time and memory; kept to check the fast sum on small coils.

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        A cylinder or bobbin layout (coaxial turns).

    Returns
    -------
    L : ndarray, shape (strands, strands)
        Strand inductance matrix. [H]

    References
    ----------
    .. [1] J. C. Maxwell, A Treatise on Electricity and Magnetism, vol. 2,
       art. 701 (1873).
    .. [2] F. W. Grover, Inductance Calculations (1946).

    Examples
    --------
    The coil of :func:`strand_matrix`'s example, summed turn by turn:

    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.0192, 0.0099, 0.0008, 0.0008, 1, 10, pitch=0.001)
    >>> print(f"{strand_matrix_bruteforce(lay)[0, 0] * 1e9:.1f} nH")
    1998.5 nH
    """
    _check_air_core(layout)
    r, z = layout.r, layout.z
    with np.errstate(divide="ignore", invalid="ignore"):
        turn = maxwell_mutual(r[:, None], r[None, :], z[:, None] - z[None, :])
    np.fill_diagonal(turn, loop_self_inductance(r, layout.copper_diameter / 2))
    onehot = np.eye(layout.strands)[layout.strand]          # (turns, strands)
    return onehot.T @ turn @ onehot
