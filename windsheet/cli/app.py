"""The ``windsheet`` command line: ``windsheet size | traveller | signoff | register | demo | wires | bench``.

Results go to stdout, diagnostics to stderr.  A fault in the user's input is
one line on stderr and exit status 2; nothing is written.
"""

from __future__ import annotations


import typer

from . import bench_cmd, records_cmd, register_cmd, schema_cmd, signoff_cmd, size_cmd, tables_cmd, traveller_cmd


def _typer() -> typer.Typer:
    return typer.Typer(add_completion=False, no_args_is_help=True, pretty_exceptions_enable=False,
                       rich_markup_mode=None,  # plain usage errors: a few lines, no boxes
                       context_settings={"help_option_names": ["-h", "--help"]})


app = _typer()


def _show_version(value: bool):
    if value:
        from windsheet import __version__

        typer.echo(f"windsheet {__version__}")
        raise typer.Exit(0)


@app.callback()
def _root(version: bool = typer.Option(False, "--version", is_eager=True, callback=_show_version,
                                       help="Print the version and exit.")):
    """Job sheets for coil winding: size an order, print its traveller, sign off the units.

    Exit status: 0 done (and every verdict a pass or marginal), 1 a verdict short of that
    (an insulation FAIL from size, a unit not passed at sign-off) or a batch with a refused
    order, 2 bad input (one line on stderr names the field or file; nothing is written).
    """


# Each command module adds its own commands; none imports this module back.
_MODULES = (size_cmd, traveller_cmd, signoff_cmd, register_cmd, records_cmd, tables_cmd, schema_cmd, bench_cmd)
for _commands in _MODULES:
    _commands.register(app)

# The module that adds each command (a test holds this equal to what the modules register).
COMMAND_MODULES = {"size": size_cmd, "traveller": traveller_cmd, "demo": traveller_cmd, "signoff": signoff_cmd,
                   "readings-form": signoff_cmd, "register": register_cmd, "materials": records_cmd,
                   "report": records_cmd, "wires": tables_cmd, "schema": schema_cmd, "bench": bench_cmd}


def app_for(argv: list[str]) -> typer.Typer:
    """The command line for one run: only the commands of the module named first in ``argv``.

    typer turns every registered command's signature into click parameters on each run (about
    20 ms for all eleven); a run needs only its own.  Anything else (``--help``, ``--version``,
    a misspelt command) gets the whole ``app``, so help and usage errors read as before.
    """
    module = COMMAND_MODULES.get(argv[0]) if argv else None
    if module is None:
        return app
    one = _typer()
    one.callback()(_root)
    module.register(one)
    return one


def main():  # console-script entry point
    import os
    import sys

    # windsheet uses no pydantic plugins; without this, pydantic scans every
    # installed distribution's entry points when it builds the first model.
    os.environ.setdefault("PYDANTIC_DISABLE_PLUGINS", "__all__")
    if os.environ["PYDANTIC_DISABLE_PLUGINS"] == "__all__":
        _no_pydantic_plugins()
    try:
        app_for(sys.argv[1:])()
    except SystemExit as exc:
        leave(exc.code)
    except OSError as exc:
        leave(output_fault(exc))
    leave(0)


#: A write to standard output that fails for these is the output's fault, not a bug.
_OUTPUT_ERRNOS = frozenset({"EPIPE", "ENOSPC", "EIO", "EDQUOT", "EFBIG"})


def output_fault(exc: OSError) -> int:
    """Standard output that cannot be written: one line on stderr (none for a reader that went
    away, as ``head`` does), status 1; anything else is re-raised as the bug it is."""
    import errno
    import os
    import sys

    if exc.filename is not None or errno.errorcode.get(exc.errno) not in _OUTPUT_ERRNOS:
        raise exc
    try:
        # Nothing more reaches the closed or full output, and Python's own flush at exit stays quiet.
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
    except (OSError, ValueError):
        pass
    if not isinstance(exc, BrokenPipeError):
        try:
            sys.stderr.write(f"windsheet: cannot write the output: {exc.strerror}\n")
        except (OSError, ValueError):
            pass
    return 1


def leave(code) -> None:
    """Exit with ``code`` without tearing the interpreter down.

    Freeing every module and object at exit takes 50–80 ms once numpy and pydantic are
    loaded: a fifth of a short command, for nothing anyone sees. The exit handlers still
    run (the PDF worker's close, temporary folders, logging) and both streams are flushed
    first. A non-integer status, another thread still running, or a stream that cannot be
    flushed (a closed pipe) leaves the usual way, with Python's own handling.
    """
    import atexit
    import os
    import sys

    if code is None:
        code = 0
    if not isinstance(code, int) or isinstance(code, bool):
        raise SystemExit(code)
    threading = sys.modules.get("threading")
    if threading is not None and any(t.is_alive() and not t.daemon and t is not threading.main_thread()
                                     for t in threading.enumerate()):
        raise SystemExit(code)
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):
        raise SystemExit(code) from None  # before the handlers, so they run once, Python's way
    atexit._run_exitfuncs()  # CPython's own exit-handler runner (unlisted, stable since 3.0)
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):
        code = code or 120  # what Python itself exits with when it cannot flush at exit
    os._exit(code & 0xFF)


def _no_pydantic_plugins() -> None:
    """Stand in for pydantic's plugin loader, which finds no plugins when they are all disabled.

    The loader imports ``importlib.metadata`` (and with it the ``email`` package) before it
    reads the switch: about 15 ms of every command that builds a model, for nothing.
    The stand-in answers as the loader does when ``PYDANTIC_DISABLE_PLUGINS=__all__``;
    ``tests/test_startup_imports.py`` holds that ``size`` then loads no ``importlib.metadata``
    and still works.
    """
    import sys
    import types

    if "pydantic.plugin._loader" in sys.modules:
        return
    loader = types.ModuleType("pydantic.plugin._loader", "windsheet: pydantic plugins disabled (__all__)")
    loader.PYDANTIC_ENTRY_POINT_GROUP = "pydantic"
    loader.get_plugins = lambda: ()
    sys.modules["pydantic.plugin._loader"] = loader
