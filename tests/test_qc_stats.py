"""QC statistics and the control chart: limits against numpy, the d2 constant, run rules, the SVG."""

import math
import re

import numpy as np
import pytest

from windsheet.sheets.control_chart import control_chart_svg
from windsheet.qc.qc_stats import (D2_N2, RULE_BEYOND, RULE_RUN, bias, family_statistics, individuals_limits,
                                line_chart, run_rule_signals)


def _series(n=40, seed=7):
    return 1.02 + np.random.default_rng(seed).normal(0, 0.008, n)


def test_limits_equal_numpy():
    x = _series()
    lim = individuals_limits(x)
    # Independent: centre = mean; σ = mean |Δx| / 1.128 (Montgomery sec. 6.4; NIST/SEMATECH §6.3.2).
    sigma = np.mean(np.abs(x[1:] - x[:-1])) / 1.128
    assert lim["centre"] == pytest.approx(np.mean(x), rel=1e-14)
    assert lim["sigma"] == pytest.approx(sigma, rel=1e-14)
    assert lim["ucl"] == pytest.approx(np.mean(x) + 3 * sigma, rel=1e-14)
    assert lim["lcl"] == pytest.approx(np.mean(x) - 3 * sigma, rel=1e-14)


def test_d2_is_the_mean_range_of_two_normals():
    # E|X1 − X2| = 2σ/√π for independent normals (the mean range of a sample of two): d2 = 1.1284.
    assert D2_N2 == pytest.approx(2 / math.sqrt(math.pi), abs=5e-4)
    # And MR̄/d2 recovers σ of in-control data (brute-force simulation, 20 000 points).
    x = np.random.default_rng(1).normal(5.0, 0.01, 20_000)
    assert individuals_limits(x)["sigma"] == pytest.approx(0.01, rel=0.02)


def test_run_rules():
    # Western Electric rule 1: a point beyond 3σ.
    sig = run_rule_signals([0, 0.5, -0.5, 3.2, 0], 0.0, 1.0)
    assert sig == [{"rule": RULE_BEYOND, "points": [3]}]
    # Rule 2 (7 in a row on one side): six are not a signal, the seventh is.
    assert run_rule_signals([1] * 6 + [-1], 0.0, 1.0) == []
    assert run_rule_signals([-1] + [1] * 8, 0.0, 1.0) == [{"rule": RULE_RUN, "points": [7, 8]}]
    # A point on the centre line ends a run.
    assert run_rule_signals([1] * 4 + [0] + [1] * 4, 0.0, 1.0) == []


def test_bias_is_mean_and_sample_sd():
    x = _series(37)
    b = bias(x)
    assert b["bias"] == pytest.approx(np.mean(x) - 1)
    assert b["sd"] == pytest.approx(np.std(x, ddof=1))
    assert b["n"] == 37


def test_families_keep_apart_and_per_job_stats():
    def unit(job, fam, r):
        return {"job": job, "serial": f"{job}-{r}", "family": (fam, fam),
                "lines": [{"key": "terminal.inductance", "item": "Inductance", "measured": r * 1e-4,
                           "predicted": 1e-4}]}
    units = [unit("J1", "a", 1.01), unit("J1", "a", 1.03), unit("J2", "a", 1.02), unit("J3", "b", 0.97)]
    fams = {f["key"]: f for f in family_statistics(units)}
    line = fams["a"]["lines"][0]
    assert line["bias"]["n"] == 3 and line["bias"]["bias"] == pytest.approx(0.02)
    assert [(j["job"], j["n"]) for j in line["per_job"]] == [("J1", 2), ("J2", 1)]
    assert line["per_job"][0]["mean"] == pytest.approx(1.02)
    assert fams["b"]["lines"][0]["bias"]["bias"] == pytest.approx(-0.03)


def test_chart_prints_limits_rules_and_sigma_readably():
    x = list(_series(30))
    x[5] = 1.08
    chart = line_chart([{"ratio": r, "job": "J", "serial": str(i)} for i, r in enumerate(x)])
    svg = control_chart_svg(chart, "bifilar on 50 mm glass-epoxy: inductance")
    lim = individuals_limits(x)
    # The printed limits are the numpy ones, as percent of the prediction.
    sigma = np.mean(np.abs(np.diff(x))) / 1.128
    for name, value in (("UCL", np.mean(x) + 3 * sigma), ("CL", np.mean(x)), ("LCL", np.mean(x) - 3 * sigma)):
        assert f"{name} {(value - 1) * 100:+.2f} %" in svg
    assert lim["ucl"] < 1.08
    assert RULE_BEYOND in svg and "at unit 6" in svg and "d2 = 1.128" in svg and "NIST/SEMATECH" in svg
    # Print resolution: text stays text, the chart is 7 in wide (A4 text width at 1:1), no type under 7 pt.
    assert 'width="504pt"' in svg
    sizes = [float(s) for s in re.findall(r"font-size:\s*([0-9.]+)px", svg)]
    sizes += [float(s) for s in re.findall(r"font:\s*(?:\w+\s+)*?([0-9.]+)px", svg)]
    assert sizes and min(sizes) >= 7.0


def test_the_unit_axis_has_whole_numbers_only():
    # Three units: a default axis would tick 0.5, 1.0, 1.5 ...; units are counted, never halved.
    chart = line_chart([{"ratio": r, "job": "J", "serial": str(i)} for i, r in enumerate((1.0, 1.2, 1.4))])
    svg = control_chart_svg(chart, "three units")
    ticks = re.findall(r"<text[^>]*>\s*([-−0-9.]+)\s*</text>", svg)
    assert {"1", "2", "3"} <= set(ticks)
    assert not any(t.endswith(".5") for t in ticks)
