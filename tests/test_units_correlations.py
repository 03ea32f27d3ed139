"""Gravity, Watson K, average boiling points, molecular weight, cetane index and flash point."""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.methods.characterisation import average_boiling_points_api_2b1_1, mw_in_range, mw_riazi_daubert_1987, sg_from_watson_k, watson_k
from assaycut.methods.product_properties import cetane_index_d4737, flash_point_api_2b7_1, flash_point_riazi_daubert_1987
from assaycut import units

chemicals = pytest.importorskip("chemicals")


def test_api_of_water_is_10():
    # API MPMS Ch. 11 / ASTM D287 definition: water (SG 1.000) is 10 °API.
    assert units.sg_to_api(1.0) == pytest.approx(10.0)


@pytest.mark.parametrize("sg", [0.55, 0.7365, 0.85, 0.93, 1.02])
def test_api_matches_chemicals(sg):
    # Reference library: chemicals.utils.SG_to_API (reference sheet §6 check: SG 0.7365 -> 60.62491513917175).
    assert units.sg_to_api(sg) == pytest.approx(chemicals.utils.SG_to_API(sg), rel=1e-12)
    assert units.api_to_sg(units.sg_to_api(sg)) == pytest.approx(sg, rel=1e-12)


def test_api_published_check():
    # Reference sheet §6: chemicals.utils.SG_to_API(0.7365) = 60.62491513917175.
    assert units.sg_to_api(0.7365) == pytest.approx(60.62491513917175, abs=1e-12)


def test_density15_round_trip_and_size():
    # API MPMS 11.1: the 15 °C and 60 °F densities of a crude differ by only about 0.05 % (one °F apart);
    # water at 60 °F is 999.016 kg/m3.
    for sg in (0.7, 0.85, 1.0):
        rho = units.sg_to_density15(sg)
        assert abs(rho / (sg * 999.016) - 1.0) < 1e-3
        assert units.density15_to_sg(rho) == pytest.approx(sg, rel=1e-10)


def test_watson_k_api_tdb_example():
    # API TDB 2B5.1 example (reference sheet §5): 580 °F and 34.5 °API give Kw = 11.8846.
    assert watson_k((580 - 32) / 1.8, units.api_to_sg(34.5)) == pytest.approx(11.8846, abs=1e-4)


@pytest.mark.parametrize("tb_c,sg", [(50.0, 0.68), (200.0, 0.79), (300.0, 0.85), (450.0, 0.93)])
def test_watson_k_matches_chemicals(tb_c, sg):
    # Reference library: chemicals.utils.Watson_K(Tb [K], SG).
    assert watson_k(tb_c, sg) == pytest.approx(chemicals.utils.Watson_K(tb_c + 273.15, sg), rel=1e-9)


def test_sg_from_constant_watson_k_inverts_watson_k():
    # Reference sheet §5: SG = (1.8 Tb[K])**(1/3) / Kw is the definition of Kw solved for SG (identity).
    assert watson_k(300.0, sg_from_watson_k(300.0, 11.9)) == pytest.approx(11.9, rel=1e-12)


def test_average_boiling_points_api_tdb_example():
    # API TDB 2B1.1 (reference sheet §5): D86 129.2/170.6/214.7/267.8/339.8 °F -> VABP 224.42 °F,
    # SL 2.6325, MeABP about 206.1 °F.
    r = average_boiling_points_api_2b1_1([(t - 32) / 1.8 for t in (129.2, 170.6, 214.7, 267.8, 339.8)])
    assert r["vabp"] * 1.8 + 32 == pytest.approx(224.42, abs=0.005)
    assert r["slope"] == pytest.approx(2.6325, abs=5e-5)
    assert r["meabp"] * 1.8 + 32 == pytest.approx(206.1, abs=0.05)
    # API TDB 2B1.1 ordering of the averages (common practice, no source): MABP < MeABP < VABP < WABP,
    # and the cubic average lies between MeABP and VABP.
    assert r["mabp"] < r["meabp"] < r["cabp"] < r["vabp"] < r["wabp"]


def test_cci_reference_point():
    # ASTM D4737 Procedure A formula: at T10 215, T50 260, T90 310 °C and 0.850 g/mL every term but the
    # constant vanishes, giving exactly 45.2.
    assert cetane_index_d4737(215.0, 260.0, 310.0, 0.850) == pytest.approx(45.2, abs=1e-12)


def test_cci_formula_terms():
    # ASTM D4737 Procedure A, each term written out from the standard's equation (reference sheet §7).
    t10, t50, t90, d = 230.0, 285.0, 340.0, 0.842
    b = np.exp(-3.5 * (d - 0.85)) - 1
    expect = (45.2 + 0.0892 * (t10 - 215) + (0.131 + 0.901 * b) * (t50 - 260) + (0.0523 - 0.420 * b) * (t90 - 310)
              + 0.00049 * ((t10 - 215) ** 2 - (t90 - 310) ** 2) + 107 * b + 60 * b ** 2)
    assert cetane_index_d4737(t10, t50, t90, d) == pytest.approx(expect, rel=1e-12)


def test_flash_api_2b7_1_formula():
    # API TDB 2B7.1: TF = 0.69 T10 - 118.2 in °F.
    t10_f = 400.0
    assert flash_point_api_2b7_1((t10_f - 32) / 1.8) * 1.8 + 32 == pytest.approx(0.69 * t10_f - 118.2)


def test_flash_estimates_agree_roughly():
    # Two independent correlations (API TDB 2B7.1 and Riazi-Daubert 1987, coefficients from memory) for a
    # kerosene-range T10 of 200 °C should agree within about 10 °C (common practice, no source).
    assert abs(flash_point_api_2b7_1(200.0) - flash_point_riazi_daubert_1987(200.0)) < 10.0


def test_mw_range_and_trend():
    # Riazi-Daubert 1987 (API TDB 2B2.1) range: Tb 90-1050 °F, API 14-93.
    assert bool(mw_in_range(300.0, 0.85))
    assert not bool(mw_in_range(700.0, 1.0))
    # Well-known fact of the trade (common practice, no source): heavier cuts have higher molecular weight;
    # a 200 °C kerosene is about 150-170 g/mol.
    m = mw_riazi_daubert_1987(np.array([100.0, 200.0, 350.0]), np.array([0.74, 0.80, 0.87]))
    assert np.all(np.diff(m) > 0)
    assert 130 < m[1] < 180
