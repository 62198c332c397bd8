"""AC resistance of a winding's wire: skin effect and proximity effect.

Pure functions on SI numbers.  An isolated round wire (single layers, spaced
turns) takes the exact Bessel-function solution of the skin effect; a layered
winding takes Dowell's one-dimensional solution with the round wire replaced
by its equivalent square and the layer's porosity.  Both give the ratio of AC
to DC resistance at the same temperature.
"""

from __future__ import annotations

import math

import numpy as np

#: Permeability of free space. [H/m]
MU_0 = 4e-7 * math.pi
#: Above this ``x = a·sqrt(ωμσ)`` the Kelvin functions overflow; the
#: asymptotic series is then exact to better than 1e-9.
_KELVIN_MAX = 300.0


def skin_depth(frequency, resistivity, mu_r=1.0):
    """Depth at which a plane wave's current density falls by 1/e.

    Parameters
    ----------
    frequency : float or ndarray
        Frequency, > 0. [Hz]
    resistivity : float or ndarray
        Conductor resistivity at its working temperature. [Ω·m]
    mu_r : float
        Relative permeability of the conductor. [-]

    Returns
    -------
    delta : float or ndarray
        Skin depth sqrt(2ρ / (ωμ)). [m]

    References
    ----------
    .. [1] S. Ramo, J. R. Whinnery, T. Van Duzer, Fields and Waves in
       Communication Electronics, 3rd ed., Wiley (1994), §5.5.

    Examples
    --------
    >>> round(float(skin_depth(100e3, 1 / 58e6)) * 1e3, 4)      # copper at 100 kHz
    0.209
    """
    w = 2.0 * math.pi * np.asarray(frequency, dtype=float)
    return np.sqrt(2.0 * np.asarray(resistivity, dtype=float) / (w * MU_0 * mu_r))


def kelvin_ber_bei(x):
    """Kelvin functions ber x + i·bei x and their derivative, as complex numbers.

    ber x + i·bei x = J0(x·e^{3πi/4}) (DLMF 10.61.1), its derivative
    −e^{3πi/4}·J1(x·e^{3πi/4}); J0 and J1 by Bessel's integral
    Jn(z) = (1/π)∫₀^π cos(nθ − z sin θ) dθ (DLMF 10.9.1), summed by the
    trapezoidal rule, which converges exponentially for this periodic
    integrand.  The integrand is never larger than the result times √x, so
    there is no cancellation; with 64 + 2x points it agrees with scipy's
    AMOS ``jv`` to about 1e-14 up to x = 300 (``scipy.special.kelvin`` is
    itself off by about 5e-10 near x = 10).  Written out so
    that sizing an order does not import ``scipy.special`` (about 0.2 s).

    Parameters
    ----------
    x : float or ndarray
        Argument, √2·a/δ for a round wire of radius a. [-]

    Returns
    -------
    b, db : complex or ndarray
        ber x + i·bei x, and ber′x + i·bei′x. [-]

    References
    ----------
    .. [1] NIST DLMF §10.9.1 (Bessel's integral), §10.61.1 (Kelvin functions).

    Examples
    --------
    >>> b, db = kelvin_ber_bei(1.0)
    >>> print(f"{b.real:.6f} {b.imag:.6f}")      # ber 1, bei 1 (scipy.special.kelvin agrees)
    0.984382 0.249566
    """
    x = np.asarray(x, dtype=float)
    z = x * np.exp(0.75j * math.pi)
    n = int(64 + 2 * float(np.max(np.abs(x), initial=0.0)))
    th = np.linspace(0.0, math.pi, n + 1)
    w = np.full(n + 1, 1.0 / n)
    w[0] = w[-1] = 0.5 / n
    zs = z[..., None] * np.sin(th)
    j0 = (np.cos(zs) * w).sum(-1)
    j1 = (np.cos(th - zs) * w).sum(-1)
    return j0, -np.exp(0.75j * math.pi) * j1


