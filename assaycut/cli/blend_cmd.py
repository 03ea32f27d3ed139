"""Blends of crudes: a given blend written as a new assay workbook, or the shares that meet blend targets."""

from __future__ import annotations

import enum
import io
import json
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import AssaycutError
from .common import (
    EXIT_NO_ANSWER,
    ApiOpt,
    CutsOpt,
    DensOpt,
    PricesOpt,
    SgOpt,
    SulfurOpt,
    check_whole_crude,
    echo_lines,
    guarded,
    load,
    load_cut_set,
    load_prices,
    parse_ends,
    say,
)

app = typer.Typer()


class Basis(str, enum.Enum):
    vol = "vol"
    wt = "wt"


class BlendObjective(str, enum.Enum):
    worth = "worth"
    cost = "cost"


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


@app.command()
@guarded
def blend(
    shares: Annotated[list[str], typer.Argument(help="ASSAY=PERCENT for each crude (the percents add up to 100); "
                                                "with --optimize, ASSAY or ASSAY=MIN:MAX share bounds in %.",
                                                metavar="ASSAY=PCT")],
    out: Annotated[Optional[Path], typer.Option("--out", help="New assay workbook to write (.xlsx).",
                                                dir_okay=False, metavar="NEW.xlsx")] = None,
    basis: Annotated[Basis, typer.Option("--basis", help="Basis of the shares and of the blended curve.",
                                         metavar="vol|wt")] = Basis.vol,
    name: Annotated[Optional[str], typer.Option("--name", metavar="NAME", help="Name of the blend.")] = None,
    shrinkage: Annotated[bool, typer.Option("--shrinkage", help="Apply API MPMS 12.3 light-ends shrinkage "
                                            "(off by default).")] = False,
    optimize_: Annotated[bool, typer.Option("--optimize", help="Find the shares that meet the targets at the "
                                            "best worth (or lowest crude cost) instead of taking them.")] = False,
    prices: PricesOpt = None,
    objective: Annotated[BlendObjective, typer.Option("--objective", help="With --optimize: 'worth' (margin "
                                                      "when crude prices are given) or 'cost' (cheapest crude "
                                                      "slate).", metavar="worth|cost")] = BlendObjective.worth,
    api_min: Annotated[Optional[float], typer.Option("--api-min", help="Target: blend API at least [°API].",
                                                     metavar="API")] = None,
    api_max: Annotated[Optional[float], typer.Option("--api-max", help="Target: blend API at most [°API].",
                                                     metavar="API")] = None,
    sulfur_max: Annotated[Optional[float], typer.Option("--sulfur-max", help="Target: blend sulfur at most "
                                                        "[wt %].", metavar="WT_PCT")] = None,
    min_yield: Annotated[Optional[list[str]], typer.Option("--min-yield", metavar="CUT=PCT",
                                                           help="Target: a cut's yield at least PCT vol %. "
                                                                "Repeatable.")] = None,
    cuts: CutsOpt = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
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
    from ..io.assaywriter import write_assay_workbook
    from ..model.crude import build_model
    from ..studies.blend import blend as do_blend

    if out is not None and out.suffix.lower() != ".xlsx":
        raise AssaycutError(f"{out}: the blend is written as an assay workbook; give a path ending in .xlsx")
    if optimize_:  # every file is written before anything is printed (a closed pipe must not lose them)
        plan, parents, lines = _optimize_blend(shares, prices, objective, api_min, api_max, sulfur_max, min_yield,
                                               cuts, (api, sg, density, sulfur),
                                               out.parent if out is not None else Path("reports") / "blend")
        if plan.feasible and out is not None:
            chosen = [(a, m, plan.shares_pct[a.name]) for _, a, m in parents if plan.shares_pct[a.name] > 1e-6]
            total = sum(x for _, _, x in chosen)
            chosen = [(a, m, x * 100.0 / total) for a, m, x in chosen]
            new = do_blend(chosen, basis="vol", name=name, shrinkage=shrinkage)
            write_assay_workbook(new, str(out), inputs=tuple(p for p, a, _ in parents
                                                             if plan.shares_pct[a.name] > 1e-6))
            lines.append(f"Optimal blend written to {out}")
        echo_lines(lines)
        if not plan.feasible:
            raise typer.Exit(EXIT_NO_ANSWER)
        return
    if out is None:
        raise AssaycutError("give --out NEW.xlsx for the blended assay")
    items = _parse_shares(shares)
    check_whole_crude([p for p, _ in items], api, sg, density, sulfur)
    parents = []
    for path, pct in items:
        a = load(path, api, sg, density, sulfur)
        parents.append((a, build_model(a), pct))
    new = do_blend(parents, basis=basis.value, name=name, shrinkage=shrinkage)
    write_assay_workbook(new, str(out), inputs=tuple(p for p, _ in items))
    from ..report.console import blend_text

    echo_lines(blend_text(new))
    say(f"Assay workbook written to {out}")


def _optimize_blend(shares, prices, objective, api_min, api_max, sulfur_max, min_yield, cuts, whole: tuple,
                    folder: Path):
    """Run the blend optimiser for the CLI and print (and plot) its plan."""
    from ..model.crude import build_model
    from ..report.console import blend_plan_text
    from ..report.jsonout import blend_plan_json
    from ..report.studyreports import blend_plan_workbook, plot_blend_plan
    from ..files import place_set
    from ..report.write import png_bytes
    from ..studies.blend_optimizer import BlendTargets, optimize_blend
    from ..yields import run_yields

    cs = load_cut_set(cuts, None)
    ps = load_prices(prices)
    check_whole_crude([it.rpartition("=")[0] if "=" in it else it for it in shares], *whole)
    parents, bounds = [], {}
    for it in shares:
        path, sep, rng = it.rpartition("=") if "=" in it else (it, "", "")
        a = load(path, *whole)
        m = build_model(a)
        parents.append((path, a, m))
        if sep:
            lo, colon, hi = rng.partition(":")
            try:
                bounds[a.name] = (float(lo), float(hi)) if colon else (float(lo), float(lo))
            except ValueError:
                raise AssaycutError(f"{it!r}: expected ASSAY=MIN:MAX share bounds in %, e.g. "
                                    f"crude.xlsx=10:60") from None
    results = [run_yields(a, cs, None, model=m) for _, a, m in parents]
    targets = BlendTargets(api_min, api_max, sulfur_max, parse_ends(min_yield, option="--min-yield",
                                                                    what="a yield in vol %"))
    plan = optimize_blend(results, bounds, targets, ps, objective.value)
    buf = io.BytesIO()
    blend_plan_workbook(plan).save(buf)
    files = {"blend_plan.png": png_bytes(plot_blend_plan, plan), "blend_plan.xlsx": buf.getvalue(),
             "blend_plan.json": (json.dumps(blend_plan_json(plan), indent=2, ensure_ascii=False) + "\n").encode()}
    written = place_set(folder, files, tuple(p for p, _, _ in parents))
    lines = blend_plan_text(plan) + [f"  Plan written to {written[0].parent} (blend_plan.json, .xlsx, .png)"]
    return plan, parents, lines
