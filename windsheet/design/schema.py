"""The JSON Schema of the design (``windsheet size --json``), as committed beside this module.

``windsheet schema prediction`` prints it; ``prediction.schema.json`` in this folder is
the same text, and a test fails when the model and the committed file differ, so a
change of the JSON is always a deliberate, reviewed one.
"""

from __future__ import annotations

import json
from importlib import resources

SCHEMA_FILE = "prediction.schema.json"
#: The documents ``windsheet schema`` prints, and the committed file of each.
SCHEMA_FILES = {"prediction": SCHEMA_FILE, "transformer": "transformer.schema.json"}


def prediction_schema(document: str = "prediction") -> dict:
    """The JSON Schema (draft 2020-12) of a coil's :class:`windsheet.design.model.Design`
    (``prediction``) or of a :class:`windsheet.design.transformer_model.TransformerDesign`
    (``transformer``), from the model."""
    if document == "transformer":
        from .transformer_model import TRANSFORMER_SCHEMA as name
        from .transformer_model import TransformerDesign as model
    else:
        from .model import SCHEMA as name
        from .model import Design as model
    schema = model.model_json_schema(by_alias=True, mode="serialization")
    return {"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": f"urn:{name}", **schema}


def schema_text(document: str = "prediction") -> str:
    """The schema as the committed file holds it: indented, keys in the model's order, one final newline."""
    return json.dumps(prediction_schema(document), indent=2, ensure_ascii=False) + "\n"


def committed_schema_text(document: str = "prediction") -> str:
    """The schema file shipped with the package."""
    return resources.files("windsheet.design").joinpath(SCHEMA_FILES[document]).read_text(encoding="utf-8")
