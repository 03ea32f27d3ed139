"""Command line of assaycut: a thin shell over the readers, the core and the report writers.

Heavy libraries (pandas, scipy, matplotlib, openpyxl) are imported inside the commands that use them, so
that ``assaycut --help`` and ``assaycut convert`` start fast.
"""

from __future__ import annotations

import enum
import functools
import json
import math
import os
import signal
import sys
from pathlib import Path
from typing import Annotated, Optional

import typer
from typer.core import TyperGroup

from .errors import AssaycutError

class _OneLineErrors(TyperGroup):
    """Command group whose usage errors (bad option, missing argument...) are one line on stderr, exit 2."""

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        if not standalone_mode:
            return super().main(args, prog_name, complete_var, standalone_mode=False, **extra)
        # the base class of click's usage errors, whether typer vendors click or depends on it
        ClickException = next(c for c in typer.BadParameter.__mro__ if c.__name__ == "ClickException")
        try:
            rv = super().main(args, prog_name, complete_var, standalone_mode=False, **extra)
        except ClickException as exc:
            where = f" (see '{exc.ctx.command_path} --help')" if getattr(exc, "ctx", None) else ""
            _err(" ".join(exc.format_message().split()) + where)
            sys.exit(exc.exit_code)
        except typer.Abort:
            _err("aborted")
            sys.exit(1)
        sys.exit(rv if isinstance(rv, int) else 0)


app = typer.Typer(
    cls=_OneLineErrors,
    name="assaycut",
    help="Cut crude-oil assays at your refinery's TBP cut points: yields, cut qualities and limit checks, "
         "distillation conversions and reports. Results are estimates for screening and planning, not "
         "measured properties. With no command, runs the yield report on the demo assay.",
    add_completion=False,
    no_args_is_help=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
)

EXIT_INPUT = 2
EXIT_INTERNAL = 3


def _err(msg: str) -> None:
    typer.echo(f"assaycut: error: {msg}", err=True)


