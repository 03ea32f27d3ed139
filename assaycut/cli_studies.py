"""Study commands of the command line: compare, blend (and --optimize), shift, sweep, optimize.

A thin shell like :mod:`assaycut.cli`, whose app, options and helpers they share; heavy libraries are
imported inside the commands."""

from __future__ import annotations

import enum
import io
import json
from pathlib import Path
from typing import Annotated, Optional

import typer

from .cli import (CutsOpt, EndOpt, JsonOpt, LimitsOpt, UncertOpt, _load, app, guarded, load_cut_set, parse_ends,
                  resolve_assays)
from .errors import AssaycutError

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

        buf = io.BytesIO()
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
