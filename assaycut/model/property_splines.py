"""Property splines through narrow-cut measurements: a monotone spline of a property against percent distilled
whose average over each measured cut reproduces that cut's value (:func:`property_spline_rows`), or that
reproduces the mean of every interval of a partition exactly (:func:`partition_spline_rows`).

Built row-wise for a set of crude models under construction (:class:`~assaycut.model.rows.Rows`); one spline
alone is a set of one (:func:`property_spline`).
"""

from __future__ import annotations

import numpy as np

from ..methods.pchip import Pchip, hermite_combine, hermite_integral_basis, search_rows, segment_integrals, slopes_on
from .rows import Rows


def property_spline(lo, hi, values, fixed=(), iterations: int = 30, floor: float | None = 0.0) -> Pchip:
    """Monotone property curve through narrow-cut values placed at their mid percent, adjusted so that its
    average over each narrow cut reproduces the measured value (:func:`property_spline_rows` of one row).

    Each measured value sits at the middle of its cut [lo, hi]; the PCHIP through them (held flat beyond the
    outermost points) is then corrected by fixed-point iteration, y_i <- y_i + (measured_i - mean_i), until
    the spline's mean over every cut matches its measurement (to 1e-7 of the largest value, or the best found
    before the correction stops improving).

    Parameters
    ----------
    lo, hi : array_like
        Cut boundaries on the property's basis. [%]
    values : array_like
        Measured cut averages (SG [-] or sulfur [wt %]).
    fixed : sequence of (x [%], value)
        Extra points held as given (pure light-ends components).
    floor : float or None
        Lowest node value allowed during the correction (0 for contents; None for an index that may be
        negative).

    Returns
    -------
    Pchip
        Property against percent distilled.
    """
    row = lambda z: np.asarray(z, dtype=float).reshape(1, -1)  # noqa: E731
    g = Rows([0]).put(pl=row(lo), ph=row(hi), pv=row(values), pfx=row([q[0] for q in fixed]),
                      pfy=row([q[1] for q in fixed]))
    sp = property_spline_rows(g, "prop", iterations, floor)[0].prop
    return Pchip(sp.X[0], sp.Y[0], sp.D[0], sp.C[0])


def property_spline_rows(g: Rows, name: str, iterations: int = 30, floor: float | None = 0.0) -> list[Rows]:
    """:func:`property_spline` of every row: the cuts ``pl``, ``ph`` (R, k) with their values ``pv`` and the
    points held ``pfx``, ``pfy`` (R, f) are row fields; the spline is set as the row field ``name`` (a Pchip of
    rows).  The sets are split where rows order their nodes differently."""
    out = []
    for s in g.split(np.argsort(np.concatenate([0.5 * (g.pl + g.ph), g.pfx], axis=1), axis=1, kind="stable")):
        mids = 0.5 * (s.pl + s.ph)
        order = np.argsort(np.concatenate([mids[:1], s.pfx[:1]], axis=1), axis=1, kind="stable")[0]
        x = np.concatenate([mids, s.pfx], axis=1)[:, order]
        for t in s.split(np.concatenate([np.ones((s.n, 1), dtype=bool), (x[:, 1:] - x[:, :-1]) > 1e-9], axis=1)):
            out.append(_property_spline_set(t, order, name, iterations, floor))
    return out


def _property_spline_set(t: Rows, order, name, iterations, floor) -> Rows:
    """The splines of a set of rows whose nodes come in the same ``order`` and merge alike."""
    vals = t.pv
    x = np.concatenate([0.5 * (t.pl + t.ph), t.pfx], axis=1)[:, order]
    keep = np.concatenate([[True], (x[0, 1:] - x[0, :-1]) > 1e-9])
    is_cut = (order < vals.shape[1])[keep]
    x = x[:, keep]
    y0 = np.concatenate([vals, t.pfy], axis=1)[:, order][:, keep]
    if x.shape[1] == 1:
        return t.put(**{name: Pchip(np.broadcast_to([0.0, 100.0], (t.n, 2)), np.repeat(y0, 2, axis=1))})
    cut_idx = order[keep][is_cut]
    tol = 1e-12 * np.maximum(np.max(np.abs(vals), axis=1), 1e-12)
    if iterations < 1:  # no iteration at all: the start values
        return t.put(**{name: Pchip(x, y0)})
    best, d, cum = mean_match_arrays(x, y0, is_cut, t.pl[:, cut_idx], t.ph[:, cut_idx], vals[:, cut_idx], tol,
                                     iterations, floor)
    return t.put(**{name: Pchip(x, best, d, cum)})


