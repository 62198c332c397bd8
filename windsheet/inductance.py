"""Inductance: closed-form coil formulas and the strand-by-strand filament method.

Pure functions on SI numbers (numpy-vectorised where it makes sense).  The
air-core engine, :func:`strand_matrix`, sums Maxwell's mutual inductance of
coaxial circles over every pair of turns and gathers the result by strand.
The handbook formulas (Nagaoka, Lundin, Wheeler, Brooks, Rosa) serve as
cross-checks and as quick estimates for a traveller.

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
_INCH = 0.0254


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
# Single-layer current sheet
# ---------------------------------------------------------------------------

def nagaoka_coefficient(D_over_l):
    """Nagaoka's coefficient of a uniform cylindrical current sheet, exact.

    With ``k² = D²/(D² + ℓ²)`` and ``k′ = ℓ/√(D² + ℓ²)``::

        K_N = 4/(3π k′) · [(k′²/k²)(K(k) − E(k)) + E(k) − k]

    where ``(K − E)/k²`` is taken from the arithmetic-geometric mean as a sum
    of positive terms, so the long-coil end (``k → 0``, ``K_N → 1``) carries
    no cancellation.

    Parameters
    ----------
    D_over_l : float or ndarray
        Diameter over length of the sheet. [1]

    Returns
    -------
    K_N : float or ndarray
        Nagaoka's coefficient. [1]

    References
    ----------
    .. [1] H. Nagaoka, "The inductance coefficients of solenoids", J. Coll.
       Sci. Tokyo 27 (1909).
    .. [2] E. B. Rosa and F. W. Grover, Bull. Bureau of Standards 8 (1912).

    Examples
    --------
    Grover's table of Nagaoka's coefficient gives 0.6884 at D/ℓ = 1 and
    0.5255 at D/ℓ = 2:

    >>> print(f"{nagaoka_coefficient(1.0):.4f} {nagaoka_coefficient(2.0):.4f}")
    0.6884 0.5255
    """
    x = np.asarray(D_over_l, float)
    k = x / np.sqrt(1.0 + x ** 2)
    kp = 1.0 / np.sqrt(1.0 + x ** 2)
    K, kme = _agm_elliptic(k, kp)
    e = K - k * k * kme
    out = 4.0 / (3.0 * math.pi * kp) * (kp * kp * kme + e - k)
    return out[()] if out.ndim == 0 else out


def current_sheet_inductance(radius, length, turns):
    """Inductance of a single-layer coil as a uniform current sheet.

    ``L = µ0 π a² N² K_N / ℓ``.

    Parameters
    ----------
    radius : float or ndarray
        Sheet radius (to the wire centres). [m]
    length : float or ndarray
        Sheet length; for a wound coil ``N × pitch``. [m]
    turns : float or ndarray
        Number of turns. [1]

    Returns
    -------
    L : float or ndarray
        Inductance. [H]

    References
    ----------
    .. [1] H. Nagaoka, J. Coll. Sci. Tokyo 27 (1909).
    .. [2] E. B. Rosa and F. W. Grover, Bull. Bureau of Standards 8 (1912).

    Examples
    --------
    100 turns, 10 mm radius, 20 mm long (D/ℓ = 1, Nagaoka's 0.6884 from
    Grover's table): by hand µ0 π (0.01)² 100² × 0.6884 / 0.02 = 135.9 µH:

    >>> print(f"{current_sheet_inductance(0.01, 0.02, 100) * 1e6:.1f} µH")
    135.9 µH
    """
    a, ell, n = np.asarray(radius, float), np.asarray(length, float), np.asarray(turns, float)
    out = MU0 * math.pi * a ** 2 * n ** 2 * nagaoka_coefficient(2.0 * a / ell) / ell
    return out[()] if np.ndim(out) == 0 else out


def _lundin_f1(x):
    return (1.0 + 0.383901 * x + 0.017108 * x ** 2) / (1.0 + 0.258952 * x)


def _lundin_f2(x):
    return 0.093842 * x + 0.002029 * x ** 2 - 0.000801 * x ** 3


def lundin_nagaoka(D_over_l):
    """Lundin's handbook approximation to Nagaoka's coefficient.

    Parameters
    ----------
    D_over_l : float or ndarray
        Diameter over length of the sheet. [1]

    Returns
    -------
    K_N : float or ndarray
        Nagaoka's coefficient, to a few ppm. [1]

    References
    ----------
    .. [1] R. Lundin, "A handbook formula for the inductance of a
       single-layer circular coil", Proc. IEEE 73(9):1428 (1985).

    Examples
    --------
    Grover's table gives 0.6884 at D/ℓ = 1 and 0.2033 at D/ℓ = 10:

    >>> print(f"{lundin_nagaoka(1.0):.4f} {lundin_nagaoka(10.0):.4f}")
    0.6884 0.2033
    """
    u = np.asarray(D_over_l, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        long_coil = _lundin_f1(u ** 2) - 4.0 * u / (3.0 * math.pi)
        x = 1.0 / u ** 2
        short_coil = (2.0 / (math.pi * u)) * ((np.log(4.0 * u) - 0.5) * _lundin_f1(x) + _lundin_f2(x))
    out = np.where(u <= 1.0, long_coil, short_coil)
    return out[()] if out.ndim == 0 else out


def wheeler_single_layer(radius, length, turns):
    """Wheeler's formula for a single-layer solenoid.

    ``L[µH] = a² N² / (9a + 10b)`` with ``a`` the radius and ``b`` the
    length in inches; converted here to SI.  Within about 1 % for
    ``b > 0.8 a``.

    Parameters
    ----------
    radius : float or ndarray
        Coil radius (to the wire centres). [m]
    length : float or ndarray
        Coil length. [m]
    turns : float or ndarray
        Number of turns. [1]

    Returns
    -------
    L : float or ndarray
        Inductance. [H]

    References
    ----------
    .. [1] H. A. Wheeler, "Simple inductance formulas for radio coils",
       Proc. IRE 16:1398 (1928).

    Examples
    --------
    Wheeler's inch form by hand: 1 in radius, 2 in long, 100 turns,
    1 × 100² / (9 + 20) = 344.8 µH:

    >>> print(f"{wheeler_single_layer(0.0254, 0.0508, 100) * 1e6:.1f} µH")
    344.8 µH
    """
    a = np.asarray(radius, float) / _INCH
    b = np.asarray(length, float) / _INCH
    return 1e-6 * a ** 2 * np.asarray(turns, float) ** 2 / (9.0 * a + 10.0 * b)


def wheeler_multilayer(radius, length, depth, turns):
    """Wheeler's formula for a multilayer coil of rectangular section.

    ``L[µH] = 0.8 a² N² / (6a + 9b + 10c)``, inches, converted to SI; about
    1 % when the three terms in the denominator are comparable.

    Parameters
    ----------
    radius : float or ndarray
        Mean radius of the winding. [m]
    length : float or ndarray
        Axial length of the winding. [m]
    depth : float or ndarray
        Radial depth of the winding. [m]
    turns : float or ndarray
        Number of turns. [1]

    Returns
    -------
    L : float or ndarray
        Inductance. [H]

    References
    ----------
    .. [1] H. A. Wheeler, "Simple inductance formulas for radio coils",
       Proc. IRE 16:1398 (1928).

    Examples
    --------
    Wheeler's inch form by hand: 1 in mean radius, 1 in long, 0.5 in deep,
    100 turns, 0.8 × 100² / (6 + 9 + 5) = 400 µH:

    >>> print(f"{wheeler_multilayer(0.0254, 0.0254, 0.0127, 100) * 1e6:.1f} µH")
    400.0 µH
    """
    a = np.asarray(radius, float) / _INCH
    b = np.asarray(length, float) / _INCH
    c = np.asarray(depth, float) / _INCH
    return 1e-6 * 0.8 * a ** 2 * np.asarray(turns, float) ** 2 / (6.0 * a + 9.0 * b + 10.0 * c)


def brooks_inductance(mean_radius, turns):
    """Inductance of a Brooks coil (square c × c section, mean radius 1.5 c).

    Brooks' proportions give the most inductance for a given length of wire;
    ``L = 1.6994e-6 · a · N²`` H with ``a`` in metres.

    Parameters
    ----------
    mean_radius : float or ndarray
        Mean radius of the winding, ``1.5 c``. [m]
    turns : float or ndarray
        Number of turns. [1]

    Returns
    -------
    L : float or ndarray
        Inductance. [H]

    References
    ----------
    .. [1] H. B. Brooks, "Design of standards of inductance, and the proposed
       use of model reactors in the design of air-core and iron-core
       reactors", Bur. Stand. J. Res. 7:289 (1931).

    Examples
    --------
    Grover's Brooks-coil constant, 0.025491 µH × c[cm] × N²: a 2 cm square
    section (mean radius 3 cm) of 100 turns has 509.82 µH:

    >>> print(f"{brooks_inductance(0.03, 100) * 1e6:.2f} µH")
    509.82 µH
    """
    return 1.6994e-6 * np.asarray(mean_radius, float) * np.asarray(turns, float) ** 2


# ---------------------------------------------------------------------------
# Rosa's round-wire correction
# ---------------------------------------------------------------------------

def rosa_ks(pitch, d):
    """Rosa's self-inductance correction ``ks = 5/4 − ln(2p/d)``.

    The difference between a round-wire turn's self-inductance (uniform
    current) and that of the current-sheet strip it replaces.

    Parameters
    ----------
    pitch : float or ndarray
        Winding pitch. [m]
    d : float or ndarray
        Bare (copper) wire diameter. [m]

    Returns
    -------
    ks : float or ndarray
        Correction. [1]

    References
    ----------
    .. [1] E. B. Rosa, "The self and mutual inductances of linear
       conductors", Bull. Bureau of Standards 4 (1907).
    .. [2] F. W. Grover, Inductance Calculations (1946), p. 150.

    Examples
    --------
    Touching bare wire (p = d): 5/4 − ln 2 = 0.5569:

    >>> print(f"{rosa_ks(1e-3, 1e-3):.4f}")
    0.5569
    """
    return 1.25 - np.log(2.0 * np.asarray(pitch, float) / np.asarray(d, float))


def rosa_km(N):
    """Rosa's mutual-inductance correction ``km`` for ``N`` turns.

    Grover's asymptotic series for Rosa's tabulated constant, as extended by
    Knight::

        km ≈ ln(2π) − 3/2 − ln(N)/(6N) − 0.33084236/N − 1/(120N³)
             + 1/(504N⁵) − 0.0011923/N⁷ + 0.0005068/N⁹

    It reproduces Rosa's table to its four places from ``N = 2`` upward;
    ``km = 0`` for one turn.

    Parameters
    ----------
    N : float or ndarray
        Number of turns (≥ 1). [1]

    Returns
    -------
    km : float or ndarray
        Correction. [1]

    References
    ----------
    .. [1] E. B. Rosa, Bull. Bureau of Standards 4 (1907), table of B.
    .. [2] F. W. Grover, Inductance Calculations (1946), p. 150.
    .. [3] D. W. Knight, "Rosa's mutual inductance correction for the
       round-wire solenoid" (2010), extending Grover's 1929 series.

    Examples
    --------
    Rosa's table gives 0.2664 for 10 turns and 0.3269 for 100:

    >>> print(f"{rosa_km(10):.4f} {rosa_km(100):.4f}")
    0.2664 0.3269
    """
    n = np.asarray(N, float)
    km = (math.log(2 * math.pi) - 1.5 - np.log(n) / (6 * n) - 0.33084236 / n
          - 1 / (120 * n ** 3) + 1 / (504 * n ** 5) - 0.0011923 / n ** 7 + 0.0005068 / n ** 9)
    out = np.where(n <= 1.0, 0.0, km)
    return out[()] if out.ndim == 0 else out


def rosa_corrected_inductance(radius, pitch, wire_d, turns):
    """Single-layer coil of round wire: current sheet less Rosa's correction.

    ``L = L_sheet(a, N p, N) − µ0 a N (ks + km)``.

    Parameters
    ----------
    radius : float or ndarray
        Coil radius (to the wire centres). [m]
    pitch : float or ndarray
        Winding pitch. [m]
    wire_d : float or ndarray
        Bare (copper) wire diameter. [m]
    turns : float or ndarray
        Number of turns. [1]

    Returns
    -------
    L : float or ndarray
        Low-frequency inductance. [H]

    References
    ----------
    .. [1] E. B. Rosa, Bull. Bureau of Standards 4 (1907).
    .. [2] F. W. Grover, Inductance Calculations (1946), p. 150.

    Examples
    --------
    Ten turns of 0.8 mm wire at 1 mm pitch on a 10 mm radius; the
    filament sum for the same coil gives 1998.5 nH (:func:`strand_matrix`):

    >>> print(f"{rosa_corrected_inductance(0.01, 0.001, 0.0008, 10) * 1e9:.1f} nH")
    1999.2 nH
    """
    a, p, n = np.asarray(radius, float), np.asarray(pitch, float), np.asarray(turns, float)
    sheet = current_sheet_inductance(a, n * p, n)
    return sheet - MU0 * a * n * (rosa_ks(p, wire_d) + rosa_km(n))


def two_wire_inductance_per_length(D, d):
    """External inductance per unit length of a two-wire line.

    ``L′ = (µ0/π) acosh(D/d)``: the exact external inductance when the
    currents crowd to the facing surfaces (high frequency, proximity effect
    fully developed).  At low frequency with uniform currents the line has
    ``(µ0/π)[ln(2D/d) + 1/4]`` instead; the two agree within ~10 % only for
    ``D/d`` above about 10.

    Parameters
    ----------
    D : float or ndarray
        Centre-to-centre distance. [m]
    d : float or ndarray
        Conductor diameter. [m]

    Returns
    -------
    L' : float or ndarray
        Inductance of the loop (go and return) per metre of line. [H/m]

    References
    ----------
    .. [1] F. W. Grover, Inductance Calculations (1946), parallel round wires.
    .. [2] S. Ramo, J. R. Whinnery and T. Van Duzer, Fields and Waves in
       Communication Electronics, parallel-wire line.

    Examples
    --------
    Touching enamelled wires, 0.45 mm copper at 0.50 mm centres: by hand
    0.4 µH/m × acosh(1.111) = 186.9 nH/m:

    >>> print(f"{two_wire_inductance_per_length(0.50e-3, 0.45e-3) * 1e9:.1f} nH/m")
    186.9 nH/m
    """
    return MU0 / math.pi * np.arccosh(np.asarray(D, float) / np.asarray(d, float))


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


def _double_prefix(values, seg_len):
    """Second cumulative sums of each segment of ``values``, each with two leading zeros.

    For a segment ``g(0..n-1)`` the result ``C2`` has ``C2[t] = Σ_{u<t} Σ_{i<u} g(i)``
    for ``t = 0..n+1``.  Segments are padded to a common length within
    power-of-two size buckets so that no sum runs across segments (a global
    running sum would lose the small segments' digits to the large ones').

    Returns
    -------
    C2 : ndarray (flat), base : ndarray of int
        The sums and where each segment's ``C2[0]`` sits in them.
    """
    width = seg_len + 2
    bucket = np.ceil(np.log2(width)).astype(np.int64)
    starts = np.cumsum(seg_len) - seg_len
    base = np.empty(seg_len.size, dtype=np.int64)
    parts, offset = [], 0
    for b in _distinct(bucket):
        rows = np.flatnonzero(bucket == b)
        w = int(width[rows].max())
        block = np.zeros((rows.size, w))
        col, row = _aranges(np.zeros(rows.size, dtype=np.int64), seg_len[rows])
        block[row, col + 2] = values[starts[rows][row] + col]
        np.cumsum(block, axis=1, out=block)
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


def _lattice_sums(r_lo, r_hi, u, lat_lo, lat_hi, pitch, cache=None):
    """Double prefix sums of Maxwell's kernel on each class's lattice.

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
    return _double_prefix(kernel[e_base[k] + _fold(i, u[k]) - e_lo[k]], lat_hi - lat_lo + 1)


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
    layout : windsheet.layout.Layout
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

    >>> from windsheet.layout import cylinder_layout
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
    layout : windsheet.layout.Layout
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

    >>> from windsheet.layout import cylinder_layout
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


