"""Lead against lead: leads that leave the winding at one place lie together and are a stressed pair."""

import math

import numpy as np
import pytest

from windsheet.design.build import build_design
from windsheet.order.document import load_order

FOUR = """
job: {number: HL-9001, part: "four strands in series, custom order", customer: "test", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 20 mm, traverse: 30 mm, max_build: 8 mm}
wire: {size: 0.50 mm, grade: 2}
winding: {strands: 4, turns: 36, layers: 3%s}
hookup: {joins: [[A.finish, C.start], [C.finish, B.start], [B.finish, D.start]], terminals: [A.start, D.finish]}
duty: {voltage: 200 V, frequency: 1 kHz, current: 0.1 A}
"""


def _design(tmp_path, extra=""):
    p = tmp_path / "order.yaml"
    p.write_text(FOUR % extra)
    return build_design(load_order(p), remedies=False)


def _hand_nodes(design, f=1e3, v_rms=200.0):
    """Node voltages of the chain A -> C -> B -> D, by hand: one current through every strand, each
    strand dropping its row of the inductance matrix times jwL plus its own resistance; scaled so the
    terminals A.start and D.finish are the applied peak apart (circuit theory, not the code's network)."""
    L = np.asarray(design.inductance_matrix_H)
    R = np.array([s.resistance_ac_ohm for s in design.strands])
    drop = R + 1j * 2 * math.pi * f * L.sum(axis=1)
    order = [0, 2, 1, 3]                                    # A, C, B, D as joined
    scale = math.sqrt(2) * v_rms / abs(drop[order].sum())
    node, v = {}, math.sqrt(2) * v_rms + 0j
    for k in order:
        node[f"{'ABCD'[k]}.start"] = v
        v = v - drop[k] * scale
        node[f"{'ABCD'[k]}.finish"] = v
    return node


def test_four_strand_custom_order_reports_its_lead_pair_as_worst(tmp_path):
    d = _design(tmp_path)
    node = _hand_nodes(d)
    # Issue 29 done criterion: the two terminal leads at the start end are the whole applied peak apart.
    assert abs(node["A.start"] - node["D.finish"]) == pytest.approx(200 * math.sqrt(2), rel=1e-9)
    assert d.worst_adjacent.voltage_Vpk == pytest.approx(200 * math.sqrt(2), rel=0.01)
    assert d.worst_adjacent.kind == "lead-lead" and set(d.worst_adjacent.strands) == {"A", "D"}
    assert "A.start" in d.worst_adjacent.where and "D.finish" in d.worst_adjacent.where
    # Before leads were paired, the worst was a diagonal layer pair, 253.9 V peak (issue 29's audit).
    assert d.worst_adjacent.voltage_Vpk > 260
    assert d.insulation.worst_adjacent_Vpk == pytest.approx(d.worst_adjacent.voltage_Vpk, rel=1e-12)
    # Every lead leaves at the start end here (starts up the flange, finishes laid back): each one's
    # worst is at least its worst against another lead, from the hand node voltages.
    joint_of = {lead.lead: lead.joint for lead in d.leads}
    for lead in d.leads:
        others = [abs(node[lead.lead] - node[o]) for o in node
                  if o != lead.lead and not (joint_of[o] and joint_of[o] == joint_of[lead.lead])]
        assert sorted(lead.beside_leads) == sorted(o for o in node if o != lead.lead
                                                   and not (joint_of[o] and joint_of[o] == joint_of[lead.lead]))
        assert lead.worst_Vpk >= max(others) * (1 - 0.01)
        if "lead (" in (lead.where or "").split(" against ")[-1]:
            partner = lead.where.split(" against ")[1].split(" lead")[0]
            assert lead.worst_Vpk == pytest.approx(abs(node[lead.lead] - node[partner]), rel=0.01)


def test_a_lead_through_the_former_leaves_the_start_bundle(tmp_path):
    d = _design(tmp_path, ", leads: {start: through-form}")
    starts = {lead.lead: lead for lead in d.leads if lead.lead.endswith("start")}
    # Every start goes through the former together; the finishes laid back lie at the start end.
    assert set(starts["A.start"].beside_leads) == {"B.start", "C.start", "D.start"}
    finish = next(lead for lead in d.leads if lead.lead == "D.finish")
    assert not any(x.endswith("start") for x in finish.beside_leads if x != "D.start")
    assert "B.finish" in finish.beside_leads                     # the joint wire B.finish + D.start, laid back
    assert d.worst_adjacent.kind != "lead-lead" or "A.start" not in d.worst_adjacent.where
