"""Monotone piecewise-cubic Hermite interpolation (PCHIP), with exact integrals and an exact inverse.

The slopes are those of Fritsch & Carlson (SIAM J. Numer. Anal. 17 (1980) 238-246) in the weighted
harmonic-mean form of Fritsch & Butland (1984), with the one-sided three-point end slopes of Moler,
*Numerical Computing with MATLAB* (2004) ch. 3 -- the same construction as
``scipy.interpolate.PchipInterpolator`` (the tests compare the two).  Written here in plain numpy so that
the curve model can evaluate, integrate and invert many curves at once without a Python loop per point.

The interpolant reproduces the nodes exactly, never overshoots them, keeps flat steps flat, and is
monotone wherever the data are monotone.

Contents
--------
- :class:`Pchip`: monotone cubic Hermite interpolants, one or one per row: value, exact integral, exact inverse
- :func:`slopes_on`: the node slopes (the one slope routine)
- :func:`search_rows`: row-wise ``numpy.searchsorted``, each row's answer its own
- :func:`interval_mean`: a spline's mean over intervals; :func:`pad_nodes`: rows padded to one width
- :func:`inverse_table`, :func:`newton_on_segment`, :func:`hermite_solve`: the inverse's bracket, Newton steps
  and reference solve
- :func:`hermite_basis`, :func:`hermite_integral_basis`, :func:`hermite_combine`, :func:`segment_integrals`,
  :func:`segment_antiderivative`: the cubic Hermite segment and its integral
- constants: ``INVERSE_TABLE_STEPS``, ``NEWTON_STEPS``
"""

from __future__ import annotations

import numpy as np

__all__ = ["hermite_basis", "hermite_integral_basis", "hermite_combine", "segment_integrals",
           "segment_antiderivative", "slopes_on", "search_rows", "Pchip", "pad_nodes",
           "inverse_table", "newton_on_segment", "interval_mean", "hermite_solve", "INVERSE_TABLE_STEPS",
           "NEWTON_STEPS"]

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


def slopes_on(x: np.ndarray):
    """A function y -> the node slopes [unit of y / unit of x] of the monotone PCHIP through (x, y), for fixed
    abscissae x, with the parts that depend on x alone computed once: for a spline whose node values are adjusted many times, as
    :func:`assaycut.model.property_splines.property_spline` does.  The one slope routine: a single spline (x of
    shape (n,)) is a batch of one, and every row's slopes are that row's own arithmetic.

    Fritsch & Carlson (1980) interior slopes in the weighted harmonic-mean form of Fritsch & Butland (1984):
    d_i = (w1 + w2) / (w1 / m_{i-1} + w2 / m_i) with w1 = 2 h_i + h_{i-1}, w2 = h_i + 2 h_{i-1} where the
    neighbouring secants m have one sign, else 0; one-sided three-point end slopes (Moler 2004, ch. 3).

    Parameters
    ----------
    x : numpy.ndarray
        Strictly increasing abscissae, shape (n,) or (R, n), n >= 2. [any unit]

    Returns
    -------
    callable
        y (the shape of x) -> dy/dx at every node (the shape of x).

    Examples
    --------
    A straight line keeps its slope everywhere:

    >>> slopes_on(np.array([0.0, 1.0, 3.0]))(np.array([0.0, 2.0, 6.0])).tolist()
    [2.0, 2.0, 2.0]
    """
    x = np.asarray(x, dtype=float)
    one = x.ndim == 1
    x2 = x[None, :] if one else x
    h = x2[:, 1:] - x2[:, :-1]
    n = x2.shape[1]
    h0, h1 = h[:, :-1], h[:, 1:]
    w1 = 2.0 * h1 + h0
    w2 = h1 + 2.0 * h0
    wsum = w1 + w2
    if n > 2:
        h_end, h_next = h[:, _ENDS], h[:, _NEXT]

    def slopes(y):
        y = y[None, :] if one else y
        m = (y[:, 1:] - y[:, :-1]) / h
        if n == 2:
            d = np.concatenate([m, m], axis=1)
        else:
            d = np.zeros(y.shape)
            m0, m1 = m[:, :-1], m[:, 1:]
            same = (np.sign(m0) * np.sign(m1)) > 0
            with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
                whmean = (w1 / m0 + w2 / m1) / wsum
                d[:, 1:-1] = np.where(same, 1.0 / np.where(same, whmean, 1.0), 0.0)
            d[:, _ENDS] = _edge_slope(h_end, h_next, m[:, _ENDS], m[:, _NEXT])  # both ends in one call
        return d[0] if one else d

    return slopes


