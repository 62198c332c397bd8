"""How hot a winding runs on its duty: surface heat balance, hot spot, thermal class.

Pure functions on SI numbers (temperatures in °C where the name says ``_C``,
differences in K).  The copper loss leaves the winding's outer surface by
natural convection and radiation in still air; inside, it is conducted out
through the build.  The loss rises with the copper's temperature, so the
balance is solved with the loss as a function of temperature.
"""

from __future__ import annotations

import math

#: Stefan–Boltzmann constant. [W/(m²·K⁴)]
STEFAN_BOLTZMANN = 5.670374419e-8
#: Emissivity of an enamelled or varnished winding surface (memory: 0.85–0.95 for organic films).
EMISSIVITY = 0.9
#: Effective thermal conductivity of a winding across its layers, enamelled round wire with air
#: between the turns (memory: 0.2–0.5 W/(m·K); the low end taken, so the hot spot is not understated).
WINDING_CONDUCTIVITY = 0.3
#: Hot spot this close below the thermal class reads marginal (windsheet's own margin). [K]
THERMAL_MARGIN_K = 10.0
#: Current density usual for naturally cooled small windings (common practice, memory). [A/mm²]
CURRENT_DENSITY_RANGE_A_PER_MM2 = (2.0, 4.0)
#: A surface at or above this temperature burns on lasting contact: the traveller cautions
#: (common practice, memory: touch-temperature limits for surfaces held are near 60 °C). [°C]
HOT_SURFACE_C = 60.0

METHOD = ("surface heat balance in still air: natural convection by the simplified laminar correlation "
          "for air, h = 1.32·(ΔT/D)^¼ W/(m²·K) (horizontal cylinder), plus grey-body radiation "
          "(Stefan–Boltzmann, ε = 0.9), or McLyman's empirical rise 450·ψ^0.826 where that is hotter "
          "(small coils); hot spot by conduction out through the build")


def natural_convection_coefficient(rise_K, length, coefficient=1.32):
    """Heat-transfer coefficient of natural convection from a surface to still air.

    Parameters
    ----------
    rise_K : float
        Surface temperature over ambient, ≥ 0. [K]
    length : float
        Characteristic length: the outer diameter of a horizontal cylinder. [m]
    coefficient : float
        1.32 for a horizontal cylinder, 1.42 for a vertical surface of that height. [W/(m^1.75·K^1.25)]

    Returns
    -------
    h : float
        [W/(m²·K)]

    References
    ----------
    .. [1] J. P. Holman, Heat Transfer, 10th ed., McGraw-Hill (2010), §7-7,
       table 7-2: simplified equations for free convection from surfaces to
       air at atmospheric pressure, laminar range (memory).

    Examples
    --------
    >>> round(natural_convection_coefficient(40.0, 0.05), 2)
    7.02
    """
    return coefficient * (max(float(rise_K), 0.0) / float(length)) ** 0.25


def radiation_coefficient(surface_C, ambient_C, emissivity=EMISSIVITY):
    """Linearised radiation coefficient of a grey surface to surroundings at ambient.

    Parameters
    ----------
    surface_C, ambient_C : float
        Surface and surroundings temperatures. [°C]
    emissivity : float
        Surface emissivity. [-]

    Returns
    -------
    h : float
        εσ(Ts² + Ta²)(Ts + Ta), so that the radiated flux is h·(Ts − Ta). [W/(m²·K)]

    References
    ----------
    .. [1] J. P. Holman, Heat Transfer, 10th ed. (2010), §8-3 (Stefan–Boltzmann law).

    Examples
    --------
    >>> round(radiation_coefficient(65.0, 25.0), 2)
    6.6
    """
    ts, ta = float(surface_C) + 273.15, float(ambient_C) + 273.15
    return emissivity * STEFAN_BOLTZMANN * (ts * ts + ta * ta) * (ts + ta)


