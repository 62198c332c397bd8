"""The printable sheets: the traveller and the sign-off sheet, HTML and PDF.

The chain: the design (:class:`windsheet.design.model.Design`) → a context of words and rows
(:mod:`windsheet.sheets.traveller_sheet`, :mod:`windsheet.sheets.procedure`,
:mod:`windsheet.sheets.signoff_sheet`) → HTML by Jinja2 → PDF by WeasyPrint
(:mod:`windsheet.sheets.sheet_pdf`).  Nothing here computes physics.
"""

from __future__ import annotations

from pathlib import Path

from windsheet.common.errors import InputError
from windsheet.design.issuable import check_issuable  # noqa: F401  (re-exported: scripts and tests read it here)
# The formatters and the context builders are re-exported: scripts and tests read them here.
from windsheet.common.fmt import eng, length, mass  # noqa: F401
from .procedure import procedure_steps  # noqa: F401
from .sheet_pdf import (PAPER_SIZES, TEMPLATES_DIR, _page_size, _stylesheet, environment,  # noqa: F401
                        farad, henry, hertz, joule, ohm, render_pdf, templates_only_fetcher, volt)
from .signoff_sheet import SIGNOFF_SECTIONS, measured_text, signoff_context  # noqa: F401
from .traveller_sheet import (DEFERRAL, SECTIONS, cautions, duty_rows, form_rows,  # noqa: F401
                              insulation_rows, pick_list, qc_items, traveller_context)

#: The CLI's ``--units`` words: metric; imperial (inches and °F only); both (inches and °F first, mm and °C beside).
UNIT_SYSTEMS = ("imperial", "metric", "both")


def _units(design, units: str | None) -> str:
    """The sheet's unit system: as the order was written, unless ``--units`` says otherwise."""
    if units is None:
        return "imperial" if design.sheet_units == "imperial" else "metric"
    key = str(units).strip().lower()
    if key not in UNIT_SYSTEMS:
        raise InputError("--units", f"expected imperial, metric or both, got {units!r}")
    return key


def render_traveller_html(prediction, paper: str = "a4", forced: bool = False,
                          templates_dir: Path = TEMPLATES_DIR, units: str | None = None) -> str:
    """The traveller for one order as a standalone HTML document.

    Parameters
    ----------
    prediction : windsheet.design.model.Design
        What ``windsheet.design.build.build_design`` returns.
    paper : {"a4", "letter"}
    forced : bool
        The sheet was issued with ``--force`` over a failing insulation check;
        printed prominently on the first page.
    units : {None, "metric", "imperial", "both"}
        Millimetres and °C; inches and °F (``imperial``); or inches and °F
        first with millimetres and °C beside them (``both``); by default as
        the order was written (``design.sheet_units``).
    """
    from windsheet.common.fmt import IMPERIAL

    token = IMPERIAL.set(_units(prediction, units))
    try:
        env = environment(templates_dir)
        ctx = traveller_context(prediction, forced=forced)
        ctx.update(page_size=_page_size(paper), paper=str(paper).lower(),
                   stylesheet=_stylesheet(templates_dir), sections=SECTIONS)
        return env.get_template("traveller.html.j2").render(**ctx)
    finally:
        IMPERIAL.reset(token)


def order_files(path) -> list[Path]:
    """The order files a path names: the file itself, or a folder's ``*.yaml`` orders.

    Measured-values files (``*.measured.yaml``) in the folder are not orders.
    """
    path = Path(path)
    if path.is_dir():
        found = sorted(q for q in path.iterdir()
                       if q.suffix.lower() in (".yaml", ".yml") and q.is_file()
                       and not q.name.lower().endswith((".measured.yaml", ".measured.yml")))
        if not found:
            raise InputError(str(path), "no order files (*.yaml) in this folder")
        return found
    if not path.is_file():
        raise InputError(str(path), "no such order file or folder")
    return [path]


def traveller(prediction, paper: str = "a4", forced: bool = False,
              units: str | None = None) -> tuple[str, bytes]:
    """HTML and PDF of one traveller."""
    html = render_traveller_html(prediction, paper=paper, forced=forced, units=units)
    return html, render_pdf(html)


def render_signoff_html(prediction, signoff_result: dict, paper: str = "a4",
                        templates_dir: Path = TEMPLATES_DIR, units: str | None = None,
                        qc_chart_svg: str | None = None) -> str:
    """The sign-off sheet (measured against predicted, diagnosis, verdict) as HTML.

    ``signoff_result`` is what :func:`windsheet.qc.signoff.evaluate_signoff` returns;
    ``qc_chart_svg`` the family's control chart (:mod:`windsheet.sheets.control_chart`), if any.
    """
    from windsheet.common.fmt import IMPERIAL

    token = IMPERIAL.set(_units(prediction, units))
    try:
        return _signoff_html(prediction, signoff_result, paper, templates_dir, qc_chart_svg)
    finally:
        IMPERIAL.reset(token)


def _svg_data_url(svg: str) -> str:
    import base64

    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode("utf-8")).decode("ascii")


def _signoff_html(prediction, signoff_result, paper, templates_dir, qc_chart_svg=None):
    env = environment(templates_dir)
    ctx = signoff_context(prediction, signoff_result)
    ctx.update(page_size=_page_size(paper), paper=str(paper).lower(),
               stylesheet=_stylesheet(templates_dir), sections=SIGNOFF_SECTIONS,
               qc_chart=_svg_data_url(qc_chart_svg) if qc_chart_svg else None)
    return env.get_template("signoff.html.j2").render(**ctx)


__all__ = ["render_traveller_html", "render_signoff_html", "render_pdf", "traveller",
           "check_issuable", "order_files", "eng", "SECTIONS", "SIGNOFF_SECTIONS", "PAPER_SIZES",
           "procedure_steps", "cautions", "qc_items"]
