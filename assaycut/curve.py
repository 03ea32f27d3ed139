"""The distillation curve model: cumulative percent distilled as a monotone function of TBP temperature.

The curve is a monotone PCHIP (:mod:`assaycut.spline`) through the measured points, exact at them, with

* light ends placed at the front as a staircase at each component's normal boiling point;
* an extension past the last measured point (and before the first, when neither light ends nor a 0 %
  point exist) from the Riazi distribution fitted to the measured points; every value depending on it is
  marked as extrapolated.  The end of the curve (100 %) is placed at the distribution's 99.95 % point, but
  never above :data:`END_CAP_C`: residue beyond it is lumped up to that end point.

Riazi distribution (Riazi, *Characterization and Properties of Petroleum Fractions*, ASTM MNL50 (2005)
§4.5; Riazi, Ind. Eng. Chem. Res. 28 (1989) 1731):

.. math:: \\frac{T - T_0}{T_0} = \\left[\\frac{A}{B}\\ln\\frac{1}{1-x}\\right]^{1/B}

with T absolute and x the fraction distilled.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import CurveError
from .spline import Pchip

END_FRACTION = 0.9995
"""The curve's 100 % point is placed at this fraction of the fitted distribution."""
END_CAP_C = 850.0
"""Highest end point given to an extended curve: above about 750-850 °C no TBP or simulated distillation is
measured, and the heaviest residue is lumped up to this point (common practice, no source). [°C]"""
MAX_FIT_POINTS = 400
"""Curves with more points are fitted on an even subsample of this many (bounds time and memory)."""
POOR_FIT_RMS_C = 5.0
"""RMS deviation of the distribution fit above which a warning is given. [°C]"""
LIGHT_ENDS_TOL_PCT = 0.1
"""Light ends that miss the first measured point by at most this much are scaled to meet it. [vol %]"""
STEP_C = 0.01
"""Width given to a pure component's (or repeated temperature's) vertical step. [°C]"""


@dataclass
class RiaziFit:
    """Parameters of a fitted Riazi distribution (T0 [K], A, B) and its RMS deviation [°C]."""

    t0_k: float
    a: float
    b: float
    rms_c: float
    npoints: int

    def temp_c(self, x):
        """Temperature at fraction ``x`` (0-1) distilled. [°C]"""
        x = np.clip(np.asarray(x, dtype=float), 0.0, 1.0 - 1e-12)
        z = np.log(1.0 / (1.0 - x))
        return self.t0_k * (1.0 + (self.a / self.b * z) ** (1.0 / self.b)) - 273.15


def fit_riazi_distribution(percent, temp_c) -> RiaziFit:
    """Fit the Riazi distribution to a TBP curve.

    For each trial T0 the linearised form ln((T-T0)/T0) = (1/B) ln(A/B) + (1/B) ln ln(1/(1-x)) is solved
    by least squares; T0 is chosen to minimise the squared temperature deviation (grid search, refined
    twice).  Vectorised over the trial values.

    Parameters
    ----------
    percent : array_like
        Cumulative percent distilled, strictly between 0 and 100. [%]
    temp_c : array_like
        TBP temperature. [°C]

    Returns
    -------
    RiaziFit

    Examples
    --------
    Points generated from T0 = 300 K, A = 5, B = 1.5 (an identity check) are fitted back exactly:

    >>> x = np.array([0.05, 0.2, 0.4, 0.6, 0.8])
    >>> t = 300 * (1 + (5 / 1.5 * np.log(1 / (1 - x))) ** (1 / 1.5)) - 273.15
    >>> f = fit_riazi_distribution(100 * x, t)
    >>> round(f.t0_k, 1), round(f.a, 2), round(f.b, 2)
    (300.0, 5.0, 1.5)
    """
    v = np.asarray(percent, dtype=float) / 100.0
    t = np.asarray(temp_c, dtype=float) + 273.15
    keep = (v > 0) & (v < 1)
    v, t = v[keep], t[keep]
    if v.size > MAX_FIT_POINTS:  # long curves: an even subsample keeps the fit's memory bounded
        idx = np.unique(np.linspace(0, v.size - 1, MAX_FIT_POINTS).round().astype(int))
        v, t = v[idx], t[idx]
    if v.size < 3:
        raise CurveError(f"the curve has {v.size} point(s) strictly between 0 and 100 %; at least 3 are "
                         f"needed to fit its extension")
    with np.errstate(all="ignore"):
        best = _fit_grid(v, t)
    if best is None or not all(np.isfinite(best)) or best[1] <= 0 or best[2] <= 0:
        raise CurveError("the curve's extension cannot be fitted: the measured points do not follow a distillation "
                         "curve's shape (check percents and temperatures)")
    return RiaziFit(best[0], best[1], best[2], best[3], int(v.size))


