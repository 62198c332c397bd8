"""What every command shares: one-line refusals, numbers for the terminal, JSON out."""

from __future__ import annotations

import functools
import json

import typer

from windsheet.common import fmt
from windsheet.common.errors import InputError


def guarded(fn):
    """Turn an InputError into one line on stderr and exit status 2."""
    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        try:
            return fn(*args, **kwargs)
        except InputError as exc:
            typer.echo(f"windsheet: {exc}", err=True)
            raise typer.Exit(2) from None
    return wrapper


def internal_fault(exc: Exception) -> str:
    """An unexpected fault in one file of a batch, in one line: a bug to report, but the
    batch goes on to its other files and its summary line."""
    text = " ".join(str(exc).split())[:160]
    return f"internal error, not a fault of this file ({type(exc).__name__}: {text}); please report it"


def eng(value, unit: str, digits: int = 4) -> str:
    """A number with an SI prefix for the terminal: ``eng(6.12e-5, 'H') == '61.20 µH'``."""
    return fmt.eng(value, unit, sig=digits, sep=" ")


def count(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def to_json(obj) -> str:
    return json.dumps(obj, indent=2, ensure_ascii=False, allow_nan=False, default=str)


def say_repairs(reg):
    for line in getattr(reg, "repairs", []) or []:
        typer.echo(f"windsheet: {line}", err=True)
