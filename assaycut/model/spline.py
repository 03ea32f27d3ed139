"""Monotone piecewise-cubic Hermite interpolation (PCHIP), with exact integrals and an exact inverse.

The slopes are those of Fritsch & Carlson (SIAM J. Numer. Anal. 17 (1980) 238-246) in the weighted
harmonic-mean form of Fritsch & Butland (1984), with the one-sided three-point end slopes of Moler,
*Numerical Computing with MATLAB* (2004) ch. 3 -- the same construction as
``scipy.interpolate.PchipInterpolator`` (the tests compare the two).  Written here in plain numpy so that
the curve model can evaluate, integrate and invert many curves at once without a Python loop per point.

The interpolant reproduces the nodes exactly, never overshoots them, keeps flat steps flat, and is
monotone wherever the data are monotone.
"""

from __future__ import annotations

import numpy as np

try:  # the ufunc behind numpy.clip, without its Python wrapper (the same results; ~1 µs less per call)
    from numpy._core.umath import clip as _clip
except ImportError:  # pragma: no cover - other numpy layouts
    _clip = np.clip


def hermite_basis(t):
    """Cubic Hermite basis (h00, h10, h01, h11) at t in [0, 1]: p(t) = h00 y0 + h10 m0 + h01 y1 + h11 m1,
    with m = segment width x end slope."""
    t2 = t * t
    t3 = t2 * t
    return 2 * t3 - 3 * t2 + 1, t3 - 2 * t2 + t, -2 * t3 + 3 * t2, t3 - t2


def hermite_integral_basis(t):
    """Integrals from 0 to t of the Hermite basis functions; times the segment width they integrate p."""
    t2 = t * t
    t3 = t2 * t
    t4 = t3 * t
    return t4 / 2 - t3 + t, t4 / 4 - 2 * t3 / 3 + t2 / 2, -t4 / 2 + t3, t4 / 4 - t3 / 3


def hermite_combine(basis, y0, y1, m0, m1):
    """Combine basis weights with end values and scaled end slopes: w00 y0 + w10 m0 + w01 y1 + w11 m1."""
    w00, w10, w01, w11 = basis
    return w00 * y0 + w10 * m0 + w01 * y1 + w11 * m1


def segment_integrals(h, y, d):
    """Exact integral of every cubic Hermite segment, along the last axis.

    .. math:: \\int_{x_i}^{x_{i+1}} p\\,dx = h_i \\frac{y_i + y_{i+1}}{2} + h_i^2 \\frac{d_i - d_{i+1}}{12}

    Parameters
    ----------
    h : numpy.ndarray
        Segment widths, shape (..., n-1). [unit of x]
    y, d : numpy.ndarray
        Node values and node slopes, shape (..., n). [unit of y], [unit of y / unit of x]

    Returns
    -------
    numpy.ndarray
        Integral over each segment, shape (..., n-1). [unit of y · unit of x]

    Examples
    --------
    A straight line y = 2x from 0 to 3 (one segment) has the area 9:

    >>> segment_integrals(np.array([3.0]), np.array([0.0, 6.0]), np.array([2.0, 2.0])).tolist()
    [9.0]
    """
    return h * (0.5 * (y[..., :-1] + y[..., 1:]) + h * (d[..., :-1] - d[..., 1:]) / 12.0)


def segment_antiderivative(t, h, y0, y1, d0, d1):
    """Integral of a cubic Hermite segment from its left node to the fraction ``t`` of its width.

    Parameters
    ----------
    t : numpy.ndarray
        Position in the segment, 0-1. [-]
    h : numpy.ndarray
        Segment width. [unit of x]
    y0, y1, d0, d1 : numpy.ndarray
        End values and end slopes of the segment. [unit of y], [unit of y / unit of x]

    Returns
    -------
    numpy.ndarray
        [unit of y · unit of x]

    Examples
    --------
    Half-way along y = 2x on [0, 3] the area is 2.25:

    >>> float(segment_antiderivative(0.5, 3.0, 0.0, 6.0, 2.0, 2.0))
    2.25
    """
    return h * hermite_combine(hermite_integral_basis(t), y0, y1, h * d0, h * d1)


