"""Studies: blends, comparison and worth, cut-point shift and sweep, swing cuts."""

from __future__ import annotations

import json

import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from assaycut.methods.blending_rules import viscosity_from_vbn_refutas, vbn_refutas, shrinkage_api_mpms_12_3

from assaycut.studies.blend import blend
from assaycut.model.crude import build_model
from assaycut.cutting.cutset import default_cut_set
from assaycut.errors import StudyError
from assaycut.io import load_assay
from assaycut.io.tomlfiles import read_limits
from assaycut.studies.compare import Price, PriceSet, worth_table
from assaycut.studies.cutpoints import shift_delta, sweep
from assaycut.yields import run_yields

from .conftest import sha256
from .test_readers import cli_error

runner = CliRunner()


@pytest.fixture(scope="module")
def demos():
    from assaycut.io.tomlfiles import demo_assay_paths

    out = []
    for p in demo_assay_paths():
        a = load_assay(p)
        out.append((a, build_model(a)))
    return out


def cuts_of(assay):
    return run_yields(assay, default_cut_set()).cuts.set_index("name")


@pytest.mark.parametrize("basis", ["vol", "wt"])
def test_blend_of_crude_with_itself_is_that_crude(demos, basis):
    # Identity: a 50/50 blend of a crude with itself is that crude, on both bases.
    a, m = demos[0]
    b = blend([(a, m, 50.0), (a, m, 50.0)], basis=basis)
    assert b.sg == pytest.approx(a.sg, rel=1e-12)
    assert b.sulfur_wt_pct == pytest.approx(a.sulfur_wt_pct, rel=1e-12)
    ca, cb = cuts_of(a), cuts_of(b)
    assert_allclose(cb["vol_pct"], ca["vol_pct"], atol=0.05)
    assert_allclose(cb["wt_pct"], ca["wt_pct"], atol=0.05)
    assert_allclose(cb["sg"], ca["sg"], atol=0.002)


def test_volume_blend_cut_volumes_are_weighted_sums(demos):
    # Identity (no shrinkage): cut volumes of a volume blend are the weighted sums of the parents' cut volumes,
    # for cut points inside the range every parent measured; the blend SG is the volume-weighted SG.
    (a1, m1), (a2, m2) = demos[0], demos[2]
    b = blend([(a1, m1, 30.0), (a2, m2, 70.0)], basis="vol")
    assert b.sg == pytest.approx(0.3 * a1.sg + 0.7 * a2.sg, rel=1e-12)  # reference sheet §8
    c1, c2, cb = cuts_of(a1), cuts_of(a2), cuts_of(b)
    inside = ["light ends", "light naphtha", "heavy naphtha", "kerosene", "diesel"]
    assert_allclose(cb.loc[inside, "vol_pct"], 0.3 * c1.loc[inside, "vol_pct"] + 0.7 * c2.loc[inside, "vol_pct"],
                    atol=0.01)
    w1 = 0.3 * a1.sg / b.sg
    assert b.sulfur_wt_pct == pytest.approx(w1 * a1.sulfur_wt_pct + (1 - w1) * a2.sulfur_wt_pct, rel=1e-12)


def test_weight_blend_gravity_rule(demos):
    # Reference sheet §8: on a mass basis 1/SG = Σ w_i / SG_i (never an average of API numbers).
    (a1, m1), (a2, m2) = demos[0], demos[1]
    b = blend([(a1, m1, 40.0), (a2, m2, 60.0)], basis="wt")
    assert 1.0 / b.sg == pytest.approx(0.4 / a1.sg + 0.6 / a2.sg, rel=1e-12)


def test_blend_shares_must_add_to_100(demos):
    (a1, m1), (a2, m2) = demos[0], demos[1]
    with pytest.raises(StudyError, match=r"the shares add up to 90 %, not 100 %: Selkie Light 40 \+ Brannock Blend 50"):
        blend([(a1, m1, 40.0), (a2, m2, 50.0)])


