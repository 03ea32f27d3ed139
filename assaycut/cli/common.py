"""What every command of the command line shares: one-line errors, the option types, and the helpers that
turn command-line text into assays, cut sets and numbers.

Heavy libraries (pandas, scipy, matplotlib, openpyxl) are imported inside the helpers and commands that use
them, so that ``assaycut --help`` and ``assaycut convert`` start fast.
"""

from __future__ import annotations

import contextlib
import enum
import functools
import json
import math
import os
import sys
import warnings
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import AssaycutError
from ..text import escape_hidden

EXIT_OK = 0
"""Exit code of success."""
EXIT_NO_ANSWER = 1
"""Exit code of a study with no feasible answer, or of a check that failed."""
EXIT_INPUT = 2
"""Exit code of bad input and usage errors."""
EXIT_INTERNAL = 3
"""Exit code of an unexpected internal error."""


def printable(text: str) -> str:
    """Text safe for a terminal: control characters (escape sequences, bells, carriage returns; not newline
    or tab) and invisible Unicode format characters (bidi controls, zero-width spaces) shown escaped
    (:func:`~assaycut.text.escape_hidden`), so that a file or crude name can neither drive the terminal nor
    display as another.

    Examples
    --------
    >>> printable("crude\\x1b]0;owned\\x07.xlsx")
    'crude\\\\x1b]0;owned\\\\x07.xlsx'
    >>> printable("Tarn\\u202eyvaeH.csv")
    'Tarn\\\\u202eyvaeH.csv'
    """
    return escape_hidden(text)


def say(text: str, err: bool = False) -> None:
    """A line on stdout (or stderr), control characters made visible (:func:`printable`)."""
    typer.echo(printable(str(text)), err=err)


def error_line(msg: str) -> None:
    """One error line on stderr."""
    say(f"assaycut: error: {msg}", err=True)


def echo_json(doc, compact: bool = False) -> None:
    """A JSON document on stdout (:func:`json_text`)."""
    typer.echo(json_text(doc, compact))


def json_text(doc, compact: bool = False) -> str:
    """A JSON document as text, non-ASCII kept, never NaN or Infinity (strict JSON); indented, or on one
    line with ``compact`` (large batches: Python's fast JSON encoder works only without indentation)."""
    kw = {"separators": (",", ":")} if compact else {"indent": 2}
    try:
        return json.dumps(doc, ensure_ascii=False, allow_nan=False, **kw)
    except ValueError:  # a non-finite number slipped through: null it
        from ..report.jsonout import json_safe

        return json.dumps(json_safe(doc), ensure_ascii=False, allow_nan=False, **kw)


def echo_lines(lines: list[str]) -> None:
    """Text lines on stdout."""
    for line in lines:
        say(line)


class ProgressBar:
    """A progress bar on stderr (rich), for slow work: ``bar.advance()`` or ``bar(done, total)`` as a study's
    progress callback.  :func:`progress_bar` shows one only when stderr is a terminal."""

    def __init__(self, label: str, total: int):
        from rich.console import Console
        from rich.progress import (
            BarColumn,
            MofNCompleteColumn,
            Progress,
            TextColumn,
            TimeRemainingColumn,
        )

        self._p = Progress(TextColumn(label), BarColumn(), MofNCompleteColumn(), TimeRemainingColumn(),
                           console=Console(stderr=True), transient=True)
        self._p.start()
        self._t = self._p.add_task(label, total=total)

    def advance(self, n: int = 1) -> None:
        self._p.advance(self._t, n)

    def __call__(self, done: int, total: int) -> None:
        self._p.update(self._t, completed=done, total=total)

    def close(self) -> None:
        self._p.stop()


@contextlib.contextmanager
def progress_bar(label: str, total: int = 100):
    """A :class:`ProgressBar` on a terminal, None when stderr is piped or redirected (nothing printed)."""
    if not sys.stderr.isatty():
        yield None
        return
    bar = ProgressBar(label, total)
    try:
        yield bar
    finally:
        bar.close()


AT_STOP: list = []
"""What :func:`stop_now` undoes before the process ends, in order (the batch runner registers its worker-pool
kill and its claims-folder removal here: this module cannot import it)."""


