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
        written += _write_summary(results, cs, out or Path("reports"), inputs)
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


def _write_summary(results, cs, folder: Path, inputs) -> list[Path]:
    """Library summary (xlsx and CSV), one row per assay."""
    import io as _io

    from .library import library_summary
    from .report.write import csv_text, place_files
    from .report.xlsx import write_table

    df = library_summary([r.assay for r in results], [r.model for r in results], cs)
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "library"
    heads = [{"crude": "Crude", "source": "Source file", "sha256": "sha256", "api": "API gravity [°API]",
              "sulfur_wt_pct": "Sulfur [wt %]", "extrapolated_cuts": "Cuts using the extension"}.get(c, c)
             for c in df.columns]
    fmts = [None, None, None, "0.0", "0.000"] + ["0.00"] * (len(df.columns) - 6) + [None]
    write_table(ws, heads, df.values.tolist(), fmts, widths=[22, 40, 20] + [12] * (len(df.columns) - 3))
    ws.freeze_panes = "B2"
    ws2 = wb.create_sheet("notes")
    from .yields import CAUTIONS

    write_table(ws2, ["Topic", "Text"], [["Caution", c] for c in CAUTIONS]
                + [["Cut set", cs.label], ["Assays", str(len(df))]], widths=[20, 120])
    buf = _io.BytesIO()
    wb.save(buf)
    files = {"library_summary.xlsx": buf.getvalue(),
             "library_summary.csv": csv_text(heads, df.values.tolist()).encode("utf-8")}
    return place_files(folder, files, tuple(inputs))


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
            pts[pv] = (tv - 32.0) / 1.8 if unit == TUnit.F else tv
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
            conv = (lambda x: x * 1.8 + 32.0) if unit == TUnit.F else (lambda x: x)
            typer.echo(f"{p:8g}  {'' if src is None else f'{conv(src):.1f}':>12}  {conv(t):12.1f}")
    for w in warnings:
        typer.echo(f"warning: {w}", err=True)


class Basis(str, enum.Enum):
    vol = "vol"
    wt = "wt"


PricesOpt = Annotated[Optional[Path], typer.Option("--prices", help="Price file (TOML): [products] price per cut "
                                                    "per_bbl or per_t, optional [crudes] prices.", dir_okay=False)]


