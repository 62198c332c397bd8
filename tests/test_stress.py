"""Checks of windsheet.physics.stress.assess: the whole stress check of a winding on its duty."""

import math
from types import SimpleNamespace

import numpy as np
import pytest

from windsheet.physics import capacitance as cap
from windsheet.physics import stress
from windsheet.physics.layout import cylinder_layout, toroid_layout
from windsheet.physics.neighbours import neighbours

from strand_ends import AIDING, D_CU, D_OV, OPPOSING, SINGLE, one_layer  # noqa: F401

# ---- assess -------------------------------------------------------------------

def network(ends, L=1e-3, current=None):
    ends = np.asarray(ends, dtype=complex)
    current = np.ones(len(ends)) if current is None else current
    return SimpleNamespace(end_potential=ends, inductance=L, strand_current=np.asarray(current, dtype=complex))


def test_assess_ac_uses_peak_and_dc_uses_value():
    lay = one_layer(2, 40)
    ac = stress.assess(lay, network(OPPOSING), 230.0, 50.0, 4600.0)
    dc = stress.assess(lay, network(OPPOSING), 230.0, 0.0, 4600.0)
    # Common practice: peak = √2 × rms for sine duty; DC stress is the DC value.
    assert ac["worst_adjacent"]["voltage_Vpk"] == pytest.approx(
        math.sqrt(2) * dc["worst_adjacent"]["voltage_Vpk"], rel=1e-12)
    assert dc["worst_adjacent"]["voltage_Vpk"] == pytest.approx(230.0, rel=1 / 40)
    assert ac["insulation"]["duty"] == "ac" and dc["insulation"]["duty"] == "dc"


def test_assess_self_resonance_and_terminal_capacitance():
    lay = one_layer(1, 60)
    out = stress.assess(lay, network(SINGLE, L=50e-6), 10.0, 1e3, 4600.0)
    cap = out["capacitance"]
    # Standard circuit theory: f = 1/(2π√(LC)) with the terminal C.
    assert out["self_resonance_Hz"] == pytest.approx(
        1 / (2 * math.pi * math.sqrt(50e-6 * cap["terminal_F"])), rel=1e-12)
    # Medhurst 1947: H = .46..0.47 at ℓ/D ≈ 1.5, D ≈ 2.05 cm → about 0.96 pF.
    assert cap["self_F"] == pytest.approx(0.47 * 2.05e-12, rel=0.03)
    # One strand, one layer: Medhurst's value is the whole of it (the single-layer rule).
    assert cap["terminal_F"] == pytest.approx(cap["self_F"], rel=1e-12)
    assert cap["strand_to_strand_F"] is None and cap["layer_to_layer_F"] is None


def test_assess_warns_near_and_above_self_resonance():
    lay = one_layer(1, 60)
    srf = stress.assess(lay, network(SINGLE), 10.0, 50.0, 4600.0)["self_resonance_Hz"]
    # Common practice: keep duty frequency well below self-resonance (under a third here).
    assert stress.assess(lay, network(SINGLE), 10.0, 50.0, 4600.0)["warnings"] == []
    near = stress.assess(lay, network(SINGLE), 10.0, srf / 2, 4600.0)["warnings"]
    assert len(near) == 1 and not near[0].startswith("ERROR")
    above = stress.assess(lay, network(SINGLE), 10.0, 2 * srf, 4600.0)["warnings"]
    assert above[0].startswith("ERROR")


def test_assess_multilayer_reports_layer_voltage_and_capacitance():
    lay = cylinder_layout(0.02, 50 * D_OV + 1e-9, D_CU, D_OV, 1, 200, tape=50e-6)
    out = stress.assess(lay, network(SINGLE), 100.0, 0.0, 4600.0, tape_rating_V=120.0)
    # Common practice: ~2V·n/N at the layer return, 2·50/200 × 100 V = 50 V.
    assert out["layer_Vpk"] == pytest.approx(50.0, rel=0.02)
    assert out["capacitance"]["layer_to_layer_F"] > 0 and out["capacitance"]["self_F"] is None
    assert out["insulation"]["verdict"] == "pass"
    assert stress.assess(lay, network(SINGLE), 300.0, 0.0, 4600.0,
                         tape_rating_V=120.0)["insulation"]["verdict"] == "fail"


def test_toroid_start_and_finish_meet_across_gap():
    lay = toroid_layout(0.02, 0.04, 0.01, D_CU, D_OV, 1, 50)
    out = stress.assess(lay, network(SINGLE), 100.0, 50.0, 4600.0)
    # Common practice: start and finish of a toroid meet, nearly the full voltage apart.
    assert out["worst_adjacent"]["kind"] == "lead"
    assert out["worst_adjacent"]["voltage_Vpk"] == pytest.approx(100 * math.sqrt(2), rel=1 / 50)
    i, j, kind = neighbours(lay)
    _, _, _, c, _ = cap.pair_capacitances(lay)
    assert 0 < c[kind == "lead"][0] < c[kind == "side"].min()
