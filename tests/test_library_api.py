"""The library API validates its inputs as the readers validate files: an assay built by code that a reader
would refuse raises the project's own error with a message, never IndexError, TypeError or a nonsense
result."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from assaycut.cutting.cutset import default_cut_set
from assaycut.cutting.ideal import cut_table
from assaycut.errors import AssaycutError, ConversionError, InputError
from assaycut.io import load_assay
from assaycut.io.tomlfiles import demo_assay_paths
from assaycut.model.assay import Assay, CurveData
from assaycut.model.crude import build_model
from assaycut.units import sg_to_api

PCT = np.array([2.0, 10.0, 30.0, 50.0, 70.0, 85.0, 95.0])
TEMP = np.array([20.0, 90.0, 180.0, 270.0, 380.0, 480.0, 560.0])


def _assay(**kw):
    curve = kw.pop("curve", None) or CurveData("TBP", "vol", PCT.copy(), TEMP.copy())
    base = dict(name="Code Crude", sg=0.85, curves=[curve], sulfur_wt_pct=1.0)
    base.update(kw)
    return Assay(**base)


def test_a_valid_assay_from_code_builds():
    m = build_model(_assay())
    assert cut_table(m, default_cut_set()).frame()["vol_pct"].sum() == pytest.approx(100.0, abs=1e-9)  # mass balance


@pytest.mark.parametrize("kw,match", [
    ({"sg": float("nan")}, r"whole-crude SG nan is outside"),
    ({"sg": -1.0}, r"whole-crude SG -1.0 is outside"),
    ({"sulfur_wt_pct": -5.0}, r"sulfur -5.0 wt % is outside 0-15"),
    ({"curves": []}, r"no distillation curve"),
    ({"curve": CurveData("TBP", "vol", PCT[:3].copy(), TEMP.copy())}, r"3 percents against 7 temperatures"),
    ({"curve": CurveData("TBP", "vol", np.array([]), np.array([]))}, r"0 point\(s\); a curve needs at least two"),
    ({"curve": CurveData("D1160", "vol", PCT.copy(), TEMP.copy())}, r"a D1160 curve needs its pressure"),
    ({"curve": CurveData("TBP", "vol", PCT.copy(), np.where(TEMP > 300, np.nan, TEMP))}, r"must be finite"),
    ({"curve": CurveData("TBP", "vol", PCT * 2.0, TEMP.copy())}, r"percents must lie within 0-100"),
    ({"curve": CurveData("XYZ", "vol", PCT.copy(), TEMP.copy())}, r"method 'XYZ' is not one of"),
    ({"name": ""}, r"the assay has no name"),
])
def test_build_model_refuses_what_a_reader_would(kw, match):
    with pytest.raises(InputError, match=match):
        build_model(_assay(**kw))


def test_nan_in_nan_out_and_no_division_by_zero():
    m = build_model(_assay())
    assert np.isnan(m.curve.temp_at(np.nan))  # not a temperature made up at the end of the curve
    assert np.isnan(m.curve.pct_at(np.nan))
    with pytest.raises(ConversionError, match="specific gravity must be positive"):
        sg_to_api(0.0)
    # arrays: a zero SG row gives NaN, the others the exact formula API = 141.5/SG - 131.5 (API definition)
    out = sg_to_api(np.array([0.0, 1.0]))
    assert np.isnan(out[0]) and out[1] == pytest.approx(10.0, abs=1e-12)


def test_load_assay_accepts_a_path():
    p = Path(demo_assay_paths()[0])
    assert load_assay(p).name == load_assay(str(p)).name
    with pytest.raises(InputError, match="expected a file path"):
        load_assay(42)


finite_or_not = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-10, 10))


@settings(max_examples=150, deadline=None)
@given(sg=finite_or_not, sulfur=st.one_of(st.none(), finite_or_not),
       pct=st.lists(finite_or_not, min_size=0, max_size=8), temp=st.lists(finite_or_not, min_size=0, max_size=8),
       method=st.sampled_from(["TBP", "D86", "D2887", "D1160", "bad"]), basis=st.sampled_from(["vol", "wt", "?"]),
       pressure=st.one_of(st.none(), finite_or_not))
def test_fuzzed_public_api_gives_a_model_or_our_error(sg, sulfur, pct, temp, method, basis, pressure):
    # Any assay built by code either models (and cuts to a mass balance of 100 %) or raises an AssaycutError.
    a = Assay("Fuzz", sg, [CurveData(method, basis, np.array(pct, dtype=float), np.array(temp, dtype=float),
                                     pressure)], sulfur_wt_pct=sulfur)
    try:
        m = build_model(a)
    except AssaycutError:
        return
    t = cut_table(m, default_cut_set()).frame()
    assert t["vol_pct"].sum() == pytest.approx(100.0, abs=1e-6)
    assert t["wt_pct"].sum() == pytest.approx(100.0, abs=1e-6)
