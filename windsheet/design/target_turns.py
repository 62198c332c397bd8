"""Turns for a target inductance: bracket the target between two whole turn counts.

Each count tried is one sizing pass (:mod:`windsheet.design.sizing`); the passes
share their filament kernels, and a secant on log L against log N finds the
bracket in a handful of passes.
"""

from __future__ import annotations

import math

from windsheet.common import fmt
from windsheet.design import sizing
from windsheet.common.errors import InputError
from windsheet.order.document import Order

#: Most turns per strand sized, as for an order's winding.turns.
MAX_TURNS = 100_000


def _estimate_turns(values, target):
    """Turns per strand estimated to give the target, from the counts sized so far.

    ``values`` maps counts tried to their terminal inductance (``None``: not
    sized).  Terminal inductance grows about as a power of the turns, so the
    estimate is a secant on log L against log N through the two sized counts
    nearest the target; with one count only the power is taken as 2.
    """
    sized = sorted((n for n, v in values.items() if v is not None),
                   key=lambda n: abs(math.log(values[n] / target)))
    a = sized[0]
    power = 2.0
    if len(sized) > 1:
        b = sized[1]
        if values[b] != values[a]:
            power = min(4.0, max(0.5, math.log(values[b] / values[a]) / math.log(b / a)))
    return a * (target / values[a]) ** (1.0 / power)


def _bracket_turns(inductance_at, target, start=10, max_turns=MAX_TURNS):
    """Adjacent whole turn counts ``lo``, ``lo + 1`` either side of the target.

    ``inductance_at(n)`` gives the terminal inductance at ``n`` turns per
    strand, or ``None`` when ``n`` turns cannot be sized (they do not fit,
    or exceed the work budget).  Inductance rises with the turns, so counts
    that overshoot and counts that cannot be sized bound the search from
    above.  A secant in log-log takes a handful of evaluations, each kept
    inside the bracket; after eight the search halves the bracket instead.

    Returns
    -------
    lo, hi : int or None
        Largest count tried at or below the target (``None``: even one turn
        overshoots) and the smallest tried above it or not sizable.
    values : dict
        Every count tried and its inductance (``None``: not sized). [H]
    need : float or None
        Set when the search stopped because the target needs at least ``hi``
        turns, which cannot be sized, or more than ``max_turns``: the
        estimated turns per strand.
    """
    values, lo, hi, n = {}, None, None, max(1, min(start, max_turns))
    for step in range(200):
        v = values[n] = inductance_at(n)
        if v is None or v > target:
            hi = n if hi is None else min(hi, n)
        else:
            lo = n if lo is None else max(lo, n)
        if hi == 1 or (lo is not None and hi is not None and hi - lo == 1):
            break
        if all(x is None for x in values.values()):
            n = max(1, hi // 2)                       # nothing sized yet: look lower
            continue
        guess = _estimate_turns(values, target)
        if (hi is None and guess > max_turns) or (hi is not None and values[hi] is None and guess >= hi):
            return lo, hi, values, guess
        if step >= 8 and lo is not None and hi is not None:
            n = (lo + hi) // 2
        else:
            n = int(round(guess))
            n = max(n, lo + 1) if lo is not None else n
            n = min(n, hi - 1) if hi is not None else n
            n = max(1, min(n, max_turns))
    return lo, hi, values, None


def solve_turns(order: Order, wire):
    """Turns per strand for the order's target inductance.

    Brackets the target between two adjacent whole turn counts (a few
    evaluations of the engine, sharing their kernels) and takes the nearer
    by log error.  A target
    that no whole count meets within the order's inductance tolerance is
    refused, naming the nearest counts and what they give.
    """
    target = order.doc.winding.target_inductance
    tol = order.doc.tolerances.inductance
    errors = {}
    kernels = {}                 # one form and wire throughout: steps share their kernels

    def inductance_at(n):
        try:
            got = sizing.terminal_inductance(order, wire, n, kernels)
        except InputError as exc:
            errors[n] = exc
            return None
        if got <= 0:
            raise InputError("hookup", "this hookup has no net inductance; a target inductance cannot be met")
        return got

    lo, hi, values, need = _bracket_turns(inductance_at, target)
    if need is not None and hi is None:
        raise InputError("winding.target_inductance", f"needs about {need:.0f} turns per strand, more than the "
                         f"{MAX_TURNS} windsheet sizes: choose a larger form, a core, or a smaller target")
    candidates = {k: values[k] for k in (lo, hi) if k is not None and values.get(k) is not None}
    if not candidates:
        raise errors[hi]                                   # not even one turn can be sized
    best = min(candidates, key=lambda k: abs(math.log(candidates[k] / target)))
    if abs(candidates[best] / target - 1) > tol:
        if hi in errors:                                   # the turns needed cannot be sized
            raise InputError(errors[hi].path, f"needs {hi} or more turns per strand: {errors[hi].message}")
        raise InputError("winding.target_inductance", _unreachable(target, tol, lo, hi, values))
    exact = best * math.sqrt(target / candidates[best])
    return best, {"inductance_H": target, "turns_exact": exact, "turns_chosen": best,
                  "inductance_at_chosen_H": candidates[best],
                  "error": candidates[best] / target - 1, "fits": True}


def _unreachable(target, tol, lo, hi, values):
    """Why no whole turn count meets the target, with the nearest counts' values."""
    def henry(x, trim=False):
        return fmt.eng(x, "H", trim=trim, sep=" ")

    band = "±" + fmt.percent(tol).replace(fmt.NBSP, " ")
    if lo is None:
        near = f"the fewest, 1 turn, gives {henry(values[1])}"
    else:
        near = f"{lo} turn{'s give' if lo > 1 else ' gives'} {henry(values[lo])}, {hi} turns {henry(values[hi])}"
    return (f"{henry(target, trim=True)} cannot be met in whole turns within the {band} inductance tolerance: "
            f"{near}. Give a target within {band} of a whole-turn value, widen the tolerance, "
            "or change the form or wire")
