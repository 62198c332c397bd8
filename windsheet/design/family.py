"""The family a design belongs to in the shop's QC statistics (standard library only)."""

from __future__ import annotations

_STRANDS_WORD = {1: "single-strand", 2: "bifilar", 3: "trifilar", 4: "quadrifilar"}


def family_of(prediction: dict) -> tuple[str, str]:
    """The family a job belongs to: same form (kind, size, material), wire family, strands and hookup.

    Returns
    -------
    key, label : str
        A stable key and the readable name, e.g. ``bifilar series-aiding on 50 mm glass-epoxy tube``.

    Examples
    --------
    >>> family_of({"form": {"kind": "cylinder", "diameter_m": 0.05, "material": "glass-epoxy tube"},
    ...            "wire": {"conductor": "copper", "standard": "IEC 60317-0-1"},
    ...            "winding": {"strands": 2}, "hookup": {"name": "series-aiding"}})[1]
    'bifilar series-aiding on 50 mm glass-epoxy tube, copper IEC 60317-0-1'
    """
    f = prediction.get("form") or {}
    w = prediction.get("wire") or {}
    strands = int((prediction.get("winding") or {}).get("strands") or len(prediction.get("strands") or []) or 1)
    hookup = (prediction.get("hookup") or {}).get("name") or "custom hookup"
    size = f.get("diameter_m") or f.get("outer_diameter_m") or f.get("mean_turn_length_m")
    size_text = f"{size * 1e3:g} mm " if size else ""
    if size_text.strip() in str(f.get("material") or ""):
        size_text = ""  # the material already names its size
    word = _STRANDS_WORD.get(strands, f"{strands}-strand")
    wire_family = f"{w.get('conductor') or 'copper'} {w.get('standard') or ''}".strip()
    label = f"{word} {hookup if strands > 1 else ''}".strip() + \
        f" on {size_text}{f.get('material') or f.get('kind') or 'form'}, {wire_family}"
    key = "|".join(str(x) for x in (f.get("kind"), size, f.get("material"), w.get("conductor"),
                                     w.get("standard"), strands, hookup))
    return key, label
