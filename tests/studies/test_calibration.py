"""Calibration to a plant test run: known cut points and overlaps recovered from test runs made by the
real-column product model (`yields --overlap`), with and without measurement noise, and from rates alone.

The expected values are the cut points and overlaps the test runs were made with (an identity: the data are
the product model's own output at those values); the noise test's bound is the fit's own stated standard
deviation, three of them (a 3-sigma bound, common practice, no source).  The tolerances 0.2 °C and 1 °C are
the issue's.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from typer.testing import CliRunner

from assaycut.cli import app
from assaycut.cutting.cutset import CutSet, default_cut_set
from assaycut.io import load_assay
from assaycut.model.crude import build_model
from assaycut.studies.calibration import SIGMAS, PlantProduct, PlantRun, calibrate
from assaycut.yields import run_yields

runner = CliRunner()
OVERLAPS = {"heavy naphtha": 15.0, "kerosene": 20.0, "diesel": 25.0, "vacuum gas oil": 35.0}
"""The made-up column's TBP 5-95 overlaps. [°C]"""


@pytest.fixture(scope="module")
def crude():
    from assaycut.io.tomlfiles import demo_assay_paths

    a = load_assay(demo_assay_paths()[1])  # Brannock Blend: narrow cuts, so product SGs vary with the cut points
    return a, build_model(a)


def _test_run(crude, overlaps, distillation=True):
    """The products of `yields --overlap` at the shipped cut points, as a plant file gives them."""
    a, m = crude
    cs = default_cut_set()
    r = run_yields(a, CutSet(cs.cuts, "made-up column", overlaps), model=m)
    prods = []
    for row in r.cuts.rows():
        pts = {5.0: row["tbp_5_c"], 50.0: row["mid_vol_c"], 95.0: row["tbp_95_c"]}
        use = distillation and row["name"] != "light ends" and all(np.isfinite(list(pts.values())))
        prods.append(PlantProduct(row["name"], "vol_pct", row["vol_pct"], "tbp" if use else None,
                                  pts if use else {}, row["sg"] if distillation else None))
    return cs, r, prods


def test_known_cut_points_and_overlaps_are_recovered(crude):
    cs, r, prods = _test_run(crude, OVERLAPS)
    cal = calibrate(crude[1], PlantRun(prods, label="made-up run"))
    made = {row["name"]: row["overlap_c"] for row in r.cuts.rows()}  # the overlap each boundary gave
    for c, end in zip(cal.cut_points, cs.ends_c):
        if c["name"] == "light ends":
            continue  # its cut point lies in the gap between two light-end components: any point there is one
        assert c["end_c"] == pytest.approx(end, abs=0.2), c
        assert c["overlap_c"] == pytest.approx(made[c["name"]], abs=1.0), c
    for name, w in OVERLAPS.items():
        assert made[name] == pytest.approx(w, abs=0.06)  # the column was made with these (solver tolerance)
    assert cal.chi_square < 1e-3


def test_noisy_test_run_is_recovered_within_the_stated_uncertainty(crude):
    cs, r, prods = _test_run(crude, OVERLAPS)
    rng = np.random.default_rng(20261205)
    noisy = []
    for p in prods:
        pts = {k: v + rng.normal(0.0, SIGMAS["tbp_c"]) for k, v in p.points.items()}
        noisy.append(PlantProduct(p.name, p.rate_key, p.rate + rng.normal(0.0, SIGMAS["rate_pct"]), p.method, pts,
                                  None if p.sg is None else p.sg + rng.normal(0.0, SIGMAS["sg"])))
    total = sum(p.rate for p in noisy)
    assert abs(total - 100.0) < 2.0
    cal = calibrate(crude[1], PlantRun(noisy, label="noisy run"))
    made = {row["name"]: row["overlap_c"] for row in r.cuts.rows()}
    checked = 0
    for c, end in zip(cal.cut_points, cs.ends_c):
        if c["end_c_sd"] is not None:
            assert abs(c["end_c"] - end) <= 3.0 * c["end_c_sd"], c
            checked += 1
        if c["overlap_c_sd"] is not None and c["name"] in OVERLAPS:
            assert abs(c["overlap_c"] - made[c["name"]]) <= 3.0 * c["overlap_c_sd"], c
            checked += 1
    assert checked >= 8
    assert cal.dof > 0 and cal.chi_square / cal.dof < 3.0  # the noise is what the weights say


def test_rates_alone_give_the_cut_points_of_an_ideal_column(crude):
    cs, r, prods = _test_run(crude, {}, distillation=False)
    cal = calibrate(crude[1], PlantRun(prods, label="rates only"))
    for c, end in zip(cal.cut_points, cs.ends_c):
        assert c["fitted"] == "cut point" and c["overlap_c"] is None
        if c["name"] != "light ends":
            assert c["end_c"] == pytest.approx(end, abs=0.2), c
    assert sum("held as an ideal TBP cut" in w for w in cal.warnings) == len(cs.ends_c)


PLANT = """crude_bbl_per_day = 100000
[[product]]
name = "light ends"
vol_pct = 1.72
[[product]]
name = "light naphtha"
vol_pct = 6.72
[[product]]
name = "heavy naphtha"
bbl_per_day = 13800
d86 = { 10 = 110.5, 50 = 135.0, 90 = 165.0 }
sg = 0.765
[[product]]
name = "kerosene"
vol_pct = 8.9
d86 = { 10 = 185.0, 50 = 205.0, 90 = 230.0 }
[[product]]
name = "diesel"
vol_pct = 17.8
d86 = { 10 = 250.0, 50 = 285.0, 90 = 330.0 }
[[product]]
name = "vacuum gas oil"
vol_pct = 29.1
[[product]]
name = "vacuum residue"
vol_pct = 21.9
"""


