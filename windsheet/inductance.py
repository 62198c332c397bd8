"""Inductance: closed-form coil formulas and the strand-by-strand filament method.

Pure functions on SI numbers (numpy-vectorised where it makes sense).  The
air-core engine, :func:`strand_matrix`, sums Maxwell's mutual inductance of
coaxial circles over every pair of turns and gathers the result by strand.
The handbook formulas (Nagaoka, Lundin, Wheeler, Brooks, Rosa) serve as
cross-checks and as quick estimates for a traveller.

Complete elliptic integrals are evaluated through Carlson's symmetric forms
(:func:`scipy.special.elliprd`, :func:`scipy.special.elliprf`), which lets
the differences K − E be written without cancellation at either end of the
modulus range.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.special import elliprd, elliprf

#: Permeability of free space. [H/m]  (The 2019 SI value differs by < 1e-9.)
MU0 = 4e-7 * math.pi
_INCH = 0.0254


# ---------------------------------------------------------------------------
# Filaments and loops
# ---------------------------------------------------------------------------

def maxwell_mutual(r1, r2, dz):
    """Mutual inductance of two coaxial circular filaments.

    Evaluated in Maxwell's second (Landen-transformed) form,
    ``M = 2 µ0 √(r1 r2) [K(k1) − E(k1)] / √k1`` with
    ``k1 = (1 − k′)/(1 + k′)``, and ``K − E = (k1²/3) R_D(0, 1 − k1², 1)``.
    Both ``k1`` and ``1 − k1²`` are formed from ``k′² = ((r1−r2)² + dz²) /
    ((r1+r2)² + dz²)`` directly, so the result keeps full relative precision
    for close turns (k → 1) and for distant ones (k → 0), where the usual
    form ``µ0 √(r1 r2) [(2/k − k)K − (2/k)E]`` cancels.

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
       inductance of coaxial circles) and §19.25 (Carlson forms of K, E).
    """
    r1, r2, dz = np.asarray(r1, float), np.asarray(r2, float), np.asarray(dz, float)
    far2 = (r1 + r2) ** 2 + dz ** 2
    kp = np.sqrt(((r1 - r2) ** 2 + dz ** 2) / far2)      # k′ = nearest / farthest distance
    k1 = (4.0 * r1 * r2 / far2) / (1.0 + kp) ** 2         # (1 − k′)/(1 + k′) without cancellation
    with np.errstate(divide="ignore"):
        rd = elliprd(0.0, 4.0 * kp / (1.0 + kp) ** 2, 1.0)
    m = (2.0 / 3.0) * MU0 * np.sqrt(r1 * r2) * k1 ** 1.5 * rd
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

    where ``(K − E)/k² = R_D(0, k′², 1)/3`` is used so that the long-coil end
    (``k → 0``, ``K_N → 1``) carries no cancellation.

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
    """
    x = np.asarray(D_over_l, float)
    k2 = x ** 2 / (1.0 + x ** 2)
    kp2 = 1.0 / (1.0 + x ** 2)
    kp = np.sqrt(kp2)
    rd = elliprd(0.0, kp2, 1.0)
    e = elliprf(0.0, kp2, 1.0) - k2 * rd / 3.0
    out = 4.0 / (3.0 * math.pi * kp) * (kp2 * rd / 3.0 + e - np.sqrt(k2))
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
    """
    return MU0 / math.pi * np.arccosh(np.asarray(D, float) / np.asarray(d, float))


# ---------------------------------------------------------------------------
# Strand-by-strand matrix, filament method (air core)
# ---------------------------------------------------------------------------

def _check_air_core(layout):
    if layout.kind == "toroid":
        raise ValueError("the filament method needs coaxial turns; a toroid's strand "
                         "matrix comes from cored_strand_matrix")


def _offset_counts(lo_a, hi_a, lo_b, hi_b):
    """Slot offsets ``m = s_a − s_b`` between two contiguous slot ranges
    ``[lo_a, hi_a)`` and ``[lo_b, hi_b)``, and how many slot pairs share each."""
    m = np.arange(lo_a - (hi_b - 1), hi_a - lo_b)
    count = np.minimum(hi_b, hi_a - m) - np.maximum(lo_b, lo_a - m)
    return m, count


def strand_matrix(layout):
    """Air-core inductance matrix between the strands of a layer winding.

    Filament method: every turn is a coaxial circle at its wire centre; the
    mutual inductance of each pair of turns is Maxwell's, each turn's own is
    that of a round-wire loop of the copper radius (low frequency, uniform
    current); the turn-by-turn sum is gathered by strand.

    Turns of one (layer, strand) group share radius and pitch, so between
    two groups the mutual inductance depends only on the slot offset ``m``:
    it is evaluated once per distinct offset and weighted by the number of
    slot pairs at that offset.  Cost is O(groups² × slots), not O(turns²).

    Parameters
    ----------
    layout : windsheet.layout.Layout
        A cylinder or bobbin layout (coaxial turns).

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
    """
    _check_air_core(layout)
    groups = list(layout.groups())
    p = layout.pitch
    a_cu = layout.copper_diameter / 2
    L = np.zeros((layout.strands, layout.strands))
    for ia, (_, sa, ra, za, lo_a, hi_a) in enumerate(groups):
        for ib in range(ia, len(groups)):
            _, sb, rb, zb, lo_b, hi_b = groups[ib]
            m, count = _offset_counts(lo_a, hi_a, lo_b, hi_b)
            dz = za - zb + m * p
            if ia == ib:
                # The zero offset of a group with itself is each turn's own inductance.
                off = m != 0
                total = (count[off] @ maxwell_mutual(ra, rb, dz[off])
                         + count[~off].sum() * loop_self_inductance(ra, a_cu))
            else:
                kernel = maxwell_mutual(ra, rb, dz)
                if not np.all(np.isfinite(kernel)):
                    raise ValueError("two turns of the layout coincide")
                total = count @ kernel
            L[sa, sb] += total
            if ia != ib:
                L[sb, sa] += total
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
    """
    n = np.atleast_1d(np.asarray(turns, float))
    k = np.broadcast_to(np.asarray(coupling, float), (n.size, n.size)).copy()
    if np.any(k < 0) or np.any(k > 1):
        raise ValueError("coupling coefficients lie between 0 and 1")
    np.fill_diagonal(k, 1.0)
    return k * al * np.outer(n, n)
