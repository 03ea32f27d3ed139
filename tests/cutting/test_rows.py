"""The DataFrame-free path of the yield job (``run_yields(frames=False)``, used when only JSON is printed)
against the reference path (DataFrames): the same JSON object exactly, on the demo crudes and on random
curves.  The reference is the project's own DataFrame path, which the rest of the suite checks against
published sources; here only the equality of the two paths is at stake."""

from __future__ import annotations

import json

import numpy as np
import pytest

from assaycut.cutting.cutset import Cut, CutSet, default_cut_set
from assaycut.cutting.limits import Limit
from assaycut.io import load_assay
from assaycut.io.tomlfiles import read_limits
from assaycut.model.assay import Assay, CurveData
from assaycut.model.crude import build_model
from assaycut.report.jsonout import yield_json
from assaycut.yields import run_yields

SWING = CutSet([Cut("naphtha", 150.0), Cut("kero swing", 200.0, swing=True), Cut("diesel", 360.0),
                Cut("gas oil", 900.0), Cut("beyond", 950.0), Cut("residue", None)], "swing set")


def both(assay, cs, limits):
    model = build_model(assay)
    ref = yield_json(run_yields(assay, cs, limits, model=model))
    fast = yield_json(run_yields(assay, cs, limits, model=model, frames=False))
    assert json.dumps(fast) == json.dumps(ref)  # the same text: keys in the same order too
    return ref, fast


@pytest.mark.parametrize("limits", ["blendstock", "finished", None])
@pytest.mark.parametrize("cs", [default_cut_set(), SWING])
def test_demo_crudes_same_json(demo_paths, cs, limits):
    lim = read_limits(limits) if limits else []
    lim = lim + [Limit("kerosine", "sulfur_wt_pct", max=0.2)]  # a limit on a cut the set lacks: warned about
    for p in demo_paths:
        ref, fast = both(load_assay(p), cs, lim)
        assert fast == ref
        assert isinstance(run_yields(load_assay(p), cs, lim, frames=False).cuts, list)


def test_random_curves_same_json():
    rng = np.random.default_rng(20261202)  # invented random inputs; the check is the equality of two paths
    pct = np.array([0.0, 5, 10, 30, 50, 70, 90])
    for k in range(40):
        temps = np.cumsum(rng.uniform(5.0, 90.0, pct.size)) + rng.uniform(-40.0, 60.0)
        basis = "wt" if k % 3 == 0 else "vol"
        assay = Assay(f"random {k}", float(rng.uniform(0.75, 0.98)),
                      [CurveData("TBP", basis, pct.copy(), temps)],
                      sulfur_wt_pct=float(rng.uniform(0.05, 4.0)) if k % 2 else None)
        ref, fast = both(assay, default_cut_set() if k % 4 else SWING, read_limits(None))
        assert fast == ref, k


def test_overlaps_and_rates_keep_the_dataframe_path(demo_paths):
    a = load_assay(demo_paths[0])
    cs = default_cut_set()
    cs.overlaps.update({"kerosene": 20.0})
    assert not isinstance(run_yields(a, cs, [], frames=False).cuts, list)
    assert not isinstance(run_yields(a, default_cut_set(), [], frames=False, rate_bbl_per_day=1e5).cuts, list)


def assert_close_docs(a, b, where=""):
    """Same structure and texts; numbers equal to 1e-9 (absolute, or relative for large values)."""
    if isinstance(a, dict):
        assert isinstance(b, dict) and list(a) == list(b), (where, set(a) ^ set(b))
        for k in a:
            assert_close_docs(a[k], b[k], f"{where}.{k}")
    elif isinstance(a, list):
        assert isinstance(b, list) and len(a) == len(b), where
        for i, (x, y) in enumerate(zip(a, b)):
            assert_close_docs(x, y, f"{where}[{i}]")
    elif isinstance(a, float) and not isinstance(a, bool):
        assert isinstance(b, float) and b == pytest.approx(a, rel=1e-9, abs=1e-9), (where, a, b)
    else:
        assert a == b, (where, a, b)


def test_many_at_once_equal_one_by_one(demo_paths):
    # The library engine (row-wise arrays over assays) against one run_yields per assay, in one mixed batch:
    # the demo crudes (narrow cuts, qualities, light ends) and random curves on both bases, with and without
    # sulfur.  Limit statuses and warnings must be the same texts.
    from assaycut.yields import run_yields_many

    rng = np.random.default_rng(11)
    assays = [load_assay(p) for p in demo_paths]
    pct = np.array([0.0, 5, 10, 30, 50, 70, 90])
    for k in range(20):
        temps = np.cumsum(rng.uniform(5.0, 90.0, pct.size)) + rng.uniform(-40.0, 60.0)
        assays.append(Assay(f"random {k}", float(rng.uniform(0.75, 0.98)),
                            [CurveData("TBP", "wt" if k % 3 == 0 else "vol", pct.copy(), temps)],
                            sulfur_wt_pct=float(rng.uniform(0.05, 4.0)) if k % 2 else None))
    models = [build_model(a) for a in assays]
    for cs in (default_cut_set(), SWING):
        lim = read_limits(None) + [Limit("kerosine", "sulfur_wt_pct", max=0.2)]
        many = run_yields_many(assays, models, cs, lim)
        for a, m, r in zip(assays, models, many):
            one = run_yields(a, cs, lim, model=m, frames=False)
            assert_close_docs(yield_json(one), yield_json(r), a.name)
