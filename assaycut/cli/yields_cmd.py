"""The yield report (the main job), the assay check and the blank assay template."""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import AssaycutError
from .common import (
    EXIT_INPUT,
    EXIT_NO_ANSWER,
    ApiOpt,
    CutsOpt,
    DensOpt,
    EndOpt,
    JsonOpt,
    LimitsOpt,
    RateOpt,
    ScaleOpt,
    SgOpt,
    SulfurOpt,
    MethodOpt,
    TdMethod,
    PlotSet,
    PlotsOpt,
    TUnit,
    UncertOpt,
    echo_json,
    echo_lines,
    json_text,
    error_line,
    guarded,
    check_whole_crude,
    load_one,
    load_cut_set,
    load_limits,
    resolve_assays,
    say,
)

app = typer.Typer()


BRIEF_OVER = 10
"""Batches larger than this print a one-line summary instead of every cut table."""

SigTempOpt = Annotated[float, typer.Option("--sigma-temp", min=0.0, max=50.0, help="1-sigma of each curve "
                                           "temperature [°C]; default an assumption to confirm.", metavar="DEG_C")]
SigPctOpt = Annotated[float, typer.Option("--sigma-pct", min=0.0, max=10.0, help="1-sigma of each percent "
                                          "distilled [%]; default an assumption to confirm.", metavar="PCT")]
SigSgOpt = Annotated[float, typer.Option("--sigma-sg", min=0.0, max=0.05, help="1-sigma of specific gravity; "
                                         "default an assumption to confirm.", metavar="SG")]
SigSOpt = Annotated[float, typer.Option("--sigma-sulfur", min=0.0, max=50.0, help="1-sigma of sulfur, in % "
                                        "of the value; default an assumption to confirm.", metavar="PCT")]


@app.command()
@guarded
def yields(
    assays: Annotated[Optional[list[str]], typer.Argument(help="Assay workbooks (.xlsx) or curve CSVs, "
                                                          "folders or globs. Default: the demo assay.",
                                                          metavar="ASSAY...")] = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    out: Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/<crude>/. "
                                                "With --json and no --out, no files are written.",
                                                file_okay=False, metavar="DIR")] = None,
    json_out: JsonOpt = False,
    end: EndOpt = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    method: MethodOpt = TdMethod.daubert_1994,
    summary_only: Annotated[bool, typer.Option("--summary-only", help="With several assays, write only the "
                                               "library summary (xlsx and CSV), not each assay's report.")] = False,
    overlap: Annotated[Optional[list[str]], typer.Option(
        "--overlap", metavar="NAME=WIDTH_C",
        help="Real-column products: the TBP 5-95 overlap at the end of cut NAME, in °C (0 = ideal cut). The "
             "heavy tail of one product then reaches into the next; yields, D86, flash and limit checks use "
             "the products' own curves. Repeatable; also `overlap_c` in the cut file.")] = None,
    rate: RateOpt = None,
    unit: Annotated[TUnit, typer.Option("--unit", help="Temperature unit of the printed tables and the report "
                                           "sheets and CSVs (JSON stays in °C).", metavar="C|F")] = TUnit.C,
    uncertainty: UncertOpt = 0,
    sigma_temp: SigTempOpt = 2.0,
    sigma_pct: SigPctOpt = 0.3,
    sigma_sg: SigSgOpt = 0.0005,
    sigma_sulfur: SigSOpt = 3.0,
    scale_cuts: ScaleOpt = False,
    plots: PlotsOpt = PlotSet.main,
) -> None:
    """Cut assays at the cut points and report yields and qualities per cut (the main job).

    Prints the cut table, writes an xlsx report (summary, cuts, curve on both bases, limit status, notes),
    a CSV of the cuts, a Markdown summary and PNG plots. Yields are on the volume and weight basis of the
    whole crude; qualities are correlation estimates for screening, not measured properties.

    With several assays (files, folders or globs) it also writes a library summary, one row per assay;
    large batches run in worker processes with a progress bar, and a bad file is reported and skipped
    (exit code 2 at the end).
    """
    from ..studies.uncertainty import Sigmas
    from .batch_runner import FOLDER_NOTE, YieldJob, new_claims, release_claims, run_batch

    cs = load_cut_set(cuts, end, overlap)
    lim = load_limits(limits)
    paths = resolve_assays(assays)
    check_whole_crude(paths, api, sg, density, sulfur)
    inputs = tuple(paths) + tuple(str(x) for x in (cuts, limits) if x)
    write = out is not None or not json_out
    root = (out or Path("reports")) if write and not summary_only else None
    summary = summary_only and write and not json_out and len(paths) > BRIEF_OVER
    output = ("summary" if summary else "result" if write or not json_out
              else "json-line" if len(paths) > BRIEF_OVER else "json")
    job = YieldJob(cs, [] if summary else lim, method.value, (api, sg, density, sulfur), root,
                   single_folder=out is not None and len(paths) == 1, inputs=inputs, uncertainty_draws=uncertainty,
                   sigmas=Sigmas(sigma_temp, sigma_pct, sigma_sg, sigma_sulfur / 100.0), rate_bbl_per_day=rate,
                   unit=unit.value, claims=new_claims(root) if root is not None and len(paths) > 1 else "",
                   output=output, scale_cuts=scale_cuts, plots=plots.value)
    if root is not None and len(paths) <= BRIEF_OVER and sys.stderr.isatty():  # a batch shows a progress bar
        say("cutting and writing the report…", err=True)
    try:
        results, written, failures = run_batch(paths, job)
    finally:
        if job.claims:
            release_claims(job.claims)
    suffixed = [w for r in results for w in r.warnings if w.startswith(FOLDER_NOTE)]
    if suffixed and (json_out or len(results) > BRIEF_OVER):
        say(f"note: {len(suffixed)} report folder(s) took a suffix because crude names gave the same folder name: "
            + "; ".join(suffixed[:5]) + (" ..." if len(suffixed) > 5 else ""), err=True)
    if len(paths) == 1 and failures:
        raise AssaycutError(failures[0][1])
    for _, msg in failures:
        error_line(f"skipped: {msg}")
    if write and len(paths) > 1 and results:
        from ..report.write import write_library_summary

        written += write_library_summary(results, cs, out or Path("reports"), inputs)
    if json_out:
        from ..report.jsonout import yields_document

        if job.output == "json-line" and results:  # objects encoded in the workers: join them
            texts = [r.json_text for r in results]
            typer.echo('{"assays":[' + ",".join(texts) + '],"errors":'
                       + json_text([m for _, m in failures], compact=True) + "}")
        else:
            echo_json(yields_document(results, len(paths), failures), compact=len(paths) > BRIEF_OVER)
        if failures:
            raise typer.Exit(EXIT_INPUT)
        return
    _print_report(results, written, len(cs.names), unit.value)
    if failures:
        error_line(f"{len(failures)} of {len(paths)} assays failed and were skipped (see above)")
        raise typer.Exit(EXIT_INPUT)


