"""The explorer's local web server: a Starlette application over an :class:`~.session.Explorer`.

Routes (every one needs the run's token, as the ``token`` query parameter or ``Authorization: Bearer TOKEN``;
without it the answer is 403):

- ``GET /``: the page; ``GET /static/<file>``: its own script and style sheet (fixed names, no path from the
  client reaches the file system);
- ``GET /api/assays``: the loaded crudes and the starting cut set;
- ``POST /api/cut`` ``{"assay": NAME, "ends": {CUT: TEMP_C}}``: the ``yields --json`` object;
- ``POST /api/worth`` (same body): worth and margin, with ``--prices``;
- ``POST /api/cutset`` ``{"ends": {...}}``: the cut set as a TOML file;
- ``POST /api/report`` (same body as /api/cut): the yield-report workbook (.xlsx).

Every answer carries a Content-Security-Policy that allows only the page's own script and style, no framing,
no referrer and no caching.  Bodies are JSON, at most :data:`MAX_BODY_BYTES`; a bad one gets a 4xx with
``{"error": "one line"}``.  Only Host headers naming the loopback address are served (no DNS rebinding).
"""

from __future__ import annotations

import hmac
import json
from importlib import resources

from ..errors import AssaycutError
from .session import Explorer, RequestError, parse_cut_request

MAX_BODY_BYTES = 16_384
"""Largest request body accepted (a cut request of 100 cuts with long names is about 10 kB). [bytes]"""
ALLOWED_HOSTS = ("127.0.0.1", "localhost")
"""Host names the server answers to (it listens on 127.0.0.1 only)."""
STATIC_FILES = {"explorer.js": "text/javascript; charset=utf-8", "explorer.css": "text/css; charset=utf-8",
                "icon.svg": "image/svg+xml"}
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
    """The request's JSON body, refusing a wrong content type (415), a body over MAX_BODY_BYTES (413) and
    text that is not JSON (400)."""
    ctype = request.headers.get("content-type", "").split(";")[0].strip().lower()
    if ctype != "application/json":
        raise RequestError("the body must be JSON (Content-Type: application/json)", status=415)
    declared = request.headers.get("content-length")
    if declared is not None and (not declared.isdigit() or int(declared) > MAX_BODY_BYTES):
        raise RequestError(f"the body is larger than {MAX_BODY_BYTES} bytes", status=413)
    body = bytearray()
    async for chunk in request.stream():
        body += chunk
        if len(body) > MAX_BODY_BYTES:
            raise RequestError(f"the body is larger than {MAX_BODY_BYTES} bytes", status=413)
    try:
        return json.loads(body.decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as exc:
        raise RequestError(f"the body is not valid JSON ({str(exc)[:80]})") from None


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
        name, ends = parse_cut_request(await _json_body(request), explorer.names)
        return _json(explorer.cut_json(name, ends))

    async def worth(request):
        name, ends = parse_cut_request(await _json_body(request), explorer.names)
        return _json(explorer.worth_json(name, ends))

    async def cutset(request):
        _, ends = parse_cut_request(await _json_body(request), explorer.names, need_assay=False)
        return Response(explorer.cut_set_toml(ends), media_type="application/toml; charset=utf-8",
                        headers={"content-disposition": 'attachment; filename="cuts_explored.toml"'})

    async def report(request):
        name, ends = parse_cut_request(await _json_body(request), explorer.names)
        from ..report.write import slug

        return Response(explorer.workbook_bytes(name, ends),
                        media_type="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet",
                        headers={"content-disposition": f'attachment; filename="{slug(name)}_yields.xlsx"'})

    def _json(doc):
        return Response(json.dumps(doc, allow_nan=False, ensure_ascii=False), media_type="application/json")

    routes = [Route("/", answers(index), methods=["GET"]),
              Route("/static/{name}", answers(static), methods=["GET"]),
              Route("/api/assays", answers(assays), methods=["GET"]),
              Route("/api/cut", answers(cut), methods=["POST"]),
              Route("/api/worth", answers(worth), methods=["POST"]),
              Route("/api/cutset", answers(cutset), methods=["POST"]),
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
    """Serve ``app`` on the bound socket until Ctrl-C or SIGTERM (uvicorn, quiet: no access log)."""
    import uvicorn

    config = uvicorn.Config(app, log_level="warning", access_log=False, lifespan="off",
                            limit_concurrency=32, timeout_keep_alive=5, server_header=False)
    uvicorn.Server(config).run(sockets=[sock])
