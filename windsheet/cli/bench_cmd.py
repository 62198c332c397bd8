"""``windsheet bench``: the bench page's server command and its address and token rules."""

from __future__ import annotations

from typing import Optional

import typer

from .common import guarded
from windsheet.common.errors import InputError


def register(app: typer.Typer) -> None:
    """Add ``bench`` to the command line."""
    app.command("bench")(bench_cmd)


# ---------------------------------------------------------------- the bench page
LOOPBACK_HOSTS = ("127.0.0.1", "localhost", "::1")


def bench_address(host: str, port: int, token: Optional[str]) -> str:
    """The address to open, with the token when there is one."""
    shown = f"[{host}]" if ":" in host else host
    return f"http://{shown}:{port}/" + (f"?token={token}" if token else "")


def bench_token(host: str, token: Optional[str], token_given: bool) -> Optional[str]:
    """The access token the server will demand: none on loopback unless given, else given or new."""
    import secrets

    if token_given:
        token = (token or "").strip()
        if len(token) < 16 or not token.isascii() or not token.isprintable() or " " in token:
            raise InputError("--token", "expected at least 16 printable characters, no spaces")
        return token
    if host in LOOPBACK_HOSTS:
        return None
    return secrets.token_urlsafe(24)


@guarded
def bench_cmd(register: Optional[str] = typer.Option(None, "--register", help="Register file (default "
                                                     "$WINDSHEET_REGISTER, else ./windsheet-register.db)."),
              host: str = typer.Option("127.0.0.1", "--host", help="Address to listen on; anything but "
                                       "loopback needs a token (one is made and printed unless --token)."),
              port: int = typer.Option(8765, "--port", help="Port to listen on (0: any free port)."),
              token: Optional[str] = typer.Option(None, "--token", help="Access token every request must "
                                                  "carry (at least 16 characters).")):
    """Serve the bench page: enter readings in a browser, see each line's verdict, sign off."""
    from windsheet.records.register import resolve_register_path

    path = resolve_register_path(register)
    secret = bench_token(host, token, token is not None)
    if host not in LOOPBACK_HOSTS and not secret:  # pragma: no cover - bench_token always makes one
        raise InputError("--host", "a non-loopback address needs a token")
    if not 0 <= port <= 65535:
        raise InputError("--port", "expected a port number from 0 to 65535")
    from windsheet.bench.service import open_bench_register

    open_bench_register(path).close()  # a missing or foreign register is refused before listening
    import socket

    import uvicorn

    from windsheet.bench.app import create_app

    family = socket.AF_INET6 if ":" in host else socket.AF_INET
    sock = socket.socket(family, socket.SOCK_STREAM)
    sock.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
    try:
        sock.bind((host, port))
        sock.listen(128)  # listening before the address is printed
    except OSError as exc:
        sock.close()
        raise InputError("--port", f"cannot listen on {host}:{port}: {exc.strerror or exc}") from None
    actual = sock.getsockname()[1]
    typer.echo(f"windsheet bench: register {path}", err=True)
    typer.echo(f"windsheet bench: open {bench_address(host, actual, secret)}  (Ctrl-C stops)", err=True)
    # On loopback without a token, only loopback names: refuses a rebound outside name.
    hosts = None if secret else ["127.0.0.1", "localhost", "::1", "[::1]"]
    config = uvicorn.Config(create_app(path, token=secret, allowed_hosts=hosts), log_level="warning",
                            access_log=False,
                            server_header=False)
    server = uvicorn.Server(config)
    server.run(sockets=[sock])
