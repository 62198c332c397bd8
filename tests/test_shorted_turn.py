"""Q, one shorted turn and the ring wave, against references written here and not the engine.

The shorted turn: every turn a coaxial circle, the full turn-by-turn matrix summed
here with scipy's complete elliptic integrals (Maxwell's formula, DLMF §19.34)
and Grover's round-wire loop, the shorted turn taken out of the series path and
closed on itself, then the two-mesh circuit solved by hand:
Z_in = Z_rest + ω²M²/(R_t + jωL_t).  The ring wave: scipy's ODE integration of
the series RLC circuit (and of the coupled circuit with the shorted turn), its
successive peaks read off the numerical solution.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from windsheet.design.build import build_design
from windsheet.order.document import parse_order

MU0 = 4e-7 * math.pi
# IEC 60028 annealed copper at 20 °C, 1/58 Ω·mm²/m as the standard rounds it: 0.017241 (references.md, memory).
RHO_20 = 1.7241e-8


def order(strands=1, hookup="single", turns=30, test="100 kHz", ring="", extra=""):
    return parse_order(f"""
job: {{number: HL-9301, part: "test coil", customer: "Invented Ltd", quantity: 1, units: [U1]}}
form: {{kind: cylinder, diameter: 40 mm, traverse: 120 mm}}
wire: {{size: 0.5 mm, grade: 2}}
winding: {{strands: {strands}, turns: {turns}, layers: 1, lead_length: 100 mm}}
hookup: {hookup}
duty: {{voltage: 24 V, frequency: 50 Hz, current: 0.1 A, ambient: 20 degC}}
tolerances: {{inductance: 10 %, resistance: 5 %}}
test: {{frequency: {test}{ring}}}
{extra}""".encode())


def maxwell(r1, r2, z):
    from scipy.special import ellipe, ellipk  # here, not at the top: collection stays light

    # DLMF §19.34 / Maxwell art. 701; scipy's ellipk takes m = k².
    m = 4 * r1 * r2 / ((r1 + r2) ** 2 + z ** 2)
    k = np.sqrt(m)
    return MU0 * np.sqrt(r1 * r2) * ((2 / k - k) * ellipk(m) - 2 / k * ellipe(m))


def turn_matrix(r, z, a):
    """Every turn's mutual with every other, Grover's loop µ0R(ln(8R/a) − 7/4) on the diagonal."""
    n = len(r)
    M = np.empty((n, n))
    for i in range(n):
        with np.errstate(divide="ignore", invalid="ignore"):
            M[i] = maxwell(r[i], r, z - z[i])
        M[i, i] = MU0 * r[i] * (math.log(8 * r[i] / a) - 1.75)
    return M


def geometry(d, strands):
    """Turn centres of the close-wound single layer, written out from the layout's rules:
    radius = form radius + overall diameter / 2, strands side by side, one pitch = strands × overall."""
    od, a = d.wire.overall_diameter_m, d.wire.copper_diameter_m / 2
    n = d.winding.turns_per_strand
    r = np.full(n * strands, d.form.diameter_m / 2 + od / 2)
    z = np.array([k * strands * od + s * od for s in range(strands) for k in range(n)])
    strand = np.repeat(np.arange(strands), n)
    return r, z, strand, a


def reference(d, strands, f, ac_ratio):
    """Terminal impedance of the series winding, and with each turn shorted, by the two-mesh circuit."""
    r, z, strand, a = geometry(d, strands)
    M = turn_matrix(r, z, a)
    w = 2 * math.pi * f
    area = math.pi * a * a
    r_turn = RHO_20 * 2 * math.pi * r / area * ac_ratio
    leads = strands * 2 * d.winding.lead_length_m * RHO_20 / area * ac_ratio
    r_all = r_turn.sum() + leads
    z_all = r_all + 1j * w * M.sum()
    out = []
    for k in range(len(r)):
        keep = np.arange(len(r)) != k
        z_rest = (r_all - r_turn[k]) + 1j * w * M[np.ix_(keep, keep)].sum()
        m_k = M[k, keep].sum()
        out.append(z_rest + w * w * m_k ** 2 / (r_turn[k] + 1j * w * M[k, k]))
    return z_all, np.array(out), strand, z


def _ac_ratio(d, f):
    # The same AC/DC ratio the design takes at the bench (tested on its own in test_ac_resistance.py).
    from windsheet.physics.ac_resistance import winding_ac_ratio

    return winding_ac_ratio(f, d.wire.copper_diameter_m, RHO_20, d.winding.layers,
                            d.winding.pitch_m / d.winding.strands)["ratio"]


@pytest.mark.parametrize("strands,hookup", [(1, "single"), (2, "series-aiding")])
def test_shorted_turn_matches_an_independent_filament_sum(strands, hookup):
    d = build_design(order(strands, hookup), remedies=False)
    f = d.test.frequency_Hz
    z_all, z_short, strand, zpos = reference(d, strands, f, _ac_ratio(d, f))
    w = 2 * math.pi * f
    # Unshorted: L and Q at the terminals.
    assert d.terminal.inductance_H == pytest.approx(z_all.imag / w, rel=1e-6)
    assert d.terminal.q_test == pytest.approx(z_all.imag / z_all.real, rel=1e-6)
    st = d.shorted_turn
    k = int(np.flatnonzero(strand == "AB".index(st.strand))[st.turn - 1])
    # The design's shorted turn reads what the filament sum says, at the turn it names.
    assert st.inductance_H == pytest.approx(z_short[k].imag / w, rel=1e-6)
    assert st.q == pytest.approx(z_short[k].imag / z_short[k].real, rel=1e-6)
    # And it is the worst place for the test: no turn's short leaves Q nearer its prediction.
    q_all = z_short.imag / z_short.real
    assert st.q == pytest.approx(q_all.max(), rel=1e-6)
    # At 100 kHz the loop's reactance is well above its resistance: Q falls by far more than L.
    assert st.q_change < 3 * st.inductance_change < 0
    assert st.q_caught


def test_at_a_low_test_frequency_the_short_hides_in_l_and_q():
    d = build_design(order(test="1 kHz"), remedies=False)
    st = d.shorted_turn
    z_all, z_short, _, _ = reference(d, 1, 1e3, _ac_ratio(d, 1e3))
    k = st.turn - 1
    assert st.q == pytest.approx(z_short[k].imag / z_short[k].real, rel=1e-6)
    # Well below R_t/(2πL_t) (references.md, "A shorted turn seen from the winding"): a few per cent at most,
    # inside the Q band, and the plan's line says so rather than claiming to catch it.
    assert abs(st.q_change) < 0.05 and not st.q_caught
    assert st.shows_from_Hz > 5e3
    assert "inside the band" in d.qc_plan.line("terminal.q").note


def test_a_shorted_turn_on_a_core_takes_nearly_all_the_inductance():
    o = parse_order(b"""
