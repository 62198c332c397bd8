"""Whether a sized design may be issued: a failing design check refuses it unless forced.

Its own module (standard library only) so that recording an issue (``register --issue``)
does not load the sheets; the traveller's renderers take the same functions.
"""

from __future__ import annotations

from windsheet.common.errors import InputError


def check_issuable(design, force: bool = False) -> None:
    """Refuse to issue a traveller whose insulation or thermal check fails, unless forced."""
    ins = design.insulation
    if ins is not None and ins.verdict == "fail" and not force:
        why = "; ".join(str(r) for r in ins.reasons) or "see the insulation check"
        raise InputError("insulation", f"insulation check fails ({why}); "
                         "not issued — fix the order, or issue with --force")
    thermal = design.thermal
    if thermal is not None and thermal.verdict == "fail" and not force:
        # Enamel run over its thermal class ages fast: as much a fail as a voltage it cannot hold.
        raise InputError("duty.current", f"thermal check fails ({thermal.reason}); "
                         "not issued — lower the current, use a heavier wire or a higher thermal class, "
                         "or issue with --force")


def check_transformer_issuable(design, force: bool = False) -> None:
    """Refuse to issue a transformer whose design check fails, unless forced."""
    if design.state.state == "failing" and not force:
        why = "; ".join(design.state.reasons) or "see the insulation between windings"
        raise InputError("windings", f"a design check fails ({why}); not issued — fix the order, or issue with --force")
