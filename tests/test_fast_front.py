"""Fast-edge initial distribution: the capacitive network against the uniform winding's closed form
and the discrete ladder's exact solution; a real coil through the whole prediction."""

import math

import numpy as np
import pytest
import yaml

from windsheet.physics.fast_front import (capacitive_distribution, impulse_alpha, series_capacitance,
                                  uniform_initial_distribution)
from windsheet.order.document import parse_order
from windsheet.design.build import build_design


def ladder(n, cs, cg):
    i = np.arange(n - 1)
    return i, i + 1, np.full(n - 1, cs), cg


@pytest.mark.parametrize("alpha", [1.0, 5.0, 20.0])
def test_uniform_ladder_against_closed_form(alpha):
    n, cs = 801, 5e-12
    # α² = Cg_total / Cs_total with Cs_total = cs/(n − 1), Cg_total = n·cg.
    cg = alpha ** 2 * cs / (n - 1) / n
    i, j, c, g = ladder(n, cs, cg)
    v, _ = capacitive_distribution(n, i, j, c, g, {0: 1.0, n - 1: 0.0})
    x = np.arange(n) / (n - 1)
    # Closed form V(x) = V0·sinh(α(1 − x))/sinh(α) (Wagner 1915; Heathcote, J & P Transformer Book §8.1).
    ref = np.sinh(alpha * (1 - x)) / np.sinh(alpha)
    assert np.max(np.abs(v - ref)) < 2e-3
    assert series_capacitance(n, i, j, c, [0], [n - 1]) == pytest.approx(cs / (n - 1), rel=1e-9)
    assert impulse_alpha(n * cg, cs / (n - 1)) == pytest.approx(alpha, rel=1e-12)


def test_discrete_ladder_exact():
    # A discrete ladder's exact solution: v_k = sinh(β(N−1−k))/sinh(β(N−1)), cosh β = 1 + g/(2c)
    # (the recurrence c(v_{k−1} − 2v_k + v_{k+1}) = g·v_k, solved independently here).
    n, cs, cg = 60, 3e-12, 0.4e-12
    i, j, c, g = ladder(n, cs, cg)
    v, _ = capacitive_distribution(n, i, j, c, g, {0: 1.0, n - 1: 0.0})
    beta = math.acosh(1 + cg / (2 * cs))
    k = np.arange(n)
    assert v == pytest.approx(np.sinh(beta * (n - 1 - k)) / np.sinh(beta * (n - 1)), abs=1e-10)


def test_closed_form_steep_front_does_not_overflow():
    # For α ≫ 1 the distribution is e^(−αx) (the same closed form's limit).
    assert uniform_initial_distribution(0.01, 2000.0) == pytest.approx(math.exp(-20.0), rel=1e-9)
    assert uniform_initial_distribution(0.0, 2000.0) == pytest.approx(1.0)


def test_ties_hold_joined_nodes_together():
    # Two ladders joined end to start read as one ladder of both (series strands through a joint).
    n, cs, cg = 20, 2e-12, 0.1e-12
    i = np.concatenate([np.arange(n - 1), n + np.arange(n - 1)])
    v, _ = capacitive_distribution(2 * n, i, i + 1, np.full(i.size, cs), cg, {0: 1.0, 2 * n - 1: 0.0},
                                ties=[(n - 1, n)])
    one, _ = capacitive_distribution(2 * n - 1, np.arange(2 * n - 2), np.arange(1, 2 * n - 1),
                                  np.full(2 * n - 2, cs), cg, {0: 1.0, 2 * n - 2: 0.0})
    # The merged node carries two ground shares in the joined network; compare away from it loosely.
    assert v[: n - 1] == pytest.approx(one[: n - 1], abs=2e-3)
    assert v[n - 1] == pytest.approx(v[n], abs=1e-6)


ORDER = """
job: {number: "HL-0990", part: "Pulse coil", customer: "Test Works", quantity: 1, revision: "A", issued_by: "T. Ames"}
form: {kind: cylinder, diameter: 20 mm, traverse: 60 mm}
wire: {size: 0.50 mm, grade: 2, thermal_class: 155}
winding: {strands: 1, turns: 100, layers: 1}
hookup: single
duty: {voltage: 600 V peak, waveform: pulse, frequency: 10 kHz, rise_time: 100 ns, current: 0.5 A,
       ground_capacitance: 20 pF}
"""


def test_100_ns_edge_on_a_single_layer_coil():
    p = build_design(parse_order(ORDER.encode(), "o.yaml"), remedies=False)
    imp = p.impulse
    # α from the coil's own network: Cg over the series capacitance through its 100 turns.
    assert imp.alpha == pytest.approx(math.sqrt(20e-12 / imp.series_capacitance_F), rel=1e-12)
    # A uniform single layer: the first turn as the closed form V0·(1 − sinh(α(1 − 1/N))/sinh α)
    # gives it (Wagner 1915), within the end turns' own departure from uniform.
    closed = 600.0 * (1 - uniform_initial_distribution(1 / 100, imp.alpha))
    assert imp.first_turn_Vpk == pytest.approx(closed, rel=0.05)
    # Many times the even share V/N = 6 V.
    assert imp.first_turn_Vpk > 10 * 6.0
    assert p.insulation.worst_adjacent_Vpk >= imp.first_turn_Vpk
    assert any("fast edge" in r for r in p.insulation.reasons)


def test_bifilar_series_edge_uses_the_joint():
    doc = yaml.safe_load(ORDER)
    doc["winding"]["strands"] = 2
    doc["winding"]["turns"] = 40
    doc["hookup"] = "series-aiding"
    p = build_design(parse_order(yaml.safe_dump(doc).encode(), "o.yaml"), remedies=False)
    imp = p.impulse
    # Series-aiding bifilar: A's turn k lies beside B's turn k, half the winding (V/2) apart at
    # steady state; under the edge the line-end pair (A1 at the full edge, B1 held near its joint's
    # potential) takes more than that steady V/2.
    assert imp.worst_pair_Vpk > 0.5 * 600.0
    assert "turn 1" in imp.worst_pair_where
    assert imp.first_turn_Vpk > 10 * imp.first_turn_uniform_Vpk
    assert imp.first_turn_uniform_Vpk == pytest.approx(600.0 / 80)


def test_series_capacitance_counts_charge_through_joints():
    # Two equal ladders in parallel (starts joined, finishes joined), held at ladder one's ends
    # only: capacitors in parallel add, Cs = 2·cs/(n − 1) (circuit theory).
    n, cs = 30, 4e-12
    i = np.concatenate([np.arange(n - 1), n + np.arange(n - 1)])
    got = series_capacitance(2 * n, i, i + 1, np.full(i.size, cs), [0], [n - 1], ties=[(0, n), (n - 1, 2 * n - 1)])
    assert got == pytest.approx(2 * cs / (n - 1), rel=1e-6)
