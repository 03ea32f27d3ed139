"""Blend optimiser: feasibility of its answer, agreement with a brute-force search, infeasible targets."""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from typer.testing import CliRunner

from assaycut.cutting.cutset import default_cut_set
from assaycut.errors import StudyError
from assaycut.io import load_assay
from assaycut.io.tomlfiles import demo_assay_paths, read_prices
from assaycut.studies.blend_optimizer import BlendTargets, optimize_blend
from assaycut.studies.compare import worth_table
from assaycut.yields import run_yields
from tests.helpers import DEMO_PRICES

runner = CliRunner()


@pytest.fixture(scope="module")
def results():
    return [run_yields(load_assay(p), default_cut_set()) for p in demo_assay_paths()]


def blend_props(results, v):
    # Mass and volume balance (identity): SG by volume, sulfur by weight, cut volumes by volume (no shrinkage).
    sg = np.array([r.assay.sg for r in results])
    s = np.array([r.model.sulfur_wt_pct for r in results])
    sg_b = float(v @ sg)
    api = 141.5 / sg_b - 131.5
    sulfur = float((v * sg * s).sum() / sg_b)
    diesel = float(v @ np.array([r.cuts.frame().set_index("name").loc["diesel", "vol_pct"] for r in results]))
    return api, sulfur, diesel


def test_optimal_blend_meets_targets_and_beats_grid(results):
    prices = read_prices(str(DEMO_PRICES))
    t = BlendTargets(api_min=28.0, sulfur_max=1.5, min_yield={"diesel": 16.0})
    bounds = {"Selkie Light": (0.0, 70.0), "Tarn Heavy": (10.0, 100.0)}
    plan = optimize_blend(results, bounds, t, prices)
    assert plan.feasible
    v = np.array([plan.shares_pct[r.assay.name] for r in results]) / 100.0
    assert v.sum() == pytest.approx(1.0, abs=1e-9)
    api, sulfur, diesel = blend_props(results, v)
    assert api >= 28.0 - 1e-6 and sulfur <= 1.5 + 1e-6 and diesel >= 16.0 - 1e-6
    assert 0.0 <= v[0] <= 0.7 + 1e-9 and v[2] >= 0.1 - 1e-9
    # brute force over a 1 % grid of shares
    margin = worth_table(results, prices).set_index("crude").loc[[r.assay.name for r in results], "margin_per_bbl"]
    best = -np.inf
    for a, b in itertools.product(range(0, 71), range(0, 101)):
        c = 100 - a - b
        if c < 10:
            continue
        w = np.array([a, b, c]) / 100.0
        ap, su, di = blend_props(results, w)
        if ap >= 28.0 and su <= 1.5 and di >= 16.0:
            best = max(best, float(w @ margin.to_numpy()))
    assert plan.value >= best - 1e-9
    assert plan.value <= best + 0.05  # the LP optimum lies within one grid step of the grid's best


def test_infeasible_targets_reported(results):
    prices = read_prices(str(DEMO_PRICES))
    plan = optimize_blend(results, {}, BlendTargets(api_min=45.0), prices)
    assert not plan.feasible
    (label, short), = plan.shortfalls.items()
    assert label == "blend API >= 45"
    # the best one can do is the lightest crude alone: 40.6 °API (invented demo data), 4.4 °API short
    assert short == pytest.approx(45.0 - results[0].assay.api, abs=1e-3)


def test_bounds_errors(results):
    prices = read_prices(str(DEMO_PRICES))
    with pytest.raises(StudyError, match="cannot add up to 100 %"):
        optimize_blend(results, {"Selkie Light": (60, 100), "Tarn Heavy": (50, 100)}, BlendTargets(), prices)


def test_cli_blend_optimize(tmp_path):
    from assaycut.cli import app

    paths = demo_assay_paths()
    out = tmp_path / "best.xlsx"
    r = runner.invoke(app, ["blend", "--optimize", paths[0], paths[1], f"{paths[2]}=10:60", "--prices",
                            str(DEMO_PRICES), "--sulfur-max", "1.2", "--out", str(out)])
    assert r.exit_code == 0, r.stderr
    assert out.exists() and (tmp_path / "blend_plan.png").exists()
    assert load_assay(str(out)).sulfur_wt_pct <= 1.2 + 1e-6
    r = runner.invoke(app, ["blend", "--optimize", paths[0], paths[2], "--prices", str(DEMO_PRICES),
                            "--sulfur-max", "0.05", "--out", str(tmp_path / "x.xlsx")])
    assert r.exit_code == 1
    assert "target not met: blend sulfur <= 0.05 wt %" in r.stdout


