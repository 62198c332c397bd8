"""Closed-form coil formulas: Nagaoka, Lundin, Wheeler, Brooks, Rosa, and cored windings.

Pure functions on SI numbers.  They serve the traveller as quick estimates
and the tests as cross-checks of the filament engine
(:func:`windsheet.physics.inductance.strand_matrix`); a cored winding's strand matrix
comes from its core's inductance factor here, as no filament sum applies.
"""

from __future__ import annotations

import math

import numpy as np

# Nagaoka's coefficient needs K and E; the filament module's AGM evaluates both.
from .inductance import MU0, _agm_elliptic

_INCH = 0.0254

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
