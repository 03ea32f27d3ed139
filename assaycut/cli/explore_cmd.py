"""The cut-point explorer: a local web page over the loaded crudes (``assaycut explore``)."""

from __future__ import annotations

from typing import Annotated, Optional

import typer

from ..errors import AssaycutError
from .common import (
    ApiOpt,
    CutsOpt,
    DensOpt,
    LimitsOpt,
    MethodOpt,
    PricesOpt,
    SgOpt,
    SulfurOpt,
    TdMethod,
    TUnit,
    check_whole_crude,
    guarded,
    load,
    load_cut_set,
    load_limits,
    load_prices,
    resolve_assays,
    say,
)

app = typer.Typer()

MAX_CRUDES = 40
"""Most crudes one explorer serves (each model is built at start; the page shows a few side by side)."""


@app.command()
@guarded
def explore(
    assays: Annotated[Optional[list[str]], typer.Argument(help="Assay workbooks (.xlsx), folders or globs. "
                                                          "Default: the demo assays.", metavar="ASSAY...")] = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    prices: PricesOpt = None,
    port: Annotated[Optional[int], typer.Option("--port", min=1, max=65535, help="Port on 127.0.0.1. Default: a "
                                                "free port.", metavar="PORT")] = None,
    open_browser: Annotated[bool, typer.Option("--open", help="Open the page in the default browser.")] = False,
    method: MethodOpt = TdMethod.daubert_1994,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    unit: Annotated[TUnit, typer.Option("--unit", metavar="C|F", help="Temperature unit the page starts in (the "
                                        "page has a switch; its API stays in °C).")] = TUnit.C,
) -> None:
    """Explore cut points in the browser: drag a cut point on the TBP curves and see yields on both bases,
    the cuts' qualities, the limits that flip and (with --prices) worth and margin move, for several crudes
    side by side; download the cut set (TOML) and the report workbook.

    Serves a local page on 127.0.0.1 only and prints its address, with a fresh secret token that every
    request must carry. Ctrl-C stops it. Results are screening estimates, as in the reports.
    """
    import secrets

    try:  # checked before anything is printed: the page's address must not appear for a server that cannot run
        import starlette  # noqa: F401
        import uvicorn  # noqa: F401

        from ..explore.server import listening_socket, make_app, serve
    except ImportError as exc:
        raise AssaycutError(f"the explorer needs its web server ({exc.name} is not installed): reinstall assaycut "
                            "(pip install .), which installs starlette and uvicorn") from None
    from ..explore.session import Explorer
    from ..io.tomlfiles import demo_assay_paths

    paths = resolve_assays(assays) if assays else demo_assay_paths()
    check_whole_crude(paths, api, sg, density, sulfur)
    if len(paths) > MAX_CRUDES:
        raise AssaycutError(f"{len(paths)} assays given; the explorer serves at most {MAX_CRUDES} (choose the "
                            f"candidates, or run `assaycut compare` or `yields --summary-only` over the library)")
    cs = load_cut_set(cuts, None)
    explorer = Explorer([(p, load(p, api, sg, density, sulfur)) for p in paths], cs, load_limits(limits),
                        load_prices(prices), method.value, unit=unit.value)
    sock = listening_socket(port or 0)
    token = secrets.token_urlsafe(24)
    url = f"http://127.0.0.1:{sock.getsockname()[1]}/?token={token}"
    say(url)
    say(f"assaycut explorer: {len(explorer.names)} crude(s), cut set {cs.label}; Ctrl-C stops it", err=True)
    if open_browser:
        import threading
        import webbrowser

        threading.Thread(target=webbrowser.open, args=(url,), daemon=True).start()
    try:
        serve(make_app(explorer, token), sock)
    except KeyboardInterrupt:
        pass
    finally:
        sock.close()
    say("assaycut explorer stopped", err=True)
