"""AC resistance: the round-wire skin effect against scipy's Bessel functions, Dowell's factor
against his published limits and an independent 1-D field solution."""

import math

import numpy as np
import pytest
from scipy.special import jv

from windsheet.physics.ac_resistance import (dowell_factor, dowell_penetration, round_wire_ac_ratio,
                                     skin_depth, winding_ac_ratio)


def bessel_ratio(a_over_delta):
    # Independent form: internal impedance of a round wire, Z ∝ (ka/2)·J0(ka)/J1(ka),
    # k = (1 − j)/δ (Ramo, Whinnery & Van Duzer §5.12), with scipy's complex J0, J1.
    ka = (1 - 1j) * a_over_delta
    return float(np.real(ka / 2 * jv(0, ka) / jv(1, ka)))


@pytest.mark.parametrize("a_over_delta", [0.3, 1.0, 2.0, 3.0, 5.0, 8.0, 20.0, 60.0])
def test_round_wire_matches_scipy_bessel(a_over_delta):
    d, delta = 1e-3, 0.5e-3 / a_over_delta
    # Exact Bessel solution, evaluated with scipy.special.jv at complex argument.
    assert round_wire_ac_ratio(d, delta) == pytest.approx(bessel_ratio(a_over_delta), rel=1e-9)


def test_round_wire_limits():
    # Low frequency: R/R0 = 1 + x⁴/192, x = √2·a/δ (Schelkunoff 1943, series of the Kelvin functions).
    x = 0.2
    assert round_wire_ac_ratio(1e-3, math.sqrt(2) * 0.5e-3 / x) == pytest.approx(1 + x ** 4 / 192, rel=1e-7)
    # High frequency: R/R0 → a/(2δ) + 1/4 (same source); at a/δ = 400, past the Kelvin range.
    assert round_wire_ac_ratio(1e-3, 0.5e-3 / 400) == pytest.approx(200.25, rel=1e-5)
    # Either side of the switch to the asymptotic form the ratio is continuous.
    lo = round_wire_ac_ratio(1e-3, math.sqrt(2) * 0.5e-3 / 299.9)
    hi = round_wire_ac_ratio(1e-3, math.sqrt(2) * 0.5e-3 / 300.1)
    assert hi == pytest.approx(lo, rel=1e-3)


def test_skin_depth_of_copper():
    # Copper at 20 °C, 1/58 Ω·mm²/m: δ = 66.1 mm/√f (common handbook figure, memory: 0.209 mm at 100 kHz).
    assert skin_depth(100e3, 1 / 58e6) == pytest.approx(0.066085 / math.sqrt(100e3), rel=1e-4)


def foil_layer_factor(delta, m, n=400):
    # Independent 1-D solution: layer k of a portion of m foil layers sits in a field rising
    # from (k−1)·H to k·H across it; its loss over the DC loss, averaged over the layers, is
    # Dowell's F.  Here the field equation d²H/dx² = j·2/δ²·H is solved by finite differences.
    h = delta                            # thickness in skin depths (δ = 1)
    x = np.linspace(0.0, h, n + 1)
    dx = x[1] - x[0]
    total = 0.0
    for k in range(1, m + 1):
        A = np.zeros((n + 1, n + 1), dtype=complex)
        b = np.zeros(n + 1, dtype=complex)
        A[0, 0] = A[n, n] = 1.0
        b[0], b[n] = k - 1, k
        for i in range(1, n):
            A[i, i - 1] = A[i, i + 1] = 1.0 / dx ** 2
            A[i, i] = -2.0 / dx ** 2 - 2j
        H = np.linalg.solve(A, b)
        J = np.gradient(H, dx)
        loss = np.trapezoid(np.abs(J) ** 2, x) if hasattr(np, "trapezoid") else np.trapz(np.abs(J) ** 2, x)
        total += loss / (1.0 / h)        # DC: current density 1/h over thickness h
    return total / m


@pytest.mark.parametrize("delta,m", [(0.5, 1), (1.0, 1), (2.0, 1), (1.0, 3), (0.7, 5)])
def test_dowell_against_a_field_solution(delta, m):
    # Dowell (1966) eq. 15 against the finite-difference field of the same layers.
    assert dowell_factor(delta, m) == pytest.approx(foil_layer_factor(delta, m), rel=2e-3)