@app.command()
@guarded
def compare(
    assays: Annotated[list[str], typer.Argument(help="Two or more assays (files, folders or globs).")],
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    prices: PricesOpt = None,
    json_out: JsonOpt = False,
    out: Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/compare/.",
                                                file_okay=False)] = None,
    end: EndOpt = None,
    uncertainty: UncertOpt = 0,
) -> None:
    """Compare crudes for crude selection: every assay cut with the same cut set, side by side.

    Shows yields on both bases and the key qualities per product (API, sulfur, Watson K, limit status).
    With --prices, ranks the crudes by gross product worth and margin over the crude price per barrel and
    per tonne. Worth ignores operating costs, unit capacities, quality give-away and freight.
    """
    from .io.tomlfiles import read_limits, read_prices
    from .studies import WORTH_CAVEAT, comparison_table, worth_table
    from .yields import run_yields

    paths = resolve_assays(assays)
    if len(paths) < 2:
        raise AssaycutError("compare needs at least two assays")
    cs = load_cut_set(cuts, end)
    lim = read_limits(str(limits) if limits else None)
    ps = read_prices(str(prices)) if prices else None
    results = [run_yields(_load(p, None, None, None, None), cs, lim, uncertainty_draws=uncertainty) for p in paths]
    table = comparison_table(results)
    worth = worth_table(results, ps) if ps else None
    inside = _inside_bands(results) if uncertainty else []
    if out is not None or not json_out:
        from .report.studyreports import compare_workbook, plot_compare
        from .report.write import place_files, png_bytes

        buf = __import__("io").BytesIO()
        compare_workbook(results, table, worth, ps.currency if ps else None).save(buf)
        files = {"comparison.xlsx": buf.getvalue(), "comparison_yields.png": png_bytes(plot_compare, table)}
        inputs = tuple(paths) + tuple(str(x) for x in (cuts, limits, prices) if x)
        written = place_files(out or Path("reports") / "compare", files, inputs)
    if json_out:
        from .yields import _clean

        typer.echo(json.dumps({"assays": [r.to_dict() for r in results],
                               "worth": [{k: _clean(v) for k, v in r.items()} for r in worth.to_dict("records")]
                               if worth is not None else [],
                               "inside_bands": [{"cut": c, "crudes": [a, b]} for c, a, b in inside],
                               "notes": [WORTH_CAVEAT] if worth is not None else []}, indent=2, ensure_ascii=False))
        return
    from .report.studyreports import compare_wide

    crudes, rows = compare_wide(table)
    w = max(len(c) for c in crudes) + 2
    typer.echo(f"{'Cut':<16}{'Quality':<22}" + "".join(f"{c:>{w}}" for c in crudes))
    for r in rows:
        vals = "".join(f"{(f'{v:.3f}' if isinstance(v, float) and v == v else (v or '-')):>{w}}" for v in r[2:])
        typer.echo(f"{r[0]:<16}{r[1]:<22}{vals}")
    if worth is not None:
        typer.echo(f"\nGross product worth and margin [{ps.currency}] -- {WORTH_CAVEAT}")
        for r in worth.to_dict("records"):
            m = r["margin_per_bbl"]
            typer.echo(f"  {r['rank']}. {r['crude']:<24} worth {r['worth_per_bbl']:8.2f}/bbl {r['worth_per_t']:8.2f}/t"
                       + (f"   margin {m:+7.2f}/bbl {r['margin_per_t']:+7.2f}/t" if m == m else "   (no crude price)"))
    if uncertainty:
        typer.echo("\nYield differences inside the P10-P90 bands (not significant under the assumed measurement "
                   "uncertainty):")
        for c, a, b in inside:
            typer.echo(f"  {c}: {a} ~ {b}")
        if not inside:
            typer.echo("  none")
    typer.echo(f"Report written to {written[0].parent} ({len(written)} files).")


def _inside_bands(results) -> list[tuple[str, str, str]]:
    """(cut, crude, crude) where two crudes' volume-yield P10-P90 bands overlap."""
    from .uncertainty import overlapping

    out = []
    for j, cut in enumerate(results[0].cuts["name"]):
        bands = {r.assay.name: (float(r.bands["vol_pct_p10"].iloc[j]), float(r.bands["vol_pct_p90"].iloc[j]))
                 for r in results}
        out += [(cut, a, b) for a, b in overlapping(bands)]
    return out


def _parse_shares(items: list[str]) -> list[tuple[str, float]]:
    out = []
    for it in items:
        path, sep, pct = it.rpartition("=")
        if not sep or not path:
            raise AssaycutError(f"{it!r}: expected ASSAY=PERCENT, e.g. selkie.xlsx=60")
        try:
            out.append((path, float(pct)))
        except ValueError:
            raise AssaycutError(f"{it!r}: {pct!r} is not a percent") from None
    return out


class BlendObjective(str, enum.Enum):
    worth = "worth"
    cost = "cost"


