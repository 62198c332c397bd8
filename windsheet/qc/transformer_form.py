"""The empty readings form of a transformer: every required line of every unit, winding by winding."""

from __future__ import annotations


def transformer_yaml_form(design) -> str:
    """The YAML form a transformer's inspector fills in (read by :mod:`windsheet.qc.transformer_readings`)."""
    job = design.job
    req = set(design.qc_required)
    first = design.windings[0].name
    f_test = design.sections[0].test.frequency_Hz if design.sections else None
    out = [f"# Measured values for job {job.number} rev {job.revision}: fill in every empty line.",
           "# A line left empty is not read: the unit signs off INCOMPLETE.  To waive a line write",
           "#   waive: {hipot.primary-secondary: \"reason\"}   under the unit.  Every quantity carries its unit.",
           f"job: {job.number}", f"revision: {job.revision or ''}".rstrip(),
           "inspector:           # who signs the units off", "date:                # 2026-12-03",
           "instruments:", f"test_frequency: {f_test / 1e3:g} kHz" if f_test else "test_frequency:",
           "units:"]
    for serial in job.units:
        out += [f"  - serial: {serial}", "    ambient:           # e.g. 21.5 degC", "    windings:"]
        for w in design.windings:
            out += [f"      {w.name}:", "        resistance:    # ohm, at the ambient"]
            if f"winding.{w.name}.inductance" in req:
                out.append("        inductance:    # H, the others open")
            if f"winding.{w.name}.ratio" in req:
                out += [f"        ratio:         # e.g. '{w.turns_ratio * 100:.3g} V / 100 V' ({w.name} over {first})",
                        "        polarity:      # in phase, or reversed"]
        taps = [k for k in design.qc_required if ".tap" in k]
        if taps:
            out.append("    taps:")
            for k in taps:
                out += [f"      {k.split('.', 1)[1].rsplit('.', 1)[0]}:", "        ratio:"]
        for head, note in (("leakage", "H, the first winding with this one shorted"),
                           ("insulation", "e.g. 500 Mohm"), ("hipot", "pass or fail")):
            keys = [k.split(".", 1)[1] for k in design.qc_required if k.startswith(head + ".")]
            if keys:
                out.append(f"    {head}:")
                for k in keys:
                    ln = design.qc_plan.line(f"{head}.{k}")
                    spec = (f"{ln.test_voltage_V:.0f} V for {ln.duration_s:g} s: " if ln is not None and
                            ln.test_voltage_V else "")
                    out.append(f"      {k}:".ljust(28) + f"# {spec}{note}")
    return "\n".join(out) + "\n"
