"""Per-turn flux linkage against the plain N × N sum and the strand matrix."""

import numpy as np
import pytest

from windsheet.physics.flux_linkage import cored_turn_flux_linkage, turn_flux_linkage
from windsheet.physics.inductance import loop_self_inductance, maxwell_mutual, strand_matrix
from windsheet.physics.layout import cylinder_layout


def bruteforce_linkage(lay, current):
    # Maxwell (1873) between every pair of turns, the round-wire loop (Grover 1946) on the
    # diagonal: the full N × N turn matrix times each turn's strand current.
    r, z = lay.r, lay.z
    with np.errstate(divide="ignore"):
        m = maxwell_mutual(r[:, None], r[None, :], z[:, None] - z[None, :])
    np.fill_diagonal(m, loop_self_inductance(r, lay.copper_diameter / 2))
    return m @ np.asarray(current)[lay.strand]


CASES = [
    dict(strands=1, turns=40, layers=None, pitch_factor=1.0, tape=0.0),
    dict(strands=2, turns=60, layers=3, pitch_factor=1.0, tape=0.0),
    dict(strands=3, turns=17, layers=3, pitch_factor=1.0, tape=1e-4),
    dict(strands=2, turns=30, layers=3, pitch_factor=1.7, tape=5e-5),
]


@pytest.mark.parametrize("case", CASES)
def test_offset_sums_equal_the_full_matrix(case):
    ov, s = 0.4e-3, case["strands"]
    lay = cylinder_layout(0.012, 16e-3, 0.35e-3, ov, s, case["turns"], layers=case["layers"],
                          pitch=s * ov * case["pitch_factor"], tape=case["tape"])
    current = (1.0 + np.arange(s)) * np.exp(0.7j * np.arange(s))
    # Independent computation: the O(N²) turn-by-turn sum.
    np.testing.assert_allclose(turn_flux_linkage(lay, current), bruteforce_linkage(lay, current),
                               rtol=1e-12)


def test_strand_sums_are_the_strand_matrix():
    lay = cylinder_layout(0.02, 20e-3, 0.45e-3, 0.5e-3, 2, 50, layers=3)
    current = np.array([1.0, -0.4 + 0.1j])
    lam = turn_flux_linkage(lay, current)
    per_strand = np.array([lam[lay.strand == s].sum() for s in range(2)])
    # The strand matrix is the same double sum gathered by strand (Grover 1946).
    np.testing.assert_allclose(per_strand, strand_matrix(lay) @ current, rtol=1e-12)


def test_end_turns_of_a_solenoid_link_less_flux():
    lay = cylinder_layout(0.02, 20e-3, 0.45e-3, 0.5e-3, 1, 40, layers=1)
    lam = turn_flux_linkage(lay, [1.0]).real
    # Physics: the field of a solenoid falls towards its ends, so its end turns link less.
    assert lam[0] < lam[20] and lam[-1] < lam[20]
    assert lam[0] == pytest.approx(lam[-1], rel=1e-12)  # symmetry


def test_cored_emf_is_uniform_along_each_strand():
    from windsheet.physics.layout import toroid_layout
    lay = toroid_layout(0.02, 0.04, 0.01, 0.45e-3, 0.5e-3, 2, 12)
    L = np.array([[1e-3, 0.9e-3], [0.9e-3, 1e-3]])
    lam = cored_turn_flux_linkage(lay, L, [1.0, 1.0])
    # Faraday's law on a closed core (common practice): every turn of a strand links the same flux.
    for s in range(2):
        assert np.allclose(lam[lay.strand == s], (L @ [1.0, 1.0])[s] / 12)
