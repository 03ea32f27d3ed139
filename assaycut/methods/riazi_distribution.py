"""The Riazi distribution of a boiling-point curve, used to extend a TBP curve past its measured points.

.. math:: \\frac{T - T_0}{T_0} = \\left[\\frac{A}{B}\\ln\\frac{1}{1-x}\\right]^{1/B}

with T and T0 absolute temperatures and x the fraction distilled.

References
----------
.. [1] Riazi, M. R., "A Distribution Model for C7+ Fractions Characterization of Petroleum Fluids",
   Ind. Eng. Chem. Res. 28 (1989) 1731-1735.
.. [2] Riazi, M. R., *Characterization and Properties of Petroleum Fractions*, ASTM Manual MNL50, 1st ed.
   (2005), §4.5.

Published validity: whole crudes and heavy fractions, from the initial point to about 90-95 % distilled [2];
beyond the last measured point the fitted curve is an extrapolation.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import CurveError

MAX_FIT_POINTS = 400
"""Curves with more points are fitted on an even subsample of this many (bounds time and memory)."""


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
    """Fit the Riazi distribution [1]_ to a TBP curve.

    For each trial T0 the linearised form ln((T-T0)/T0) = (1/B) ln(A/B) + (1/B) ln ln(1/(1-x)) [2]_ is
    solved by least squares; T0 is chosen to minimise the squared temperature deviation (grid search,
    refined twice).  Vectorised over the trial values.

    Parameters
    ----------
    percent : array_like
        Cumulative percent distilled, strictly between 0 and 100. [%]
    temp_c : array_like
        TBP temperature. [°C]

    Returns
    -------
    RiaziFit

    Raises
    ------
    CurveError
        Fewer than 3 points strictly inside 0-100 %, or points that do not follow the distribution's shape.

    References
    ----------
    .. [1] Riazi, Ind. Eng. Chem. Res. 28 (1989) 1731.
    .. [2] Riazi, ASTM MNL50 (2005), §4.5, the linearised form.

    Examples
    --------
    Points generated from T0 = 300 K, A = 5, B = 1.5 (an identity check: no published fit is printed with
    its points) are fitted back exactly:

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
