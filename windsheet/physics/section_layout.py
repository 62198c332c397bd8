"""Sectioned windings: the traverse divided by walls, the sections wound one after another.

A sectioned bobbin (or a form with walls moulded or built up on it) splits the
traverse into ``N`` equal sections.  Section 1 is wound complete, layer on layer,
back and forth; the wire then crosses the wall (through its slot, sleeved) to the
bore of section 2, and so on.  Each section holds about ``1/N`` of the turns, so
the voltage between layers, which grows with the turns a layer holds, falls to
about ``1/N`` of the unsectioned winding's: the usual construction for high
voltage.  What is new is the voltage across each wall, between the turns that
face it on either side, and the crossover's voltage against them.

Pure geometry and arithmetic on SI numbers.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from .layout import Layout, WindingDoesNotFit


def split_turns(turns: int, sections: int) -> list[int]:
    """Turns per strand in each section: as even as whole turns allow, the extra ones first.

    Parameters
    ----------
    turns : int
        Turns per strand in the whole winding. [-]
    sections : int
        Sections wound one after another. [-]

    Returns
    -------
    list of int
        Turns per strand in each section, in winding order. [-]

    References
    ----------
    Plain arithmetic; sections of equal turns share the voltage evenly (common practice).

    Examples
    --------
    >>> split_turns(1800, 4), split_turns(10, 3)
    ([450, 450, 450, 450], [4, 3, 3])
    """
    if sections < 1 or turns < sections:
        raise WindingDoesNotFit(f"{turns} turn(s) cannot fill {sections} sections: at least one turn a section")
    base, extra = divmod(int(turns), int(sections))
    return [base + (1 if k < extra else 0) for k in range(sections)]


def section_width(traverse, sections, wall):
    """Width of each section once the walls are taken out of the traverse. [m]

    Parameters
    ----------
    traverse : float
        The width wound across (a bobbin's window width, less margins). [m]
    sections : int
        Number of sections. [-]
    wall : float
        Thickness of each wall between two sections. [m]

    Returns
    -------
    float
        ``(traverse − (N − 1)·wall) / N``. [m]

    References
    ----------
    Plain geometry.

    Examples
    --------
    >>> round(section_width(0.040, 4, 0.001) * 1e3, 2)
    9.25
    """
    return (float(traverse) - (int(sections) - 1) * float(wall)) / int(sections)


def sectioned_layout(lay_out_section, traverse, sections, wall, turns) -> Layout:
    """Lay out a sectioned winding from one section's layout function.

    Parameters
    ----------
    lay_out_section : callable
        ``lay_out_section(width, turns)`` lays ``turns`` per strand across
        ``width`` [m] from z = 0, as :func:`windsheet.physics.layout.cylinder_layout`
        does (and raises :class:`WindingDoesNotFit` when they do not fit).
    traverse : float
        The width the sections and walls share. [m]
    sections : int
        Number of sections, ≥ 2. [-]
    wall : float
        Thickness of each wall. [m]
    turns : int
        Turns per strand in the whole winding. [-]

    Returns
    -------
    Layout
        Every turn, sections side by side from the start end; ``layer`` counts
        layers in winding order through the sections, ``index`` turns along each
        strand through them; ``section`` gives each turn's section.

    References
    ----------
    Sectioned (multi-chamber) bobbin construction for high-voltage coils, common practice.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> one = lambda width, n: cylinder_layout(0.02, width, 0.2e-3, 0.25e-3, 1, n, layer_style="stacked")
    >>> lay = sectioned_layout(one, 0.0115, 3, 1e-3, 90)
    >>> lay.layers_per_section, lay.turns_in_layer, round(float(lay.z[30]) * 1e3, 3)
    ((3, 3, 3), (12, 12, 6, 12, 12, 6, 12, 12, 6), 4.292)
    """
    width = section_width(traverse, sections, wall)
    if width <= 0:
        raise WindingDoesNotFit(f"{sections} sections with walls of {wall * 1e3:.2f} mm leave no room "
                                f"across {traverse * 1e3:.2f} mm")
    parts = []
    for k, n in enumerate(split_turns(turns, sections)):
        try:
            parts.append(lay_out_section(width, n))
        except WindingDoesNotFit as exc:
            raise WindingDoesNotFit(f"section {k + 1} of {sections} ({width * 1e3:.2f} mm wide): {exc}") from None
    first = parts[0]
    z, layer, index, section = [], [], [], []
    layers_done, turns_done = 0, 0
    for k, part in enumerate(parts):
        z.append(part.z + k * (width + wall))
        layer.append(part.layer + layers_done)
        index.append(part.index + turns_done)
        section.append(np.full(part.r.size, k))
        layers_done += part.layers
        turns_done += part.turns_per_strand

    def cat(name):
        return np.concatenate([getattr(p, name) for p in parts])

    notes = list(first.notes) + [
        f"{sections} sections of {width * 1e3:.2f} mm, walls {wall * 1e3:.2f} mm thick; each section wound "
        "complete, then the wire crosses its wall to the bore of the next"]
    return replace(first, turns_per_strand=int(turns), layers=layers_done,
                   r=cat("r"), z=np.concatenate(z), layer=np.concatenate(layer), slot=cat("slot"),
                   strand=cat("strand"), index=np.concatenate(index), turn_length=cat("turn_length"),
                   turns_in_layer=tuple(t for p in parts for t in p.turns_in_layer),
                   build_height=max(p.build_height for p in parts),
                   traverse_used=(sections - 1) * (width + wall) + parts[-1].traverse_used,
                   notes=tuple(notes), sections=int(sections), section=np.concatenate(section),
                   section_width=width, section_wall=float(wall),
                   layers_per_section=tuple(p.layers for p in parts), _memo={})


def wall_faces(layout: Layout):
    """The turns that face each wall: the nearest column of turns on either side.

    Parameters
    ----------
    layout : Layout
        A sectioned layout (:func:`sectioned_layout`).

    Returns
    -------
    list of (ndarray, ndarray)
        For each wall in turn, the indices of the turns facing it from the
        section before and from the section after.

    References
    ----------
    Plain geometry: each layer that reaches the wall ends in the turn nearest
    it; a nested layer's end sits half a wire further, so turns within
    ``0.75·d`` of the outermost are taken as facing the wall (the next strand
    of a slot, a whole wire back, is not).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> one = lambda width, n: cylinder_layout(0.02, width, 0.2e-3, 0.25e-3, 1, n, layer_style="stacked")
    >>> before, after = wall_faces(sectioned_layout(one, 0.0115, 3, 1e-3, 90))[0]
    >>> len(before), len(after)
    (2, 3)
    """
    reach = 0.75 * layout.overall_diameter
    out = []
    for k in range(layout.sections - 1):
        lo, hi = layout.section == k, layout.section == k + 1
        before = np.flatnonzero(lo & (layout.z >= layout.z[lo].max() - reach))
        after = np.flatnonzero(hi & (layout.z <= layout.z[hi].min() + reach))
        out.append((before, after))
    return out


def wall_voltages(layout: Layout, potential):
    """Peak voltage across each wall, and of each crossover against the turns beside its wall.

    Parameters
    ----------
    layout : Layout
        A sectioned layout.
    potential : ndarray
        Each turn's peak potential from terminal 1, in phase along the winding. [V peak]

    Returns
    -------
    list of dict
        Per wall: ``wall`` (1 = between sections 1 and 2), ``across_Vpk`` (the
        largest voltage between a turn facing it on one side and one on the
        other), ``crossover_Vpk`` (the largest voltage between a strand's
        crossover, at the potential of its last turn in the section before, and
        the turns facing the wall on either side). [V peak]

    References
    ----------
    Voltages read off the winding's voltage map (:mod:`windsheet.physics.voltage_map`).

    Examples
    --------
    Two sections of one layer each: across the wall sit the last turn of
    section 1 and the first of section 2, one turn apart.

    >>> from windsheet.physics.layout import cylinder_layout
    >>> one = lambda width, n: cylinder_layout(0.02, width, 0.2e-3, 0.25e-3, 1, n)
    >>> lay = sectioned_layout(one, 0.0061, 2, 1e-3, 20)
    >>> v = np.linspace(100.0, 0.0, 20)[np.argsort(np.argsort(lay.index))]
    >>> w = wall_voltages(lay, v)[0]
    >>> round(w["across_Vpk"], 2), round(w["crossover_Vpk"], 2)
    (5.26, 5.26)
    """
    potential = np.asarray(potential, dtype=float)
    out = []
    for k, (before, after) in enumerate(wall_faces(layout)):
        across = float(np.max(np.abs(potential[before][:, None] - potential[after][None, :]))) \
            if before.size and after.size else 0.0
        cross = 0.0
        faces = np.concatenate([before, after])
        for s in range(layout.strands):
            mine = np.flatnonzero((layout.section == k) & (layout.strand == s))
            if mine.size and faces.size:
                last = mine[np.argmax(layout.index[mine])]
                cross = max(cross, float(np.max(np.abs(potential[faces] - potential[last]))))
        out.append({"wall": k + 1, "across_Vpk": across, "crossover_Vpk": cross})
    return out


def creepage_over_wall(wall, wall_height, build):
    """Surface path over a wall from one face to the other, round its top. [m]

    Parameters
    ----------
    wall : float
        Wall thickness. [m]
    wall_height : float or None
        Height of the wall above the winding surface (a bobbin's window
        height); ``None``: taken flush with the winding. [m]
    build : float
        The winding's build beside it. [m]

    Returns
    -------
    float
        ``wall + 2·max(wall_height − build, 0)``: up one face, over, down the
        other (IEC 60664-1's creepage measured along the surface). [m]

    References
    ----------
    .. [1] IEC 60664-1, clause 6.2 and annex A (creepage measured along the surface).

    Examples
    --------
    >>> round(creepage_over_wall(1e-3, 12e-3, 8e-3) * 1e3, 1)
    9.0
    """
    rise = 0.0 if wall_height is None else max(float(wall_height) - float(build), 0.0)
    return float(wall) + 2.0 * rise


def wall_allowed_voltage(thickness, strength, derating):
    """Peak voltage a solid wall is allowed in service. [V peak]

    Parameters
    ----------
    thickness : float
        Wall thickness. [m]
    strength : float
        The material's short-time dielectric strength (IEC 60243-1). [V/m]
    derating : float
        Fraction of the breakdown allowed in service, as for the enamel. [-]

    Returns
    -------
    float
        ``thickness × strength × derating``. [V peak]

    References
    ----------
    .. [1] IEC 60243-1, short-time electric strength of solid insulating
       materials (the strength is a material's datasheet value).

    Examples
    --------
    >>> wall_allowed_voltage(1e-3, 15e6, 0.25)
    3750.0
    """
    return float(thickness) * float(strength) * float(derating)


def layer_step_voltage(turns_in_layer, volts_per_turn):
    """Largest voltage between two adjacent layers wound back and forth, at their turning end. [V]

    Parameters
    ----------
    turns_in_layer : int
        Turns per strand in a full layer. [-]
    volts_per_turn : float
        Voltage per turn of one strand. [V]

    Returns
    -------
    float
        ``2·(n − 1)·v``: the first turn of a layer against the last of the next. [V]

    References
    ----------
    Back-and-forth layer winding, the usual hand estimate of layer-to-layer stress (common practice).

    Examples
    --------
    >>> layer_step_voltage(50, 2.0)
    196.0
    """
    return 2.0 * (int(turns_in_layer) - 1) * float(volts_per_turn)



def wall_links(layout: Layout, eps_r=3.5):
    """Capacitances across each wall between the turns that face each other, layer by layer.

    Each turn facing a wall is paired with the turn at the nearest radius on
    the other side; the two face each other over the height of one layer
    through the wall, as a parallel plate.

    Parameters
    ----------
    layout : Layout
        A sectioned layout.
    eps_r : float
        Relative permittivity of the wall (3–4 for glass-filled nylon or PBT,
        memory). [-]

    Returns
    -------
    i, j : ndarray of int
        The two turns of each link.
    c : ndarray
        Its capacitance: ε0·εr·(turn length)·(layer step, or the wire)/(wall). [F]

    References
    ----------
    .. [1] Parallel-plate capacitance, e.g. E. M. Purcell, Electricity and
       Magnetism (1985), §3.5; the wall's thickness taken as the gap (the
       enamel and air beside it left out, which overstates the link a little:
       the safe side for self-resonance).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> one = lambda width, n: cylinder_layout(0.02, width, 0.2e-3, 0.25e-3, 1, n, layer_style="stacked")
    >>> i, j, c = wall_links(sectioned_layout(one, 0.0115, 3, 1e-3, 90))
    >>> len(c), round(float(c[0]) * 1e15, 1)
    (4, 492.9)
    """
    eps0 = 8.8541878128e-12
    height = layout.layer_step if layout.layer_step > 0 else layout.overall_diameter
    ii, jj = [], []
    for before, after in wall_faces(layout):
        for t in before:
            k = after[np.argmin(np.abs(layout.r[after] - layout.r[t]))]
            if abs(layout.r[k] - layout.r[t]) <= height / 2 + 1e-12:
                ii.append(int(t))
                jj.append(int(k))
    i, j = np.asarray(ii, dtype=np.int64), np.asarray(jj, dtype=np.int64)
    length = 0.5 * (layout.turn_length[i] + layout.turn_length[j]) if i.size else np.zeros(0)
    return i, j, eps0 * eps_r * length * height / layout.section_wall
