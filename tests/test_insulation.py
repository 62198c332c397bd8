"""Checks of the insulation verdict's policy (windsheet.physics.insulation)."""

import math

import pytest

from windsheet.physics import insulation as ins


def verdict(worst, **kw):
    kw.setdefault("breakdown_V", 4600.0)
    return ins.insulation_verdict(worst, **kw)


def test_pass_well_below_the_inception_voltage():
    out = verdict(200.0, pdiv_Vpk=683.0)
    # Common practice: a quarter of the published breakdown; 683 V less 25 % hot, over 1.25 = 410 V.
    assert out["verdict"] == "pass" and "200 V peak" in out["reasons"][0]
    assert out["allowed_Vpk"] == pytest.approx(1150.0)
    assert out["pdiv_hot_Vpk"] == pytest.approx(683.0 * 0.75)


def test_marginal_within_the_safety_factor_of_the_hot_inception_voltage():
    # IEC 60034-18-41 safety factor 1.25 (memory): 450 × 1.25 = 562 > 525 V hot PDIV.
    out = verdict(450.0, pdiv_Vpk=700.0)
    assert out["verdict"] == "marginal" and "1.25" in out["reasons"][0]
    assert verdict(400.0, pdiv_Vpk=700.0)["verdict"] == "pass"


def test_fail_above_hot_inception_on_ac_but_marginal_on_dc():
    # Memory: sustained partial discharge erodes enamel on AC; steady DC does not sustain it.
    assert verdict(600.0, pdiv_Vpk=700.0)["verdict"] == "fail"
    assert verdict(600.0, pdiv_Vpk=700.0, ac=False)["verdict"] == "marginal"
    assert verdict(500.0, pdiv_Vpk=700.0, ac=False)["verdict"] == "pass"


def test_fail_over_derated_breakdown():
    out = verdict(1200.0, ac=False)
    # Common practice: work enamel at no more than a quarter of its published breakdown.
    assert out["verdict"] == "fail" and "1150 V peak" in out["reasons"][0]
    assert out["margin"] == pytest.approx(1150.0 / 1200.0)


def test_rated_tape_carries_the_layer_voltage_instead_of_the_enamel():
    # The enamel check covers pairs held by enamel alone; across a rated tape the rating governs.
    out = verdict(3000.0, enamel_Vpk=900.0, layer_Vpk=3000.0, tape_rating_V=10e3, ac=False)
    assert out["verdict"] == "pass"
    assert verdict(300.0, layer_Vpk=300.0, tape_rating_V=250.0)["verdict"] == "fail"


def test_no_air_path_no_partial_discharge_but_breakdown_still_governs():
    out = verdict(900.0, pdiv_Vpk=math.inf, pdiv_basis="no air path", impregnation="potted")
    assert out["verdict"] == "pass" and out["pdiv_Vpk"] is None
    assert any("Potted" in r for r in out["reasons"])
    assert verdict(1200.0, pdiv_Vpk=math.inf, impregnation="potted")["verdict"] == "fail"


@pytest.mark.parametrize("worst,text", [(4.366, "4.37 V peak"), (0.5, "0.500 V peak"),
                                        (12.34, "12.3 V peak"), (162.6, "163 V peak")])
def test_verdict_prints_voltages_to_three_figures(worst, text):
    out = verdict(worst, pdiv_Vpk=683.0)
    # Common practice: three significant figures, so a few volts do not print as "0 V".
    assert text in out["reasons"][0]
    assert "within the enamel's allowed 1150 V peak" in out["reasons"][0]


@pytest.mark.parametrize("U,test_V", [(230.0, 1460.0), (24.0, 1048.0), (400.0, 1800.0)])
def test_hipot_two_u_plus_1000(U, test_V):
    # Common practice, IEC 60034-1 style (memory): 2U + 1000 V for 1 min.
    assert ins.hipot_voltage(U) == pytest.approx(test_V)
