"""Q of a winding, and what one shorted turn does to what the terminals read.

Pure functions on SI numbers.  A shorted turn is a closed loop coupled to the
rest of the winding: seen from the terminals it reflects the impedance
``ω²M²/(R_t + jωL_t)`` (coupled-circuit theory), with ``M`` the mutual
inductance between the loop and the winding, ``L_t`` and ``R_t`` the loop's
own.  At low frequency (``ωL_t ≪ R_t``) the reflected term is a small added
resistance and the short hides in L; where ``ωL_t ≳ R_t`` it takes away
inductance (``M²/L_t``) and adds resistance, and Q falls.  The turn also
leaves its strand's series path, which :func:`shorted_turn_matrices` takes
into account exactly, so the whole coil is then solved by the hookup's own
nodal analysis (:func:`windsheet.physics.network.terminal_impedance`).
"""

from __future__ import annotations

import math

import numpy as np

from .inductance import loop_self_inductance, maxwell_mutual


def quality_factor(frequency, inductance, resistance):
    """Quality factor Q = ωL/R of an inductor, as an LCR meter reads it (D = 1/Q).

    Parameters
    ----------
    frequency : float or ndarray
        Test frequency. [Hz]
    inductance : float or ndarray
        Series inductance at that frequency. [H]
    resistance : float or ndarray
        Series (AC) resistance at that frequency. [ohm]

    Returns
    -------
    Q : float or ndarray
        ``2πfL/R`` [-]; the dissipation factor D is its inverse.

    References
    ----------
    .. [1] F. E. Terman, Radio Engineers' Handbook, McGraw-Hill (1943),
       sec. 2 (Q of a coil, ωL/R).

    Examples
    --------
    400 µH with 1.75 Ω at 1 kHz; by hand 2π·1e3·400e-6/1.75 = 1.436:

    >>> round(float(quality_factor(1e3, 400e-6, 1.75)), 3)
    1.436
    """
    return 2.0 * math.pi * np.asarray(frequency, float) * np.asarray(inductance, float) / np.asarray(
        resistance, float)


def reflected_impedance(frequency, mutual, loop_resistance, loop_inductance):
    """Impedance a closed loop reflects into a winding it is coupled to.

    Parameters
    ----------
    frequency : float or ndarray
        Frequency. [Hz]
    mutual : float or ndarray
        Mutual inductance between the winding and the loop. [H]
    loop_resistance : float or ndarray
        The loop's own resistance, at that frequency. [ohm]
    loop_inductance : float or ndarray
        The loop's own inductance. [H]

    Returns
    -------
    Z : complex or ndarray
        ``ω²M²/(R_t + jωL_t)`` [ohm], added in series with the winding's own
        impedance: a positive real part (loss) and a negative imaginary part
        (inductance taken away).

    References
    ----------
    .. [1] Coupled circuits: Z_in = Z_1 + ω²M²/Z_2 for a secondary closed on
       itself, e.g. F. E. Terman, Radio Engineers' Handbook, McGraw-Hill
       (1943), sec. 3 ("coupled circuits", the reflected impedance).

    Examples
    --------
    M = 3 µH, R_t = 14 mΩ, L_t = 155 nH at 1 kHz: the loop's reactance is
    far below its resistance, so the short adds about ω²M²/R_t = 25.4 mΩ:

    >>> z = reflected_impedance(1e3, 3e-6, 0.014, 155e-9)
    >>> round(float(z.real) * 1e3, 1), round(float(z.imag) * 1e3, 2)
    (25.3, -1.76)
    """
    w = 2.0 * math.pi * np.asarray(frequency, float)
    m = np.asarray(mutual, float)
    return w * w * m * m / (np.asarray(loop_resistance, float) + 1j * w * np.asarray(loop_inductance, float))


