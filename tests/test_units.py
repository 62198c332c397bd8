"""The quantity grammar: every spelling against pint, nothing evaluated, qualifiers, forgiven case.

pint is the outside authority here: windsheet does not import it at run time,
so each spelling's factor is checked against pint's default registry.
"""

from __future__ import annotations

from conftest import examples
import math

import numpy as np
import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from windsheet.common.errors import InputError
from windsheet.order import unit_table
from windsheet.order.unit_table import table
from windsheet.order.units import DIMENSIONS, parse_percent, parse_quantity, read_quantity, sine_rms

REG = pint.UnitRegistry()
UNITS, FOLDED, FOREIGN = table()
SI_OF_KIND = {"length": "m", "inductance": "H", "capacitance": "F", "voltage": "V", "current": "A",
              "frequency": "Hz", "resistance": "ohm", "time": "s", "mass": "kg", "angle": "rad",
              "energy": "J", "flux_density": "T"}
FIELD_OF_KIND = {"length": "length", "inductance": "inductance", "capacitance": "capacitance",
                 "voltage": "voltage", "current": "current", "frequency": "frequency",
                 "resistance": "resistance", "time": "time", "mass": "mass", "angle": "angle",
                 "temperature": "temperature", "energy": "energy", "flux_density": "flux_density"}


# Where the trade and pint read a spelling differently, windsheet keeps the trade's meaning:
# pint reads "mil" as an angular mil and "amps" as atto-metre-per-second (a prefix split);
# in a coil shop a mil is 0.001 in and amps are amperes (common practice).
TRADE_MEANING = {"mil": "mil_length", "mils": "mil_length", "amps": "ampere"}


def _pint_knows(spelling):
    try:
        REG.Unit(spelling)
    except Exception:
        return False
    return True


# ---------------------------------------------------------------- the table against pint
@pytest.mark.parametrize("spelling", sorted(s for s, u in UNITS.items() if u.kind != "temperature"))
def test_factor_matches_pint(spelling):
    unit = UNITS[spelling]
    si = SI_OF_KIND[unit.kind]
    # pint's default registry (reference library): the canonical spelling's size in SI.
    canonical = TRADE_MEANING.get(unit.canonical, unit.canonical)
    assert unit.factor == pytest.approx(REG.Quantity(1.0, canonical).to(si).magnitude, rel=1e-12)
    if spelling in TRADE_MEANING:
        # pint's default registry, under the trade's name for the unit.
        assert unit.factor == pytest.approx(REG.Quantity(1.0, TRADE_MEANING[spelling]).to(si).magnitude, rel=1e-12)
    elif _pint_knows(spelling):
        # pint's default registry: the spelling as written means the same unit.
        assert unit.factor == pytest.approx(REG.Quantity(1.0, spelling).to(si).magnitude, rel=1e-12)


@pytest.mark.parametrize("spelling", sorted(s for s, u in UNITS.items() if u.kind == "temperature"))
@pytest.mark.parametrize("x", [-40.0, 0.0, 100.0])
def test_temperature_matches_pint(spelling, x):
    unit = UNITS[spelling]
    # pint's default registry (offset units converted to degree Celsius).
    expected = REG.Quantity(x, unit.canonical).to("degC").magnitude
    assert x * unit.factor + unit.offset == pytest.approx(expected, abs=1e-9)


@pytest.mark.parametrize("spelling", sorted(unit_table._FOREIGN))
def test_foreign_spellings_are_real_units(spelling):
    # pint's default registry: each spelling kept out of case forgiveness names a real unit.
    assert _pint_knows(spelling)


def _case_variants(s):
    return {s.upper(), s.lower(), s.swapcase(), s.capitalize()} - {s}