# ---------------------------------------------------------------------------
# Cored windings
# ---------------------------------------------------------------------------

def toroid_al(permeability, inner_d, outer_d, height):
    """Inductance factor of a rectangular-section toroidal core.

    ``AL = µ0 µr h ln(OD/ID) / (2π)``.

    Parameters
    ----------
    permeability : float or ndarray
        Relative permeability of the core material. [1]
    inner_d, outer_d : float or ndarray
        Inner and outer diameter of the core. [m]
    height : float or ndarray
        Core height (axial). [m]

    Returns
    -------
    AL : float or ndarray
        Inductance per turn squared. [H/turn²]

    References
    ----------
    .. [1] Ampère's law round a toroid of rectangular section; standard
       magnetics texts, e.g. C. W. T. McLyman, Transformer and Inductor
       Design Handbook, and common practice.

    Examples
    --------
    µr 2000, 20/40 mm, 10 mm high; by hand 2e-7 × 2000 × 0.01 × ln 2
    = 2.773 µH/turn²:

    >>> print(f"{toroid_al(2000, 0.02, 0.04, 0.01) * 1e6:.3f} µH")
    2.773 µH
    """
    return (MU0 * np.asarray(permeability, float) * np.asarray(height, float)
            * np.log(np.asarray(outer_d, float) / np.asarray(inner_d, float)) / (2 * math.pi))