def surface_rise(power, area, length, ambient_C, emissivity=EMISSIVITY):
    """Surface temperature rise at which convection and radiation carry the loss away.

    Parameters
    ----------
    power : float
        Heat leaving the surface. [W]
    area : float
        Outer surface of the winding. [m²]
    length : float
        Its characteristic length (:func:`natural_convection_coefficient`). [m]
    ambient_C : float
        Still air and surroundings. [°C]
    emissivity : float
        [-]

    Returns
    -------
    rise : float
        Surface over ambient. [K]

    References
    ----------
    :func:`natural_convection_coefficient`, :func:`radiation_coefficient`.

    Examples
    --------
    >>> round(surface_rise(3.0, 0.01, 0.05, 25.0), 1)     # 300 W/m²
    24.4
    """
    if power <= 0:
        return 0.0

    def excess(rise):
        h = natural_convection_coefficient(rise, length) + radiation_coefficient(ambient_C + rise, ambient_C,
                                                                                 emissivity)
        return h * rise * area - power

    lo, hi = 0.0, 1.0
    while excess(hi) < 0 and hi < 1e5:
        hi *= 2.0
    for _ in range(80):                   # bisection: the heat carried rises monotonically with the rise
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if excess(mid) < 0 else (lo, mid)
    return 0.5 * (lo + hi)


def empirical_surface_rise(power, area):
    """Surface temperature rise of a naturally cooled magnetic component by McLyman's rule.

    An empirical fit to measured transformers and inductors in still air; it has no
    size in it, which is why windsheet keeps it beside the heat balance as a floor.

    Parameters
    ----------
    power : float
        Heat leaving the surface. [W]
    area : float
        Surface it leaves by. [m²]

    Returns
    -------
    rise : float
        ΔT = 450·ψ^0.826, ψ = power/area in W/cm². [K]

    References
    ----------
    .. [1] C. W. T. McLyman, Transformer and Inductor Design Handbook, 3rd ed.,
       Marcel Dekker (2004), ch. 6, temperature rise against surface dissipation
       (memory).

    Examples
    --------
    >>> round(empirical_surface_rise(3.0, 0.01), 1)       # ψ = 0.03 W/cm²
    24.8
    """
    if power <= 0:
        return 0.0
    return 450.0 * (float(power) / (float(area) * 1e4)) ** 0.826


def safe_surface_rise(power, area, length, ambient_C, emissivity=EMISSIVITY):
    """The larger of the heat balance's surface rise and McLyman's empirical rise.

    The heat balance's convection grows as the coil gets smaller (h ~ D^-1/4), so on
    small coils it reads up to some 17 % below McLyman's rule; a wrong "pass" on
    heating is the costly error, so the hotter of the two is taken.

    Parameters
    ----------
    power, area, length, ambient_C, emissivity : float
        As :func:`surface_rise`. [W], [m²], [m], [°C], [-]

    Returns
    -------
    rise : float
        Surface over ambient. [K]
    basis : str
        ``"balance"`` or ``"empirical"``: which of the two governed.

    References
    ----------
    :func:`surface_rise`, :func:`empirical_surface_rise`.

    Examples
    --------
    A 20 mm coil at 0.01 W/cm²: McLyman's rule is the hotter.

    >>> rise, basis = safe_surface_rise(0.1, 0.001, 0.02, 25.0)
    >>> round(rise, 2), basis
    (10.03, 'empirical')
    """
    balance = surface_rise(power, area, length, ambient_C, emissivity)
    empirical = empirical_surface_rise(power, area)
    return (empirical, "empirical") if empirical > balance else (balance, "balance")


def build_rise(power, area, build, conductivity=WINDING_CONDUCTIVITY):
    """Hot-spot rise over the surface: uniform loss conducted out through the build.

    A slab of thickness ``build`` generating heat evenly, insulated on the
    form side and cooled at its outer face, peaks ``q·t/(2k)`` above that
    face at the form (the heat taken inward through the form is neglected,
    which errs hot).  Its mean is two thirds of that peak.

    Parameters
    ----------
    power : float
        Loss in the winding. [W]
    area : float
        Surface it leaves by. [m²]
    build : float
        Radial thickness of the winding. [m]
    conductivity : float
        Effective conductivity across the layers. [W/(m·K)]

    Returns
    -------
    rise : float
        Hot spot over the outer surface. [K]

    References
    ----------
    .. [1] H. S. Carslaw, J. C. Jaeger, Conduction of Heat in Solids, 2nd ed.,
       Oxford (1959), §2.11 (steady slab with uniform heat generation).

    Examples
    --------
    >>> round(build_rise(3.0, 0.01, 3e-3), 2)               # 300 W/m² through 3 mm
    1.5
    """
    return float(power) / float(area) * float(build) / (2.0 * conductivity)