def stop_now(message: str, code: int) -> None:  # pragma: no cover - exercised by subprocess tests
    """Stop at once (Ctrl-C, SIGTERM): kill worker pools, settle the report sets being written and remove batch
    claims, say so in one line, flush the output and leave the process with ``os._exit``.

    A report set being written is removed, unless all its files were staged already: then it is completed
    (:func:`~assaycut.files.cleanup_pending`), and the line says where.  A further Ctrl-C or SIGTERM during
    this is ignored, so the stop itself is never cut short.

    ``os._exit`` and not ``sys.exit``: an interrupt can arrive while the main thread holds a lock of a worker
    pool (a future's condition inside ``as_completed``, say); the normal interpreter exit then joins the pool's
    manager thread, which waits for that lock for ever.  Everything the run still owns is cleaned up here first.
    """
    import signal

    from ..files import cleanup_pending

    with contextlib.suppress(Exception):
        signal.signal(signal.SIGINT, signal.SIG_IGN)
        signal.signal(signal.SIGTERM, signal.SIG_IGN)
    for undo in AT_STOP:  # kill the worker pools first: nothing more gets written
        with contextlib.suppress(Exception):
            undo()
    completed = cleanup_pending()
    with contextlib.suppress(Exception):  # a signal that arrives inside a write cannot write again: exit anyway
        sys.stdout.flush()
        if completed:
            error_line(f"{message} after the report in {', '.join(completed)} was complete; it was written whole, "
                       f"and no partial report was left")
        else:
            error_line(f"{message}; no partial report was left")
        sys.stderr.flush()
    os._exit(code)


def interrupted() -> None:
    """Ctrl-C: stop at once (:func:`stop_now`), exit code 130 (128 + SIGINT, common practice, no source)."""
    stop_now("interrupted", 130)


