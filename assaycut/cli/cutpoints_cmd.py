"""Cut-point studies: what a change of cut point moves, one cut point swept, and the optimum cut points."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import AssaycutError
from .common import (
    EXIT_NO_ANSWER,
    ApiOpt,
    AssayArg,
    CutsOpt,
    DensOpt,
    EndOpt,
    OutOpt,
    JsonOpt,
    LimitsOpt,
    PricesOpt,
    SgOpt,
    SulfurOpt,
    TUnit,
    UnitOpt,
    check_whole_crude,
    echo_json,
    echo_lines,
    guarded,
    load_cut_set,
    load_limits,
    load_one,
    load_prices,
    parse_ends,
    progress_bar,
    say,
)

app = typer.Typer()



@app.command()
@guarded
def vectors(
    assays: Annotated[Optional[list[str]], typer.Argument(help="Assays (files, folders or globs). Default: the "
                                                          "demo assay.", metavar="ASSAY...")] = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    json_out: JsonOpt = False,
    out: Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/<crude>/. With "
                                                "--json and no --out, no files are written.", file_okay=False,
                                                metavar="DIR")]
    = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
) -> None:
    """Base and delta vectors for planning models: each crude's base cut table, and for each cut point the
    change per °C of every cut's yields and qualities.

    The deltas are central differences of the exact model (each cut point moved by ±0.5 °C, the others
    held). Writes <crude>_vectors.xlsx and <crude>_vectors_long.csv; --json prints them.
    """
    from ..model.crude import build_model
    from ..studies.cutpoints import VECTOR_STEP_C, cut_point_vectors
    from .common import load, resolve_assays

    cs = load_cut_set(cuts, None)
    lim = load_limits(limits)
    paths = resolve_assays(assays)
    check_whole_crude(paths, api, sg, density, sulfur)
    entries, written = [], []
    for p in paths:
        a = load(p, api, sg, density, sulfur)
        base, deltas = cut_point_vectors(build_model(a), cs)
        if lim:
            from ..cutting.limits import check_limits

            status = {(x["cut"]): x["status"] for x in check_limits(base, lim).rows() if x["status"] == "fail"}
            base = base.with_columns(base.keys[-1], {"limits": [("fail" if n in status else "") for n in base["name"]]})
        entries.append((a.name, base, deltas))
        if out is not None or not json_out:
            from ..report.studyreports import vectors_files
            from ..files import place_set
            from ..report.write import slug

            folder = out if out is not None and len(paths) == 1 else (out or Path("reports")) / slug(a.name)
            written += place_set(folder, vectors_files(a.name, base, deltas, VECTOR_STEP_C), (p,))
    if json_out:
        from ..report.jsonout import vectors_json

        echo_json(vectors_json(entries, VECTOR_STEP_C))
        return
    from ..report.console import written_text

    for name, base, deltas in entries:
        say(f"{name}: base cut table and per-°C vectors for {len(deltas)} cut points (±{VECTOR_STEP_C:g} °C)")
    say(written_text(written, "Vectors"))


@app.command()
@guarded
def shift(
    assay: AssayArg = None,
    end: EndOpt = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    json_out: JsonOpt = False,
    out: OutOpt = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    unit: UnitOpt = TUnit.C,
) -> None:
    """Show what a change of cut point moves: per-cut deltas in yield, SG, sulfur, D86, CCI, flash and limits.

    Compares the base cut set with the one changed by --end NAME=TEMP_C (repeatable). Changed cuts are marked
    with '*'; limits that flip are listed. Shift deltas add up to zero on each basis. Prints and writes
    (<crude>_shift.csv) the new values beside the changes.
    """
    from ..model.crude import build_model
    from ..studies.cutpoints import shift_delta
    from ..yields import run_yields

    if not end:
        raise AssaycutError("give at least one --end NAME=TEMP_C to change")
    base_cs = load_cut_set(cuts, None)
    new_cs = load_cut_set(cuts, end)
    lim = load_limits(limits)
    path, a = load_one(assay, api, sg, density, sulfur)
    model = build_model(a)
    base = run_yields(a, base_cs, lim, model=model)
    new = run_yields(a, new_cs, lim, model=model)
    delta = shift_delta(base, new)
    if json_out:
        from ..report.jsonout import shift_json

        echo_json(shift_json(base, new, delta))
        return
    from ..report.console import shift_text, written_text
    from ..report.studyreports import shift_csv
    from ..files import place_set
    from ..report.write import slug

    from ..report.tables import text_in_unit

    u = unit.value
    say(f"{a.name}: cut-point change " + ", ".join(text_in_unit(f"{k} -> {v:g} °C", u)
                                                    for k, v in parse_ends(end).items()))
    say(shift_text(delta, unit=u))
    written = place_set(out or Path("reports") / slug(a.name),
                        {f"{slug(a.name)}_shift.csv": shift_csv(delta, u)}, (path,))
    say(written_text(written))


@app.command()
@guarded
def sweep(
    assay: AssayArg = None,
    end: Annotated[str, typer.Option("--end", help="Name of the cut whose end point moves.",
                                     metavar="CUT")] = "kerosene",
    t_from: Annotated[float, typer.Option("--from", metavar="TEMP_C", help="First cut point [°C TBP].")] = 200.0,
    t_to: Annotated[float, typer.Option("--to", metavar="TEMP_C", help="Last cut point [°C TBP].")] = 260.0,
    step: Annotated[float, typer.Option("--step", metavar="DEG_C", help="Step [°C].", min=1e-3)] = 5.0,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    out: OutOpt = None,
    json_out: JsonOpt = False,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    unit: UnitOpt = TUnit.C,
) -> None:
    """Sweep one cut point and show the yield and key qualities of the two neighbouring cuts.

    The curve an engineer reads to pick a cut point against a product limit: yields on both bases,
    density, D86 10 % / 95 % at the boundary, flash estimate and cetane index, as a table, a CSV and a PNG
    with the product limits drawn in.
    """
    from ..model.crude import build_model
    from ..studies.cutpoints import sweep as do_sweep

    cs = load_cut_set(cuts, None)
    lim = load_limits(limits)
    path, a = load_one(assay, api, sg, density, sulfur)
    df = do_sweep(build_model(a), cs, end, t_from, t_to, step)
    if out is not None or not json_out:
        from ..report.studyreports import plot_sweep, sweep_headers
        from ..report.tables import frame_in_unit
        from ..files import place_set
        from ..report.write import csv_text, png_bytes, slug

        shown_df = frame_in_unit(df, unit.value)
        rel = [x for x in lim if x.cut in (df.attrs["lower"], df.attrs["upper"])]
        base = f"{slug(a.name)}_sweep_{slug(end)}"
        files = {f"{base}.csv": csv_text(sweep_headers(shown_df), shown_df.values.tolist()).encode("utf-8"),
                 f"{base}.png": png_bytes(plot_sweep, shown_df, a.name, rel, unit.value)}
        written = place_set(out or Path("reports") / slug(a.name), files, (path,))
    if json_out:
        from ..report.jsonout import sweep_json

        echo_json(sweep_json(a.name, df))
        return
    from ..report.console import sweep_text, written_text

    echo_lines(sweep_text(a.name, shown_df, unit.value))
    say(written_text(written, "Sweep"))


@app.command()
@guarded
def optimize(
    assay: AssayArg = None,
    maximize: Annotated[Optional[str], typer.Option("--maximize", help="Product (cut name) whose volume yield "
                                                    "is maximised by moving its two cut points.",
                                                    metavar="CUT")] = None,
    prices: PricesOpt = None,
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    span: Annotated[float, typer.Option("--span", help="How far each cut point may move from its starting "
                                        "value [°C].", min=1.0, max=400.0, metavar="DEG_C")] = 60.0,
    min_yield: Annotated[Optional[list[str]], typer.Option(
        "--min-yield", metavar="CUT=PCT",
        help="Keep product CUT at least PCT vol % of the crude. Repeatable; 'all=PCT' sets every product. "
             "Default: 3 vol % or half the starting yield, whichever is smaller; "
             "CUT=0 removes the guard rail.")] = None,
    free: Annotated[Optional[list[str]], typer.Option(
        "--free", metavar="CUT",
        help="With --prices: only the end of CUT moves (repeatable). Default: every cut point above the light "
             "ends.")] = None,
    out: OutOpt = None,
    json_out: JsonOpt = False,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    temp_unit: UnitOpt = TUnit.C,
) -> None:
    """Find the cut points that maximise a product's yield (--maximize NAME) or the crude's worth
    (--prices FILE) while every product limit is met.

    With --maximize, the two cut points around the product move (each within --span of where it starts;
    the other cut points stay); the limits of the product and its two neighbours apply. With --prices, every
    cut point above the light ends moves (the light-ends cut point is the stabiliser's), or only the --free
    ones, and every limit applies. Every product keeps a minimum yield (--min-yield).

    The search is global: differential evolution over all moving cut points with the limits as
    constraints, refined by SLSQP; it reports whether it converged. The answer is checked against every
    limit and never breaks one. Limits the estimates cannot evaluate (n/a) at the start do not constrain, and
    a limit that can be evaluated at the start must stay so: e.g. the cetane index is estimated only where
    the cut's D86 and density lie in its method's scope, so a diesel cut point that would take it out of
    scope is not chosen.

    Exit code 1 when no cut points within the span meet every limit: the limits that cannot be met are
    printed with their shortfall. The answer rests on estimated qualities: confirm with the laboratory and
    your column's real fractionation before moving cut points.
    """
    from ..model.crude import build_model
    from ..studies.cut_optimizer import optimize_cut_points
    from ..yields import run_yields

    cs = load_cut_set(cuts, None)
    lim = load_limits(limits)
    ps = load_prices(prices)
    mins = parse_ends(min_yield, option="--min-yield", what="a yield in vol %")
    path, a = load_one(assay, api, sg, density, sulfur)
    model = build_model(a)
    with progress_bar("searching cut points") as bar:
        res = optimize_cut_points(model, cs, lim, maximize=maximize, prices=ps, span_c=span, min_yields=mins,
                                  free=free, progress=bar)
    new_cs = cs.with_ends({c.name: float(e) for c, e in zip(cs.cuts, res.ends_c)}, cs.label + " optimised")
    tables = out is not None or not json_out  # the plot and the printed table read both runs' tables
    before = run_yields(a, cs, lim, model=model) if tables else None
    after = run_yields(a, new_cs, lim, model=model)
    unit = "vol %" if maximize else f"{ps.currency}/bbl"
    what = f"{maximize} yield" if maximize else "gross product worth"
    if tables:
        from ..report.studyreports import plot_optimum
        from ..files import place_set
        from ..report.write import png_bytes, slug

        title = f"{a.name}: maximise {what} inside the product limits (estimates)"
        files = {f"{slug(a.name)}_optimum.png": png_bytes(plot_optimum, res, res.variables, title=title,
                                                           objective_label=f"{what} [{unit}]",
                                                           before=before.cuts, after=after.cuts,
                                                           temp_unit=temp_unit.value)}
        written = place_set(out or Path("reports") / slug(a.name), files, (path,))
    if json_out:
        from ..report.jsonout import optimum_json

        echo_json(optimum_json(a.name, what, unit, res, cs.names, after))
    else:
        from ..report.console import optimum_text

        echo_lines(optimum_text(a.name, what, unit, res, cs, before.cuts, after.cuts, temp_unit.value, lim))
        say(f"Plot written to {written[0]}")
    if not res.feasible:
        raise typer.Exit(EXIT_NO_ANSWER)
