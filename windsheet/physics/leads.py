"""Leads and joint wires as conductors: where each runs, and which turns it lies beside.

Pure geometry.  Every strand end has a lead.  Its route is an order choice:

* a **start** lead leaves layer 1 at the start flange and either rises up
  that flange (``start-flange``: past the start-end turn of every layer
  above, and over the layer-1 turns between it and the flange; on a
  single-layer coil it rises where it starts, beside nothing) or leaves
  through the former (``through-form``: beside no turn);
* a **finish** lead leaves the top layer and is either laid back over the
  top layer to the start end (``over-top-layer``), lifted straight out
  where it ends (``end-flange``: nothing lies above the top layer), or
  brought back and down the start flange to the former
  (``down-start-flange``: past the start-end turn of every layer);
* a **joint** between a finish and a start (series-aiding) is made either at
  the start end, the finish lead laid back over the winding to it
  (``back-over-winding``), or off the winding, the finish lead taken out at
  its end flange and led clear of the turns (``end-flange``).  Joints of
  finishes only, or starts only, are made where the ends lie.

A lead crossing a turn touches it; so does a lead lying against a flange
and the end turn beside it.  Each lead keeps the potential of its strand end.
Leads that leave the winding at the same place lie together (along the
flange, in one sleeve, on the header) and touch each other, enamel to
enamel: every lead laid back to the start end, or rising up the start
flange, leaves at the start end; a lead lifted out where it ends leaves at
whichever flange its own turn is beside; leads through the former leave
together through it (:func:`lead_bundle`).
Toroids bring every end out at the start-finish gap: their leads lie beside
no turn other than the gap pairs of :func:`windsheet.physics.layout.neighbour_pairs`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .layout import Layout

START_ROUTES = ("start-flange", "through-form")
FINISH_ROUTES = ("over-top-layer", "end-flange", "down-start-flange")
JOINT_ROUTES = ("back-over-winding", "end-flange")

#: Where a finish already lies at the start end (an even number of layers ends there), nothing is
#: laid back: these words replace the route's own.
ROUTE_TEXT_AT_START = {
    "over-top-layer": "brought straight out at the start end, where the top layer ends (an even layer count "
                      "ends there: nothing to lay back)",
    "end-flange": "lifted straight out where it ends, at the start flange, clear of the turns",
    "down-start-flange": "down the start flange to the former, from the start end where the top layer ends",
    "back-over-winding": "joint made at the start end, where the top layer ends (nothing to lay back)",
}

ROUTE_TEXT = {
    "start-flange": "up the start flange",
    "through-form": "out through the former",
    "over-top-layer": "laid back over the top layer to the start end",
    "end-flange": "lifted straight out where it ends, at its end flange, clear of the turns",
    "down-start-flange": "back over the top layer and down the start flange to the former",
    "back-over-winding": "laid back over the winding, joint made at the start end",
}


@dataclass(frozen=True)
class Lead:
    """One lead: the strand end it continues, its route and the turns it lies beside.

    Attributes
    ----------
    end : str
        ``"A.start"``, ``"B.finish"`` …
    strand : int
    which : int
        0 for a start, 1 for a finish (the column of ``end_potential``).
    route : str
    joint : str or None
        The joint it belongs to, ``"A.finish + B.start"``, if any.
    beside : ndarray of int
        Turn indices it touches.
    bundle : str
        Where it leaves the winding, with the other leads that leave there:
        ``"start"``, ``"finish"`` (the far flange) or ``"former"``.
    """

    end: str
    strand: int
    which: int
    route: str
    joint: str | None
    beside: np.ndarray
    at_start_end: bool = False
    #: A sectioned winding whose last section has an even layer count ends beside its wall.
    at_last_wall: bool = False
    bundle: str = "start"

    @property
    def route_text(self) -> str:
        """The route in words, saying where a finish really leaves the winding."""
        if self.which == 1 and self.at_last_wall and self.route == "end-flange":
            return "lifted straight out where it ends, beside the last section's wall, clear of the turns"
        if self.which == 1 and self.at_start_end and self.route in ROUTE_TEXT_AT_START:
            return ROUTE_TEXT_AT_START[self.route]
        return ROUTE_TEXT.get(self.route, self.route)


BUNDLE_TEXT = {"start": "together at the start end", "finish": "together at the finish end",
               "former": "together out through the former"}


def lead_bundle(layout: Layout, strand: int, which: int, route: str) -> str:
    """Where a lead leaves the winding: the leads that leave at one place lie together.

    Parameters
    ----------
    layout : Layout
        A cylinder or bobbin layout.
    strand, which : int
        The strand, and 0 for its start or 1 for its finish.
    route : str
        Its route (:data:`START_ROUTES`, :data:`FINISH_ROUTES`, :data:`JOINT_ROUTES`).

    Returns
    -------
    bundle : str
        ``"start"`` (the start flange), ``"finish"`` (the far flange) or ``"former"``.

    References
    ----------
    Lead dress of layer windings, common practice: leads brought out at one
    flange are laid side by side to the terminals.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 2e-3, 0.45e-3, 0.5e-3, 1, 8)        # 2 layers of 4: ends at the start
    >>> lead_bundle(lay, 0, 1, "end-flange"), lead_bundle(lay, 0, 0, "through-form")
    ('start', 'former')
    """
    if route == "through-form":
        return "former"
    if route != "end-flange":
        return "start"                     # up, down or laid back to the start flange
    own = _own_turn(layout, strand, which)
    zs = layout.z[layout.layer == layout.layer[own]]
    return "start" if layout.z[own] - zs.min() < zs.max() - layout.z[own] else "finish"


def default_routes(layers: int) -> dict:
    """Routes when the order names none: common practice for a layer winding.

    Starts rise up the start flange; a single-layer coil's finish leaves at
    its own end, a multilayer coil's is laid back over the top layer so both
    leads leave at the start end; a series joint is made at the start end
    with the finish laid back over the winding.

    Examples
    --------
    >>> default_routes(1)["finish"], default_routes(3)["finish"]
    ('end-flange', 'over-top-layer')
    """
    return {"start": "start-flange", "finish": "end-flange" if layers == 1 else "over-top-layer",
            "joint": "back-over-winding"}


def _parse_end(end: str):
    sid, _, which = end.partition(".")
    return "ABCD".index(sid.strip().upper()), 0 if which.strip().lower() == "start" else 1


def _end_turn(layout: Layout, layer: int, at_start: bool):
    """The turn of ``layer`` nearest the start flange (or the far one)."""
    sel = np.flatnonzero(layout.layer == layer)
    return sel[np.argmin(layout.z[sel])] if at_start else sel[np.argmax(layout.z[sel])]


def _own_turn(layout: Layout, strand: int, which: int) -> int:
    sel = layout.strand_turns(strand)
    return int(sel[0] if which == 0 else sel[-1])


def _between(layout: Layout, layer: int, z_own: float, towards_start: bool):
    """Turns of ``layer`` between a turn at ``z_own`` and a flange (the ones a lead crosses)."""
    sel = np.flatnonzero(layout.layer == layer)
    zs = layout.z[sel]
    return sel[zs < z_own - 1e-12] if towards_start else sel[zs > z_own + 1e-12]


def lead_beside(layout: Layout, strand: int, which: int, route: str) -> np.ndarray:
    """Turns a lead of the given route touches.

    Parameters
    ----------
    layout : Layout
        A cylinder or bobbin layout.
    strand, which : int
        The strand, and 0 for its start or 1 for its finish.
    route : str
        One of :data:`START_ROUTES` for a start; :data:`FINISH_ROUTES` or
        :data:`JOINT_ROUTES` for a finish.

    Returns
    -------
    beside : ndarray of int
        Turn indices, own turn excluded.

    References
    ----------
    Lead dress of layer windings, common practice (see the module text).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 2e-3, 0.45e-3, 0.5e-3, 1, 12)   # 3 layers of 4
    >>> len(lead_beside(lay, 0, 0, "start-flange"))                   # end turns of layers 2, 3
    2
    >>> len(lead_beside(lay, 0, 1, "over-top-layer"))                 # the top layer, back to the start
    3
    """
    top = layout.layers - 1
    own = _own_turn(layout, strand, which)
    if which == 0:
        if route == "through-form":
            return np.array([], dtype=int)
        if route != "start-flange":
            raise ValueError(f"a start lead's route is one of {', '.join(START_ROUTES)}, got {route!r}")
        if layout.layers == 1:
            return np.array([], dtype=int)   # nothing above: it rises where it starts
        cross = _between(layout, 0, layout.z[own], towards_start=True)
        ends = [_end_turn(layout, lay, True) for lay in range(1, layout.layers)]
        return np.unique(np.concatenate([cross, np.asarray(ends, dtype=int)])).astype(int)
    z_own = layout.z[own]
    if route == "end-flange":
        return np.array([], dtype=int)       # lifted out of the top layer where it ends
    back = _between(layout, top, z_own, towards_start=True)
    if route in ("over-top-layer", "back-over-winding"):
        return back.astype(int)
    if route == "down-start-flange":
        ends = [_end_turn(layout, lay, True) for lay in range(top)]
        return np.unique(np.concatenate([back, np.asarray(ends, dtype=int)])).astype(int)
    raise ValueError(f"a finish lead's route is one of {', '.join(FINISH_ROUTES + JOINT_ROUTES[:1])}, "
                     f"got {route!r}")


def lead_routes(layout: Layout, joins, terminals, routes=None, hookup: str = "") -> list[Lead]:
    """Every lead of the winding with its route and the turns it touches.

    Parameters
    ----------
    layout : Layout
        The winding.
    joins : list of list of str
        The hookup's joins, e.g. ``[["A.finish", "B.start"]]``.
    terminals : list of str
        The two terminal ends.
    routes : dict or None
        ``{"start": …, "finish": …, "joint": …}``; missing keys take
        :func:`default_routes`.
    hookup : str
        Hookup name; ``"separate"`` brings every end out as a terminal.

    Returns
    -------
    leads : list of Lead
        One per strand end; none on a toroid (every end leaves at the gap).

    References
    ----------
    Lead dress and joint placement of layer windings, common practice.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 2, 20, layers=1)
    >>> leads = lead_routes(lay, [["A.finish", "B.start"]], ["A.start", "B.finish"])
    >>> [(x.end, x.route, len(x.beside)) for x in leads]
    [('A.start', 'start-flange', 0), ('A.finish', 'back-over-winding', 38), ('B.start', 'start-flange', 0), ('B.finish', 'end-flange', 0)]
    """
    if layout.kind == "toroid":
        return []
    chosen = {**default_routes(layout.layers), **(routes or {})}
    joint_of = {}
    for group in joins or []:
        ends = [str(e) for e in group]
        kinds = {_parse_end(e)[1] for e in ends}
        for e in ends:
            joint_of[e] = (" + ".join(ends), kinds == {0, 1})
    out = []
    for s in range(layout.strands):
        for which, name in ((0, "start"), (1, "finish")):
            end = f"{'ABCD'[s]}.{name}"
            joint, series = joint_of.get(end, (None, False))
            if which == 0:
                route = chosen["start"]
            elif series:
                route = chosen["joint"]
            elif joint is not None:
                route = "end-flange"   # finishes joined where they lie
            else:
                route = chosen["finish"]
            out.append(Lead(end=end, strand=s, which=which, route=route, joint=joint,
                            beside=lead_beside(layout, s, which, route),
                            at_start_end=which == 1 and layout.layers % 2 == 0 and layout.sections == 1,
                            at_last_wall=which == 1 and layout.sections > 1 and layout.layers_per_section[-1] % 2 == 0,
                            bundle=lead_bundle(layout, s, which, route)))
    return out
