"""The explorer's local web server: a Starlette application over an :class:`~.session.Explorer`.

Routes (every one needs the run's token, as the ``token`` query parameter or ``Authorization: Bearer TOKEN``;
without it the answer is 403):

- ``GET /``: the page; ``GET /static/<file>``: its own script and style sheet (fixed names, no path from the
  client reaches the file system);
- ``GET /api/assays``: the loaded crudes and the starting cut set;
- ``POST /api/cut`` ``{"assay": NAME, "ends": {CUT: TEMP_C}, "rate_bbl_per_day": RATE}`` (the rate optional):
  the ``yields --json`` object;
- ``POST /api/worth`` (same body): worth and margin, with ``--prices``;
- ``POST /api/cutset`` ``{"ends": {...}}``: the cut set as a TOML file;
- ``POST /api/cutset/read`` ``{"file": NAME, "toml": TEXT}``: the cut points of a cut-set file the user loads;
- ``POST /api/report`` (same body as /api/cut): the yield-report workbook (.xlsx).

Every answer carries a Content-Security-Policy that allows only the page's own script and style, no framing,
no referrer and no caching.  Bodies are JSON, at most :data:`MAX_BODY_BYTES`; a bad one gets a 4xx with
``{"error": "one line"}``.  Only Host headers naming the loopback address are served (no DNS rebinding).
"""

from __future__ import annotations

import asyncio
import hmac
import json
from importlib import resources

from ..errors import AssaycutError
from .session import Explorer, RequestError, parse_cut_request

MAX_BODY_BYTES = 16_384
"""Largest request body accepted (a cut request of 100 cuts with long names is about 10 kB). [bytes]"""
HEADER_TIMEOUT_S = 5.0
"""Time a connection has to send a request's headers, from its first byte (or from connecting) [s]; a slower one
is closed, so that unfinished requests cannot hold the server's connections."""
BODY_TIMEOUT_S = 5.0
"""Time a request has to send its body [s]; a slower one gets 408."""
SHUTDOWN_TIMEOUT_S = 2.0
"""Longest wait for requests in progress when the explorer is stopped [s]."""
MAX_CONNECTIONS = 64
"""Connections served at once; more get 503 (common practice for a one-user local server, no source)."""
ALLOWED_HOSTS = ("127.0.0.1", "localhost")
"""Host names the server answers to (it listens on 127.0.0.1 only)."""
SCRIPTS = ("explorer.js", "chart.js", "panels.js", "views.js")
"""The page's scripts, loaded in this order (plain scripts sharing one scope; explorer.js starts the page once
the document is read)."""
STATIC_FILES = {**{name: "text/javascript; charset=utf-8" for name in SCRIPTS},
                "explorer.css": "text/css; charset=utf-8", "icon.svg": "image/svg+xml"}
"""The page's own files, by the only names served."""
CSP = ("default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; connect-src 'self'; "
       "base-uri 'none'; form-action 'none'; frame-ancestors 'none'")
"""Content-Security-Policy of every answer: the page's own script and style only, nothing inline."""
SECURITY_HEADERS = [
    (b"content-security-policy", CSP.encode()),
    (b"x-content-type-options", b"nosniff"),
    (b"referrer-policy", b"no-referrer"),
    (b"cache-control", b"no-store"),
    (b"x-frame-options", b"DENY"),
]


def _asset(name: str) -> str:
    return resources.files("assaycut.explore").joinpath("static", name).read_text(encoding="utf-8")


def _error(message: str, status: int):
    from starlette.responses import JSONResponse

    return JSONResponse({"error": " ".join(str(message).split())}, status_code=status)


class _Guard:
    """ASGI middleware: the token and the Host header are checked before any route, and the security
    headers are added to every answer (errors included)."""

    def __init__(self, app, token: str):
        self.app = app
        self.token = token.encode()

    def _authorised(self, scope) -> bool:
        from urllib.parse import parse_qs

        given = [v.encode() for v in parse_qs(scope.get("query_string", b"").decode("latin-1")).get("token", [])]
        for k, v in scope.get("headers", []):
            if k == b"authorization" and v[:7].lower() == b"bearer ":
                given.append(v[7:].strip())
        return any(hmac.compare_digest(g, self.token) for g in given)

    async def __call__(self, scope, receive, send):
        if scope["type"] != "http":
            return await self.app(scope, receive, send)

        async def send_secured(message):
            if message["type"] == "http.response.start":
                message = dict(message)
                message["headers"] = list(message.get("headers", [])) + SECURITY_HEADERS
            await send(message)

        host = dict(scope.get("headers", [])).get(b"host", b"").decode("latin-1")
        name = host.rsplit(":", 1)[0] if not host.startswith("[") else host
        if name not in ALLOWED_HOSTS:
            return await _error(f"host {host[:60]!r} is not served; use http://127.0.0.1", 403)(
                scope, receive, send_secured)
        if not self._authorised(scope):
            return await _error("a valid token is required: open the address the explorer printed", 403)(
                scope, receive, send_secured)
        await self.app(scope, receive, send_secured)