def _fit_grid(v, t):
    """Grid search over T0 with linear least squares for A, B; returns (T0, A, B, rms) or None."""
    xx = np.log(-np.log1p(-v))
    tmin = t.min()
    lo, hi = 0.2 * tmin, tmin * (1 - 1e-6)
    best = None
    for _ in range(3):
        t0 = np.linspace(lo, hi, 400)[:, None]
        y = np.log(np.maximum((t - t0) / t0, 1e-300))
        xm, ym = xx.mean(), y.mean(axis=1, keepdims=True)
        sxx = ((xx - xm) ** 2).sum()
        slope = (((xx - xm) * (y - ym)).sum(axis=1, keepdims=True) / sxx) if sxx > 0 else np.ones_like(ym)
        slope = np.maximum(slope, 1e-6)
        icpt = ym - slope * xm
        b = 1.0 / slope
        a = b * np.exp(icpt * b)
        pred = t0 * (1.0 + np.exp(icpt + slope * xx))
        sse = ((pred - t) ** 2).sum(axis=1)
        if not np.isfinite(sse).any():
            return None
        k = int(np.nanargmin(np.where(np.isfinite(sse), sse, np.nan)))
        best = (float(t0[k, 0]), float(a[k, 0]), float(b[k, 0]), float(np.sqrt(sse[k] / v.size)))
        step = (hi - lo) / 399
        lo, hi = max(best[0] - step, 1e-3), min(best[0] + step, tmin * (1 - 1e-9))
    return best


@dataclass
class DistCurve:
    """TBP curve of a whole crude on the volume basis.

    Attributes
    ----------
    spline : Pchip
        Percent distilled [vol %] as a function of TBP [°C].
    measured_lo, measured_hi : float
        Percent range covered by measured data (including light ends); outside it values are extrapolated.
        [vol %]
    fit : RiaziFit or None
        The distribution used for the extension.
    warnings : list of str
    """

    spline: Pchip
    measured_lo: float
    measured_hi: float
    fit: RiaziFit | None = None
    warnings: list[str] = field(default_factory=list)
    light_ends_pct: float = 0.0
    first_measured_c: float = float("nan")
    """Temperature of the first measured point, light ends not counted. [°C]"""

    @property
    def ibp_c(self) -> float:
        """Initial boiling point of the model (0 %). [°C]"""
        return float(self.spline.x[0])

    @property
    def fbp_c(self) -> float:
        """End of the curve (100 %). [°C]"""
        return float(self.spline.x[-1])

    def pct_at(self, temp_c):
        """Cumulative vol % distilled at TBP ``temp_c`` [°C]. [vol %]"""
        return self.spline(temp_c)

    def temp_at(self, pct):
        """TBP temperature [°C] at cumulative ``pct`` [vol %] distilled (left end of a flat step)."""
        return self.spline.inverse(pct)

    def mean_temp(self, pct_a, pct_b):
        """Volume-average TBP over [pct_a, pct_b] [vol %], by parts: ∫T dV = [T V] - ∫V dT. [°C]

        Where the interval has no width, the temperature at that point is returned.
        """
        pct_a = np.asarray(pct_a, dtype=float)
        pct_b = np.asarray(pct_b, dtype=float)
        ta, tb = self.temp_at(pct_a), self.temp_at(pct_b)
        # the inverse returns the left end of flat steps; integrate V(T) over [ta, tb]
        area = tb * pct_b - ta * pct_a - self.spline.integral(ta, tb)
        width = pct_b - pct_a
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(width > 1e-12, area / np.where(width > 1e-12, width, 1.0), ta)

    def is_extrapolated(self, pct_a, pct_b):
        """True where [pct_a, pct_b] reaches outside the measured range."""
        return (np.asarray(pct_b) > self.measured_hi + 1e-9) | (np.asarray(pct_a) < self.measured_lo - 1e-9)


def staircase(nbps_c, cum_pcts):
    """Nodes (T [°C], V [%]) of a pure-component staircase: each component boils at its NBP.

    Parameters
    ----------
    nbps_c : sequence of float
        Normal boiling points in increasing order. [°C]
    cum_pcts : sequence of float
        Cumulative percent after each component. [%]
    """
    t, v = [], []
    prev = 0.0
    for nbp, cum in zip(nbps_c, cum_pcts):
        t += [nbp - STEP_C, nbp]
        v += [prev, cum]
        prev = cum
    return np.array(t), np.array(v)