_ENDS, _NEXT = [0, -1], [1, -2]
"""The end segments of a spline and their neighbours (the first and last end slopes' three points)."""


def _edge_slope(h0, h1, m0, m1):
    """One-sided three-point end slope, limited so as to stay shape-preserving (element-wise)."""
    d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1)
    limit = (np.sign(m0) != np.sign(m1)) & (np.abs(d) > np.abs(3.0 * m0))
    return np.where(np.sign(d) != np.sign(m0), 0.0, np.where(limit, 3.0 * m0, d))


def search_rows(table: np.ndarray, q: np.ndarray, side: str) -> np.ndarray:
    """Row-wise ``numpy.searchsorted``: for each row r, ``searchsorted(table[r], q[r], side)`` exactly.

    ``table`` (R, w), each row non-decreasing and finite; ``q`` (R, m).  NaN sorts last, as in numpy.  A batch
    of one is numpy's own search.  More rows are searched in one flat search of the rows laid end to end
    (row r shifted by r times the span of all rows, each query clipped to one unit beyond its row's range,
    which keeps its answer); that shift can round a query onto a neighbouring table value, so every answer
    is then checked against its own row, table[r, j-1] < q <= table[r, j] ('left'; <, <= swapped for
    'right'), and the rows with a wrong one are searched again alone.  Each row's answer is thus that row's
    alone, whatever the other rows hold (an unchecked shifted search once made a curve's inverse depend on its
    batch by up to 276 °C on flat steps).

    Examples
    --------
    >>> search_rows(np.array([[0.0, 1.0, 1.0, 2.0], [5.0, 6.0, 7.0, 8.0]]), np.array([[1.0], [7.5]]), "left").tolist()
    [[1], [3]]
    """
    q = np.where(np.isnan(q), np.inf, q)
    if table.shape[0] == 1:
        return np.searchsorted(table[0], q[0], side=side)[None, :]
    rows, width = table.shape
    lo, hi = table[:, :1], table[:, -1:]
    span = float(np.max(hi) - np.min(lo)) + 10.0
    off = np.arange(rows, dtype=float)[:, None] * span
    flat = (table + off).ravel()
    j = np.searchsorted(flat, (_clip(q, lo - 1.0, hi + 1.0) + off).ravel(), side=side).reshape(q.shape)
    j = _clip(j - np.arange(rows)[:, None] * width, 0, width)
    r = np.arange(rows)[:, None]
    below = table[r, np.maximum(j - 1, 0)]
    above = table[r, np.minimum(j, width - 1)]
    if side == "left":
        ok = ((j == 0) | (below < q)) & ((j == width) | (above >= q))
    else:
        ok = ((j == 0) | (below <= q)) & ((j == width) | (above > q))
    for k in np.nonzero(~ok.all(axis=1))[0]:
        j[k] = np.searchsorted(table[k], q[k], side=side)
    return j


