"""Checks of windsheet.physics.voltage_map (and the leads' stress) against trade expectations and
independent sums."""

from types import SimpleNamespace

import numpy as np
import pytest

from windsheet.physics import voltage_map as vmap
from windsheet.physics.layout import cylinder_layout

from strand_ends import AIDING, D_CU, D_OV, OPPOSING, SINGLE, one_layer  # noqa: F401


def dvs(layout, ends, peak=1.0):
    v = vmap.turn_potentials(layout, ends)
    return vmap.adjacent_voltages(layout, v, peak)

# ---- voltage map -------------------------------------------------------------

@pytest.mark.parametrize("turns", [10, 57, 200])
def test_single_strand_single_layer_turns_sit_v_over_n_apart(turns):
    lay = one_layer(1, turns)
    *_, dv = dvs(lay, SINGLE, 230.0)
    # Common practice: one strand in one layer shares V evenly, ~V/N between turns.
    assert dv == pytest.approx(np.full(turns - 1, 230.0 / turns), rel=1e-9)


@pytest.mark.parametrize("turns", [20, 100])
def test_series_aiding_every_neighbour_pair_near_half_v(turns):
    lay = one_layer(2, turns)
    i, j, kind, dv = dvs(lay, AIDING)
    assert dv.size == 2 * turns - 1
    # Common practice: two strands series-aiding sit ~V/2 apart everywhere.
    assert dv == pytest.approx(np.full(dv.size, 0.5), abs=0.5 / turns + 1e-12)


@pytest.mark.parametrize("turns", [20, 100])
def test_series_opposing_leads_carry_nearly_full_v(turns):
    lay = one_layer(2, turns)
    v = vmap.turn_potentials(lay, OPPOSING)
    worst = vmap.worst_neighbour_voltage(lay, v, 400.0)
    # Common practice: series-opposing puts ~V between the two leads, side by side.
    assert worst["voltage_Vpk"] == pytest.approx(400.0, rel=1.0 / turns)
    assert worst["turns"] == [1, 1] and sorted(worst["strands"]) == ["A", "B"]
    assert worst["where"] == "strand A turn 1 next to strand B turn 1, layer 1"


@pytest.mark.parametrize("per_layer,layers", [(30, 2), (50, 4), (25, 5)])
def test_back_and_forth_layer_return_carries_two_layers_of_turns(per_layer, layers):
    n_total = per_layer * layers
    lay = cylinder_layout(0.02, per_layer * D_OV + 1e-9, D_CU, D_OV, 1, n_total)
    assert lay.turns_in_layer == (per_layer,) * layers
    v = vmap.turn_potentials(lay, SINGLE)
    worst = vmap.worst_neighbour_voltage(lay, v, 1.0, kinds={"layer"})
    # Common practice: ~2V·(turns per layer)/N at the layer returns.
    assert worst["voltage_Vpk"] == pytest.approx(2 * per_layer / n_total, rel=1.0 / per_layer)
    assert worst["kind"] == "layer"
    # Every layer return ties; each spans the 2n - 1 turns wound between the two.
    assert worst["turns"][1] - worst["turns"][0] == 2 * per_layer - 1


def test_potential_runs_from_start_to_finish_by_turn_index():
    lay = one_layer(1, 4)
    v = vmap.turn_potentials(lay, [[0.0, 1.0]])
    # Derived: uniform drop per turn, each turn at its midpoint.
    assert v.real == pytest.approx([0.125, 0.375, 0.625, 0.875])



# ---- exact quasi-static potentials -------------------------------------------------------

from windsheet.physics import stress  # noqa: E402
from windsheet.physics.inductance import loop_self_inductance, maxwell_mutual  # noqa: E402
from windsheet.physics.leads import lead_routes  # noqa: E402


def net(ends, current):
    return SimpleNamespace(end_potential=np.asarray(ends, dtype=complex),
                           strand_current=np.asarray(current, dtype=complex), inductance=1e-3)


def test_dc_potentials_follow_each_turns_own_length():
    lay = cylinder_layout(0.02, 40 * D_OV * 1.0001, D_CU, D_OV, 1, 200)
    d = stress.winding_drops(lay, net(SINGLE, [1.0]), 0.0, 0.087)
    v = vmap.turn_potentials(lay, SINGLE, *d)
    # Independent computation: Ohm's law along the wire, each turn at the middle of its own length.
    order = lay.strand_turns(0)
    run = np.cumsum(lay.turn_length[order]) - 0.5 * lay.turn_length[order]
    np.testing.assert_allclose(v.real[order], run / lay.turn_length.sum(), rtol=1e-12)


