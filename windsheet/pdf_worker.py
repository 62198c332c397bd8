"""A PDF renderer that loads WeasyPrint in a second process while this one sizes the order.

WeasyPrint's import (Pango, HarfBuzz, fontconfig through cffi) costs about as
much CPU as importing and running the engine, and the two do not depend on
each other.  On a machine with more than one core, ``windsheet traveller``
forks this worker first; the worker imports WeasyPrint while the command
reads, sizes and writes the HTML, and then lays out the PDF.  The result is
the same bytes :func:`windsheet.sheet_pdf.render_pdf` gives in process.
"""

from __future__ import annotations

import contextlib
import os


def _serve(conn) -> None:
    """The worker: import WeasyPrint at once, then render each HTML page it is sent."""
    try:
        from .sheet_pdf import _weasyprint, render_pdf

        _weasyprint()
        while True:
            html = conn.recv()
            if html is None:
                return
            try:
                conn.send((True, render_pdf(html)))
            except Exception as exc:  # handed back, raised in the command
                conn.send((False, exc))
    except (EOFError, KeyboardInterrupt, BrokenPipeError):
        return


class PdfWorker:
    """``worker(html) -> pdf bytes``, rendered in a forked process that pre-loaded WeasyPrint."""

    def __init__(self):
        import multiprocessing

        ctx = multiprocessing.get_context("fork")
        self._conn, child = ctx.Pipe()
        self._proc = ctx.Process(target=_serve, args=(child,), daemon=True, name="windsheet-pdf")
        self._proc.start()
        child.close()
        self._used = False

    def __call__(self, html: str) -> bytes:
        self._used = True
        try:
            self._conn.send(html)
            ok, payload = self._conn.recv()
        except (EOFError, OSError):
            # The worker died (killed, out of memory): render here rather than lose the sheet.
            from .sheet_pdf import render_pdf

            return render_pdf(html)
        if not ok:
            raise payload
        return payload

    def close(self) -> None:
        if not self._used:
            self._proc.terminate()  # nothing to render (a refused order): do not wait for the import
        with contextlib.suppress(OSError):
            self._conn.send(None)
            self._conn.close()
        self._proc.join(timeout=5)
        if self._proc.is_alive():
            self._proc.kill()
            self._proc.join()


@contextlib.contextmanager
def pdf_renderer(wanted: bool):
    """A PDF renderer for one sheet: the forked worker where it pays, else the in-process one.

    It pays when a PDF is wanted, the machine has a second core and ``fork``
    exists (Linux, macOS).  ``WINDSHEET_PDF_WORKER=0`` turns it off.
    """
    from .sheet_pdf import render_pdf

    if not (wanted and (os.cpu_count() or 1) > 1 and hasattr(os, "fork")
            and os.environ.get("WINDSHEET_PDF_WORKER", "1") != "0"):
        yield render_pdf
        return
    worker = PdfWorker()
    try:
        yield worker
    finally:
        worker.close()
