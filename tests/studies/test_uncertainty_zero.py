"""The uncertainty study with every standard deviation at zero gives the base cut table: each draw is the assay
itself, so P10 = P50 = P90 = the value `yields` reports, on curves that take the model's rarer branches (a
curve measured into the end cap, a weight-basis curve, D2887 and D1160 inputs, no narrow cuts).

The expected values are the single-assay path's own cut table: what is checked is the identity of the study's
path (draws modelled together) with it, to 1e-9.  The curves are invented test inputs.
"""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.cutting.cutset import default_cut_set
from assaycut.io import load_assay
from assaycut.model.assay import Assay, CurveData, LightEnds, NarrowCuts
from assaycut.studies.uncertainty import BAND_QUALITIES, Sigmas, monte_carlo
from assaycut.yields import run_yields

TOL = 1e-9


def _narrow_cuts(top_c: float = 550.0) -> NarrowCuts:
    edges = np.array([np.nan, 70.0, 150.0, 230.0, 340.0, top_c])
    m = edges.size
    sg = np.array([0.66, 0.74, 0.80, 0.86, 0.93, 1.01])
    sulfur = np.array([0.01, 0.05, 0.2, 0.9, 1.8, 3.2])
    return NarrowCuts(edges, np.append(edges[1:], np.nan), np.full(m, np.nan), np.full(m, np.nan), sg, sulfur)


def _assay(case: str) -> Assay:
    pct = np.array([2.0, 10.0, 25.0, 40.0, 55.0, 70.0, 80.0])
    temp = np.array([30.0, 95.0, 170.0, 250.0, 340.0, 440.0, 520.0])
    if case == "end_cap":  # measured to 820 °C: the extension's end point is the last point + its step
        pct = np.array([0.0, 10.0, 25.0, 40.0, 55.0, 70.0, 80.0, 86.0, 90.0])
        temp = np.array([40.0, 95.0, 170.0, 250.0, 340.0, 440.0, 560.0, 700.0, 820.0])
        return Assay("end cap", 0.93, [CurveData("TBP", "vol", pct, temp)], sulfur_wt_pct=2.5,
                     narrow_cuts=_narrow_cuts())
    if case == "weight_basis":
        return Assay("weight basis", 0.87, [CurveData("TBP", "wt", pct, temp)], sulfur_wt_pct=1.2,
                     narrow_cuts=_narrow_cuts())
    if case == "d2887":
        sd = CurveData("D2887", "wt", np.array([5.0, 10.0, 30.0, 50.0, 70.0, 90.0, 95.0]),
                       np.array([110.0, 130.0, 200.0, 270.0, 350.0, 450.0, 500.0]))
        return Assay("simulated distillation", 0.82, [sd], sulfur_wt_pct=0.9, narrow_cuts=_narrow_cuts())
    if case == "d1160_behind":
        vac = CurveData("D1160", "vol", np.array([62.0, 70.0, 78.0]), np.array([260.0, 300.0, 345.0]),
                        pressure_mmhg=10.0)
        return Assay("vacuum behind", 0.88, [CurveData("TBP", "vol", pct[:5], temp[:5]), vac], sulfur_wt_pct=1.5,
                     narrow_cuts=_narrow_cuts(),
                     light_ends=LightEnds({"propane": 0.3, "n-butane": 0.9}, "vol"))
    if case == "no_narrow_cuts":
        return Assay("whole crude only", 0.85, [CurveData("TBP", "vol", pct, temp)], sulfur_wt_pct=1.1)
    raise ValueError(case)


def _check(a: Assay) -> None:
    cs = default_cut_set()
    base = run_yields(a, cs).cuts
    bands = monte_carlo(a, cs, Sigmas(temp_c=0.0, pct=0.0, sg=0.0, sulfur_rel=0.0), n=20)
    assert bands.attrs["failed"] == 0 and bands.attrs["draws"] == 20
    for j, row in enumerate(bands.rows()):
        assert row["name"] == base["name"][j]
        for q in BAND_QUALITIES:
            want = float(base[q][j])
            for p in ("p10", "p50", "p90"):
                got = row[f"{q}_{p}"]
                if np.isnan(want):
                    assert np.isnan(got), (a.name, row["name"], q, p)
                else:
                    assert abs(got - want) <= TOL * max(1.0, abs(want)), (a.name, row["name"], q, p, got, want)


@pytest.mark.parametrize("case", ["end_cap", "weight_basis", "d2887", "d1160_behind", "no_narrow_cuts"])
def test_zero_sigmas_give_the_base_cut_table_on_rare_branches(case):
    # Seen failing: with the end cap's step changed from 50 to 60 °C in the curve model alone, the end_cap case
    # (whose draws are modelled as arrays over draws) differs from the base table.
    _check(_assay(case))


def test_zero_sigmas_give_the_base_cut_table_on_the_demo_crudes(demo_paths):
    for p in demo_paths:
        _check(load_assay(p))