@app.command()
@guarded
def blend(
    shares: Annotated[list[str], typer.Argument(help="ASSAY=PERCENT for each crude (the percents add up to 100); "
                                                "with --optimize, ASSAY or ASSAY=MIN:MAX share bounds in %.",
                                                metavar="ASSAY=PCT")],
    out: Annotated[Optional[Path], typer.Option("--out", help="New assay workbook to write (.xlsx).",
                                                dir_okay=False)] = None,
    basis: Annotated[Basis, typer.Option("--basis", help="Basis of the shares and of the blended curve.")] = Basis.vol,
    name: Annotated[Optional[str], typer.Option("--name", help="Name of the blend.")] = None,
    shrinkage: Annotated[bool, typer.Option("--shrinkage", help="Apply API MPMS 12.3 light-ends shrinkage "
                                            "(off by default).")] = False,
    optimize_: Annotated[bool, typer.Option("--optimize", help="Find the shares that meet the targets at the "
                                            "best worth (or lowest crude cost) instead of taking them.")] = False,
    prices: PricesOpt = None,
    objective: Annotated[BlendObjective, typer.Option("--objective", help="With --optimize: 'worth' (margin "
                                                      "when crude prices are given) or 'cost' (cheapest crude "
                                                      "slate).")] = BlendObjective.worth,
    api_min: Annotated[Optional[float], typer.Option("--api-min", help="Target: blend API at least [°API].")] = None,
    api_max: Annotated[Optional[float], typer.Option("--api-max", help="Target: blend API at most [°API].")] = None,
    sulfur_max: Annotated[Optional[float], typer.Option("--sulfur-max", help="Target: blend sulfur at most "
                                                        "[wt %].")] = None,
    min_yield: Annotated[Optional[list[str]], typer.Option("--min-yield", metavar="CUT=PCT",
                                                           help="Target: a cut's yield at least PCT vol %. "
                                                                "Repeatable.")] = None,
    cuts: CutsOpt = None,
) -> None:
    """Blend crudes into a new assay workbook that every command can read, or (--optimize) find the blend.

    The blended TBP curve is the share-weighted sum of the parents' cumulative curves on the chosen basis,
    over the range all parents measured. Gravity blends by volume on SG (never by averaging API); sulfur and
    other mass-based properties by weight; viscosity by the Refutas blending number. The new assay's notes
    record its parents and their sha256.

    With --optimize, the shares (volume basis, within each crude's MIN:MAX bounds) are chosen by linear
    programming to meet the targets (--api-min/--api-max, --sulfur-max, --min-yield) at the best margin or
    gross worth per barrel, or the lowest crude cost. These linear blending rules ignore shrinkage and
    operating costs. Where the targets cannot all be met, it says which ones, and by how much, and exits
    with code 1. A plot of the plan (blend_plan.png) goes beside --out, or to reports/blend/.
    """
    from .blending import blend as do_blend
    from .crude import build_model
    from .io.assaywriter import write_assay_workbook

    if out is not None and out.suffix.lower() != ".xlsx":
        raise AssaycutError(f"{out}: the blend is written as an assay workbook; give a path ending in .xlsx")
    if optimize_:
        plan, parents = _optimize_blend(shares, prices, objective, api_min, api_max, sulfur_max, min_yield, cuts,
                                        out.parent if out is not None else Path("reports") / "blend")
        if not plan.feasible:
            raise typer.Exit(1)
        items = [(p, plan.shares_pct[a.name]) for p, a, _ in parents if plan.shares_pct[a.name] > 1e-6]
        chosen = [(a, m, plan.shares_pct[a.name]) for _, a, m in parents if plan.shares_pct[a.name] > 1e-6]
        total = sum(x for _, _, x in chosen)
        chosen = [(a, m, x * 100.0 / total) for a, m, x in chosen]
        if out is None:
            return
        new = do_blend(chosen, basis="vol", name=name, shrinkage=shrinkage)
        write_assay_workbook(new, str(out), inputs=tuple(p for p, _ in items))
        typer.echo(f"Optimal blend written to {out}")
        return
    if out is None:
        raise AssaycutError("give --out NEW.xlsx for the blended assay")
    items = _parse_shares(shares)
    parents = []
    for path, pct in items:
        a = _load(path, None, None, None, None)
        parents.append((a, build_model(a), pct))
    new = do_blend(parents, basis=basis.value, name=name, shrinkage=shrinkage)
    write_assay_workbook(new, str(out), inputs=tuple(p for p, _ in items))
    typer.echo(f"Blend {new.name}: {new.api:.1f} °API, SG {new.sg:.4f}, sulfur "
               + (f"{new.sulfur_wt_pct:.3f} wt %" if new.sulfur_wt_pct is not None else "n/a"))
    for n in new.notes:
        typer.echo(f"  {n}")
    typer.echo(f"Assay workbook written to {out}")


