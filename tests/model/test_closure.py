"""Measured narrow cuts kept, balances closed on the rest, and answers continuous in the cut points.

The demo crudes are invented; the checks here compare the tool with itself under a change that must not
matter (a property of the method, no expected value from the data), as the rules of the model state them.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from assaycut.cutting.cutset import default_cut_set
from assaycut.io import load_assay
from assaycut.model.assay import Assay, CurveData
from assaycut.model.crude import build_model
from assaycut.yields import run_yields


def without_cuts_from(assay, start_c):
    """The assay with its narrow cuts starting at or above ``start_c`` deleted."""
    nc = assay.narrow_cuts
    keep = ~(np.nan_to_num(nc.start_c, nan=-np.inf) >= start_c)
    pick = lambda x: np.asarray(x)[keep]  # noqa: E731
    return dataclasses.replace(assay, narrow_cuts=dataclasses.replace(
        nc, start_c=pick(nc.start_c), end_c=pick(nc.end_c), vol_pct=pick(nc.vol_pct), wt_pct=pick(nc.wt_pct),
        sg=pick(nc.sg), sulfur_wt_pct=pick(nc.sulfur_wt_pct), extras={k: pick(v) for k, v in nc.extras.items()},
        rows=[r for r, k in zip(nc.rows, keep) if k]))


def cut(result, name):
    t = result.cuts
    i = t.index(name)
    return {k: t[k][i] for k in t.keys}


def test_deleting_the_heavy_narrow_cuts_leaves_a_covered_cut_as_measured(demo_paths):
    # The principle (measured data kept; the balance closed on the part no cut covers): Tarn Heavy's diesel
    # (232-343 °C) lies inside its narrow cuts up to 350 °C; deleting every narrow cut above 350 °C must leave it
    # within SG 0.002 and sulfur 2 % (the goal set for this rule; it moved by 0.08 SG and 130 % when the
    # distributions were scaled to the whole crude).
    a = load_assay([p for p in demo_paths if "tarn" in p][0])
    full = cut(run_yields(a, default_cut_set()), "diesel")
    part = cut(run_yields(without_cuts_from(a, 350.0), default_cut_set()), "diesel")
    assert abs(part["sg"] - full["sg"]) <= 0.002
    assert abs(part["sulfur_wt_pct"] / full["sulfur_wt_pct"] - 1.0) <= 0.02


def test_a_hundredth_of_a_degree_moves_no_quality_by_more_than_half_a_unit(demo_paths):
    # Continuity (the blend of measured and estimated parts by their shares): kerosene's end 253.50 -> 253.51 °C
    # on Tarn Heavy moves no value of any cut by more than 0.5 in its unit (it moved the freeze point by 17.9 °C
    # when a cut switched from measured to a correlation at 95 % coverage).
    a = load_assay([p for p in demo_paths if "tarn" in p][0])
    runs = [run_yields(a, default_cut_set().with_ends({"kerosene": t})) for t in (253.50, 253.51)]
    for name in runs[0].cuts["name"]:
        x, y = cut(runs[0], name), cut(runs[1], name)
        for k, v in x.items():
            if isinstance(v, (float, np.floating)) and np.isfinite(v):
                assert np.isfinite(y[k]) and abs(y[k] - v) <= 0.5, (name, k, v, y[k])


def test_a_weight_curve_that_does_not_close_names_what_disagrees():
    # Messages say what is true of the input: a weight-basis curve with no narrow-cut densities that converts
    # past 100 vol % is refused without speaking of cut densities it does not have (the case of a wide-boiling
    # D2887 whose converted front falls far below its own start; see the D2887 warning's test).
    from assaycut.errors import CurveError

    a = Assay("w", 0.86, [CurveData("D2887", "wt", np.array([5, 10, 30, 50, 70, 90, 95.0]),
                                    np.array([108, 150, 260, 350, 440, 530, 539.0]))], sulfur_wt_pct=1.0)
    with pytest.raises(CurveError) as err:
        build_model(a)
    assert "the cut densities disagree" not in str(err.value) and "no narrow-cut densities" in str(err.value)
