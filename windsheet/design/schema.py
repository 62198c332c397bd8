"""The JSON Schema of the design (``windsheet size --json``), as committed beside this module.

``windsheet schema prediction`` prints it; ``prediction.schema.json`` in this folder is
the same text, and a test fails when the model and the committed file differ, so a
change of the JSON is always a deliberate, reviewed one.
"""

from __future__ import annotations

import json
from importlib import resources

SCHEMA_FILE = "prediction.schema.json"


def prediction_schema() -> dict:
    """The JSON Schema (draft 2020-12) of :class:`windsheet.design.model.Design`, from the model."""
    from .model import SCHEMA, Design

    schema = Design.model_json_schema(by_alias=True, mode="serialization")
    return {"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": f"urn:{SCHEMA}", **schema}


def schema_text() -> str:
    """The schema as the committed file holds it: indented, keys in the model's order, one final newline."""
    return json.dumps(prediction_schema(), indent=2, ensure_ascii=False) + "\n"


def committed_schema_text() -> str:
    """The schema file shipped with the package."""
    return resources.files("windsheet.design").joinpath(SCHEMA_FILE).read_text(encoding="utf-8")
