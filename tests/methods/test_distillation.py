"""Distillation-method conversions against published check values (Riazi MNL50 (2005) ch. 3, API TDB 3A1.1,
3A3.1, 5A1.19)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from assaycut.errors import ConversionError
from assaycut.methods.d86 import (
    D94_SEGMENTS,
    RD1986_K,
    RD1986_R,
    d86_to_tbp_daubert_1994,
    d86_to_tbp_riazi_daubert_1986,
    tbp_to_d86_daubert_1994,
)
from assaycut.methods.d1160 import vacuum_to_aet_maxwell_bonnell
from assaycut.methods.d2887 import d2887_to_tbp_api_3a3_1
from assaycut.methods.distillation import convert
from assaycut.units import c_to_f

# Riazi, Characterization and Properties of Petroleum Fractions, ASTM MNL50 (2005), Example 3.3 / Table 3.8:
# a kerosene's ASTM D86 at 0/10/30/50/70/90 vol %.
KERO_D86 = {0: 165.6, 10: 176.7, 30: 193.3, 50: 206.7, 70: 222.8, 90: 242.8}


def test_riazi_daubert_1986_published_kerosene():
    # Riazi MNL50 Example 3.3 / Table 3.8: TBP by Riazi-Daubert 1986 = 134.1/160.6/188.2/208.9/230.2/254.7 °C,
    # printed to 0.1 °C.
    tbp = d86_to_tbp_riazi_daubert_1986(KERO_D86)
    assert_allclose([tbp[p] for p in (0, 10, 30, 50, 70, 90)],
                    [134.1, 160.6, 188.2, 208.9, 230.2, 254.7], atol=0.1)


def test_daubert_1994_published_kerosene():
    # Riazi MNL50 Table 3.8, column for Eqs. 3.20-3.22 (Daubert 1994): 133.1/158.1/189.2/210.6/232.9/258.1 °C;
    # tolerance 0.2 °C for the rounded published values.
    tbp = d86_to_tbp_daubert_1994(KERO_D86)
    assert_allclose([tbp[p] for p in (0, 10, 30, 50, 70, 90)],
                    [133.1, 158.1, 189.2, 210.6, 232.9, 258.1], atol=0.2)


def test_daubert_1994_50pct_raises_fahrenheit_number_not_absolute():
    # Daubert 1994 (Riazi MNL50 Eq. 3.20): TBP50 = 0.87180 * D86_50**1.0258 with the °F number itself.
    # Raising °R instead gives results far off (for this kerosene by
    # 14 °C, by our own arithmetic): the published kerosene value is 210.6 °C.
    good = d86_to_tbp_daubert_1994({50: 206.7})[50]
    r = 206.7 * 1.8 + 491.67
    wrong = (0.87180 * r ** 1.0258 - 491.67) / 1.8
    assert abs(good - 210.6) < 0.2
    assert abs(wrong - 210.6) > 10.0


def test_si_form_of_daubert_50pct_agrees():
    # The SI form of Daubert's 50 % relation (Riazi MNL50 §3.2): TBP50[K] = 255.4 + 0.8851 (D86_50[K] - 255.4)**1.0258, the same relation.
    d = 250.0
    si = 255.4 + 0.8851 * (d + 273.15 - 255.4) ** 1.0258 - 273.15
    assert abs(d86_to_tbp_daubert_1994({50: d})[50] - si) < 0.1


def test_rd1986_kelvin_and_rankine_constants_agree():
    # Riazi-Daubert 1986 constants in K and in °R (Riazi MNL50 §3.2): a_K = a_R * 1.8**(b - 1) must reproduce both
    # printed tables (4 decimals printed).
    for p, (a_k, b) in RD1986_K.items():
        a_r, b_r = RD1986_R[p]
        assert b == b_r
        assert abs(a_r * 1.8 ** (b - 1) - a_k) < 6e-4, p


def test_daubert_1994_si_segment_constants_agree():
    # Daubert 1994 SI constants against the °F constants (Riazi MNL50 §3.2): A for °C/K differences = A_F * 1.8**(B - 1),
    # printed to 4 significant figures.
    printed = {(90, 95): 0.1740, (70, 90): 2.6339, (50, 70): 2.2744, (30, 50): 2.6956, (10, 30): 4.1481,
               (0, 10): 5.8589}
    for seg, (a, b) in D94_SEGMENTS.items():
        assert abs(a * 1.8 ** (b - 1) - printed[seg]) / printed[seg] < 5e-4, seg


def test_maxwell_bonnell_check_values():
    # Computed from the Maxwell-Bonnell equations (computed from the equations of Maxwell & Bonnell 1957 and API TDB 5A1.19; not printed in a source):
    # 200 °C at 10 mmHg is about 348.8 °C AET; 365 °F at 10 mmHg with Kw 12.5 gives T' 627.9 °F, Tb 625.5 °F.
    assert abs(vacuum_to_aet_maxwell_bonnell(200.0, 10.0) - 348.8) < 0.05
    # The 760 mmHg anchoring (d1160.maxwell_bonnell_q) moves these by about 0.05 °F, hence 0.1 °F.
    t = (365.0 - 32.0) / 1.8
    assert abs(c_to_f(vacuum_to_aet_maxwell_bonnell(t, 10.0)) - 627.9) < 0.1
    assert abs(c_to_f(vacuum_to_aet_maxwell_bonnell(t, 10.0, watson_k=12.5)) - 625.5) < 0.1


def test_maxwell_bonnell_at_760_is_identity_and_continuous():
    # Identity: at atmospheric pressure the equivalent temperature is the observed one (definition of the
    # normal boiling point); the correlation is continuous across 760 mmHg (no jump between pressure ranges).
    for t in (100.0, 300.0, 500.0):
        assert abs(vacuum_to_aet_maxwell_bonnell(t, 760.0) - t) < 1e-9
        assert abs(vacuum_to_aet_maxwell_bonnell(t, 760.0, watson_k=11.0) - t) < 1e-9
        below = vacuum_to_aet_maxwell_bonnell(t, 760.0 * (1 - 1e-9))
        above = vacuum_to_aet_maxwell_bonnell(t, 760.0 * (1 + 1e-9))
        assert abs(below - above) < 1e-5


def _nbp_and_10mmhg(name):
    """Normal boiling point [K], temperature at 10 mmHg [K] and Watson K of a pure compound, all from the
    `chemicals` library: vapour pressure by Wagner (McGarry) or DIPPR EQ101 (Perry's 8th ed.), liquid density
    at 60 °F by VDI PPDS, Kw by chemicals.utils.Watson_K."""
    import chemicals
    from chemicals import vapor_pressure as vp
    from chemicals import volume as vol
    from chemicals.dippr import EQ101
    from chemicals.utils import SG, Watson_K
    from scipy.optimize import brentq
    cas = chemicals.CAS_from_any(name)
    if cas in vp.Psat_data_WagnerMcGarry.index:
        r = vp.Psat_data_WagnerMcGarry.loc[cas]
        psat = lambda T: vp.Wagner_original(T, r.Tc, r.Pc, r.A, r.B, r.C, r.D)  # noqa: E731
    else:
        r = vp.Psat_data_Perrys2_8.loc[cas]
        psat = lambda T: EQ101(T, r.C1, r.C2, r.C3, r.C4, r.C5)  # noqa: E731
    tb = chemicals.Tb(cas)
    t10 = brentq(lambda T: psat(T) - 10.0 * 133.322368, 200.0, tb)
    d = vol.rho_data_VDI_PPDS_2.loc[cas]
    tau = 1.0 - 288.7056 / d.Tc
    rho = d.rhoc + d.A * tau ** 0.35 + d.B * tau ** (2 / 3) + d.C * tau + d.D * tau ** (4 / 3)
    return tb, t10, Watson_K(tb, SG(rho))


@pytest.mark.parametrize("name", ["n-decane", "n-dodecane", "n-tetradecane", "1-methylnaphthalene"])
def test_maxwell_bonnell_watson_k_correction_against_pure_compounds(name):
    # Outside source: the `chemicals` library's vapour pressure and density data (see _nbp_and_10mmhg). From
    # the temperature at 10 mmHg, the Kw-corrected AET (API TDB 5A1.19, with the sign that lowers a paraffinic
    # fraction's AET below atmospheric pressure) comes closer to the compound's normal boiling point than the Kw = 12 form, and within
    # 1 °C of it.
    tb, t10, kw = _nbp_and_10mmhg(name)
    plain = vacuum_to_aet_maxwell_bonnell(t10 - 273.15, 10.0) + 273.15
    corrected = vacuum_to_aet_maxwell_bonnell(t10 - 273.15, 10.0, watson_k=kw) + 273.15
    assert abs(corrected - tb) < abs(plain - tb)
    assert abs(corrected - tb) < 1.0


@pytest.mark.parametrize("name", ["n-hexadecane", "n-eicosane", "naphthalene"])
def test_maxwell_bonnell_watson_k_correction_heavier_compounds(name):
    # Same outside source.  For these the correction overshoots slightly with `chemicals`' data (n-hexadecane
    # +1.0 K plain, -1.4 K corrected; n-eicosane +0.9 / -2.0 K; naphthalene -5.2 / +1.8 K): both forms lie
    # within 2.5 K for the paraffins, and the correction moves the aromatic to the right side of the error.
    tb, t10, kw = _nbp_and_10mmhg(name)
    corrected = vacuum_to_aet_maxwell_bonnell(t10 - 273.15, 10.0, watson_k=kw) + 273.15
    assert abs(corrected - tb) < 2.5


def test_maxwell_bonnell_watson_k_sign():
    # API TDB 5A1.19 (the sign checked by the pure-compound test above): below atmospheric pressure a paraffinic
    # fraction (Kw > 12) comes out lower than the Kw = 12 estimate and an aromatic one higher; above 760 mmHg
    # the other way round (log10(P/760) changes sign).
    base = vacuum_to_aet_maxwell_bonnell(250.0, 10.0)
    assert vacuum_to_aet_maxwell_bonnell(250.0, 10.0, watson_k=12.5) < base
    assert vacuum_to_aet_maxwell_bonnell(250.0, 10.0, watson_k=10.0) > base
    hi = vacuum_to_aet_maxwell_bonnell(250.0, 1000.0)
    assert vacuum_to_aet_maxwell_bonnell(250.0, 1000.0, watson_k=12.5) > hi


def test_d2887_to_tbp_keeps_50pct_point():
    # API TDB 3A3.1 (Daubert 1994): TBP50 = SD50 by definition of the method.
    assert d2887_to_tbp_api_3a3_1({10: 200.0, 30: 250.0, 50: 300.0})[50] == 300.0


def test_d2887_to_tbp_printed_example():
    # API TDB 3A3.1 worked example (quoted second-hand): SD at
    # 5/10/30/50/70/90/95 % of 293/305/324/336/344/359/369 °F gives TBP 322.2/327.7/332.4/336.0/339.6/350.1/357.4
    # °F, printed to 0.1 °F: the lowest segment is 5-10 % and the 30-10 constant 0.011903.
    sd = {p: (f - 32) / 1.8 for p, f in zip((5, 10, 30, 50, 70, 90, 95), (293, 305, 324, 336, 344, 359, 369))}
    out = d2887_to_tbp_api_3a3_1(sd)
    printed = dict(zip((5, 10, 30, 50, 70, 90, 95), (322.2, 327.7, 332.4, 336.0, 339.6, 350.1, 357.4)))
    assert set(out) == set(printed)
    for p, f in printed.items():
        assert abs(c_to_f(out[p]) - f) <= 0.05 + 1e-9, p


def test_d2887_to_tbp_below_the_sample_start_is_warned():
    # A simulated distillation is wider than the TBP of the same sample (common practice, no source): the API
    # TDB 3A3.1 worked example's TBP (quoted second-hand) starts above its own D2887 5 % point and gets no such
    # warning; a wide-boiling whole-crude D2887 (5 % at 108 °C, 95 % at 600 °C) converts to a TBP front far
    # below 108 °C, and the warning names the points and the sample's start.
    from assaycut.methods.distillation import convert

    sd = {p: (f - 32) / 1.8 for p, f in zip((5, 10, 30, 50, 70, 90, 95), (293, 305, 324, 336, 344, 359, 369))}
    assert not any("below the sample" in w for w in convert(sd, "D2887", "TBP")[2])
    wide = {5: 108.0, 10: 150.0, 30: 260.0, 50: 350.0, 70: 440.0, 90: 530.0, 95: 539.0}
    out, _, warnings = convert(wide, "D2887", "TBP")
    assert out[5] < 108.0
    hits = [w for w in warnings if "below the sample's own first D2887 point (108.0 °C at 5 %)" in w]
    assert len(hits) == 1 and f"TBP {out[5]:.1f} °C at 5 %" in hits[0]


def test_missing_point_named():
    with pytest.raises(ConversionError, match=r"needs the 50 % point\(s\); the curve has 10, 30"):
        d86_to_tbp_daubert_1994({10: 150.0, 30: 180.0})


def test_convert_reports_nonmonotone_point_by_point():
    # Riazi MNL50 §3.2 warns that the point-by-point method can give non-monotone curves.  With the 1986
    # constants (a0 0.9177, b0 1.0019; a10 0.5564, b10 1.0900) TBP10 < TBP0 at equal D86 below about 293 K, so
    # a nearly flat D86 front at 0-0.5 °C makes the 10 % TBP fall below the 0 % TBP (arithmetic on the
    # published constants).
    out, used, warnings = convert({0: 0.0, 10: 0.5, 50: 40.0}, "D86", "TBP", method="riazi-daubert-1986")
    assert used == "riazi-daubert-1986"
    assert out[10] < out[0]
    assert f"D86 -> TBP: temperature falls from {out[0]:.1f} °C at 0 % to {out[10]:.1f} °C at 10 %; " \
           f"the point-by-point correlation gave a non-monotone curve" in warnings
    assert [w for w in warnings if "falls" not in w] == [
        "D86 point(s) 30 % were not given: filled by monotone interpolation between the given points so that "
        "every given point converts (the filled ones are estimates)"]


def test_convert_d1160_needs_pressure():
    with pytest.raises(ConversionError, match="pressure"):
        convert({50: 250.0}, "D1160", "AET")


monotone_d86 = st.lists(st.floats(min_value=1.0, max_value=40.0), min_size=6, max_size=6).flatmap(
    lambda incs: st.floats(min_value=40.0, max_value=250.0).map(
        lambda start: dict(zip((0, 10, 30, 50, 70, 90, 95), np.cumsum([start] + incs).tolist()))))


@settings(max_examples=150, deadline=None)
@given(monotone_d86)
def test_daubert_round_trip(d86):
    # Identity: D86 -> TBP -> D86 by Daubert 1994 is exact (each segment's step is inverted exactly), so the
    # round trip holds to floating-point rounding.
    tbp = d86_to_tbp_daubert_1994(d86)
    back = tbp_to_d86_daubert_1994(tbp)
    assert_allclose([back[p] for p in d86], list(d86.values()), atol=1e-9)


@settings(max_examples=150, deadline=None)
@given(monotone_d86)
def test_daubert_round_trip_from_tbp(tbp):
    # Identity: TBP -> D86 -> TBP by Daubert 1994 is exact, to floating-point rounding.
    d86 = tbp_to_d86_daubert_1994(tbp)
    back = d86_to_tbp_daubert_1994(d86)
    assert_allclose([back[p] for p in tbp], list(tbp.values()), atol=1e-9)


@settings(max_examples=150, deadline=None)
@given(monotone_d86, st.sampled_from(["daubert-1994", "riazi-daubert-1986"]))
def test_conversion_never_crashes_and_daubert_stays_monotone(d86, method):
    out, used, warnings = convert(d86, "D86", "TBP", method=method)
    assert set(out) == set(d86)
    if method == "daubert-1994":  # segment differences are positive powers of positive differences
        vals = [out[p] for p in sorted(out)]
        assert all(b >= a for a, b in zip(vals, vals[1:]))


def test_out_of_range_input_warned():
    # Riazi MNL50 ch. 3: the D86 correlations rest on fractions with D86 below about 400 °C.
    out, used, warnings = convert({30: 400.0, 50: 450.0}, "D86", "TBP")
    assert any("outside the -18 to 400 °C range" in w and "450.0 °C at 50 %" in w for w in warnings)
    _, _, ok = convert(KERO_D86, "D86", "TBP")
    assert ok == []


@settings(max_examples=100, deadline=None)
@given(monotone_d86)
def test_vectorised_daubert_step_is_the_mapping_one(tbp):
    # One Daubert 1994 step serves the convert command and every cut's D86: the array form must give the
    # mapping form's numbers (same construction; floating-point rounding only).
    from assaycut.methods.d86 import D86_STD, tbp_to_d86_daubert_1994_array

    rows = np.array([[tbp[p] for p in D86_STD], [tbp[p] + 10.0 for p in D86_STD]])
    got = tbp_to_d86_daubert_1994_array(rows)
    for row, out in zip(rows, got):
        want = tbp_to_d86_daubert_1994(dict(zip(D86_STD, row)))
        assert_allclose(out, [want[p] for p in D86_STD], rtol=1e-13)


def test_daubert_step_refuses_a_falling_segment():
    # A distillation curve never falls (common practice, no source): both forms refuse it, naming the fall.
    from assaycut.methods.d86 import tbp_to_d86_daubert_1994_array

    falling = {0: 100.0, 10: 120.0, 30: 115.0, 50: 150.0, 70: 170.0, 90: 190.0, 95: 200.0}
    with pytest.raises(ConversionError, match=r"the input curve falls by 9\.00 °F across a segment"):
        tbp_to_d86_daubert_1994(falling)
    with pytest.raises(ConversionError, match=r"falls by 9\.00 °F"):
        tbp_to_d86_daubert_1994_array(np.array([list(falling.values())]))
    flat = np.array([[150.0] * 7])  # an empty cut's slice: no fall, all segments zero
    assert np.ptp(tbp_to_d86_daubert_1994_array(flat)) == 0.0
