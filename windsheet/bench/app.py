"""The bench page as a Starlette application (``windsheet bench``).

Security model: the register path is the server's (fixed at start, never named
by a client); on any address but loopback every request carries a token (query
``?token=`` once, then a cookie); every form post carries a CSRF token matching
its cookie (double submit) and a same-origin ``Origin`` when the browser sends
one; bodies over :data:`MAX_BODY_BYTES` are refused; every page is rendered
with Jinja2 autoescaping; a fault shows as a message, never a traceback.
"""

from __future__ import annotations

import asyncio
import csv
import functools
import datetime as _dt
import hmac
import io
import re
import secrets
import time
from concurrent.futures import ThreadPoolExecutor
from urllib.parse import urlsplit

import yaml
from starlette.applications import Starlette
from starlette.concurrency import run_in_threadpool
from starlette.exceptions import HTTPException
from starlette.requests import Request
from starlette.responses import HTMLResponse, JSONResponse, RedirectResponse, Response
from starlette.routing import Route

from windsheet.common.errors import InputError
from windsheet.bench import service
from .page import cell_texts, job_view, preview_unit, signoff_document, unit_summary
from .readings import JOB_FIELDS, form_fields, is_unit_field, qc_rows, readings_csv_rows

MAX_BODY_BYTES = 64 * 1024
TOKEN_COOKIE = "ws_bench_token"
CSRF_COOKIE = "ws_bench_csrf"
#: The inspector's name in this browser: read back on every page and download (not a secret; the page's
#: own script sets it as it is typed, a form post sets it too).
INSPECTOR_COOKIE = "ws_bench_inspector"
_STATIC = {"bench.js": "text/javascript", "bench.css": "text/css"}


class _TooLarge(HTTPException):
    def __init__(self):
        super().__init__(413, f"request body over {MAX_BODY_BYTES // 1024} KiB refused")


class BodyLimit:
    """Refuse request bodies over ``limit`` bytes, declared or streamed."""

    def __init__(self, app, limit: int = MAX_BODY_BYTES):
        self.app, self.limit = app, limit

    async def __call__(self, scope, receive, send):
        if scope["type"] != "http":
            return await self.app(scope, receive, send)
        for name, value in scope.get("headers") or []:
            if name == b"content-length" and (not value.isdigit() or int(value) > self.limit):
                return await _plain(send, 413, "request body too large")
        seen = 0

        async def limited():
            nonlocal seen
            message = await receive()
            seen += len(message.get("body", b""))
            if seen > self.limit:
                raise _TooLarge()
            return message
        await self.app(scope, limited, send)


class TokenGate:
    """Every request must carry the server's token (when one is set)."""

    def __init__(self, app, token: str | None):
        self.app, self.token = app, token

    async def __call__(self, scope, receive, send):
        if scope["type"] != "http" or not self.token:
            return await self.app(scope, receive, send)
        request = Request(scope)
        given = (request.query_params.get("token") or request.headers.get("x-bench-token")
                 or request.cookies.get(TOKEN_COOKIE) or "")
        if not hmac.compare_digest(given.encode(), self.token.encode()):
            return await _plain(send, 403, "this bench page needs its access token: open the address "
                                           "printed when windsheet bench started")
        if "token" in request.query_params and request.method == "GET":
            # Trade the token in the address for a cookie, so it leaves the address bar.
            resp = RedirectResponse(request.url.remove_query_params("token"), status_code=303)
            resp.set_cookie(TOKEN_COOKIE, self.token, httponly=True, samesite="strict")
            return await resp(scope, receive, send)
        await self.app(scope, receive, send)


async def _plain(send, status: int, text: str):
    body = text.encode()
    await send({"type": "http.response.start", "status": status,
                "headers": [(b"content-type", b"text/plain; charset=utf-8"),
                            (b"content-length", str(len(body)).encode())]})
    await send({"type": "http.response.body", "body": body})


