"""The prediction as a whole: target inductance, cored windings, shop catalogs."""

import copy

import pytest
import yaml

from windsheet.common.errors import InputError
from windsheet.order.document import parse_order
from windsheet.design.build import build_design

from conftest import SAMPLES


def load(name):
    return yaml.safe_load((SAMPLES / name).read_text())


def run(doc, path=None):
    return build_design(parse_order(yaml.safe_dump(doc, allow_unicode=True).encode(), path))


def test_target_inductance_picks_the_nearest_whole_turns():
    doc = load("hl-0424-target.yaml")
    p = run(doc)
    t = p.winding.target
    n = t.turns_chosen
    assert p.winding.turns_per_strand == n
    # The chosen count must beat its neighbours, sized independently by turns.
    errs = {}
    for k in (n - 1, n, n + 1):
        d = copy.deepcopy(doc)
        d["winding"] = {"strands": 1, "turns": k, "layers": 1}
        errs[k] = abs(run(d).terminal.inductance_H - 60e-6)
    assert errs[n] == min(errs.values())
    assert t.inductance_at_chosen_H == pytest.approx(p.terminal.inductance_H, rel=1e-12)
    assert n - 1 < t.turns_exact < n + 1


def test_target_for_a_bifilar_hookup_counts_turns_per_strand():
    doc = load("hl-0412-bifilar-aiding.yaml")
    doc["winding"] = {"strands": 2, "target_inductance": "400 uH", "layers": 1}
    p = run(doc)
    # Common practice: series-aiding bifilar ~4x one strand, so ~sqrt(400/4 / 99.67) x 60 turns per strand.
    assert p.winding.turns_per_strand == pytest.approx(60, abs=1)
    assert p.terminal.inductance_H == pytest.approx(400e-6, rel=0.02)


# L = AL N^2 (core maker's inductance factor, common practice) for each winding of the toroid sample.
def test_toroid_each_winding_is_al_n_squared():
    p = run(load("hl-0421-toroid-choke.yaml"))
    for s in p.strands:
        assert s.inductance_H == pytest.approx(4.2e-6 * 12 ** 2, rel=1e-3)
    assert p.current_sheet_inductance_H is None
    assert p.coupling_matrix[0][1] == pytest.approx(1.0, abs=1e-3)


def test_bobbin_on_core_al_n_squared_and_window_fit():
    doc = load("hl-0418-multilayer.yaml")
    doc["form"] = {"kind": "bobbin", "al": "250 nH", "width": "12 mm", "height": "5 mm", "diameter": "10 mm"}
    doc["winding"] = {"strands": 1, "turns": 80, "layers": "auto"}
    p = run(doc)
    # L = AL N^2 (common practice).
    assert p.terminal.inductance_H == pytest.approx(250e-9 * 80 ** 2, rel=1e-9)
    assert p.layers == 4  # 20 turns of 0.569 mm across 12 mm
    doc["winding"]["turns"] = 300
    with pytest.raises(InputError) as e:
        run(doc)
    assert e.value.path == "winding.turns" and "over by" in e.value.message


def test_shop_catalog_wire(tmp_path):
    (tmp_path / "wire.csv").write_text(
        "name,copper_diameter_mm,overall_diameter_mm,breakdown_V,grade,thermal_class,source\n"
        "HCW-050-G2,0.500,0.560,4200,2,180,Harrowgate stores sheet 7\n")
    doc = load("hl-0410-single.yaml")
    doc["wire"] = {"size": "HCW-050-G2", "catalog": "wire.csv"}
    p = run(doc, str(tmp_path / "order.yaml"))
    assert p.wire.overall_diameter_m == pytest.approx(0.56e-3)
    assert p.wire.breakdown_V == 4200 and p.wire.thermal_class_C == 180
    assert p.winding.pitch_m == pytest.approx(0.56e-3)
    doc["wire"]["size"] = "HCW-999"
    with pytest.raises(InputError) as e:
        run(doc, str(tmp_path / "order.yaml"))
    assert e.value.path == "wire.size"


def test_multilayer_wire_length_follows_each_layer_radius():
    p = run(load("hl-0418-multilayer.yaml"))
    # 80 turns per layer, layer k at radius 10 mm + d/2 + k(d + tape), plus two 200 mm leads.
    d, tape = p.wire.overall_diameter_m, 0.05e-3
    turns = sum(80 * 2 * 3.141592653589793 * (0.010 + d / 2 + k * (d + tape)) for k in range(5))
    assert p.strands[0].wire_length_m == pytest.approx(turns + 0.4, rel=1e-9)
    assert p.strands[0].wire_length_with_scrap_m == pytest.approx((turns + 0.4) * 1.10, rel=1e-9)
