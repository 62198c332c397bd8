"""The terminal capacitance that sets self-resonance is the winding's own: the duty does not move it,
and leads only add to it."""

import math

import pytest

from windsheet.design.build import build_design
from windsheet.order.document import load_order

ORDER = """
job: {number: HL-9005, part: "two-layer coil", customer: "test", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 20 mm, traverse: 30 mm}
wire: {size: 0.50 mm, grade: 2}
winding: {strands: 1, turns: 100, layers: 2, lead_length: %s}
hookup: single
duty: {voltage: 10 V, frequency: %s, current: 0.1 A}
"""

EPS0 = 8.8541878128e-12


def _cap(tmp_path, lead, freq):
    p = tmp_path / "order.yaml"
    p.write_text(ORDER % (lead, freq))
    return build_design(load_order(p), remedies=False)


def massarini_kazimierczuk(copper_d, overall_d, eps_r=3.5):
    """Touching enamelled round wires, capacitance per length: Massarini & Kazimierczuk, IEEE Trans.
    Power Electronics 12(4), 1997, turn-to-turn cell to +-pi/6 (memory), written out here."""
    r, t = copper_d / 2, (overall_d - copper_d) / 2
    lr = math.log(1 + t / r)
    th = math.acos(1 - lr / eps_r)
    return EPS0 * (eps_r * th / lr + 1 / math.tan(th / 2) - 1 / math.tan(math.pi / 12))


def test_terminal_capacitance_does_not_move_with_the_duty_frequency(tmp_path):
    low = _cap(tmp_path, "100 mm", "50 Hz")
    high = _cap(tmp_path, "100 mm", "100 kHz")
    # Issue 29: 123.5 pF at 50 Hz against 133.5 pF at 100 kHz before; the winding is the same.
    assert high.capacitance.terminal_F == pytest.approx(low.capacitance.terminal_F, rel=1e-9)
    assert high.terminal.self_resonance_Hz == pytest.approx(low.terminal.self_resonance_Hz, rel=1e-9)
    # DC duty too.
    dc = _cap(tmp_path, "100 mm", "0 Hz")
    assert dc.capacitance.terminal_F == pytest.approx(low.capacitance.terminal_F, rel=1e-9)


def test_leads_only_add_their_own_capacitance(tmp_path):
    bare = _cap(tmp_path, "0 mm", "50 Hz").capacitance
    d = _cap(tmp_path, "100 mm", "50 Hz")
    led = d.capacitance
    assert led.terminal_F >= bare.terminal_F
    # Two layers: start up the start flange, finish laid back to the start end; the two terminal leads
    # lie together, 1 V per volt apart, over their 100 mm: C' x 0.1 m x 1^2 (energy method).
    per_m = massarini_kazimierczuk(d.wire.copper_diameter_m, d.wire.overall_diameter_m)
    assert led.leads_F == pytest.approx(per_m * 0.100, rel=1e-6)
    assert led.terminal_F - bare.terminal_F == pytest.approx(led.leads_F, rel=1e-9)
    assert bare.leads_F == 0.0
