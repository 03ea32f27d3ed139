"""Draws of one assay modelled together (build_draws: the draws as rows of the one model builder) against each
draw's assay built alone (build_model, a batch of one).

The expected values are each draw's own model: the check is that a draw's model does not depend on the other
draws built with it (every spline, safe range, whole-crude value and flag to the last bit, the refused draws
refused with build_model's error), and that the batch cuts as the models do.  The random assays are invented;
what is checked is the identity of the two uses of the builder.
"""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.cutting.cutset import default_cut_set
from assaycut.cutting.ideal import cut_columns
from assaycut.cutting.model_rows import BatchModel
from assaycut.errors import AssaycutError
from assaycut.io import load_assay
from assaycut.model.assay import Assay, CurveData, LightEnds, NarrowCuts
from assaycut.model.crude import build_draws, build_model, crude_model_of
from assaycut.studies.uncertainty import BAND_QUALITIES, Sigmas, draw_values, perturb
from tests.model.test_build_many import leaves

TOL = 1e-9


def alone(assay):
    try:
        return build_model(assay, qualities=False)
    except AssaycutError as e:
        return e


def assert_rows_match(assay, vals, method="daubert-1994"):
    """build_draws' rows against each draw built alone; returns the share of draws modelled."""
    n = vals.sg.size
    sets, failed = build_draws(assay, vals, method)
    ref = [alone(vals.assay(assay, r)) for r in range(n)]
    built = np.concatenate([s.index for s in sets]) if sets else np.zeros(0, int)
    assert sorted(built.tolist()) == [r for r in range(n) if not isinstance(ref[r], AssaycutError)]
    assert failed == sum(isinstance(m, AssaycutError) for m in ref)
    for s in sets:
        for r in range(s.n):
            got, want = dict(leaves(crude_model_of(s, r))), dict(leaves(ref[int(s.index[r])]))
            assert got.keys() == want.keys()
            assert not [p for p in got if got[p] != want[p]], int(s.index[r])
    if sets:
        ends = default_cut_set().reported()[1]
        want, got = BatchModel([ref[i] for i in built]), BatchModel.from_rows(sets)
        rep = np.repeat(ends[None, :], built.size, axis=0)
        cw, co = cut_columns(want, rep, only=set()), cut_columns(got, rep, only=set())
        for q in BAND_QUALITIES + ["extrapolated"]:
            np.testing.assert_allclose(np.asarray(co[q], float), np.asarray(cw[q], float), rtol=TOL, atol=TOL,
                                       err_msg=q)
    return built.size / n


@pytest.mark.parametrize("k", range(3))
def test_demo_crude_draws_equal_their_models_alone(demo_paths, k):
    a = load_assay(demo_paths[k])
    vals = draw_values(a, Sigmas(), np.random.default_rng([11, k]), 250)
    assert assert_rows_match(a, vals) >= 0.95


def test_wide_errors_refuse_some_draws_as_alone(demo_paths):
    # Large errors (invented) give repeated temperatures, reordered nodes and refused curves: the rows split
    # into many sets and the refused draws are refused as alone.
    a = load_assay(demo_paths[0])
    vals = draw_values(a, Sigmas(temp_c=25.0, pct=3.0, sg=0.02, sulfur_rel=0.5), np.random.default_rng(3), 200)
    assert 0.0 < assert_rows_match(a, vals) <= 1.0


