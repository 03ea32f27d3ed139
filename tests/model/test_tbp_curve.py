"""The TBP curve model: extension, mean temperature against quadrature (scipy), light ends, refusals."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.integrate import quad

from assaycut.errors import CurveError
from assaycut.model.tbp_curve import build_curve


def test_curve_stopping_early_is_extended_and_marked():
    c = build_curve([5, 15, 30, 45], [60, 120, 210, 300])
    assert c.measured_hi == 45 and c.fit is not None
    assert c.fbp_c > 300
    # depends on the extension beyond the measured range only: the slopes at the first and last measured
    # points come from the measured points
    assert bool(c.is_extrapolated(40.0, 60.0)) and bool(c.is_extrapolated(2.0, 10.0))
    assert not bool(c.is_extrapolated(5.0, 45.0))
    assert_allclose(c.pct_at([60, 120, 210, 300]), [5, 15, 30, 45], atol=1e-9)  # exact at measured points


def test_curve_mean_temperature_matches_quadrature():
    # Reference: scipy.integrate.quad of T(V) over the interval, against the closed-form integration by parts.
    c = build_curve([0, 10, 30, 50, 70, 90, 100], [20, 90, 170, 250, 340, 450, 560])
    got = float(c.mean_temp(12.0, 47.0))
    ref = quad(lambda v: float(c.temp_at(v)), 12.0, 47.0, epsabs=1e-10)[0] / 35.0
    assert got == pytest.approx(ref, abs=1e-5)


def test_curve_refuses_falling_temperature():
    with pytest.raises(CurveError, match=r"temperature falls from 200.00 °C at 30 % to 190.00 °C at 40 %"):
        build_curve([10, 30, 40, 60], [100, 200, 190, 300])


def test_curve_needs_three_points_to_extend():
    with pytest.raises(CurveError, match="at least 3 are needed"):
        build_curve([20, 40], [100, 200])


def test_light_ends_staircase_is_exact_between_boiling_points():
    # Pure components boil at their normal boiling point: between n-butane (-0.49 °C) and isopentane
    # (27.83 °C) nothing distils, so V(15 °C) equals the C4-minus volume exactly (common practice, no source).
    from assaycut.model.tbp_curve import staircase

    ft, fv = staircase([-42.11, -11.75, -0.49], [0.5, 0.9, 2.0])
    c = build_curve([2.0, 10, 30, 60], [27.83, 90, 200, 350], front_t=ft, front_v=fv)
    assert float(c.pct_at(15.0)) == pytest.approx(2.0, abs=1e-12)
    assert float(c.pct_at(-20.0)) == pytest.approx(0.5, abs=1e-12)


def test_extension_band_contains_the_refits_and_the_curve():
    # Identity of the construction: the band spans every refit (all points, last 4-6 points) and the model's
    # own extension; each refit starts at the last measured point (joined there, as the extension is).
    from assaycut.model.tbp_curve import extension_band

    c = build_curve([5, 10, 20, 30, 40, 50, 60, 75], [60, 100, 160, 215, 270, 320, 375, 460])
    v = np.linspace(75.0, 99.0, 50)
    lo, hi, refits = extension_band(c, v)
    assert len(refits) == 4
    own = c.temp_at(v)
    assert np.all(lo <= own + 1e-9) and np.all(own <= hi + 1e-9)
    for r in refits:
        assert np.all(lo <= r + 1e-9) and np.all(r <= hi + 1e-9)
        assert r[0] == pytest.approx(460.0, abs=1e-6)
    assert float(np.max(hi - lo)) > 1.0  # the refits differ: the band has a width


def test_extrapolated_and_lumped_shares():
    # Identity: a curve measured from 5 to 75 % rests on its fitted extension for 25 + 5 = 30 vol %; the lumped
    # share is the part above the capped end point, which the warning names.
    c = build_curve([5, 10, 20, 30, 40, 50, 60, 75], [60, 100, 160, 215, 270, 320, 375, 460])
    assert c.extrapolated_pct == pytest.approx(30.0, abs=1e-12)
    heavy = build_curve([5, 10, 20, 30, 40, 48], [150, 200, 300, 400, 500, 565])
    assert heavy.extrapolated_pct == pytest.approx(57.0, abs=1e-12)
    assert 3.0 < heavy.lumped_pct < 57.0
    assert any(f"passes 850 °C at {100 - heavy.lumped_pct:.1f} vol %" in w for w in heavy.warnings)


def test_the_measured_range_does_not_depend_on_the_extension(monkeypatch):
    # Independence (the property the extrapolated flag claims): with the extension's fitted distribution
    # changed (B, the shape, 20 % larger), the curve between the first and last measured points is unchanged
    # to rounding, while the extension itself moves.
    import dataclasses

    from assaycut.model import tbp_curve

    pts = ([5, 15, 30, 45, 60], [60, 120, 210, 300, 380])
    inside = np.linspace(5.0, 60.0, 56)
    outside = np.array([70.0, 90.0])
    base = build_curve(*pts)
    real = tbp_curve.fit_riazi_many
    monkeypatch.setattr(tbp_curve, "fit_riazi_many",
                        lambda data: [dataclasses.replace(f, b=f.b * 1.2) for f in real(data)])
    moved = build_curve(*pts)
    assert_allclose(moved.temp_at(inside), base.temp_at(inside), rtol=0, atol=1e-9)
    assert np.abs(moved.temp_at(outside) - base.temp_at(outside)).max() > 1.0
