"""Monotone spline and curve model: against scipy's PCHIP (reference library) and invariants."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose
from scipy.integrate import quad
from scipy.interpolate import PchipInterpolator

from assaycut.methods.riazi_distribution import fit_riazi_distribution

from assaycut.model.tbp_curve import build_curve
from assaycut.errors import CurveError
from assaycut.model.spline import Pchip


@st.composite
def monotone_curve(draw, min_size=2, max_size=14, allow_flat=True):
    n = draw(st.integers(min_size, max_size))
    dt = draw(st.lists(st.floats(0.5, 80.0), min_size=n - 1, max_size=n - 1))
    step = st.one_of(st.just(0.0), st.floats(0.01, 15.0)) if allow_flat else st.floats(0.2, 15.0)
    dv = draw(st.lists(step, min_size=n - 1, max_size=n - 1))
    t0 = draw(st.floats(-50.0, 200.0))
    t = t0 + np.concatenate([[0.0], np.cumsum(dt)])
    v = np.concatenate([[0.0], np.cumsum(dv)])
    v = v / max(v[-1], 1e-9) * draw(st.floats(30.0, 100.0)) if v[-1] > 0 else v
    return t, v


@settings(max_examples=200, deadline=None)
@given(monotone_curve())
def test_pchip_matches_scipy(tv):
    # Reference library: scipy.interpolate.PchipInterpolator (same Fritsch-Carlson construction).
    t, v = tv
    p, s = Pchip(t, v), PchipInterpolator(t, v)
    tq = np.linspace(t[0], t[-1], 257)
    assert_allclose(p(tq), s(tq), atol=1e-9)
    assert_allclose(p.integral(t[0], t[-1]), s.integrate(t[0], t[-1]), rtol=1e-10, atol=1e-8)


@settings(max_examples=200, deadline=None)
@given(monotone_curve())
def test_exact_at_nodes_monotone_and_no_overshoot(tv):
    # Fritsch & Carlson (1980): the interpolant reproduces the nodes and is monotone between them.
    t, v = tv
    p = Pchip(t, v)
    assert_allclose(p(t), v, atol=1e-12)
    tq = np.linspace(t[0], t[-1], 2001)
    vq = p(tq)
    assert np.all(np.diff(vq) >= -1e-12)
    assert vq.min() >= v.min() - 1e-12 and vq.max() <= v.max() + 1e-12


@settings(max_examples=200, deadline=None)
@given(monotone_curve(allow_flat=False), st.floats(0.0, 1.0))
def test_inverse_round_trip(tv, frac):
    # Identity required by the curve model: T(V(T)) = T within 1e-6 °C where V rises strictly.
    t, v = tv
    p = Pchip(t, v)
    tq = t[0] + frac * (t[-1] - t[0])
    assert abs(float(p.inverse(p(tq))) - tq) < 1e-6


def test_flat_step_stays_flat():
    # Fritsch & Carlson (1980): equal neighbouring values give zero node slopes, so the step stays flat.
    p = Pchip([0.0, 10.0, 20.0, 30.0], [0.0, 5.0, 5.0, 9.0])
    assert_allclose(p(np.linspace(10.0, 20.0, 11)), 5.0, atol=1e-12)


def test_riazi_fit_recovers_parameters():
    # Identity: points generated from the Riazi distribution (Riazi MNL50 §4.5 form) are fitted back.
    x = np.array([0.03, 0.1, 0.25, 0.45, 0.6, 0.75])
    t = 320.0 * (1 + (4.0 / 1.8 * np.log(1 / (1 - x))) ** (1 / 1.8)) - 273.15
    f = fit_riazi_distribution(100 * x, t)
    assert f.t0_k == pytest.approx(320.0, rel=2e-3)
    assert f.b == pytest.approx(1.8, rel=1e-2)
    assert f.rms_c < 0.05


def test_curve_stopping_early_is_extended_and_marked():
    c = build_curve([5, 15, 30, 45], [60, 120, 210, 300])
    assert c.measured_hi == 45 and c.fit is not None
    assert c.fbp_c > 300
    assert bool(c.is_extrapolated(40.0, 60.0)) and not bool(c.is_extrapolated(10.0, 40.0))
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