def test_forgiven_case_never_contradicts_a_unit_pint_knows():
    # pint's default registry: where a case variant is itself a unit there, windsheet must read that
    # unit or refuse, never forgive the variant into a different one (mH is not MH).
    checked = 0
    for spelling, unit in UNITS.items():
        field = FIELD_OF_KIND[unit.kind]
        for variant in _case_variants(spelling):
            if not variant.isalpha():
                continue
            try:
                got = read_quantity(f"1 {variant}", field, "f")
            except InputError:
                continue
            if _pint_knows(variant):
                checked += 1
                si = SI_OF_KIND.get(unit.kind, "degC")
                pint_q = REG.Quantity(1.0, variant)
                assert pint_q.dimensionality == REG.Quantity(1.0, si).dimensionality, variant
                assert got.value == pytest.approx(pint_q.to(si).magnitude, rel=1e-12), variant
    # Some case variants are spellings pint knows (ms and Ms, mohm and Mohm ...): the check bites.
    assert checked >= 8


# ---------------------------------------------------------------- case forgiven only where unambiguous
@pytest.mark.parametrize("text, field, si", [
    ("2 KHz", "frequency", 2e3), ("10 Kohm", "resistance", 1e4), ("1 KV", "voltage", 1e3),
    ("1.5 Ohm", "resistance", 1.5), ("3 DEGC", "temperature", 3.0), ("2 NF", "capacitance", 2e-9),
    ("61.2 µH", "inductance", 61.2e-6), ("5 GΩ", "resistance", 5e9), ("25 °C", "temperature", 25.0),
])
def test_unambiguous_case_is_forgiven(text, field, si):
    assert read_quantity(text, field, "f").value == pytest.approx(si, rel=1e-12)


@pytest.mark.parametrize("text, field, both", [
    ("1 MHZ", "frequency", ("'1 MHz'", "'1 mHz'")),
    ("1 mhz", "frequency", ("'1 MHz'", "'1 mHz'")),
    ("10 MOhm", "resistance", ("'10 Mohm'", "'10 mohm'")),
    ("1 mh", "inductance", ("'1 mH'",)),
    ("1 Ma", "current", ("'1 mA'",)),
])
def test_ambiguous_case_is_refused_with_the_candidates(text, field, both):
    with pytest.raises(InputError) as info:
        read_quantity(text, field, "f")
    assert "did you mean" in info.value.message
    for candidate in both:
        assert candidate in info.value.message


@pytest.mark.parametrize("text, field, suggestion", [
    ("25 C", "temperature", "'25 degC'"),
    ("25 F", "temperature", "'25 degF'"),
    ("60 S", "time", "'60 s'"),
    ("50 MM", "length", "'50 mm'"),
])
def test_suggestion_for_a_unit_that_could_mean_another(text, field, suggestion):
    with pytest.raises(InputError) as info:
        read_quantity(text, field, "f")
    assert f"did you mean {suggestion}" in info.value.message


def test_exact_spelling_wins_over_forgiveness():
    # mH and MH are both units: the exact spelling is read, and MH is then out of range.
    assert read_quantity("1 mH", "inductance", "f").value == pytest.approx(1e-3)
    with pytest.raises(InputError, match="at most"):
        read_quantity("1 MH", "inductance", "f")


# ---------------------------------------------------------------- nothing is evaluated
@pytest.mark.parametrize("text", ["25*2 mm", "40 mm + 10 mm", "40 mm - 10 mm", "9**9**9 mm", "9**9**8 mm",
                                  "(50) mm", "50 mm / 2", "2^10 mm", "1e3*1e3 mm", "50 mm * 2", "5 * mm",
                                  "100/2 mm", "50 mm = 2 in"])
def test_arithmetic_is_refused_with_the_expected_form(text):
    with pytest.raises(InputError) as info:
        read_quantity(text, "length", "form.traverse")
    msg = str(info.value)
    assert msg.startswith("form.traverse: expected a length with a unit, like '50 mm'") and "\n" not in msg
    assert "arithmetic is not read" in msg


def test_measured_expression_is_refused_by_the_same_grammar():
    from windsheet.qc.measured import measured_from_dict

    doc = {"job": "HL-0412", "units": [{"serial": "HL-0412-01",
                                        "terminals": {"inductance": "9**9**7 uH", "resistance": "1 ohm"}}]}
    with pytest.raises(InputError) as info:
        measured_from_dict(doc)
    assert info.value.path == "units[0].terminals.inductance" and "arithmetic" in info.value.message


