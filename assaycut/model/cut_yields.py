"""Narrow-cut yields honoured by the curve: a laboratory's narrow cuts with their yields are points of the TBP
curve (their cumulative yield at each end temperature), and the curve is made to pass through them.

The rule (:func:`cut_yield_points`): a run of narrow cuts that follow one another without a gap, from the
initial boiling point (a cut without a start) or from a start temperature inside the measured points, gives
the cumulative percent at each cut's end: the sum of the run's yields (from the start's percent on the
measured points, read linearly between them, for a run that does not begin at the IBP).  Those points are
added to the curve as measured.  The curve's own points between them are moved in percent by the difference
at the nearest cut ends on either side (linear in temperature, zero at the run's start), so that the curve
keeps its measured shape inside each cut and meets the cut yields at their ends; a point that would then
contradict a cut end (lower in percent at a higher temperature, or the reverse) is left out and named.  The
largest difference between a cut's yield and what the curve's own points give it is reported.

Yields are taken on the curve's own basis: vol % for a volume-basis curve, wt % for a weight-basis one.  This
is our rule (the laboratory measures the cuts' yields directly, and the TBP points between them are read off
the same distillation); no published method is followed.
"""

from __future__ import annotations

import numpy as np

from .rows import Rows

JOIN_C = 0.05
"""Cuts whose end and start differ by at most this much follow one another. [°C]"""
SAME_POINT_C = 0.05
"""A curve point this close in temperature to a cut end gives way to the cut end. [°C]"""
YIELD_WARN = (0.5, 0.10)
"""A cut whose measured yield and the curve's own points differ by more than this much absolute [%] and
relative [-] gives a warning (our choice)."""


def cut_yield_points(g: Rows, basis: str) -> list[Rows]:
    """The curve points ``p`` [%], ``t`` [°C] (R, n) of every row with its narrow cuts' yields honoured (see the
    module docstring); rows split where their point counts differ.

    Row fields read: ``p``, ``t``, ``nc_start``, ``nc_end`` [°C] and ``nc_vol``, ``nc_wt`` [%] (with the
    shared ``has_nc``), ``warn``, ``meth``.  Row fields set: ``p``, ``t``.
    """
    if not g.has_nc:
        return [g]
    ys = g.nc_vol if basis == "vol" else g.nc_wt
    new = [_row_points(g.p[r], g.t[r], g.nc_start[r], g.nc_end[r], ys[r]) for r in range(g.n)]
    for r, (_, _, text, warn) in enumerate(new):
        if text:
            g.meth[r]["cut yields"] = text
        g.warn[r] += warn
    sizes = np.array([x[0].size for x in new])
    out = []
    for n in np.unique(sizes):
        s = g.take(sizes == n)
        rows = [new[i] for i in np.flatnonzero(sizes == n)]
        out.append(s.put(p=np.array([x[0] for x in rows]), t=np.array([x[1] for x in rows])))
    return out


def _row_points(p, t, start, end, y):
    """One row's points with its cut yields honoured: (p, t, method text, warnings)."""
    p, t = np.asarray(p, dtype=float), np.asarray(t, dtype=float)
    order = np.argsort(np.where(np.isnan(start), -np.inf, start), kind="stable")
    lin = lambda x: float(np.interp(x, t, p)) if t[0] <= x <= t[-1] else np.nan  # noqa: E731
    ends, knots_t, knots_d, gaps, warn = [], [], [], [], []
    run_t, run_c = None, None
    for i in order:
        a, b, v = start[i], end[i], y[i]
        if not np.isfinite(v):
            run_t = None
            continue
        if np.isnan(a):
            run_t, run_c = -np.inf, 0.0
            if p[0] == 0.0:  # the curve's own IBP: nothing to move there
                knots_t.append(t[0])
                knots_d.append(0.0)
        elif run_t is None or abs(a - run_t) > JOIN_C:
            c0 = lin(a)
            if not np.isfinite(c0):
                run_t = None
                continue
            run_t, run_c = a, c0
            knots_t.append(a)
            knots_d.append(0.0)
        c1 = run_c + v
        if np.isnan(b):  # the residue closes the run
            run_t = None
            continue
        at_b = lin(b)
        own = at_b - (0.0 if np.isnan(a) else lin(a))
        if np.isfinite(own):
            gaps.append((v - own, v, own, a, b))
        d = c1 - at_b
        if np.isfinite(d):
            knots_t.append(b)
            knots_d.append(d)
        ends.append((b, c1))
        run_t, run_c = b, c1
    if not ends:
        return p, t, "", warn
    kt, kd = np.array(knots_t), np.array(knots_d)
    srt = np.argsort(kt, kind="stable")
    kt, kd = kt[srt], kd[srt]
    bt = np.array([e[0] for e in ends])
    bc = np.minimum(np.array([e[1] for e in ends]), 100.0)
    moved = p.copy()
    inside = (t >= kt[0]) & (t <= kt[-1]) if kt.size else np.zeros(t.size, dtype=bool)
    moved[inside] = p[inside] + np.interp(t[inside], kt, kd)
    near = np.abs(t[:, None] - bt[None, :]).min(axis=1) <= SAME_POINT_C
    agree = np.all(np.sign(t[:, None] - bt[None, :]) == np.sign(moved[:, None] - bc[None, :]), axis=1)
    keep = ~near & agree
    prev = -np.inf
    for j in np.flatnonzero(keep):  # the moved points among themselves stay increasing
        if moved[j] <= prev:
            keep[j] = False
        else:
            prev = moved[j]
    dropped = np.flatnonzero(~near & ~keep)
    for j in dropped:
        warn.append(f"the curve point {p[j]:.2f} % at {t[j]:.1f} °C contradicts the narrow cuts' yields and is left "
                    f"out")
    nt = np.concatenate([t[keep], bt])
    npct = np.concatenate([moved[keep], bc])
    srt = np.argsort(nt, kind="stable")
    worst = max(gaps, key=lambda x: abs(x[0])) if gaps else None
    text = (f"narrow-cut yields honoured: the curve passes through the cumulative yield at each of {len(ends)} cut "
            f"ends, and its own points between them are moved by the difference there (linear in temperature)")
    if worst is not None:
        text += (f"; the largest difference, cut yield less the curve points', is {worst[0]:+.2f} % "
                 f"({_span(worst[3], worst[4])})")
    if dropped.size:
        text += f"; {dropped.size} curve point(s) contradicting the cut yields left out"
    for dv, v, own, a, b in gaps:
        if abs(dv) > YIELD_WARN[0] and abs(dv) > YIELD_WARN[1] * max(v, 1e-12):
            warn.append(f"the narrow cut {_span(a, b)} measures {v:.2f} % of the crude where the curve's own points "
                        f"give {own:.2f} % ({dv / v * 100.0:+.0f} %); the curve is moved to the measured yield")
    return npct[srt], nt[srt], text, warn


def _span(a, b) -> str:
    return f"{'IBP' if np.isnan(a) else f'{a:.1f}'}-{b:.1f} °C"