def test_plan_marginal_values_match_a_re_solve(demos):
    # The duals as marginal values: relaxing a binding target by a small step and solving again moves the
    # objective by marginal x step (linear programming sensitivity; exact while the basis holds).
    import dataclasses

    from assaycut.cutting.cutset import default_cut_set
    from assaycut.io.tomlfiles import read_prices
    from assaycut.studies.blend_optimizer import BlendTargets, optimize_blend
    from assaycut.yields import run_yields
    from tests.helpers import DEMO_PRICES

    results = [run_yields(a, default_cut_set(), model=m) for a, m in demos]
    prices = read_prices(str(DEMO_PRICES))
    bounds = {"Selkie Light": (0.0, 40.0)}
    for targets, field_, step in ((BlendTargets(sulfur_max=1.2), "sulfur_max", 1e-3),
                                  (BlendTargets(api_min=28.0), "api_min", 1e-3)):
        plan = optimize_blend(results, bounds, targets, prices)
        t = plan.targets[0]
        assert t["binding"] and t["slack"] == 0.0
        moved = optimize_blend(results, bounds, dataclasses.replace(targets, **{field_: getattr(targets, field_) + step}),
                               prices)
        assert (moved.value - plan.value) / step == pytest.approx(t["marginal_per_unit"], rel=1e-4)


def test_a_share_on_its_bound_is_reported_with_the_bounds_marginal_value(demos):
    # A crude held at the maximum share the user set is a binding bound; its marginal value is the LP's bound
    # dual, checked by solving again with the bound moved by a small step (linear programming sensitivity,
    # exact while the basis holds).  Crudes on the natural bounds 0 and 100 % are not "at" a bound.
    from assaycut.io.tomlfiles import read_prices
    from tests.helpers import DEMO_PRICES

    results = [run_yields(a, default_cut_set(), model=m) for a, m in demos]
    prices = read_prices(str(DEMO_PRICES))
    plan = optimize_blend(results, {"Selkie Light": (0.0, 80.0)}, BlendTargets(sulfur_max=1.2), prices)
    sb = {b["crude"]: b for b in plan.share_bounds}
    assert sb["Selkie Light"]["at"] == "max" and sb["Selkie Light"]["share_pct"] == pytest.approx(80.0)
    assert sb["Selkie Light"]["max_pct"] == 80.0 and sb["Selkie Light"]["min_pct"] == 0.0
    assert all(b["at"] is None for n, b in sb.items() if n != "Selkie Light")
    step = 0.01  # vol %
    moved = optimize_blend(results, {"Selkie Light": (0.0, 80.0 + step)}, BlendTargets(sulfur_max=1.2), prices)
    assert (moved.value - plan.value) / step == pytest.approx(sb["Selkie Light"]["marginal_per_pct"], rel=1e-4)
    low = optimize_blend(results, {"Tarn Heavy": (30.0, 100.0)}, BlendTargets(), prices)
    tarn = next(b for b in low.share_bounds if b["crude"] == "Tarn Heavy")
    assert tarn["at"] == "min" and tarn["share_pct"] == pytest.approx(30.0)
    moved = optimize_blend(results, {"Tarn Heavy": (30.0 + step, 100.0)}, BlendTargets(), prices)
    assert (moved.value - low.value) / step == pytest.approx(tarn["marginal_per_pct"], rel=1e-4)


def test_blend_plan_prints_its_bounds_within_80_columns(tmp_path):
    from assaycut.cli import app

    paths = demo_assay_paths()
    r = runner.invoke(app, ["blend", "--optimize", f"{paths[0]}=0:80", paths[1], paths[2], "--prices",
                            str(DEMO_PRICES), "--sulfur-max", "1.2", "--out", str(tmp_path / "b.xlsx")],
                      env={"COLUMNS": "80"})
    assert r.exit_code == 0, r.output
    line = next(x for x in r.stdout.splitlines() if x.startswith("Selkie Light"))
    assert line.split()[2:6] == ["80.00", "0-80", "at", "its"] and "maximum" in line
    for x in r.stdout.splitlines():
        if not x.lstrip().startswith(("Plan written", "Optimal blend written")):  # paths cannot be split
            assert len(x) <= 80 and x == x.rstrip(), x
    import openpyxl

    ws = openpyxl.load_workbook(tmp_path / "blend_plan.xlsx")["shares"]
    head = [c.value for c in ws[1]]
    selkie = next([c.value for c in row] for row in ws.iter_rows(min_row=2) if row[0].value == "Selkie Light")
    assert selkie[head.index("Maximum [vol %]")] == 80 and selkie[head.index("On a bound")] == "at its maximum"


def test_the_plan_figure_names_the_bound_a_share_sits_on(demos):
    # the picture says what the numbers say: a crude on its maximum share is marked, and the bound is a row of
    # the table with its marginal value (no longer "no target binding" beside a crude held at its bound)
    from assaycut.io.tomlfiles import read_prices
    from assaycut.report.studyreports import blend_plan_figure
    from tests.helpers import DEMO_PRICES

    results = [run_yields(a, default_cut_set(), model=m) for a, m in demos]
    plan = optimize_blend(results, {"Selkie Light": (0.0, 80.0)}, BlendTargets(sulfur_max=1.2),
                          read_prices(str(DEMO_PRICES)))
    fig = blend_plan_figure(plan)
    texts = [t.get_text() for ax in fig.axes for t in ax.texts]
    cells = {(r, c): cell.get_text().get_text() for ax in fig.axes for tab in ax.tables
             for (r, c), cell in tab.get_celld().items()}
    assert any("(at its maximum)" in t for t in texts)
    row = next(r for (r, c), v in cells.items() if c == 0 and v == "Selkie Light share <= 80 %")
    assert cells[(row, 3)] == "yes" and cells[(row, 4)].startswith(("+", "-"))
    assert not any("no target binding" in t for t in texts)
