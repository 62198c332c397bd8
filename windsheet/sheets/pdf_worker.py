"""A PDF renderer that loads WeasyPrint in a second process while this one sizes the order.

WeasyPrint's import (Pango, HarfBuzz, fontconfig through cffi) costs about as
much CPU as importing and running the engine, and the two do not depend on
each other.  On a machine with more than one core, ``windsheet traveller``
forks this worker first; the worker imports WeasyPrint while the command
reads, sizes and writes the HTML, and then lays out the PDF.  The result is
the same bytes :func:`windsheet.sheets.sheet_pdf.render_pdf` gives in process.
"""

from __future__ import annotations

import contextlib
import os


#: How often the worker looks whether its parent is still there (where no parent-death signal exists). [s]
WATCHDOG_PERIOD_S = 0.5


def die_with_parent(parent_pid: int) -> None:
    """Make this (forked) worker end when the command that forked it ends, however it ends
    (the PDF worker, and the batch's worker processes as their initializer).

    On Linux the kernel sends SIGKILL at the parent's death (``prctl(PR_SET_PDEATHSIG)``);
    elsewhere, and as a second guard, a daemon thread watches the parent's PID.  A parent
    already gone before either was set up is caught by the first look.
    """
    import signal
    import sys
    import threading

    if sys.platform.startswith("linux"):
        try:
            import ctypes

            PR_SET_PDEATHSIG = 1
            ctypes.CDLL(None, use_errno=True).prctl(PR_SET_PDEATHSIG, int(signal.SIGKILL), 0, 0, 0)
        except (OSError, AttributeError):
            pass

    def watch():
        import time

        while os.getppid() == parent_pid:
            time.sleep(WATCHDOG_PERIOD_S)
        os._exit(0)

    if os.getppid() != parent_pid:
        os._exit(0)
    threading.Thread(target=watch, name="windsheet-pdf-watchdog", daemon=True).start()


def _detach_from_caller() -> None:
    # The worker writes nothing to the terminal: it must not hold the caller's stdin,
    # stdout and stderr (a pipe the caller waits on would never see its end).
    try:
        null = os.open(os.devnull, os.O_RDWR)
    except OSError:
        return
    for fd in (0, 1, 2):
        try:
            os.dup2(null, fd)
        except OSError:
            pass
    os.close(null)


def _serve(conn, parent_end=None, parent_pid: int | None = None) -> None:
    """The worker: import WeasyPrint at once, then render each HTML page it is sent."""
    if parent_end is not None:
        # The fork copied the parent's end of the pipe too: holding it, the worker would
        # never see end-of-file when the parent dies.
        parent_end.close()
    if parent_pid is not None:
        die_with_parent(parent_pid)
        _detach_from_caller()
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
        self._proc = ctx.Process(target=_serve, args=(child, self._conn, os.getpid()), daemon=True,
                                 name="windsheet-pdf")
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


def _worker_pays() -> bool:
    return ((os.cpu_count() or 1) > 1 and hasattr(os, "fork")
            and os.environ.get("WINDSHEET_PDF_WORKER", "1") != "0")


#: A worker started by :func:`start_early`, waiting for :func:`pdf_renderer` to take it.
_early: PdfWorker | None = None

#: Options of ``traveller`` that take a value (the value is not an order).
_VALUE_OPTIONS = {"-o", "--out", "--format", "--paper", "--units", "--jobs", "--register"}


def wants_one_pdf(argv: list[str]) -> bool:
    """Whether a command line asks for one traveller PDF (a guess made before parsing).

    ``argv`` is ``sys.argv[1:]``.  A wrong guess costs only a worker that is
    stopped unused.

    Examples
    --------
    >>> wants_one_pdf(["traveller", "hl.yaml", "-o", "hl.pdf"])
    True
    >>> wants_one_pdf(["traveller", "hl.yaml", "-o", "hl.html"])
    False
    >>> wants_one_pdf(["traveller", "a.yaml", "b.yaml", "-o", "out"])
    False
    """
    if not argv or argv[0] != "traveller":
        return False
    orders, out, fmt, it = [], "", "", iter(argv[1:])
    for a in it:
        name = a.split("=", 1)[0]
        if name in _VALUE_OPTIONS:
            value = a.split("=", 1)[1] if "=" in a else next(it, "")
            out = value if name in ("-o", "--out") else out
            fmt = value if name == "--format" else fmt
        elif a in ("--html", "-h", "--help"):
            return False
        elif not a.startswith("-") or a == "-":
            orders.append(a)
    if len(orders) != 1 or any(c in orders[0] for c in "*?[") or os.path.isdir(orders[0]):
        return False
    if fmt:
        return fmt.strip().lower() == "pdf"
    return not out.lower().endswith((".html", ".htm", ".json")) and not os.path.isdir(out)


def start_early(argv: list[str]) -> None:
    """Fork the PDF worker at once, before the command line is parsed, when one PDF is wanted.

    WeasyPrint's import then runs while this process imports the CLI and sizes
    the order: about 0.2 s sooner than forking once the command is known.
    """
    global _early
    if _early is None and _worker_pays() and wants_one_pdf(argv):
        _early = PdfWorker()
        import atexit

        atexit.register(_close_early)


def _close_early() -> None:
    global _early
    if _early is not None:
        _early.close()
        _early = None


@contextlib.contextmanager
def pdf_renderer(wanted: bool):
    """A PDF renderer for one sheet: the forked worker where it pays, else the in-process one.

    It pays when a PDF is wanted, the machine has a second core and ``fork``
    exists (Linux, macOS).  ``WINDSHEET_PDF_WORKER=0`` turns it off.  A worker
    forked by :func:`start_early` is taken over.
    """
    global _early
    from .sheet_pdf import render_pdf

    worker, _early = _early, None
    if not (wanted and _worker_pays()):
        if worker is not None:
            worker.close()
        yield render_pdf
        return
    worker = worker or PdfWorker()
    try:
        yield worker
    finally:
        worker.close()