def partition_spline_rows(g: Rows, name: str, iterations: int = 30, floor: float | None = 0.0) -> list[Rows]:
    """A property spline that reproduces the mean of every interval of a partition exactly: the intervals
    ``pl``, ``ph`` (R, K) with their means ``pv`` tile a stretch of the crude (in any order, without overlap),
    and the points ``pfx``, ``pfy`` held before it.

    Nodes: every interval's ends and middle.  An end between two intervals takes their values interpolated
    between their middles, geometrically (linearly without ``floor``, for a property that may be negative), so
    that a wide neighbour (a long stretch the cuts do not cover) barely moves the end of a narrow measured cut;
    the outer ends continue the straight line from the inner end through the interval's value (no hump at the
    crude's ends), floored at ``floor``; the middles are then solved so that each interval's mean is its
    value (:func:`mean_match_arrays`).  With ``floor`` an end is at most twice the smaller neighbour, so the
    middle that meets a small mean beside a large one stays positive: a content spanning orders of magnitude
    (sulfur from 1e-5 to 3 wt %) is matched as closely as a gravity.  Sets as :func:`property_spline_rows`.
    """
    out = []
    for s in g.split(np.argsort(g.pl, axis=1, kind="stable")):
        order = np.argsort(s.pl[0], kind="stable")
        lo, hi, val = s.pl[:, order], s.ph[:, order], s.pv[:, order]
        mids = 0.5 * (lo + hi)
        w = (hi[:, :-1] - mids[:, :-1]) / (mids[:, 1:] - mids[:, :-1])  # each inner end between the two middles
        v0, v1 = val[:, :-1], val[:, 1:]
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if floor is not None:
                inner = np.where((v0 > 0) & (v1 > 0), np.minimum(v0 * (v1 / v0) ** w, 2.0 * np.minimum(v0, v1)), 0.0)
            else:
                inner = v0 + w * (v1 - v0)
        bounds = np.concatenate([lo[:, :1], hi], axis=1)
        x = np.empty((s.n, 2 * lo.shape[1] + 1))
        x[:, 0::2], x[:, 1::2] = bounds, 0.5 * (lo + hi)
        y = np.empty_like(x)
        if inner.shape[1]:  # the outer ends continue the slope into the outer intervals (mean at the middle)
            first, last = 2.0 * val[:, :1] - inner[:, :1], 2.0 * val[:, -1:] - inner[:, -1:]
            if floor is not None:
                first, last = np.maximum(first, floor), np.maximum(last, floor)
        else:
            first, last = val[:, :1], val[:, -1:]
        y[:, 0::2] = np.concatenate([first, inner, last], axis=1)
        y[:, 1::2] = val
        x, y = np.concatenate([s.pfx, x], axis=1), np.concatenate([s.pfy, y], axis=1)
        is_cut = np.zeros(x.shape[1], dtype=bool)
        is_cut[s.pfx.shape[1] + 1::2] = True
        tol = 1e-12 * np.maximum(np.max(np.abs(val), axis=1), 1e-12)
        best, d, cum = mean_match_arrays(x, y, is_cut, lo, hi, val, tol, iterations, floor)
        out.append(s.put(**{name: Pchip(x, best, d, cum)}))
    return out


def mean_match_arrays(x, y, is_cut, a, b, target, tol, iterations: int, floor):
    """The node correction of :func:`property_spline_rows`, row-wise: nodes x and start values y (R, n), the cut
    nodes ``is_cut`` (n,) or (R, n) with every row alike, intervals a, b and their ``target`` means (R, k),
    absolute tolerance floors ``tol`` (R,); the best node values, their slopes and cumulative integrals, (R, n)
    each, every row as it would be alone.

    Each interval's mean is linear in the node values and slopes, mean = P y + Q d (:func:`_mean_operators`);
    each step solves P_cut y_cut = target - P_rest y_rest - Q d for the cut nodes with the slopes d of the
    previous step (the PCHIP slopes depend on y), floored at ``floor``.  A row stops when every interval's
    mean is within 1e-10 of its target (relative, or ``tol`` absolute), or when a step no longer improves it
    by 5 %, keeping its best.
    """
    is_cut = np.asarray(is_cut, dtype=bool)
    if is_cut.ndim == 2:
        is_cut = is_cut[0]
    y = np.array(y, dtype=float)
    means = _interval_means_rows(x, a, b)
    P, Q = _mean_operators(x, a, b)
    pc, pr = P[:, :, is_cut], P[:, :, ~is_cut]
    square = pc.shape[1] == pc.shape[2]
    scale = np.abs(target) * 1e-10 + np.asarray(tol, dtype=float).reshape(-1, 1)
    best = y.copy()
    best_d = np.zeros_like(y)
    best_cum = np.zeros_like(y)
    best_err = np.full(y.shape[0], np.inf)
    active = np.ones(y.shape[0], dtype=bool)
    for _ in range(iterations):
        m, d, cum = means(y)
        err = target - m
        worst = np.max(np.abs(err) / scale, axis=1) if err.shape[1] else np.zeros(y.shape[0])
        active &= ~(worst >= 0.95 * best_err)  # no longer improving: keeps its best
        keep = active[:, None]
        np.copyto(best, y, where=keep)
        np.copyto(best_d, d, where=keep)
        np.copyto(best_cum, cum, where=keep)
        best_err = np.where(active, worst, best_err)
        active &= ~(worst < 1.0)
        if not active.any():
            break
        rows = np.flatnonzero(active)
        rhs = (target[rows] - np.einsum("rkn,rn->rk", pr[rows], y[rows][:, ~is_cut])
               - np.einsum("rkn,rn->rk", Q[rows], d[rows]))
        try:
            if square:
                moved = np.linalg.solve(pc[rows], rhs[..., None])[..., 0]
            else:
                moved = np.stack([np.linalg.lstsq(pc[r], rhs[j], rcond=None)[0] for j, r in enumerate(rows)])
        except np.linalg.LinAlgError:  # a singular system: the fixed-point step y_i += (target_i - mean_i)
            moved = y[rows][:, is_cut] + err[rows]
        if floor is not None:
            moved = np.maximum(moved, floor)
        y[np.ix_(rows, np.flatnonzero(is_cut))] = moved
    return best, best_d, best_cum