class Pchip:
    """Monotone cubic Hermite interpolants y(x) with exact integrals and an exact inverse, one per row.

    The one spline of the project: a single spline is a batch of one.  Built from 1-D nodes it answers queries
    of any shape with that shape; built from rows (R, n), or stacked from single splines (:meth:`stack`), it
    answers row-wise: a query's first axis runs over the rows (a scalar, or a query whose first axis is not R,
    is asked of every row).  Rows of different lengths are *padded*: nodes 1, 2, ... units past each row's last
    node, its value held, slope 0, and each row stops at its own last node (``last``); padding keeps one
    array per attribute and the arithmetic of every row its own (:func:`search_rows` checks each row's search
    against the row itself), so a spline answers the same inside any batch as alone, to the rounding of its
    integral's last segment.

    Outside [x[0], x[last]] the value is held at the end values (no extrapolation).

    Parameters
    ----------
    x : array_like
        Strictly increasing nodes, (n,) or (R, n). [any unit]
    y : array_like
        Values at the nodes, the shape of x. [any unit]
    d, cum : array_like, optional
        Slopes and cumulative segment integrals already computed by the same construction
        (:func:`slopes_on`, :func:`segment_integrals`), e.g. by an iteration that adjusted y; taken as given.
    last : array_like of int, optional
        Index of each row's last real node (rows padded past it); default the last column.
    """

    __slots__ = ("X", "Y", "D", "H", "C", "lo", "hi", "single", "missing", "_tab")

    def __init__(self, x, y, d=None, cum=None, last=None):
        X = np.asarray(x, dtype=float)
        Y = np.asarray(y, dtype=float)
        single = X.ndim == 1
        if single:
            X, Y = X[None, :], Y[None, :]
        if X.ndim != 2 or X.shape[1] < 2 or X.shape != Y.shape:
            raise ValueError("Pchip needs two or more nodes, x and y of equal shape")
        H = X[:, 1:] - X[:, :-1]
        if not (H > 0).all():
            raise ValueError("Pchip nodes must be strictly increasing")
        D = slopes_on(X)(Y) if d is None else np.asarray(d, dtype=float).reshape(X.shape)
        if cum is None:
            C = np.empty(X.shape)
            C[:, 0] = 0.0
            np.cumsum(segment_integrals(H, Y, D), axis=1, out=C[:, 1:])
        else:
            C = np.asarray(cum, dtype=float).reshape(X.shape)
        self.X, self.Y, self.D, self.H, self.C = X, Y, D, H, C
        self.lo = X[:, 0]
        self.hi = X[:, -1] if last is None else X[np.arange(X.shape[0]), np.asarray(last)]
        self.single = single
        self.missing = np.zeros(X.shape[0], dtype=bool)
        self._tab = None

    @classmethod
    def stack(cls, splines: list) -> "Pchip":
        """The splines (single ones, sets of rows, or None) as the rows of one, padded to the longest (see the
        class).  A None is one zero spline, flagged in ``missing``.  Splines of one width are padded together."""
        real = [s if s is not None else _ZERO for s in splines]
        widths = np.array([s.X.shape[1] for s in real])
        counts = np.array([s.X.shape[0] for s in real])
        width = int(widths.max())
        start = np.concatenate([[0], np.cumsum(counts)])
        X, Y, D = (np.empty((int(start[-1]), width)) for _ in range(3))
        last = np.empty(int(start[-1]), dtype=int)
        for w in np.unique(widths):
            idx = np.flatnonzero(widths == w)
            c = counts[idx]  # the rows of these splines in the stack
            at = np.repeat(start[idx] - np.concatenate([[0], np.cumsum(c)[:-1]]), c) + np.arange(int(c.sum()))
            x = np.concatenate([real[i].X for i in idx])
            hi = np.concatenate([real[i].hi for i in idx])
            X[at], Y[at], D[at] = pad_nodes(x, np.concatenate([real[i].Y for i in idx]),
                                            np.concatenate([real[i].D for i in idx]), width)
            last[at] = (x <= hi[:, None]).sum(axis=1) - 1
        out = cls(X, Y, D, last=last)
        out.missing = np.concatenate([np.ones(r.rows, dtype=bool) if s is None else r.missing
                                      for s, r in zip(splines, real)])
        return out

    def take(self, rows) -> "Pchip":
        """The splines of ``rows`` (positions) as rows of a new one, each row as it was."""
        rows = np.asarray(rows, dtype=int)
        out = Pchip.__new__(Pchip)
        out.X, out.Y, out.D, out.H, out.C = self.X[rows], self.Y[rows], self.D[rows], self.H[rows], self.C[rows]
        out.lo, out.hi, out.missing, out.single, out._tab = self.lo[rows], self.hi[rows], self.missing[rows], False, None
        return out

    @property
    def x(self):
        """The nodes: (n,) for a single spline, (R, n) for rows (padded ones included)."""
        return self.X[0] if self.single else self.X

    @property
    def y(self):
        """The node values, shaped as :attr:`x`."""
        return self.Y[0] if self.single else self.Y

    @property
    def d(self):
        """The node slopes, shaped as :attr:`x`."""
        return self.D[0] if self.single else self.D

    @property
    def rows(self) -> int:
        """Number of splines (1 for a single one)."""
        return self.X.shape[0]

    def scaled(self, factor) -> "Pchip":
        """The interpolant of ``factor`` x y (factor >= 0, one, or one per row): the PCHIP construction is
        homogeneous in y, so its slopes and integrals are this one's times the factor (equal to rebuilding from
        factor x y but for rounding)."""
        f = np.asarray(factor, dtype=float).reshape(-1, 1)
        out = Pchip.__new__(Pchip)
        out.X, out.H, out.lo, out.hi, out.single, out.missing = self.X, self.H, self.lo, self.hi, self.single, \
            self.missing
        out.Y, out.D, out.C, out._tab = self.Y * f, self.D * f, self.C * f, None
        return out

    # -- evaluation -------------------------------------------------------------------------------------
    def _query(self, q):
        """A query as (R, m) rows and the shape of the answer."""
        q = np.asarray(q, dtype=float)
        if self.single:
            return q.reshape(1, -1), q.shape
        if q.ndim == 0 or q.shape[0] != self.X.shape[0]:
            q = np.broadcast_to(q, (self.X.shape[0],) + q.shape)
        return q.reshape(self.X.shape[0], -1), q.shape

    def _locate(self, q2):
        qc = _clip(q2, self.lo[:, None], self.hi[:, None])
        i = _clip(search_rows(self.X, qc, "right") - 1, 0, self.X.shape[1] - 2)
        rows = np.arange(self.X.shape[0])[:, None]
        h = self.H[rows, i]
        return rows, i, (qc - self.X[rows, i]) / h, h

    def __call__(self, xq):
        """Value at ``xq`` (held constant beyond the end nodes; NaN in, NaN out)."""
        q2, shape = self._query(xq)
        rows, i, t, h = self._locate(q2)
        out = hermite_combine(hermite_basis(t), self.Y[rows, i], self.Y[rows, i + 1], h * self.D[rows, i],
                              h * self.D[rows, i + 1])
        out = np.where(np.isnan(q2), np.nan, out)
        return out.reshape(shape)

    def antiderivative(self, xq):
        """Integral of y from x[0] to ``xq`` (constant continuation outside the nodes). [y·x]"""
        q2, shape = self._query(xq)
        below = np.minimum(q2 - self.lo[:, None], 0.0) * self.Y[:, :1]
        above = np.maximum(q2 - self.hi[:, None], 0.0) * self.Y[:, -1:]
        rows, i, t, h = self._locate(q2)
        part = segment_antiderivative(t, h, self.Y[rows, i], self.Y[rows, i + 1], self.D[rows, i],
                                      self.D[rows, i + 1])
        return (self.C[rows, i] + part + below + above).reshape(shape)

    def integral(self, a, b):
        """Integral of y from ``a`` to ``b``. [y·x]"""
        a = np.asarray(a, dtype=float)
        b = np.asarray(b, dtype=float)
        if a.ndim >= 1 and a.shape == b.shape:  # both ends in one (element-wise) call: the same values
            both = self.antiderivative(np.concatenate([b, a], axis=-1))
            m = b.shape[-1]
            return both[..., :m] - both[..., m:]
        return self.antiderivative(b) - self.antiderivative(a)

    def inverse(self, yq):
        """x at which the (non-decreasing) interpolant reaches ``yq``.

        Within a flat step the left end of the step is returned.  Values beyond the range are clipped to
        the end nodes; NaN in, NaN out.  Fast and exact: a table of the interpolant at
        :data:`INVERSE_TABLE_STEPS` points per segment (made once) brackets the root within an eighth of its
        segment, and Newton steps on the segment's cubic from the linear guess inside that bracket reach
        machine precision; any point not converged then is solved by :func:`hermite_solve`, row by row.
        Row r's answers depend on row r alone.
        """
        q2, shape = self._query(yq)
        Y, H, D, X = self.Y, self.H, self.D, self.X
        lo, hi = Y[:, :1], Y[:, -1:]
        q = _clip(np.where(np.isnan(q2), lo, q2), lo, hi)
        ys = self.table()
        k = INVERSE_TABLE_STEPS
        j = _clip(search_rows(ys, q, "left") - 1, 0, ys.shape[1] - 2)
        i = np.minimum(j // k, H.shape[1] - 1)
        rows = np.arange(q.shape[0])[:, None]
        hh = H[rows, i]
        y0, y1 = Y[rows, i], Y[rows, i + 1]
        m0, m1 = hh * D[rows, i], hh * D[rows, i + 1]
        t = newton_on_segment(y0, y1, m0, m1, q, ys[rows, j], ys[rows, j + 1], (j - i * k) / k)
        out = X[rows, i] + t * hh
        out = np.where(q == y1, X[rows, i + 1], out)
        out = np.where(np.isnan(q2), np.nan, np.where(q == y0, X[rows, i], out))
        return out.reshape(shape)

    def table(self) -> np.ndarray:
        """Each row's values at :data:`INVERSE_TABLE_STEPS` points per segment and at its last node (the
        inverse's bracket), made once; (R, (n - 1) x INVERSE_TABLE_STEPS + 1)."""
        if self._tab is None:
            if not (self.Y[:, 1:] >= self.Y[:, :-1]).all():
                raise ValueError("inverse needs non-decreasing values")
            self._tab = inverse_table(self.Y, self.H, self.D)
        return self._tab


def pad_nodes(x, y, d, width: int):
    """Spline rows (R, n) padded to ``width`` nodes as :class:`Pchip` pads them: nodes 1, 2, ... units past the
    last, its value held, slope 0.  Returns (x, y, d), each (R, width)."""
    extra = width - x.shape[1]
    if extra <= 0:
        return x, y, d
    step = np.arange(1, extra + 1)[None, :]
    return (np.concatenate([x, x[:, -1:] + step], axis=1), np.concatenate([y, np.repeat(y[:, -1:], extra, axis=1)],
            axis=1), np.concatenate([d, np.zeros((x.shape[0], extra))], axis=1))


_ZERO = Pchip([0.0, 1.0], [0.0, 0.0])
"""The zero spline :meth:`Pchip.stack` puts in place of a missing one."""


def inverse_table(y, h, d):
    """Values of cubic Hermite splines at :data:`INVERSE_TABLE_STEPS` evenly spaced points of every segment and
    at the last node, along the last axis (one spline per row), never falling (rounding must not make the
    table fall): the bracket of :meth:`Pchip.inverse`.

    Parameters
    ----------
    y, d : numpy.ndarray
        Node values and slopes, shape (R, n).
    h : numpy.ndarray
        Segment widths, shape (R, n-1).

    Returns
    -------
    numpy.ndarray
        Shape (R, (n-1) x INVERSE_TABLE_STEPS + 1).
    """
    k = INVERSE_TABLE_STEPS
    tt = np.arange(k) / k
    y0, y1 = y[..., :-1, None], y[..., 1:, None]
    m0, m1 = (h * d[..., :-1])[..., None], (h * d[..., 1:])[..., None]
    vals = hermite_combine(hermite_basis(tt), y0, y1, m0, m1).reshape(*y.shape[:-1], -1)
    return np.maximum.accumulate(np.concatenate([vals, y[..., -1:]], axis=-1), axis=-1)


def newton_on_segment(y0, y1, m0, m1, q, ya, yb, tl):
    """Position t (0-1) in cubic Hermite segments where each reaches ``q``, from a table bracket; (R, m)
    arrays, one row per spline.

    The root lies in [tl, tl + 1/INVERSE_TABLE_STEPS], where the segment goes from ``ya`` to ``yb``; Newton
    steps on p(t) = c3 t^3 + c2 t^2 + m0 t + y0 start from the linear guess inside it and stay in it.  Points
    whose residual is still above 1e-13 of the values (a zero slope at the root) are solved by
    :func:`hermite_solve` (each point's answer its own); a flat segment gives 0 (its left end).

    Parameters
    ----------
    y0, y1, m0, m1 : numpy.ndarray
        End values and end slopes times the width of each point's segment.
    q : numpy.ndarray
        Values sought, inside [y0, y1].
    ya, yb, tl : numpy.ndarray
        The bracket's table values and its left position in the segment.

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
    if np.any(bad):  # a zero slope at the root: the reference solve for these points only (point by point)
        t = np.array(t, dtype=float, copy=True)
        t[bad] = hermite_solve(y0[bad], y1[bad], m0[bad], m1[bad], q[bad])
    return np.where(y1 > y0, t, 0.0)


INVERSE_TABLE_STEPS = 8
"""Points per segment of the table that brackets the inverse."""
NEWTON_STEPS = 4
"""Newton steps of the fast inverse from its bracketed linear guess (quadratic convergence: 4 reach machine
precision from an eighth of a segment)."""


def interval_mean(spline, a, b):
    """Mean of ``spline`` (a :class:`Pchip`, one or rows) over [a, b] (its exact integral over the width); the
    value at ``a`` where the interval has no width.

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
    to machine precision in a few steps (a point stops at its first step below 1e-15, so its answer does not
    depend on the points solved with it); the rare points not converged then (a zero slope at the root) are
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
    moving = np.ones(t.shape, dtype=bool)
    for _ in range(newton):
        f = ((c3 * t + c2) * t + c1) * t + c0
        fp = (3 * c3 * t + 2 * c2) * t + c1
        lo = np.where(moving & (f < 0), t, lo)
        hi = np.where(moving & (f >= 0), t, hi)
        with np.errstate(divide="ignore", invalid="ignore"):
            cand = np.where(fp > 0, t - f / np.where(fp > 0, fp, 1.0), -1.0)
        new = np.where(rise > 0, np.where((cand > lo) & (cand < hi), cand, 0.5 * (lo + hi)), 0.0)
        step = np.abs(new - t)
        t = np.where(moving, new, t)
        moving &= ~(step < 1e-15)  # this point has converged: it stays (each point's steps are its own)
        if not moving.any():
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
