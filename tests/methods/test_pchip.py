"""Monotone spline: against scipy's PCHIP (reference library) and its invariants."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from tests.helpers import reference_inverse
from scipy.interpolate import PchipInterpolator

from assaycut.methods.pchip import Pchip


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
    # Identity required by the curve model: T(V(T)) = T where V rises strictly, to the problem's conditioning:
    # V(T) carries a rounding error of a few ulp of the values, which the inverse turns into an error in T of
    # that over the local slope dV/dT (large near a nearly flat stretch); 1e3 ulp of slack on top of 1e-9 °C.
    t, v = tv
    p = Pchip(t, v)
    tq = t[0] + frac * (t[-1] - t[0])
    h = 1e-7 * (t[-1] - t[0])
    slope = float(p(min(tq + h, t[-1])) - p(max(tq - h, t[0]))) / (min(tq + h, t[-1]) - max(tq - h, t[0]))
    bound = 1e-9 + 1e3 * np.finfo(float).eps * float(np.max(np.abs(v))) / max(slope, 1e-300)
    assert abs(float(p.inverse(p(tq))) - tq) <= bound


def test_flat_step_stays_flat():
    # Fritsch & Carlson (1980): equal neighbouring values give zero node slopes, so the step stays flat.
    p = Pchip([0.0, 10.0, 20.0, 30.0], [0.0, 5.0, 5.0, 9.0])
    assert_allclose(p(np.linspace(10.0, 20.0, 11)), 5.0, atol=1e-12)


@settings(max_examples=100, deadline=None)
@given(monotone_curve(allow_flat=False))
def test_segment_integrals_match_scipy(tv):
    # Reference library: scipy's PchipInterpolator.integrate over each segment; the one segment-integral helper
    # serves Pchip, the batched splines and the property-spline means.
    from assaycut.methods.pchip import segment_antiderivative, segment_integrals, slopes_on

    t, v = tv
    s = PchipInterpolator(t, v)
    h = np.diff(t)
    got = segment_integrals(h, v, slopes_on(t)(v))
    assert_allclose(got, [s.integrate(a, b) for a, b in zip(t[:-1], t[1:])], rtol=1e-10, atol=1e-9)
    half = segment_antiderivative(0.5, h, v[:-1], v[1:], slopes_on(t)(v)[:-1], slopes_on(t)(v)[1:])
    assert_allclose(half, [s.integrate(a, a + w / 2) for a, w in zip(t[:-1], h)], rtol=1e-10, atol=1e-9)


def test_fast_inverse_equals_the_reference_and_is_exact():
    # The fast inverse (table bracket + Newton) against the reference bisection/Newton solve, on the demo
    # crudes' TBP curves and on random monotone curves with flat steps: equal to 1e-9, and V(T(V)) = V
    # (identity) to 1e-9.
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import demo_assay_paths
    from assaycut.model.crude import build_model

    rng = np.random.default_rng(20261202)
    splines = [build_model(load_assay(p)).curve.spline for p in demo_assay_paths()]
    for _ in range(200):
        x = np.unique(rng.uniform(-50.0, 900.0, rng.integers(2, 40)))
        if x.size < 2:
            continue
        y = np.cumsum(rng.choice([0.0, 0.0, 0.5, 3.0, 20.0], x.size) * rng.uniform(0, 1, x.size))
        splines.append(Pchip(x, y))
    for s in splines:
        q = np.concatenate([rng.uniform(s.y[0] - 1.0, s.y[-1] + 1.0, 300), s.y, [np.nan]])
        fast, ref = s.inverse(q), reference_inverse(s, q)
        # equal to 1e-9 where the root is well conditioned; where the curve is nearly flat the root moves by
        # (the reference's own residual + rounding of the curve value) / slope, so the allowance grows by that
        ok = np.isfinite(q)
        ymax = max(1.0, float(np.max(np.abs(s.y))))
        r = ref[ok]
        qc = np.clip(q[ok], s.y[0], s.y[-1])
        slope = np.abs(s(r + 1e-3) - s(r - 1e-3)) / 2e-3
        allow = 1e-9 + (np.abs(s(r) - qc) + 1e-13 * ymax) / np.maximum(slope, 1e-300)
        assert np.all(np.abs(fast[ok] - r) <= allow)
        assert np.isnan(fast[~ok]).all()
        np.testing.assert_allclose(s(fast[ok]), qc, rtol=0, atol=1e-12 * ymax)  # V(T(V)) = V, exactly
        t = rng.uniform(s.x[0], s.x[-1], 300)
        v = s(t)
        back = s(s.inverse(v))  # V(T(V)) = V; T itself is not unique on a flat step
        np.testing.assert_allclose(back, v, rtol=0, atol=1e-9 * max(1.0, float(np.max(np.abs(s.y)))))


def test_scaled_equals_the_interpolant_of_scaled_values():
    # The PCHIP slopes (Fritsch & Butland harmonic mean, Moler's end slopes) are homogeneous of degree 1 in y,
    # so scaling the values scales slopes and integrals; checked against scipy's PchipInterpolator of the
    # scaled values (scipy as the outside reference) to rounding.
    rng = np.random.default_rng(21)
    for k in range(40):
        x = np.cumsum(rng.uniform(0.2, 9.0, int(rng.integers(2, 14))))
        y = rng.normal(1.0, 0.4, x.size) if k % 2 else np.sort(rng.uniform(0.5, 1.1, x.size))
        f = float(rng.uniform(0.0, 3.0)) if k % 7 else 0.0
        s = Pchip(x, y).scaled(f)
        ref = PchipInterpolator(x, y * f)
        q = rng.uniform(x[0], x[-1], 50)
        scale = max(1.0, float(np.max(np.abs(y * f))))
        assert_allclose(s(q), ref(q), rtol=0, atol=1e-13 * scale)
        assert_allclose(s.integral(x[0], q), [ref.integrate(x[0], b) for b in q],
                        rtol=0, atol=1e-11 * scale * (x[-1] - x[0]))
        assert_allclose(s.d, Pchip(x, y * f).d, rtol=1e-13, atol=1e-13 * scale)


def test_row_wise_inverse_equals_each_spline_alone():
    # Identity of two paths: splines inverted together, one per row (equal lengths, and stacked from
    # different lengths, so padded), give each spline's own inverse to the last bit (flat steps, values beyond
    # the ends, NaN and infinities included), whatever the other rows hold.
    rng = np.random.default_rng(17)
    for n in (2, 3, 9, 41):
        x = np.cumsum(rng.uniform(0.1, 20.0, (30, n)), axis=1)
        y = np.cumsum(rng.choice([0.0, 0.0, 0.5, 3.0, 20.0], (30, n)) * rng.uniform(0, 1, (30, n)), axis=1)
        y[::3] += 1e4 * np.arange(10)[:, None]  # rows far apart in value: no shared search may round them
        splines = [Pchip(x[r], y[r]) for r in range(30)]
        q = np.array([np.concatenate([rng.uniform(y[r, 0] - 1, y[r, -1] + 1, 40), y[r, :3], [np.nan, np.inf]])
                      for r in range(30)])
        together = Pchip(x, y).inverse(q)
        for r, s in enumerate(splines):
            assert together[r].tobytes() == s.inverse(q[r]).tobytes(), (n, r)
    sizes = rng.integers(2, 30, 60)
    splines = []
    for n in sizes:
        x = np.cumsum(rng.uniform(0.1, 20.0, n)) + rng.uniform(-100, 1000)
        y = np.cumsum(rng.choice([0.0, 0.0, 0.5, 3.0, 20.0], n) * rng.uniform(0, 1, n)) + rng.uniform(0, 1e5)
        splines.append(Pchip(x, y))
    q = np.array([np.resize(np.concatenate([rng.uniform(s.y[0] - 1, s.y[-1] + 1, 40), s.y]), 70) for s in splines])
    for chunk in (1, 7, 60):
        for k in range(0, 60, chunk):
            together = Pchip.stack(splines[k:k + chunk]).inverse(q[k:k + chunk])
            for r, s in enumerate(splines[k:k + chunk]):
                assert together[r].tobytes() == s.inverse(q[k + r]).tobytes(), (chunk, k + r)


def test_integral_over_many_intervals_equals_scipy():
    # Interval ends as arrays (both ends in one call) against scipy's PchipInterpolator.integrate, interval by
    # interval (scipy as the outside reference), ends inside, beyond the nodes (held flat) and reversed.
    rng = np.random.default_rng(23)
    for k in range(30):
        x = np.cumsum(rng.uniform(0.2, 9.0, int(rng.integers(2, 12))))
        y = rng.normal(1.0, 0.4, x.size)
        s, ref = Pchip(x, y), PchipInterpolator(x, y)
        a = rng.uniform(x[0], x[-1], 25)
        b = rng.uniform(x[0], x[-1], 25)
        scale = max(1.0, float(np.max(np.abs(y))))
        assert_allclose(s.integral(a, b), [ref.integrate(p, q) for p, q in zip(a, b)],
                        rtol=0, atol=1e-11 * scale * (x[-1] - x[0]))
        # beyond the end nodes the interpolant is held at its end values (our convention, not scipy's)
        lo, hi = x[0] - 3.0, x[-1] + 2.0
        assert_allclose(s.integral(np.array([lo, x[0]]), np.array([x[-1], hi])),
                        [3.0 * y[0] + ref.integrate(x[0], x[-1]), ref.integrate(x[0], x[-1]) + 2.0 * y[-1]],
                        rtol=0, atol=1e-11 * scale * (hi - lo))


def test_a_spline_answers_the_same_in_any_batch_near_flat_steps():
    # Identity of two paths, where it once broke: curves on the vol % scale with flat steps, inverted at their
    # node values and a few ulp beside them, stacked 400 and 16 at a time, give each curve's own inverse to the
    # last bit (a shared search on row-shifted values rounded those ulp away and moved answers by up to 276 °C).
    rng = np.random.default_rng(30)
    splines = []
    for _ in range(400):
        n = int(rng.integers(4, 25))
        x = np.cumsum(rng.uniform(1.0, 60.0, n)) - 40.0
        y = np.cumsum(rng.choice([0.0, 0.0, 0.3, 4.0, 12.0], n) * rng.uniform(0, 1, n))
        splines.append(Pchip(x, 100.0 * y / max(y[-1], 1e-9)))
    ulp = np.spacing(100.0)
    q = np.array([np.resize(np.concatenate([s.y, s.y - ulp, s.y - 4 * ulp, s.y + ulp, s.y - 1e-11]), 120)
                  for s in splines])
    own = [s.inverse(q[r]).tobytes() for r, s in enumerate(splines)]
    for chunk in (1, 16, 400):
        for k in range(0, 400, chunk):
            together = Pchip.stack(splines[k:k + chunk]).inverse(q[k:k + chunk])
            assert [row.tobytes() for row in together] == own[k:k + chunk], (chunk, k)
