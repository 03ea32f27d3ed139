"""Real-column products: conservation, the ideal limit, tails that reach the limit checks."""

from __future__ import annotations

import json

import numpy as np
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from assaycut.cutting.cutset import default_cut_set
from assaycut.cutting.ideal import cut_table
from assaycut.cutting.real_column import fractionate, split_fractions
from assaycut.io import load_assay
from assaycut.model.crude import build_model
from assaycut.yields import run_yields
from tests.helpers import cli_app, cli_error

runner = CliRunner()


@pytest.fixture(scope="module")
def model():
    from assaycut.io.tomlfiles import demo_assay_paths

    return build_model(load_assay(demo_assay_paths()[1]))


def test_split_fractions_add_up_and_are_symmetric():
    # Identity: at every TBP the products' fractions add up to 1; the normal split puts 5 % / 95 % at the
    # ends of the 5-95 overlap (definition of the width).
    t = np.linspace(0, 500, 1001)
    f = split_fractions(t, np.array([150.0, 250.0, 350.0]), np.array([20.0, 0.0, 40.0]))
    assert_allclose(f.sum(axis=1), 1.0, atol=1e-15)
    assert (f >= 0).all()
    g = split_fractions(np.array([140.0, 160.0]), np.array([150.0]), np.array([20.0]))
    assert_allclose(g[:, 0], [0.95, 0.05], atol=1e-12)


def test_conservation_exact(model):
    # Identity: volume, mass and sulfur of the products add up to the crude's.
    cs = default_cut_set()
    df, _ = fractionate(model, cs, {"kerosene": 25.0, "diesel": 35.0, "vacuum gas oil": 60.0})
    df = df.frame()
    assert df["vol_pct"].sum() == pytest.approx(100.0, abs=1e-9)
    assert df["wt_pct"].sum() == pytest.approx(100.0, abs=1e-9)
    assert (df["vol_pct"] * df["sg"]).sum() / 100.0 == pytest.approx(model.sg, rel=1e-12)
    assert (df["wt_pct"] * df["sulfur_wt_pct"]).sum() / 100.0 == pytest.approx(model.sulfur_wt_pct, rel=1e-9)