def guarded(func):
    """Turn AssaycutErrors into one line on stderr and exit code 2; never a traceback; library warnings
    (numpy RuntimeWarnings, openpyxl UserWarnings, matplotlib glyph warnings) never reach stderr."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        try:
            with warnings.catch_warnings():  # library warnings (numpy, openpyxl, matplotlib) are not our output
                warnings.simplefilter("ignore")
                return func(*args, **kwargs)
        except (typer.Exit, typer.Abort):
            raise
        except AssaycutError as exc:
            error_line(str(exc))
            raise typer.Exit(EXIT_INPUT) from None
        except BrokenPipeError:  # output piped into e.g. `head`: stop quietly
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
            raise typer.Exit(0) from None
        except KeyboardInterrupt:
            interrupted()
        except MemoryError:
            error_line("out of memory; the input is too large")
            raise typer.Exit(EXIT_INPUT) from None
        except Exception as exc:  # last resort: one line, never a traceback
            error_line(f"unexpected {type(exc).__name__}: {exc} (please report this with the input file)")
            raise typer.Exit(EXIT_INTERNAL) from None

    return wrapper


# -- shared options -------------------------------------------------------------------------------------
class TdMethod(str, enum.Enum):
    daubert_1994 = "daubert-1994"
    riazi_daubert_1986 = "riazi-daubert-1986"


MethodOpt = Annotated[TdMethod, typer.Option("--method", help="TBP <-> D86 correlation for D86 input curves.",
                                             metavar="daubert-1994|riazi-daubert-1986")]


OutOpt = Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/<crude>/.",
                                                file_okay=False, metavar="DIR")]


class PlotSet(str, enum.Enum):
    """Which plots a yield report draws (--plots); see ``assaycut.report.write.PLOT_SETS``."""

    main = "main"
    all = "all"
    none = "none"


PlotsOpt = Annotated[PlotSet, typer.Option("--plots", metavar="main|all|none", help="Plots of the report: 'main' "
                                           "(TBP curve, yields, properties, and real-column products), 'all' (adds "
                                           "the per-cut qualities figure, about as long to draw as the rest), "
                                           "'none' (tables only).")]


class TUnit(str, enum.Enum):
    """A temperature unit of printed output (--unit): °C or °F."""

    C = "C"
    F = "F"


UnitOpt = Annotated[TUnit, typer.Option("--unit", metavar="C|F", help="Temperature unit of the printed table and "
                                        "the report files (options such as --end stay in °C TBP; JSON stays in "
                                        "°C).")]


CutsOpt = Annotated[Optional[Path], typer.Option("--cuts", help="Cut-set TOML file ([[cut]] name, end_c). "
                                                  "Default: the shipped cut set (see cuts_default.toml).",
                                                  dir_okay=False, metavar="FILE")]
LimitsOpt = Annotated[Optional[Path], typer.Option("--limits", help="Product-limits TOML file ([[limit]]), or a "
                                                    "shipped set: 'blendstock' (default: straight-run targets a "
                                                    "planner cuts to) or 'finished' (EN 590 / ASTM D1655 finished-"
                                                    "fuel specs). Shipped values are from memory.",
                                                    dir_okay=False, metavar="FILE|SET")]
RateOpt = Annotated[Optional[float], typer.Option("--rate", help="Crude run [bbl/d]: adds each cut's bbl_per_day, "
                                                 "m3_per_day and t_per_day.", min=1e-9, max=1e8, metavar="BBL_PER_DAY")]
PricesOpt = Annotated[Optional[Path], typer.Option("--prices", help="Price file (TOML): [products] price per cut "
                                                    "per_bbl or per_t, optional [crudes] prices.", dir_okay=False,
                                                    metavar="FILE")]
def _end_help() -> str:
    """The --end help: the form, quoting, and the cut names of the shipped set."""
    from ..cutting import SHIPPED_CUT_ENDS  # plain data: the help loads no numpy

    names = ", ".join(name for name, end in SHIPPED_CUT_ENDS if end is not None)
    return (f"Move one cut's end to TEMP_C [°C TBP], e.g. --end kerosene=240, or --end 'heavy naphtha=160' (quote a "
            f"name with spaces). Repeatable. The shipped set's cuts with an end: {names}; with --cuts, that file's.")


EndOpt = Annotated[Optional[list[str]], typer.Option("--end", help=_end_help(), metavar="NAME=TEMP_C")]
ScaleOpt = Annotated[bool, typer.Option(
    "--scale-cuts", help="Scale the narrow cuts' density and sulfur proportionally so that they reproduce the whole "
                         "crude, instead of keeping them as measured and closing the balance on the part of the crude "
                         "they do not cover.")]
ApiOpt = Annotated[Optional[float], typer.Option("--api", help="Whole-crude API gravity [°API], for each curve "
                                                 "CSV given (a workbook carries its own).", metavar="API")]
SgOpt = Annotated[Optional[float], typer.Option("--sg", help="Whole-crude SG 60/60 °F, for each curve CSV given.",
                                                metavar="SG")]
DensOpt = Annotated[Optional[float], typer.Option("--density", help="Whole-crude density at 15 °C [kg/m3], "
                                                   "for each curve CSV given.", metavar="KG_M3")]
SulfurOpt = Annotated[Optional[float], typer.Option("--sulfur", help="Whole-crude sulfur [wt %], for each curve "
                                                    "CSV given.", metavar="WT_PCT")]
JsonOpt = Annotated[bool, typer.Option("--json", help="Print JSON on stdout.")]
UncertOpt = Annotated[int, typer.Option("--uncertainty", metavar="DRAWS", min=0, max=5000,
                                        help="Monte Carlo draws for P10/P50/P90 bands under the assay's measurement "
                                             "uncertainty (0: off; 200 is a good start).")]
AssayArg = Annotated[Optional[str], typer.Argument(help="Assay. Default: the demo.", metavar="ASSAY")]


def parse_ends(items: list[str] | None, option: str = "--end", what: str = "a temperature in °C") -> dict[str, float]:
    """{cut name: number} from NAME=VALUE texts (``--end diesel=350``, ``--overlap diesel=25``)."""
    out: dict[str, float] = {}
    for it in items or []:
        shown = it if len(it) <= 60 else it[:57] + "..."
        if "=" not in it:
            raise AssaycutError(f"{option} {shown!r}: expected NAME=VALUE, e.g. {option} diesel=350")
        name, _, val = it.rpartition("=")
        try:
            t = float(val)
        except ValueError:
            t = math.nan
        if not math.isfinite(t):
            raise AssaycutError(f"{option} {shown!r}: the value is not {what}")
        if not name.strip():
            raise AssaycutError(f"{option} {it!r}: the cut name is empty")
        out[name.strip()] = t
    return out


def load_cut_set(cuts: Path | None, ends: list[str] | None, overlaps: list[str] | None = None):
    """The cut set of --cuts (or the shipped default), with the --end and --overlap changes applied."""
    from ..cutting.cutset import default_cut_set
    from ..cutting.real_column import targets_for
    from ..io.tomlfiles import read_cut_set

    cs = read_cut_set(str(cuts)) if cuts else default_cut_set()
    cs = cs.with_end_changes(parse_ends(ends))
    if overlaps:
        cs.overlaps.update(parse_ends(overlaps, option="--overlap", what="a TBP width in °C"))
        targets_for(cs, cs.overlaps)  # refuses unknown cuts and absurd overlaps now
    return cs


def load_limits(limits: Path | None):
    """The product limits of --limits, or the shipped defaults."""
    from ..io.tomlfiles import read_limits

    return read_limits(str(limits) if limits else None)


def load_prices(prices: Path | None):
    """The price file of --prices, or None."""
    from ..io.tomlfiles import read_prices

    return read_prices(str(prices)) if prices else None


def resolve_assays(paths: list[str] | None) -> list[str]:
    """Assay paths from files, folders or glob patterns; the first demo assay when none are given."""
    import glob

    from ..io.tomlfiles import demo_assay_paths

    if not paths:
        return demo_assay_paths()[:1]
    out: list[str] = []
    for p in paths:
        if os.path.isdir(p):
            found = sorted(f for ext in ("*.xlsx", "*.csv") for f in glob.glob(os.path.join(p, ext)))
            if not found:
                raise AssaycutError(f"{p}: the folder holds no .xlsx or .csv assays")
            out += found
        elif any(ch in p for ch in "*?[") and not os.path.exists(p):
            found = sorted(glob.glob(p))
            if not found:
                raise AssaycutError(f"{p}: no file matches this pattern")
            out += found
        else:
            out.append(p)
    return out


def load(path: str, api=None, sg=None, density=None, sulfur=None):
    """The assay in ``path``; whole-crude figures (``--api``, ``--sg``, ``--density``, ``--sulfur``) for a
    curve CSV.  A workbook carries its own: given with one, they are refused (one line naming the file)."""
    from ..io import is_curve_csv, load_assay

    if not is_curve_csv(path):  # the figures serve the curve CSVs of a mixed list (checked by check_whole_crude)
        api = sg = density = sulfur = None
    return load_assay(path, api=api, sg=sg, density=density, sulfur=sulfur)


def check_whole_crude(paths: list[str], api=None, sg=None, density=None, sulfur=None) -> None:
    """Refuse ``--api/--sg/--density/--sulfur`` when no curve CSV is among ``paths`` (a workbook carries its
    own whole-crude data): one line naming the first workbook."""
    from ..io import is_curve_csv

    given = [o for o, v in (("--api", api), ("--sg", sg), ("--density", density), ("--sulfur", sulfur))
             if v is not None]
    if given and paths and not any(is_curve_csv(p) for p in paths):
        verb = "apply" if len(given) > 1 else "applies"
        raise AssaycutError(f"{paths[0]}: {'/'.join(given)} {verb} to a curve CSV; a workbook carries its own "
                            f"whole-crude data")


def load_one(assay: str | None, api=None, sg=None, density=None, sulfur=None):
    """(path, assay) of the one assay a study command takes (the demo when none is given), with the
    whole-crude figures of a curve CSV (:func:`load`)."""
    path = resolve_assays([assay] if assay else None)[0]
    check_whole_crude([path], api, sg, density, sulfur)
    return path, load(path, api, sg, density, sulfur)

