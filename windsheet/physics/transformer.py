"""Windings of their own on one core: the transformer's closed forms.

Pure functions on SI numbers: magnetising inductance from the core's
inductance factor, leakage inductance of concentric windings (the
magnetomotive-force method), peak flux density from the volts per turn,
regulation from the equivalent circuit, and the capacitance of facing layers.
For air-cored windings the filament engine (:mod:`windsheet.physics.inductance`)
gives every self and mutual inductance directly; the tests check the leakage
formula against it.
"""

from __future__ import annotations

import math

from .constants import EPSILON_0
from .inductance import MU0

#: Form factor of a sine: V_rms = 4.44 f N A B_peak (the transformer EMF equation).
SINE_FORM = 4.0 * math.pi / (2.0 * math.sqrt(2.0))


def magnetising_inductance(al, turns):
    """Magnetising inductance of a winding on a core: ``L = A_L N²``.

    Parameters
    ----------
    al : float
        The core's inductance factor (as gapped). [H]
    turns : float
        Turns of the winding. [1]

    Returns
    -------
    L : float
        Inductance with every other winding open. [H]

    References
    ----------
    .. [1] Inductance factor A_L as core makers define it (IEC 60205, effective
       parameters of magnetic cores; common practice).

    Examples
    --------
    A 230 V primary of 3450 turns on a core of A_L = 2.2 µH:

    >>> round(magnetising_inductance(2.2e-6, 3450), 2)
    26.19
    """
    return float(al) * float(turns) ** 2


def turns_ratio_voltage(v_primary, n_primary, n_secondary):
    """Open-circuit secondary voltage of an ideal transformer: ``V2 = V1 N2 / N1``.

    Parameters
    ----------
    v_primary : float
        Primary voltage. [V]
    n_primary, n_secondary : float
        Turns. [1]

    Returns
    -------
    v_secondary : float
        [V]

    References
    ----------
    .. [1] Faraday's law with one flux linking both windings (any text on
       transformers, e.g. McLyman, Transformer and Inductor Design Handbook, ch. 1).

    Examples
    --------
    >>> turns_ratio_voltage(230.0, 3450, 180)
    12.0
    """
    return float(v_primary) * float(n_secondary) / float(n_primary)


def peak_flux_density(v_rms, frequency, turns, area, form=SINE_FORM):
    """Peak flux density in the core from a winding's volts per turn.

    ``B_peak = V_rms / (k f N A)``, with ``k = 4.44`` for a sine (and 4.0 for a
    square wave).

    Parameters
    ----------
    v_rms : float
        Voltage across the winding, rms. [V]
    frequency : float
        [Hz]
    turns : float
        Turns of that winding. [1]
    area : float
        The core's effective cross-section A_e. [m²]
    form : float
        The waveform's factor: 4.44 for a sine, 4.0 for a square wave. [1]

    Returns
    -------
    B : float
        Peak flux density. [T]

    References
    ----------
    .. [1] The transformer EMF equation, V = 4.44 f N A B (McLyman, Transformer
       and Inductor Design Handbook, 3rd ed., ch. 1; common textbook form).

    Examples
    --------
    230 V, 50 Hz, 3450 turns (15 turns per volt) on 2.5 cm² of core:

    >>> round(peak_flux_density(230.0, 50.0, 3450, 2.5e-4), 3)
    1.2
    """
    return float(v_rms) / (form * float(frequency) * float(turns) * float(area))


def leakage_inductance_concentric(turns, mean_turn_length, height, build_inner, build_outer, gap):
    """Leakage inductance of two concentric windings filling the same height of a window.

    The magnetomotive force rises linearly through the inner winding, is flat
    across the gap and falls through the outer one; the energy of that field
    gives, referred to the winding of ``turns``::

        L_lk = µ0 N² MLT (a/3 + g + b/3) / h

    Parameters
    ----------
    turns : float
        Turns of the winding it is referred to. [1]
    mean_turn_length : float
        Mean length of a turn over both windings and the gap. [m]
    height : float
        Height of the windings along the core leg (the traverse). [m]
    build_inner, build_outer : float
        Radial builds a and b of the inner and outer windings. [m]
    gap : float
        Radial gap g between them (tape, screen). [m]

    Returns
    -------
    L_lk : float
        Leakage inductance (the primary's, read with the secondary shorted). [H]

    References
    ----------
    .. [1] P. L. Dowell, "Effects of eddy currents in transformer windings",
       Proc. IEE 113(8), 1966 (the MMF picture).
    .. [2] W. T. McLyman, Transformer and Inductor Design Handbook, 3rd ed.
       (2004), ch. 17, leakage inductance of concentric windings (memory).

    Examples
    --------
    100 turns, 100 mm mean turn, 20 mm high, builds of 2 mm and a 0.5 mm gap:

    >>> round(leakage_inductance_concentric(100, 0.1, 0.02, 2e-3, 2e-3, 0.5e-3) * 1e6, 2)
    115.19
    """
    return MU0 * float(turns) ** 2 * float(mean_turn_length) * (
        build_inner / 3.0 + gap + build_outer / 3.0) / float(height)