def _mean_operators(x: np.ndarray, a: np.ndarray, b: np.ndarray):
    """The interval means of the cubic Hermite splines on nodes x (R, n) as linear maps of their node values y and
    slopes d: mean over [a, b] (R, k) = P y + Q d, with P, Q (R, k, n) (held flat beyond the end nodes).

    The antiderivative at q in segment i is cum_i + h_i (w00 y_i + w01 y_(i+1)) + h_i² (w10 d_i + w11 d_(i+1))
    (the integrated Hermite basis w at q's place t in the segment) plus the flat ends, where cum_i, the
    integral up to node i, sums h_j (y_j + y_(j+1))/2 + h_j² (d_j - d_(j+1))/12 over the segments before it.
    """
    rn, n = x.shape
    k = a.shape[1]
    h = x[:, 1:] - x[:, :-1]
    seg = np.arange(n - 1)
    sy, sd = np.zeros((rn, n - 1, n)), np.zeros((rn, n - 1, n))
    sy[:, seg, seg] = sy[:, seg, seg + 1] = h / 2
    sd[:, seg, seg] = h * h / 12
    sd[:, seg, seg + 1] = -h * h / 12
    cy = np.concatenate([np.zeros((rn, 1, n)), np.cumsum(sy, axis=1)], axis=1)
    cd = np.concatenate([np.zeros((rn, 1, n)), np.cumsum(sd, axis=1)], axis=1)
    q = np.concatenate([a, b], axis=1)
    qc = np.clip(q, x[:, :1], x[:, -1:])
    i = np.clip(search_rows(x, qc, "right") - 1, 0, n - 2)
    rows, cols = np.arange(rn)[:, None], np.arange(2 * k)[None, :]
    hi = h[rows, i]
    w00, w10, w01, w11 = hermite_integral_basis((qc - x[rows, i]) / hi)
    ay, ad = cy[rows, i], cd[rows, i]
    ay[rows, cols, i] += hi * w00
    ay[rows, cols, i + 1] += hi * w01
    ad[rows, cols, i] += hi * hi * w10
    ad[rows, cols, i + 1] += hi * hi * w11
    ay[:, :, 0] += np.minimum(q - x[:, :1], 0.0)
    ay[:, :, -1] += np.maximum(q - x[:, -1:], 0.0)
    width = (b - a)[..., None]
    return (ay[:, k:] - ay[:, :k]) / width, (ad[:, k:] - ad[:, :k]) / width


def _interval_means_rows(x: np.ndarray, a: np.ndarray, b: np.ndarray):
    """A function y -> (mean of the PCHIP through (x, y) over each [a, b] (held flat beyond the end nodes), its
    slopes, its cumulative segment integrals), one spline per row: x (R, n) nodes, a and b (R, k) intervals;
    y (R, n) -> means (R, k), slopes and cumulative integrals (R, n).

    The exact integral of :meth:`Pchip.integral`, with the interval ends located once, since only the node
    values change between the iterations of :func:`property_spline`.
    """
    h = np.diff(x, axis=1)
    rows = np.arange(x.shape[0])[:, None]
    n = x.shape[1]
    k = a.shape[1]
    q = np.concatenate([a, b], axis=1)  # both ends of every interval, located once
    qc = np.clip(q, x[:, :1], x[:, -1:])
    i = np.clip(search_rows(x, qc, "right") - 1, 0, n - 2)
    hi = h[rows, i]
    w = hermite_integral_basis((qc - x[rows, i]) / hi)
    below, above = np.minimum(q - x[:, :1], 0.0), np.maximum(q - x[:, -1:], 0.0)
    at = (rows * n + i).ravel()  # flat positions of each end's left node
    width = b - a
    slopes = slopes_on(x)

    def means(y):
        d = slopes(y)
        cum = np.concatenate([np.zeros((y.shape[0], 1)), np.cumsum(segment_integrals(h, y, d), axis=1)], axis=1)
        yf, df = y.ravel(), d.ravel()
        y0, y1 = yf[at].reshape(q.shape), yf[at + 1].reshape(q.shape)
        d0, d1 = df[at].reshape(q.shape), df[at + 1].reshape(q.shape)
        anti = (cum.ravel()[at].reshape(q.shape) + hi * hermite_combine(w, y0, y1, hi * d0, hi * d1)
                + below * y[:, :1] + above * y[:, -1:])
        return (anti[:, k:] - anti[:, :k]) / width, d, cum

    return means