def shorted_turn_matrices(L, R, linkage, loop_inductance, loop_resistance, strand):
    """Strand matrix and resistances with one turn taken out of its strand and closed on itself.

    The shorted turn becomes one more branch, the last, whose ends are tied
    together; its strand loses the turn's own inductance, its mutuals and its
    resistance.  Solved with the hookup (modified nodal analysis) this is the
    exact coupled-circuit of the short, of which ``ω²M²/(R_t + jωL_t)`` is the
    series form for one strand.

    Parameters
    ----------
    L : array_like, shape (S, S)
        Strand inductance matrix. [H]
    R : array_like, shape (S,)
        Strand resistances at the frequency of interest. [ohm]
    linkage : array_like, shape (S,)
        Flux the turn links per ampere in each strand, its own turn included:
        ``Σ_{q in s} M_kq``. [H]
    loop_inductance : float
        The turn's own inductance ``M_kk``. [H]
    loop_resistance : float
        The turn's resistance. [ohm]
    strand : int
        The strand the turn belongs to (0 = A).

    Returns
    -------
    L2 : ndarray, shape (S + 1, S + 1)
        [H]; the last row and column are the shorted turn.
    R2 : ndarray, shape (S + 1,)
        [ohm].

    References
    ----------
    .. [1] Coupled circuits with the shorted turn as a secondary closed on
       itself; F. W. Grover, Inductance Calculations (1946), ch. 1 (the
       inductance of a circuit as the sum of its parts' self and mutual
       inductances).

    Examples
    --------
    One strand of three equal, fully coupled turns (each 1 µH, mutuals 1 µH):
    with one turn shorted the strand keeps two turns (4 µH) and the loop links
    them by 2 µH:

    >>> L2, R2 = shorted_turn_matrices([[9e-6]], [0.3], [3e-6], 1e-6, 0.1, 0)
    >>> (np.round(L2 * 1e6, 6).tolist(), np.round(R2, 6).tolist())
    ([[4.0, 2.0], [2.0, 1.0]], [0.2, 0.1])
    """
    L = np.asarray(L, float)
    S = L.shape[0]
    phi = np.asarray(linkage, float).reshape(S)
    L2 = np.zeros((S + 1, S + 1))
    L2[:S, :S] = L
    L2[strand, :S] -= phi
    L2[:S, strand] -= phi
    L2[strand, strand] += loop_inductance
    # The loop couples to every strand by what the turn links from it, less its own part in its strand.
    rest = phi.copy()
    rest[strand] -= loop_inductance
    L2[S, :S] = rest
    L2[:S, S] = rest
    L2[S, S] = loop_inductance
    R2 = np.append(np.asarray(R, float).copy(), loop_resistance)
    R2[strand] -= loop_resistance
    return L2, R2


def shorted_turn_shift(frequency, impedance, strand_current, linkage, strand_of_turn, loop_inductance,
                       loop_resistance):
    """Terminal impedance with each turn in turn shorted, to first order in the strand currents.

    For a hookup whose strands carry fixed shares ``c_s`` of the terminal
    current, shorting turn k of strand σ gives exactly
    ``Z' = Z − c_σ²R_t − jω(2c_σΛ_k − c_σ²L_t) + ω²(Λ_k − c_σL_t)²/(R_t + jωL_t)``,
    with ``Λ_k = Σ_s c_s·linkage[k, s]`` the turn's flux linkage per terminal
    ampere.  Parallel strands share current afresh around a short; for them
    this is the first-order estimate, good for ranking the turns.

    Parameters
    ----------
    frequency : float
        [Hz]
    impedance : complex
        The winding's terminal impedance without the short. [ohm]
    strand_current : array_like, complex, shape (S,)
        Current in each strand per ampere at the terminals. [-]
    linkage : ndarray, shape (n_turns, S)
        Flux each turn links per ampere in each strand, its own included. [H]
    strand_of_turn : ndarray of int, shape (n_turns,)
    loop_inductance, loop_resistance : ndarray, shape (n_turns,)
        Each turn's own inductance [H] and resistance [ohm].

    Returns
    -------
    Z : ndarray of complex, shape (n_turns,)
        Terminal impedance with that turn shorted. [ohm]

    References
    ----------
    See :func:`reflected_impedance` and :func:`shorted_turn_matrices`.

    Examples
    --------
    The three-turn strand of :func:`shorted_turn_matrices` at 1 kHz: shorting
    any turn leaves 4 µH less the loop's reflected share (by hand: 2 µH linked,
    ω²M²/(R_t + jωL_t) takes 0.0157 µH):

    >>> z = shorted_turn_shift(1e3, 0.3 + 2j * math.pi * 1e3 * 9e-6, [1.0], np.full((3, 1), 3e-6),
    ...                        np.zeros(3, int), np.full(3, 1e-6), np.full(3, 0.1))
    >>> bool(np.allclose(z, z[0])), round(float(z[0].imag) / (2 * math.pi * 1e3) * 1e6, 4)
    (True, 3.9843)
    """
    w = 2.0 * math.pi * frequency
    c = np.asarray(strand_current, complex)
    lam = np.asarray(linkage, float) @ c
    cs = c[np.asarray(strand_of_turn, int)]
    lt, rt = np.asarray(loop_inductance, float), np.asarray(loop_resistance, float)
    removed = -cs * cs * rt - 1j * w * (2 * cs * lam - cs * cs * lt)
    m = lam - cs * lt
    return impedance + removed + w * w * m * m / (rt + 1j * w * lt)


