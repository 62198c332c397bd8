"""``windsheet schema prediction``: the JSON Schema of ``windsheet size --json``."""

from __future__ import annotations

import typer

from windsheet.common.errors import InputError

from .common import guarded

#: The documents whose schema the command prints.
DOCUMENTS = ("prediction", "transformer")


def register(app: typer.Typer) -> None:
    """Add ``schema`` to the command line."""
    app.command("schema")(schema_cmd)


@guarded
def schema_cmd(document: str = typer.Argument(..., help="Which document: prediction (the JSON of size --json "
                                              "for a coil) or transformer (for a transformer order).")):
    """Print the JSON Schema (draft 2020-12) of a document windsheet writes."""
    if document.strip().lower() not in DOCUMENTS:
        raise InputError("schema", f"expected one of {', '.join(DOCUMENTS)}, got {document!r}")
    from windsheet.design.schema import schema_text

    typer.echo(schema_text(document.strip().lower()), nl=False)