def _optimize_blend(shares, prices, objective, api_min, api_max, sulfur_max, min_yield, cuts, folder: Path):
    """Run the blend optimiser for the CLI and print (and plot) its plan."""
    from .blendopt import BlendTargets, optimize_blend
    from .crude import build_model
    from .io.tomlfiles import read_prices
    from .report.studyreports import plot_blend_plan
    from .report.write import place_files, png_bytes
    from .yields import run_yields

    cs = load_cut_set(cuts, None)
    ps = read_prices(str(prices)) if prices else None
    parents, bounds = [], {}
    for it in shares:
        path, sep, rng = it.rpartition("=") if "=" in it else (it, "", "")
        a = _load(path, None, None, None, None)
        m = build_model(a)
        parents.append((path, a, m))
        if sep:
            lo, colon, hi = rng.partition(":")
            try:
                bounds[a.name] = (float(lo), float(hi)) if colon else (float(lo), float(lo))
            except ValueError:
                raise AssaycutError(f"{it!r}: expected ASSAY=MIN:MAX share bounds in %, e.g. crude.xlsx=10:60") from None
    results = [run_yields(a, cs, None, model=m) for _, a, m in parents]
    targets = BlendTargets(api_min, api_max, sulfur_max, parse_ends(min_yield, option="--min-yield",
                                                                    what="a yield in vol %"))
    plan = optimize_blend(results, bounds, targets, ps, objective.value)
    head = "Optimal blend" if plan.feasible else "The targets cannot all be met; the closest blend"
    typer.echo(f"{head} ({plan.objective} {plan.value:.2f}):")
    for nm, x in plan.shares_pct.items():
        typer.echo(f"  {nm:<28}{x:7.2f} %")
    typer.echo(f"  blend API {plan.api:.2f} °API, sulfur {plan.sulfur_wt_pct:.3f} wt %; yields "
               + ", ".join(f"{k} {v:.1f}" for k, v in plan.yields.items()) + " vol %")
    if plan.binding:
        typer.echo("  binding targets: " + "; ".join(plan.binding))
    for lab, amount in plan.shortfalls.items():
        unit = "°API" if "API" in lab else ("wt %" if "sulfur" in lab else "vol %")
        typer.echo(f"  target not met: {lab}, short by {amount:.3f} {unit}")
    typer.echo("  Linear blending rules (no shrinkage); worth ignores operating costs and unit limits.")
    written = place_files(folder, {"blend_plan.png": png_bytes(plot_blend_plan, plan)},
                          tuple(p for p, _, _ in parents))
    typer.echo(f"  Plot written to {written[0]}")
    return plan, parents


