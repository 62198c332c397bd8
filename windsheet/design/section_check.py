"""The walls of a sectioned winding judged: solid insulation, creepage over the top, the crossover.

Reads the voltage map (:mod:`windsheet.physics.section_layout`) and the order's
``winding.section_wall``; returns the design's ``sections`` part and how it
changes the insulation verdict.
"""

from __future__ import annotations

import math

import numpy as np

from windsheet.physics import insulation_coordination as ic
from windsheet.physics import section_layout as sl

#: Short-time dielectric strength taken for a wall when the order gives none (memory: glass-filled
#: nylon and PBT datasheets give 15–30 kV/mm by IEC 60243-1; the low end taken). [V/m]
DEFAULT_WALL_STRENGTH_V_PER_M = 15e6
_RANK = {"pass": 0, "marginal": 1, "fail": 2}


def _creepage_needed(across_Vpk, ac, pollution_degree, group):
    # IEC 60664-1 tabulates the rms working voltage; d.c. and pulse peaks are taken as they stand.
    working = across_Vpk / math.sqrt(2.0) if ac else across_Vpk
    try:
        return ic.creepage(working, pollution_degree, group)
    except ValueError:
        return None


def check_sections(layout, potential, wall, derating, ac, wall_top=None, potted=False, edge_potential=None):
    """Each wall of a sectioned layout judged, as the design's ``sections`` part.

    ``potential`` is each turn's peak potential [V]; ``wall`` the order's
    ``winding.section_wall``; ``wall_top`` the walls' height above the winding
    surface [m] (a bobbin's window height, a cylinder's max_build; None: flush).
    A potted winding has no surface over the wall to track along: no creepage.
    ``edge_potential`` [V], under a fast edge: each wall is judged at the larger of the
    steady and the edge's voltage across it (as every neighbouring pair is).
    """
    strength = DEFAULT_WALL_STRENGTH_V_PER_M if wall.strength is None else wall.strength / wall.per
    allowed = sl.wall_allowed_voltage(wall.thickness, strength, derating)
    available = sl.creepage_over_wall(wall.thickness, wall_top, layout.build_height)
    walls = []
    steady = sl.wall_voltages(layout, potential)
    edge = sl.wall_voltages(layout, edge_potential) if edge_potential is not None else steady
    for w, e in zip(steady, edge):
        w = {**w, "across_Vpk": max(w["across_Vpk"], e["across_Vpk"]),
             "crossover_Vpk": max(w["crossover_Vpk"], e["crossover_Vpk"])}
        v = w["across_Vpk"]
        need = 0.0 if potted else _creepage_needed(v, ac, wall.pollution_degree, wall.material_group)
        where = f"wall {w['wall']} (between sections {w['wall']} and {w['wall'] + 1})"
        if v > allowed:
            verdict, reason = "fail", (f"{v:.0f} V peak across {where} is over the {allowed:.0f} V peak its "
                                       f"{wall.thickness * 1e3:.2f} mm of {wall.material} is allowed "
                                       f"({strength / 1e6:.0f} kV/mm × {derating:.0%}).")
        elif need is None:
            verdict, reason = "marginal", (f"{v:.0f} V peak across {where} is above the 2000 V rms that "
                                           "IEC 60664-1's creepage table covers here: the creepage over the "
                                           "wall needs the applicable standard's figure.")
        elif need > available + 1e-12:
            verdict, reason = "fail", (f"{v:.0f} V peak across {where} needs {need * 1e3:.1f} mm of creepage "
                                       f"(IEC 60664-1, pollution degree {wall.pollution_degree}, material group "
                                       f"{wall.material_group}); over the wall's top there are "
                                       f"{available * 1e3:.1f} mm.")
        else:
            verdict, reason = "pass", (f"{v:.0f} V peak across {where}: within the {allowed:.0f} V peak its "
                                       "wall is allowed" + ("; potted, no surface to creep along." if potted else
                                                            f", creepage {available * 1e3:.1f} mm against "
                                                            f"{need * 1e3:.1f} mm needed."))
        walls.append({"wall": w["wall"], "across_Vpk": v, "allowed_Vpk": allowed,
                      "crossover_Vpk": w["crossover_Vpk"], "creepage_needed_m": need,
                      "creepage_available_m": available, "verdict": verdict, "reason": reason})
    section = np.asarray(layout.section)
    turns = [int(np.sum((section == k) & (layout.strand == 0))) for k in range(layout.sections)]
    worst = max((w["verdict"] for w in walls), key=_RANK.get, default="pass")
    return {"count": layout.sections, "width_m": layout.section_width, "wall_thickness_m": wall.thickness,
            "wall_material": wall.material, "wall_strength_V_per_m": strength,
            "wall_strength_given": wall.strength is not None,
            "layers_per_section": list(layout.layers_per_section), "turns_per_section": turns,
            "walls": walls, "verdict": worst, "crossover_sleeves_per_unit": len(walls) * layout.strands,
            "crossover_Vpk": max((w["crossover_Vpk"] for w in walls), default=0.0),
            "basis": ("voltage across each wall from the steady voltage map, and under a fast edge from its "
                      "initial distribution, the larger (the turns facing it on either side); solid: thickness × the material's short-time strength (IEC 60243-1) × the "
                      "order's derating; creepage over the top, face to face (IEC 60664-1 table F.4)")}


def with_sections(insulation: dict, sections: dict) -> dict:
    """The insulation verdict with the walls' verdict and reasons taken in (never raised by them)."""
    bad = [w for w in sections["walls"] if w["verdict"] != "pass"]
    if not bad:
        return insulation
    verdict = max(insulation["verdict"], sections["verdict"], key=lambda v: _RANK.get(v, 0))
    return {**insulation, "verdict": verdict, "reasons": list(insulation.get("reasons", []))
            + [w["reason"] for w in bad]}
