"""The insulation verdict of whole orders: every neighbour, leads, the construction, remedies."""

from conftest import examples
import copy

import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from windsheet.common.errors import InputError
from windsheet.order.document import parse_order
from windsheet.design.build import build_design
from windsheet.design.remedies import apply

from conftest import sample_orders

# The two-layer bifilar: 0.45 mm copper, 0.50 mm overall, 2 × 60 turns on 32 mm, 100 V rms.
BIFILAR_2L = {"job": {"number": "HX-9001", "part": "Two-layer bifilar"},
              "form": {"kind": "cylinder", "diameter": "32 mm", "traverse": "32 mm"},
              "wire": {"size": "0.45 mm", "grade": 2, "overall_diameter": "0.50 mm"},
              "winding": {"strands": 2, "turns": 60, "layers": 2},
              "hookup": "series-aiding",
              "duty": {"voltage": "100 V", "frequency": "50 Hz"}}

# A four-layer single-strand coil whose layer returns carry about half the terminal voltage.
LAYERED = {"job": {"number": "HX-9002", "part": "Layer test"},
           "form": {"kind": "cylinder", "diameter": "20 mm", "traverse": "50.1 mm"},
           "wire": {"size": "0.45 mm", "grade": 2, "overall_diameter": "0.50 mm"},
           "winding": {"strands": 1, "turns": 400, "layers": 4, "leads": {"start": "through-form"}},
           "hookup": "single",
           "duty": {"voltage": "1.7 kV", "frequency": "50 Hz"}}


def run(doc, **kw):
    return build_design(parse_order(yaml.safe_dump(doc, allow_unicode=True).encode()), **kw)


def changed(doc, **changes):
    return apply(copy.deepcopy(doc), changes)


def test_two_layer_bifilar_worst_is_nearly_the_whole_voltage_between_layers():
    p = run(BIFILAR_2L)
    wa = p.worst_adjacent
    # The nested upper layer's last turn of B lies in the groove over A's first turns: derived, ~V apart.
    assert wa.voltage_Vpk >= 0.9 * 100 * 2 ** 0.5
    assert wa.kind == "layer" and wa.layers == [1, 2] and sorted(wa.strands) == ["A", "B"]
    assert set(p.as_json()["worst_adjacent"]) >= {"voltage_Vpk", "where", "strands", "turns", "layer", "layers", "kind"}


@pytest.mark.parametrize("size", ["0.315 mm", "0.50 mm", "1.0 mm"])
def test_inception_rises_with_grade(size):
    doc = changed(BIFILAR_2L, **{"wire": {"size": size}, "winding.layers": 1, "form.traverse": "200 mm"})
    pdiv = [run(changed(doc, **{"wire.grade": g})).insulation.pdiv_touching_Vpk for g in (1, 2, 3)]
    # IEC 60317-0-1: heavier grades have thicker films, which take more of the voltage in series with the air.
    assert pdiv[0] < pdiv[1] < pdiv[2]


def test_spacing_the_strands_raises_the_inception_of_the_pair_at_risk():
    # The joint is taken out at the end flange: laid back over the turns it would touch them at V/2
    # whatever the pitch (the default route, and the pair at risk once the strands are spaced).
    doc = changed(BIFILAR_2L, **{"winding.layers": 1, "form.traverse": "200 mm", "duty.voltage": "700 V",
                                 "winding.leads": {"joint": "end-flange"}})
    close = run(doc).insulation
    spaced = run(changed(doc, **{"winding.pitch": "2.8 mm", "winding.strand_spacing": "even"})).insulation
    # Paschen: 0.9 mm of air between A and B instead of touching enamel.
    assert spaced.pdiv_Vpk > 1.5 * close.pdiv_Vpk
    assert close.verdict == "fail" and spaced.verdict == "pass"
    # Spacing the slots alone leaves A and B touching in each slot: the pair at risk is unchanged.
    together = run(changed(doc, **{"winding.pitch": "2.8 mm"})).insulation
    assert together.pdiv_Vpk == pytest.approx(close.pdiv_Vpk, rel=1e-9)
    back = run(changed(doc, **{"winding.pitch": "2.8 mm", "winding.strand_spacing": "even",
                               "winding.leads": {"joint": "back-over-winding"}})).insulation
    assert back.pdiv_Vpk == pytest.approx(close.pdiv_Vpk, rel=1e-9) and "lead" in back.pd_pair.where


def test_ten_kilovolt_tape_removes_layer_to_layer_partial_discharge():
    bare = run(LAYERED).insulation
    assert bare.verdict == "fail" and "layer" in bare.pd_pair.where
    taped = run(changed(LAYERED, **{"winding.layer_tape": {"thickness": "0.5 mm", "rating": "10 kV"}}))
    ins = taped.insulation
    # Series dielectrics: 0.5 mm of tape between the layers lifts their inception far above the return.
    assert ins.verdict == "pass", ins.reasons
    assert ins.pd_pair.voltage_Vpk * ins.pd_safety_factor < ins.pdiv_hot_Vpk
    assert not any("layer" in r and "partial-discharge" in r for r in ins.reasons)


