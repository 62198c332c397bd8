"""Partial discharge between insulated conductors: Paschen's law and the inception voltage
from the construction.

Pure functions on SI numbers.  Between two enamelled conductors the field
crosses each enamel film, then air, then the other film (and, between taped
layers, air on both sides of the tape).  Along a path of air ``s`` the solid
layers act as capacitors in series with the air, so the air takes the share
``s / (n·s + Σ t_i/ε_i)`` of the voltage (``n`` air gaps in series).  A
discharge can start once that share reaches Paschen's breakdown of the air
path; the inception voltage is the lowest terminal voltage at which any path
between the two conductors does:

``PDIV = min over s ≥ s0 of  V_Paschen(p·s) · (n·s + Σ t_i/ε_i) / s``

with ``s0`` the narrowest air gap between them (0 for touching turns).  This
is the published way of estimating the PDIV of a twisted pair from its
geometry.  Where there is no air (a potted winding) there is no Paschen
path: the solid insulation's own strength governs, and voids in the potting,
which only a partial-discharge test of finished parts can find.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from .constants import ATMOSPHERE, TORR

# Paschen constants for air, Townsend form (Bazelyan & Raizer; A = 15 /(cm·Torr),
# B = 365 V/(cm·Torr), gamma = 0.01), converted to SI.
_TORR_CM = TORR * 1e-2  # [Pa·m]
PASCHEN_A = 15.0 / _TORR_CM       # [1/(Pa·m)]
PASCHEN_B = 365.0 / _TORR_CM      # [V/(Pa·m)]
PASCHEN_GAMMA = 0.01

#: Impregnation of the finished winding.
IMPREGNATIONS = ("none", "varnish", "potted")
#: A dip-and-bake varnish coat builds on every wire and fills the narrowest
#: part of each air wedge; about 10 µm per surface, εr about 3.5 (memory:
#: polyester and epoxy varnishes 3–4).  The voids a dip leaves are not credited.
VARNISH_COAT = 10e-6
VARNISH_EPS_R = 3.5


def paschen_breakdown(pd, A=PASCHEN_A, B=PASCHEN_B, gamma=PASCHEN_GAMMA):
    """Breakdown voltage of a uniform gas gap by Paschen's law.

    Parameters
    ----------
    pd : float or ndarray
        Pressure × gap. [Pa·m]
    A : float
        Saturation ionisation constant, air: 15 /(cm·Torr). [1/(Pa·m)]
    B : float
        Constant related to ionisation energy, air: 365 V/(cm·Torr). [V/(Pa·m)]
    gamma : float
        Secondary electron emission coefficient (0.01 usual). [-]

    Returns
    -------
    V : float or ndarray
        ``B pd / (ln(A pd) − ln ln(1 + 1/γ))``; ``inf`` left of the curve's
        asymptote, where the gap is too short for an avalanche. [V]

    References
    ----------
    .. [1] F. Paschen, Ann. Phys. 273(5):69, 1889.
    .. [2] Constants for air: E. M. Bazelyan, Yu. P. Raizer, Spark Discharge
       (1998); Yu. P. Raizer, Gas Discharge Physics (1991) (memory; also seen
       in secondary copies).

    Examples
    --------
    >>> round(paschen_breakdown(ATMOSPHERE * 1e-3))     # 1 mm of air
    5035
    """
    x = np.asarray(pd, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        denom = np.log(A * x) - math.log(math.log1p(1.0 / gamma))
        v = np.where(denom > 0, B * x / np.where(denom > 0, denom, 1.0), np.inf)
    return float(v) if v.ndim == 0 else v


def paschen_minimum(A=PASCHEN_A, B=PASCHEN_B, gamma=PASCHEN_GAMMA):
    """Paschen's minimum, from d V/d(pd) = 0.

    Returns
    -------
    pd_min : float
        ``e ln(1 + 1/γ) / A``. [Pa·m]
    V_min : float
        ``e B ln(1 + 1/γ) / A``. [V]

    References
    ----------
    As :func:`paschen_breakdown`.

    Examples
    --------
    >>> pd, v = paschen_minimum()
    >>> round(pd / ATMOSPHERE * 1e6, 1), round(v)    # µm at 1 atm, volts
    (11.0, 305)
    """
    k = math.e * math.log1p(1.0 / gamma) / A
    return k, B * k


def air_density_ratio(temperature_C, reference_C=20.0):
    """Number density of air at a temperature over its density at the reference, at one pressure.

    A winding breathes: its air stays at the room's pressure as it warms, so
    the gas density falls as ``T_ref / T`` (ideal gas).  Paschen's law is a
    law of density × gap (similarity), so the hot inception voltage is the
    cold construction's at the pressure ``p · T_ref / T``.

    Parameters
    ----------
    temperature_C : float
        Air temperature, e.g. the winding's hot spot. [degC]
    reference_C : float
        Temperature of the reference value (a PDIV at 20 °C). [degC]

    Returns
    -------
    ratio : float
        ``(reference + 273.15) / (temperature + 273.15)``. [-]

    References
    ----------
    .. [1] Ideal gas law; Paschen's similarity law (breakdown a function of
       N·d, N the gas number density), e.g. Yu. P. Raizer, Gas Discharge
       Physics (1991), ch. 7 (memory).

    Examples
    --------
    >>> round(air_density_ratio(155.0), 3)            # 293.15 K / 428.15 K
    0.685
    """
    return (float(reference_C) + 273.15) / (float(temperature_C) + 273.15)


def air_gap_share(air_path, solid, gaps=1):
    """Share of the voltage between two conductors that one air path takes.

    Parameters
    ----------
    air_path : float or ndarray
        Length of air in each of the ``gaps`` air gaps along the path. [m]
    solid : float or ndarray
        ``Σ t_i/ε_i`` of the solid layers in series (films, tape). [m]
    gaps : int or ndarray
        Air gaps in series along the path (2 either side of a tape). [-]

    Returns
    -------
    share : float or ndarray
        ``s / (n·s + Σ t_i/ε_i)``: series capacitors of equal area. [-]

    References
    ----------
    Plane dielectrics in series, standard electrostatics; applied along the
    field lines between enamelled wires as in the twisted-pair estimates
    cited in :func:`inception_voltage`.

    Examples
    --------
    >>> round(float(air_gap_share(20e-6, 2 * 25e-6 / 3.5)), 3)
    0.583
    """
    s = np.asarray(air_path, dtype=float)
    return s / (np.asarray(gaps) * s + np.asarray(solid, dtype=float))


def _inception_one(s0, solid, gaps, pressure, n_grid=600):
    """Minimum over air paths s ≥ s0 of V_Paschen(p s)·(n s + Σ)/s (scalar inputs)."""
    s_asym = math.log1p(1.0 / PASCHEN_GAMMA) / PASCHEN_A / pressure  # shortest gap with an avalanche
    lo, hi = math.log(s_asym * (1 + 1e-9)), math.log(1.0)

    def f(log_s):
        s = np.exp(log_s)
        return paschen_breakdown(pressure * s) * (gaps * s + solid) / s

    grid = np.linspace(lo, hi, n_grid)
    k = int(np.argmin(f(grid)))
    a, b = grid[max(k - 1, 0)], grid[min(k + 1, n_grid - 1)]
    g = (math.sqrt(5) - 1) / 2
    for _ in range(60):  # golden section on the bracketing interval (the curve has one minimum)
        c, d = b - g * (b - a), a + g * (b - a)
        if f(c) < f(d):
            b = d
        else:
            a = c
    s_star = math.exp(0.5 * (a + b))
    s = max(s_star, s0)
    return float(f(math.log(s))), s


@lru_cache(maxsize=4096)
def _inception_cached(s0, solid, gaps, pressure):
    """:func:`_inception_one`'s voltage, remembered: a sizing asks for the same few constructions at
    20 °C, hot, and at both films, again for every remedy it tries."""
    return _inception_one(s0, solid, gaps, pressure)[0]


def inception_voltage(min_air_gap, solid, gaps=1, pressure=ATMOSPHERE):
    """Partial-discharge inception voltage between two insulated conductors.

    ``PDIV = min over s ≥ s0/n of V_Paschen(p·s)·(n·s + Σ t_i/ε_i)/s``: the
    lowest voltage between the conductors at which the air across some path
    reaches Paschen's breakdown, the solid layers on that path dividing the
    voltage with the air as capacitors in series.

    Parameters
    ----------
    min_air_gap : float or ndarray
        Narrowest total air distance between the two conductors' insulation
        (0 for touching; for ``n`` gaps in series, their sum). [m]
    solid : float or ndarray
        ``Σ t_i/ε_i`` of the solid layers on the path: both enamel films
        ``2t/εr``, plus a tape ``τ/εt`` between layers. [m]
    gaps : int or ndarray
        Air gaps in series on the path: 1 between enamelled wires, 2 when a
        tape lies between them (air either side). [-]
    pressure : float
        Air pressure. [Pa]

    Returns
    -------
    pdiv : float or ndarray
        Inception voltage, peak. [V]  With no solid layer, Paschen's minimum.

    Notes
    -----
    Below the same criterion applied to a 2-D finite-difference field
    solution of two enamelled wires (the safe side), never above: 1–10 % low
    touching at the thickest IEC 60317-0-1 films, 1–7 % at the thinnest,
    0.1–1 mm copper (computed, tests/test_discharge.py).  The
    straight-path series model is the usual hand form; field-solver versions
    of the same method trace the air paths along field lines.

    References
    ----------
    .. [1] F. Paschen, Ann. Phys. 273(5):69, 1889; constants as
       :func:`paschen_breakdown`.
    .. [2] T. W. Dakin, H. M. Philofsky, W. C. Divens, "Effect of electric
       discharges on the breakdown of solid insulation", AIEE Trans. 73,
       1954 (air in series with a solid film against Paschen's curve; memory).
    .. [3] M. Kaufhold, G. Börner, M. Eberhardt, J. Speck, "Failure mechanism
       of the interturn insulation of low voltage electric machines fed by
       pulse-controlled inverters", IEEE Electrical Insulation Magazine
       12(5):9, 1996 (twisted-pair PDIV from the air-gap field and
       Paschen's curve; memory).
    .. [4] L. Lusuardi, A. Cavallini et al., "Insulation design of low
       voltage electrical motors fed by PWM inverters", IEEE Electrical
       Insulation Magazine 35(3):7, 2019 (memory).

    Examples
    --------
    >>> round(inception_voltage(0.0, 2 * 34.7e-6 / 3.5))   # 0.50 mm grade 2, touching
    683
    >>> round(inception_voltage(0.0, 0.0)) == round(paschen_minimum()[1])
    True
    """
    g0, sol, n = np.broadcast_arrays(np.asarray(min_air_gap, dtype=float),
                                     np.asarray(solid, dtype=float), np.asarray(gaps, dtype=float))
    flat = np.column_stack([np.round(g0.ravel(), 12), np.round(sol.ravel(), 12), n.ravel()])
    uniq, inverse = _distinct_rows(flat)
    values = np.array([_inception_cached(float(u[0] / u[2]), float(u[1]), float(u[2]), float(pressure))
                       for u in uniq])
    out = values[inverse].reshape(g0.shape)
    return float(out) if out.ndim == 0 else out


def _distinct_rows(rows):
    """Distinct rows of a 2-D array and the index of each row's distinct one.

    The same as ``np.unique(rows, axis=0, return_inverse=True)`` by one lexical
    sort: ``np.unique`` with an axis sorts a structured view and took about a
    second on 50,000 pairs.
    """
    if rows.shape[0] == 0:
        return rows, np.zeros(0, dtype=np.int64)
    order = np.lexsort(rows.T[::-1])
    s = rows[order]
    new = np.concatenate([[True], np.any(s[1:] != s[:-1], axis=1)])
    inverse = np.empty(rows.shape[0], dtype=np.int64)
    inverse[order] = np.cumsum(new) - 1
    return s[new], inverse


def construction_inception(gap, across_tape, film, eps_r, tape=0.0, tape_eps_r=3.2,
                           impregnation="none", pressure=ATMOSPHERE):
    """PDIV of each neighbour pair from how the winding is built.

    Parameters
    ----------
    gap : float or ndarray
        Distance between the two insulation surfaces, tape included. [m]
    across_tape : bool or ndarray
        A layer tape lies between the two.
    film : float
        Enamel film thickness, ``(overall − copper)/2``. [m]
    eps_r : float
        Relative permittivity of the enamel. [-]
    tape, tape_eps_r : float
        Layer tape thickness [m] and relative permittivity [-].
    impregnation : str
        ``"none"``; ``"varnish"`` (a coat of :data:`VARNISH_COAT` on every
        surface, in series, filling the narrowest air); ``"potted"`` (no air
        path: no Paschen inception, ``inf``).
    pressure : float
        Air pressure. [Pa]

    Returns
    -------
    pdiv : ndarray
        Inception voltage of each pair, peak, at 20 °C. [V]

    References
    ----------
    As :func:`inception_voltage`; varnish coat common practice (memory).

    Examples
    --------
    >>> construction_inception([0.0, 0.5e-3], [False, True], 25e-6, 3.5, tape=0.5e-3).round().tolist()
    [595.0, 2982.0]
    """
    if impregnation not in IMPREGNATIONS:
        raise ValueError(f"impregnation is one of {', '.join(IMPREGNATIONS)}, got {impregnation!r}")
    gap = np.atleast_1d(np.asarray(gap, dtype=float))
    across = np.broadcast_to(np.asarray(across_tape, dtype=bool), gap.shape)
    if impregnation == "potted":
        return np.full(gap.shape, np.inf)
    coat = VARNISH_COAT if impregnation == "varnish" else 0.0
    tape_here = np.where(across, tape, 0.0)
    solid = 2.0 * film / eps_r + tape_here / tape_eps_r + 2.0 * coat / VARNISH_EPS_R
    air = np.maximum(gap - tape_here - 2.0 * coat, 0.0)
    return inception_voltage(air, solid, np.where(across, 2, 1), pressure)
