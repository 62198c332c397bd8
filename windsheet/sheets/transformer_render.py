"""A transformer's traveller as HTML (and PDF through :func:`windsheet.sheets.sheet_pdf.render_pdf`)."""

from __future__ import annotations

from pathlib import Path

from windsheet.design.issuable import check_transformer_issuable  # noqa: F401  (re-exported)

from .sheet_pdf import TEMPLATES_DIR, _page_size, _stylesheet, environment


def render_transformer_html(design, paper: str = "a4", forced: bool = False,
                            templates_dir: Path = TEMPLATES_DIR, units: str | None = None) -> str:
    """The traveller of a transformer order as one standalone HTML document."""
    from windsheet.common.fmt import IMPERIAL

    from .render import _units
    from .transformer_sheet import SECTIONS, transformer_context

    token = IMPERIAL.set(_units(design, units))
    try:
        env = environment(templates_dir)
        ctx = transformer_context(design, forced=forced)
        ctx.update(page_size=_page_size(paper), paper=str(paper).lower(), stylesheet=_stylesheet(templates_dir),
                   sections=SECTIONS)
        return env.get_template("transformer.html.j2").render(**ctx)
    finally:
        IMPERIAL.reset(token)
