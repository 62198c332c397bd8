"""Each reason of the insulation verdict states the quantity it judged against that quantity's own limit."""

import math
import re

import pytest

from windsheet.design.build import build_design
from windsheet.order.document import load_order

DC_TAPED = """
job: {number: HL-9002, part: "3 kV DC coil, taped layers", customer: "test", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 20 mm, traverse: 50.1 mm, max_build: 14 mm}
wire: {size: 0.45 mm, grade: 1}
winding:
  strands: 1
  turns: 400
  layers: 10
  layer_tape: {thickness: 0.1 mm, rating: 5 kV}
  lead_length: 150 mm
  leads: {start: through-form}
hookup: single
duty: {voltage: 3 kV, frequency: 0 Hz, current: 0.01 A}
"""

STACKED_FOUR = """
job: {number: HL-9003, part: "four strands, stacked layers", customer: "test", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 20 mm, traverse: 30 mm, max_build: 8 mm}
wire: {size: 0.50 mm, grade: 2}
winding:
  strands: 4
  turns: 36
  layers: 3
  layer_style: stacked
  leads: {start: through-form, finish: end-flange, joint: end-flange}
hookup: {joins: [[A.finish, C.start], [C.finish, B.start], [B.finish, D.start]], terminals: [A.start, D.finish]}
duty: {voltage: 200 V, frequency: 1 kHz, current: 0.1 A}
"""

_NUMBER = re.compile(r"([\d.]+) V")


def _design(tmp_path, text):
    p = tmp_path / "order.yaml"
    p.write_text(text)
    return build_design(load_order(p), remedies=False)


def _no_contradiction(reasons):
    """Every 'X V peak … is within (or below) … Y V' has X <= Y; returns how many such statements there were."""
    n = 0
    for r in reasons:
        word = next((w for w in (" is within ", " is below ") if w in r), None)
        if word is None:
            continue
        judged, limit = r.split(word, 1)
        x, y = _NUMBER.search(judged).group(1), _NUMBER.search(limit).group(1)
        assert float(x) <= float(y), r
        n += 1
    return n


def test_dc_taped_order_judges_the_tape_pair_against_the_tape(tmp_path):
    d = _design(tmp_path, DC_TAPED)
    ins = d.insulation
    assert ins.verdict == "pass"
    # Enamel alone, across the tape, and the pair nearest partial discharge: each against its own limit.
    assert _no_contradiction(ins.reasons) == 3
    enamel = next(r for r in ins.reasons if "enamel alone" in r)
    tape = next(r for r in ins.reasons if "across the layer tape" in r)
    # The pair across tape is the worst, and it is judged against the tape's rating, not the enamel's.
    assert f"{d.worst_adjacent.voltage_Vpk:.0f} V peak" in tape and "5000 V rating" in tape
    assert "tape" not in enamel.split("allowed")[0] and "575 V peak" in enamel
    assert ins.enamel_Vpk < ins.allowed_Vpk < d.worst_adjacent.voltage_Vpk
    # Independent figure: on DC a turn drops in proportion to its length (Ohm's law). Enamel alone holds
    # only touching neighbours in a layer, one turn apart: the worst is a top-layer turn, of radius
    # r = 10 mm + 9.5 overall diameters + 9 tapes, over the wire of 40 turns per layer and two leads.
    dov, tape_t = d.wire.overall_diameter_m, 0.1e-3
    lengths = [2 * math.pi * (10e-3 + (k + 0.5) * dov + k * tape_t) for k in range(10)]
    hand = 3000.0 * lengths[-1] / (40 * sum(lengths) + 2 * 0.150)
    assert ins.enamel_Vpk == pytest.approx(hand, rel=0.02)


def test_a_stacked_diagonal_pair_is_not_enamel_alone(tmp_path):
    d = _design(tmp_path, STACKED_FOUR)
    ins = d.insulation
    # Plain geometry: stacked layers' diagonal neighbours are (sqrt 2 - 1) d = 0.41 d apart, air between.
    assert d.worst_adjacent.kind == "layer" and "diagonally" in d.worst_adjacent.where
    assert ins.enamel_Vpk < d.worst_adjacent.voltage_Vpk
    enamel = next(r for r in ins.reasons if "enamel alone" in r)
    assert "diagonally" not in enamel
    assert any("air as well as enamel" in r and d.worst_adjacent.where in r for r in ins.reasons)
    assert _no_contradiction(ins.reasons) >= 1


def test_no_sample_reason_contradicts_itself():
    from conftest import sample_design, sample_orders
    for path in sample_orders():
        ins = sample_design(path.stem).insulation
        n = _no_contradiction(ins.reasons)
        assert n >= 1 or ins.verdict != "pass", (path.name, ins.reasons)