def _print_report(results, written, n_cuts: int, unit: str = "C") -> None:
    """The cut tables (or a one-line summary for a large batch), warnings, the flash caution, the files."""
    from ..report.console import FLASH_FOOTNOTE, warning_lines, written_text, yield_text

    if len(results) > BRIEF_OVER:
        say(f"{len(results)} assays cut with {n_cuts} cuts; see the library summary.")
    else:
        for r in results:
            echo_lines(yield_text(r, unit))
    from ..report.textgrid import wrap

    say("")
    echo_lines(wrap(FLASH_FOOTNOTE, indent="  "))
    sys.stdout.flush()
    for line in warning_lines(results, unit):  # before the last line, so that "written" ends the run
        say(line, err=True)
    sys.stderr.flush()
    if written:
        say(written_text(written))


@app.command()
@guarded
def check(
    assay: Annotated[Optional[str], typer.Argument(help="Assay workbook or curve CSV. Default: the demo.",
                                                   metavar="ASSAY")] = None,
    json_out: JsonOpt = False,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    scale_cuts: ScaleOpt = False,
) -> None:
    """Check an assay's quality: closure, gravity agreement, curve coverage, narrow cuts, sulfur balance.

    Each finding has a severity (error, warning, info) and says where it was found. Exit code 1 when any
    finding is an error.
    """
    from ..model.crude import build_model
    from ..studies.assay_checks import check_assay

    path, a = load_one(assay, api, sg, density, sulfur)
    findings = check_assay(a, build_model(a, reconcile=scale_cuts))
    ok = not any(f.severity == "error" for f in findings)
    if json_out:
        from ..report.jsonout import check_json

        echo_json(check_json(findings, ok))
    else:
        from ..report.console import check_text

        echo_lines(check_text(a.name, findings, ok))
    if not ok:
        raise typer.Exit(EXIT_NO_ANSWER)


@app.command()
@guarded
def template(
    path: Annotated[Path, typer.Argument(metavar="FILE", help="Workbook to write (.xlsx).", dir_okay=False)],
) -> None:
    """Write a blank assay workbook in assaycut's layout, with an instruction row per sheet, for a
    laboratory to fill in."""
    if path.suffix.lower() != ".xlsx":
        raise AssaycutError(f"{path}: the template is an Excel workbook; give a path ending in .xlsx")
    if path.exists():
        raise AssaycutError(f"{path}: already exists; choose a new file name (nothing was overwritten)")
    from ..io.assaywriter import write_assay_workbook

    write_assay_workbook(None, str(path))
    say(f"Blank assay workbook written to {path}")