def round_wire_ac_ratio(diameter, skin_depth_m):
    """AC/DC resistance ratio of an isolated straight round wire (skin effect).

    The exact solution of the diffusion equation in a round conductor, in
    Kelvin functions of ``x = √2·a/δ``::

        R/R0 = (x/2)·(ber x·bei′x − bei x·ber′x) / (ber′²x + bei′²x)

    Parameters
    ----------
    diameter : float or ndarray
        Conductor (copper) diameter. [m]
    skin_depth_m : float or ndarray
        Skin depth at the frequency (:func:`skin_depth`). [m]

    Returns
    -------
    ratio : float or ndarray
        R_ac / R_dc, ≥ 1. [-]

    References
    ----------
    .. [1] S. A. Schelkunoff, Electromagnetic Waves, Van Nostrand (1943), §7.
    .. [2] NIST DLMF §10.61 (Kelvin functions).

    Examples
    --------
    >>> round(float(round_wire_ac_ratio(2e-3, 0.5e-3)), 3)    # radius = 2 skin depths
    1.265
    """
    a = np.asarray(diameter, dtype=float) / 2.0
    x = np.sqrt(2.0) * a / np.asarray(skin_depth_m, dtype=float)
    xs = np.minimum(x, _KELVIN_MAX)
    be, bep = kelvin_ber_bei(xs)
    exact = (xs / 2.0) * (be.real * bep.imag - be.imag * bep.real) / (bep.real ** 2 + bep.imag ** 2)
    # Large x: R/R0 = a/(2δ) + 1/4 + 3δ/(32a) + ... (same source, asymptotic form).
    q = np.where(x > 0, a / np.where(x > 0, np.asarray(skin_depth_m, dtype=float), 1.0), 0.0)
    big = q / 2.0 + 0.25 + 3.0 / (32.0 * np.where(q > 0, q, 1.0))
    out = np.where(x > _KELVIN_MAX, big, np.where(x > 0, exact, 1.0))
    return float(out) if out.ndim == 0 else out


def dowell_penetration(diameter, skin_depth_m, spacing):
    """Dowell's Δ of a layer of round wires: equivalent square and layer porosity.

    Parameters
    ----------
    diameter : float or ndarray
        Conductor (copper) diameter. [m]
    skin_depth_m : float or ndarray
        Skin depth. [m]
    spacing : float or ndarray
        Centre distance between neighbouring conductors along the layer. [m]

    Returns
    -------
    delta_ratio : float or ndarray
        Δ = (π/4)^(3/4)·(d/δ)·sqrt(d/p). [-]

    References
    ----------
    .. [1] P. L. Dowell, "Effects of eddy currents in transformer windings",
       Proc. IEE 113 (8), pp. 1387–1394 (1966): a round wire of diameter d is
       taken as a square of side d·√π/2, the layer's porosity as that side over
       the spacing.

    Examples
    --------
    >>> round(float(dowell_penetration(1e-3, 1e-3, 1e-3)), 4)      # (π/4)^(3/4)
    0.8343
    """
    d = np.asarray(diameter, dtype=float)
    return (math.pi / 4.0) ** 0.75 * d / np.asarray(skin_depth_m, dtype=float) * np.sqrt(
        d / np.asarray(spacing, dtype=float))