def winding_temperatures(loss_at, area, length, build, ambient_C, emissivity=EMISSIVITY,
                         conductivity=WINDING_CONDUCTIVITY, limit_C=1000.0):
    """Steady temperatures of a winding whose loss rises with its temperature.

    Parameters
    ----------
    loss_at : callable
        ``loss_at(T)`` is the copper loss with the winding at mean temperature ``T``. [°C] → [W]
    area, length : float
        Outer surface [m²] and its characteristic length [m].
    build : float
        Radial thickness of the winding. [m]
    ambient_C : float
        [°C]
    emissivity, conductivity : float
        As :func:`surface_rise` and :func:`build_rise`.
    limit_C : float
        Above this the balance is taken to run away (no steady state). [°C]

    Returns
    -------
    result : dict
        ``loss_W``, ``surface_rise_K`` (:func:`safe_surface_rise`), ``surface_rise_basis``,
        ``surface_C``, ``hot_spot_C``, ``mean_C`` [°C], ``converged`` (False: thermal runaway, the temperatures are
        those at ``limit_C``).

    References
    ----------
    :func:`safe_surface_rise`, :func:`build_rise`.

    Examples
    --------
    >>> r = winding_temperatures(lambda t: 3.0 * (1 + 0.00393 * (t - 20)), 0.01, 0.05, 1e-3, 25.0)
    >>> round(r["mean_C"], 1), r["converged"], r["surface_rise_basis"]
    (52.8, True, 'empirical')
    """
    mean = float(ambient_C)
    out = None
    for _ in range(100):
        power = float(loss_at(mean))
        s, basis = safe_surface_rise(power, area, length, ambient_C, emissivity)
        b = build_rise(power, area, build, conductivity)
        new_mean = ambient_C + s + 2.0 * b / 3.0
        out = {"loss_W": power, "surface_rise_K": s, "surface_rise_basis": basis, "surface_C": ambient_C + s,
               "hot_spot_C": ambient_C + s + b, "mean_C": new_mean, "converged": True}
        if new_mean > limit_C:
            out["converged"] = False
            return out
        if abs(new_mean - mean) < 1e-3:
            return out
        mean = new_mean
    return out


def thermal_verdict(hot_spot_C, thermal_class_C, margin_K=THERMAL_MARGIN_K, converged=True):
    """Judge the hot spot against the wire's thermal class (IEC 60085).

    Parameters
    ----------
    hot_spot_C : float
        Estimated hottest point of the winding. [°C]
    thermal_class_C : float or None
        The enamel's thermal class, its temperature index. [°C]
    margin_K : float
        Below the class by less than this reads marginal. [K]
    converged : bool
        False when the heat balance ran away.

    Returns
    -------
    verdict, reason : str
        ``"pass"``, ``"marginal"``, ``"fail"`` (or ``"unknown"`` without a
        class), and one line saying why.

    References
    ----------
    .. [1] IEC 60085, Electrical insulation — Thermal evaluation and
       designation (thermal classes 105 … 240 °C; memory).

    Examples
    --------
    >>> thermal_verdict(120.0, 155)[0], thermal_verdict(150.0, 155)[0], thermal_verdict(160.0, 155)[0]
    ('pass', 'marginal', 'fail')
    """
    if not converged:
        return "fail", ("Thermal runaway: the copper loss grows faster with temperature than the surface can "
                        "shed it in still air; no steady temperature below 1000 °C.")
    if thermal_class_C is None:
        return "unknown", f"Hot spot about {hot_spot_C:.0f} °C; the wire's thermal class is not known."
    if hot_spot_C > thermal_class_C:
        return "fail", (f"Hot spot about {hot_spot_C:.0f} °C is over the wire's thermal class "
                        f"{thermal_class_C:.0f} °C: the enamel will age fast.")
    if hot_spot_C > thermal_class_C - margin_K:
        return "marginal", (f"Hot spot about {hot_spot_C:.0f} °C is within {margin_K:.0f} K of the wire's "
                            f"thermal class {thermal_class_C:.0f} °C.")
    return "pass", (f"Hot spot about {hot_spot_C:.0f} °C is below the wire's thermal class "
                    f"{thermal_class_C:.0f} °C by {thermal_class_C - hot_spot_C:.0f} K.")


def current_density(current, copper_diameter):
    """Current density in a round conductor.

    Parameters
    ----------
    current : float or ndarray
        rms current. [A]
    copper_diameter : float
        [m]

    Returns
    -------
    J : float or ndarray
        [A/mm²]

    References
    ----------
    Definition.

    Examples
    --------
    >>> round(current_density(1.0, 0.5e-3), 3)
    5.093
    """
    return current / (math.pi * (copper_diameter * 1e3) ** 2 / 4.0)
