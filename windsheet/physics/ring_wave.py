"""The ring wave of a winding: a charged capacitor discharged into it, as a surge comparison tester does.

Pure functions on SI numbers.  The capacitor, the winding's own capacitance
beside it, the winding's inductance and its AC resistance form a series RLC
circuit; its free response is a damped sine whose frequency and decay the
tester shows.  A shorted turn lowers the inductance and adds loss at the ring
frequency (:mod:`windsheet.physics.shorted_turn`): the ring runs faster and
dies sooner.
"""

from __future__ import annotations

import math
from typing import Callable, Optional


def series_rlc_ring(inductance, resistance, capacitance) -> tuple[Optional[float], Optional[float]]:
    """Frequency and decay of the free ring of a series RLC circuit.

    Parameters
    ----------
    inductance : float
        [H]
    resistance : float
        Series resistance at the ring frequency. [ohm]
    capacitance : float
        The ringing capacitor plus the winding's own capacitance. [F]

    Returns
    -------
    frequency : float or None
        Damped frequency ``f_d = (1/2π)·√(1/(LC) − (R/2L)²)``. [Hz]
    decay : float or None
        Ratio of successive peaks of the same polarity, ``exp(−(R/2L)/f_d)`` [-]
        (1 for no loss).  Both None when the circuit is not underdamped.

    References
    ----------
    .. [1] The source-free series RLC circuit, underdamped case: e.g.
       C. K. Alexander and M. N. O. Sadiku, Fundamentals of Electric Circuits,
       5th ed., McGraw-Hill (2013), sec. 8.5, eqs. 8.23-8.36 (α = R/2L,
       ω_d = √(ω0² − α²)).

    Examples
    --------
    400 µH, 10 nF, 2 Ω: by hand ω0 = 5e5 rad/s, α = 2500 /s, f_d = 79.576 kHz,
    decay exp(−2500/79576) = 0.9691:

    >>> f, d = series_rlc_ring(400e-6, 2.0, 10e-9)
    >>> round(f / 1e3, 3), round(d, 4)
    (79.576, 0.9691)
    """
    alpha = resistance / (2.0 * inductance)
    w2 = 1.0 / (inductance * capacitance) - alpha * alpha
    if not w2 > 0:
        return None, None
    f = math.sqrt(w2) / (2.0 * math.pi)
    return f, math.exp(-alpha / f)


def ring_at_its_frequency(impedance_at: Callable[[float], complex], capacitance: float,
                          start: float, rounds: int = 12) -> tuple[Optional[float], Optional[float], complex]:
    """The ring of a winding whose series L and R depend on frequency, at the frequency it rings at.

    The winding's L and R (AC resistance, a shorted turn) are taken at the
    ring frequency, which depends on them; a few fixed-point rounds from
    ``start`` settle it (each changes it by the small AC share of R and L).

    Parameters
    ----------
    impedance_at : callable
        ``impedance_at(f) -> complex``: the winding's series impedance at
        ``f``. [ohm]
    capacitance : float
        The ringing capacitor plus the winding's own. [F]
    start : float
        First guess of the ring frequency. [Hz]
    rounds : int
        Most fixed-point rounds.

    Returns
    -------
    frequency, decay : float or None
        As :func:`series_rlc_ring`.
    impedance : complex
        The winding's impedance at that frequency. [ohm]

    References
    ----------
    See :func:`series_rlc_ring`.

    Examples
    --------
    A frequency-independent winding rings as the closed form says:

    >>> f, d, z = ring_at_its_frequency(lambda f: 2.0 + 2j * math.pi * f * 400e-6, 10e-9, 50e3)
    >>> round(f / 1e3, 3), round(d, 4)
    (79.576, 0.9691)
    """
    f = start
    z = impedance_at(f)
    decay = None
    for _ in range(rounds):
        lx = z.imag / (2.0 * math.pi * f)
        if not lx > 0:
            return None, None, z
        f_new, decay = series_rlc_ring(lx, z.real, capacitance)
        if f_new is None:
            return None, None, z
        done = abs(f_new - f) <= 1e-9 * f
        f = f_new
        z = impedance_at(f)
        if done:
            break
    lx = z.imag / (2.0 * math.pi * f)
    if not lx > 0:
        return None, None, z
    f, decay = series_rlc_ring(lx, z.real, capacitance)
    return f, decay, z
