"""Bench readings reduced to the quantities they stand for: resonance, series pairs, coupling.

Pure functions on SI numbers, used by the sign-off to turn what a meter shows into
the inductance, mutual inductance and coupling it predicts.
"""

from __future__ import annotations

import math


def resonance_inductance(resonant_frequency, capacitance):
    """Inductance that rings at ``resonant_frequency`` with ``capacitance``.

    Parameters
    ----------
    resonant_frequency : float or ndarray
        Frequency of the parallel (or series) resonance observed. [Hz]
    capacitance : float or ndarray
        Known capacitor across the coil. [F]

    Returns
    -------
    L : float or ndarray
        Inductance, ``1 / ((2 pi f)^2 C)``. [H]  The coil's own
        self-capacitance adds to ``C``; with a capacitor much larger than it
        the error is their ratio.

    References
    ----------
    .. [1] Thomson's resonance condition, omega^2 L C = 1; e.g. F. E. Terman,
       Radio Engineers' Handbook, McGraw-Hill, 1943, sec. 3.

    Examples
    --------
    A coil ringing at 159.15 kHz against 10 nF is 100 µH:

    >>> round(resonance_inductance(159154.9431, 10e-9) * 1e6, 4)
    100.0
    """
    omega = 2.0 * math.pi * resonant_frequency
    return 1.0 / (omega * omega * capacitance)


def mutual_from_series(series_aiding, series_opposing):
    """Mutual inductance from series-aiding and series-opposing readings.

    Parameters
    ----------
    series_aiding, series_opposing : float or ndarray
        Inductance of two windings in series, fluxes adding / opposing. [H]

    Returns
    -------
    M : float or ndarray
        ``(La - Lo) / 4``. [H]  From La = L1 + L2 + 2M and Lo = L1 + L2 - 2M.

    References
    ----------
    .. [1] F. W. Grover, Inductance Calculations, Van Nostrand, 1946, ch. 1
       (the series-aiding / series-opposing method of measuring M).

    Examples
    --------
    >>> mutual_from_series(243e-6, 3e-6) * 1e6
    60.0
    """
    return (series_aiding - series_opposing) / 4.0


def coupling_coefficient(mutual, l1, l2):
    """Coefficient of coupling ``k = M / sqrt(L1 L2)``.

    Parameters
    ----------
    mutual : float or ndarray
        Mutual inductance. [H]
    l1, l2 : float or ndarray
        Self-inductances of the two windings. [H]

    Returns
    -------
    k : float or ndarray
        Coupling coefficient [-], between -1 and 1 for physical windings.

    References
    ----------
    .. [1] F. W. Grover, Inductance Calculations, Van Nostrand, 1946, ch. 1.

    Examples
    --------
    >>> round(coupling_coefficient(60e-6, 61e-6, 61e-6), 4)
    0.9836
    """
    return mutual / math.sqrt(l1 * l2)