def dowell_factor(delta_ratio, layers):
    """Dowell's AC/DC resistance ratio of a winding portion of ``layers`` layers.

    The mean over the ``m`` layers of a portion whose field is zero on one
    side (a winding between a core and the outside, or half a section)::

        F = Δ·[M(Δ) + (2/3)(m² − 1)·D(Δ)]
        M = (sinh 2Δ + sin 2Δ)/(cosh 2Δ − cos 2Δ),  D = (sinh Δ − sin Δ)/(cosh Δ + cos Δ)

    Parameters
    ----------
    delta_ratio : float or ndarray
        Layer thickness over skin depth, with porosity (:func:`dowell_penetration`). [-]
    layers : int or float
        Layers in the portion, m ≥ 1. [-]

    Returns
    -------
    F : float or ndarray
        R_ac / R_dc. [-]

    References
    ----------
    .. [1] P. L. Dowell, Proc. IEE 113 (8), pp. 1387–1394 (1966), eq. 15 and
       fig. 7 (his curves of F against Δ for m = 1 … 10).
    .. [2] E. C. Snelling, Soft Ferrites, 2nd ed., Butterworths (1988), §11.3
       (the low-frequency form F ≈ 1 + (5m² − 1)Δ⁴/45).

    Examples
    --------
    >>> round(float(dowell_factor(1.0, 1)), 4)
    1.0856
    >>> round(float(dowell_factor(1.0, 3)), 3)
    1.94
    """
    x = np.asarray(delta_ratio, dtype=float)
    m = float(layers)
    small = x < 1e-2
    xs = np.clip(np.where(small, 1.0, x), 1e-2, 20.0)   # beyond 20 both ratios are 1 to 1e-17
    M = (np.sinh(2 * xs) + np.sin(2 * xs)) / (np.cosh(2 * xs) - np.cos(2 * xs))
    D = (np.sinh(xs) - np.sin(xs)) / (np.cosh(xs) + np.cos(xs))
    big = np.where(x > 20.0, x, xs)
    F = big * (M + (2.0 / 3.0) * (m * m - 1.0) * D)
    out = np.where(small, 1.0 + (5.0 * m * m - 1.0) * x ** 4 / 45.0, F)
    return float(out) if out.ndim == 0 else out


def winding_ac_ratio(frequency, copper_diameter, resistivity, layers, spacing):
    """AC/DC resistance ratio of a winding's wire, and the model that gives it.

    Dowell's factor for the winding's layers, and the isolated round wire's
    skin effect; the larger is taken.  Dowell's one-dimensional field holds
    for close-wound layers (a single close-wound layer included); for spaced
    turns its porosity correction fades the proximity effect away and
    understates the skin effect, which the round-wire solution then gives.
    Taking the larger never understates the loss.

    Parameters
    ----------
    frequency : float
        Duty frequency, 0 for DC. [Hz]
    copper_diameter : float
        Conductor diameter. [m]
    resistivity : float
        Conductor resistivity at the working temperature. [Ω·m]
    layers : int
        Layers carrying the current the same way. [-]
    spacing : float
        Centre distance between neighbouring conductors along a layer. [m]

    Returns
    -------
    result : dict
        ``ratio``, ``dowell``, ``round_wire`` [-], ``skin_depth_m`` [m]
        (None at DC), ``model`` (words).

    References
    ----------
    See :func:`dowell_factor` and :func:`round_wire_ac_ratio`.

    Examples
    --------
    >>> r = winding_ac_ratio(100e3, 0.5e-3, 1 / 58e6, 1, 0.55e-3)
    >>> round(r["ratio"], 3), r["model"].split(" (")[0]
    (1.787, "Dowell's layer factor")
    """
    if frequency <= 0:
        return {"ratio": 1.0, "dowell": 1.0, "round_wire": 1.0, "skin_depth_m": None,
                "model": "DC: no skin or proximity effect"}
    delta = float(skin_depth(frequency, resistivity))
    iso = float(round_wire_ac_ratio(copper_diameter, delta))
    dow = float(dowell_factor(dowell_penetration(copper_diameter, delta, spacing), layers))
    if dow >= iso:
        model = f"Dowell's layer factor ({int(layers)} layer{'s' if layers != 1 else ''}, skin and proximity)"
    else:
        model = "isolated round wire, Bessel solution (skin effect; turns spaced)"
    return {"ratio": max(dow, iso), "dowell": dow, "round_wire": iso, "skin_depth_m": delta, "model": model}
