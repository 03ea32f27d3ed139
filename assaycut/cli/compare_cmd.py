"""Crude selection: crudes compared side by side with their worth."""

from __future__ import annotations

import io
from pathlib import Path
from typing import Annotated, Optional

import typer

from .common import (
    ApiOpt,
    DensOpt,
    SgOpt,
    SulfurOpt,
    TUnit,
    UnitOpt,
    check_whole_crude,
    CutsOpt,
    EndOpt,
    JsonOpt,
    LimitsOpt,
    PricesOpt,
    RateOpt,
    UncertOpt,
    echo_json,
    echo_lines,
    guarded,
    load,
    load_cut_set,
    load_limits,
    load_prices,
    resolve_assays,
    say,
)

app = typer.Typer()




@app.command()
@guarded
def compare(
    assays: Annotated[list[str], typer.Argument(help="Assays (files, folders or globs); one alone can be priced.",
                                                metavar="ASSAY...")],
    cuts: CutsOpt = None,
    limits: LimitsOpt = None,
    prices: PricesOpt = None,
    json_out: JsonOpt = False,
    out: Annotated[Optional[Path], typer.Option("--out", help="Report folder. Default: reports/compare/.",
                                                file_okay=False, metavar="DIR")] = None,
    end: EndOpt = None,
    uncertainty: UncertOpt = 0,
    rate: RateOpt = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
    unit: UnitOpt = TUnit.C,
) -> None:
    """Compare crudes for crude selection: every assay cut with the same cut set, side by side.

    Shows yields on both bases and the key qualities per product (API, sulfur, Watson K, limit status).
    With --prices, ranks the crudes by gross product worth and margin over the crude price per barrel and
    per tonne. Worth ignores operating costs, unit capacities, quality give-away and freight.
    """
    from ..studies.compare import (
        WORTH_CAVEAT,
        comparison_table,
        worth_by_product,
        worth_table,
    )
    from ..yields import run_yields

    paths = resolve_assays(assays)
    check_whole_crude(paths, api, sg, density, sulfur)
    cs = load_cut_set(cuts, end)
    lim = load_limits(limits)
    ps = load_prices(prices)
    results = [run_yields(load(p, api, sg, density, sulfur), cs, lim, uncertainty_draws=uncertainty,
                          rate_bbl_per_day=rate) for p in paths]
    table = comparison_table(results)
    worth = worth_table(results, ps) if ps else None
    products = pd_concat([worth_by_product(r, ps) for r in results]) if ps else None
    inside = _inside_bands(results) if uncertainty else []
    if out is not None or not json_out:
        from ..report.studyreports import compare_workbook, plot_compare
        from ..files import place_set
        from ..report.write import png_bytes

        buf = io.BytesIO()
        compare_workbook(results, table, worth, ps.currency if ps else None, products, unit.value).save(buf)
        files = {"comparison.xlsx": buf.getvalue(), "comparison_yields.png": png_bytes(plot_compare, table)}
        inputs = tuple(paths) + tuple(str(x) for x in (cuts, limits, prices) if x)
        written = place_set(out or Path("reports") / "compare", files, inputs)
    if json_out:
        from ..report.jsonout import compare_json

        echo_json(compare_json(results, worth, inside, WORTH_CAVEAT, products))
        return
    from ..report.console import compare_text, warning_lines, written_text
    from ..report.studyreports import whole_crude_rows

    echo_lines(compare_text(table, worth, ps.currency if ps else None, WORTH_CAVEAT, inside, bool(uncertainty),
                            whole_crude_rows(results), rate, unit.value))
    for line in warning_lines(results, unit.value):
        say(line, err=True)
    say(written_text(written))


def pd_concat(frames):
    """One DataFrame of several (pandas imported only when prices are given)."""
    import pandas as pd

    return pd.concat(frames, ignore_index=True)


def _inside_bands(results) -> list[tuple[str, str, str]]:
    """(cut, crude, crude) where two crudes' volume-yield P10-P90 bands overlap."""
    from ..studies.uncertainty import overlapping

    out = []
    for j, cut in enumerate(results[0].cuts["name"]):
        bands = {r.assay.name: (float(r.bands["vol_pct_p10"][j]), float(r.bands["vol_pct_p90"][j]))
                 for r in results}
        out += [(cut, a, b) for a, b in overlapping(bands)]
    return out
