"""The cell-list neighbour search against scipy's k-d tree (an independent implementation)."""

from conftest import examples
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.spatial import cKDTree

from windsheet.physics.layout import bobbin_layout, cylinder_layout, toroid_layout
from windsheet.physics.neighbours import close_pairs, neighbour_gap_limit

CU, OV = 0.45e-3, 0.50e-3


def kd_tree_pairs(x, y, reach):
    # Reference: scipy.spatial.cKDTree.query_pairs, every pair at distance <= reach.
    return cKDTree(np.column_stack([x, y])).query_pairs(reach)


def cell_pairs(x, y, reach):
    pairs = close_pairs(x, y, reach)
    found = {(int(a), int(b)) for a, b in pairs}
    assert len(found) == len(pairs), "a pair reported twice"
    assert np.all(pairs[:, 0] < pairs[:, 1]) if len(pairs) else True
    return found


def layout_reach(lay):
    # The reach neighbour_pairs searches with.
    return (lay.overall_diameter + neighbour_gap_limit(lay)) * (1 + 1e-9)


LAYOUTS = {
    "single layer": lambda: cylinder_layout(0.02, 16e-3, CU, OV, 1, 30),
    "nested layers": lambda: cylinder_layout(0.02, 16e-3, CU, OV, 1, 300, layers=10),
    "stacked layers": lambda: cylinder_layout(0.02, 16e-3, CU, OV, 1, 300, layers=10,
                                              layer_style="stacked"),
    "bifilar nested": lambda: cylinder_layout(0.02, 16e-3, CU, OV, 2, 120, layers=8),
    "four strands even": lambda: cylinder_layout(0.02, 40e-3, CU, OV, 4, 30, layers=3,
                                                 pitch=4 * OV * 1.5, strand_spacing="even"),
    "taped layers": lambda: cylinder_layout(0.02, 16e-3, CU, OV, 1, 120, layers=4, tape=50e-6),
    "thick tape": lambda: cylinder_layout(0.02, 16e-3, CU, OV, 2, 60, layers=4, tape=0.4e-3),
    "spaced turns": lambda: cylinder_layout(0.02, 40e-3, CU, OV, 1, 30, pitch=0.7e-3),
    "toroid": lambda: toroid_layout(20e-3, 40e-3, 10e-3, CU, OV, 2, 80),
    "toroid layers": lambda: toroid_layout(20e-3, 40e-3, 10e-3, CU, OV, 1, 300, layers=3),
    "bobbin": lambda: bobbin_layout(12e-3, 5e-3, CU, OV, 1, 150, diameter=10e-3),
    "bobbin bifilar stacked": lambda: bobbin_layout(12e-3, 5e-3, CU, OV, 2, 80, diameter=10e-3,
                                                    layer_style="stacked"),
}


@pytest.mark.parametrize("name", sorted(LAYOUTS))
def test_layouts_match_the_kd_tree(name):
    lay = LAYOUTS[name]()
    reach = layout_reach(lay)
    expected = kd_tree_pairs(lay.r, lay.z, reach)
    assert len(expected) > 0
    assert cell_pairs(lay.r, lay.z, reach) == expected


@pytest.mark.parametrize("x, y", [
    ([], []), ([1.0], [2.0]),
    ([0.0, 0.0, 0.0], [0.0, 0.0, 0.0]),                 # coincident points
    ([0.0, 1.0, 2.0, 3.0], [0.0, 0.0, 0.0, 0.0]),       # exactly one reach apart on a line
    ([0.0, 1e9, 2e9, 2e9 + 0.5], [-5.0, 0.0, 7.0, 7.0]),  # far apart: billions of empty cells
    ([-3.0, -2.5, -2.0, 4.0], [-1.0, -1.2, -0.4, 4.0]),
])
def test_edge_cases_match_the_kd_tree(x, y):
    x, y = np.array(x, dtype=float), np.array(y, dtype=float)
    assert cell_pairs(x, y, 1.0) == kd_tree_pairs(x, y, 1.0)


points = st.lists(st.tuples(st.floats(-50, 50), st.floats(-50, 50)), min_size=0, max_size=120)


@settings(max_examples=examples(60), deadline=None)
@given(points, st.floats(0.05, 30))
def test_random_points_match_the_kd_tree(pts, reach):
    xy = np.array(pts, dtype=float).reshape(-1, 2)
    assert cell_pairs(xy[:, 0], xy[:, 1], reach) == kd_tree_pairs(xy[:, 0], xy[:, 1], reach)


@settings(max_examples=examples(25), deadline=None)
@given(st.integers(1, 4), st.integers(5, 120), st.integers(1, 6),
       st.sampled_from(["nested", "stacked"]), st.sampled_from([0.0, 30e-6, 0.3e-3]))
def test_random_cylinders_match_the_kd_tree(strands, turns, layers, style, tape):
    try:
        lay = cylinder_layout(0.02, 60e-3, CU, OV, strands, turns, layers=layers, tape=tape,
                              layer_style=style if tape == 0 else None)
    except Exception:  # an order that does not fit is refused; nothing to compare
        return
    reach = layout_reach(lay)
    assert cell_pairs(lay.r, lay.z, reach) == kd_tree_pairs(lay.r, lay.z, reach)
