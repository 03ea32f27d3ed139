"""Product-limit evaluation: the one vectorised evaluator behind the yield report and the optimiser."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from assaycut.cutting.cut_table import CutTable
from assaycut.cutting.limits import Limit, check_limits, limit_margins, meets, recovered_at
from assaycut.io import load_assay
from assaycut.yields import run_yields


@settings(max_examples=300, deadline=None)
@given(st.lists(st.floats(1.0, 60.0), min_size=6, max_size=6), st.floats(20.0, 400.0), st.floats(-50.0, 700.0))
def test_recovered_at_is_numpy_interp_row_by_row(steps, start, t):
    # Reference library: numpy.interp(T, D86 temperatures, D86 percents, left=0, right=95), the textbook
    # linear reading of a distillation curve; the vectorised evaluator must give the same number to the bit.
    d86 = start + np.concatenate([[0.0], np.cumsum(steps)])
    pct = [0, 10, 30, 50, 70, 90, 95]
    got = recovered_at(d86[None, :], t)[0]
    assert got == np.interp(t, d86, pct, left=0.0, right=95.0)
    for node in d86:  # exactly at a point of the curve
        assert recovered_at(d86[None, :], float(node))[0] == np.interp(node, d86, pct, left=0.0, right=95.0)


def _cols(d86_rows, density):
    m = len(d86_rows)
    cols = {k: np.full((m, 1), np.nan) for k in ("vol_pct", "density_15c_kg_m3")}
    cols["vol_pct"][:] = 10.0
    cols["density_15c_kg_m3"][:, 0] = density
    cols["d86"] = np.array(d86_rows, dtype=float)[:, None, :]
    return cols


def test_margins_are_distances_to_the_bounds():
    # Identity: the margin of a limit is how far inside its bounds the value lies (negative outside).
    lims = [Limit("jet", "density_15c_kg_m3", 775.0, 840.0), Limit("jet", "d86_10_c", max=205.0),
            Limit("jet", "d86_fbp_c", max=300.0)]
    cols = _cols([[150, 170, 190, 210, 230, 250, 260], [160, 210, 220, 230, 240, 250, 260]], [800.0, 850.0])
    marg, used = limit_margins(cols, ["jet"], lims)
    assert used == lims
    np.testing.assert_allclose(marg[:, 0], [25.0, -10.0])
    np.testing.assert_allclose(marg[:, 1], [35.0, -5.0])
    assert np.isnan(marg[:, 2]).all()  # the D86 final boiling point is not estimated: n/a, never a pass


def test_report_and_optimiser_read_the_same_values():
    # One evaluator: the yield report's value of each limit equals the optimiser's, for the same cut.

    d86 = {str(p): float(t) for p, t in zip((0, 10, 30, 50, 70, 90, 95), (180, 230, 270, 300, 330, 360, 375))}
    row = {"name": "diesel", "vol_pct": 20.0, "wt_pct": 21.0, "mid_vol_c": 290.0, "vabp_c": 290.0,
                          "meabp_c": 285.0, "sg": 0.84, "api": 37.0, "density_15c_kg_m3": 839.6, "watson_k": 11.9,
                          "sulfur_wt_pct": 0.5, "mw": 230.0, "cetane_index_d4737": 52.0, "flash_c_est": 90.0,
                          "d86_c": d86}
    cuts = CutTable.from_rows([row], list(row))
    lims = [Limit("diesel", "recovered_at_250c_pct", max=65.0, strict=True),
            Limit("diesel", "recovered_at_350c_pct", min=85.0), Limit("diesel", "d86_95_c", max=360.0),
            Limit("diesel", "flash_c_est", min=55.0, strict=True)]
    table = check_limits(cuts, lims)
    assert table["status"] == ["pass", "fail", "fail", "pass"]
    # np.interp by hand: 250 °C lies 20/40 of the way from 230 (10 %) to 270 (30 %): 20 %; 350 °C: 83.33 %
    assert table["value"].tolist()[:3] == pytest.approx([20.0, 83.33333333, 375.0])


def test_every_shipped_limit_is_evaluable_on_the_demo_crudes(demo_paths):
    # A shipped limit that can never be evaluated would show "n/a" for every crude (common practice, no
    # source: a default check must be able to pass or fail).
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import read_limits
    from assaycut.yields import run_yields

    limits = read_limits(None)
    assert limits
    for p in demo_paths:
        res = run_yields(load_assay(p), default_cut_set(), limits)
        assert (res.limits.frame()["status"] != "n/a").all(), res.limits.frame().loc[res.limits.frame()["status"] == "n/a", "label"].tolist()


def test_limit_on_a_missing_cut_warns_by_name(demo_paths):
    # A limit on a cut the cut set does not have (kerosene renamed kero) is named in a warning, never dropped
    # silently.
    from assaycut.cutting.cutset import Cut, CutSet
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import read_limits
    from assaycut.yields import run_yields

    cs = CutSet([Cut("naphtha", 177.0), Cut("kero", 232.0), Cut("diesel", 343.0), Cut("rest", None)], "test cuts")
    res = run_yields(load_assay(demo_paths[0]), cs, read_limits(None))
    assert any("limits on cut 'kerosene' are not checked" in w and "test cuts" in w for w in res.warnings)


def test_limit_cut_names_normalised_and_near_misses_named(demo_paths, tmp_path):
    # Limits name cuts after Unicode NFKC and whitespace trimming; a name that still does not match (here
    # "kerosene" with a Cyrillic о, U+043E) is warned about with the nearest cut name.
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import read_limits
    from assaycut.yields import run_yields

    p = tmp_path / "l.toml"
    p.write_text('[[limit]]\ncut = "  diesel "\nproperty = "sulfur_wt_pct"\nmax = 0.001\n'
                 '[[limit]]\ncut = "ker\u043esene"\nproperty = "sulfur_wt_pct"\nmax = 0.001\n'
                 '[[limit]]\ncut = "\uff44iesel"\nproperty = "sg"\nmax = 0.5\n', encoding="utf-8")
    lim = read_limits(str(p))
    res = run_yields(load_assay(demo_paths[0]), default_cut_set(), lim)
    checked = res.limits.frame()[res.limits.frame()["cut"] == "diesel"]
    assert len(checked) == 2 and set(checked["status"]) == {"fail"}  # both diesel limits matched and checked
    w = [x for x in res.warnings if "not checked" in x]
    assert len(w) == 1 and "nearest is 'kerosene'" in w[0] and "sulfur" in w[0]


def test_shipped_limit_sets_and_quality_limits():
    # The two shipped sets load by name; the default holds the limits that bind cut points (jet freeze and
    # smoke point, diesel cloud point and 40 °C viscosity, sulfur), each with a source that says to verify it.
    from assaycut.io.tomlfiles import read_limits

    default, finished = read_limits(None), read_limits("finished")
    assert read_limits("blendstock") == default and finished != default
    props = {(lim.cut, lim.property) for lim in default}
    assert {("kerosene", "freeze_point_c"), ("kerosene", "smoke_point_mm"), ("diesel", "cloud_point_c"),
            ("diesel", "viscosity_40c_cst"), ("diesel", "sulfur_wt_pct")} <= props
    for lim in default + finished:
        assert lim.source and ("verify" in lim.source or "our choice" in lim.source), lim


def test_a_swing_cuts_halves_keep_the_parents_limits(demo_paths, tmp_path):
    # Either half of a swing kerosene may go to the jet pool, so each half must meet the kerosene limits
    # (common practice, no source). Before, the halves had no limits and the kerosene limits were "not checked".
    from assaycut.io.tomlfiles import read_cut_set, read_limits

    p = tmp_path / "swing.toml"
    p.write_text('[[cut]]\nname = "light ends"\nend_c = 15\n[[cut]]\nname = "naphtha"\nend_c = 177\n'
                 '[[cut]]\nname = "kerosene"\nend_c = 232\nswing = true\n[[cut]]\nname = "diesel"\nend_c = 343\n'
                 '[[cut]]\nname = "residue"\n')
    lim = read_limits(None)
    kero = [x for x in lim if x.cut == "kerosene"]
    res = run_yields(load_assay(demo_paths[0]), read_cut_set(str(p)), lim)
    rows = res.limits.rows()
    for half in ("kerosene (light half)", "kerosene (heavy half)"):
        got = {x["property"]: x for x in rows if x["cut"] == half}
        assert set(got) == {x.property for x in kero}
        cut = next(c for c in res.cuts.rows() if c["name"] == half)
        for x in kero:  # each status is the limit read on that half's own value
            if x.property in cut and got[x.property]["status"] != "n/a":
                assert (got[x.property]["status"] == "pass") == meets(x, cut[x.property])
    assert not any("not checked" in w for w in res.warnings)
