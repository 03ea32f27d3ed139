"""Characterisation: Watson K, average boiling points, molecular weight (API TDB worked examples, `chemicals`)."""

from __future__ import annotations

import numpy as np
import pytest

from assaycut import units
from assaycut.methods.characterisation import (
    average_boiling_points_api_2b1_1,
    mw_in_range,
    mw_riazi_daubert_1987,
    sg_from_watson_k,
    watson_k,
)

chemicals = pytest.importorskip("chemicals")


def test_watson_k_api_tdb_example():
    # API TDB 2B5.1 worked example: 580 °F and 34.5 °API give Kw = 11.8846.
    assert watson_k((580 - 32) / 1.8, units.api_to_sg(34.5)) == pytest.approx(11.8846, abs=1e-4)


@pytest.mark.parametrize("tb_c,sg", [(50.0, 0.68), (200.0, 0.79), (300.0, 0.85), (450.0, 0.93)])
def test_watson_k_matches_chemicals(tb_c, sg):
    # Reference library: chemicals.utils.Watson_K(Tb [K], SG).
    assert watson_k(tb_c, sg) == pytest.approx(chemicals.utils.Watson_K(tb_c + 273.15, sg), rel=1e-9)


def test_sg_from_constant_watson_k_inverts_watson_k():
    # Watson & Nelson 1933: SG = (1.8 Tb[K])**(1/3) / Kw is the definition of Kw solved for SG (identity).
    assert watson_k(300.0, sg_from_watson_k(300.0, 11.9)) == pytest.approx(11.9, rel=1e-12)


def test_average_boiling_points_api_tdb_example():
    # API TDB 2B1.1 worked example: D86 129.2/170.6/214.7/267.8/339.8 °F -> VABP 224.42 °F,
    # SL 2.6325, MeABP about 206.1 °F.
    r = average_boiling_points_api_2b1_1([(t - 32) / 1.8 for t in (129.2, 170.6, 214.7, 267.8, 339.8)])
    assert r["vabp"] * 1.8 + 32 == pytest.approx(224.42, abs=0.005)
    assert r["slope"] == pytest.approx(2.6325, abs=5e-5)
    assert r["meabp"] * 1.8 + 32 == pytest.approx(206.1, abs=0.05)
    # API TDB 2B1.1 ordering of the averages (common practice, no source): MABP < MeABP < VABP < WABP,
    # and the cubic average lies between MeABP and VABP.
    assert r["mabp"] < r["meabp"] < r["cabp"] < r["vabp"] < r["wabp"]


def test_mw_range_and_trend():
    # Riazi-Daubert 1987 (API TDB 2B2.1) range: Tb 90-1050 °F, API 14-93.
    assert bool(mw_in_range(300.0, 0.85))
    assert not bool(mw_in_range(700.0, 1.0))
    # Well-known fact of the trade (common practice, no source): heavier cuts have higher molecular weight;
    # a 200 °C kerosene is about 150-170 g/mol.
    m = mw_riazi_daubert_1987(np.array([100.0, 200.0, 350.0]), np.array([0.74, 0.80, 0.87]))
    assert np.all(np.diff(m) > 0)
    assert 130 < m[1] < 180
