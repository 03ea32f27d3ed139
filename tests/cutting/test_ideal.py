"""Cutting: yields, closure, gravity and property identities, cut-set rules."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from assaycut.cutting.cutset import Cut, CutSet, default_cut_set
from assaycut.cutting.ideal import cut_columns, cut_table
from assaycut.cutting.model_rows import BatchModel
from assaycut.errors import CutSetError
from assaycut.io import load_assay
from assaycut.methods.product_properties import cetane_index_d4737
from assaycut.model.assay import Assay, CurveData, NarrowCuts
from assaycut.model.crude import build_model

chemicals = pytest.importorskip("chemicals")

PCT = np.array([0.0, 5.0, 15.0, 30.0, 50.0, 70.0, 85.0, 100.0])
TMP = np.array([10.0, 60.0, 120.0, 200.0, 300.0, 420.0, 520.0, 650.0])


def simple_model(narrow=True, reconcile=False):
    nc = None
    if narrow:
        nc = NarrowCuts(np.array([np.nan, 120.0, 300.0]), np.array([120.0, 300.0, np.nan]), np.full(3, np.nan),
                        np.full(3, np.nan), np.array([0.72, 0.83, 0.95]), np.array([0.05, 0.6, 2.4]))
    a = Assay("t", 0.86, [CurveData("TBP", "vol", PCT, TMP)], sulfur_wt_pct=1.3, narrow_cuts=nc)
    return build_model(a, reconcile=reconcile)


def test_yields_at_measured_nodes_equal_measured_differences():
    # Identity (the curve is exact at measured points): cutting at measured temperatures gives the measured
    # percent differences.
    m = simple_model()
    cs = CutSet([Cut(f"c{i}", float(t)) for i, t in enumerate(TMP[1:-1])] + [Cut("rest", None)])
    df = cut_table(m, cs).frame()
    assert_allclose(df["vol_pct"], np.diff(PCT), atol=1e-9)


@pytest.mark.parametrize("narrow", [True, False])
def test_closure_and_crude_gravity(narrow):
    # Identity: volume yields sum to 100; weight yields follow from W(V) and sum to 100; the volume-weighted
    # cut SG reproduces the model's crude SG (API MPMS Ch. 11: SG blends by volume), which is the given 0.86
    # less what the narrow cuts, kept as measured and covering the whole crude, leave open.
    m = simple_model(narrow)
    df = cut_table(m, default_cut_set()).frame()
    assert df["vol_pct"].sum() == pytest.approx(100.0, abs=1e-9)
    assert df["wt_pct"].sum() == pytest.approx(100.0, abs=1e-9)
    assert (df["vol_pct"] * df["sg"]).sum() / 100.0 == pytest.approx(m.sg, abs=1e-9)
    assert m.given_sg == pytest.approx(0.86, abs=1e-12)
    if not narrow:
        assert m.sg == pytest.approx(0.86, abs=1e-9)
    # API MPMS Ch. 11: SG blends by volume: weight yield = volume yield x SG_cut / SG_crude
    assert_allclose(df["wt_pct"], df["vol_pct"] * df["sg"] / m.sg, atol=1e-9)


def test_sulfur_balance_reproduces_crude():
    # Mass balance (identity): sulfur blends by weight; the cuts add up to the model's whole-crude sulfur, the
    # given 1.3 wt % less the closure the measured cuts leave; scaled cuts reproduce 1.3 itself.
    for scale in (False, True):
        m = simple_model(reconcile=scale)
        df = cut_table(m, default_cut_set()).frame()
        assert (df["wt_pct"] * df["sulfur_wt_pct"]).sum() / 100.0 == pytest.approx(m.sulfur_wt_pct, abs=1e-9)
        assert m.given_sulfur_wt_pct == pytest.approx(1.3, abs=1e-12)
        assert df["sulfur_share_pct"].sum() == pytest.approx(100.0, abs=1e-7)
        if scale:
            assert m.sulfur_wt_pct == pytest.approx(1.3, abs=1e-12)


def test_api_and_watson_k_per_cut():
    # API MPMS Ch. 11: API = 141.5/SG - 131.5; Watson K against chemicals.utils.Watson_K with the MeABP.
    df = cut_table(simple_model(), default_cut_set()).frame()
    for r in df.to_dict("records"):
        assert r["api"] == pytest.approx(141.5 / r["sg"] - 131.5, rel=1e-12)
        assert r["watson_k"] == pytest.approx(chemicals.utils.Watson_K(r["meabp_c"] + 273.15, r["sg"]), rel=1e-9)


def test_cci_reproduces_d4737_on_reported_d86_and_density():
    # ASTM D4737 Procedure A applied to the cut's own reported D86 (10/50/90 %) and density at 15 °C.
    df = cut_table(simple_model(), default_cut_set()).frame()
    row = df.set_index("name").loc["diesel"]
    d = row["d86_c"]
    assert row["cetane_index_d4737"] == pytest.approx(
        cetane_index_d4737(d["10"], d["50"], d["90"], row["density_15c_kg_m3"] / 1000.0), rel=1e-12)


def test_cut_d86_is_narrower_than_tbp():
    # Well-known fact of the trade (common practice, no source): a cut's D86 starts above and ends below its
    # TBP range, because the D86 flask fractionates less sharply.
    df = cut_table(simple_model(), default_cut_set()).frame()
    r = df.set_index("name").loc["diesel"]
    assert r["d86_c"]["0"] > 232.0 and r["d86_c"]["95"] < 343.0


def test_cut_point_in_flat_step_gives_zero_yield():
    # Identity: a flat step (nothing distils between two temperatures) yields nothing there.
    a = Assay("t", 0.85, [CurveData("TBP", "vol", np.array([0, 20, 20, 60, 100.0]),
                                    np.array([20, 150, 200, 350, 600.0]))], sulfur_wt_pct=None)
    m = build_model(a)
    cs = CutSet([Cut("a", 160.0), Cut("b", 190.0), Cut("c", None)])
    df = cut_table(m, cs).frame()
    assert df.loc[1, "vol_pct"] == pytest.approx(0.0, abs=1e-12)
    assert np.isnan(df.loc[1, "sg"])


@settings(max_examples=80, deadline=None)
@given(st.floats(20.0, 600.0), st.floats(0.1, 50.0))
def test_raising_a_cut_point_never_lowers_the_lighter_cut(t, dt):
    # Monotonicity (style guide invariant): moving a cut point up never lowers the lighter cut's yield.
    m = simple_model()
    cols = cut_columns(BatchModel([m]), np.array([[t, 650.0], [t + dt, 650.0]]))
    assert cols["vol_pct"][1, 0] >= cols["vol_pct"][0, 0] - 1e-12
    assert cols["wt_pct"][1, 0] >= cols["wt_pct"][0, 0] - 1e-12


def test_cut_set_rules():
    with pytest.raises(CutSetError, match=r"cut points must increase: 'b' ends at 100 °C, not above 'a' at 150 °C"):
        CutSet([Cut("a", 150.0), Cut("b", 100.0), Cut("c", None)], "x.toml")
    with pytest.raises(CutSetError, match=r"duplicate cut name 'a'"):
        CutSet([Cut("a", 150.0), Cut("a", 200.0), Cut("c", None)], "x.toml")
    with pytest.raises(CutSetError, match=r"no cuts"):
        CutSet([], "x.toml")


def test_default_cut_set_matches_shipped_file():
    # The shipped TOML and the built-in default must stay the same (names fixed by the issue).
    from assaycut.io.tomlfiles import default_cut_set_path, read_cut_set

    shipped = read_cut_set(str(default_cut_set_path()))
    assert shipped.cuts == default_cut_set().cuts
    assert default_cut_set().names == ["light ends", "light naphtha", "heavy naphtha", "kerosene", "diesel",
                                       "vacuum gas oil", "vacuum residue"]


def test_demo_assays_close_and_have_plausible_character(demo_paths):
    # Well-known facts of the trade (common practice, no source): density and sulfur rise with boiling point;
    # a heavy crude yields more residue and less distillate than a light one.
    res = {}
    for p in demo_paths:
        a = load_assay(p)
        df = cut_table(build_model(a), default_cut_set()).frame()
        assert df["vol_pct"].sum() == pytest.approx(100, abs=1e-9)
        assert df["wt_pct"].sum() == pytest.approx(100, abs=1e-9)
        assert np.all(np.diff(df["sg"].to_numpy()) > 0)
        assert np.all(np.diff(df["sulfur_wt_pct"].to_numpy()[1:]) > 0)
        res[a.name] = df.set_index("name")["vol_pct"]
    light, heavy = res["Selkie Light"], res["Tarn Heavy"]
    assert heavy["vacuum residue"] > 3 * light["vacuum residue"]
    assert heavy["diesel"] < light["diesel"]


def test_swing_cut_split_into_halves_that_add_up():
    # Identity: the two halves of a swing cut add up to the whole cut on both bases, and split at the
    # mid temperature of the cut's TBP range.
    m = simple_model()
    plain = cut_table(m, CutSet([Cut("naphtha", 150.0), Cut("swing", 200.0), Cut("rest", None)])).frame()
    swung = cut_table(m, CutSet([Cut("naphtha", 150.0), Cut("swing", 200.0, swing=True), Cut("rest", None)])).frame()
    assert swung["name"].tolist() == ["naphtha", "swing (light half)", "swing (heavy half)", "rest"]
    assert swung.loc[1, "end_c"] == 175.0
    for col in ("vol_pct", "wt_pct"):
        assert swung.loc[1, col] + swung.loc[2, col] == pytest.approx(plain.loc[1, col], abs=1e-12)
    with pytest.raises(CutSetError, match="marked swing but is the last cut"):
        CutSet([Cut("a", 100.0), Cut("b", None, swing=True)], "x.toml")


def test_narrow_cut_meabp_is_its_boiling_point_and_kw_matches_chemicals():
    # Definition (API TDB 2B1.1): every average boiling point of a narrow fraction is its boiling point; Watson
    # K of it against chemicals.utils.Watson_K at that boiling point and the cut's SG.
    m = simple_model()
    df = cut_table(m, CutSet([Cut("a", 249.95), Cut("narrow", 250.05), Cut("rest", None)])).frame().set_index("name")
    r = df.loc["narrow"]
    assert r["meabp_c"] == pytest.approx(250.0, abs=0.01)
    assert r["watson_k"] == pytest.approx(chemicals.utils.Watson_K(250.0 + 273.15, r["sg"]), abs=1e-4)


def test_meabp_agrees_with_api_2b1_1_on_published_kerosene():
    # Cross-method check on Riazi MNL50 Table 3.8 (a kerosene, published D86 and its Daubert 1994 TBP): the
    # pseudo-component MeABP of the TBP curve and the API TDB 2B1.1 regression from the D86 are two routes to
    # the same definition; they agree within 5 °C (the regression's scatter; common practice, no source).
    from assaycut.methods.characterisation import (
        average_boiling_points_api_2b1_1,
        meabp_pseudo_components,
    )
    from assaycut.methods.pchip import Pchip

    tbp = Pchip(np.array([0, 10, 30, 50, 70, 90.0]), np.array([133.1, 158.1, 189.2, 210.6, 232.9, 258.1]))
    x, w = np.polynomial.legendre.leggauss(16)
    v = 45.0 + 45.0 * x
    meabp = meabp_pseudo_components(tbp(v), np.full_like(v, 0.80), w)
    api = average_boiling_points_api_2b1_1([176.7, 193.3, 206.7, 222.8, 242.8])["meabp"]
    assert abs(float(meabp) - float(api)) < 5.0


def test_watson_k_has_no_threshold_at_the_light_ends_boundary():
    # Continuity (no internal switch): moving a cut point across 40 °C, where D86 estimates start, moves the
    # light cut's Watson K by a hair, not by a step (it moved 0.1 before one basis was used for every cut).
    m = simple_model()
    kw = [cut_table(m, CutSet([Cut("le", t), Cut("rest", None)])).frame().loc[0, "watson_k"] for t in (39.99, 40.01)]
    assert abs(kw[1] - kw[0]) < 0.005


def test_estimates_do_not_switch_on_a_tbp_start():
    # Continuity: the cetane index and flash estimate of a cut depend on its own D86 and density; moving its
    # start from 149.9 to 150.1 °C (the old switch-on point) moves them by a hair.
    m = simple_model()
    rows = [cut_table(m, CutSet([Cut("a", t), Cut("mid", 330.0), Cut("rest", None)])).frame().loc[1] for t in (149.9, 150.1)]
    for col in ("flash_c_est", "cetane_index_d4737"):
        assert np.isfinite(rows[0][col]) and np.isfinite(rows[1][col])
        assert abs(rows[0][col] - rows[1][col]) < 0.2


def test_estimates_outside_their_scope_are_given_flagged_and_named():
    # ISO 4264 scope (recalled from memory): a naphtha's D86 10 % of about 100 °C is outside 171-259 °C, so the
    # cetane index is given by the ASTM D4737 equation, flagged out_of_scope, and the warning names the cut.
    from assaycut.methods.product_properties import cetane_index_d4737
    from assaycut.yields import run_yields

    a = Assay("t", 0.86, [CurveData("TBP", "vol", PCT, TMP)], sulfur_wt_pct=1.3)
    res = run_yields(a, CutSet([Cut("naphtha", 150.0), Cut("gas oil", 330.0), Cut("rest", None)]))
    rows = {r["name"]: r for r in res.cuts.rows()}
    n = rows["naphtha"]
    d = n["d86_c"]
    assert n["cetane_index_d4737"] == pytest.approx(
        cetane_index_d4737(d["10"], d["50"], d["90"], n["density_15c_kg_m3"] / 1000.0), rel=1e-12)
    assert "cetane_index_d4737" in n["out_of_scope"]
    assert any(w.startswith("cetane index of naphtha") and "out_of_scope" in w for w in res.warnings)
    # a value inside the scope is not flagged
    g = rows["gas oil"]["d86_c"]
    inside = 171 <= g["10"] <= 259 and 212 <= g["50"] <= 308 and 251 <= g["90"] <= 363
    assert ("cetane_index_d4737" in rows["gas oil"]["out_of_scope"]) == (not inside)


def test_a_limit_on_an_out_of_scope_value_is_evaluated_and_says_so():
    # A 250-360 °C diesel (D86 90 % above the ISO 4264 scope, recalled from memory) gets a cetane index and the
    # EN 590-style minimum is checked on it, with the note naming the scope.
    from assaycut.cutting.limits import Limit
    from assaycut.yields import run_yields

    a = Assay("t", 0.86, [CurveData("TBP", "vol", PCT, TMP)], sulfur_wt_pct=1.3)
    lim = Limit("diesel", "cetane_index_d4737", min=46.0)
    res = run_yields(a, CutSet([Cut("kero", 250.0), Cut("diesel", 360.0), Cut("rest", None)]), limits=[lim])
    row = res.limits.rows()[0]
    diesel = {r["name"]: r for r in res.cuts.rows()}["diesel"]
    assert "cetane_index_d4737" in diesel["out_of_scope"]
    assert row["status"] in ("pass", "fail") and row["value"] == pytest.approx(diesel["cetane_index_d4737"])
    assert "outside its published scope" in row["note"]


def test_vabp_d86_is_the_mean_of_the_reported_d86():
    # API TDB 2B1.1 definition: VABP = (T10 + T30 + T50 + T70 + T90)/5 of the D86; vabp_c is the TBP average.
    df = cut_table(simple_model(), default_cut_set()).frame()
    r = df.set_index("name").loc["diesel"]
    d = r["d86_c"]
    assert r["vabp_d86_c"] == pytest.approx(np.mean([d[k] for k in ("10", "30", "50", "70", "90")]), rel=1e-12)


def test_light_ends_without_gas_analysis_get_gas_properties():
    # The <= 15 °C cut of a crude given without a light-ends analysis: butane-range SG and Watson K (n-butane:
    # SG 0.584 (GPA 2145), Kw from chemicals.utils.Watson_K at its chemicals boiling point), not those of a
    # liquid naphtha; the assumption is stated.
    from assaycut.yields import run_yields

    tb_nc4 = chemicals.Tb(chemicals.CAS_from_any("n-butane"))
    kw_nc4 = chemicals.utils.Watson_K(tb_nc4, 0.584)
    pct = np.array([0.0, 2.0, 8.0, 20.0, 35.0, 55.0, 75.0, 82.0])
    tmp = np.array([-20.0, 15.0, 70.0, 150.0, 230.0, 340.0, 470.0, 540.0])
    res = run_yields(Assay("t", 0.86, [CurveData("TBP", "vol", pct, tmp)], sulfur_wt_pct=1.3), default_cut_set())
    le = res.cuts.frame().iloc[0]
    assert le["end_c"] == 15.0
    assert 0.55 <= le["sg"] <= 0.63
    assert abs(le["watson_k"] - kw_nc4) < 0.6
    assert any("no light-ends analysis" in w for w in res.warnings)


def _tail_pair(narrow):
    """Two assays of one crude: measured to 75 %, and the same with a point (85 %, 480 °C) added past the end."""
    pct = np.array([0.0, 5.0, 15.0, 30.0, 50.0, 70.0, 75.0])
    tmp = np.array([10.0, 60.0, 120.0, 200.0, 300.0, 420.0, 445.0])
    nc = None
    if narrow:
        nc = NarrowCuts(np.array([np.nan, 120.0, 300.0]), np.array([120.0, 300.0, np.nan]), np.full(3, np.nan),
                        np.full(3, np.nan), np.array([0.72, 0.83, 0.95]), np.array([0.05, 0.6, 2.4]))
    return [Assay("t", 0.86, [CurveData("TBP", "vol", p, t)], sulfur_wt_pct=1.3, narrow_cuts=nc)
            for p, t in ((pct, tmp), (np.append(pct, 85.0), np.append(tmp, 480.0)))]


QUALITIES = ["vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "meabp_c", "watson_k", "mw", "cetane_index_d4737",
             "flash_c_est", "vabp_c", "vabp_d86_c", "mid_vol_c"]


@pytest.mark.parametrize("narrow", [True, False])
def test_point_added_past_the_end_changes_nothing_unflagged(narrow):
    # Invariant (the meaning of the flag): a point added past the measured end of a curve changes nothing in a
    # cut that is not flagged extrapolated (in either run).  Without narrow-cut densities every cut's gravity
    # rests on a Watson K fitted over the whole curve, so every cut is flagged.
    a, b = (cut_table(build_model(x), default_cut_set()).frame().set_index("name") for x in _tail_pair(narrow))
    free = [n for n in a.index if not a.loc[n, "extrapolated"] and not b.loc[n, "extrapolated"]]
    if narrow:
        assert {"light naphtha", "heavy naphtha", "kerosene", "diesel"} <= set(free)
    else:
        assert free == [] and a["extrapolated"].all()
    for n in free:
        for q in QUALITIES:
            assert a.loc[n, q] == pytest.approx(b.loc[n, q], abs=1e-9, nan_ok=True), (n, q)
        assert a.loc[n, "d86_c"] == b.loc[n, "d86_c"] or all(
            abs(a.loc[n, "d86_c"][k] - b.loc[n, "d86_c"][k]) < 1e-9 for k in a.loc[n, "d86_c"])


def test_flag_starts_at_the_last_measured_point():
    # The slope at the last measured node comes from the measured points (not the extension): a cut ending
    # inside the last measured interval (70-75 %, 420-445 °C) is not flagged; one ending past 445 °C is.
    a = build_model(_tail_pair(True)[0])
    cut = lambda t: cut_table(a, CutSet([Cut("x", t), Cut("rest", None)])).frame().loc[0, "extrapolated"]  # noqa: E731
    assert not cut(420.0) and not cut(440.0) and cut(450.0)
