"""Size any order: a coil's :class:`~windsheet.design.model.Design` or a transformer's
:class:`~windsheet.design.transformer_model.TransformerDesign`."""

from __future__ import annotations

import datetime as _dt


def size_any(order, today: _dt.date | None = None, remedies: bool = True):
    """The design of a coil order, or of a transformer order."""
    from windsheet.order.document import Order

    # A coil order is an Order; anything else read by order.reader is a transformer's, whose
    # models are not built unless one is sized (start-up is part of the product).
    if not isinstance(order, Order):
        from .transformer_build import build_transformer

        return build_transformer(order, today)
    from .build import build_design

    return build_design(order, today, remedies=remedies)


def is_transformer_design(design) -> bool:
    return getattr(design, "schema_", "") == "windsheet.transformer/1"
