"""Hookup network against standard circuit theory for coupled inductors."""

import numpy as np
import pytest

from windsheet.physics.hookup import HookupError, check_hookup, named_hookup
from windsheet.physics.network import alternative_hookups, separate_windings, solve_network

L1, L2, M = 1.0e-3, 0.8e-3, 0.6e-3
LM = np.array([[L1, M], [M, L2]])
TINY_R = np.array([1e-6, 1e-6])


def solve(name, L=LM, R=TINY_R, f=1e4):
    joins, terms = named_hookup(name, len(R))
    return solve_network(L, R, joins, terms, f, hookup=name)


# Standard circuit theory (coupled inductors): series-aiding L1 + L2 + 2M, series-opposing L1 + L2 - 2M.
def test_series_aiding_and_opposing():
    assert solve("series-aiding").inductance == pytest.approx(L1 + L2 + 2 * M, rel=1e-9)
    assert solve("series-opposing").inductance == pytest.approx(L1 + L2 - 2 * M, rel=1e-9)


# Standard circuit theory: coupled inductors in parallel, (L1 L2 - M^2) / (L1 + L2 - 2M).
def test_parallel_coupled():
    assert solve("parallel").inductance == pytest.approx((L1 * L2 - M ** 2) / (L1 + L2 - 2 * M), rel=1e-6)


# Common practice: two tightly coupled equal strands give ~4x in series-aiding, ~0 opposed, ~1x in parallel.
def test_tight_bifilar_trade_facts():
    L = np.array([[1.0, 0.999], [0.999, 1.0]]) * 1e-4
    R = np.array([0.5, 0.5])
    assert solve("series-aiding", L, R).inductance == pytest.approx(4e-4, rel=1e-3)
    assert solve("series-opposing", L, R).inductance < 1e-3 * 4e-4
    assert solve("parallel", L, R).inductance == pytest.approx(1e-4, rel=1e-3)
    # Ohm's law: series resistances add, equal parallel ones halve.
    assert solve("series-aiding", L, R).resistance == pytest.approx(1.0, rel=1e-12)
    assert solve("parallel", L, R).resistance == pytest.approx(0.25, rel=1e-12)


# Standard circuit theory (uncoupled): A in series with B parallel C gives LA + LB LC/(LB + LC).
def test_three_strand_custom_hookup():
    L = np.diag([1e-3, 2e-3, 3e-3])
    R = np.array([1.0, 2.0, 3.0])
    res = solve_network(L, R, [["A.finish", "B.start", "C.start"], ["B.finish", "C.finish"]],
                        ["A.start", "C.finish"], 1e6)
    assert res.inductance == pytest.approx(1e-3 + 2e-3 * 3e-3 / 5e-3, rel=1e-6)
    assert res.resistance == pytest.approx(1.0 + 2.0 * 3.0 / 5.0, rel=1e-12)


# Kirchhoff: series strands carry the whole current; the hairpin's second strand runs backwards.
def test_strand_currents_and_potentials():
    res = solve("series-opposing")
    assert np.allclose(res.strand_current, [1, -1])
    aid = solve("series-aiding", R=np.array([1.0, 1.0]), f=0.0)
    # DC, equal resistances: the joint sits at half the applied voltage.
    assert np.allclose(aid.end_potential, [[1, 0.5], [0.5, 0]])


# Four strands in series-aiding: terminal L is the sum of the whole matrix (standard circuit theory).
def test_four_strand_series_aiding_is_matrix_sum():
    rng = np.random.default_rng(4)
    a = rng.uniform(0.5, 1.0, (4, 4))
    L = (a @ a.T) * 1e-4
    res = solve("series-aiding", L, np.full(4, 1e-6))
    assert res.inductance == pytest.approx(L.sum(), rel=1e-9)


@pytest.mark.parametrize("joins, terms, where, words", [
    ([["A.finish", "B.start"]], ["A.start", "A.finish"], "hookup", "unconnected"),
    ([["A.finish", "B.start"], ["A.start", "B.finish"]], ["A.start", "B.finish"], "hookup.terminals", "short"),
    ([["A.start", "A.finish"]], ["B.start", "B.finish"], "hookup.joins", "shorted out"),
    ([["A.finish", "C.start"]], ["A.start", "B.finish"], "hookup.joins[0][1]", "does not exist"),
    ([["A.finish", "B.middle"]], ["A.start", "B.finish"], "hookup.joins[0][1]", "'start' or 'finish'"),
    ([["A.finish"]], ["A.start", "B.finish"], "hookup.joins[0]", "two or more"),
    ([], ["A.start"], "hookup.terminals", "exactly two"),
])
def test_bad_hookups_are_refused(joins, terms, where, words):
    with pytest.raises(HookupError) as e:
        check_hookup(joins, terms, 2)
    assert e.value.where == where and words in str(e.value)


def test_alternatives_cover_the_wiring_mistakes():
    alt = alternative_hookups(LM, np.array([1.0, 1.0]), 1e4)
    assert set(alt) == {"series-aiding", "series-opposing", "parallel", "single strand"}
    assert alt["single strand"]["inductance_H"] == L1
    three = alternative_hookups(np.eye(3) * 1e-3, np.ones(3), 1e4)
    assert "one strand reversed" in three


def test_separate_windings_offset():
    res = separate_windings(LM, np.array([1.0, 1.0]), between=100.0)
    assert np.allclose(res.end_potential, [[0, 1], [100, 101]])
    assert res.inductance == L1


def test_separate_windings_need_a_pin_for_every_end():
    # Each strand of a separate hookup is its own winding: all four ends come out (T1..T4).
    from windsheet.physics.hookup import HookupError, brought_out, named_hookup, pin_assignment

    joins, terms = named_hookup("separate", 2)
    out = brought_out("separate", terms, "AB")
    assert out == ["A.start", "A.finish", "B.start", "B.finish"]
    pins = pin_assignment({"A.start": 1, "A.finish": 2, "B.start": 5, "B.finish": 6}, joins, terms, out, 2)
    assert [p["pin"] for p in pins] == ["1", "2", "5", "6"]
    with pytest.raises(HookupError, match="B.finish"):
        pin_assignment({"A.start": 1, "A.finish": 2, "B.start": 5}, joins, terms, out, 2)
    with pytest.raises(HookupError, match="short"):  # two windings on one pin
        pin_assignment({"A.start": 1, "A.finish": 2, "B.start": 2, "B.finish": 6}, joins, terms, out, 2)