async def _json_body(request):
    """The request's JSON body, refusing a wrong content type (415), a body over MAX_BODY_BYTES (413), one
    slower than BODY_TIMEOUT_S (408) and text that is not JSON or nested past Python's recursion limit (400)."""
    ctype = request.headers.get("content-type", "").split(";")[0].strip().lower()
    if ctype != "application/json":
        raise RequestError("the body must be JSON (Content-Type: application/json)", status=415)
    declared = request.headers.get("content-length")
    if declared is not None and (not declared.isdigit() or len(declared) > 9 or int(declared) > MAX_BODY_BYTES):
        raise RequestError(f"the body is larger than {MAX_BODY_BYTES} bytes", status=413)
    body = bytearray()

    async def read():
        async for chunk in request.stream():
            body.extend(chunk)
            if len(body) > MAX_BODY_BYTES:
                raise RequestError(f"the body is larger than {MAX_BODY_BYTES} bytes", status=413)

    try:
        await asyncio.wait_for(read(), BODY_TIMEOUT_S)
    except TimeoutError:
        raise RequestError(f"the body did not arrive within {BODY_TIMEOUT_S:g} s", status=408) from None
    try:
        return json.loads(body.decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as exc:
        raise RequestError(f"the body is not valid JSON ({str(exc)[:80]})") from None
    except RecursionError:  # nested deeper than Python's recursion limit
        raise RequestError("the body's JSON is nested too deeply; a request is "
                           '{"assay": NAME, "ends": {CUT: TEMP_C}}') from None


def make_app(explorer: Explorer, token: str):
    """The Starlette application of one explorer run.

    Parameters
    ----------
    explorer : Explorer
        The crudes and settings the page works on.
    token : str
        The run's secret; every request must carry it.

    Returns
    -------
    ASGI application
    """
    from starlette.applications import Starlette
    from starlette.responses import JSONResponse, Response
    from starlette.routing import Route

    page = _asset("explorer.html").replace("{{TOKEN}}", token)

    def answers(handler):
        """Run a handler, turning the explorer's errors into a 4xx and anything unforeseen into a 500, each with
        a one-line message and no traceback."""
        async def endpoint(request):
            try:
                return await handler(request)
            except RequestError as exc:
                return _error(str(exc), exc.status)
            except AssaycutError as exc:
                return _error(str(exc), 400)
            except Exception as exc:  # never a traceback to the client
                return _error(f"internal error ({type(exc).__name__}); the request was not answered", 500)
        return endpoint

    async def index(request):
        return Response(page, media_type="text/html; charset=utf-8")

    async def static(request):
        name = request.path_params["name"]
        if name not in STATIC_FILES:
            raise RequestError(f"no file {name[:60]!r}", status=404)
        return Response(_asset(name), media_type=STATIC_FILES[name])

    async def assays(request):
        return JSONResponse(explorer.assays_json())

    async def cut(request):
        req = parse_cut_request(await _json_body(request), explorer.names)
        return _json(explorer.cut_json(req.assay, req.ends, req.rate_bbl_per_day))

    async def worth(request):
        req = parse_cut_request(await _json_body(request), explorer.names)
        return _json(explorer.worth_json(req.assay, req.ends, req.rate_bbl_per_day))

    async def cutset(request):
        req = parse_cut_request(await _json_body(request), explorer.names, need_assay=False)
        return Response(explorer.cut_set_toml(req.ends), media_type="application/toml; charset=utf-8",
                        headers={"content-disposition": 'attachment; filename="cuts_explored.toml"'})

    async def read_cutset(request):
        return _json(explorer.read_cut_set(await _json_body(request)))

    async def report(request):
        req = parse_cut_request(await _json_body(request), explorer.names)
        from ..report.write import slug

        return Response(explorer.workbook_bytes(req.assay, req.ends, req.rate_bbl_per_day),
                        media_type="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet",
                        headers={"content-disposition": f'attachment; filename="{slug(req.assay)}_yields.xlsx"'})

    def _json(doc):
        return Response(json.dumps(doc, allow_nan=False, ensure_ascii=False), media_type="application/json")

    routes = [Route("/", answers(index), methods=["GET"]),
              Route("/static/{name}", answers(static), methods=["GET"]),
              Route("/api/assays", answers(assays), methods=["GET"]),
              Route("/api/cut", answers(cut), methods=["POST"]),
              Route("/api/worth", answers(worth), methods=["POST"]),
              Route("/api/cutset", answers(cutset), methods=["POST"]),
              Route("/api/cutset/read", answers(read_cutset), methods=["POST"]),
              Route("/api/report", answers(report), methods=["POST"])]

    async def not_found(request, exc):
        return _error(f"no such address: {request.url.path[:80]}", 404)

    async def not_allowed(request, exc):
        return _error(f"{request.method} is not accepted at {request.url.path[:80]}", 405)

    app = Starlette(routes=routes, exception_handlers={404: not_found, 405: not_allowed})
    return _Guard(app, token)


def listening_socket(port: int = 0):
    """A TCP socket bound to 127.0.0.1 only, on ``port`` (0: a free port the system picks)."""
    import socket

    sock = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    sock.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
    try:
        sock.bind(("127.0.0.1", port))
    except OSError as exc:
        sock.close()
        raise AssaycutError(f"--port {port}: cannot listen on 127.0.0.1:{port} ({exc.strerror or exc})") from None
    sock.listen(64)
    return sock


def serve(app, sock) -> None:
    """Serve ``app`` on the bound socket until Ctrl-C or SIGTERM (uvicorn, silent: no access or warning log).

    Bounded so that it always stops and never stalls: headers within :data:`HEADER_TIMEOUT_S` (:func:`_timed_http`),
    bodies within :data:`BODY_TIMEOUT_S`, at most :data:`MAX_CONNECTIONS`; a stop waits at most
    :data:`SHUTDOWN_TIMEOUT_S` for requests in progress, and a second Ctrl-C or SIGTERM during that wait ends the
    process at once (exit 130 or 143) with the explorer's last line and no traceback."""
    import os
    import signal
    import sys

    import uvicorn

    class Server(uvicorn.Server):
        def handle_exit(self, sig, frame):
            if self.should_exit:  # the second signal: leave now, quietly
                sys.stderr.write("assaycut explorer stopped\n")
                sys.stderr.flush()
                os._exit(130 if sig == signal.SIGINT else 143)
            super().handle_exit(sig, frame)

    config = uvicorn.Config(app, http=_timed_http(), log_level="critical", access_log=False, lifespan="off",
                            limit_concurrency=MAX_CONNECTIONS, timeout_keep_alive=5, server_header=False,
                            timeout_graceful_shutdown=SHUTDOWN_TIMEOUT_S)
    Server(config).run(sockets=[sock])


def _timed_http():
    """uvicorn's h11 protocol with a header deadline: a connection that has not sent a whole request head
    :data:`HEADER_TIMEOUT_S` after connecting (or after the first byte of its next request) is closed.
    uvicorn itself times out only idle keep-alive connections."""
    from uvicorn.protocols.http.h11_impl import H11Protocol

    class TimedH11(H11Protocol):
        _deadline = None

        def _awaiting_head(self) -> bool:
            return self.cycle is None or self.cycle.response_complete

        def _arm(self) -> None:
            if self._deadline is None:
                self._deadline = self.loop.call_later(HEADER_TIMEOUT_S, self._expire)

        def _disarm(self) -> None:
            if self._deadline is not None:
                self._deadline.cancel()
                self._deadline = None

        def _expire(self) -> None:
            self._deadline = None
            if self._awaiting_head() and not self.transport.is_closing():
                self.transport.close()

        def connection_made(self, transport):
            super().connection_made(transport)
            self._arm()

        def data_received(self, data: bytes) -> None:
            super().data_received(data)
            if self._awaiting_head():
                self._arm()
            else:
                self._disarm()

        def on_response_complete(self) -> None:
            self._disarm()  # idle from here: uvicorn's keep-alive timeout applies
            super().on_response_complete()

        def connection_lost(self, exc) -> None:
            self._disarm()
            super().connection_lost(exc)

    return TimedH11
