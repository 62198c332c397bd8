"""Writing the sheets: the Jinja2 environment, number formats for people, WeasyPrint.

Shared by the traveller and the sign-off sheet.  WeasyPrint (and Pango) load
on first use only: start-up time is part of the product.
"""

from __future__ import annotations

from pathlib import Path
from urllib.parse import unquote, urlsplit

import jinja2
from markupsafe import Markup

from windsheet.common.errors import InputError
from windsheet.common.fmt import OHM, celsius, eng, length, mass, percent

def _templates_dir() -> Path:
    """The templates folder: inside the installed package, else the source tree's.

    The wheel maps the top-level ``templates/`` into ``windsheet/templates``
    (pyproject ``package-dir``); an editable install reads the folder in place.
    """
    from importlib.resources import files

    packaged = files("windsheet") / "templates"
    if packaged.is_dir():
        return Path(str(packaged)).resolve()
    return Path(__file__).resolve().parents[2] / "templates"


TEMPLATES_DIR = _templates_dir()

#: Page sizes by the CLI's ``--paper`` word; CSS ``@page size`` keywords.
PAPER_SIZES = {"a4": "A4", "letter": "letter"}

def henry(v):
    return eng(v, "H")


def ohm(v):
    return eng(v, OHM)


def farad(v):
    return eng(v, "F", sig=3)


def hertz(v):
    return eng(v, "Hz", sig=3)


def volt(v, sig=3):
    return eng(v, "V", sig=sig)


def joule(v):
    return eng(v, "J", sig=3)


def band(lo, hi, fmt) -> str:
    """An accept band ``55.08 – 67.32 µH``, written with one formatter."""
    if lo is None and hi is None:
        return "—"
    return f"{fmt(lo)} – {fmt(hi)}"


def thermal_class(c) -> str:
    """A thermal class (IEC 60085 names classes by their °C): ``155 °C``, or ``class 155 (311 °F)``."""
    if not c:
        return "—"
    from windsheet.common.fmt import system

    return celsius(c) if system() == "metric" else f"class {int(c)} ({celsius(c)})"


FILTERS = {
    "eng": eng, "distance": length, "mass": mass, "percent": percent, "celsius": celsius,
    "thermal_class": thermal_class, "henry": henry, "ohm": ohm, "farad": farad, "hertz": hertz, "volt": volt, "joule": joule,
}


# --- the Jinja2 environment and WeasyPrint ---------------------------------------

def environment(templates_dir: Path = TEMPLATES_DIR) -> jinja2.Environment:
    """Jinja2 with autoescape on for every template: order text prints as text."""
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir)),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
    )
    env.filters.update(FILTERS)
    return env


def _weasyprint():
    import weasyprint  # noqa: deferred: Pango loads on first use only

    return weasyprint


def templates_only_fetcher(templates_dir: Path = TEMPLATES_DIR):
    """A WeasyPrint URL fetcher that serves files under ``templates_dir`` only.

    The network, and every file outside the templates folder, is refused; a
    ``data:`` URL (content already in the document) is passed through.
    """
    urls = _weasyprint().urls
    root = Path(templates_dir).resolve()

    class TemplatesOnlyFetcher(urls.URLFetcher):
        def fetch(self, url, headers=None):
            scheme = urlsplit(url).scheme.lower()
            if scheme == "data":
                return super().fetch(url, headers)
            if scheme != "file":
                raise ValueError(f"refused to fetch {url!r}: the traveller loads no network resources")
            path = Path(unquote(urlsplit(url).path)).resolve()
            if not path.is_relative_to(root) or not path.is_file():
                raise ValueError(f"refused to fetch {url!r}: outside the templates folder")
            return urls.URLFetcherResponse(url, path.read_bytes())

    return TemplatesOnlyFetcher()


def lay_out(html: str, templates_dir: Path = TEMPLATES_DIR):
    """Lay a sheet's HTML out into pages with WeasyPrint: the document its PDF is drawn from."""
    wp = _weasyprint()
    return wp.HTML(string=html, base_url=str(Path(templates_dir).resolve()) + "/",
                   url_fetcher=templates_only_fetcher(templates_dir)).render()


def render_pdf(html: str, templates_dir: Path = TEMPLATES_DIR) -> bytes:
    """Render traveller HTML to PDF bytes with WeasyPrint."""
    return lay_out(html, templates_dir).write_pdf()


def _stylesheet(templates_dir: Path) -> Markup:
    # Inlined so the HTML file stands alone; it is our own file, not order text.
    return Markup((Path(templates_dir) / "print.css").read_text(encoding="utf-8"))


def _page_size(paper: str) -> str:
    key = str(paper).strip().lower()
    if key not in PAPER_SIZES:
        raise InputError("--paper", f"expected one of {', '.join(PAPER_SIZES)}, got {paper!r}")
    return PAPER_SIZES[key]



#: Characters the running header's left box holds on one line (8.5 pt bold on
#: A4, the narrower paper); the part name is clipped to what is left.
HEADER_CHARS = 58


def header_part(job, forced: bool = False) -> str:
    """The part name as the running header prints it: clipped so the header keeps to one line."""
    part = str(job.part or "")
    room = HEADER_CHARS - len(str(job.number or "")) - 5 - (17 if forced else 0)
    return part if len(part) <= room else part[:max(room - 1, 8)].rstrip() + "…"
