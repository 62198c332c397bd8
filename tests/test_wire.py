"""Wire data against the standards it comes from."""

import math

import pytest

from windsheet import wire


# ASTM B258: d = 0.127 mm x 92^((36-n)/39); 36 AWG is 0.127 mm and 0000 AWG 0.46 in by definition.
@pytest.mark.parametrize("gauge, mm", [(36, 0.127), (-3, 11.684), (22, 0.6438), (30, 0.2546), (10, 2.588)])
def test_awg_diameter_astm_b258(gauge, mm):
    assert wire.awg_diameter(gauge) * 1e3 == pytest.approx(mm, rel=2e-4)


# ASTM B258: the ratio between successive gauges is 92^(1/39) = 1.12293 (computed from the definition).
def test_awg_step_ratio():
    assert wire.awg_diameter(20) / wire.awg_diameter(21) == pytest.approx(92 ** (1 / 39), rel=1e-12)
    assert 92 ** (1 / 39) == pytest.approx(1.122932, abs=1e-6)


# IEC 60028: 1/58 ohm mm^2/m at 20 degC; a 1 mm^2 wire 58 m long is 1 ohm (memory, standard definition).
def test_iec60028_resistivity():
    d = math.sqrt(4 / math.pi) * 1e-3  # 1 mm^2
    assert wire.dc_resistance(58.0, d) == pytest.approx(1.0, rel=1e-4)


# IEC 60028: temperature coefficient 0.00393 /K at 20 degC (memory).
def test_iec60028_temperature_coefficient():
    d = 0.5e-3
    r20 = wire.dc_resistance(10.0, d)
    assert wire.dc_resistance(10.0, d, 75.0) / r20 == pytest.approx(1 + 0.00393 * 55, rel=1e-12)
    assert wire.resistance_to_20C(wire.dc_resistance(10.0, d, 35.0), 35.0) == pytest.approx(r20, rel=1e-12)


# IEC 60028: density 8.89 g/cm^3 (memory): 1 m of 1 mm^2 copper weighs 8.89 g.
def test_copper_mass():
    d = math.sqrt(4 / math.pi) * 1e-3
    assert wire.copper_mass(1.0, d) == pytest.approx(8.89e-3, rel=1e-9)


# IEC 60317-0-1 (as in IS 13730-0-1), seen on a maker's table: max overall diameter and min breakdown
# must come back exactly at the tabulated sizes.
@pytest.mark.parametrize("nominal, grade, overall, breakdown", [
    (0.315, 1, 0.349, 2200), (0.315, 3, 0.384, 6100), (0.508, 2, 0.578, 4600),
    (0.610, 2, 0.684, 4800), (0.813, 3, 0.931, 7600), (1.016, 1, 1.080, 2700),
])
def test_iec60317_table_rows(nominal, grade, overall, breakdown):
    od, bd, extrap = wire.enamel_build(nominal * 1e-3, grade)
    assert od * 1e3 == pytest.approx(overall, abs=1e-9)
    assert bd == pytest.approx(breakdown, rel=1e-9)
    assert not extrap


# Between rows the build lies between its neighbours' (monotone in IEC 60317-0-1); outside it is flagged.
def test_iec60317_interpolation_and_extrapolation_flag():
    od, bd, extrap = wire.enamel_build(0.56e-3, 2)
    assert 0.578 - 0.508 < od * 1e3 - 0.56 < 0.684 - 0.610 and 4600 < bd < 4800 and not extrap
    w = wire.standard_wire(0.1e-3, 2)
    assert w.warnings and "outside" in w.warnings[0]
    w = wire.standard_wire(0.1e-3, 2, overall_d=0.125e-3, breakdown=1200.0)
    assert not w.warnings and w.overall_diameter == 0.125e-3 and w.breakdown == 1200.0