def test_the_written_cut_set_makes_the_fitted_products_in_yields(demo_paths, tmp_path):
    plant = tmp_path / "run.toml"
    plant.write_text(PLANT)
    r = runner.invoke(app, ["calibrate", demo_paths[1], "--plant", str(plant), "--json", "--out", str(tmp_path)])
    assert r.exit_code == 0, r.output
    d = json.loads(r.stdout)
    assert set(d) >= {"assay", "cut_points", "residuals", "warnings"}
    assert set(d["cut_points"][0]) >= {"name", "end_c", "end_c_sd", "overlap_c", "overlap_c_sd"}
    assert set(d["residuals"][0]) >= {"product", "what", "measured", "fitted"}
    assert [c["name"] for c in d["cut_points"]] == ["light ends", "light naphtha", "heavy naphtha", "kerosene",
                                                    "diesel", "vacuum gas oil"]
    toml = next(tmp_path.glob("*_calibrated_cuts.toml"))
    y = json.loads(runner.invoke(app, ["yields", demo_paths[1], "--cuts", str(toml), "--json"]).stdout)
    fitted = {x["product"]: x["fitted"] for x in d["residuals"] if x["what"].startswith("rate")}
    for c in y["cuts"]:  # the overlap solver meets an overlap to 0.05 °C; the file rounds to 0.01 °C
        assert c["vol_pct"] == pytest.approx(fitted[c["name"]], abs=0.02), c["name"]
    printed = runner.invoke(app, ["calibrate", demo_paths[1], "--plant", str(plant), "--out", str(tmp_path)],
                            env={"COLUMNS": "80"})
    assert printed.exit_code == 0
    for line in printed.stdout.splitlines():
        assert len(line) <= 80 or line.startswith("Calibration written"), line


@pytest.mark.parametrize("change,words", [
    (("vol_pct = 21.9", "vol_pct = 31.9"), ["109.94 vol %", "within 2 %"]),
    (("bbl_per_day = 13800", "wt_pct = 13.8"), ["one basis"]),
    (("crude_bbl_per_day = 100000\n", ""), ["'heavy naphtha'", "crude_bbl_per_day"]),
    (("90 = 165.0", "90 = 65.0"), ["[[product]] 3 ('heavy naphtha')", "falls"]),
    (("sg = 0.765", "sg = 7.65"), ["[[product]] 3 ('heavy naphtha')", "'sg'"]),
    (("vol_pct = 8.9", "vol_pct = 8.9\nflow = 3"), ["[[product]] 4 ('kerosene')", "'flow'"]),
    (("vol_pct = 8.9", "vol_pct = 8.9\nwt_pct = 8.0"), ["[[product]] 4 ('kerosene')", "exactly one rate"]),
])
def test_a_bad_plant_file_is_one_line_naming_the_file_and_product(change, words, demo_paths, tmp_path):
    plant = tmp_path / "run.toml"
    plant.write_text(PLANT.replace(*change))
    r = runner.invoke(app, ["calibrate", demo_paths[1], "--plant", str(plant)])
    assert r.exit_code == 2, r.output
    assert len(r.stderr.strip().splitlines()) == 1 and "run.toml" in r.stderr, r.stderr
    for w in words:
        assert w in r.stderr, r.stderr


def test_rates_per_day_and_by_weight_give_the_same_fit(crude):
    # t/d of a product = wt % x crude bbl/d x t per bbl of the crude (SG x 999.016 kg/m3 x 0.158987 m3, API MPMS
    # 11.1): the same test run in t/d and in wt % is the same fit
    from assaycut.units import barrel_mass_t

    cs, r, prods = _test_run(crude, OVERLAPS)
    by_wt = [PlantProduct(p.name, "wt_pct", row["wt_pct"], p.method, p.points, p.sg)
             for p, row in zip(prods, r.cuts.rows())]
    crude_t = 100000.0 * float(barrel_mass_t(crude[0].sg))
    per_day = [PlantProduct(p.name, "t_per_day", p.rate * crude_t / 100.0, p.method, p.points, p.sg) for p in by_wt]
    a = calibrate(crude[1], PlantRun(by_wt, label="wt"))
    b = calibrate(crude[1], PlantRun(per_day, 100000.0, label="t/d"))
    assert a.basis == b.basis == "wt"
    for x, y, end in zip(a.cut_points, b.cut_points, cs.ends_c):
        if x["name"] != "light ends":  # (its cut point lies in a gap between light-end components: any is one)
            assert x["end_c"] == pytest.approx(y["end_c"], abs=1e-4)
            assert x["end_c"] == pytest.approx(end, abs=0.2)


def test_a_cut_file_must_name_the_plant_products(demo_paths, tmp_path):
    plant = tmp_path / "run.toml"
    plant.write_text(PLANT)
    cuts = tmp_path / "cuts.toml"
    cuts.write_text('[[cut]]\nname = "naphtha"\nend_c = 180\n\n[[cut]]\nname = "rest"\n')
    r = runner.invoke(app, ["calibrate", demo_paths[1], "--plant", str(plant), "--cuts", str(cuts)])
    assert r.exit_code == 2 and "cuts.toml" in r.stderr and "plant file's products" in r.stderr


def test_the_shipped_demo_plant_file_runs(demo_paths, tmp_path):
    from pathlib import Path

    demo = Path(__file__).parents[2] / "assays_demo" / "plant_run_brannock.toml"
    r = runner.invoke(app, ["calibrate", demo_paths[1], "--plant", str(demo), "--out", str(tmp_path)])
    assert r.exit_code == 0, r.output
    assert "Calibration written" in r.stdout
