"""The one result table: its two edge shapes (rows for the JSON, a DataFrame for the report writers) hold the
same values; the library engine's results equal one run_yields per assay.  Only the identity of paths is
at stake here; the rest of the suite checks the values against published sources."""

from __future__ import annotations

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


def assert_same_rows(rows, records):
    """The table's rows (plain Python values) equal the DataFrame's records value for value (NaN for NaN)."""
    assert len(rows) == len(records)
    for r, f in zip(rows, records):
        assert list(r) == list(f)
        for k in r:
            x, y = r[k], f[k]
            if isinstance(x, float) and x != x:
                assert isinstance(y, float) and y != y, k
            else:
                assert x == y and type(x) is type(y), (k, x, y)


@pytest.mark.parametrize("cs", [default_cut_set(), SWING])
def test_rows_and_frame_are_the_same_table(demo_paths, cs):
    # Identity of the two edge shapes: the rows (what the JSON prints) and the DataFrame (what the report
    # writers take) of the cut table, the limit status and the bands hold the same values in the same order.
    from assaycut.studies.uncertainty import monte_carlo

    lim = read_limits("blendstock")
    for p in demo_paths:
        a = load_assay(p)
        res = run_yields(a, cs, lim, uncertainty_draws=20)
        for table in (res.cuts, res.limits, res.bands):
            assert_same_rows(table.rows(), table.frame().to_dict("records"))
        assert list(res.cuts.frame().columns) == res.cuts.keys
        assert res.bands.frame().attrs == res.bands.attrs == monte_carlo(a, cs, n=20).attrs


def test_a_table_refuses_columns_of_unequal_length():
    from assaycut.cutting.cut_table import CutTable

    with pytest.raises(ValueError, match="unequal length"):
        CutTable({"name": ["a", "b"], "vol_pct": np.array([1.0])})


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
            one = run_yields(a, cs, lim, model=m)
            assert_close_docs(yield_json(one), yield_json(r), a.name)
