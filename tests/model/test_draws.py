"""Draws of one assay modelled as arrays over draws (build_draws) against each draw built by the reference
builder (build_models, itself tested against build_model to the last bit).

The expected values are the reference path's own models: the check is that the fast path gives the same
splines, safe ranges, whole-crude values, flags and cut results to 1e-9 (it gives them to a few ulp: the
same arithmetic, but numpy's power of an array exponent against a scalar one), and that every draw it does
not cover is handed to the reference builder.  The random assays are invented; what is checked is the
identity of the two paths.
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
from assaycut.model.crude import build_models
from assaycut.model.draws import build_draws
from assaycut.studies.uncertainty import BAND_QUALITIES, Sigmas, draw_values, monte_carlo, perturb

TOL = 1e-9


def spline_arrays(b):
    return {"X": b.X, "Y": b.Y, "D": b.D, "lo": b.lo, "hi": b.hi}


def assert_rows_match(assay, vals, method="daubert-1994"):
    """build_draws' rows against the reference models of the same draws; returns the share built fast."""
    n = vals.sg.size
    groups, left = build_draws(assay, vals)
    fast = np.concatenate([g.index for g in groups]) if groups else np.zeros(0, int)
    assert sorted(fast.tolist() + list(left)) == list(range(n))  # every draw once
    ref = build_models([vals.assay(assay, r) for r in range(n)], method, qualities=False)
    ends = default_cut_set().reported()[1]
    for g in groups:
        models = [ref[i] for i in g.index]
        assert not any(isinstance(m, AssaycutError) for m in models)  # a refused draw is never built fast
        want, got = BatchModel(models), BatchModel.from_rows(g)
        for name in ("curve", "sg_dist", "sulfur_dist"):
            w = spline_arrays(want.curve.spline if name == "curve" else getattr(want, name))
            o = spline_arrays(got.curve.spline if name == "curve" else getattr(got, name))
            for k in w:
                assert o[k].shape == w[k].shape, (name, k)
                np.testing.assert_allclose(o[k], w[k], rtol=TOL, atol=TOL, err_msg=f"{name}.{k}")
        for a, b in ((got.curve.safe_lo, want.curve.safe_lo), (got.curve.safe_hi, want.curve.safe_hi),
                     (got.sg, want.sg), (got.sulfur_wt_pct, want.sulfur_wt_pct)):
            np.testing.assert_allclose(a, b, rtol=TOL, atol=TOL)
        assert np.array_equal(got.on_extension, want.on_extension)
        rep = np.repeat(ends[None, :], g.sg.size, axis=0)
        cw, co = cut_columns(want, rep, only=set()), cut_columns(got, rep, only=set())
        for q in BAND_QUALITIES + ["extrapolated"]:
            np.testing.assert_allclose(np.asarray(co[q], float), np.asarray(cw[q], float), rtol=TOL, atol=TOL,
                                       err_msg=q)
    return fast.size / n


@pytest.mark.parametrize("k", range(3))
def test_demo_crude_draws_equal_the_reference_models(demo_paths, k):
    a = load_assay(demo_paths[k])
    vals = draw_values(a, Sigmas(), np.random.default_rng([11, k]), 250)
    # the demo crudes' draws take the common branches: nearly all are built as arrays
    assert assert_rows_match(a, vals) >= 0.95


def test_wide_errors_send_odd_draws_to_the_reference_builder(demo_paths):
    # Large errors (invented) give repeated temperatures, reordered nodes and refused curves: those draws
    # leave the fast path and are built by the reference builder, the rest still match.
    a = load_assay(demo_paths[0])
    vals = draw_values(a, Sigmas(temp_c=25.0, pct=3.0, sg=0.02, sulfur_rel=0.5), np.random.default_rng(3), 200)
    share = assert_rows_match(a, vals)
    assert 0.0 < share < 1.0


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
def test_random_assays_draws_equal_the_reference_models(k):
    rng = np.random.default_rng(100 + k)
    a = random_assay(rng, k)
    vals = draw_values(a, Sigmas(temp_c=3.0, pct=0.5), np.random.default_rng(k), 60)
    assert_rows_match(a, vals)


def test_random_assays_take_the_fast_path_mostly():
    # Coverage, not correctness: most invented assays' draws are built as arrays (the others' are exact too,
    # through the reference builder).
    shares = []
    for k in range(24):
        a = random_assay(np.random.default_rng(100 + k), k)
        groups, _ = build_draws(a, draw_values(a, Sigmas(), np.random.default_rng(k), 40))
        shares.append(sum(g.sg.size for g in groups) / 40)
    assert np.mean(np.array(shares) > 0.5) >= 0.5


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


@pytest.mark.parametrize("k", range(3))
def test_bands_fast_equal_reference(demo_paths, k, monkeypatch):
    # The bands with the draws modelled as arrays against the bands with every draw left to the model builder
    # (build_draws replaced here by one that takes none).
    import assaycut.studies.uncertainty as unc

    a = load_assay(demo_paths[k])
    cs = default_cut_set()
    fast = monte_carlo(a, cs, n=300, seed=4)
    monkeypatch.setattr(unc, "build_draws", lambda assay, vals: ([], list(range(vals.sg.size))))
    ref = monte_carlo(a, cs, n=300, seed=4)
    assert fast.attrs == ref.attrs
    for rf, rr in zip(fast.rows(), ref.rows()):
        assert rf.keys() == rr.keys() and rf["name"] == rr["name"]
        for key in rf:
            if key != "name":
                np.testing.assert_allclose(rf[key], rr[key], rtol=TOL, atol=TOL, err_msg=key)