@app.command()
@guarded
def shift(
    assay: Annotated[Optional[str], typer.Argument(help="Assay. Default: the demo.")] = None,
    end: EndOpt = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Show what a change of cut point moves: per-cut deltas in yield, SG, sulfur, D86, CCI, flash and limits.

    Compares the base cut set with the one changed by --end NAME=TEMP_C (repeatable). Changed cuts are marked
    with '*'; limits that flip are listed. Shift deltas add up to zero on each basis.
    """
    from .crude import build_model
    from .io.tomlfiles import read_limits
    from .studies import shift_delta
    from .yields import _clean, run_yields

    if not end:
        raise AssaycutError("give at least one --end NAME=TEMP_C to change")
    base_cs = load_cut_set(cuts, None)
    new_cs = load_cut_set(cuts, end)
    lim = read_limits(str(limits) if limits else None)
    path = resolve_assays([assay] if assay else None)[0]
    a = _load(path, None, None, None, None)
    model = build_model(a)
    base = run_yields(a, base_cs, lim, model=model)
    new = run_yields(a, new_cs, lim, model=model)
    delta = shift_delta(base, new)
    if json_out:
        typer.echo(json.dumps({"base": base.to_dict(), "new": new.to_dict(),
                               "delta": [{k: _clean(v) for k, v in r.items()} for r in delta.to_dict("records")]},
                              indent=2, ensure_ascii=False))
        return
    from .report.studyreports import shift_text

    typer.echo(f"{a.name}: cut-point change " + ", ".join(f"{k} -> {v:g} °C" for k, v in parse_ends(end).items()))
    typer.echo(shift_text(delta))


@app.command()
@guarded
def sweep(
    assay: Annotated[Optional[str], typer.Argument(help="Assay. Default: the demo.")] = None,
    end: Annotated[str, typer.Option("--end", help="Name of the cut whose end point moves.")] = "kerosene",
    t_from: Annotated[float, typer.Option("--from", help="First cut point [°C TBP].")] = 200.0,
    t_to: Annotated[float, typer.Option("--to", help="Last cut point [°C TBP].")] = 260.0,
    step: Annotated[float, typer.Option("--step", help="Step [°C].", min=1e-3)] = 5.0,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    out: Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/<crude>/.",
                                                file_okay=False)] = None,
    json_out: JsonOpt = False,
) -> None:
    """Sweep one cut point and show the yield and key qualities of the two neighbouring cuts.

    The curve an engineer reads to pick a cut point against a product limit: yields on both bases,
    density, D86 10 % / 95 % at the boundary, flash estimate and cetane index, as a table, a CSV and a PNG
    with the product limits drawn in.
    """
    from .crude import build_model
    from .io.tomlfiles import read_limits
    from .studies import sweep as do_sweep

    cs = load_cut_set(cuts, None)
    lim = read_limits(str(limits) if limits else None)
    path = resolve_assays([assay] if assay else None)[0]
    a = _load(path, None, None, None, None)
    df = do_sweep(build_model(a), cs, end, t_from, t_to, step)
    lo, hi = df.attrs["lower"], df.attrs["upper"]
    if out is not None or not json_out:
        from .report.studyreports import plot_sweep
        from .report.write import csv_text, place_files, png_bytes, slug

        rel = [x for x in lim if x.cut in (lo, hi)]
        base = f"{slug(a.name)}_sweep_{slug(end)}"
        files = {f"{base}.csv": csv_text(list(df.columns), df.values.tolist()).encode("utf-8"),
                 f"{base}.png": png_bytes(plot_sweep, df, a.name, rel)}
        written = place_files(out or Path("reports") / slug(a.name), files, (path,))
    if json_out:
        from .yields import _clean

        typer.echo(json.dumps({"assay": a.name, "lower": lo, "upper": hi,
                               "points": [{k: _clean(v) for k, v in r.items()} for r in df.to_dict("records")]},
                              indent=2, ensure_ascii=False))
        return
    typer.echo(f"{a.name}: cut point between {lo!r} and {hi!r}")
    typer.echo(f"{'cut °C':>7} {'lower vol%':>10} {'upper vol%':>10} {'lower SG':>9} {'upper SG':>9} "
               f"{'lower D86 95':>12} {'upper D86 10':>12} {'upper flash*':>12}")
    for r in df.to_dict("records"):
        typer.echo(f"{r['cut_point_c']:7.1f} {r['lower_vol_pct']:10.2f} {r['upper_vol_pct']:10.2f} "
                   f"{r['lower_sg']:9.4f} {r['upper_sg']:9.4f} {r['lower_d86_95_c']:12.1f} {r['upper_d86_10_c']:12.1f} "
                   f"{r['upper_flash_c_est']:12.1f}")
    typer.echo("* flash estimates must be measured (ASTM D93).")
    typer.echo(f"Sweep written to {written[0].parent} ({len(written)} files).")


@app.command()
@guarded
def optimize(
    assay: Annotated[Optional[str], typer.Argument(help="Assay. Default: the demo.")] = None,
    maximize: Annotated[Optional[str], typer.Option("--maximize", help="Product (cut name) whose volume yield "
                                                    "is maximised by moving its two cut points.")] = None,
    prices: PricesOpt = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    span: Annotated[float, typer.Option("--span", help="How far each cut point may move from its starting "
                                        "value [°C].", min=1.0, max=400.0)] = 60.0,
    out: Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/<crude>/.",
                                                file_okay=False)] = None,
    json_out: JsonOpt = False,
) -> None:
    """Find the cut points that maximise a product's yield (--maximize NAME) or the crude's worth
    (--prices FILE) while every product limit is met.

    With --maximize, the two cut points around the product move (each within --span of where it starts;
    the other cut points stay); the limits of the product and its two neighbours apply. With --prices, every
    cut point moves and every limit applies. The search starts from a brute-force grid and refines with
    scipy's SLSQP; the answer is checked against every limit and never breaks one. Limits the estimates
    cannot evaluate (n/a) do not constrain, and a limit that can be evaluated at the start must stay so:
    e.g. the flash estimate is made for cuts starting at 150 °C or above, so a kerosene start is held there.
    The answer rests on estimated qualities: confirm with the laboratory and your column's real
    fractionation before moving cut points.
    """
    from .crude import build_model
    from .io.tomlfiles import read_limits, read_prices
    from .optimize import optimize_cut_points
    from .yields import run_yields

    cs = load_cut_set(cuts, None)
    lim = read_limits(str(limits) if limits else None)
    ps = read_prices(str(prices)) if prices else None
    path = resolve_assays([assay] if assay else None)[0]
    a = _load(path, None, None, None, None)
    model = build_model(a)
    res = optimize_cut_points(model, cs, lim, maximize=maximize, prices=ps, span_c=span)
    new_cs = cs.with_ends({c.name: float(e) for c, e in zip(cs.cuts, res.ends_c)}, cs.label + " optimised")
    before = run_yields(a, cs, lim, model=model)
    after = run_yields(a, new_cs, lim, model=model)
    unit = "vol %" if maximize else f"{ps.currency}/bbl"
    what = f"{maximize} yield" if maximize else "gross product worth"
    if out is not None or not json_out:
        from .report.studyreports import plot_optimum
        from .report.write import place_files, png_bytes, slug

        moved = [f"end of {cs.names[i]}" for i in res.var_index]
        title = f"{a.name}: maximise {what} inside the product limits (estimates)"
        files = {f"{slug(a.name)}_optimum.png": png_bytes(plot_optimum, res, moved, title=title,
                                                           objective_label=f"{what} [{unit}]",
                                                           before=before.cuts, after=after.cuts)}
        written = place_files(out or Path("reports") / slug(a.name), files, (path,))
    if json_out:
        from .yields import _clean

        typer.echo(json.dumps({
            "assay": a.name, "objective": what, "unit": unit, "feasible": res.feasible,
            "start": {"cut_points_c": dict(zip(cs.names, map(float, res.start_ends_c))), "value": res.start_objective},
            "optimum": {"cut_points_c": dict(zip(cs.names, map(float, res.ends_c))), "value": res.objective},
            "grid_best": _clean(res.grid_best), "active_limits": res.active,
            "limits_broken_at_start": res.violated_at_start, "limits_not_evaluated": res.not_evaluated,
            "cuts": after.to_dict()["cuts"]}, indent=2, ensure_ascii=False))
        return
    typer.echo(f"{a.name}: maximise {what}")
    if not res.feasible:
        typer.echo("No cut points within the span meet every limit. Limits broken at the start: "
                   + "; ".join(res.violated_at_start))
    typer.echo(f"{'cut':<18}{'start °C':>10}{'optimum °C':>12}")
    for c, s0, s1 in zip(cs.cuts[:-1], res.start_ends_c, res.ends_c):
        typer.echo(f"{c.name:<18}{s0:10.1f}{s1:12.1f}" + ("  *" if abs(s1 - s0) > 1e-9 else ""))
    typer.echo(f"{what}: {res.start_objective:.2f} -> {res.objective:.2f} {unit} (brute-force grid best "
               f"{res.grid_best:.2f})")
    if res.active:
        typer.echo("Active limits: " + "; ".join(res.active))
    if res.violated_at_start:
        typer.echo("Limits broken at the start: " + "; ".join(res.violated_at_start))
    if res.not_evaluated:
        typer.echo("Not evaluated (n/a, not constraining): " + "; ".join(res.not_evaluated))
    typer.echo("Qualities are estimates; flash points must be measured (ASTM D93).")
    typer.echo(f"Plot written to {written[0]}")


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
