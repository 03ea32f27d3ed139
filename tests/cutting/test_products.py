"""Real-column products: conservation, the ideal limit, tails that reach the limit checks."""

from __future__ import annotations

import json

import numpy as np
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from assaycut.cutting.cutset import default_cut_set
from assaycut.cutting.ideal import cut_table
from assaycut.cutting.products import fractionate, split_fractions
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
    assert df["vol_pct"].sum() == pytest.approx(100.0, abs=1e-9)
    assert df["wt_pct"].sum() == pytest.approx(100.0, abs=1e-9)
    assert (df["vol_pct"] * df["sg"]).sum() / 100.0 == pytest.approx(model.sg, rel=1e-12)
    assert (df["wt_pct"] * df["sulfur_wt_pct"]).sum() / 100.0 == pytest.approx(model.sulfur_wt_pct, rel=1e-9)


def test_zero_width_is_the_ideal_cut(model):
    # Identity: with no overlap the products are the ideal TBP cuts.
    cs = default_cut_set()
    ideal = cut_table(model, cs)
    real, _ = fractionate(model, cs, {})
    for col in ("vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "vabp_c"):
        assert_allclose(real[col], ideal[col], atol=1e-6, equal_nan=True, err_msg=col)
    for a, b in zip(real["d86_c"], ideal["d86_c"]):
        if a:
            assert_allclose(list(a.values())[1:], list(b.values())[1:], atol=1e-3)


def test_overlap_widens_product_distillation(model):
    # Well-known fact of the trade (common practice, no source): poorer fractionation gives a product a
    # heavier back end and lighter front end, so its D86 95 % rises and its D86 10 % falls.
    cs = default_cut_set()
    ideal = cut_table(model, cs).set_index("name")
    real, _ = fractionate(model, cs, {"heavy naphtha": 30.0, "kerosene": 30.0})
    real = real.set_index("name")
    assert real.loc["kerosene", "d86_c"]["95"] > ideal.loc["kerosene", "d86_c"]["95"]
    assert real.loc["kerosene", "d86_c"]["10"] < ideal.loc["kerosene", "d86_c"]["10"]


def test_limit_checks_use_product_curves(model):
    from assaycut.io.tomlfiles import read_limits

    a = load_assay(__import__("assaycut.io.tomlfiles", fromlist=["x"]).demo_assay_paths()[1])
    cs = default_cut_set()
    cs.overlaps.update({"kerosene": 40.0})
    res = run_yields(a, cs, read_limits(), model=model)
    lim = res.limits.set_index("property").loc["d86_95_c"]
    assert lim["value"] == pytest.approx(res.cuts.set_index("name").loc["diesel", "d86_c"]["95"])
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
    cli_error(["yields", "--overlap", "diesel=500"], r"overlap 500 °C for 'diesel' is outside 0-200 °C")
    p.write_text('[[cut]]\nname="a"\nend_c=180\noverlap_c=-3\n[[cut]]\nname="b"\n')
    cli_error(["yields", "--cuts", str(p)], r"'overlap_c' must be a TBP width of 0-200 °C")

