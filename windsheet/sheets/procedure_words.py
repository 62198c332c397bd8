"""Small pieces of the procedure's wording, shared by its parts."""

from __future__ import annotations

from .sheet_pdf import thermal_class, volt


def step(title, detail="", record=()):
    """One step of the procedure: its title, how, and what is written down."""
    return {"title": title, "detail": detail, "record": list(record)}


def strand_list(ids) -> str:
    """``A``, ``A and B``, ``A, B and C``."""
    ids = list(ids)
    if len(ids) <= 1:
        return "".join(ids)
    return ", ".join(ids[:-1]) + " and " + ids[-1]


def initial(text: str) -> str:
    return text[:1].upper() + text[1:]


def sleeving_spec(p) -> str:
    """The sleeving every lead takes: its voltage rating (the design's least) and thermal class."""
    rating = p.connections.sleeving_rating_Vpk
    tc = p.wire.thermal_class_C if p.wire else None
    parts = []
    if rating:
        # A least rating is rounded up, never down, to the three figures printed.
        import math

        step = 10.0 ** (math.floor(math.log10(rating)) - 2)
        parts.append(f"rated at least {volt(math.ceil(rating / step - 1e-9) * step)} peak")
    if tc:
        parts.append(f"thermal class {thermal_class(tc)} or above")
    return ", ".join(parts)


def sleeve_words(p, ends, when: str) -> str:
    """Sleeve these leads now, as they are laid against turns: how many turns, at what voltage."""
    spec = sleeving_spec(p)
    each = "; ".join(f"{e.name} lies against {e.crosses_turns} turn{'s' if e.crosses_turns != 1 else ''}"
                     f"{' and other leads' if _beside_leads(p, e.name) else ''}, "
                     f"up to {volt(e.lead_Vpk)} peak" for e in ends)
    one = len(ends) == 1
    return (f"Slide sleeving{f' ({spec})' if spec else ''} over {'this lead' if one else 'these leads'} now, "
            f"{when}: {each}. The same piece runs on to its terminal or over its joint.")


def _beside_leads(p, end: str) -> bool:
    """Whether this end's lead also lies beside other leads (lead against lead, from the design)."""
    return any(lead.lead == end and lead.beside_leads for lead in p.leads)
