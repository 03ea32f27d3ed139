"""The development set: 25 open real crude assays (NOAA ADIOS oil database records EX00004-EX00058, works of the
United States Government, CC0; tests/data/open_assays.json, see tests/open_assays.py for what is taken and
how).  The expected values are the laboratory's own measured cuts; the goals are the project's.

Given its cuts as narrow cuts, the tool must give them back as measured at their own boundaries; held back or
not given, it must predict them within the stated mean errors.
"""

from __future__ import annotations

import numpy as np
import pytest

from tests import open_assays as oa


@pytest.fixture(scope="module")
def recs():
    return oa.records()


@pytest.fixture(scope="module")
def errs(recs):
    return {case: [dict(e, rec=r["id"]) for r in recs for e in oa.errors(r, case)]
            for case in ("all", "to650", "holdout", "whole")}


def worst(errs, key):
    vals = [abs(e[key]) for e in errs if np.isfinite(e[key])]
    return max(vals)


def mean(errs, key):
    return float(np.mean([abs(e[key]) for e in errs if np.isfinite(e[key])]))


def test_the_development_set_is_what_the_source_gives(recs):
    # NOAA ADIOS records EX00004-EX00058 (CC0): 25 crudes, each with seven cuts that tile the crude
    # (IBP-60, 60-165, 165-330, 330-480, 480-650, 650-1000, 1000+ °F) and whose volumes add to about 100 %.
    assert len(recs) == 25
    for r in recs:
        ends = [c["end_f"] for c in r["cuts"]]
        assert ends == [60.0, 165.0, 330.0, 480.0, 650.0, 1000.0, None], r["id"]
        assert sum(c["vol_pct"] for c in r["cuts"]) == pytest.approx(100.0, abs=1.5), r["id"]


def test_given_cuts_come_back_as_measured(errs):
    # Goal: all seven cuts given, each reported at its own boundaries with its measured SG (within 0.001) and
    # sulfur (within 1 % relative).
    assert worst(errs["all"], "sg") <= 0.001
    assert worst(errs["all"], "sulfur_rel") <= 0.01
    assert worst(errs["all"], "vol_pct") <= 0.1


def test_cuts_to_650f_come_back_as_measured(errs):
    # Goal: only the cuts up to 650 °F given (no residue or vacuum cut): those within SG 0.002 and sulfur 2 %,
    # however the whole crude closes on the rest.
    assert worst(errs["to650"], "sg") <= 0.002
    assert worst(errs["to650"], "sulfur_rel") <= 0.02
    assert worst(errs["to650"], "vol_pct") <= 0.1


def test_whole_crude_only_gravity_meets_its_goal(errs):
    # Goal: with whole-crude data only, every cut's SG within 0.015 on average (the light naphtha's Watson K
    # raised toward paraffins; a constant Watson K gave 0.0161).
    assert mean(errs["whole"], "sg") <= 0.015


def test_a_held_back_cut_gravity_meets_its_goal(errs):
    # Goal: each interior cut held back in turn, its SG predicted within 0.008 on average (the gap takes its
    # neighbours' Watson K; interpolating their SG gave 0.0121).
    assert mean(errs["holdout"], "sg") <= 0.008


def test_whole_crude_only_and_held_back_sulfur_stay_at_their_present_errors(errs):
    # The goals are sulfur 50 % (whole crude only) and 10 % (a cut held back); not reached.  These bounds hold
    # what is reached (53 % and 28 %, the light cuts' ppm-level sulfur the largest part) so that no change makes
    # them worse unnoticed; the README's accuracy table gives the figures per cut.
    assert mean(errs["whole"], "sulfur_rel") <= 0.55
    assert mean(errs["holdout"], "sulfur_rel") <= 0.29


def test_cuts_inside_the_measured_curve_are_not_flagged_extrapolated(recs):
    # Goal of the development set: no cut below 650 °F is flagged extrapolated on a curve measured to 95 %
    # (the records' TBP curves end at 95 vol %), given all cuts, the cuts to 650 °F, or whole-crude data only
    # (there the gravity rests on a Watson K fitted over the whole curve, but its extension's alternative fits
    # move no cut's SG by 0.001).  A cut that reaches outside the measured points keeps its flag: in Doba
    # Blend the 0 % point contradicts the butane cut's measured yield and is left out; the condensates Gorgon
    # and Sable Island reach 95 % below 650 °F.
    flagged = []
    for rec in recs:
        upto = [k for k, c in enumerate(rec["cuts"]) if c["end_f"] is not None and c["end_f"] <= 650.0]
        for keep in (None, upto, []):
            res = oa.run_yields(oa.assay_of(rec, keep), oa.own_cut_set(rec))
            assert res.model.all_on_extension == "", rec["name"]
            c = res.model.curve
            for k in upto:
                r = res.cuts.rows()[k]
                if r["extrapolated"]:
                    flagged.append((rec["name"], r["name"]))
                    start = r["cum_vol_pct"] - r["vol_pct"]
                    assert start < c.measured_lo - 1e-9 or r["cum_vol_pct"] > c.measured_hi + 1e-9, flagged[-1]
    assert len(flagged) <= 5, flagged


