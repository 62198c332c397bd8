"""Winding layout: layer styles, strand spacing and the neighbour search, checked by brute force."""

import math

import numpy as np
import pytest

from windsheet.physics.layout import cylinder_layout, layer_geometry, toroid_layout
from windsheet.physics.neighbours import NEIGHBOUR_GAP_FRACTION, neighbour_gap_limit, neighbour_pairs

CU, OV = 0.45e-3, 0.50e-3


def brute_force_pairs(lay):
    # Every pair by the O(N²) double loop: surfaces closer than the limit, or next along a layer.
    d = lay.overall_diameter
    limit = neighbour_gap_limit(lay)
    dist = np.hypot(lay.r[:, None] - lay.r[None, :], lay.z[:, None] - lay.z[None, :])
    close = (dist - d < limit * (1 + 1e-9)) & ~np.eye(lay.n_turns, dtype=bool)
    out = {(min(a, b), max(a, b)) for a, b in zip(*np.nonzero(close))}
    for lay_i in range(lay.layers):
        sel = np.flatnonzero(lay.layer == lay_i)
        order = sel[np.argsort(lay.z[sel])]
        out |= {(min(a, b), max(a, b)) for a, b in zip(order[:-1], order[1:])}
    return out


LAYOUTS = [
    dict(strands=1, turns=60, layers=3),
    dict(strands=2, turns=30, layers=2),
    dict(strands=3, turns=40, layers=4, tape=0.1e-3),
    dict(strands=2, turns=30, layers=3, pitch=3 * OV),
    dict(strands=2, turns=30, layers=3, pitch=3 * OV, strand_spacing="even"),
    dict(strands=1, turns=50, layers=2, layer_style="stacked"),
]


@pytest.mark.parametrize("kw", LAYOUTS)
def test_neighbour_search_matches_the_double_loop(kw):
    lay = cylinder_layout(0.02, 16e-3, CU, OV, **kw)
    nb = neighbour_pairs(lay)
    found = {(min(a, b), max(a, b)) for a, b in zip(nb.i, nb.j)}
    # Independent computation: the plain double loop over every pair of turns.
    assert found == brute_force_pairs(lay)
    assert len(found) == nb.size
    # Kind by layer, gap by geometry (centre distance less one overall diameter).
    same = lay.layer[nb.i] == lay.layer[nb.j]
    assert np.all((nb.kind == "side") == same)
    dist = np.hypot(lay.r[nb.i] - lay.r[nb.j], lay.z[nb.i] - lay.z[nb.j])
    assert nb.gap == pytest.approx(np.maximum(dist - OV, 0), abs=1e-15)


def test_neighbour_search_is_kept_with_the_layout():
    lay = cylinder_layout(0.02, 16e-3, CU, OV, 1, 60, layers=2)
    assert neighbour_pairs(lay) is neighbour_pairs(lay)


def test_nested_layers_lie_in_the_grooves():
    lay = cylinder_layout(0.02, 16e-3, CU, OV, 1, 60, layers=2)
    assert lay.layer_style == "nested"
    # Geometry of touching equal circles: the upper centre is d·√3/2 out and d/2 along.
    assert lay.layer_step == pytest.approx(OV * math.sqrt(3) / 2)
    nb = neighbour_pairs(lay)
    layer = nb.kind == "layer"
    touching = layer & (nb.gap < 1e-12)
    # Each upper turn rests on two lower turns (one at the layer's end).
    assert touching.sum() == 2 * 30 - 1
    assert layer.sum() == touching.sum()


def test_stacked_layers_include_diagonals():
    lay = cylinder_layout(0.02, 16e-3, CU, OV, 1, 60, layers=2, layer_style="stacked")
    nb = neighbour_pairs(lay)
    layer = nb.kind == "layer"
    # Square packing: directly over (gap 0) and diagonal (gap (√2 − 1)·d, within half a diameter).
    assert sorted(set(np.round(nb.gap[layer] / OV, 9))) == [0.0, round(math.sqrt(2) - 1, 9)]
    assert math.sqrt(2) - 1 < NEIGHBOUR_GAP_FRACTION


def test_taped_layers_stack_and_face_across_the_tape():
    tape = 0.5e-3
    lay = cylinder_layout(0.02, 16e-3, CU, OV, 1, 60, layers=2, tape=tape)
    assert lay.layer_style == "stacked" and lay.layer_step == pytest.approx(OV + tape)
    nb = neighbour_pairs(lay)
    layer = nb.kind == "layer"
    assert np.all(nb.across_tape[layer]) and not np.any(nb.across_tape[~layer])
    assert nb.gap[layer].min() == pytest.approx(tape)


@pytest.mark.parametrize("kw", [dict(tape=50e-6), dict(pitch=1.2e-3)])
def test_nested_refused_where_there_are_no_grooves(kw):
    with pytest.raises(ValueError):
        cylinder_layout(0.02, 16e-3, CU, OV, 1, 60, layers=2, layer_style="nested", **kw)


def test_even_strand_spacing_spreads_the_strands():
    lay = cylinder_layout(0.02, 30e-3, CU, OV, 2, 10, layers=1, pitch=2.8e-3, strand_spacing="even")
    a, b = lay.strand_turns(0), lay.strand_turns(1)
    # Half the pitch between A and B; together (the default) they touch.
    assert lay.z[b] - lay.z[a] == pytest.approx(np.full(10, 1.4e-3))
    together = cylinder_layout(0.02, 30e-3, CU, OV, 2, 10, layers=1, pitch=2.8e-3)
    assert together.z[together.strand_turns(1)] - together.z[together.strand_turns(0)] == \
        pytest.approx(np.full(10, OV))


@pytest.mark.parametrize("kw", LAYOUTS)
def test_groups_keep_the_shape_the_inductance_sum_needs(kw):
    lay = cylinder_layout(0.02, 16e-3, CU, OV, **kw)
    seen = 0
    for layer, strand, radius, z0, lo, hi in lay.groups():
        sel = (lay.layer == layer) & (lay.strand == strand)
        assert np.all(lay.r[sel] == radius)
        assert lay.z[sel] == pytest.approx(z0 + lay.slot[sel] * lay.pitch, abs=1e-15)
        assert sorted(lay.slot[sel]) == list(range(lo, hi))
        seen += sel.sum()
    assert seen == lay.n_turns


def test_layer_geometry_defaults():
    # Untaped close-wound layers nest; taped layers stack (common practice).
    assert layer_geometry(None, 0.0, 2 * OV, 2, OV)[0] == "nested"
    assert layer_geometry(None, 0.1e-3, 2 * OV, 2, OV) == ("stacked", OV + 0.1e-3, 0.0)
    assert layer_geometry(None, 0.0, 3 * OV, 2, OV)[0] == "stacked"


def test_toroid_start_and_finish_pairs():
    lay = toroid_layout(0.02, 0.04, 0.01, CU, OV, 2, 20)
    nb = neighbour_pairs(lay)
    # Every strand's first turn against every strand's last, across the start-finish gap.
    assert (nb.kind == "lead").sum() == 4