@pytest.mark.parametrize("m", [1, 2, 5, 10])
def test_dowell_published_limits(m):
    # Low-frequency form F ≈ 1 + (5m² − 1)Δ⁴/45 (Snelling, Soft Ferrites 1988 §11.3, memory).
    d = 0.1
    assert dowell_factor(d, m) == pytest.approx(1 + (5 * m * m - 1) * d ** 4 / 45, rel=1e-5)
    # High frequency: F → Δ(2m² + 1)/3 (Dowell 1966, the asymptote of his fig. 7 curves).
    assert dowell_factor(30.0, m) == pytest.approx(30.0 * (2 * m * m + 1) / 3, rel=1e-7)


def test_dowell_equivalent_square():
    # Dowell 1966: square of side d·√π/2, porosity that side over the spacing.
    d, p, delta = 0.5e-3, 0.6e-3, 0.2e-3
    h = d * math.sqrt(math.pi) / 2
    assert dowell_penetration(d, delta, p) == pytest.approx(h / delta * math.sqrt(h / p), rel=1e-12)


def test_single_layer_coil_at_100_kHz():
    # The test's own computation: Bessel by scipy's J0/J1, Dowell's eq. 15 written out here.
    d, p, rho, f = 0.5e-3, 0.55e-3, 1 / 58e6, 100e3
    delta = math.sqrt(2 * rho / (2 * math.pi * f * 4e-7 * math.pi))
    D = (math.pi / 4) ** 0.75 * d / delta * math.sqrt(d / p)
    dow = D * (math.sinh(2 * D) + math.sin(2 * D)) / (math.cosh(2 * D) - math.cos(2 * D))
    got = winding_ac_ratio(f, d, rho, 1, p)
    assert got["round_wire"] == pytest.approx(bessel_ratio(d / 2 / delta), rel=1e-9)
    assert got["dowell"] == pytest.approx(dow, rel=1e-9)
    assert got["ratio"] == pytest.approx(max(dow, bessel_ratio(d / 2 / delta)), rel=1e-9)
    assert winding_ac_ratio(0.0, d, rho, 1, p)["ratio"] == 1.0


def test_single_layer_sample_at_100_kHz_through_the_prediction():
    import yaml
    from conftest import SAMPLES
    from windsheet.order.document import parse_order
    from windsheet.design.build import build_design

    text = (SAMPLES / "hl-0410-single.yaml").read_text()
    p = build_design(parse_order(text.encode(), "o.yaml"), remedies=False)
    d = p.wire.copper_diameter_m
    t = p.duty.operating_temperature_C
    # IEC 60028 copper: 1/58 Ω·mm²/m at 20 °C, 0.00393 /K.
    rho = 1 / 58e6 * (1 + 0.00393 * (t - 20))
    delta = math.sqrt(2 * rho / (2 * math.pi * 100e3 * 4e-7 * math.pi))
    pitch = p.winding.pitch_m
    D = (math.pi / 4) ** 0.75 * d / delta * math.sqrt(d / pitch)
    # Dowell 1966 eq. 15 (m = 1) and the Bessel solution by scipy, computed here.
    dow = D * (math.sinh(2 * D) + math.sin(2 * D)) / (math.cosh(2 * D) - math.cos(2 * D))
    expected = max(dow, bessel_ratio(d / 2 / delta))
    assert p.ac_resistance.ratio == pytest.approx(expected, rel=1e-4)   # constants as printed
    s = p.strands[0]
    assert s.resistance_ac_ohm == pytest.approx(s.resistance_hot_ohm * expected, rel=1e-4)
    assert p.terminal.resistance_ac_ohm == pytest.approx(s.resistance_ac_ohm, rel=1e-9)
    # Loss at the duty current, I²·R_ac.
    assert p.terminal.loss_W == pytest.approx(0.1 ** 2 * s.resistance_ac_ohm, rel=1e-9)


def test_kelvin_functions_by_bessels_integral_against_scipy():
    from scipy.special import kelvin

    from windsheet.physics.ac_resistance import kelvin_ber_bei

    x = np.concatenate([np.linspace(0.0, 10.0, 41), np.geomspace(10.0, 300.0, 25)])
    b, db = kelvin_ber_bei(x)
    z = x * np.exp(0.75j * np.pi)
    # ber + i bei = J0(x e^{3πi/4}), derivative -e^{3πi/4} J1 (DLMF 10.61.1); scipy's jv (AMOS) as reference.
    np.testing.assert_allclose(b, jv(0, z), rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(db, -np.exp(0.75j * np.pi) * jv(1, z), rtol=1e-12, atol=1e-15)
    # scipy.special.kelvin (Zhang & Jin's routines) agrees to its own accuracy, about 5e-10 near x = 10.
    ber, bei, berp, beip = kelvin(x)
    np.testing.assert_allclose(b, ber, rtol=1e-8)
    np.testing.assert_allclose(db, berp, rtol=1e-8)
