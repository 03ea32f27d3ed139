"""The column as it runs: cut points and overlaps fitted to a plant test run (``assaycut calibrate``)."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from .common import (
    ApiOpt,
    AssayArg,
    CutsOpt,
    DensOpt,
    JsonOpt,
    OutOpt,
    SgOpt,
    SulfurOpt,
    echo_json,
    echo_lines,
    guarded,
    load_cut_set,
    load_one,
    say,
)

app = typer.Typer()


@app.command()
@guarded
def calibrate(
    assay: AssayArg = None,
    plant: Annotated[Path, typer.Option("--plant", help="Plant test-run file (TOML): the products in column order "
                                        "with their draw rates, and optionally each product's D86, D2887 or TBP "
                                        "points and SG.", dir_okay=False, metavar="FILE")] = ...,
    cuts: CutsOpt = None,
    json_out: JsonOpt = False,
    out: OutOpt = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
) -> None:
    """Fit the effective TBP cut point and TBP 5-95 overlap of each boundary of a column to a plant test run.

    ASSAY is the crude charged during the run. The fit is weighted least squares over the products' rates,
    distillation points (converted to TBP) and SGs, with the real-column product model of --overlap; each
    value comes with its standard deviation, and every measurement with its fitted value. Writes
    <crude>_calibrated_cuts.toml (end_c and overlap_c, for `yields --cuts`) and <crude>_calibration.csv.
    With --cuts, its cut names must be the plant file's products and its cut points start the fit.

    The answer describes one test run of one column; check it against other runs before relying on it.
    """
    from ..errors import InputError
    from ..io.plantfile import read_plant
    from ..model.crude import build_model
    from ..studies.calibration import calibrate as fit
    from ..studies.calibration import calibrated_cut_set

    run = read_plant(str(plant))
    start = None
    if cuts is not None:
        cs = load_cut_set(cuts, None)
        if cs.names != [p.name for p in run.products]:
            raise InputError(f"the cut names ({', '.join(cs.names)}) must be the plant file's products in order "
                             f"({', '.join(p.name for p in run.products)})", file=str(cuts))
        start = list(cs.ends_c)
    path, a = load_one(assay, api, sg, density, sulfur)
    model = build_model(a)
    result = fit(model, run, start)
    files = None
    if out is not None or not json_out:
        from ..files import place_set
        from ..io.tomlfiles import cut_set_toml
        from ..report.studyreports import calibration_csv
        from ..report.write import slug

        base = slug(a.name)
        title = (f"Cut points and TBP 5-95 overlaps fitted by `assaycut calibrate` to the test run {plant.name}\n"
                 f"on the crude {a.name}. One test run of one column: check against other runs before relying "
                 f"on it.")
        toml = cut_set_toml(calibrated_cut_set(result), title)
        files = place_set(out or Path("reports") / base,
                          {f"{base}_calibrated_cuts.toml": toml.encode("utf-8"),
                           f"{base}_calibration.csv": calibration_csv(result)},
                          (path, str(plant)) + ((str(cuts),) if cuts else ()))
    if json_out:
        from ..report.jsonout import calibration_json

        echo_json(calibration_json(a, model, result))
        return
    from ..report.console import calibration_text, written_text

    echo_lines(calibration_text(a.name, result))
    say(written_text(files, "Calibration"))
