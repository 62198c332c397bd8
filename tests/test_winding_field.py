"""The winding's own terminal capacitance against a 2-D field solution of its cross-section.

What is compared: windsheet's energy method over its neighbour pairs, Σ C_ij |ΔV_ij|² / V², each
pair's capacitance per unit length of turn (its C over its mean turn length), on the low-frequency
voltage map (every turn of a strand dropping the same), without Medhurst's single-layer term and
without leads: the multi-layer winding's own inter-conductor part.  Against it: 2 W' / V² from a
finite-difference solution of the same cross-section (tests/winding2d.py), every turn at its
potential, enamel rings and layer tape at their permittivities, air elsewhere, no former, no ground.
The grid error is taken out by a first-order extrapolation from two grids (see field_per_length),
and the step halved once more agrees within 1 %.  The issue's bar
(issue 29, item 4): within 5 %.  The whole set, and the grid halving, run under ``make test-long``;
the suite runs one thick-filmed bifilar winding on a coarser grid.
"""

import numpy as np
import pytest

from windsheet.physics import capacitance as cap
from windsheet.physics import conductor_capacitance as cc
from windsheet.physics import layer_capacitance as lc
from windsheet.physics import voltage_map as vmap
from windsheet.physics.layout import cylinder_layout

from conftest import LONG
from strand_ends import AIDING, OPPOSING, SINGLE
from winding2d import layout_capacitance_per_length

# name: (copper, overall [m], strands, turns per strand, layers, strand ends, tape [m], pitch [m], style)
# Wires: IEC 60317-0-1 rows (0.315 mm grades 1 and 3, 0.45 mm at 0.50 mm overall, 0.50 mm grade 2 at its
# maximum overall 0.5694 mm, 1.016 mm grade 1; references.md, seen).  Layers of 6-10 turns a strand.
CASES = {
    "two layers nested, 0.45 mm": (0.45e-3, 0.50e-3, 1, 20, 2, SINGLE, 0.0, None, None),
    "three layers nested, 0.45 mm": (0.45e-3, 0.50e-3, 1, 24, 3, SINGLE, 0.0, None, None),
    "two layers stacked, 0.45 mm": (0.45e-3, 0.50e-3, 1, 20, 2, SINGLE, 0.0, None, "stacked"),
    "two layers, 50 um tape, 0.45 mm": (0.45e-3, 0.50e-3, 1, 20, 2, SINGLE, 50e-6, None, None),
    "three layers, 0.1 mm tape, 0.315 mm grade 3": (0.315e-3, 0.384e-3, 1, 30, 3, SINGLE, 100e-6, None, None),
    "two layers, bifilar aiding, 0.315 mm grade 1": (0.315e-3, 0.349e-3, 2, 12, 2, AIDING, 0.0, None, None),
    "two layers, bifilar opposing, 0.315 mm grade 1": (0.315e-3, 0.349e-3, 2, 12, 2, OPPOSING, 0.0, None, None),
    "three layers, bifilar aiding, 0.315 mm grade 1": (0.315e-3, 0.349e-3, 2, 18, 3, AIDING, 0.0, None, None),
    "two layers spaced at 1.5 d, 0.45 mm": (0.45e-3, 0.50e-3, 1, 20, 2, SINGLE, 0.0, 0.75e-3, None),
    "two layers spaced, bifilar opposing, 0.315 mm grade 3": (0.315e-3, 0.384e-3, 2, 12, 2, OPPOSING, 0.0, 1.2e-3, None),
    "three layers nested, 1.016 mm grade 1": (1.016e-3, 1.080e-3, 1, 24, 3, SINGLE, 0.0, None, None),
    # Thick films, so a coarse grid holds them: cheap enough for every run of the suite.
    "two layers, bifilar aiding, 0.315 mm grade 3": (0.315e-3, 0.384e-3, 2, 12, 2, AIDING, 0.0, None, None),
}
QUICK = ("two layers, bifilar aiding, 0.315 mm grade 3",)
# Spaced turns under a tape thicker than a third of their pitch read high, on the safe side for
# self-resonance: the plates' field is taken as uniform over the layers' centre distance.
HIGH = {"two layers spaced at 2 d under 0.2 mm tape, 0.45 mm": (0.45e-3, 0.50e-3, 1, 20, 2, SINGLE, 0.2e-3, 1e-3, None)}
# Short of the 5 % bar, on the low side: -5.6 % measured (spaced layers take the arcs to 90 deg whole; the
# field through the gaps between spaced turns beyond them is not counted).  Held here so it gets no worse.
LOW = {"two layers spaced at 2 d, 0.50 mm grade 2": (0.50e-3, 0.5694e-3, 1, 20, 2, SINGLE, 0.0, 2 * 0.5694e-3, None)}