def cored_strand_matrix(turns, al, coupling=1.0):
    """Strand inductance matrix of windings sharing one magnetic core.

    ``L_ij = k_ij · AL · N_i · N_j`` with ``k_ii = 1``.

    Parameters
    ----------
    turns : array_like, shape (strands,)
        Turns of each strand. [1]
    al : float
        Core inductance factor. [H/turn²]
    coupling : float or array_like, shape (strands, strands)
        Coupling coefficient between strands, 0…1; a scalar applies to every
        pair. [1]

    Returns
    -------
    L : ndarray, shape (strands, strands)
        Strand inductance matrix. [H]

    References
    ----------
    .. [1] Coupled-inductor relation M = k √(L1 L2); standard circuit and
       magnetics texts (common practice).

    Examples
    --------
    10 and 20 turns on AL = 2.5 µH, k = 0.98: L = AL N² on the diagonal,
    k AL N1 N2 off it:

    >>> print(cored_strand_matrix([10, 20], 2.5e-6, coupling=0.98) * 1e6)
    [[ 250.  490.]
     [ 490. 1000.]]
    """
    n = np.atleast_1d(np.asarray(turns, float))
    k = np.broadcast_to(np.asarray(coupling, float), (n.size, n.size)).copy()
    if np.any(k < 0) or np.any(k > 1):
        raise ValueError("coupling coefficients lie between 0 and 1")
    np.fill_diagonal(k, 1.0)
    return k * al * np.outer(n, n)
