"""A spaced turn's partial capacitance among its neighbours, and the fast edge it sets."""

import math

import numpy as np
import pytest

from windsheet.design.build import build_design
from windsheet.order.document import load_order
from windsheet.physics.conductor_capacitance import enamelled_two_wire_capacitance_per_length
from windsheet.physics.row_capacitance import row_mutual_capacitance_per_length

from laplace2d import Grid, disc

EPS0 = 8.8541878128e-12


def fd_row_mutual(pitch, radius, wires=7, margin=6e-3, h=20e-6):
    """Maxwell mutual capacitance per length of the middle pair of a row of bare wires, 2-D finite
    differences (tests/laplace2d.py), half the plane above the row's symmetry line.  From the stored
    energy W = 1/2 V^T C V: with the middle wire at 1 V, W1 = C_mm / 2; with it and its neighbour,
    W2 = C_mm + C_m,m+1 (equal diagonals), so -C_m,m+1 = 2 W1 - W2."""
    xs = [(k - (wires - 1) / 2) * pitch for k in range(wires)]
    m = (wires - 1) // 2

    def energy(ones):
        g = Grid(xs[0] - margin, xs[-1] + margin, 0, margin, h, supersample=2)
        for k, x in enumerate(xs):
            g.hold(disc(x, 0, radius), 1.0 if k in ones else 0.0)
        g.solve()
        return 2 * g.energy()

    return 2 * energy({m}) - energy({m, m + 1})


def test_row_partial_capacitance_against_a_field_solution():
    # Seven bare 0.5 mm wires at 2 mm pitch (four diameters): the field solution is the reference.
    field = fd_row_mutual(2e-3, 0.25e-3)
    model = row_mutual_capacitance_per_length(2e-3, 0.5e-3, 0.5e-3, eps_r=1.0, wires=7)
    assert model == pytest.approx(field, rel=0.03)
    # The isolated pair (two-wire line in air, pi eps0 / acosh(D/d), Ramo-Whinnery) is far above it:
    # the turns beyond take part of each one's field.
    isolated = math.pi * EPS0 / math.acosh(2e-3 / 0.5e-3)
    assert field < 0.75 * isolated


def test_two_wires_are_the_enamelled_two_wire_line():
    # With no other wire the row is the pair: the thin-wire form of the enamelled line,
    # pi eps0 / (ln(D/R_o) + ln(D_o/d)/eps_r), within the acosh-vs-log difference at D = 4 D_o.
    two = row_mutual_capacitance_per_length(2e-3, 0.45e-3, 0.5e-3, wires=2)
    assert two == pytest.approx(enamelled_two_wire_capacitance_per_length(2e-3, 0.45e-3, 0.5e-3), rel=0.01)


def test_spaced_single_layer_first_turn_voltage_against_a_row_ladder(tmp_path):
    p = tmp_path / "order.yaml"
    p.write_text("""
job: {number: HL-9006, part: "spaced single layer, pulse", customer: "test", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 20 mm, traverse: 90 mm}
wire: {size: 0.50 mm, grade: 2}
winding: {strands: 1, turns: 40, layers: 1, pitch: 2 mm}
hookup: single
duty: {voltage: 1 kV peak, waveform: pulse, rise_time: 100 ns, frequency: 1 kHz}
""")
    d = build_design(load_order(p), remedies=False)
    imp = d.impulse
    # Independent ladder: 40 nodes, each rung the row's partial capacitance (Maxwell's potential
    # coefficients written out here, 41 wires, floating) over the turn length, each node's share of the
    # ground capacitance; line end held at 1, far end at 0 (nodal analysis).
    cu, ov, n = d.wire.copper_diameter_m, d.wire.overall_diameter_m, 40
    k = np.arange(41)
    dist = np.abs(k[:, None] - k[None, :]) * 2e-3
    P = -np.log(np.where(dist > 0, dist, 1.0))
    np.fill_diagonal(P, -math.log(ov / 2) + math.log(ov / cu) / 3.5)
    C = np.linalg.inv(P / (2 * math.pi * EPS0))
    s = C.sum(axis=1)
    C = C - np.outer(s, s) / s.sum()
    rung = -C[20, 21] * math.pi * (20e-3 + ov)            # per-length x one turn's length
    cg = imp.ground_capacitance_F / n
    Y = np.zeros((n, n))
    for a in range(n - 1):
        Y[a, a] += rung; Y[a + 1, a + 1] += rung; Y[a, a + 1] -= rung; Y[a + 1, a] -= rung
    Y += np.eye(n) * cg
    free = np.arange(1, n - 1)
    v = np.zeros(n); v[0] = 1.0
    v[free] = np.linalg.solve(Y[np.ix_(free, free)], -Y[np.ix_(free, [0])][:, 0])
    ladder = 1000.0 * (v[0] - v[1])
    # Issue 29 done criterion: within 5 % of a row solution (the isolated line gave 404 V peak here).
    assert imp.first_turn_Vpk == pytest.approx(ladder, rel=0.05)
    assert imp.first_turn_Vpk > 450
