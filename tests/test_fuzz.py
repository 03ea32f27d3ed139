"""Fuzzing with hypothesis: readers and core give a valid result or an AssaycutError, never another exception.

Also the numerical invariants of the style guide: yields sum to 100 % on both bases, converted monotone
curves stay monotone, and no NaN reaches a cut table without an explaining warning or method note.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from assaycut.cutting.cutset import Cut, CutSet, default_cut_set
from assaycut.cutting.ideal import cut_table
from assaycut.errors import AssaycutError
from assaycut.io import load_assay
from assaycut.model.assay import Assay, CurveData
from assaycut.model.crude import build_model
from assaycut.yields import run_yields

FUZZ = settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])

csv_chars = st.sampled_from(list("0123456789.,;-+eE \t\n") + ["vol_pct", "wt_pct", "temp_c", "temp_f", "nan", "inf",
                                                                  "\ufeff", "x", "\"", "1e308", "-0"])


@FUZZ
@given(st.lists(csv_chars, max_size=60).map("".join), st.sampled_from([None, 30.0]))
def test_random_csv_text(tmp_path, text, api):
    p = tmp_path / "f.csv"
    p.write_text(text, encoding="utf-8")
    try:
        a = load_assay(str(p), api=api)
        run_yields(a, default_cut_set())
    except AssaycutError:
        pass


@FUZZ
@given(st.binary(max_size=300))
def test_random_bytes_as_workbook(tmp_path, data):
    p = tmp_path / "f.xlsx"
    p.write_bytes(data)
    with pytest.raises(AssaycutError):
        load_assay(str(p))


@st.composite
def random_curve(draw):
    n = draw(st.integers(2, 25))
    pct = np.sort(draw(st.lists(st.floats(0.0, 100.0), min_size=n, max_size=n)))
    inc = draw(st.lists(st.floats(0.0, 120.0), min_size=n, max_size=n))
    t0 = draw(st.floats(-60.0, 300.0))
    temp = t0 + np.cumsum(inc)
    return pct, temp


@FUZZ
@given(random_curve(), st.floats(0.6, 1.05), st.one_of(st.none(), st.floats(0.0, 6.0)))
def test_random_curves_cut_or_refused(curve, sg, sulfur):
    pct, temp = curve
    a = Assay("fuzz", sg, [CurveData("TBP", "vol", pct, temp)], sulfur_wt_pct=sulfur)
    try:
        res = run_yields(a, default_cut_set())
    except AssaycutError:
        return
    cuts = res.cuts.frame()
    # yields sum to 100 % on both bases (identity)
    assert cuts["vol_pct"].sum() == pytest.approx(100.0, abs=1e-6)
    assert cuts["wt_pct"].sum() == pytest.approx(100.0, abs=1e-6)
    assert (cuts["vol_pct"] >= -1e-12).all() and (cuts["wt_pct"] >= -1e-12).all()
    # no NaN without an explanation: an empty cut is warned about; missing sulfur is warned about; the
    # other empty qualities are explained by the method notes (range of each correlation)
    if cuts["sulfur_wt_pct"].isna().any():
        assert any("sulfur" in w for w in res.warnings) or (cuts["vol_pct"] <= 1e-9).any()
    if cuts["sg"].isna().any():
        assert any("no yield" in w for w in res.warnings)
    from assaycut.methods.characterisation import mw_in_range

    for r in cuts[cuts["vol_pct"] > 1e-9].to_dict("records"):
        # every cut with a yield has the one characterising boiling point and its Watson K
        assert np.isfinite(r["meabp_c"]) and np.isfinite(r["watson_k"]), r["name"]
        # a molecular weight is missing only outside the correlation's range (Riazi-Daubert 1987)
        assert np.isfinite(r["mw"]) or not bool(mw_in_range(r["meabp_c"], r["sg"])), r["name"]
        # a cut with a D86 has its cetane index and flash estimate; one outside the method's scope is flagged
        # and named in a warning
        for col, what in (("cetane_index_d4737", "cetane index"), ("flash_c_est", "flash estimate")):
            if r["d86_c"] is not None:
                assert np.isfinite(r[col]), (r["name"], col)
            if col in r["out_of_scope"]:
                assert any(w.startswith(f"{what} of") and r["name"] in w for w in res.warnings)


@FUZZ
@given(st.lists(st.one_of(st.floats(-300.0, 1600.0), st.just(math.nan), st.just(math.inf)), max_size=9),
       st.lists(st.booleans(), max_size=9))
def test_random_cut_sets(ends, swings):
    cuts = [Cut(f"c{i}", e, bool(swings[i]) if i < len(swings) else False) for i, e in enumerate(ends)]
    cuts.append(Cut("last", None))
    try:
        cs = CutSet(cuts, "fuzz")
    except AssaycutError:
        return
    m = _demo_model()
    df = cut_table(m, cs).frame()
    assert df["vol_pct"].sum() == pytest.approx(100.0, abs=1e-9)


_MODEL = {}


def _demo_model():
    if "m" not in _MODEL:
        from assaycut.io.tomlfiles import demo_assay_paths

        _MODEL["m"] = build_model(load_assay(demo_assay_paths()[1]))
    return _MODEL["m"]


monotone_tbp = st.lists(st.floats(0.5, 60.0), min_size=6, max_size=6).flatmap(
    lambda inc: st.floats(-10.0, 300.0).map(lambda t0: dict(zip((0, 10, 30, 50, 70, 90, 95),
                                                               (t0 + np.concatenate([[0], np.cumsum(inc)])).tolist()))))


@FUZZ
@given(monotone_tbp)
def test_converted_monotone_curves_stay_monotone(tbp):
    # Daubert 1994 in both directions builds each segment from a positive difference: monotone in, monotone out.
    from assaycut.methods.d86 import d86_to_tbp_daubert_1994, tbp_to_d86_daubert_1994
    from assaycut.units import c_to_f

    assume(c_to_f(tbp[50]) > 0)
    for out in (tbp_to_d86_daubert_1994(tbp), d86_to_tbp_daubert_1994(tbp)):
        vals = [out[k] for k in sorted(out)]
        assert all(b >= a for a, b in zip(vals, vals[1:]))
