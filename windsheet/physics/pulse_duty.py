"""Copper loss of a winding on a repeated pulse: from the pulse's width or its energy.

Pure functions on SI numbers.  A rectangular voltage pulse of peak ``V`` and
width ``w`` across a winding of resistance ``R`` and inductance ``L`` drives
the current of the series RL circuit, i(t) = (V/R)(1 − e^(−t/τ)), τ = L/R;
after the pulse the current decays through the winding's own resistance.  All
the energy the pulse delivers is then dissipated in the copper: the stored
½LI² too, where in service part of it may go to a clamp or a load, so the
loss errs hot.  Averaged over the repetition period, the loss is that of an
rms current I_rms = √(f·∫i²dt).
"""

from __future__ import annotations

import math

#: The current is taken to have died away after this many time constants (e^−5 < 1 %).
DECAY_TIME_CONSTANTS = 5.0


def rl_pulse_action(v_peak, resistance, inductance, width):
    """∫i²dt of one rectangular voltage pulse on a series RL winding, its decay included.

    Parameters
    ----------
    v_peak : float
        Pulse amplitude across the winding. [V]
    resistance : float
        Winding resistance, > 0. [ohm]
    inductance : float
        Winding inductance, ≥ 0. [H]
    width : float
        Pulse width. [s]

    Returns
    -------
    action : float
        ∫i²dt over the pulse and the decay after it, (V/R)²·τ·(x − 1 + e^(−x)) with
        τ = L/R and x = width/τ; R times it is the energy the pulse leaves in the
        winding. [A²·s]

    References
    ----------
    .. [1] Series RL step response, i(t) = (V/R)(1 − e^(−tR/L)), and the free decay
       i(t) = I·e^(−tR/L) after it: standard circuit theory (e.g. Hayt, Kemmerly &
       Durbin, Engineering Circuit Analysis, ch. 8).

    Examples
    --------
    A long pulse on a small inductance heats as the d.c. current for the pulse
    (10 V on 1 Ω for 1 ms: 100 A²·ms, less τ·(V/R)² = 0.1 A²·ms for the rise):

    >>> round(rl_pulse_action(10.0, 1.0, 1e-6, 1e-3) * 1e3, 3)
    99.9

    A short pulse on a large inductance leaves ½LI², I = V·w/L, in the copper:

    >>> i = 100.0 * 1e-6 / 1e-3
    >>> round(rl_pulse_action(100.0, 0.01, 1e-3, 1e-6) * 0.01 / (0.5 * 1e-3 * i * i), 4)
    1.0
    """
    v, r, l, w = float(v_peak), float(resistance), float(inductance), float(width)
    if l <= 0.0:
        return (v / r) ** 2 * w
    tau = l / r
    x = w / tau
    # x − 1 + e^−x loses its digits for small x: its series there.
    rest = x - 1.0 + math.exp(-x) if x > 1e-3 else x * x / 2.0 - x ** 3 / 6.0 + x ** 4 / 24.0
    return (v / r) ** 2 * tau * rest


def pulse_rms_current(v_peak, resistance, inductance, width, rate):
    """The rms current of a winding driven by rectangular voltage pulses.

    Parameters
    ----------
    v_peak : float
        Pulse amplitude. [V]
    resistance, inductance : float
        Of the winding at its temperature. [ohm], [H]
    width : float
        Pulse width. [s]
    rate : float
        Pulses per second. [Hz]

    Returns
    -------
    current : float
        √(rate · :func:`rl_pulse_action`). [A rms]

    References
    ----------
    :func:`rl_pulse_action`.

    Examples
    --------
    A 50 % square pulse train on a resistor: the rms of a 50 % duty is I/√2.

    >>> round(pulse_rms_current(10.0, 1.0, 0.0, 0.5e-3, 1e3), 4)
    7.0711
    """
    return math.sqrt(float(rate) * rl_pulse_action(v_peak, resistance, inductance, width))


def decays_between_pulses(resistance, inductance, width, rate, time_constants=DECAY_TIME_CONSTANTS):
    """Whether the current has died away before the next pulse starts.

    When it has not, each pulse starts from the current the last one left and
    the current ratchets up: the per-pulse loss of :func:`rl_pulse_action` would
    read low, so no heating is computed from it.

    Parameters
    ----------
    resistance, inductance : float
        [ohm], [H]
    width, rate : float
        Pulse width [s] and pulses per second [Hz].
    time_constants : float
        Decay allowed for, in time constants L/R.

    Returns
    -------
    bool

    Examples
    --------
    >>> decays_between_pulses(1.0, 1e-3, 10e-6, 100.0), decays_between_pulses(1.0, 1e-3, 10e-6, 1000.0)
    (True, False)
    """
    return float(width) + time_constants * float(inductance) / float(resistance) <= 1.0 / float(rate)