def loop_corner_frequency(loop_resistance, loop_inductance):
    """Frequency at which a shorted turn's reactance equals its resistance, ``R_t/(2πL_t)``.

    Well below it a shorted turn hides in the inductance reading (it adds a
    little resistance); near and above it it takes inductance away and Q falls.

    Parameters
    ----------
    loop_resistance : float
        [ohm]
    loop_inductance : float
        [H]

    Returns
    -------
    f : float
        [Hz]

    References
    ----------
    See :func:`reflected_impedance`: the denominator's two terms are equal there.

    Examples
    --------
    >>> round(loop_corner_frequency(0.0138, 155e-9) / 1e3, 2)
    14.17
    """
    return loop_resistance / (2.0 * math.pi * loop_inductance)


def turn_strand_linkage(layout, turns):
    """Flux each of a few turns links per ampere in each strand, air core, turn by turn.

    ``Σ_{q in s} M_kq`` over the strand's turns, Maxwell's mutual inductance
    of coaxial circles between the turn and every other, the round-wire
    loop's own inductance for itself: the filament engine's kernels, summed
    for the turns asked for only (cost: those turns × all turns).

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        A cylinder or bobbin layout (coaxial turns).
    turns : array_like of int
        Indices of the turns into the layout's arrays.

    Returns
    -------
    linkage : ndarray, shape (len(turns), strands)
        [H]; summed over strand s's turns and weighted by the strand currents
        it is the turn's flux linkage.

    References
    ----------
    .. [1] J. C. Maxwell, A Treatise on Electricity and Magnetism, vol. 2,
       art. 701 (1873); F. W. Grover, Inductance Calculations (1946),
       circular ring of round wire.

    Examples
    --------
    Summed over every turn of a strand it is that strand's self-inductance:

    >>> from windsheet.physics.layout import cylinder_layout
    >>> from windsheet.physics.inductance import strand_matrix
    >>> lay = cylinder_layout(0.02, 5e-3, 0.45e-3, 0.5e-3, 1, 20)
    >>> lk = turn_strand_linkage(lay, range(lay.n_turns))
    >>> bool(np.isclose(lk.sum(), strand_matrix(lay)[0, 0], rtol=1e-12))
    True
    """
    idx = np.asarray(list(turns), dtype=int)
    a = layout.copper_diameter / 2.0
    out = np.zeros((idx.size, layout.strands))
    for row, k in enumerate(idx):
        dz = layout.z - layout.z[k]
        own = np.arange(layout.n_turns) == k
        with np.errstate(divide="ignore"):
            m = np.where(own, loop_self_inductance(layout.r[k], a),
                         maxwell_mutual(layout.r[k], layout.r, np.where(own, 1.0, dz)))
        out[row] = np.bincount(layout.strand, weights=m, minlength=layout.strands)
    return out