def test_a_lead_up_the_flange_of_a_multilayer_coil_is_in_the_stress_map():
    p = run(changed(LAYERED, **{"winding.leads": {"start": "start-flange"}, "duty.voltage": "100 V"}))
    start = next(x for x in p.leads if x.lead == "A.start")
    # Derived: the top layer of an even count ends at the start flange, next to the 0 V start lead.
    assert start.worst_Vpk == pytest.approx(100 * 2 ** 0.5, rel=0.02)
    assert p.worst_adjacent.kind == "lead"


def test_measured_pdiv_wins():
    p = run(changed(BIFILAR_2L, **{"insulation": {"pdiv": "900 V"}})).insulation
    assert p.pdiv_basis == "measured" and p.pdiv_touching_Vpk == pytest.approx(900.0)


def test_json_carries_the_new_keys():
    p = run(changed(BIFILAR_2L, **{"duty.voltage": "1 kV"}))
    out = p.as_json()
    ins = out["insulation"]
    for key in ("pdiv_Vpk", "pdiv_hot_Vpk", "remedies", "pd_pair", "pdiv_basis"):
        assert key in ins
    assert isinstance(ins["remedies"], list) and isinstance(out["leads"], list)
    assert {"lead", "route", "worst_Vpk", "where"} <= set(out["leads"][0])


def test_nested_layers_refused_with_tape_at_their_field():
    with pytest.raises(InputError) as e:
        run(changed(LAYERED, **{"winding.layer_style": "nested", "winding.layer_tape": "0.1 mm"}))
    assert e.value.path == "winding.layer_style"


# ---- every listed remedy gives the verdict it claims ------------------------------------------

def check_remedies(doc):
    p = run(doc)
    for r in p.insulation.remedies:
        q = run(apply(copy.deepcopy(doc), r.set), remedies=False)
        # The claim is windsheet's own check on the changed order: it must hold exactly.
        assert q.insulation.verdict == r.verdict, r
        assert q.worst_adjacent.voltage_Vpk == pytest.approx(r.worst_Vpk, rel=1e-9)
        assert q.insulation.pdiv_Vpk == (pytest.approx(r.pdiv_Vpk, rel=1e-9)
                                               if r.pdiv_Vpk is not None else None)
    return p


@pytest.mark.parametrize("path", sample_orders(), ids=lambda p: p.name)
def test_sample_remedies_hold(path):
    doc = yaml.safe_load(path.read_text())
    # Raised to a voltage the sample's insulation does not stand, so that there is something to remedy.
    doc["duty"]["voltage"] = "1.2 kV" if doc["hookup"] != "separate" else doc["duty"]["voltage"]
    if doc["hookup"] == "separate":
        doc["duty"]["between_windings"] = "1.2 kV"
    doc["duty"]["frequency"] = "50 Hz"
    doc["test"] = {"frequency": "1 kHz"}
    p = check_remedies(doc)
    assert p.insulation.verdict in ("fail", "marginal", "pass")


@settings(max_examples=examples(6), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(volts=st.sampled_from(["300 V", "600 V", "1.2 kV", "2.5 kV"]),
       grade=st.sampled_from([1, 2]),
       layers=st.sampled_from([1, 2, 3]),
       dc=st.booleans(),
       hookup=st.sampled_from(["series-aiding", "series-opposing"]))
def test_generated_order_remedies_hold(volts, grade, layers, dc, hookup):
    doc = changed(BIFILAR_2L, **{"wire": {"size": "0.45 mm", "grade": grade}, "winding.layers": layers,
                                 "form.traverse": "62 mm", "hookup": hookup,
                                 "duty": {"voltage": volts, "frequency": "0 Hz" if dc else "50 Hz"}})
    check_remedies(doc)


def test_traveller_shows_the_lead_routes():
    from windsheet.sheets import render
    from conftest import SAMPLES
    p = build_design(parse_order((SAMPLES / "hl-0412-bifilar-aiding.yaml").read_bytes()))
    ctx = render.traveller_context(p)
    # Every lead's route is written in the termination table (where long routes wrap; the wiring
    # diagram holds the circuit only) and in the procedure.
    routes = {row["end"]: row["lead"] for row in ctx["termination_rows"]}
    for lead in p.leads:
        assert routes[lead.lead] == lead.route_text
    joint = next(s for s in ctx["steps"] if s["title"].startswith("Make the joint"))
    assert "laid back over the winding" in joint["detail"]
    assert any("up the start flange" in s["detail"] for s in ctx["steps"])