def test_no_overlap_is_the_ideal_cut(model):
    # Identity: with no boundary named the products are the ideal TBP cuts, exactly.
    cs = default_cut_set()
    ideal = cut_table(model, cs).frame()
    real, _ = fractionate(model, cs, {})
    real = real.frame()
    for col in ("vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "vabp_c", "tbp_5_c", "tbp_95_c", "overlap_c"):
        assert_allclose(real[col], ideal[col], rtol=0, atol=0, equal_nan=True, err_msg=col)
    assert list(real["d86_c"]) == list(ideal["d86_c"])


def _measured_overlap(curves, j):
    """TBP 95 % of product j minus TBP 5 % of product j + 1, measured on the product curves returned (each
    product's cumulative volume of itself over the slice edges' TBP)."""
    f, dv, t = curves["fractions"], curves["slice_pct"], curves["temp_c"]

    def at(k, pct):
        cum = np.concatenate([[0.0], np.cumsum(f[:, k] * dv)])
        return np.interp(pct / 100.0 * cum[-1], cum, t)

    return at(j, 95.0) - at(j + 1, 5.0)


@pytest.mark.parametrize("asked", [25.0, 50.0, 0.0, -3.0, 10.0])
def test_overlap_is_the_trade_tbp_5_95_overlap(model, asked):
    # Definition (common practice, no source): the TBP 5-95 overlap is the lighter product's TBP 95 % minus
    # the heavier product's TBP 5 %, on the products' own curves; it must come out as asked within 1 °C.
    cs = default_cut_set()
    real, curves = fractionate(model, cs, {"kerosene": asked})
    real = real.frame()
    k = list(real["name"]).index("kerosene")
    assert _measured_overlap(curves, k) == pytest.approx(asked, abs=1.0)
    assert real["overlap_c"].iloc[k] == pytest.approx(asked, abs=1.0)
    assert real["tbp_95_c"].iloc[k] - real["tbp_5_c"].iloc[k + 1] == pytest.approx(real["overlap_c"].iloc[k])


def test_boundaries_without_overlap_stay_ideal(model):
    # Products touching no named boundary are the ideal cuts, and the ideal sides of the touched products
    # start or end at the cut point itself: light naphtha's D86 is unchanged by a kerosene overlap.
    cs = default_cut_set()
    ideal = cut_table(model, cs).frame().set_index("name")
    real, _ = fractionate(model, cs, {"kerosene": 25.0, "vacuum gas oil": 40.0})
    real = real.frame().set_index("name")
    for name in ("light ends", "light naphtha", "heavy naphtha"):
        for col in ("vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "mid_vol_c", "flash_c_est", "watson_k"):
            assert real.loc[name, col] == ideal.loc[name, col] or (np.isnan(real.loc[name, col])
                                                                   and np.isnan(ideal.loc[name, col])), (name, col)
        assert real.loc[name, "d86_c"] == ideal.loc[name, "d86_c"]
    # kerosene's start is an ideal boundary: none of it boils below the heavy-naphtha cut point
    assert real.loc["kerosene", "tbp_5_c"] > cs.ends_c[2]


def test_overlap_sharper_than_ideal_refused(model):
    cs = default_cut_set()
    ideal = cut_table(model, cs).frame().set_index("name")
    with pytest.raises(Exception, match="sharper than an ideal cut, which gives"):
        fractionate(model, cs, {"kerosene": float(ideal.loc["kerosene", "overlap_c"]) - 5.0})


def test_ideal_cut_tbp_points_by_identity(model):
    # Identity of the definition: cutting the crude at a cut's own TBP 95 % gives 95 % of the cut's volume;
    # and ideal neighbouring cuts leave a gap (negative overlap; common practice, no source).
    cs = default_cut_set()
    ideal = cut_table(model, cs).frame().set_index("name")
    ker = ideal.loc["kerosene"]
    at95 = cs.with_ends({"kerosene": float(ker["tbp_95_c"])})
    at5 = cs.with_ends({"heavy naphtha": float(ker["tbp_5_c"])})
    got95 = cut_table(model, at95).frame().set_index("name").loc["kerosene", "vol_pct"]
    # moving the heavy-naphtha end to kerosene's T5 leaves 95 % of the kerosene's volume in kerosene
    got5 = cut_table(model, at5).frame().set_index("name").loc["kerosene", "vol_pct"]
    assert got95 == pytest.approx(0.95 * ker["vol_pct"], rel=1e-9)
    assert got5 == pytest.approx(0.95 * ker["vol_pct"], rel=1e-9)
    assert (ideal["overlap_c"].dropna() < 0).all()


def test_overlap_widens_product_distillation(model):
    # Well-known fact of the trade (common practice, no source): poorer fractionation gives a product a
    # heavier back end and lighter front end, so its D86 95 % rises and its D86 10 % falls.
    cs = default_cut_set()
    ideal = cut_table(model, cs).frame().set_index("name")
    real, _ = fractionate(model, cs, {"heavy naphtha": 30.0, "kerosene": 30.0})
    real = real.frame().set_index("name")
    assert real.loc["kerosene", "d86_c"]["95"] > ideal.loc["kerosene", "d86_c"]["95"]
    assert real.loc["kerosene", "d86_c"]["10"] < ideal.loc["kerosene", "d86_c"]["10"]


def test_limit_checks_use_product_curves(model):
    from assaycut.io.tomlfiles import read_limits

    a = load_assay(__import__("assaycut.io.tomlfiles", fromlist=["x"]).demo_assay_paths()[1])
    cs = default_cut_set()
    cs.overlaps.update({"kerosene": 40.0})
    res = run_yields(a, cs, read_limits(), model=model)
    lim = res.limits.frame().set_index("property").loc["d86_95_c"]
    assert lim["value"] == pytest.approx(res.cuts.frame().set_index("name").loc["diesel", "d86_c"]["95"])
    assert "fractionation" in res.methods


def test_cli_overlap_and_cut_file_key(tmp_path):
    r = runner.invoke(cli_app(), ["yields", "--overlap", "kerosene=25", "--out", str(tmp_path / "o")])
    assert r.exit_code == 0, r.stderr
    assert (tmp_path / "o" / "Selkie_Light_products.png").exists()
    p = tmp_path / "cuts.toml"
    p.write_text('[[cut]]\nname="naphtha"\nend_c=180\noverlap_c=20\n[[cut]]\nname="middle"\nend_c=350\n'
                 '[[cut]]\nname="rest"\n')
    d = json.loads(runner.invoke(cli_app(), ["yields", "--cuts", str(p), "--json"]).stdout)
    assert "fractionation" in d["methods"]
    assert sum(c["vol_pct"] for c in d["cuts"]) == pytest.approx(100.0, abs=1e-9)
    cli_error(["yields", "--overlap", "jet=20"], r"no cut named 'jet' for an overlap")
    cli_error(["yields", "--overlap", "diesel=500"], r"overlap 500 °C for 'diesel' is outside -200 to 200 °C")
    cli_error(["yields", "--overlap", "diesel=-60"], r"overlap -60 °C for 'diesel' is sharper than an ideal cut")
    p.write_text('[[cut]]\nname="a"\nend_c=180\noverlap_c=-300\n[[cut]]\nname="b"\n')
    cli_error(["yields", "--cuts", str(p)], r"'overlap_c' must be a TBP 5-95 overlap of -200 to 200 °C")


def test_json_tbp_points_and_overlap():
    d = json.loads(runner.invoke(cli_app(), ["yields", "--overlap", "kerosene=20", "--json"]).stdout)
    cuts = {c["name"]: c for c in d["cuts"]}
    assert set(cuts["kerosene"]["tbp_c"]) == {"5", "50", "95"}
    assert cuts["kerosene"]["tbp_c"]["95"] - cuts["diesel"]["tbp_c"]["5"] == pytest.approx(20.0, abs=1.0)
    assert cuts["kerosene"]["overlap_c"] == pytest.approx(20.0, abs=1.0)
    assert cuts["vacuum residue"]["overlap_c"] is None

