"""The LPG split of the light-ends cut: propane, isobutane and n-butane as shares of the cut.

Expected values are arithmetic on the light-ends analysis given (volume basis): a component's share of a cut
is its volume in the cut over the cut's volume (the definition of a volume share; common practice, no
source).  The curve and the analysis are test inputs, not data.
"""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.cutting.cutset import Cut, CutSet
from assaycut.model.assay import Assay, CurveData, LightEnds
from assaycut.report.jsonout import yield_json
from assaycut.yields import run_yields

ANALYSIS = {"C2": 0.1, "C3": 0.4, "iC4": 0.3, "nC4": 0.9, "iC5": 0.5, "nC5": 0.8}
"""vol % of the crude; they add up to the curve's first point, 3.0 % at 40 °C."""


def _assay(light_ends=True) -> Assay:
    pct = np.array([3.0, 10.0, 25.0, 40.0, 55.0, 70.0, 80.0])
    temp = np.array([40.0, 95.0, 170.0, 250.0, 340.0, 440.0, 520.0])
    return Assay("lpg test", 0.85, [CurveData("TBP", "vol", pct, temp)], sulfur_wt_pct=1.0,
                 light_ends=LightEnds(dict(ANALYSIS), "vol") if light_ends else None)


def _cuts(first_end_c: float, overlap: float = 0.0) -> CutSet:
    return CutSet([Cut("gas", first_end_c), Cut("naphtha", 150.0), Cut("rest", None)], "test",
                  {"gas": overlap} if overlap else {})


def test_the_gas_cut_splits_as_the_analysis():
    # The gas cut (to 20 °C, between n-butane at -0.5 °C and isopentane at 27.8 °C) holds C2 to nC4, 1.7 vol %.
    cuts = run_yields(_assay(), _cuts(20.0)).cuts
    assert cuts["vol_pct"][0] == pytest.approx(1.7, abs=1e-6)
    lpg = yield_json(run_yields(_assay(), _cuts(20.0)))["cuts"][0]["lpg_split"]
    assert set(lpg) == {"c3_vol_pct", "ic4_vol_pct", "nc4_vol_pct"}
    assert lpg["c3_vol_pct"] == pytest.approx(100 * 0.4 / 1.7, abs=1e-4)
    assert lpg["ic4_vol_pct"] == pytest.approx(100 * 0.3 / 1.7, abs=1e-4)
    assert lpg["nc4_vol_pct"] == pytest.approx(100 * 0.9 / 1.7, abs=1e-4)


def test_a_wider_first_cut_holds_the_same_lpg_in_more_volume():
    # A first cut to 150 °C: the same 1.6 vol % of C3 + C4 in the whole cut.
    result = run_yields(_assay(), CutSet([Cut("naphtha", 150.0), Cut("rest", None)], "test"))
    vol = result.cuts["vol_pct"][0]
    lpg = yield_json(result)["cuts"][0]["lpg_split"]
    assert lpg["c3_vol_pct"] == pytest.approx(100 * 0.4 / vol, abs=1e-4)
    assert lpg["nc4_vol_pct"] == pytest.approx(100 * 0.9 / vol, abs=1e-4)
    assert yield_json(result)["cuts"][1]["lpg_split"] is None


def test_cuts_without_lpg_and_crudes_without_an_analysis():
    doc = yield_json(run_yields(_assay(), _cuts(20.0)))
    assert [c["lpg_split"] is None for c in doc["cuts"]] == [False, True, True]
    plain = yield_json(run_yields(_assay(light_ends=False), _cuts(20.0)))
    assert all("lpg_split" not in c for c in plain["cuts"])


def test_a_real_column_keeps_every_component_across_its_products():
    # With an overlap at the gas cut's end some butane leaves with the naphtha: each component's volume,
    # summed over the products, is still the analysis's.
    cuts = run_yields(_assay(), _cuts(20.0, overlap=8.0)).cuts
    vol = np.asarray(cuts["vol_pct"])
    for col, want in (("lpg_c3_vol_pct", 0.4), ("lpg_ic4_vol_pct", 0.3), ("lpg_nc4_vol_pct", 0.9)):
        share = np.nan_to_num(np.asarray(cuts[col], float))
        assert float((share * vol).sum() / 100.0) == pytest.approx(want, abs=2e-3), col
    assert np.asarray(cuts["lpg_nc4_vol_pct"], float)[1] > 0.0  # some n-butane in the naphtha