@pytest.mark.parametrize("text, why", [
    ("nan V", "finite"), (".inf V", "finite"), ("1e999 V", "finite"), ("230", "no unit"),
    ("0,5 V", "decimal point"), ("230 V long", "only rms, peak or dc"), ("5 furlong", "unknown unit"),
])
def test_other_unreadable_forms(text, why):
    with pytest.raises(InputError, match=why):
        read_quantity(text, "voltage", "f")


# ---------------------------------------------------------------- qualifiers
@pytest.mark.parametrize("text, qualifier", [
    ("12 V rms", "rms"), ("12 Vrms", "rms"), ("12 VRMS", "rms"), ("230 VAC", "rms"), ("230 V a.c.", "rms"),
    ("170 Vpk", "peak"), ("170 V peak", "peak"), ("170 V PK", "peak"), ("170 mVpk", "peak"),
    ("24 V dc", "dc"), ("24 VDC", "dc"), ("24 V d.c.", "dc"), ("24 Vd.c.", "dc"), ("0.2 A rms", "rms"),
    ("230 V", None),
])
def test_qualifiers(text, qualifier):
    field = "current" if " A" in text else "voltage"
    assert read_quantity(text, field, "f").qualifier == qualifier


@pytest.mark.parametrize("text, field, words", [
    ("10 Vpp", "voltage", "peak-to-peak"), ("10 V p-p", "voltage", "peak-to-peak"),
    ("10 Vp-p", "voltage", "peak-to-peak"), ("50 mm rms", "length", "belong to a voltage or a current"),
])
def test_qualifiers_refused(text, field, words):
    with pytest.raises(InputError, match=words):
        read_quantity(text, field, "f")


def test_plain_field_refuses_a_qualifier_and_a_peak_field_takes_peak():
    with pytest.raises(InputError, match="plain voltage"):
        parse_quantity("1460 V rms", "voltage", "wire.breakdown")
    assert parse_quantity("500 V peak", "voltage", "insulation.pdiv", form="peak") == 500.0
    with pytest.raises(InputError, match="'230 V peak'"):
        parse_quantity("350 V rms", "voltage", "insulation.pdiv", form="peak")
    assert parse_quantity("500 V dc", "voltage", "units[0].insulation.test_voltage", form="dc") == 500.0
    with pytest.raises(InputError, match="'230 V dc'"):
        parse_quantity("500 V rms", "voltage", "units[0].insulation.test_voltage", form="dc")


def test_sine_rms_against_a_sampled_sine():
    # Independent computation: rms of one sampled period of a 325 V peak sine.
    t = np.linspace(0.0, 1.0, 100_001)[:-1]
    rms = float(np.sqrt(np.mean((325.0 * np.sin(2 * np.pi * t)) ** 2)))
    assert sine_rms(325.0) == pytest.approx(rms, rel=1e-9)


def test_percent():
    assert parse_percent("10 %", "f") == pytest.approx(0.10)
    assert parse_percent("0.5%", "f") == pytest.approx(0.005)
    for bad in ["10", "5*2 %", "nan %", "-1 %", "10 % %"]:
        with pytest.raises(InputError):
            parse_percent(bad, "f")


# ---------------------------------------------------------------- any text: a reading or one line
ALPHABET = st.sampled_from(list("0123456789.eE+-*/^() %") + ["mm", "uH", "V", "Hz", "rms", "pk", " ", "K",
                                                              "degC", "kHz", "Ω", "µ", "°", "C", "**", "9"])


@settings(max_examples=examples(300), deadline=None, derandomize=True)
@given(parts=st.lists(ALPHABET, max_size=12), field=st.sampled_from(sorted(DIMENSIONS)))
def test_any_text_reads_or_is_refused_in_one_line(parts, field):
    text = "".join(parts)
    try:
        got = read_quantity(text, field, "f")
    except InputError as exc:
        assert "\n" not in str(exc) and str(exc).startswith("f: ")
        return
    assert math.isfinite(got.value)
    # What reads has one number and no operator in it: nothing was evaluated.
    assert not any(op in text for op in ("*", "^", "(", ")", "/"))