def layout_of(case):
    cu, ov, strands, turns, layers, ends, tape, pitch, style = {**CASES, **HIGH, **LOW}[case]
    lay = cylinder_layout(0.05, 0.2, cu, ov, strands, turns, layers=layers, tape=tape, pitch=pitch,
                          layer_style=style)
    return lay, vmap.turn_potentials(lay, ends)


def windsheet_per_length(lay, v):
    """windsheet's pairs, each per unit length of turn, by the energy method (1 V across). [F/m]"""
    i, j, kind, c, _ = cap.pair_capacitances(lay)
    length = 0.5 * (lay.turn_length[i] + lay.turn_length[j])
    return cap.energy_method_capacitance(c / length, v[i] - v[j], 1.0)


def field_per_length(lay, v, steps, margin=1.5):
    """The field solution at two grid steps (film thickness / k), extrapolated to a zero step: on
    this grid (the first turn's centre on a node, a whole number of steps to a diameter) round films
    in contact converge from above, about linearly in the step (nested 0.315 mm grade 3: 405.8, 398.9,
    395.5 pF/m at t/3, t/6, t/12; stacked: 196.3, 194.7, 193.7). [F/m]"""
    film = (lay.overall_diameter - lay.copper_diameter) / 2
    coarse, fine = (layout_capacitance_per_length(lay, v, h=film / k, margin=margin * lay.overall_diameter)
                    for k in steps)
    return 2 * fine - coarse


@pytest.mark.parametrize("case", [c for c in CASES if LONG or c in QUICK])
def test_winding_capacitance_within_five_percent_of_its_field_solution(case):
    lay, v = layout_of(case)
    field = field_per_length(lay, v, (3, 6)) if LONG else field_per_length(lay, v, (2, 4), margin=1.0)
    model = windsheet_per_length(lay, v)
    # Independent computation: the finite-difference field of the cross-section (tests/winding2d.py,
    # tests/laplace2d.py).  Issue 29's bar: within 5 %.
    assert model == pytest.approx(field, rel=0.05)


@pytest.mark.skipif(not LONG, reason="make test-long: a finer grid")
@pytest.mark.parametrize("case", list(HIGH))
def test_spaced_turns_under_a_thick_tape_read_high_not_low(case):
    lay, v = layout_of(case)
    field = field_per_length(lay, v, (3, 6))
    model = windsheet_per_length(lay, v)
    # Field solution as above: +8.7 % measured; never below it.
    assert field < model < 1.10 * field


@pytest.mark.skipif(not LONG, reason="make test-long: a finer grid")
@pytest.mark.parametrize("case", list(LOW))
def test_widely_spaced_layers_read_at_most_six_percent_low(case):
    lay, v = layout_of(case)
    field = field_per_length(lay, v, (3, 6))
    model = windsheet_per_length(lay, v)
    # Field solution as above: -5.6 % measured (issue 29's 5 % missed here; see LOW).
    assert 0.94 * field < model < field


@pytest.mark.skipif(not LONG, reason="make test-long: grids down to a twelfth of the film")
@pytest.mark.parametrize("strands,ends,style", [(1, SINGLE, "stacked"), (2, AIDING, None)])
def test_the_field_solution_is_converged_in_its_step(strands, ends, style):
    # Grid halving: the reference from steps (t/3, t/6) against (t/6, t/12), t the film thickness, on a
    # stacked and a nested winding: the solver's own error is well under the 5 % judged above.
    lay = cylinder_layout(0.05, 0.2, 0.315e-3, 0.384e-3, strands, 16 // strands, layers=2, layer_style=style)
    v = vmap.turn_potentials(lay, ends)
    assert field_per_length(lay, v, (3, 6)) == pytest.approx(field_per_length(lay, v, (6, 12)), rel=0.01)


@pytest.mark.skipif(not LONG, reason="make test-long: a finer grid")
def test_the_contact_cells_alone_read_low():
    # What issue 29 found (5-10 % low), against the same field solution: the layer contacts' own cells
    # alone (Massarini & Kazimierczuk's cell), without the arcs towards the neighbours in the layer
    # and with the side pairs whole.
    lay, v = layout_of("two layers nested, 0.45 mm")
    field = field_per_length(lay, v, (3, 6))
    i, j, kind, c, _ = cap.pair_capacitances(lay)
    length = 0.5 * (lay.turn_length[i] + lay.turn_length[j])
    cell_alone = lc.flux_tube_capacitance_per_length(lay.copper_diameter, lay.overall_diameter,
                                                     cc.CELL_HALF_ANGLE["nested"])
    per_m = np.where(kind == "layer", cell_alone, c / length)
    assert cap.energy_method_capacitance(per_m, v[i] - v[j], 1.0) < 0.95 * field
    assert windsheet_per_length(lay, v) == pytest.approx(field, rel=0.05)
