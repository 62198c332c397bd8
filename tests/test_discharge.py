"""Checks of windsheet.physics.discharge: Paschen's law, the inception voltage from the construction
against a 2-D field solution and published twisted-pair measurements."""

import math

import numpy as np
import pytest

from windsheet.physics import discharge as dis

from laplace2d import Grid, disc, ring
from windsheet.physics.wire_tables import iec_row

ATM = 101325.0


ATM = 101325.0


def test_paschen_minimum_near_327_volts():
    pd = np.geomspace(0.1, 100.0, 20001)
    v = dis.paschen_breakdown(pd)
    k = int(np.argmin(v))
    # Paschen's minimum for air (seen): about 327 V.
    assert v[k] == pytest.approx(327.0, rel=0.10)
    # Seen: the minimum lies near a 7.5 µm gap at 1 atm (the curve is flat there).
    assert 5e-6 < pd[k] / ATM < 15e-6
    assert dis.paschen_breakdown(ATM * 7.5e-6) == pytest.approx(327.0, rel=0.05)
    # Derived: dV/d(pd) = 0 at pd = e·ln(1+1/γ)/A.
    pd_min, v_min = dis.paschen_minimum()
    assert pd[k] == pytest.approx(pd_min, rel=1e-3) and v[k] == pytest.approx(v_min, rel=1e-6)


def test_paschen_centimetre_gap_near_three_megavolts_per_metre():
    # Common practice (memory): air at 1 atm breaks down at ~3 kV/mm over centimetre gaps.
    assert dis.paschen_breakdown(ATM * 0.01) == pytest.approx(30e3, rel=0.2)


def test_paschen_no_breakdown_left_of_asymptote():
    # Townsend criterion (Paschen 1889): too few collisions, no avalanche.
    assert dis.paschen_breakdown(0.01) == math.inf




# ---- the inception voltage against Paschen's law itself ------------------------------

def test_bare_electrodes_incept_at_paschens_minimum():
    # Paschen (1889): with no solid layer the gap that discharges first is the curve's minimum.
    assert dis.inception_voltage(0.0, 0.0) == pytest.approx(dis.paschen_minimum()[1], rel=1e-9)


@pytest.mark.parametrize("film_um,eps_r,gap_um", [(25, 3.5, 0), (12, 3.5, 0), (50, 4.0, 0), (25, 3.5, 80)])
def test_plane_films_against_a_direct_minimisation(film_um, eps_r, gap_um):
    from scipy.optimize import minimize_scalar
    solid = 2 * film_um * 1e-6 / eps_r
    g0 = gap_um * 1e-6

    # Independent computation: plane electrodes, each with a film, an air gap s between them; the air
    # takes s/(s + Σt/ε) of the voltage (series capacitors) and breaks down at Paschen's V(p s).
    def terminal(log_s):
        s = math.exp(log_s)
        return dis.paschen_breakdown(ATM * s) * (s + solid) / s

    best = minimize_scalar(terminal, bounds=(math.log(4.2e-6), math.log(1e-2)), method="bounded",
                           options={"xatol": 1e-10})
    expected = best.fun if math.exp(best.x) >= g0 else terminal(math.log(g0))
    assert dis.inception_voltage(g0, solid) == pytest.approx(expected, rel=1e-6)


def test_series_share_is_the_capacitor_divider():
    # Series plane capacitors (standard electrostatics): 20 µm of air against 50 µm of film at εr 3.5.
    assert dis.air_gap_share(20e-6, 50e-6 / 3.5) == pytest.approx(20 / (20 + 50 / 3.5), rel=1e-12)


# ---- against a 2-D field solution ----------------------------------------------------

def fd_pair_inception(cu, ov, eps_r, gap=0.0, tape=0.0, tape_eps=3.2, h=2e-6):
    """PDIV of two parallel enamelled wires from a finite-difference field solution.

    By symmetry, half the pair against its mid-plane (held at 0, copper at 1 = V/2); with a tape,
    the tape's half-thickness lies against the mid-plane.  Along each straight path parallel to the
    line of centres, the air between the enamel surface and the mid-plane (or the tape) takes the
    potential difference the field solution gives; the pair incepts at the lowest terminal voltage
    at which some path reaches Paschen's breakdown.
    """
    r, R = cu / 2, ov / 2
    cx = R + gap / 2 + tape / 2
    g = Grid(0, cx + R + 100e-6, 0, R + 150e-6, h)
    g.paint(ring(cx, 0, r, R), eps_r)
    g.paint(disc(cx, 0, r), 1e6)                   # copper: a near-perfect conductor, smoothly painted
    if tape:
        g.paint(lambda x, y: x < tape / 2, tape_eps)
    g.hold(lambda x, y: x <= 1e-12, 0.0)
    g.hold(disc(cx, 0, r * 0.5), 1.0)
    g.solve()
    y = np.linspace(0, 0.95 * R, 3000)
    surface = cx - np.sqrt(R ** 2 - y ** 2)
    if tape:
        air = surface - tape / 2                   # each of the two air gaps
        share = (g.at(surface, y) - g.at(np.full_like(y, tape / 2), y)) / 2
    else:
        air = 2 * surface                          # the whole air path between the two films
        share = g.at(surface, y)
    with np.errstate(divide="ignore", invalid="ignore"):
        v = dis.paschen_breakdown(ATM * air) / share
    return float(np.nanmin(v))