def random_assay(rng, k: int) -> Assay:
    """An invented crude with narrow cuts: curves stopping early or closed at 100 %, with and without light
    ends, whole-crude sulfur or not, some narrow-cut values missing, some with a D1160 curve behind."""
    n = int(rng.integers(5, 12))
    top = 100.0 if k % 7 == 3 else float(rng.uniform(40.0, 95.0))
    pct = np.sort(rng.uniform(1.0, top, n))
    pct[0] = float(rng.uniform(0.5, 3.0)) if k % 5 else 0.0
    pct[-1] = top
    pct = np.maximum.accumulate(pct + np.arange(n) * 0.5).clip(0.0, 100.0)
    temps = np.cumsum(rng.uniform(15.0, 70.0, n)) + rng.uniform(-10.0, 40.0)
    curves = [CurveData("TBP", "vol", pct, temps)]
    if k % 4 == 2 and top < 90.0:
        curves.append(CurveData("D1160", "vol", np.array([top + 3.0, top + 6.0, min(top + 9.0, 99.0)]),
                                np.array([240.0, 270.0, 300.0]) + rng.uniform(0, 20), pressure_mmhg=10.0))
    edges = np.array([np.nan, 70.0, 110.0, 150.0, 200.0, 250.0, 300.0, 350.0, 400.0, 500.0])
    start, end = edges, np.append(edges[1:], np.nan)
    m = start.size
    sg = 0.65 + 0.03 * np.arange(m) + rng.uniform(-0.005, 0.005, m)
    sulfur = 0.01 * np.exp(0.45 * np.arange(m)) * rng.uniform(0.8, 1.2)
    if k % 3 == 1:
        sg[int(rng.integers(1, m))] = np.nan
        sulfur[int(rng.integers(0, m))] = np.nan
    nc = NarrowCuts(start, end, np.full(m, np.nan), np.full(m, np.nan), sg, sulfur)
    le = (LightEnds({"propane": 0.2 * pct[0], "n-butane": 0.5 * pct[0]}, "vol" if k % 2 else "wt")
          if k % 5 and k % 3 != 2 else None)
    return Assay(f"random {k}", float(rng.uniform(0.80, 0.95)), curves,
                 sulfur_wt_pct=float(rng.uniform(0.1, 3.0)) if k % 6 else None, narrow_cuts=nc, light_ends=le)


@pytest.mark.parametrize("k", range(24))
def test_random_assays_draws_equal_their_models_alone(k):
    rng = np.random.default_rng(100 + k)
    a = random_assay(rng, k)
    vals = draw_values(a, Sigmas(temp_c=3.0, pct=0.5), np.random.default_rng(k), 60)
    assert_rows_match(a, vals)


def test_draw_values_are_sequential_draws_in_measurement_order(demo_paths):
    # Identity of the random stream: a block of draws takes, draw after draw, the errors rng.normal gives for
    # each measurement in order (per curve temperatures then percents, crude SG, crude sulfur, narrow-cut SG,
    # narrow-cut sulfur), so the bands of a seed do not depend on how the draws are grouped.
    sig = Sigmas()
    for path in demo_paths:
        a = load_assay(path)
        block = draw_values(a, sig, np.random.default_rng(9), 7)
        rng = np.random.default_rng(9)
        for r in range(7):
            errs = []
            for c in a.curves:
                errs.append((rng.normal(0.0, sig.temp_c, c.temp_c.size), rng.normal(0.0, sig.pct, c.percent.size)))
            e_sg = rng.normal(0.0, sig.sg)
            e_s = rng.normal(0.0, sig.sulfur_rel) if a.sulfur_wt_pct is not None else None
            e_ncsg = rng.normal(0.0, sig.sg, a.narrow_cuts.sg.size)
            e_ncs = rng.normal(0.0, sig.sulfur_rel, a.narrow_cuts.sg.size)
            for k, (c, (et, ep)) in enumerate(zip(a.curves, errs)):
                t = np.maximum.accumulate(c.temp_c + et + np.arange(et.size) * 1e-6)
                p = np.clip(c.percent + ep, 0.0, 100.0)
                if k == 0 and a.light_ends is not None and c.percent[0] > 0:
                    p[0] = c.percent[0]
                assert np.array_equal(block.temp_c[k][r], t)
                assert np.array_equal(block.percent[k][r], np.maximum.accumulate(p))
            assert block.sg[r] == a.sg + e_sg
            assert block.sulfur_wt_pct[r] == max(a.sulfur_wt_pct * (1.0 + e_s), 0.0)
            assert np.array_equal(block.nc_sg[r], a.narrow_cuts.sg + e_ncsg)
            assert np.array_equal(block.nc_sulfur_wt_pct[r],
                                  np.maximum(a.narrow_cuts.sulfur_wt_pct * (1.0 + e_ncs), 0.0), equal_nan=True)
        one = perturb(a, sig, np.random.default_rng(9))  # perturb is the block's first draw
        assert np.array_equal(one.curves[0].temp_c, block.temp_c[0][0]) and one.sg == block.sg[0]
