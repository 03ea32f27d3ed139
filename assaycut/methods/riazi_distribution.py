"""The Riazi distribution of a boiling-point curve, used to extend a TBP curve past its measured points.

.. math:: \\frac{T - T_0}{T_0} = \\left[\\frac{A}{B}\\ln\\frac{1}{1-x}\\right]^{1/B}

with T and T0 absolute temperatures and x the fraction distilled.

Contents
--------
- :class:`RiaziFit`: Parameters of a fitted Riazi distribution (T0 [K], A, B) and its RMS...
- :func:`fit_riazi_distribution`: Fit the Riazi distribution [1]_ to a TBP curve
- :func:`fit_riazi_many`: :func:`fit_riazi_distribution` of many curves at once: the grid search runs...
- :func:`riazi_temp_c`: Temperature of the Riazi distribution at a fraction distilled, one or many distributions
- constants: ``MAX_FIT_POINTS``, ``GRID_PASSES``, ``ROWS_PER_CALL``

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

__all__ = ["RiaziFit", "fit_riazi_distribution", "fit_riazi_many", "riazi_temp_c", "MAX_FIT_POINTS", "GRID_PASSES",
           "ROWS_PER_CALL"]

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
        """Temperature at fraction ``x`` (0-1) distilled (:func:`riazi_temp_c`). [°C]"""
        return riazi_temp_c(self.t0_k, self.a, self.b, x)


def riazi_temp_c(t0_k, a, b, x):
    """Temperature of the Riazi distribution at fraction ``x`` (0-1) distilled [°C]:
    T = T0 (1 + (A/B ln(1/(1-x)))^(1/B)) [1]_, x clipped to [0, 1 - 1e-12].

    ``t0_k`` [K], ``a``, ``b`` [-] broadcast against ``x``: scalars for one distribution, or columns (R, 1)
    against rows of fractions (R, m) for R distributions.
    """
    x = np.clip(np.asarray(x, dtype=float), 0.0, 1.0 - 1e-12)
    z = np.log(1.0 / (1.0 - x))
    return t0_k * (1.0 + (a / b * z) ** (1.0 / b)) - 273.15


def fit_riazi_distribution(percent, temp_c) -> RiaziFit:
    """Fit the Riazi distribution [1]_ to a TBP curve.

    For each trial T0 the linearised form ln((T-T0)/T0) = (1/B) ln(A/B) + (1/B) ln ln(1/(1-x)) [2]_ is
    solved by least squares; T0 is chosen to minimise the squared temperature deviation (grid search,
    refined three times).  Vectorised over the trial values.

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
    v, t = _fit_points(percent, temp_c)
    with np.errstate(all="ignore"):
        best = _fit_grid(v, t)
    return _fit_result(best, v.size)


def fit_riazi_many(curves) -> list:
    """:func:`fit_riazi_distribution` of many curves at once: the grid search runs over all curves with the
    same number of fitted points in one array call, each row the same arithmetic as the one-curve fit (so the
    same fit to the last bit; tested).

    Parameters
    ----------
    curves : sequence of (array_like, array_like)
        (cumulative percent [%], TBP [°C]) of each curve.

    Returns
    -------
    list of RiaziFit or CurveError
        Each curve's fit, or the error :func:`fit_riazi_distribution` would raise for it.
    """
    out: list = [None] * len(curves)
    by_size: dict[int, list] = {}
    for k, (percent, temp_c) in enumerate(curves):
        try:
            v, t = _fit_points(percent, temp_c)
        except CurveError as e:
            out[k] = e
            continue
        by_size.setdefault(v.size, []).append((k, v, t))
    for n, rows in by_size.items():
        if len(rows) == 1:
            k, v, t = rows[0]
            with np.errstate(all="ignore"):
                bests = [_fit_grid(v, t)]
        else:
            with np.errstate(all="ignore"):
                bests = _fit_grid_rows(np.array([r[1] for r in rows]), np.array([r[2] for r in rows]))
        for (k, _, _), best in zip(rows, bests):
            try:
                out[k] = _fit_result(best, n)
            except CurveError as e:
                out[k] = e
    return out


def _fit_points(percent, temp_c):
    """The points the fit uses: fractions strictly inside 0-1 and absolute temperatures [K], subsampled to
    :data:`MAX_FIT_POINTS`; refused when fewer than 3."""
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
    return v, t