def test_blend_cli_writes_readable_assay_with_parents(tmp_path, demo_paths):
    out = tmp_path / "mix.xlsx"
    r = runner.invoke(app_(), ["blend", f"{demo_paths[0]}=60", f"{demo_paths[1]}=40", "--out", str(out)])
    assert r.exit_code == 0, r.stderr
    a = load_assay(str(out))
    assert any(sha256(demo_paths[0]) in n and sha256(demo_paths[1]) in n for n in a.notes)
    r = runner.invoke(app_(), ["check", str(out), "--json"])
    assert json.loads(r.stdout)["ok"] is True
    cli_error(["blend", f"{demo_paths[0]}=60", f"{demo_paths[1]}=30", "--out", str(tmp_path / "x.xlsx")],
              r"the shares add up to 90 %, not 100 %")
    cli_error(["blend", f"{demo_paths[0]}=60", "--out", str(tmp_path / "x.csv")], r"path ending in .xlsx")


def app_():
    from assaycut.cli import app

    return app


def test_refutas_and_shrinkage():
    # Maples (2000) Refutas: blending two oils of the same viscosity returns that viscosity (identity).
    assert viscosity_from_vbn_refutas(0.3 * vbn_refutas(12.0) + 0.7 * vbn_refutas(12.0)) == pytest.approx(12.0, rel=1e-12)
    # API MPMS 12.3 form (coefficients from memory): no gravity difference, no shrinkage; it grows with it.
    assert shrinkage_api_mpms_12_3(40.0, 0.0) == 0.0
    assert 0 < shrinkage_api_mpms_12_3(40.0, 10.0) < shrinkage_api_mpms_12_3(40.0, 20.0) < 2.0


def test_shift_deltas_sum_to_zero_and_touch_only_neighbours(demos):
    # Identity: moving one cut point only moves volume between its two neighbours; deltas sum to zero.
    a, m = demos[1]
    cs = default_cut_set()
    base = run_yields(a, cs, read_limits(), model=m)
    new = run_yields(a, cs.with_ends({"diesel": 360.0}), read_limits(), model=m)
    d = shift_delta(base, new)
    assert d["vol_pct"].sum() == pytest.approx(0.0, abs=1e-9)
    assert d["wt_pct"].sum() == pytest.approx(0.0, abs=1e-9)
    assert d.loc[d["changed"], "name"].tolist() == ["diesel", "vacuum gas oil"]


def test_shift_json_shape():
    r = runner.invoke(app_(), ["shift", "--end", "kerosene=250", "--json"])
    assert r.exit_code == 0, r.stderr
    d = json.loads(r.stdout)
    assert set(d) == {"base", "new", "delta"}
    assert {"name", "vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "cetane_index_d4737", "flash_c_est", "d86_95_c",
            "changed", "limit_flips"} <= set(d["delta"][0])
    cli_error(["shift"], r"give at least one --end")


def test_shift_reports_limit_flip():
    # Raising the kerosene end point far enough makes the jet D86 10 % limit (ASTM D1655, 205 °C max, from
    # memory) fail: the shift must report the flip.
    r = runner.invoke(app_(), ["shift", "--end", "heavy naphtha=215", "--end", "kerosene=300", "--json"])
    d = json.loads(r.stdout)
    kero = next(x for x in d["delta"] if x["name"] == "kerosene")
    assert "pass -> fail" in kero["limit_flips"]


def test_sweep_endpoints_equal_single_runs(demos):
    # Identity: the sweep's end points equal two single yields runs at those cut points.
    a, m = demos[0]
    cs = default_cut_set()
    df = sweep(m, cs, "kerosene", 210.0, 250.0, 2.0)
    assert len(df) == 21
    for t, row in ((210.0, df.iloc[0]), (250.0, df.iloc[-1])):
        single = run_yields(a, cs.with_ends({"kerosene": t}), model=m).cuts.set_index("name")
        assert row["lower_vol_pct"] == pytest.approx(single.loc["kerosene", "vol_pct"], abs=1e-12)
        assert row["upper_wt_pct"] == pytest.approx(single.loc["diesel", "wt_pct"], abs=1e-12)
        assert row["upper_d86_10_c"] == pytest.approx(single.loc["diesel", "d86_c"]["10"], abs=1e-9)


def test_sweep_errors(demos):
    a, m = demos[0]
    with pytest.raises(StudyError, match=r"must stay strictly between the neighbouring cut points \(177 and 343 °C\)"):
        sweep(m, default_cut_set(), "kerosene", 150.0, 250.0, 5.0)
    with pytest.raises(StudyError, match="no cut named 'jet'"):
        sweep(m, default_cut_set(), "jet", 200.0, 250.0, 5.0)


