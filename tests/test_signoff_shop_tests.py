"""Sign-off catches what a shop's own tests catch: a shorted turn by Q and by the ring wave, open
readings, a reversed separate winding, swapped finish tags, and one diagnosis without contradictions.

The readings of a unit with a shorted turn are simulated with the filament sum of
tests/test_shorted_turn.py (scipy's elliptic integrals, the full turn-by-turn matrix,
the two-mesh circuit by hand; the ring by scipy's ODE integration), never by windsheet's
engine.  The separate windings' readings are written by hand from the strand matrix:
series-aiding L1 + L2 + 2M, series-opposing L1 + L2 − 2M (Grover, Inductance Calculations,
ch. 1), and a winding closed on itself by a link reflects ω²M²/(R + jωL).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import SAMPLES
from test_shorted_turn import RHO_20, _ac_ratio, coupled_ring, geometry, order, turn_matrix
from windsheet.design.build import build_design
from windsheet.design.sizing import strand_values_at_turns
from windsheet.order.document import load_order
from windsheet.qc.measured import measured_from_dict
from windsheet.qc.signoff import evaluate_signoff


def uh(x):
    return f"{float(x) * 1e6!r} uH"


def ohm(x):
    return f"{float(x)!r} ohm"


def _common(d):
    return {"insulation": {"strand_to_strand": "20 Gohm", "to_core": "20 Gohm", "test_voltage": "500 V"},
            "continuity": {"strand_to_strand": "open"},
            "hipot": {"voltage": f"{d.hipot.voltage_V} V", "duration": f"{d.hipot.duration_s} s",
                      "result": "pass"}}


def bifilar_unit(d, k=None, q=True, ring=False, serial="U1"):
    """Every reading of a two-strand series-aiding unit, with turn ``k`` shorted (None: sound)."""
    f = d.test.frequency_Hz
    w = 2 * math.pi * f
    r, z, strand, a = geometry(d, 2)
    M = turn_matrix(r, z, a)
    area = math.pi * a * a
    r_dc = RHO_20 * 2 * math.pi * r / area
    lead = 2 * d.winding.lead_length_m * RHO_20 / area
    ratio = _ac_ratio(d, f)

    def meter(signs):
        s = np.asarray(signs, float)
        if k is not None:
            s[k] = 0.0
        strands_in = {int(x) for x in strand[np.asarray(signs) != 0]}
        r_dc_path = r_dc[s != 0].sum() + lead * len(strands_in)
        zz = r_dc_path * ratio + 1j * w * (s @ M @ s)
        if k is not None:
            m = s @ M[:, k]
            zz += w * w * m * m / (r_dc[k] * ratio + 1j * w * M[k, k])
        return zz.imag / w, r_dc_path, zz.imag / zz.real

    sa, sb = (strand == 0).astype(float), (strand == 1).astype(float)
    unit = {"serial": serial, "ambient": "20 degC", "strands": {}, **_common(d)}
    for sid, signs in (("A", sa), ("B", sb)):
        lx, rx, qx = meter(signs)
        unit["strands"][sid] = {"inductance": uh(lx), "resistance": ohm(rx), **({"q": float(qx)} if q else {})}
    aid, opp = meter(sa + sb), meter(sa - sb)
    unit["before_joint"] = {"A-B": {"series_aiding": uh(aid[0]), "series_opposing": uh(opp[0])}}
    unit["terminals"] = {"inductance": uh(aid[0]), "resistance": ohm(aid[1]),
                         **({"q": f"D {float(1 / aid[2])!r}"} if q else {})}
    if ring:
        rw = d.ring_wave
        guess = d.shorted_turn.ring_frequency_Hz if k is not None else rw.frequency_Hz
        fr, decay = coupled_ring(d, k, guess, strands=2)
        unit["ring"] = {"capacitor": f"{rw.capacitor_F * 1e9!r} nF", "frequency": f"{float(fr)!r} Hz",
                        "decay": float(decay)}
    return unit


def sign(d, units, o=None):
    m = measured_from_dict({"job": d.job.number, "ambient": "20 degC", "units": units})
    resize = (lambda n: strand_values_at_turns(o, n)) if o is not None else None
    return evaluate_signoff(d, m, inspector="T. Vance", resize=resize)


def findings(result, i=0):
    return [f["finding"] for f in result["units"][i]["diagnosis"]]


@pytest.fixture(scope="module")
def bifilar():
    o = order(2, "series-aiding", turns=30, test="10 kHz", ring=", ring_capacitor: 10 nF")
    return o, build_design(o, remedies=False)


def _no_contradiction(texts):
    joined = " | ".join(texts)
    assert "nothing" not in joined and "no wiring fault" not in joined and "turn count off" not in joined
    assert "turns and wire are as ordered" not in joined


def test_one_shorted_turn_read_by_q_fails_and_is_named(bifilar):
    o, d = bifilar
    st = d.shorted_turn
    assert st.q_caught  # at 10 kHz the turn's reactance nears its resistance (shows from about 14 kHz)
    k = st.turn - 1 + (30 if st.strand == "B" else 0)
    res = sign(d, [bifilar_unit(d, k=k, q=True)], o)
    clean = sign(d, [bifilar_unit(d, q=True)], o)
    short, sound = res["units"][0], clean["units"][0]
    assert short["verdict"] == "fail"
    assert [ln["result"] for ln in short["lines"] if ln["key"] == "terminal.q"] == ["fail"]
    texts = findings(res, 0)
    assert sum("shorted turn (or turns)" in t for t in texts) == 1
    assert any("fewer turns would lower L and R together" in t for t in texts)
    _no_contradiction(texts)
    # The same coil without the short passes, its Q (given as D) within the band.
    assert sound["verdict"] == "pass", findings(clean)


def test_one_shorted_turn_read_by_the_ring_wave_fails_and_is_named(bifilar):
    o, d = bifilar
    st = d.shorted_turn
    k = st.turn - 1 + (30 if st.strand == "B" else 0)
    res = sign(d, [bifilar_unit(d, k=k, q=False, ring=True)], o)
    clean = sign(d, [bifilar_unit(d, q=False, ring=True)], o)
    short, sound = res["units"][0], clean["units"][0]
    assert short["verdict"] == "fail"
    ring = {ln["key"]: ln for ln in short["lines"] if ln["key"].startswith("ring.")}
    assert ring["ring.decay"]["result"] == "fail"
    texts = findings(res, 0)
    assert any("shorted turn (or turns)" in t and "ring" in t for t in texts)
    _no_contradiction(texts)
    assert sound["verdict"] == "pass", findings(clean)
    assert {ln["key"]: ln["result"] for ln in sound["lines"] if ln["key"].startswith("ring.")} == \
        {"ring.frequency": "pass", "ring.decay": "pass"}


def test_a_ring_with_another_capacitor_or_on_a_job_without_the_ring_test_is_refused(bifilar):
    from windsheet.common.errors import InputError

    o, d = bifilar
    u = bifilar_unit(d, q=False)
    u["ring"] = {"capacitor": "22 nF", "frequency": "60 kHz", "decay": 0.9}
    with pytest.raises(InputError, match=r"units\[0\]\.ring\.capacitor: .*10 nF"):
        sign(d, [u])
    plain = build_design(order(2, "series-aiding", turns=30, test="10 kHz"), remedies=False)
    assert plain.qc_plan.line("ring.frequency") is None
    u["ring"]["capacitor"] = "10 nF"
    with pytest.raises(InputError, match="asks for no ring test"):
        sign(plain, [u])


def test_q_read_at_another_frequency_is_refused(bifilar):
    from windsheet.common.errors import InputError

    o, d = bifilar
    u = bifilar_unit(d)
    u["test_frequency"] = "1 kHz"
    with pytest.raises(InputError, match=r"units\[0\]\.strands\.A\.q: .*10 kHz"):
        sign(d, [u])


def test_q_band_boundary(bifilar):
    o, d = bifilar
    ln = d.qc_plan.line("terminal.q")
    assert ln.judged == "minimum" and not ln.required and ln.low == pytest.approx(ln.predicted * 0.85)
    for q, want in ((ln.low * 1.001, "pass"), (ln.low * 0.999, "fail")):
        u = bifilar_unit(d, q=False)
        u["terminals"]["q"] = q
        line = next(x for x in sign(d, [u])["units"][0]["lines"] if x["key"] == "terminal.q")
        assert line["result"] == want


def test_open_is_read_for_any_inductance_and_diagnosed(bifilar):
    o, d = bifilar
    u = bifilar_unit(d, q=False)
    u["strands"]["B"] = {"inductance": "open", "resistance": "open"}
    u["before_joint"]["A-B"] = {"series_aiding": "open", "series_opposing": "OL"}
    u["terminals"] = {"inductance": "open", "resistance": "open"}
    res = sign(d, [u], o)
    unit = res["units"][0]
    assert unit["verdict"] == "fail"
    by = {ln["key"]: ln for ln in unit["lines"]}
    for key in ("strand.B.inductance", "pair.A-B.series_aiding", "pair.A-B.series_opposing", "terminal.inductance"):
        assert by[key]["result"] == "fail" and by[key]["note"] == "open circuit" and by[key]["measured"] is None
    texts = findings(res)
    assert any("strand B is open" in t for t in texts)
    assert any("open circuit at the terminals" in t for t in texts)
    # An open inductance alone at the terminals, with no resistance read, is diagnosed as open too.
    u = bifilar_unit(d, q=False)
    u["terminals"] = {"inductance": "open"}
    assert any("open circuit at the terminals" in t for t in findings(sign(d, [u], o)))


def test_an_insulation_tester_reading_open_is_above_its_range(bifilar):
    o, d = bifilar
    u = bifilar_unit(d, q=False)
    u["insulation"]["strand_to_strand"] = "open"
    line = next(x for x in sign(d, [u])["units"][0]["lines"] if x["key"] == "insulation.strand_to_strand")
    assert line["result"] == "pass" and "above the tester's range" in line["note"]


# ---------------------------------------------------------------- separate windings

@pytest.fixture(scope="module")
def choke():
    # HL-0421: two separate windings on a ferrite toroid.
    return build_design(load_order(SAMPLES / "hl-0421-toroid-choke.yaml"), remedies=False)


def choke_unit(d, swap=None):
    """Readings of the separate-winding choke by hand from its strand matrix (Grover, ch. 1)."""
    L = np.asarray(d.inductance_matrix_H)
    R = [s.resistance_20C_ohm for s in d.strands]
    w = 2 * math.pi * d.test.frequency_Hz
    l1, l2, m = L[0, 0], L[1, 1], L[0, 1]
    u = {"serial": d.job.units[0] if d.job.units else "HL-0421-01", "ambient": "20 degC", **_common(d),
         "strands": {"A": {"inductance": uh(l1), "resistance": ohm(R[0])},
                     "B": {"inductance": uh(l2), "resistance": ohm(R[1])}},
         "before_joint": {"A-B": {"series_aiding": uh(l1 + l2 + 2 * m), "series_opposing": uh(l1 + l2 - 2 * m)}},
         "terminals": {"inductance": uh(l1), "resistance": ohm(R[0])}}
    if swap == "B reversed":
        # B's start and finish tags swapped: the link that should aid opposes, and the other way round.
        u["before_joint"]["A-B"] = {"series_aiding": uh(l1 + l2 - 2 * m), "series_opposing": uh(l1 + l2 + 2 * m)}
    elif swap == "finish tags":
        # A.finish and B.finish tags swapped: each winding alone reads open between its own tags; the aiding
        # link closes B on itself (A read with B shorted), the opposing link is the right circuit.
        z = R[0] + 1j * w * l1 + w * w * m * m / (R[1] + 1j * w * l2)
        u["strands"] = {"A": {"inductance": "open", "resistance": "open"},
                        "B": {"inductance": "open", "resistance": "open"}}
        u["before_joint"]["A-B"]["series_aiding"] = uh(z.imag / w)
        u["terminals"] = {"inductance": "open", "resistance": "open"}
    return u


def test_separate_windings_carry_polarity_checks(choke):
    assert {"pair.A-B.series_aiding", "pair.A-B.series_opposing"} <= set(choke.qc_required)
    assert "temporary link" in choke.qc_plan.line("pair.A-B.series_aiding").note
    assert "Polarity" in choke.qc_plan.line("pair.A-B.series_aiding").label


def test_a_reversed_separate_winding_fails_named_by_its_polarity_check(choke):
    sound = sign(choke, [choke_unit(choke)])
    assert sound["units"][0]["verdict"] == "pass", findings(sound)
    res = sign(choke, [choke_unit(choke, "B reversed")])
    unit = res["units"][0]
    assert unit["verdict"] == "fail"
    assert next(x for x in unit["lines"] if x["key"] == "pair.A-B.series_aiding")["result"] == "fail"
    texts = findings(res)
    assert "winding B reversed: its start and finish tags are swapped" in " | ".join(texts)


def test_swapped_finish_tags_are_named_not_two_open_windings(choke):
    res = sign(choke, [choke_unit(choke, "finish tags")])
    texts = findings(res)
    assert res["units"][0]["verdict"] == "fail"
    assert any("finish tags of windings A and B are swapped" in t for t in texts), texts
    assert not any(" is open" in t or "open circuit" in t for t in texts), texts


# ---------------------------------------------------------------- one diagnosis

def test_a_turn_count_is_stated_once_and_never_followed_by_nothing_explains():
    from test_signoff_proof import design, full_unit

    o, p = design(2, "series-aiding", turns=60, tol="3 %")
    L57, R57 = strand_values_at_turns(o, 57)
    res = sign(p, [full_unit(p, L57, R57)], o)
    texts = findings(res)
    assert sum("turn count off" in t for t in texts) == 1, texts
    assert "strands A and B and at the terminals" in texts[0]
    # One strand short: the balance names it once; no line then says turns and wire are as ordered.
    L, R = np.array(p.inductance_matrix_H), np.array([s.resistance_20C_ohm for s in p.strands])
    Ls, Rs = L.copy(), R.copy()
    Ls[1, 1], Ls[0, 1], Ls[1, 0], Rs[1] = L57[1, 1], L[0, 1] * 57 / 60, L[0, 1] * 57 / 60, R57[1]
    texts = findings(sign(p, [full_unit(p, Ls, Rs)], o))
    assert sum("turns fewer" in t or "turn count off" in t for t in texts) == 1, texts
    assert not any("as ordered" in t or "explains the miss" in t for t in texts), texts