def pchip_slopes(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Node slopes of the monotone PCHIP interpolant.

    Parameters
    ----------
    x : numpy.ndarray
        Strictly increasing abscissae, shape (n,), n >= 2. [any unit]
    y : numpy.ndarray
        Ordinates, shape (n,). [any unit]

    Returns
    -------
    numpy.ndarray
        dy/dx at every node, shape (n,).  [unit of y / unit of x]

    Examples
    --------
    A straight line keeps its slope everywhere:

    >>> pchip_slopes(np.array([0.0, 1.0, 3.0]), np.array([0.0, 2.0, 6.0])).tolist()
    [2.0, 2.0, 2.0]
    """
    return slopes_on(x)(np.asarray(y, dtype=float))


def slopes_on(x: np.ndarray):
    """A function ``y -> pchip_slopes(x, y)`` for fixed abscissae, with the parts that depend on x alone
    computed once (the same arithmetic, so the same slopes to the last bit): for a spline whose node values
    are adjusted many times, as :func:`assaycut.model.distributions.property_spline` does.

    Parameters
    ----------
    x : numpy.ndarray
        Strictly increasing abscissae, shape (n,), n >= 2. [any unit]

    Returns
    -------
    callable
        y (shape (n,)) -> dy/dx at every node, shape (n,).
    """
    x = np.asarray(x, dtype=float)
    return _slopes_with(x[1:] - x[:-1], x.size)


def _slopes_with(h: np.ndarray, n: int):
    """:func:`slopes_on` from the segment widths ``h`` (n - 1 of them)."""
    h0, h1 = h[:-1], h[1:]
    w1 = 2.0 * h1 + h0
    w2 = h1 + 2.0 * h0
    wsum = w1 + w2

    def slopes(y):
        m = (y[1:] - y[:-1]) / h
        if n == 2:
            return np.array([m[0], m[0]])
        d = np.zeros(n)
        m0, m1 = m[:-1], m[1:]
        same = (np.sign(m0) * np.sign(m1)) > 0
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            whmean = (w1 / m0 + w2 / m1) / wsum
            d[1:-1] = np.where(same, 1.0 / np.where(same, whmean, 1.0), 0.0)
        d[0] = _edge_slope(h[0], h[1], m[0], m[1])
        d[-1] = _edge_slope(h[-1], h[-2], m[-1], m[-2])
        return d

    return slopes


def slopes_on_rows(x: np.ndarray):
    """:func:`slopes_on` for one spline per row: x of shape (R, n), n >= 2; the function maps y (R, n) to the
    slopes (R, n), each row the same arithmetic as :func:`slopes_on` on that row (the end slopes'
    limiting by selection instead of branches)."""
    x = np.asarray(x, dtype=float)
    h = np.diff(x, axis=1)
    n = x.shape[1]
    h0, h1 = h[:, :-1], h[:, 1:]
    w1 = 2.0 * h1 + h0
    w2 = h1 + 2.0 * h0
    wsum = w1 + w2

    def slopes(y):
        m = np.diff(y, axis=1) / h
        if n == 2:
            return np.concatenate([m, m], axis=1)
        d = np.zeros(y.shape)
        m0, m1 = m[:, :-1], m[:, 1:]
        same = (np.sign(m0) * np.sign(m1)) > 0
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            whmean = (w1 / m0 + w2 / m1) / wsum
            d[:, 1:-1] = np.where(same, 1.0 / np.where(same, whmean, 1.0), 0.0)
        d[:, 0] = _edge_slope_rows(h[:, 0], h[:, 1], m[:, 0], m[:, 1])
        d[:, -1] = _edge_slope_rows(h[:, -1], h[:, -2], m[:, -1], m[:, -2])
        return d

    return slopes


def _edge_slope_rows(h0, h1, m0, m1):
    """:func:`_edge_slope` element-wise."""
    d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1)
    limit = (np.sign(m0) != np.sign(m1)) & (np.abs(d) > np.abs(3.0 * m0))
    return np.where(np.sign(d) != np.sign(m0), 0.0, np.where(limit, 3.0 * m0, d))


def _sign(v: float) -> float:
    """numpy.sign of one float (NaN for NaN)."""
    return float((v > 0) - (v < 0)) if v == v else v


def _edge_slope(h0, h1, m0, m1):
    """One-sided three-point end slope, limited so as to stay shape-preserving."""
    h0, h1, m0, m1 = float(h0), float(h1), float(m0), float(m1)
    d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1)
    if _sign(d) != _sign(m0):
        return 0.0
    if _sign(m0) != _sign(m1) and abs(d) > abs(3.0 * m0):
        return 3.0 * m0
    return d


class Pchip:
    """A monotone cubic Hermite interpolant y(x) with exact integral and inverse.

    Outside [x[0], x[-1]] the value is held at the end values (no extrapolation).

    Parameters
    ----------
    x : array_like
        Strictly increasing nodes. [any unit]
    y : array_like
        Values at the nodes. [any unit]
    """

    __slots__ = ("x", "y", "d", "h", "_cum", "_inv")

    def __init__(self, x, y):
        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
        if x.ndim != 1 or x.size < 2 or x.size != y.size:
            raise ValueError("Pchip needs two or more nodes, x and y of equal length")
        h = x[1:] - x[:-1]
        if not (h > 0).all():
            raise ValueError("Pchip nodes must be strictly increasing")
        self.x, self.y, self.h = x, y, h
        self.d = _slopes_with(h, x.size)(y)
        cum = np.empty(x.size)
        cum[0] = 0.0
        np.cumsum(segment_integrals(h, y, self.d), out=cum[1:])
        self._cum = cum
        self._inv = None

    @classmethod
    def from_parts(cls, x, y, d, cum) -> "Pchip":
        """The interpolant through (x, y) from slopes ``d`` and cumulative segment integrals ``cum`` already
        computed by the same construction (:func:`slopes_on`, :func:`segment_integrals`), e.g. by an iteration
        that adjusted y; nothing is checked or recomputed."""
        out = cls.__new__(cls)
        out.x, out.y, out.d, out._cum = x, y, d, cum
        out.h = x[1:] - x[:-1]
        out._inv = None
        return out

    def scaled(self, factor: float) -> "Pchip":
        """The interpolant of ``factor`` x y (factor >= 0): the PCHIP construction is homogeneous in y, so its
        slopes and integrals are this one's times the factor (equal to rebuilding from factor x y but for
        rounding)."""
        f = float(factor)
        return Pchip.from_parts(self.x, self.y * f, self.d * f, self._cum * f)

    # -- evaluation -------------------------------------------------------------------------------------
    def _locate(self, xq):
        xq = _clip(np.asarray(xq, dtype=float), self.x[0], self.x[-1])
        i = _clip(np.searchsorted(self.x, xq, side="right") - 1, 0, self.x.size - 2)
        t = (xq - self.x[i]) / self.h[i]
        return i, t

    def __call__(self, xq):
        """Value at ``xq`` (held constant beyond the end nodes; NaN in, NaN out)."""
        i, t = self._locate(xq)
        out = self._hermite(i, t)
        nan = np.isnan(np.asarray(xq, dtype=float))
        return np.where(nan, np.nan, out) if nan.any() else out

    def _hermite(self, i, t):
        return hermite_combine(hermite_basis(t), self.y[i], self.y[i + 1], self.h[i] * self.d[i],
                               self.h[i] * self.d[i + 1])

    def antiderivative(self, xq):
        """Integral of y from x[0] to ``xq`` (constant continuation outside the nodes). [y·x]"""
        xq = np.asarray(xq, dtype=float)
        below = np.minimum(xq - self.x[0], 0.0) * self.y[0]
        above = np.maximum(xq - self.x[-1], 0.0) * self.y[-1]
        i, t = self._locate(xq)
        part = segment_antiderivative(t, self.h[i], self.y[i], self.y[i + 1], self.d[i], self.d[i + 1])
        return self._cum[i] + part + below + above

    def integral(self, a, b):
        """Integral of y from ``a`` to ``b``. [y·x]"""
        a = np.asarray(a, dtype=float)
        b = np.asarray(b, dtype=float)
        if a.ndim == 1 and a.shape == b.shape:  # both ends in one (element-wise) call: the same values
            both = self.antiderivative(np.concatenate([b, a]))
            return both[:b.size] - both[b.size:]
        return self.antiderivative(b) - self.antiderivative(a)

    def inverse(self, yq):
        """x at which the (non-decreasing) interpolant reaches ``yq``.

        Within a flat step the left end of the step is returned.  Values beyond the range are clipped to
        the end nodes; NaN in, NaN out.  Fast and exact: a table of the interpolant at
        :data:`INVERSE_TABLE_STEPS` points per segment (made once) brackets the root within an eighth of its
        segment, and Newton steps on the segment's cubic from the linear guess inside that bracket reach
        machine precision; any point not converged then is solved by :func:`hermite_solve` (the reference
        method, :meth:`inverse_reference`).
        """
        raw = np.asarray(yq, dtype=float)
        out = inverse_rows(self.x[None, :], self.y[None, :], self.h[None, :], self.d[None, :],
                           raw.reshape(1, -1), self._table()[None, :])
        return out.reshape(raw.shape)

    def inverse_reference(self, yq):
        """The reference inverse: :func:`hermite_solve` on the segment found by a search of the nodes (the
        fast :meth:`inverse` is tested against it to 1e-9)."""
        raw = np.asarray(yq, dtype=float)
        q = np.clip(np.nan_to_num(raw, nan=self.y[0]), self.y[0], self.y[-1])
        i = np.clip(np.searchsorted(self.y, q, side="left") - 1, 0, self.x.size - 2)
        h = self.h[i]
        t = hermite_solve(self.y[i], self.y[i + 1], h * self.d[i], h * self.d[i + 1], q)
        x = self.x[i] + t * h
        x = np.where(q == self.y[i + 1], self.x[i + 1], x)
        return np.where(np.isnan(raw), np.nan, np.where(q == self.y[i], self.x[i], x))

    def _table(self):
        """The interpolant's values at :data:`INVERSE_TABLE_STEPS` points per segment and at the last node,
        made once (the points themselves follow from the nodes)."""
        if self._inv is None:
            if not np.all(np.diff(self.y) >= 0):
                raise ValueError("inverse needs non-decreasing values")
            self._inv = inverse_table(self.y, self.h, self.d)
        return self._inv


def inverse_rows(x, y, h, d, yq, table=None):
    """The fast inverse of :meth:`Pchip.inverse` for one spline per row: x, y, d of shape (R, n), h (R, n-1),
    values sought ``yq`` (R, m); x [unit of x] where each row's spline reaches each value.

    Row r's answers depend on row r alone (each row's bracket is found by its own search, every other step is
    element-wise, and the rare points finished by the reference solve are finished row by row), so a spline
    inverted with others gives the same values to the last bit as inverted alone: one spline is a batch of
    one.  ``table``: the rows' :func:`inverse_table` when the caller keeps it.
    """
    raw = np.asarray(yq, dtype=float)
    lo, hi = y[:, :1], y[:, -1:]
    q = _clip(np.where(np.isnan(raw), lo, raw), lo, hi)
    ys = inverse_table(y, h, d) if table is None else table
    k = INVERSE_TABLE_STEPS
    n = h.shape[1]
    width = ys.shape[1]
    j = np.empty(q.shape, dtype=np.intp)
    for r in range(q.shape[0]):
        j[r] = np.searchsorted(ys[r], q[r], side="left")
    j = _clip(j - 1, 0, width - 2)
    i = np.minimum(j // k, n - 1)
    rows = np.arange(q.shape[0])[:, None]
    hh = h[rows, i]
    y0, y1 = y[rows, i], y[rows, i + 1]
    m0, m1 = hh * d[rows, i], hh * d[rows, i + 1]
    t = newton_on_segment(y0, y1, m0, m1, q, ys[rows, j], ys[rows, j + 1], (j - i * k) / k, rowwise=True)
    out = x[rows, i] + t * hh
    out = np.where(q == y1, x[rows, i + 1], out)
    return np.where(np.isnan(raw), np.nan, np.where(q == y0, x[rows, i], out))


def inverse_table(y, h, d):
    """Values of cubic Hermite splines at :data:`INVERSE_TABLE_STEPS` evenly spaced points of every segment and
    at the last node, along the last axis (one spline, or one per row), never falling (rounding must not make
    the table fall): the bracket of the fast inverse.

    Parameters
    ----------
    y, d : numpy.ndarray
        Node values and slopes, shape (..., n).
    h : numpy.ndarray
        Segment widths, shape (..., n-1).

    Returns
    -------
    numpy.ndarray
        Shape (..., (n-1) x INVERSE_TABLE_STEPS + 1).
    """
    k = INVERSE_TABLE_STEPS
    tt = np.arange(k) / k
    y0, y1 = y[..., :-1, None], y[..., 1:, None]
    m0, m1 = (h * d[..., :-1])[..., None], (h * d[..., 1:])[..., None]
    vals = hermite_combine(hermite_basis(tt), y0, y1, m0, m1).reshape(*y.shape[:-1], -1)
    return np.maximum.accumulate(np.concatenate([vals, y[..., -1:]], axis=-1), axis=-1)


def newton_on_segment(y0, y1, m0, m1, q, ya, yb, tl, rowwise: bool = False):
    """Position t (0-1) in a cubic Hermite segment where it reaches ``q``, from a table bracket.

    The root lies in [tl, tl + 1/INVERSE_TABLE_STEPS], where the segment goes from ``ya`` to ``yb``; Newton
    steps on p(t) = c3 t^3 + c2 t^2 + m0 t + y0 start from the linear guess inside it and stay in it.  Points
    whose residual is still above 1e-13 of the values (a zero slope at the root) are solved by
    :func:`hermite_solve`; a flat segment gives 0 (its left end).

    Parameters
    ----------
    y0, y1, m0, m1 : numpy.ndarray
        End values and end slopes times the width of each point's segment.
    q : numpy.ndarray
        Values sought, inside [y0, y1].
    ya, yb, tl : numpy.ndarray
        The bracket's table values and its left position in the segment.

    rowwise : bool
        The points are (R, m) arrays, one row per spline: the rare points left to the reference solve are
        solved row by row (its iteration count depends on the points solved together).

    Returns
    -------
    numpy.ndarray
        t of each point.
    """
    k = INVERSE_TABLE_STEPS
    th = np.minimum(tl + 1.0 / k, 1.0)
    dy = yb - ya
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(dy > 0, tl + (q - ya) / np.where(dy > 0, dy, 1.0) * (th - tl), tl)
    c3 = 2 * y0 - 2 * y1 + m0 + m1
    c2 = -3 * y0 + 3 * y1 - 2 * m0 - m1
    c0 = y0 - q
    for _ in range(NEWTON_STEPS):
        f = ((c3 * t + c2) * t + m0) * t + c0
        fp = (3 * c3 * t + 2 * c2) * t + m0
        with np.errstate(divide="ignore", invalid="ignore"):
            t = np.clip(np.where(fp > 0, t - f / np.where(fp > 0, fp, 1.0), t), tl, th)
    f = ((c3 * t + c2) * t + m0) * t + c0
    bad = (np.abs(f) > 1e-13 * np.maximum(np.abs(y0) + np.abs(y1), 1e-300)) & (y1 > y0)
    if np.any(bad):  # a zero slope at the root: the reference solve for these points only
        t = np.array(t, dtype=float, copy=True)
        if rowwise:  # each row's points solved together, as that row alone would be
            for r in np.nonzero(bad.any(axis=1))[0]:
                b = bad[r]
                t[r, b] = hermite_solve(y0[r, b], y1[r, b], m0[r, b], m1[r, b], q[r, b])
        else:
            t[bad] = hermite_solve(y0[bad], y1[bad], m0[bad], m1[bad], q[bad])
    return np.where(y1 > y0, t, 0.0)


INVERSE_TABLE_STEPS = 8
"""Points per segment of the table that brackets the inverse."""
NEWTON_STEPS = 4
"""Newton steps of the fast inverse from its bracketed linear guess (quadratic convergence: 4 reach machine
precision from an eighth of a segment)."""


def interval_mean(spline, a, b):
    """Mean of ``spline`` over [a, b] (its exact integral over the width); the value at ``a`` where the interval
    has no width.  Works for :class:`Pchip` and for the row-wise batch splines of the library engine.

    Examples
    --------
    >>> round(float(interval_mean(Pchip([0.0, 10.0], [1.0, 3.0]), 0.0, 10.0)), 12)
    2.0
    """
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    width = b - a
    ok = width > 1e-12
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(ok, spline.integral(a, b) / np.where(ok, width, 1.0), spline(a))


def hermite_solve(y0, y1, m0, m1, target, newton: int = 8, bisections: int = 40):
    """Solve p(t) = target for t in [0, 1] on monotone non-decreasing cubic Hermite segments, vectorised.

    p(t) = (2t³-3t²+1) y0 + (t³-2t²+t) m0 + (-2t³+3t²) y1 + (t³-t²) m1, with m = h·slope.  Newton steps from
    the linear guess, kept inside a shrinking bracket (a step leaving it is replaced by bisection), converge
    to machine precision in a few steps; the rare points not converged then (a zero slope at the root) are
    finished by bisection.  On a flat segment the left end (t = 0) is returned.

    Parameters
    ----------
    y0, y1, m0, m1, target : numpy.ndarray
        Segment end values, end slopes times segment width, and the value sought (same shapes).

    Returns
    -------
    numpy.ndarray
        t in [0, 1].

    Examples
    --------
    A straight segment from 0 to 10 reaches 2.5 a quarter of the way:

    >>> float(hermite_solve(np.array(0.0), np.array(10.0), np.array(10.0), np.array(10.0), np.array(2.5)))
    0.25
    """
    shape = np.broadcast_shapes(*(np.shape(z) for z in (y0, y1, m0, m1, target)))
    y0, y1, m0, m1, target = (np.broadcast_to(np.asarray(z, dtype=float), shape).ravel()
                              for z in (y0, y1, m0, m1, target))
    c3 = 2 * y0 - 2 * y1 + m0 + m1
    c2 = -3 * y0 + 3 * y1 - 2 * m0 - m1
    c1 = m0
    c0 = y0 - target
    rise = y1 - y0
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(rise > 0, np.clip(-c0 / np.where(rise > 0, rise, 1.0), 0.0, 1.0), 0.0)
    lo = np.zeros_like(t)
    hi = np.ones_like(t)
    for _ in range(newton):
        f = ((c3 * t + c2) * t + c1) * t + c0
        fp = (3 * c3 * t + 2 * c2) * t + c1
        lo = np.where(f < 0, t, lo)
        hi = np.where(f >= 0, t, hi)
        with np.errstate(divide="ignore", invalid="ignore"):
            cand = np.where(fp > 0, t - f / np.where(fp > 0, fp, 1.0), -1.0)
        new = np.where(rise > 0, np.where((cand > lo) & (cand < hi), cand, 0.5 * (lo + hi)), 0.0)
        done = np.max(np.abs(new - t), initial=0.0) < 1e-15
        t = new
        if done:
            break
    f = ((c3 * t + c2) * t + c1) * t + c0
    scale = np.maximum(np.abs(y0) + np.abs(y1), 1e-300)
    todo = np.nonzero((np.abs(f) > 1e-13 * scale) & (rise > 0))
    if todo[0].size:  # finish the slow cases by bisection on their bracket
        a, b = np.where(f < 0, t, lo)[todo], np.where(f >= 0, t, hi)[todo]
        k3, k2, k1, k0 = c3[todo], c2[todo], c1[todo], c0[todo]
        for _ in range(bisections):
            mid = 0.5 * (a + b)
            below = ((k3 * mid + k2) * mid + k1) * mid + k0 < 0
            a = np.where(below, mid, a)
            b = np.where(below, b, mid)
        t[todo] = b
    return t.reshape(shape)