def test_ac_potentials_equal_the_full_turn_matrix():
    lay = cylinder_layout(0.012, 16e-3, 0.35e-3, 0.4e-3, 2, 60, layers=3)
    current = np.array([1.0, 1.0])                       # series-aiding
    f, rho = 200e3, 0.14
    d = stress.winding_drops(lay, net(AIDING, current), f, rho)
    v = vmap.turn_potentials(lay, AIDING, *d)
    # Independent computation: the N × N Maxwell matrix (Maxwell 1873; loop self-inductance, Grover
    # 1946), each turn's drop R'ℓ I + jωΣM I, accumulated along each strand between its end potentials.
    with np.errstate(divide="ignore"):
        m = maxwell_mutual(lay.r[:, None], lay.r[None, :], lay.z[:, None] - lay.z[None, :])
    np.fill_diagonal(m, loop_self_inductance(lay.r, lay.copper_diameter / 2))
    drop = rho * lay.turn_length * current[lay.strand] + 2j * np.pi * f * (m @ current[lay.strand])
    expected = np.empty(lay.n_turns, dtype=complex)
    for s in range(2):
        sel = lay.strand_turns(s)
        frac = (np.cumsum(drop[sel]) - drop[sel] / 2) / drop[sel].sum()
        expected[sel] = AIDING[s, 0] + frac * (AIDING[s, 1] - AIDING[s, 0])
    np.testing.assert_allclose(v, expected, rtol=1e-12, atol=1e-15)


@pytest.mark.parametrize("tape", [0.0, 50e-6])
def test_multilayer_dc_worst_layer_return_is_the_outermost_pair(tape):
    lay = cylinder_layout(0.02, 80 * D_OV * 1.0001, D_CU, D_OV, 1, 400, layers=5, tape=tape)
    d = stress.winding_drops(lay, net(SINGLE, [1.0]), 0.0, 0.1)
    v = vmap.turn_potentials(lay, SINGLE, *d)
    i, j, kind, dv = vmap.adjacent_voltages(lay, v, 24.0)
    lower = np.minimum(lay.layer[i], lay.layer[j])
    returns = [dv[(kind == "layer") & (lower == k)].max() for k in range(4)]
    # Ohm's law: outer turns are longer, so two outer layers hold more of the voltage than two inner.
    assert np.all(np.diff(returns) > 0)
    worst = vmap.worst_neighbour_voltage(lay, v, 24.0, kinds={"layer"})
    assert worst["layers"] == [4, 5]


# ---- leads -----------------------------------------------------------------------------------

def lead_worst(lay, ends, joins, terminals, routes):
    leads = lead_routes(lay, joins, terminals, routes)
    v = vmap.turn_potentials(lay, ends)
    return {x.end: float(np.abs(ends[x.strand, x.which] - v[x.beside]).max()) if x.beside.size else 0.0
            for x in leads}


def test_series_aiding_joint_laid_back_over_the_winding_sees_half_the_voltage():
    lay = one_layer(2, 60)
    worst = lead_worst(lay, AIDING, [["A.finish", "B.start"]], ["A.start", "B.finish"],
                       {"joint": "back-over-winding"})
    # Common practice: the joint sits at V/2 and lies over turns from 0 to V.
    assert worst["A.finish"] == pytest.approx(0.5, abs=1 / 60)
    leads = lead_routes(lay, [["A.finish", "B.start"]], ["A.start", "B.finish"], {"joint": "end-flange"})
    # Lifted out where it ends, it lies beside no other turn.
    assert [x.beside.size for x in leads if x.end == "A.finish"] == [0]


def test_finish_brought_down_the_start_flange_sees_nearly_the_full_voltage():
    lay = cylinder_layout(0.02, 40 * D_OV * 1.0001, D_CU, D_OV, 1, 200)   # 5 layers
    down = lead_worst(lay, SINGLE, [], ["A.start", "A.finish"], {"finish": "down-start-flange"})
    over = lead_worst(lay, SINGLE, [], ["A.start", "A.finish"], {"finish": "over-top-layer"})
    # Derived: at the start flange layer 1's first turn sits near 0 V; the finish lead is at V.
    assert down["A.finish"] > 0.99
    # Over the top layer it lies only beside the last layer's turns, within 1/5 of V.
    assert over["A.finish"] < 0.2 + 1 / 200
