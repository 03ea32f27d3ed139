"""The library engine: many crudes cut as arrays must equal one-by-one cutting exactly."""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.assay import Assay, CurveData
from assaycut.crude import build_model
from assaycut.cutting import Cut, CutSet, cut_columns, default_cut_set
from assaycut.io import load_assay
from assaycut.library import cut_library, library_summary


@pytest.fixture(scope="module")
def models():
    from assaycut.io.tomlfiles import demo_assay_paths

    ms = [build_model(load_assay(p)) for p in demo_assay_paths()]
    # a crude without narrow cuts or sulfur, and a short curve, to mix node counts and missing data
    ms.append(build_model(Assay("bare", 0.88, [CurveData("TBP", "vol", np.array([5.0, 30.0, 60.0]),
                                                         np.array([60.0, 220.0, 400.0]))])))
    return ms


@pytest.mark.parametrize("cs", [default_cut_set(), CutSet([Cut("a", 100.0), Cut("b", 250.0, swing=True),
                                                          Cut("c", 420.0), Cut("d", None)])])
def test_batch_equals_single(models, cs):
    # Identity: the batched engine and the single-assay engine compute the same numbers.
    names, cols = cut_library(models, cs)
    _, ends = cs.reported()
    for r, m in enumerate(models):
        single = cut_columns(m, ends[None, :])
        for key, val in single.items():
            np.testing.assert_allclose(np.asarray(cols[key][r], float), np.asarray(val[0], float),
                                       rtol=0, atol=1e-9, equal_nan=True, err_msg=f"{key} of crude {r}")


def test_library_summary_rows(models):
    from assaycut.io.tomlfiles import demo_assay_paths

    assays = [load_assay(p) for p in demo_assay_paths()]
    df = library_summary(assays, models[:3], default_cut_set())
    assert list(df["crude"]) == ["Selkie Light", "Brannock Blend", "Tarn Heavy"]
    vol = df[[c for c in df.columns if c.endswith(" vol %")]].sum(axis=1)
    np.testing.assert_allclose(vol, 100.0, atol=1e-9)
