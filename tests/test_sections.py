"""Sectioned windings: layout, engine, voltage map and walls, each against a count made here."""

import copy

import numpy as np
import pytest
import yaml

from windsheet.design.build import build_design
from windsheet.order.document import parse_order
from windsheet.physics.inductance import strand_matrix, strand_matrix_bruteforce
from windsheet.physics.layout import cylinder_layout
from windsheet.physics.section_layout import sectioned_layout

from conftest import SAMPLES


def _size(doc, remedies=False):
    return build_design(parse_order(yaml.safe_dump(doc).encode(), "o.yaml"), remedies=remedies)


def _dc_coil(sections, **winding):
    doc = yaml.safe_load((SAMPLES / "hl-0442-sectioned-pulse-coil.yaml").read_text())
    doc["duty"] = {"voltage": "6 kV", "waveform": "dc"}
    doc["wire"] = {"size": "0.20 mm", "grade": 2}     # the sample's wire before it took grade 3 for its edge
    doc["winding"] = {"turns": 1800, "sections": sections, "lead_length": "0 mm",
                      "leads": {"start": "through-form", "finish": "end-flange"}, **winding}
    return doc


def test_engine_on_sections_against_the_filament_sum():
    def one(width, n):
        return cylinder_layout(0.02, width, 0.4e-3, 0.45e-3, 2, n, layer_style="stacked")
    lay = sectioned_layout(one, 0.0121, 3, 1.3e-3, 40)
    # Maxwell's mutual inductance summed turn by turn (the brute-force filament sum).
    assert strand_matrix(lay) == pytest.approx(strand_matrix_bruteforce(lay), rel=1e-9)
    assert len(set(lay.layers_per_section)) == 1 and lay.turns_per_strand == 40 and lay.sections == 3


def test_turns_split_evenly_and_each_section_starts_at_the_bore():
    d = _size(_dc_coil(4))
    # 1800 turns over 4 sections: 450 each (plain arithmetic).
    assert d.sections.turns_per_section == [450, 450, 450, 450]
    rows = d.layer_plan
    starts = [r for r in rows if r.layer == 1]
    assert [r.section for r in starts] == [1, 2, 3, 4]
    assert [r.counter_start for r in starts] == [0, 450, 900, 1350]
    assert [r.tape_after for r in rows if r.tape_after == "crossover"] == ["crossover"] * 3


@pytest.mark.parametrize("n", [4, 8])
def test_layer_voltage_falls_as_the_turns_a_layer_holds(n):
    one, many = _size(_dc_coil(1)), _size(_dc_coil(n))
    # Back-and-forth layers: the worst layer pair spans about 2·(s − 1) turns, s the turns a layer
    # holds (common practice); sections shorten s, so the worst voltage falls in that ratio (within
    # 8 %: at d.c. the outer layers' longer turns take a little more of the voltage each).
    expect = (many.fit.slots_per_layer - 1) / (one.fit.slots_per_layer - 1)
    assert many.worst_adjacent.voltage_Vpk / one.worst_adjacent.voltage_Vpk == pytest.approx(expect, rel=0.08)
    assert many.worst_adjacent.voltage_Vpk < one.worst_adjacent.voltage_Vpk / (n / 1.5)


def test_wall_voltage_is_the_hand_count():
    doc = _dc_coil(2, turns=120, layers=3, layer_style="stacked")
    doc["duty"] = {"voltage": "1000 V", "waveform": "dc"}
    d = _size(doc)
    n = 20
    # 60 turns a section in 3 layers: 20 a layer (the order's layer count, plain arithmetic).
    assert d.sections.layers_per_section == [3, 3] and d.winding.turns_in_layer == [n] * 6
    # At d.c. the voltage divides by resistance, so by wire length: each turn's potential is the
    # applied voltage less its share of the length wound before it (counted here turn by turn).
    r0 = (20e-3 + 0.239e-3) / 2
    step = 0.239e-3
    lengths = [2 * np.pi * (r0 + lay * step) for sec in range(2) for lay in range(3) for _ in range(n)]
    cum = np.concatenate([[0.0], np.cumsum(lengths)])
    v = 1000.0 * (1 - (cum[:-1] + cum[1:]) / 2 / cum[-1])
    # The turns against the wall: section 1's last slot (layer 1's last turn, layer 2's first,
    # layer 3's last); section 2's first slot (layer 1's first, layer 2's last, layer 3's first).
    before = [n - 1, n, 3 * n - 1]
    after = [3 * n, 5 * n - 1, 5 * n]
    hand = max(abs(v[a] - v[b]) for a in before for b in after)
    assert d.sections.walls[0].across_Vpk == pytest.approx(hand, rel=2e-3)


def test_sample_passes_and_the_remedy_offers_sections():
    d = _size(yaml.safe_load((SAMPLES / "hl-0442-sectioned-pulse-coil.yaml").read_text()))
    assert d.insulation.verdict == "pass" and d.sections.verdict == "pass"
    assert d.sections.count == 4 and len(d.sections.walls) == 3
    dc = _dc_coil(1, impregnation="potted")
    found = _size(dc, remedies=True).insulation.remedies
    sectioned = [r for r in found if "winding.sections" in r.set]
    assert sectioned and all(r.verdict in ("pass", "marginal") for r in sectioned)


def test_sections_refused_on_a_toroid():
    doc = yaml.safe_load((SAMPLES / "hl-0421-toroid-choke.yaml").read_text())
    doc = copy.deepcopy(doc)
    doc["winding"]["sections"] = 2
    with pytest.raises(Exception) as exc:
        _size(doc)
    assert "winding.sections" in str(getattr(exc.value, "path", "")) + str(exc.value)


def test_a_wall_is_judged_at_the_larger_of_the_steady_and_the_edge_voltage():
    from types import SimpleNamespace

    from windsheet.design.section_check import check_sections

    def one(width, n):
        return cylinder_layout(0.02, width, 0.2e-3, 0.239e-3, 1, n, layers=3, layer_style="stacked")
    lay = sectioned_layout(one, 2 * 20 * 0.239e-3 + 1e-3 + 1e-6, 2, 1e-3, 120)
    order = np.argsort(np.argsort(lay.index))          # each turn's place along the winding
    steady = np.linspace(1000.0, 0.0, 120)[order]
    edge = steady.copy()
    edge[order < 20] = 1000.0                             # the edge holds section 1's first layer up
    wall = SimpleNamespace(strength=None, per=1e-3, thickness=1e-3, material="nylon", pollution_degree=2,
                           material_group="IIIa")
    # Counted by hand as in test_wall_voltage_is_the_hand_count: the facing turns are 19, 20, 59
    # and 60, 99, 100 along the winding.
    by_place = {int(k): t for t, k in enumerate(order)}
    before, after = [by_place[k] for k in (19, 20, 59)], [by_place[k] for k in (60, 99, 100)]
    hand = max(max(abs(v[a] - v[b]) for a in before for b in after) for v in (steady, edge))
    got = check_sections(lay, steady, wall, 0.25, False, potted=True, edge_potential=edge)["walls"][0]
    assert got["across_Vpk"] == pytest.approx(hand, rel=1e-12) and hand > 500.0