FD_CASES = [  # copper, overall [m], surface gap, tape
    (0.45e-3, 0.50e-3, 0.0, 0.0),
    (0.45e-3, 0.50e-3, 50e-6, 0.0),
    (0.10e-3, 0.123e-3, 0.0, 0.0),
    (0.45e-3, 0.50e-3, 0.0, 0.1e-3),
    (0.10e-3, 0.132e-3, 0.0, 0.0),                 # 0.1 mm grade 3, thickest film: the largest shortfall
    (0.20e-3, 0.252e-3, 0.0, 0.0),                 # 0.2 mm grade 3, thickest film (issue 29: 9.2 %)
]


@pytest.mark.parametrize("cu,ov,gap,tape", FD_CASES)
def test_inception_against_a_field_solution(cu, ov, gap, tape):
    film = (ov - cu) / 2
    model = float(dis.construction_inception([gap + tape], [tape > 0], film, 3.5, tape=tape)[0])
    field = fd_pair_inception(cu, ov, 3.5, gap, tape, h=min(2e-6, film / 6))
    # Independent computation (2-D finite differences, tests/laplace2d.py): the straight-path series
    # model reads low, the safe side, never high: measured 1-10 % over 0.1-1 mm, grades 1-3, at the
    # thickest film (0.1 mm grade 3: 9.6 %), 1-7 % at the thinnest (README's stated bound).
    assert 0.90 * field <= model <= 1.005 * field


@pytest.mark.parametrize("cu", [0.10e-3, 0.20e-3])
def test_inception_at_the_thinnest_film_against_a_field_solution(cu):
    # IEC 60317-0-1 grade 3 at its minimum increase (the film windsheet judges at); the same
    # finite-difference reference: within 7 % low.
    ov = cu + iec_row(cu, 3).min_increase
    film = (ov - cu) / 2
    model = float(dis.construction_inception([0.0], [False], film, 3.5)[0])
    field = fd_pair_inception(cu, ov, 3.5, h=min(2e-6, film / 6))
    assert 0.93 * field <= model <= 1.005 * field


# ---- the construction moves it the way it should --------------------------------------

def iec_film(cu_mm, grade):
    from windsheet.physics.wire import enamel_build
    return (enamel_build(cu_mm * 1e-3, grade)[0] - cu_mm * 1e-3) / 2


@pytest.mark.parametrize("cu_mm", [0.2, 0.5, 1.0])
def test_heavier_grade_raises_inception(cu_mm):
    v = [float(dis.construction_inception([0.0], [False], iec_film(cu_mm, g), 3.5)[0]) for g in (1, 2, 3)]
    # IEC 60317-0-1: each heavier grade has a thicker film; the films divide more of the voltage.
    assert v[0] < v[1] < v[2]


def test_spacing_raises_inception():
    gaps = np.array([0.0, 10e-6, 30e-6, 50e-6, 200e-6, 1e-3])
    v = dis.construction_inception(gaps, np.zeros(6, bool), 25e-6, 3.5)
    # Paschen: once the narrowest gap is wider than the path that discharges first between touching
    # turns (about 21 µm here), wider spacing leaves only longer, harder paths; below it, none changes.
    assert v[1] == pytest.approx(v[0], rel=1e-9)
    assert np.all(np.diff(v[1:]) > 0)


def test_impregnation_raises_or_removes_inception():
    bare, varnished, potted = (float(dis.construction_inception([0.0], [False], 25e-6, 3.5,
                                                                impregnation=m)[0])
                               for m in ("none", "varnish", "potted"))
    # A varnish coat is one more solid layer in series; potting leaves no air path at all.
    assert bare < varnished < 1.3 * bare and potted == math.inf


# ---- published twisted-pair measurements ------------------------------------------------

# Measured PDIV of twisted pairs of enamelled round wire at room temperature, 50 Hz, sits at about
# 500-900 V peak for grade 2 sizes 0.3-1 mm (memory: references.md; reported in, e.g., Kaufhold et
# al. 1996 and Lusuardi et al. 2019, not re-read).  A wide band: the figures scatter with enamel and
# humidity.
@pytest.mark.parametrize("cu_mm", [0.315, 0.5, 0.71, 1.0])
def test_grade2_twisted_pairs_incept_where_measured(cu_mm):
    v = float(dis.construction_inception([0.0], [False], iec_film(cu_mm, 2), 3.5)[0])
    assert 500.0 <= v <= 900.0


def test_inception_always_above_paschens_minimum():
    # Seen (references.md): below about 327 V peak no partial discharge starts between turns; the
    # model, with its Townsend constants (minimum 305 V), never goes below its own minimum.
    v = dis.construction_inception(np.linspace(0, 1e-3, 11), np.zeros(11, bool), 2e-6, 3.5)
    assert np.all(v >= dis.paschen_minimum()[1] * (1 - 1e-9))


def test_distinct_rows_is_numpys_unique():
    # numpy's own np.unique(axis=0) is the reference for the one-sort replacement.
    from windsheet.physics.discharge import _distinct_rows

    rng = np.random.default_rng(7)
    rows = np.round(rng.integers(0, 12, (5000, 3)) * 1e-5, 12)
    uniq, inverse = np.unique(rows, axis=0, return_inverse=True)
    got_uniq, got_inverse = _distinct_rows(rows)
    np.testing.assert_array_equal(got_uniq, uniq)
    np.testing.assert_array_equal(got_inverse, np.ravel(inverse))