def guarded(func):
    """Turn AssaycutErrors into one line on stderr and exit code 2; never a traceback."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        try:
            return func(*args, **kwargs)
        except (typer.Exit, typer.Abort):
            raise
        except AssaycutError as exc:
            _err(str(exc))
            raise typer.Exit(EXIT_INPUT) from None
        except BrokenPipeError:  # output piped into e.g. `head`: stop quietly
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
            raise typer.Exit(0) from None
        except KeyboardInterrupt:
            from .io.atomic import cleanup_pending

            cleanup_pending()
            _err("interrupted; no partial report was left")
            raise typer.Exit(130) from None
        except MemoryError:
            _err("out of memory; the input is too large")
            raise typer.Exit(EXIT_INPUT) from None
        except Exception as exc:  # last resort: one line, never a traceback
            _err(f"unexpected {type(exc).__name__}: {exc} (please report this with the input file)")
            raise typer.Exit(EXIT_INTERNAL) from None

    return wrapper


# -- shared options -------------------------------------------------------------------------------------
class TdMethod(str, enum.Enum):
    daubert_1994 = "daubert-1994"
    riazi_daubert_1986 = "riazi-daubert-1986"


CutsOpt = Annotated[Optional[Path], typer.Option("--cuts", help="Cut-set TOML file ([[cut]] name, end_c). "
                                                  "Default: the shipped cut set (see cuts_default.toml).",
                                                  dir_okay=False)]
LimitsOpt = Annotated[Optional[Path], typer.Option("--limits", help="Product-limits TOML file ([[limit]]). "
                                                    "Default: typical EN 590 / ASTM D1655 values, from memory.",
                                                    dir_okay=False)]
EndOpt = Annotated[Optional[list[str]], typer.Option("--end", help="Override one cut's end: NAME=TEMP_C. "
                                                      "Repeatable.", metavar="NAME=TEMP_C")]
ApiOpt = Annotated[Optional[float], typer.Option("--api", help="Whole-crude API gravity [°API], for a curve CSV.")]
SgOpt = Annotated[Optional[float], typer.Option("--sg", help="Whole-crude SG 60/60 °F, for a curve CSV.")]
DensOpt = Annotated[Optional[float], typer.Option("--density", help="Whole-crude density at 15 °C [kg/m3], "
                                                   "for a curve CSV.")]
SulfurOpt = Annotated[Optional[float], typer.Option("--sulfur", help="Whole-crude sulfur [wt %], for a curve CSV.")]
JsonOpt = Annotated[bool, typer.Option("--json", help="Print JSON on stdout.")]
UncertOpt = Annotated[int, typer.Option("--uncertainty", metavar="DRAWS", min=0, max=5000,
                                        help="Monte Carlo draws for P10/P50/P90 bands under the assay's measurement "
                                             "uncertainty (0: off; 200 is a good start).")]
SigTempOpt = Annotated[float, typer.Option("--sigma-temp", min=0.0, max=50.0, help="1-sigma of each curve "
                                           "temperature [°C]; default an assumption to confirm.")]
SigPctOpt = Annotated[float, typer.Option("--sigma-pct", min=0.0, max=10.0, help="1-sigma of each percent "
                                          "distilled [%]; default an assumption to confirm.")]
SigSgOpt = Annotated[float, typer.Option("--sigma-sg", min=0.0, max=0.05, help="1-sigma of specific gravity; "
                                         "default an assumption to confirm.")]
SigSOpt = Annotated[float, typer.Option("--sigma-sulfur", min=0.0, max=50.0, help="1-sigma of sulfur, in % "
                                        "of the value; default an assumption to confirm.")]


def _sigmas(temp, pct, sg, sulfur_pct):
    from .uncertainty import Sigmas

    return Sigmas(temp, pct, sg, sulfur_pct / 100.0)


def parse_ends(items: list[str] | None, option: str = "--end", what: str = "a temperature in °C") -> dict[str, float]:
    """{cut name: number} from NAME=VALUE texts (``--end diesel=350``, ``--overlap diesel=25``)."""
    out: dict[str, float] = {}
    for it in items or []:
        if "=" not in it:
            raise AssaycutError(f"{option} {it!r}: expected NAME=VALUE, e.g. {option} diesel=350")
        name, _, val = it.rpartition("=")
        try:
            t = float(val)
        except ValueError:
            raise AssaycutError(f"{option} {it!r}: {val!r} is not {what}") from None
        if not math.isfinite(t):
            raise AssaycutError(f"{option} {it!r}: {val!r} is not {what}")
        if not name.strip():
            raise AssaycutError(f"{option} {it!r}: the cut name is empty")
        out[name.strip()] = t
    return out


def load_cut_set(cuts: Path | None, ends: list[str] | None, overlaps: list[str] | None = None):
    from .cutting import default_cut_set
    from .fractionation import widths_for
    from .io.tomlfiles import read_cut_set

    cs = read_cut_set(str(cuts)) if cuts else default_cut_set()
    changes = parse_ends(ends)
    cs = cs.with_ends(changes, cs.label + " with --end changes") if changes else cs
    if overlaps:
        cs.overlaps.update(parse_ends(overlaps, option="--overlap", what="a TBP width in °C"))
        widths_for(cs, cs.overlaps)  # refuses unknown cuts and absurd widths now
    return cs


def resolve_assays(paths: list[str] | None) -> list[str]:
    """Assay paths from files, folders or glob patterns; the first demo assay when none are given."""
    import glob

    from .io.tomlfiles import demo_assay_paths

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


def _load(path: str, api, sg, density, sulfur):
    from .io import load_assay

    return load_assay(path, api=api, sg=sg, density=density, sulfur=sulfur)


# -- commands ---------------------------------------------------------------------------------------------
@app.callback(invoke_without_command=True)
def _root(ctx: typer.Context) -> None:
    """Bare `assaycut` runs the yield report on the demo assay."""
    if ctx.invoked_subcommand is None:
        ctx.invoke(yields, assays=None, cuts=None, limits=None, out=None, json_out=False, end=None,
                   api=None, sg=None, density=None, sulfur=None, method=TdMethod.daubert_1994, summary_only=False,
                   overlap=None, uncertainty=0, sigma_temp=2.0, sigma_pct=0.3, sigma_sg=0.0005, sigma_sulfur=3.0)


@app.command()
@guarded
def yields(
    assays: Annotated[Optional[list[str]], typer.Argument(help="Assay workbooks (.xlsx) or curve CSVs, "
                                                          "folders or globs. Default: the demo assay.")] = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    out: Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/<crude>/. "
                                                "With --json and no --out, no files are written.",
                                                file_okay=False)] = None,
    json_out: JsonOpt = False,
    end: EndOpt = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    method: Annotated[TdMethod, typer.Option("--method", help="TBP <-> D86 correlation for D86 input curves.")]
    = TdMethod.daubert_1994,
    summary_only: Annotated[bool, typer.Option("--summary-only", help="With several assays, write only the "
                                               "library summary (xlsx and CSV), not each assay's report.")] = False,
    overlap: Annotated[Optional[list[str]], typer.Option(
        "--overlap", metavar="NAME=WIDTH_C",
        help="Real-column products: the TBP 5-95 overlap at the end of cut NAME, in °C (0 = ideal cut). The "
             "heavy tail of one product then reaches into the next; yields, D86, flash and limit checks use "
             "the products' own curves. Repeatable; also `overlap_c` in the cut file.")] = None,
    uncertainty: UncertOpt = 0,
    sigma_temp: SigTempOpt = 2.0,
    sigma_pct: SigPctOpt = 0.3,
    sigma_sg: SigSgOpt = 0.0005,
    sigma_sulfur: SigSOpt = 3.0,
) -> None:
    """Cut assays at the cut points and report yields and qualities per cut (the main job).

    Prints the cut table, writes an xlsx report (summary, cuts, curve on both bases, limit status, notes),
    a CSV of the cuts, a Markdown summary and PNG plots. Yields are on the volume and weight basis of the
    whole crude; qualities are correlation estimates for screening, not measured properties.

    With several assays (files, folders or globs) it also writes a library summary, one row per assay;
    large batches run in worker processes with a progress bar, and a bad file is reported and skipped
    (exit code 2 at the end).
    """
    from .batch import YieldJob, run_batch
    from .io.tomlfiles import read_limits

    cs = load_cut_set(cuts, end, overlap)
    lim = read_limits(str(limits) if limits else None)
    paths = resolve_assays(assays)
    inputs = tuple(paths) + tuple(str(x) for x in (cuts, limits) if x)
    write = out is not None or not json_out
    root = (out or Path("reports")) if write and not summary_only else None
    job = YieldJob(cs, lim, method.value, (api, sg, density, sulfur), root,
                   single_folder=out is not None and len(paths) == 1, inputs=inputs, uncertainty_draws=uncertainty,
                   sigmas=_sigmas(sigma_temp, sigma_pct, sigma_sg, sigma_sulfur))
    results, written, failures = run_batch(paths, job)
    if len(paths) == 1 and failures:
        raise AssaycutError(failures[0][1])
    for _, msg in failures:
        _err(f"skipped: {msg}")
    if write and len(paths) > 1 and results:
        from .report.write import write_library_summary

        written += write_library_summary(results, cs, out or Path("reports"), inputs)
    if json_out:
        objs = [r.to_dict() for r in results]
        doc = objs[0] if len(paths) == 1 else {"assays": objs, "errors": [m for _, m in failures]}
        typer.echo(json.dumps(doc, indent=2, ensure_ascii=False))
        if failures:
            raise typer.Exit(EXIT_INPUT)
        return
    if len(results) > BRIEF_OVER:
        typer.echo(f"{len(results)} assays cut with {len(cs.names)} cuts; see the library summary.")
        results_shown = []
    else:
        results_shown = results
    from .report.tables import text_table

    for r in results_shown:
        a = r.assay
        typer.echo(f"\n{a.name}  ({a.origin or 'origin not given'})  {a.api:.1f} °API, SG {a.sg:.4f}, sulfur "
                   + (f"{r.model.sulfur_wt_pct:.3f} wt %" if r.model.sulfur_wt_pct is not None else "n/a"))
        typer.echo(text_table(r.cuts))
        fails = r.limits[r.limits["status"] == "fail"]
        if len(fails):
            typer.echo("Limits failed: " + "; ".join(f"{x['cut']} {x['label'] or x['property']} "
                                                     f"({x['value']:.1f}, needs {x['limit']})"
                                                     for x in fails.to_dict("records")))
        for w in r.warnings:
            typer.echo(f"warning: {w}", err=True)
    typer.echo("\n* Flash points are correlation estimates: measure them (ASTM D93). All results are "
               "screening estimates; see the notes sheet of the report for methods and cautions.")
    if written:
        folders = sorted({str(p.parent) for p in written})
        shown = ", ".join(folders[:3]) + (f" and {len(folders) - 3} more folders" if len(folders) > 3 else "")
        typer.echo(f"Report written to {shown} ({len(written)} files).")
    if failures:
        _err(f"{len(failures)} of {len(paths)} assays failed and were skipped (see above)")
        raise typer.Exit(EXIT_INPUT)


BRIEF_OVER = 10
"""Batches larger than this print a one-line summary instead of every cut table."""


@app.command()
@guarded
def check(
    assay: Annotated[Optional[str], typer.Argument(help="Assay workbook or curve CSV. Default: the demo.")] = None,
    json_out: JsonOpt = False,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
) -> None:
    """Check an assay's quality: closure, gravity agreement, curve coverage, narrow cuts, sulfur balance.

    Each finding has a severity (error, warning, info) and says where it was found. Exit code 1 when any
    finding is an error.
    """
    from .crude import build_model
    from .quality import check_assay

    path = resolve_assays([assay] if assay else None)[0]
    a = _load(path, api, sg, density, sulfur)
    findings = check_assay(a, build_model(a))
    ok = not any(f.severity == "error" for f in findings)
    if json_out:
        typer.echo(json.dumps({"ok": ok, "findings": [f.to_dict() for f in findings]}, indent=2,
                              ensure_ascii=False))
    else:
        typer.echo(f"{a.name}: {'OK' if ok else 'ERRORS FOUND'}")
        for f in findings:
            typer.echo(f"  {f.severity.upper():8s} {f.where}: {f.message}")
    if not ok:
        raise typer.Exit(1)


@app.command()
@guarded
def template(
    path: Annotated[Path, typer.Argument(help="Workbook to write (.xlsx).", dir_okay=False)],
) -> None:
    """Write a blank assay workbook in assaycut's layout, with an instruction row per sheet, for a
    laboratory to fill in."""
    if path.suffix.lower() != ".xlsx":
        raise AssaycutError(f"{path}: the template is an Excel workbook; give a path ending in .xlsx")
    if path.exists():
        raise AssaycutError(f"{path}: already exists; choose a new file name (nothing was overwritten)")
    from .io.assaywriter import write_assay_workbook

    write_assay_workbook(None, str(path))
    typer.echo(f"Blank assay workbook written to {path}")


class FromMethod(str, enum.Enum):
    TBP = "TBP"
    D86 = "D86"
    D2887 = "D2887"
    D1160 = "D1160"


class ToMethod(str, enum.Enum):
    TBP = "TBP"
    D86 = "D86"
    AET = "AET"


class TUnit(str, enum.Enum):
    C = "C"
    F = "F"


@app.command()
@guarded
def convert(
    points: Annotated[Optional[list[str]], typer.Argument(help="PERCENT=TEMP pairs, e.g. 10=176.7 50=206.7",
                                                          metavar="PERCENT=TEMP")] = None,
    frm: Annotated[FromMethod, typer.Option("--from", help="Method of the input curve.")] = FromMethod.D86,
    to: Annotated[ToMethod, typer.Option("--to", help="Method to convert to (AET for D1160 data).")] = ToMethod.TBP,
    method: Annotated[TdMethod, typer.Option("--method", help="Correlation for TBP <-> D86.")] =
    TdMethod.daubert_1994,
    pressure_mmhg: Annotated[Optional[float], typer.Option("--pressure-mmhg", help="Pressure of D1160 data [mmHg].",
                                                           min=1e-6)] = None,
    unit: Annotated[TUnit, typer.Option("--unit", help="Temperature unit of input and printed output "
                                        "(JSON temp_c is always °C).")] = TUnit.C,
    file: Annotated[Optional[Path], typer.Option("--file", help="CSV with vol_pct/wt_pct and temp_c/temp_f/temp_k "
                                                 "columns instead of PERCENT=TEMP pairs.", dir_okay=False)] = None,
    json_out: JsonOpt = False,
) -> None:
    """Convert a distillation curve between methods by published correlations.

    TBP <-> D86 by Daubert 1994 (API TDB 3A1.1, default) or Riazi-Daubert 1986; D2887 -> TBP (API TDB
    3A3.1) and D2887 -> D86 (3A3.2); D1160 at --pressure-mmhg -> AET (Maxwell-Bonnell, API TDB 5A1.19).
    Conversions carry errors of a few °C, largest at the initial point.
    """
    from . import conversions
    from .units import c_to_f, f_to_c

    pts: dict[float, float] = {}
    if file is not None and points:
        raise AssaycutError("give PERCENT=TEMP pairs or --file, not both")
    if file is not None:
        pts = _points_from_csv(str(file))
    else:
        for it in points or []:
            p, sep, t = it.partition("=")
            try:
                pv, tv = float(p), float(t)
            except ValueError:
                raise AssaycutError(f"{it!r}: expected PERCENT=TEMP with numbers, e.g. 50=206.7") from None
            if not sep or not (0.0 <= pv <= 100.0):
                raise AssaycutError(f"{it!r}: expected PERCENT=TEMP with a percent between 0 and 100")
            if pv in pts:
                raise AssaycutError(f"{it!r}: the {pv:g} % point is given twice")
            pts[pv] = f_to_c(tv) if unit == TUnit.F else tv
    if not pts:
        raise AssaycutError("no points: give PERCENT=TEMP pairs (e.g. 10=176.7 50=206.7) or --file CSV")
    for p, t in pts.items():
        if t < -273.15:
            raise AssaycutError(f"{p:g} %: {t:.2f} °C is below absolute zero")
    out, used, warnings = conversions.convert(pts, frm.value, to.value, method=method.value,
                                              pressure_mmhg=pressure_mmhg)
    if json_out:
        typer.echo(json.dumps({"from": frm.value, "to": to.value, "method": used,
                               "points": [{"percent": p, "temp_c": round(t, 4)} for p, t in out.items()],
                               "warnings": warnings}, indent=2))
    else:
        u = "°F" if unit == TUnit.F else "°C"
        typer.echo(f"{frm.value} -> {to.value} by {used}")
        typer.echo(f"{'percent':>8}  {frm.value + ' ' + u:>12}  {to.value + ' ' + u:>12}")
        for p, t in out.items():
            src = pts.get(p)
            conv = c_to_f if unit == TUnit.F else (lambda x: x)
            typer.echo(f"{p:8g}  {'' if src is None else f'{conv(src):.1f}':>12}  {conv(t):12.1f}")
    for w in warnings:
        typer.echo(f"warning: {w}", err=True)


def _points_from_csv(path: str) -> dict[float, float]:
    from .io.csvcurve import read_curve_csv

    a = read_curve_csv(path, sg=0.85)  # gravity is not used by a conversion
    c = a.curves[0]
    return {float(p): float(t) for p, t in zip(c.percent, c.temp_c)}


def _on_sigterm(signum, frame):  # pragma: no cover - exercised by a subprocess test
    from .io.atomic import cleanup_pending

    cleanup_pending()
    sys.stderr.write("assaycut: error: terminated; no partial report was left\n")
    os._exit(143)


def main() -> None:
    """Console entry point."""
    signal.signal(signal.SIGTERM, _on_sigterm)
    try:
        app()
    except KeyboardInterrupt:
        from .io.atomic import cleanup_pending

        cleanup_pending()
        _err("interrupted; no partial report was left")
        sys.exit(130)


from . import cli_studies  # noqa: E402,F401  (registers compare, blend, shift, sweep and optimize)