def create_app(register_path, token: str | None = None, allowed_hosts=None) -> Starlette:
    """The bench application over the register at ``register_path`` (fixed for its life).

    ``allowed_hosts`` limits the ``Host`` a request may name (on loopback: the loopback
    names, so a page of another site rebinding its name to 127.0.0.1 is refused).
    """
    from windsheet.sheets.render import TEMPLATES_DIR, environment

    env = environment()
    env.filters["job_key"] = job_key
    register_path = str(register_path)

    def render(name: str, request: Request, status: int = 200, inspector=None, **ctx) -> HTMLResponse:
        csrf = request.cookies.get(CSRF_COOKIE) or secrets.token_urlsafe(24)
        html = env.get_template(name).render(csrf=csrf, inspector=inspector or _inspector(request), **ctx)
        resp = HTMLResponse(html, status_code=status)
        resp.headers["Content-Security-Policy"] = ("default-src 'self'; script-src 'self'; "
                                                   "style-src 'self'; frame-ancestors 'none'")
        resp.headers["X-Content-Type-Options"] = "nosniff"
        if request.cookies.get(CSRF_COOKIE) != csrf:
            resp.set_cookie(CSRF_COOKIE, csrf, httponly=True, samesite="strict")
        return resp

    # One thread owns the register connection: opening a register checks the whole file,
    # too much to do on every keystroke, and SQLite connections stay in their thread.
    worker = ThreadPoolExecutor(max_workers=1, thread_name_prefix="bench-register")
    held = {"reg": None}

    def _in_worker(fn, *args):
        if held["reg"] is None:
            held["reg"] = service.open_bench_register(register_path)
        try:
            return fn(held["reg"], *args)
        except BaseException as exc:
            if not isinstance(exc, (InputError, HTTPException)) or getattr(exc, "path", None) == register_path:
                # A fault of the register itself: open it afresh next time.
                held["reg"].close()
                held["reg"] = None
            raise

    async def with_register(fn, *args):
        return await asyncio.get_running_loop().run_in_executor(worker, functools.partial(_in_worker, fn, *args))

    async def check_post(request: Request) -> dict:
        origin = request.headers.get("origin")
        if origin and urlsplit(origin).netloc != request.headers.get("host"):
            raise HTTPException(403, "form posted from another site refused")
        form = await request.form()
        cookie = request.cookies.get(CSRF_COOKIE) or ""
        given = request.headers.get("x-csrf-token") or form.get("csrf") or ""
        if not cookie or not hmac.compare_digest(str(given).encode(), cookie.encode()):
            raise HTTPException(403, "form expired or not from this page: reload the page and enter again")
        return form

    # -- pages ---------------------------------------------------------------------

    async def job_list(request: Request):
        q = request.query_params
        filters = {k: (q.get(k) or "").strip()[:80] or None for k in ("state", "customer", "since")}
        page = max(1, _int(q.get("page") or "1"))
        try:
            jobs, total = await with_register(service.jobs, page, filters["state"], filters["customer"],
                                              filters["since"])
        except InputError as exc:  # the listing's refusal names its option; here it is the form's field
            raise InputError(exc.path.lstrip("-"), exc.message) from None
        pages = max(1, -(-total // service.JOBS_PER_PAGE))
        from urllib.parse import urlencode

        def page_url(n):
            return "/?" + urlencode({**{k: v for k, v in filters.items() if v}, "page": n})
        return render("bench_jobs.html.j2", request, jobs=jobs, total=total, page=page, pages=pages,
                      filters=filters, states=("issued", "passed", "failed", "incomplete"),
                      prev_url=page_url(page - 1) if page > 1 else None,
                      next_url=page_url(page + 1) if page < pages else None)

    def _job_context(reg, number, messages=(), signed=None):
        state, prediction = service.issued(reg, number)
        drafts = service.load_drafts(reg, number, state["revision"])
        view = job_view(prediction, state, drafts, service.issued_order_text(reg, state))
        last = service.latest_signoff(reg, number, state["revision"])
        return {"job": prediction.job, "state": state, "view": view,
                "design": service.design_status(prediction), "messages": list(messages),
                "last": last, "signed": signed}

    async def job_page(request: Request):
        number = job_number(request.path_params["number"])
        ctx = await with_register(_job_context, number)
        return render("bench_job.html.j2", request, **ctx)

    def _save_form(reg, number, form, who):
        state, prediction = service.issued(reg, number)
        serials = list(state["units"])
        drafts = service.load_drafts(reg, number, state["revision"])
        messages = []
        for name, value in form.multi_items():
            if not name.startswith("r:"):
                continue
            _, where, field = name.split(":", 2) if name.count(":") >= 2 else ("", "", "")
            serial = _serial_at(serials, where)
            if serial is None or not _field_ok(serial, field, prediction):
                messages.append(f"unknown field {name[:60]!r} ignored")
                continue
            old = drafts.get((serial, field), {"value": "", "version": 0})
            if str(value).strip() == old["value"]:
                continue
            seen = _int(form.get(f"v:{where}:{field}"))
            try:
                service.save_draft(reg, number, state["revision"], serial, field, str(value), seen, who)
            except InputError as exc:
                messages.append(str(exc))
        return _job_context(reg, number, messages or ["saved"])

    async def job_post(request: Request):
        form = await check_post(request)
        number = job_number(request.path_params["number"])
        who = str(form.get("inspector") or "").strip()[:200] or None
        if form.get("action") == "signoff":
            ctx = await with_register(_save_then_signoff, number, form, who)
        else:
            ctx = await with_register(_save_form, number, form, who)
        return _keep_inspector(render("bench_job.html.j2", request, inspector=who, **ctx), who)

    def _save_then_signoff(reg, number, form, who):
        ctx = _save_form(reg, number, form, who)
        if any(m != "saved" for m in ctx["messages"]):
            return ctx
        return _signoff(reg, number, who)

    def _signoff(reg, number, who):
        if not who:
            return _job_context(reg, number, ["name the inspector before signing off"])
        state, prediction = service.issued(reg, number)
        drafts = service.load_drafts(reg, number, state["revision"])
        today = _dt.datetime.now(_dt.timezone.utc).date().isoformat()
        doc = signoff_document(prediction, state, drafts, who, today)
        if not doc["units"]:
            return _job_context(reg, number, ["no readings entered yet: nothing to sign off"])
        try:
            result = service.evaluate(prediction, doc, inspector=who,
                                      order_text=service.issued_order_text(reg, state))
            service.record(reg, state, doc, result, who)
        except InputError as exc:
            return _job_context(reg, number, [f"not signed off: {_unit_words(str(exc), doc)}"])
        return _job_context(reg, number, [f"signed off: {result['verdict'].upper()}, "
                                          f"{result['units_passed']} of {len(result['units'])} units passed"],
                            signed=result)

    async def field_post(request: Request):
        """Save one field and return the verdicts of its unit (the script's as-you-type path)."""
        form = await check_post(request)
        number = job_number(request.path_params["number"])
        where, field = str(form.get("unit") or ""), str(form.get("field") or "")
        value, seen = str(form.get("value") or ""), _int(form.get("version"))
        who = str(form.get("inspector") or "").strip()[:200] or None
        body = await with_register(_save_one, number, where, field, value, seen, who)
        return _keep_inspector(JSONResponse(body, status_code=409 if body.get("stale") else 200), who)

    def _save_one(reg, number, where, field, value, seen, who):
        state, prediction = service.issued(reg, number)
        serials = list(state["units"])
        serial = _serial_at(serials, where)
        if serial is None or not _field_ok(serial, field, prediction):
            raise HTTPException(400, "unknown unit or field: this job's form has no such field")
        out = {"stale": False, "message": ""}
        try:
            out["version"] = service.save_draft(reg, number, state["revision"], serial, field, value,
                                                seen, who)
        except service.StaleSave as exc:
            out.update(stale=True, message=str(exc), version=exc.current["version"],
                       value=exc.current["value"])
        except InputError as exc:
            out["message"] = str(exc)
        drafts = service.load_drafts(reg, number, state["revision"])
        rows = qc_rows(prediction, service.required_lines(prediction))
        job_entries = {f: d["value"] for (s, f), d in drafts.items() if s == ""}
        order_text = service.issued_order_text(reg, state)
        targets = range(len(serials)) if serial == "" else [serials.index(serial)]
        units = {}
        for i in targets:
            entries = {f: d["value"] for (s, f), d in drafts.items() if s == serials[i]}
            pv = preview_unit(prediction, state["revision"], job_entries, serials[i], entries, order_text)
            units[str(i)] = {"cells": cell_texts(pv, rows), "summary": unit_summary(pv)}
        out["units"] = units
        # The one worker computes views in turn: a larger number is a view that holds every earlier
        # save. Microseconds of the clock, so a restarted server still counts upward.
        held["seq"] = out["seq"] = max(int(time.time() * 1e6), held.get("seq", 0) + 1)
        return out

    # -- downloads -------------------------------------------------------------------

    def _pdf(reg, number):
        state, prediction = service.issued(reg, number)
        last = service.latest_signoff(reg, number, state["revision"])
        if last is None:
            raise InputError("job", f"job {number} rev {state['revision']} has not been signed off yet")
        return prediction, last

    async def signoff_pdf(request: Request):
        number = job_number(request.path_params["number"])
        prediction, last = await with_register(_pdf, number)
        # Rendered outside the register's thread: saves go on meanwhile.
        data = await run_in_threadpool(service.signoff_sheet_pdf, prediction, last)
        return _attachment(data, "application/pdf", number, "-signoff.pdf")

    def _document(reg, number, who):
        """The job's saved entries as a measured-values document."""
        state, prediction = service.issued(reg, number)
        drafts = service.load_drafts(reg, number, state["revision"])
        return signoff_document(prediction, state, drafts, who, None)

    def _csv(reg, number, who):
        """The readings in the sign-off's CSV form: ``windsheet signoff ORDER this.csv`` reads it."""
        return _csv_text(readings_csv_rows(_document(reg, number, who)))

    def _drafts_csv(reg, number):
        """Every saved entry with its version, who saved it and when."""
        state, _ = service.issued(reg, number)
        drafts = service.load_drafts(reg, number, state["revision"])
        rows = [["job", "revision", "serial", "field", "reading", "version", "saved_by", "saved_at"]]
        for (serial, field), d in sorted(drafts.items()):
            rows.append([number, state["revision"], serial or "(job)", field, d["value"], d["version"],
                         d["saved_by"] or "", d["saved_at"]])
        return _csv_text(rows)

    async def readings_csv(request: Request):
        number = job_number(request.path_params["number"])
        who = (request.query_params.get("inspector") or "").strip()[:200] or _inspector(request)
        text = await with_register(_csv, number, who)
        return _attachment(text, "text/csv; charset=utf-8", number, "-readings.csv")

    async def drafts_csv(request: Request):
        number = job_number(request.path_params["number"])
        text = await with_register(_drafts_csv, number)
        return _attachment(text, "text/csv; charset=utf-8", number, "-entries.csv")

    def _yaml(reg, number, who):
        return yaml.safe_dump(_document(reg, number, who), sort_keys=False, allow_unicode=True)

    async def measured_yaml(request: Request):
        number = job_number(request.path_params["number"])
        who = (request.query_params.get("inspector") or "").strip()[:200] or _inspector(request)
        text = await with_register(_yaml, number, who)
        return _attachment(text, "application/yaml; charset=utf-8", number, ".measured.yaml")

    async def static(request: Request):
        name = request.path_params["name"]
        if name not in _STATIC:
            raise HTTPException(404, "no such file")
        return Response((TEMPLATES_DIR / name).read_bytes(), media_type=_STATIC[name])

    # -- faults as messages ----------------------------------------------------------

    async def on_input_error(request: Request, exc: InputError):
        # A fault of the register file itself (locked, damaged) is the server's, not the request's.
        return render("bench_error.html.j2", request, status=503 if exc.path == register_path else 400,
                      message=str(exc))

    async def on_http(request: Request, exc: HTTPException):
        if request.url.path.endswith("/field"):
            return JSONResponse({"message": exc.detail, "units": {}}, status_code=exc.status_code)
        return render("bench_error.html.j2", request, status=exc.status_code, message=exc.detail)

    async def on_fault(request: Request, exc: Exception):
        return HTMLResponse("<!DOCTYPE html><title>fault</title><p>windsheet bench hit an internal fault; "
                            "nothing was recorded by this request. Reload the page.</p>", status_code=500)

    routes = [
        Route("/", job_list),
        Route("/job/{number}", job_page),
        Route("/job/{number}", job_post, methods=["POST"]),
        Route("/job/{number}/field", field_post, methods=["POST"]),
        Route("/job/{number}/signoff.pdf", signoff_pdf),
        Route("/job/{number}/readings.csv", readings_csv),
        Route("/job/{number}/entries.csv", drafts_csv),
        Route("/job/{number}/measured.yaml", measured_yaml),
        Route("/static/{name}", static),
    ]
    app = Starlette(routes=routes, exception_handlers={InputError: on_input_error, HTTPException: on_http,
                                                       Exception: on_fault})
    app.add_middleware(BodyLimit)
    app.add_middleware(TokenGate, token=token)
    if allowed_hosts:
        from starlette.middleware.trustedhost import TrustedHostMiddleware

        app.add_middleware(TrustedHostMiddleware, allowed_hosts=list(allowed_hosts))
    return app


def _inspector(request: Request):
    """The inspector this browser named (its cookie), or None."""
    from urllib.parse import unquote

    name = unquote(request.cookies.get(INSPECTOR_COOKIE) or "").strip()[:200]
    return name if name and all(ord(c) >= 32 for c in name) else None


def _keep_inspector(resp: Response, who) -> Response:
    from urllib.parse import quote

    if who:
        resp.set_cookie(INSPECTOR_COOKIE, quote(who, safe=""), max_age=365 * 24 * 3600, samesite="strict")
    return resp


_KEY_SAFE = frozenset("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789._-")


def job_key(number: str) -> str:
    """A job number as one path segment of the bench's addresses: ``HL/0410`` is ``HL~2F0410``.

    A ``/`` (allowed in a job number) cannot stand in a path segment even as ``%2F``,
    which the server decodes before routing; every character but letters, digits and
    ``. _ -`` is written ``~XX`` (its UTF-8 bytes in hex), and ``~`` is never in a job number.

    >>> job_key("HL/0410"), job_number(job_key("HL/0410")), job_key("HL-0412")
    ('HL~2F0410', 'HL/0410', 'HL-0412')
    """
    return "".join(c if c in _KEY_SAFE else "".join(f"~{b:02X}" for b in c.encode()) for c in str(number))


def job_number(key: str) -> str:
    """The job number a :func:`job_key` stands for (a malformed key gives a number no job has)."""
    try:
        return re.sub(rb"(?:~[0-9A-F]{2})+", lambda m: bytes.fromhex(m.group().replace(b"~", b"").decode()),
                      key.encode()).decode("utf-8")
    except (UnicodeError, ValueError):
        return key


def _serial_at(serials: list, where: str):
    if where == "job":
        return ""
    if where.isdigit() and int(where) < len(serials):
        return serials[int(where)]
    return None


def _field_ok(serial: str, field: str, prediction) -> bool:
    """A job-wide field, or a unit field of this job's own form (its strands, pairs and lines)."""
    if serial == "":
        return field in JOB_FIELDS
    return is_unit_field(field) and field in form_fields(prediction)


def _int(value) -> int:
    text = str(value or "0")
    return int(text) if text.isdigit() and len(text) < 12 else -1


def _attachment(body, media_type: str, number: str, suffix: str) -> Response:
    """A download named after the job (only safe characters reach the header)."""
    return Response(body, media_type=media_type,
                    headers={"Content-Disposition": f'attachment; filename="{_safe(number)}{suffix}"'})


def _safe(number: str) -> str:
    return "".join(c if c.isalnum() or c in "-_." else "_" for c in number)[:80]


def _csv_text(rows) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    for row in rows:
        w.writerow([_cell(str(c)) for c in row])
    return buf.getvalue()


def _cell(text: str) -> str:
    # A spreadsheet runs a cell starting with = + - @ as a formula, also after a tab, a carriage
    # return or leading spaces (OWASP, CSV injection); a quote mark makes it text.
    first = text.lstrip(" \t\r\n")[:1]
    return "'" + text if first in ("=", "+", "-", "@") or text[:1] in ("\t", "\r", "\n") else text


def _unit_words(message: str, doc: dict) -> str:
    """``units[1].terminals...`` said with the unit's serial number."""
    for i, u in enumerate(doc.get("units") or []):
        message = message.replace(f"units[{i}]", u["serial"])
    return message