job: {number: HL-9302, part: "test choke", customer: "Invented Ltd", quantity: 1, units: [U1]}
form: {kind: toroid, inner_diameter: 14.8 mm, outer_diameter: 25.3 mm, height: 10 mm, al: 4.2 uH}
wire: {size: 0.8 mm, grade: 2}
winding: {strands: 1, turns: 12}
hookup: single
duty: {voltage: 2 V, frequency: 50 Hz, current: 1 A, ambient: 25 degC}
test: {frequency: 1 kHz}
""")
    d = build_design(o, remedies=False)
    st = d.shorted_turn
    # By hand: every turn links the core's flux (A_L·N per ampere), the loop's own is A_L, so
    # Z = R' + jωA_L(N−1)² + ω²(A_L(N−1))²/(R_t + jωA_L).
    al, n, w = 4.2e-6, 12, 2 * math.pi * 1e3
    r_t = st.loop_resistance_ohm
    r_rest = d.terminal.resistance_ac_test_ohm - r_t
    z = r_rest + 1j * w * al * (n - 1) ** 2 + w * w * (al * (n - 1)) ** 2 / (r_t + 1j * w * al)
    assert st.inductance_H == pytest.approx(z.imag / w, rel=1e-9)
    assert st.inductance_change < -0.9 and st.q_caught


def _ring_of(t, v):
    """Frequency and successive-peak ratio of a sampled ring, from its positive peaks."""
    from scipy.signal import find_peaks
    peaks, _ = find_peaks(v)
    peaks = peaks[2:8]
    times, heights = t[peaks], v[peaks]
    return 1 / np.mean(np.diff(times)), float(np.exp(np.mean(np.diff(np.log(heights)))))


def test_ring_wave_matches_scipy_ode_of_the_series_rlc():
    from scipy.integrate import solve_ivp
    d = build_design(order(test="1 kHz", ring=", ring_capacitor: 10 nF"), remedies=False)
    rw = d.ring_wave
    L, R, C = rw.inductance_H, rw.resistance_ac_ohm, rw.capacitor_F + rw.winding_capacitance_F
    # q'' = −(R q' + q/C)/L from the charged capacitor, integrated by scipy (RK45, tight tolerances).
    sol = solve_ivp(lambda t, y: [y[1], -(R * y[1] + y[0] / C) / L], (0, 12 / rw.frequency_Hz), [C * 100.0, 0.0],
                    method="DOP853", rtol=1e-10, atol=1e-16, dense_output=True)
    t = np.linspace(0, 12 / rw.frequency_Hz, 200_000)
    f, decay = _ring_of(t, sol.sol(t)[0])
    assert rw.frequency_Hz == pytest.approx(f, rel=1e-4)
    assert rw.decay == pytest.approx(decay, rel=1e-4)


def coupled_ring(d, k, f_ring, strands=1, capacitor=None):
    """Ring frequency and peak ratio of the winding (series, all turns) with turn k shorted (None: no short),
    by scipy's integration of the coupled circuit; resistances at ``f_ring``'s AC ratio."""
    from scipy.integrate import solve_ivp
    ratio = _ac_ratio(d, f_ring)
    r, z, strand, a = geometry(d, strands)
    M = turn_matrix(r, z, a)
    area = math.pi * a * a
    r_turn = RHO_20 * 2 * math.pi * r / area * ratio
    leads = strands * 2 * d.winding.lead_length_m * RHO_20 / area * ratio
    C = (capacitor or d.ring_wave.capacitor_F) + d.ring_wave.winding_capacitance_F
    if k is None:
        L1, R1 = M.sum(), r_turn.sum() + leads
        rhs = lambda t, y: [y[1], -(R1 * y[1] + y[0] / C) / L1]  # noqa: E731
        y0 = [C * 100.0, 0.0]
    else:
        keep = np.arange(len(r)) != k
        L1, L2, Mk = M[np.ix_(keep, keep)].sum(), M[k, k], M[k, keep].sum()
        R1, R2 = r_turn.sum() - r_turn[k] + leads, r_turn[k]
        Ainv = np.linalg.inv(np.array([[L1, Mk], [Mk, L2]]))

        def rhs(t, y):
            q, i1, i2 = y
            di = Ainv @ np.array([-(R1 * i1 + q / C), -R2 * i2])
            return [i1, di[0], di[1]]
        y0 = [C * 100.0, 0.0, 0.0]
    T = 14 / f_ring
    # The loop's own time constant L2/R2 is about one ring period: not stiff, an explicit high-order method.
    sol = solve_ivp(rhs, (0, T), y0, method="DOP853", rtol=1e-10, atol=1e-16, dense_output=True)
    t = np.linspace(0, T, 200_000)
    return _ring_of(t, sol.sol(t)[0])


def test_a_shorted_turn_rings_faster_and_dies_sooner_as_the_coupled_circuit_does():
    d = build_design(order(test="1 kHz", ring=", ring_capacitor: 10 nF"), remedies=False)
    st, rw = d.shorted_turn, d.ring_wave
    assert st.ring_frequency_Hz > rw.frequency_Hz and st.ring_decay < rw.decay and st.ring_caught
    # The coupled circuit itself, integrated by scipy: the winding less the turn with the capacitor,
    # and the shorted turn beside it, M between them; the filament sum above gives them.
    f, decay = coupled_ring(d, st.turn - 1, st.ring_frequency_Hz)
    # The design takes the winding's impedance at the ring frequency (the loop's fast mode is gone after
    # the first cycles): within a few parts in a thousand of the integrated circuit.
    assert st.ring_frequency_Hz == pytest.approx(f, rel=3e-3)
    assert st.ring_decay == pytest.approx(decay, rel=3e-3)