def facing_layers_capacitance(mean_turn_length, height, gap, eps_r):
    """Capacitance between the facing layers of two windings, as parallel plates.

    Parameters
    ----------
    mean_turn_length : float
        Mean length of a turn at the gap. [m]
    height : float
        Height of the facing layers. [m]
    gap : float
        Distance between the copper surfaces (enamel, tape, air). [m]
    eps_r : float
        Effective relative permittivity of what fills the gap. [1]

    Returns
    -------
    C : float
        [F]

    References
    ----------
    .. [1] The parallel-plate capacitor, C = ε0 εr A / d (any electrostatics
       text); valid when the gap is small against the plates.

    Examples
    --------
    100 mm by 20 mm facing layers, 0.2 mm apart through tape of εr 3.3:

    >>> round(facing_layers_capacitance(0.1, 0.02, 0.2e-3, 3.3) * 1e12, 2)
    292.18
    """
    return EPSILON_0 * float(eps_r) * float(mean_turn_length) * float(height) / float(gap)


def regulation(v_secondary, current_secondary, r_equivalent, x_equivalent, power_factor=1.0):
    """Voltage regulation from the equivalent circuit referred to the secondary.

    ``ε ≈ (I R cosφ + I X sinφ) / V2``: the fall of the secondary voltage from
    no load to the given load, as a fraction of the full-load voltage.

    Parameters
    ----------
    v_secondary : float
        Secondary voltage at the load. [V]
    current_secondary : float
        Load current, rms. [A]
    r_equivalent : float
        Winding resistances referred to the secondary, R2 + R1 (N2/N1)². [ohm]
    x_equivalent : float
        Leakage reactance referred to the secondary. [ohm]
    power_factor : float
        cos φ of the load (1 for a resistive load). [1]

    Returns
    -------
    regulation : float
        [1]

    References
    ----------
    .. [1] The approximate equivalent-circuit regulation formula (e.g. M. G. Say,
       The Performance and Design of Alternating Current Machines, ch. 3; memory).

    Examples
    --------
    12 V at 2 A through 0.3 Ω referred resistance, resistive load:

    >>> regulation(12.0, 2.0, 0.3, 0.05)
    0.05
    """
    sin_phi = math.sqrt(max(0.0, 1.0 - power_factor ** 2))
    return (current_secondary * (r_equivalent * power_factor + x_equivalent * sin_phi)) / float(v_secondary)


def mmf_leakage_inductance(segments, mean_turn_length, height):
    """Leakage inductance of windings stacked in a window, from the magnetomotive force across the build.

    Each segment is a winding section (its ampere-turns spread evenly over its
    build) or a gap (no current).  The MMF ``F(x)`` rises or falls linearly
    through a section and is flat across a gap; the energy in the window is
    ``µ0 MLT / (2h) ∫ F² dx`` and, for a reference current of 1 A,
    ``L = µ0 MLT ∫ F² dx / h``.  Interleaved sections (P/2 S P/2) lower the
    peak MMF and so the leakage.

    Parameters
    ----------
    segments : sequence of (float, float)
        In build order: ``(radial build [m], ampere-turns carried [A])`` per
        section or gap (0 for a gap), for 1 A in the reference winding; the
        ampere-turns sum to zero (balanced, as with a shorted secondary).
    mean_turn_length : float
        Mean turn length over the build. [m]
    height : float
        Height of the windings along the core leg. [m]

    Returns
    -------
    L_lk : float
        Leakage inductance referred to the winding whose 1 A set the ampere-turns. [H]

    References
    ----------
    .. [1] P. L. Dowell, "Effects of eddy currents in transformer windings",
       Proc. IEE 113(8), 1966 (the MMF diagram).
    .. [2] W. T. McLyman, Transformer and Inductor Design Handbook, 3rd ed.,
       2004, ch. 17 (memory).

    Examples
    --------
    Two windings of 100 turns with a 0.5 mm gap read as the concentric formula
    (:func:`leakage_inductance_concentric`, 115.19 µH):

    >>> segs = [(2e-3, 100.0), (0.5e-3, 0.0), (2e-3, -100.0)]
    >>> round(mmf_leakage_inductance(segs, 0.1, 0.02) * 1e6, 2)
    115.19
    """
    total, f0 = 0.0, 0.0
    for width, amp_turns in segments:
        f1 = f0 + amp_turns
        total += width * (f0 * f0 + f0 * f1 + f1 * f1) / 3.0
        f0 = f1
    if abs(f0) > 1e-9 * max(1.0, max(abs(a) for _, a in segments)):
        raise ValueError("the ampere-turns do not balance: the MMF method needs a shorted secondary")
    # Ampere-turns for 1 A in the reference winding: ∫F² is already per ampere squared.
    return MU0 * float(mean_turn_length) * total / float(height)