def test_sweep_cli_writes_csv_and_png(tmp_path):
    r = runner.invoke(app_(), ["sweep", "--end", "diesel", "--from", "330", "--to", "370", "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    assert sorted(p.suffix for p in tmp_path.iterdir()) == [".csv", ".png"]


def test_worth_by_hand(demos):
    # Identity: worth = Σ yield x price, written out by hand for a tiny price file (all cuts at one price per
    # barrel, so worth per barrel equals that price; per tonne it follows each cut's density).
    a, m = demos[0]
    res = run_yields(a, default_cut_set(), model=m)
    names = list(res.cuts["name"])
    ps = PriceSet({n: Price(50.0, "bbl") for n in names}, {a.name: Price(40.0, "bbl")}, "USD", "tiny")
    w = worth_table([res], ps).iloc[0]
    assert w["worth_per_bbl"] == pytest.approx(50.0, rel=1e-12)
    assert w["margin_per_bbl"] == pytest.approx(10.0, rel=1e-12)
    by_hand = sum(c["wt_pct"] / 100 * 50.0 / (c["density_15c_kg_m3"] * 0.158987294928 / 1000)
                  for c in res.cuts.to_dict("records"))
    assert w["worth_per_t"] == pytest.approx(by_hand, rel=1e-12)
    ps2 = PriceSet({names[0]: Price(50.0, "bbl")}, {}, "USD", "short.toml")
    with pytest.raises(StudyError, match=r"short.toml: no price for cut 'light naphtha'"):
        worth_table([res], ps2)


def test_compare_cli_json_and_report(tmp_path, demo_paths):
    prices = tmp_path / "p.toml"
    names = default_cut_set().names
    prices.write_text('currency = "USD"\n[products]\n' + "".join(f'"{n}" = {{ per_bbl = 70.0 }}\n' for n in names)
                      + '[crudes]\n"Tarn Heavy" = { per_bbl = 60.0 }\n"Selkie Light" = { per_bbl = 75.0 }\n'
                      + '"Brannock Blend" = { per_bbl = 75.0 }\n')
    r = runner.invoke(app_(), ["compare", *demo_paths, "--prices", str(prices), "--json", "--out", str(tmp_path / "o")])
    assert r.exit_code == 0, r.stderr
    d = json.loads(r.stdout)
    assert len(d["assays"]) == 3 and len(d["worth"]) == 3
    # one flat product price: every worth is 70/bbl, so the cheapest crude has the best margin (identity)
    assert d["worth"][0]["crude"] == "Tarn Heavy" and d["worth"][0]["margin_per_bbl"] == pytest.approx(10.0)
    assert sorted(p.name for p in (tmp_path / "o").iterdir()) == ["comparison.xlsx", "comparison_yields.png"]


def test_price_file_errors(tmp_path, demo_paths):
    p = tmp_path / "p.toml"
    p.write_text('[products]\n"diesel" = { per_bbl = -5.0 }\n')
    cli_error(["compare", *demo_paths[:2], "--prices", str(p)], r"p.toml: \[products\] 'diesel': the price -5 must be positive")
    p.write_text('[products]\n"diesel" = { per_bbl = 90.0 }\n')
    cli_error(["compare", *demo_paths[:2], "--prices", str(p)], r"p.toml: no price for cut 'light ends'")
    p.write_text('[products]\n"diesel" = 90.0\n')
    cli_error(["compare", *demo_paths[:2], "--prices", str(p)], r"give the unit")
    cli_error(["compare", demo_paths[0]], r"compare needs at least two assays")


def test_compare_workbook_cells_are_numbers(tmp_path, demo_paths):
    import openpyxl

    from assaycut.cli import app

    r = runner.invoke(app, ["compare", *demo_paths, "--prices", str(demo_prices_path()), "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    ws = openpyxl.load_workbook(tmp_path / "comparison.xlsx")["worth"]
    assert [ws.cell(row=i, column=1).value for i in (2, 3, 4)] == [1, 2, 3]
    assert all(isinstance(ws.cell(row=i, column=3).value, float) for i in (2, 3, 4))


def demo_prices_path():
    from pathlib import Path

    return Path(__file__).resolve().parent.parent / "assays_demo" / "prices_demo.toml"