def build_curve(percent, temp_c, *, front_t=None, front_v=None) -> DistCurve:
    """Build the TBP curve model from measured points.

    Parameters
    ----------
    percent : array_like
        Cumulative vol % distilled, non-decreasing. [vol %]
    temp_c : array_like
        TBP temperatures, non-decreasing. [°C]
    front_t, front_v : array_like, optional
        Light-ends staircase nodes placed before the first measured point (see :func:`staircase`).

    Returns
    -------
    DistCurve

    Raises
    ------
    CurveError
        Fewer than two points, temperatures falling as percent rises, or an extension that cannot be fitted.
    """
    v = np.asarray(percent, dtype=float)
    t = np.asarray(temp_c, dtype=float)
    warnings: list[str] = []
    if v.size < 2:
        raise CurveError(f"a distillation curve needs at least 2 points; got {v.size}")
    order = np.argsort(v, kind="stable")
    v, t = v[order], t[order]
    if t[-1] - t[0] < 1.0 or v[-1] - v[0] <= 0.0:
        raise CurveError(f"the curve runs from {v[0]:g} % at {t[0]:.2f} °C to {v[-1]:g} % at {t[-1]:.2f} °C; a "
                         f"distillation curve must rise by at least 1 °C and some percent")
    if np.any(np.diff(t) < 0):
        k = int(np.argmax(np.diff(t) < 0))
        raise CurveError(f"temperature falls from {t[k]:.2f} °C at {v[k]:g} % to {t[k + 1]:.2f} °C at "
                         f"{v[k + 1]:g} %; temperatures must rise with percent distilled")
    # repeated temperatures at rising percent: a vertical step, given a tiny width
    rep = np.diff(t) == 0
    if np.any(rep):
        for k in np.nonzero(rep)[0]:
            warnings.append(f"the same temperature {t[k]:.2f} °C is given at {v[k]:g} % and {v[k + 1]:g} %; "
                            f"treated as a step {STEP_C} °C wide")
        t = t + np.concatenate([[0.0], np.cumsum(rep * STEP_C)])
    measured_lo, measured_hi = float(v[0]), float(v[-1])
    # light ends: placed in front of the first measured point when they fit there
    le_t = le_v = None
    if front_t is not None and len(front_t) > 0:
        ft, fv = np.asarray(front_t, float), np.asarray(front_v, float)
        if v[0] == 0.0:
            warnings.append("the curve starts at 0 %, so the light-ends analysis is not placed on it")
        elif abs(fv[-1] - v[0]) <= LIGHT_ENDS_TOL_PCT and fv[-1] != v[0] and ft[-1] < t[0]:
            if abs(v[0] / fv[-1] - 1.0) > 0.01:
                warnings.append(f"the light ends add up to {fv[-1]:.3f} vol %, the first measured point is "
                                f"{v[0]:g} %; the light-ends volumes are scaled by "
                                f"{(v[0] / fv[-1] - 1) * 100:+.2f} % to meet it")
            le_t, le_v = ft, fv * (v[0] / fv[-1])
        elif fv[-1] > v[0] + 1e-9 or ft[-1] >= t[0]:
            warnings.append(f"the light ends ({fv[-1]:.2f} vol % up to {ft[-1]:.1f} °C) do not fit before the "
                            f"first measured point ({v[0]:g} % at {t[0]:.1f} °C); not placed on the curve, and "
                            f"the front of the curve is extrapolated")
        else:
            le_t, le_v = ft, fv
    placed = le_t is not None
    fit = None
    need_tail = v[-1] < 100.0
    need_front = v[0] > 0.0 and not placed
    if need_tail or need_front:
        fit = fit_riazi_distribution(v, t)
        if fit.rms_c > POOR_FIT_RMS_C:
            warnings.append(f"the distribution fitted for the curve's extension deviates from the measured "
                            f"points by {fit.rms_c:.1f} °C RMS (above {POOR_FIT_RMS_C:g} °C): extrapolated "
                            f"values are uncertain")
    tt, vv = [t], [v]
    if need_tail:
        x_last = v[-1] / 100.0
        z = np.linspace(np.log(1 / (1 - x_last)), np.log(1 / (1 - END_FRACTION)), 40)[1:]
        xs = 1.0 - np.exp(-z)
        off = t[-1] - fit.temp_c(x_last)
        with np.errstate(over="ignore", invalid="ignore"):
            tx = fit.temp_c(xs) + off
        vx = 100.0 * xs
        cap = max(END_CAP_C, t[-1] + 50.0)
        under = np.isfinite(tx) & (tx < cap)
        tx = np.concatenate([tx[under][:-1], [cap if not under.all() else tx[-1]]])
        vx = np.concatenate([vx[under][:-1], [100.0]])
        if not under.all():
            warnings.append(f"the fitted extension passes {cap:.0f} °C at {100.0 * xs[~under][0]:.1f} vol %; the "
                            f"material above is lumped up to an end point of {cap:.0f} °C")
        tt.append(tx)
        vv.append(vx)
    if need_front:
        x_first = v[0] / 100.0
        xs = np.linspace(0.0, x_first, 12)[:-1]
        tt.insert(0, fit.temp_c(xs) + t[0] - fit.temp_c(x_first))
        vv.insert(0, 100.0 * xs)
    if placed:
        tt.insert(0, le_t)
        vv.insert(0, le_v)
    if placed or v[0] == 0.0:
        measured_lo = 0.0
    le_pct = float(le_v[-1]) if placed else 0.0
    T = np.concatenate(tt)
    V = np.concatenate(vv)
    if np.any(np.diff(T) <= 0):
        raise CurveError("the curve's extension does not join the measured points monotonically; "
                         "check the last points of the curve")
    return DistCurve(Pchip(T, V), measured_lo, measured_hi, fit, warnings, le_pct, float(t[0]))
