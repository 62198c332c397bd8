"""A sample register of simulated sign-offs, for the demo and the report's tests.

Invented data: Harrowgate Coil Works' jobs HL-05xx, built from two sample
orders; each unit's readings are the prediction times (1 + a family bias +
noise), drawn from a seeded generator so the register is the same each run.
"""

from __future__ import annotations

from pathlib import Path

SAMPLES = Path(__file__).resolve().parents[2] / "samples"

#: (sample order, invented job numbers, units per job, inductance bias, resistance bias, spread)
FAMILIES = (
    ("hl-0412-bifilar-aiding.yaml", ("HL-0501", "HL-0507", "HL-0513", "HL-0520"), 8, 0.021, 0.012, 0.008),
    ("hl-0410-single.yaml", ("HL-0503", "HL-0511"), 6, -0.014, 0.006, 0.005),
)


def _unit_readings(p, serial: str, rng, l_bias: float, r_bias: float, spread: float, lot: str) -> dict:
    t = p.terminal
    L = t.inductance_H * (1 + l_bias + rng.normal(0, spread))
    R = t.resistance_ohm * (1 + r_bias + rng.normal(0, spread / 2))
    return {"serial": serial, "terminals": {"inductance": f"{L * 1e6:.6g} uH", "resistance": f"{R:.6g} ohm"},
            "wire_lot": lot, "core_lot": "FORM-" + serial[-2:]}


def build_sample_register(path, seed: int = 2026) -> dict:
    """Issue and sign off the invented jobs into a new register at ``path``; returns counts."""
    import numpy as np

    from windsheet.qc.measured import measured_from_dict
    from windsheet.order.document import load_order
    from windsheet.design.build import build_design
    from .register import open_register
    from windsheet.qc.signoff import evaluate_signoff

    rng = np.random.default_rng(seed)
    units = 0
    with open_register(path) as reg:
        for sample, jobs, n, l_bias, r_bias, spread in FAMILIES:
            o = load_order(SAMPLES / sample)
            base = build_design(o, remedies=False)
            for j, number in enumerate(jobs):
                serials = [f"{number}-{k + 1:02d}" for k in range(n)]
                sha = f"{number}-{o.sha256}"[:64]
                p = base.model_copy(update={"job": base.job.model_copy(update={
                    "number": number, "units": serials, "quantity": n}), "order_hash": sha})
                reg.record_issue(p, o.source.decode("utf-8", "replace"), sha)
                lot = f"R-{2290 + j}"
                measured = measured_from_dict({
                    "job": number, "revision": p.job.revision, "inspector": "M. Lindqvist (QC)",
                    "ambient": "20 degC", "test_frequency": "1 kHz", "instrument_ids": {"lcr": "LCR-07"},
                    # Simulated units carry terminal readings only; the rest is waived, saying so.
                    "waive": {k: "simulated demo sign-off: terminal readings only"
                              for k in p.qc_required if not k.startswith("terminal.")},
                    "units": [_unit_readings(p, s, rng, l_bias, r_bias, spread, lot) for s in serials]})
                result = evaluate_signoff(p, measured)
                reg.record_signoff(result, sha, "M. Lindqvist (QC)")
                units += n
    return {"units": units, "jobs": sum(len(f[1]) for f in FAMILIES)}