def _fit_result(best, npoints: int) -> RiaziFit:
    """The fit from the grid search's best (T0, A, B, rms), refused when there is none or it is not usable."""
    if best is None or not all(np.isfinite(best)) or best[1] <= 0 or best[2] <= 0:
        raise CurveError("the curve's extension cannot be fitted: the measured points do not follow a distillation "
                         "curve's shape (check percents and temperatures)")
    return RiaziFit(best[0], best[1], best[2], best[3], int(npoints))


GRID_PASSES = (400, 100, 100, 100)
"""Trial values of T0 in each pass of the grid search: the first spans 0.2 Tmin to Tmin, each later one the
two steps of the previous pass around its best (the last step is about 1e-8 of the first span)."""
ROWS_PER_CALL = 16
"""Curves searched together in one array call (bounded so that the arrays stay in the processor's cache)."""


def _fit_grid(v, t):
    """Grid search over T0 with linear least squares for A, B; returns (T0, A, B, rms) or None."""
    return _fit_grid_rows(v[None, :], t[None, :])[0]


def _fit_grid_rows(v, t):
    """The grid search of :func:`fit_riazi_distribution` for curves with the same number of points, one per row
    of ``v`` (fractions) and ``t`` [K], shape (R, n); (T0, A, B, rms) or None per row.

    For each trial T0 (:data:`GRID_PASSES`, each pass refining around the best), the linearised form
    ln((T-T0)/T0) = (1/B) ln(A/B) + (1/B) ln ln(1/(1-x)) is solved by least squares, and the T0 with the least
    squared temperature deviation is kept.  The points lie along the first axis of the work arrays and every
    sum over them runs along that axis (a plain sequential sum), so a row's result does not depend on which
    other rows are searched with it: one curve is a batch of one.
    """
    out = []
    for k in range(0, v.shape[0], ROWS_PER_CALL):
        out += _grid_block(v[k:k + ROWS_PER_CALL], t[k:k + ROWS_PER_CALL])
    return out


def _grid_block(v, t):
    """:func:`_fit_grid_rows` of at most :data:`ROWS_PER_CALL` rows."""
    rows, n = v.shape
    xx = np.log(-np.log1p(-v)).T[:, :, None]                       # (n, R, 1)
    tt = t.T[:, :, None]
    tmin = t.min(axis=1)
    lo, hi = 0.2 * tmin, tmin * (1 - 1e-6)
    xm = xx.sum(axis=0) / n                                         # (R, 1)
    dx = xx - xm
    sxx = (dx * dx).sum(axis=0)                                     # (R, 1)
    alive = np.ones(rows, dtype=bool)
    best = np.zeros((rows, 4))
    r = np.arange(rows)
    for grid in GRID_PASSES:
        work = np.empty((n, rows, grid))
        t0 = np.linspace(lo, hi, grid, axis=1)                      # (R, grid)
        np.subtract(tt, t0, out=work)
        work /= t0
        np.maximum(work, 1e-300, out=work)
        y = np.log(work, out=work)                                  # ln((T - T0)/T0), (n, R, grid)
        ym = y.sum(axis=0) / n
        y -= ym
        y *= dx
        with np.errstate(all="ignore"):
            slope = np.where(sxx > 0, y.sum(axis=0) / np.where(sxx > 0, sxx, 1.0), 1.0)
        slope = np.maximum(slope, 1e-6)
        icpt = ym - slope * xm
        b = 1.0 / slope
        a = b * np.exp(icpt * b)
        pred = np.multiply(slope, xx, out=work)
        pred += icpt
        np.exp(pred, out=pred)
        pred += 1.0
        pred *= t0
        pred -= tt
        sse = np.square(pred, out=pred).sum(axis=0)                 # (R, grid)
        finite = np.isfinite(sse)
        alive &= finite.any(axis=1)
        k = np.argmin(np.where(finite, sse, np.inf), axis=1)
        best = np.stack([t0[r, k], a[r, k], b[r, k], np.sqrt(sse[r, k] / n)], axis=1)
        step = (hi - lo) / (grid - 1)
        lo, hi = np.maximum(best[:, 0] - step, 1e-3), np.minimum(best[:, 0] + step, tmin * (1 - 1e-9))
    return [tuple(float(z) for z in best[i]) if alive[i] else None for i in range(rows)]
