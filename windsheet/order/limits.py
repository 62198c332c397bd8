"""Work budgets: the largest jobs windsheet takes on, stated in one place.

An order beyond a budget is refused up front, with a one-line
:class:`~windsheet.common.errors.InputError` at the field to change, rather than
run for minutes.  Each budget is set so that any accepted order sizes in a
few seconds on a 2-core machine (measured in ``make bench``,
``benchmarks/bench_engine.py``).  Budgets for other steps (sheets: pages,
units) belong here too.
"""

from __future__ import annotations

from windsheet.common.errors import InputError

#: Engine work budget, in turns per strand × layers × strands.  The filament
#: engine evaluates about half that many Maxwell kernels (one per distinct
#: pair of radius and axial distance): about 1 s at the budget.  For scale,
#: 200 layers × 5,000 turns × 4 strands is 4,000,000.
ENGINE_WORK = 10_000_000

#: Turns in all (turns per strand × strands).  The voltage and capacitance
#: steps look at every turn's neighbours, about 25 µs a turn on a multilayer
#: winding: about 2.5 s at the budget.
TURNS_IN_ALL = 100_000

_FEWER_LAYERS = "fewer layers (a longer traverse, or a finer wire, puts more turns in each layer)"


def engine_work(turns: int, layers: int, strands: int) -> int:
    """Work of sizing one winding: turns per strand × layers × strands. [1]"""
    return int(turns) * int(layers) * int(strands)


def check_turns_in_all(turns: int, strands: int, path: str) -> None:
    """Refuse a winding of more than :data:`TURNS_IN_ALL` turns, before it is laid out.

    Parameters
    ----------
    turns, strands : int
        Turns per strand and strands wound together. [1]
    path : str
        YAML path of the field the refusal names (``winding.turns`` or
        ``winding.target_inductance``).

    Raises
    ------
    InputError
        When ``turns × strands`` is over the budget.

    Examples
    --------
    >>> check_turns_in_all(25_000, 4, "winding.turns")           # 100,000: at the budget
    >>> check_turns_in_all(100_000, 4, "winding.turns")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    windsheet.common.errors.InputError: winding.turns: 400000 turns in all (100000 per strand x 4 strands) is more ...
    """
    total = int(turns) * int(strands)
    if total > TURNS_IN_ALL:
        raise InputError(path, (
            f"{total} turns in all ({turns} per strand x {strands} strands) is more than the "
            f"{TURNS_IN_ALL:,} windsheet sizes: fewer turns per strand (a core, or a larger form, gives "
            "more inductance per turn) or fewer strands"))


def check_engine_work(turns: int, layers: int, strands: int, path: str) -> None:
    """Refuse a layout beyond :data:`ENGINE_WORK`, saying what to change.

    Parameters
    ----------
    turns, layers, strands : int
        Turns per strand, layers laid out, strands wound together. [1]
    path : str
        YAML path of the field the refusal names.

    Raises
    ------
    InputError
        When ``turns × layers × strands`` is over the budget.

    Examples
    --------
    >>> check_engine_work(5000, 200, 4, "winding.turns")         # 4,000,000: within budget
    >>> check_engine_work(20_000, 200, 4, "winding.turns")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    windsheet.common.errors.InputError: winding.turns: 20000 turns x 200 layers x 4 strand(s) is 16,000,000 of work ...
    """
    work = engine_work(turns, layers, strands)
    if work > ENGINE_WORK:
        raise InputError(path, (
            f"{turns} turns x {layers} layers x {strands} strand(s) is {work:,} of work (turns x layers x "
            f"strands), more than the {ENGINE_WORK:,} windsheet sizes: {_FEWER_LAYERS}, fewer strands "
            "or fewer turns"))


#: Units (serial numbers) one job may have: ``job.quantity`` is at most this.
JOB_UNITS = 1000

#: Units on one printed sheet (a traveller's QC record, a sign-off sheet).  Four
#: units fill a QC table: a 100-unit traveller is about 32 pages, 13 s and 265 MB
#: on a busy 2-core machine (250 units: 21 s, 460 MB).  A larger job is issued in lots.
SHEET_UNITS = 100


def check_sheet_units(units: int, path: str = "job.quantity", sheet: str = "traveller") -> None:
    """Refuse a sheet for more than :data:`SHEET_UNITS` units, saying what to change.

    Parameters
    ----------
    units : int
        Units (serial numbers) the sheet would list. [1]
    path : str
        YAML path of the field the refusal names.
    sheet : str
        Which sheet, for the message.

    Examples
    --------
    >>> check_sheet_units(100)
    >>> check_sheet_units(1000)  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    windsheet.common.errors.InputError: job.quantity: a traveller for 1000 units is more than the 100 ...
    """
    if int(units) > SHEET_UNITS:
        raise InputError(path, (
            f"a {sheet} for {units} units is more than the {SHEET_UNITS} one sheet holds: "
            f"issue the job in lots of at most {SHEET_UNITS} units"))
