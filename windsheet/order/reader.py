"""Any order from its YAML: a coil (one ``winding``) or a transformer (a list of ``windings``)."""

from __future__ import annotations

import os

from .document import MAX_ORDER_BYTES, parse_order, read_limited, read_yaml_bytes


def is_transformer(raw) -> bool:
    """Whether an order's mapping is a transformer's (it lists ``windings``)."""
    return isinstance(raw, dict) and "windings" in raw


def parse_any_order(data: bytes, path: str | None = None):
    """A validated :class:`~windsheet.order.document.Order` or
    :class:`~windsheet.order.transformer.TransformerOrder`, as the document is written."""
    raw = read_yaml_bytes(data, "order", label=path or "order")
    if is_transformer(raw):
        # The transformer's models are built only for a transformer order: start-up is part of the product.
        from .transformer import parse_transformer

        return parse_transformer({str(k): v for k, v in raw.items()}, data, path)
    return parse_order(data, path, raw)  # parsed once, above


def load_any_order(path):
    """Read and validate the order at ``path``, coil or transformer."""
    return parse_any_order(read_limited(path, MAX_ORDER_BYTES), os.fspath(path))