def test_a_held_back_residue_nitrogen_closes_on_the_whole_crude(recs):
    # Source: the development set's whole-crude and per-cut nitrogen (NOAA ADIOS, CC0).  With the residue's
    # nitrogen held back and the whole crude's given, the residue takes what the whole crude leaves, by weight:
    # mean error 1.6 % on the 22 records with residue nitrogen above 50 ppm; bound 3 % mean, 10 % each (the
    # least-squares share left to the balance, 1 % of it, and the residue's weight on the curve).
    import dataclasses

    errs = []
    for rec in recs:
        n = np.array([np.nan if c["nitrogen_wt_ppm"] is None else c["nitrogen_wt_ppm"] for c in rec["cuts"]])
        if not (n[-1] > 0 and (rec["nitrogen_wt_ppm"] or 0) >= 50):
            continue
        a = oa.assay_of(rec)
        a.narrow_cuts.extras["nitrogen_wt_ppm"] = np.append(n[:-1], np.nan)
        a = dataclasses.replace(a, extras={"nitrogen_wt_ppm": rec["nitrogen_wt_ppm"]})
        row = oa.run_yields(a, oa.own_cut_set(rec)).cuts.rows()[-1]
        assert "nitrogen_wt_ppm" in row["estimated"]
        errs.append((row["nitrogen_wt_ppm"] - n[-1]) / n[-1])
    assert len(errs) == 22
    assert float(np.mean(np.abs(errs))) <= 0.03 and float(np.max(np.abs(errs))) <= 0.10


def test_other_qualities_stay_near_the_records():
    # Source: the records' measured cetane index (D4737), viscosity at 40 °C, pour, cloud, freeze, smoke and
    # aniline points (NOAA ADIOS, CC0), against the tool's estimates with the cuts given by SG and sulfur only.
    # Bounds hold the present errors (python -m tests.open_assays prints them) with a margin; they are
    # regression bounds, not published accuracies.
    bounds = {"cetane_index_d4737": 1.0, "viscosity_40": 0.45, "pour_point_c": 10.0, "cloud_point_f": 10.0,
              "freeze_point_f": 10.0, "smoke_point_mm": 3.0, "aniline_point_f": 5.0, "hydrogen_wt_pct": 0.6}
    rows = oa.quality_table()
    assert {r["quality"] for r in rows} == set(bounds)
    for r in rows:
        if r["n"] >= 5:
            assert r["mae"] <= bounds[r["quality"]], r


def test_hydrogen_by_d3343_on_the_jet_range_and_none_on_residues():
    # Source: the records' measured hydrogen per cut (NOAA ADIOS, CC0), against the tool's estimate with each
    # cut's measured aromatics also given: ASTM D3343 on the jet range (D86 90 % <= 300 °C), Riazi's CH form
    # elsewhere.  Bounds: the present errors with a margin (regression bounds, not a published accuracy).
    # Heavy naphtha by D3343 is 0.08 wt % off against 0.25 by Riazi's CH form alone.
    rows = {r["cut"]: r for r in oa.quality_table(("aromatics_vol_pct",)) if r["quality"] == "hydrogen_wt_pct"}
    names = [c["name"] for c in oa.records()[0]["cuts"]]
    heavy_naphtha, kerosene, diesel, residue = (rows.get(names[k]) for k in (2, 3, 4, 6))
    assert heavy_naphtha["n"] == 25 and heavy_naphtha["mae"] <= 0.15
    assert kerosene["n"] == 25 and kerosene["mae"] <= 0.40
    assert diesel["n"] == 25 and diesel["mae"] <= 0.3  # beyond the jet range: Riazi's CH form, 0.08 wt %
    assert residue is None  # a residue's correlation hydrogen (1.4-3.2 wt % high on 3 records) is left empty
