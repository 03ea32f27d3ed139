"""The TBP curve model: cumulative percent distilled as a monotone function of TBP temperature.

The curve is a monotone PCHIP (:mod:`assaycut.methods.pchip`) through the measured points, exact at them, with

* light ends placed at the front as a staircase at each component's normal boiling point;
* an extension past the last measured point (and before the first, when neither light ends nor a 0 %
  point exist) from the Riazi distribution fitted to the measured points
  (:mod:`assaycut.methods.riazi_distribution`); every value depending on it is marked as extrapolated.  The
  end of the curve (100 %) is placed at the distribution's 99.95 % point, but never above
  :data:`END_CAP_C`: residue beyond it is lumped up to that end point.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import CurveError
from ..methods.pchip import Pchip, slopes_on
from ..methods.riazi_distribution import RiaziFit, fit_riazi_many, riazi_temp_c
from ..units import pct_text
from .rows import Rows, each

END_FRACTION = 0.9995
"""The curve's 100 % point is placed at this fraction of the fitted distribution."""
END_CAP_C = 850.0
"""Highest end point given to an extended curve: above about 750-850 °C no TBP or simulated distillation is
measured, and the heaviest residue is lumped up to this point (common practice, no source). [°C]"""
END_CAP_STEP_C = 50.0
"""A curve measured close to or past :data:`END_CAP_C` ends this far above its last point instead (our
choice). [°C]"""
POOR_FIT_RMS_C = 5.0
"""RMS deviation of the distribution fit above which a warning is given. [°C]"""
LIGHT_ENDS_TOL_PCT = 0.1
"""Light ends that miss the first measured point by at most this much are scaled to meet it. [vol %]"""
METHANE_NBP_C = -161.5
"""Normal boiling point of methane, the lightest hydrocarbon: no TBP of the model may lie below it. [°C]"""
STEP_C = 0.01
"""Width given to a pure component's (or repeated temperature's) vertical step. [°C]"""


@dataclass
class TbpCurve:
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
    safe_lo: float = 0.0
    safe_hi: float = 100.0
    """The vol % range where the curve does not depend on its extensions: the measured range, less its last
    (first) interval only where the monotone slope bound made that interval's end slope depend on the extension
    (:func:`_measured_end_slopes`). [vol %]"""
    lumped_pct: float = 0.0
    """Share of the crude lumped up to the capped end point (:data:`END_CAP_C`). [vol %]"""
    measured_pct: np.ndarray = field(default_factory=lambda: np.zeros(0))
    measured_temp_c: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """The measured points the curve was built on (light ends not included). [vol %], [°C]"""

    @property
    def extrapolated_pct(self) -> float:
        """Share of the crude whose TBP comes from the fitted extension, front and back. [vol %]"""
        return (100.0 - self.measured_hi) + self.measured_lo

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

    def temp_at_node(self, pct: float) -> float:
        """TBP [°C] at a percent [vol %] that is one of the curve's node values (a measured point, the light
        ends' 0 %): the first node with that value, which is what :meth:`temp_at` gives there (the left end of
        a flat step), found without the inverse's search (tested against it)."""
        y = self.spline.y
        k = int(np.searchsorted(y, pct, side="left"))
        if k >= y.size or y[k] != pct:
            raise ValueError(f"{pct!r} % is not a node of the curve")
        return float(self.spline.x[k])

    def mean_temp(self, pct_a, pct_b, ta=None, tb=None):
        """Volume-average TBP over [pct_a, pct_b] [vol %] (:func:`volume_average_temp`). [°C]"""
        return volume_average_temp(self.spline, pct_a, pct_b, ta, tb)

    def is_extrapolated(self, pct_a, pct_b):
        """True where [pct_a, pct_b] depends on the extension: it reaches outside :attr:`safe_lo` -
        :attr:`safe_hi` (the measured range less its end intervals when those are extended)."""
        return (np.asarray(pct_b) > self.safe_hi + 1e-9) | (np.asarray(pct_a) < self.safe_lo - 1e-9)


def volume_average_temp(spline: Pchip, pct_a, pct_b, ta=None, tb=None):
    """Volume-average TBP of a curve over [pct_a, pct_b] [vol %], by parts: ∫T dV = [T V] - ∫V dT. [°C]

    Where the interval has no width, the temperature at that point is returned.  ``spline`` is the curve V(T)
    (one curve, or curves as rows); ``ta``, ``tb``: the TBP at ``pct_a`` and ``pct_b`` [°C] when the caller
    has them already (else found here by the spline's inverse).
    """
    pct_a = np.asarray(pct_a, dtype=float)
    pct_b = np.asarray(pct_b, dtype=float)
    ta = spline.inverse(pct_a) if ta is None else ta
    tb = spline.inverse(pct_b) if tb is None else tb
    # the inverse returns the left end of flat steps; integrate V(T) over [ta, tb]
    area = tb * pct_b - ta * pct_a - spline.integral(ta, tb)
    width = pct_b - pct_a
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(width > 1e-12, area / np.where(width > 1e-12, width, 1.0), ta)


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


def build_curve(percent, temp_c, *, front_t=None, front_v=None) -> TbpCurve:
    """Build the TBP curve model from measured points (:func:`curve_rows` of one row).

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
    TbpCurve

    Raises
    ------
    CurveError
        Fewer than two points, temperatures falling as percent rises, or an extension that cannot be fitted.
    """
    v = np.asarray(percent, dtype=float)
    g = Rows([0]).put(v=v[None, :], t=np.asarray(temp_c, dtype=float)[None, :], cwarn=[[]], fit=[None])
    if front_t is not None and len(front_t):
        g.front_t = np.asarray(front_t, dtype=float)
        g.put(front_v=np.asarray(front_v, dtype=float)[None, :])
    done = curve_rows(g)
    if not done:
        raise g.errors[0]
    return tbp_curve_of(done[0], 0)


def curve_rows(g: Rows) -> list[Rows]:
    """The curve model of every row (the steps of the module docstring), row-wise.

    Row fields read: ``v``, ``t`` (R, n) the measured points [vol %], [°C]; ``cwarn`` (each row's curve warnings,
    appended to); ``fit`` (a RiaziFit to use for the extension instead of fitting, or None); ``front_v`` (R, 2m)
    with the shared ``front_t`` (2m,) when light ends are offered (:func:`staircase` nodes).

    Row fields set: the measured points ordered and widened (``mv``, ``mt``), ``placed`` (light ends placed),
    ``fit``, the nodes ``T``, ``V`` and the curve ``spline`` (rows of V(T)), and the :class:`TbpCurve` figures
    ``mlo``, ``mhi``, ``le_pct``, ``safe_lo``, ``safe_hi``, ``lumped``.  A row refused (fewer than two points,
    falling temperatures, an extension that cannot be fitted or joined) gets its CurveError.
    """
    g = _checked_points(g)
    if not g.n:
        return []
    _widen_repeats(g)
    out = []
    for s in _place_light_ends(g):
        out += s.split(np.stack([s.mv[:, -1] < 100.0, (s.mv[:, 0] > 0.0) & ~s.placed], axis=1))
    return each(out, _extend)


def tbp_curve_of(g: Rows, r: int) -> TbpCurve:
    """Row ``r`` of a set built by :func:`curve_rows` as a :class:`TbpCurve` (its own single spline)."""
    sp = g.spline
    return TbpCurve(Pchip(sp.X[r], sp.Y[r], sp.D[r], sp.C[r]), float(g.mlo[r]), float(g.mhi[r]), g.fit[r],
                    g.cwarn[r], float(g.le_pct[r]), float(g.mt[r, 0]), float(g.safe_lo[r]), float(g.safe_hi[r]),
                    float(g.lumped[r]), g.mv[r].copy(), g.mt[r].copy())


def _checked_points(g: Rows) -> Rows:
    """The points ordered by percent; rows refused when fewer than two, flat, or falling in temperature."""
    v, t = g.v, g.t
    if v.shape[1] < 2:
        return g.fail(np.ones(g.n, dtype=bool),
                      lambda r: CurveError(f"a distillation curve needs at least 2 points; got {v.shape[1]}"))
    order = np.argsort(v, axis=1, kind="stable")
    v, t = np.take_along_axis(v, order, axis=1), np.take_along_axis(t, order, axis=1)
    flat = (t[:, -1] - t[:, 0] < 1.0) | (v[:, -1] - v[:, 0] <= 0.0)
    falls = (t[:, 1:] - t[:, :-1]) < 0
    g.put(mv=v, mt=t)

    def error(r):
        if flat[r]:
            return CurveError(f"the curve runs from {pct_text(v[r, 0])} % at {t[r, 0]:.2f} °C to "
                              f"{pct_text(v[r, -1])} % at {t[r, -1]:.2f} °C; a "
                              f"distillation curve must rise by at least 1 °C and some percent")
        k = int(np.argmax(falls[r]))
        return CurveError(f"temperature falls from {t[r, k]:.2f} °C at {pct_text(v[r, k])} % to {t[r, k + 1]:.2f} °C "
                          f"at {pct_text(v[r, k + 1])} %; temperatures must rise with percent distilled")

    return g.fail(flat | falls.any(axis=1), error)


FLAT_TAIL_RATIO = 0.4
"""A curve's last interval rising by less than this share of the curve's typical slope (°C per %, the median of
its intervals before the last three) levels off (our choice)."""


def flat_tail_rows(g: Rows) -> list[Rows]:
    """The measured points ``p`` [%], ``t`` [°C] (R, n) of rows whose curve levels off at its end (cracking in the
    still, or the end of an atmospheric run: 335/341/342 °C at 55/60/65 %) without the flat points: removed one by
    one from the end while the last interval rises by less than :data:`FLAT_TAIL_RATIO` of the typical slope,
    keeping at least four points and any point at 100 %.  The extension then continues from the last point that
    rises as the curve does, and the points left out are named in a warning (``warn``).  The set comes back
    split where rows keep different numbers of points."""
    order = np.argsort(g.p, axis=1, kind="stable")
    v, t = np.take_along_axis(g.p, order, axis=1), np.take_along_axis(g.t, order, axis=1)
    n = v.shape[1]
    if n < 6:
        return [g]
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        slope = (t[:, 1:] - t[:, :-1]) / (v[:, 1:] - v[:, :-1])
        ref = np.median(slope[:, :-3], axis=1)
    keep = np.full(g.n, n)
    for r in range(g.n):
        if not np.isfinite(ref[r]) or ref[r] <= 0.0:
            continue
        while keep[r] > 4 and v[r, keep[r] - 1] < 100.0 and slope[r, keep[r] - 2] < FLAT_TAIL_RATIO * ref[r]:
            keep[r] -= 1
        if keep[r] < n:
            g.warn[r].append(
                f"the curve levels off at its end: {', '.join(f'{t[r, k]:.0f}' for k in range(keep[r] - 1, n))} °C at "
                f"{', '.join(pct_text(v[r, k]) for k in range(keep[r] - 1, n))} % (typical rise {ref[r]:.1f} °C per "
                f"%); cracking in the still or the end of the atmospheric run is likely, so the point(s) above "
                f"{pct_text(v[r, keep[r] - 1])} % are left out and the extension continues from there; a vacuum "
                f"distillation or a simulated distillation (ASTM D7169) would measure the heavy end")
    if (keep == n).all():
        return [g]
    out = []
    for k in np.unique(keep):
        sel = keep == k
        out.append(g.take(sel).put(p=v[sel, :k], t=t[sel, :k]))
    return out


def _widen_repeats(g: Rows) -> None:
    """Repeated temperatures at rising percent become vertical steps :data:`STEP_C` wide (with a warning)."""
    v, t = g.mv, g.mt
    rep = (t[:, 1:] - t[:, :-1]) == 0
    if not rep.any():
        return
    for r, k in zip(*np.nonzero(rep)):
        g.cwarn[r].append(f"the same temperature {t[r, k]:.2f} °C is given at {pct_text(v[r, k])} % and "
                          f"{pct_text(v[r, k + 1])} %; treated as a step {STEP_C} °C wide")
    g.mt = t + np.concatenate([np.zeros((g.n, 1)), np.cumsum(rep * STEP_C, axis=1)], axis=1)


def _place_light_ends(g: Rows) -> list[Rows]:
    """Light-ends staircase nodes placed in front of the first measured point where they fit (``placed``;
    ``front_v`` scaled to meet the point when they miss it by at most :data:`LIGHT_ENDS_TOL_PCT`), with a
    warning where they are not placed; the sets of rows placed and not."""
    v, t = g.mv, g.mt
    if "front_v" not in g.fields:
        return [g.put(placed=np.zeros(g.n, dtype=bool))]
    ft, fv = g.front_t, g.front_v
    v0, t0, last = v[:, 0], t[:, 0], fv[:, -1]
    at_zero = v0 == 0.0
    scale = ~at_zero & (np.abs(last - v0) <= LIGHT_ENDS_TOL_PCT) & (last != v0) & (ft[-1] < t0)
    off = ~at_zero & ~scale & ((last > v0 + 1e-9) | (ft[-1] >= t0))
    for r in np.flatnonzero(at_zero):
        g.cwarn[r].append("the curve starts at 0 %, so the light-ends analysis is not placed on it")
    for r in np.flatnonzero(scale):
        if abs(v0[r] / last[r] - 1.0) > 0.01:
            g.cwarn[r].append(f"the light ends add up to {pct_text(last[r])} vol %, the first measured point is "
                              f"{pct_text(v0[r])} %; the light-ends volumes are scaled by "
                              f"{(v0[r] / last[r] - 1) * 100:+.2f} % to meet it")
    for r in np.flatnonzero(off):
        g.cwarn[r].append(f"the light ends ({last[r]:.2f} vol % up to {ft[-1]:.1f} °C) do not fit before the "
                          f"first measured point ({pct_text(v0[r])} % at {t0[r]:.1f} °C); not placed on the curve, "
                          f"and the front of the curve is extrapolated")
    # scaled to meet the first point exactly (rounding must not leave a node above it)
    g.front_v = np.where(scale[:, None], np.minimum(fv * (v0 / last)[:, None], v0[:, None]), fv)
    g.put(placed=~(at_zero | off))
    return g.split(g.placed)


def _extend(g: Rows) -> list[Rows]:
    """The extensions, nodes and spline of a set of rows that all take the same branches (tail, front,
    light ends placed or not)."""
    v, t = g.mv, g.mt
    placed = bool(g.placed[0])
    need_tail = bool(v[0, -1] < 100.0)
    need_front = bool(v[0, 0] > 0.0 and not placed)
    g.put(mlo=np.where(placed | (v[:, 0] == 0.0), 0.0, v[:, 0]), mhi=v[:, -1].copy())
    if need_tail or need_front:
        todo = [r for r in range(g.n) if g.fit[r] is None]
        for r, f in zip(todo, fit_riazi_many([(v[r], t[r]) for r in todo])):
            g.fit[r] = f
        g = g.fail([not isinstance(f, RiaziFit) for f in g.fit], lambda r: g.fit[r])
        if not g.n:
            return []
        for r, f in enumerate(g.fit):
            if f.rms_c > POOR_FIT_RMS_C:
                g.cwarn[r].append(f"the distribution fitted for the curve's extension deviates from the measured "
                                  f"points by {f.rms_c:.1f} °C RMS (above {POOR_FIT_RMS_C:g} °C): extrapolated "
                                  f"values are uncertain")
        g.put(**{k: np.array([getattr(f, a) for f in g.fit])[:, None]
                 for k, a in (("t0_k", "t0_k"), ("fa", "a"), ("fb", "b"))})
    else:
        g.fit = [None] * g.n
    g.put(lumped=np.zeros(g.n))
    sets = _tail_extension(g) if need_tail else [g.put(tx=np.zeros((g.n, 0)), vx=np.zeros((g.n, 0)))]
    return each(sets, _join, placed, need_tail, need_front)


def _tail_extension(g: Rows) -> list[Rows]:
    """Nodes past the last measured point (``tx``, ``vx``): the fitted distribution shifted to meet it, up to
    its :data:`END_FRACTION` point, capped at :data:`END_CAP_C` (the residue above lumped at the cap; ``lumped``
    its share [vol %]); one set per pattern of nodes under the cap."""
    v, t = g.mv, g.mt
    x_last = v[:, -1:] / 100.0
    z = np.linspace(np.log(1 / (1 - x_last[:, 0])), np.log(1 / (1 - END_FRACTION)), 40, axis=1)[:, 1:]
    xs = 1.0 - np.exp(-z)
    off = t[:, -1:] - riazi_temp_c(g.t0_k, g.fa, g.fb, x_last)
    with np.errstate(over="ignore", invalid="ignore"):
        tx = riazi_temp_c(g.t0_k, g.fa, g.fb, xs) + off
    cap = np.maximum(END_CAP_C, t[:, -1] + END_CAP_STEP_C)
    g.put(xs=xs, tx=tx, cap=cap)
    out = []
    for s in g.split(np.isfinite(tx) & (tx < cap[:, None])):
        under = np.isfinite(s.tx[0]) & (s.tx[0] < s.cap[0])
        keep = np.flatnonzero(under)[:-1]
        last = s.cap[:, None] if not under.all() else s.tx[:, -1:]
        s.put(tx=np.concatenate([s.tx[:, keep], last], axis=1),
              vx=np.concatenate([100.0 * s.xs[:, keep], np.full((s.n, 1), 100.0)], axis=1))
        if not under.all():
            first_over = s.xs[:, int(np.argmin(under))]
            s.lumped = 100.0 - 100.0 * first_over
            for r in range(s.n):
                s.cwarn[r].append(f"the fitted extension passes {s.cap[r]:.0f} °C at {100.0 * first_over[r]:.1f} "
                                  f"vol %; the material above is lumped up to an end point of {s.cap[r]:.0f} °C")
        out.append(s)
    return out


def _join(g: Rows, placed: bool, need_tail: bool, need_front: bool) -> list[Rows]:
    """The front extension (before the first point, from 0 %, the fitted distribution shifted to meet it) when
    needed, the nodes in order and the spline; rows whose front falls below methane's boiling point or whose
    nodes do not rise are refused."""
    v, t = g.mv, g.mt
    tt, vv = [t, g.tx], [v, g.vx]
    if need_front:
        x_first = v[:, :1] / 100.0
        xs = np.linspace(0.0, x_first[:, 0], 12, axis=1)[:, :-1]
        ftx = riazi_temp_c(g.t0_k, g.fa, g.fb, xs) + t[:, :1] - riazi_temp_c(g.t0_k, g.fa, g.fb, x_first)
        tt.insert(0, ftx)
        vv.insert(0, 100.0 * xs)
        g.put(ftx=ftx)
    if placed:
        tt.insert(0, np.broadcast_to(g.front_t, (g.n, g.front_t.size)))
        vv.insert(0, g.front_v)
    T, V = np.concatenate(tt, axis=1), np.concatenate(vv, axis=1)
    g.put(T=T, V=V, le_pct=g.front_v[:, -1].copy() if placed else np.zeros(g.n))
    if need_front:
        g = g.fail(g.ftx[:, 0] < METHANE_NBP_C, lambda r: CurveError(
            f"the curve starts at {pct_text(g.mv[r, 0])} % and its fitted front reaches {g.ftx[r, 0]:.0f} °C, "
            f"below the boiling point of methane: give the initial boiling point (0 %) or a light-ends analysis"))
    g = g.fail(((g.T[:, 1:] - g.T[:, :-1]) <= 0).any(axis=1), lambda r: CurveError(
        "the curve's extension does not join the measured points monotonically; check the last points of the "
        "curve"))
    if g.n:
        v = g.mv
        d, front_free, tail_free = _measured_end_slopes(g.T, g.V, v.shape[1], g.tx.shape[1], need_front, need_tail)
        g.put(spline=Pchip(g.T, g.V, d), safe_lo=np.where(front_free, g.mlo, v[:, 1]) if need_front else g.mlo,
              safe_hi=np.where(tail_free, g.mhi, v[:, -2]) if need_tail else g.mhi)
    return [g]


def _measured_end_slopes(T, V, n_measured: int, n_tail: int, need_front: bool, need_tail: bool):
    """The curve's node slopes dV/dT [vol %/°C] with the slope at the first and last measured nodes, where an
    extension joins them, taken from the measured points alone (the end slope of the measured points' own
    PCHIP, :func:`~assaycut.methods.pchip.slopes_on`): the measured intervals then do not depend on the
    extension.  The slope is kept within 3x the secant of the extension's joining segment (the Fritsch &
    Carlson 1980 monotonicity bound); where that bound binds, the end interval does depend on the extension,
    and the returned flag for that end is False.

    Parameters
    ----------
    T, V : numpy.ndarray
        The curve's nodes, measured and extension, rows of equal length. [°C], [vol %]
    n_measured, n_tail : int
        Number of measured nodes, and of extension nodes after the last of them.
    need_front, need_tail : bool
        Whether an extension joins the first (last) measured point.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray, numpy.ndarray)
        Slopes (shape of T); per row, whether the first and the last measured interval are free of the
        extension.
    """
    d = slopes_on(T)(V)
    last = T.shape[1] - n_tail - 1
    first = last - n_measured + 1
    own = slopes_on(T[:, first:last + 1])(V[:, first:last + 1])
    free = {}
    for k, j, nb, on in ((first, 0, first - 1, need_front), (last, -1, last + 1, need_tail)):
        bound = 3.0 * (V[:, nb] - V[:, k]) / (T[:, nb] - T[:, k]) if on else np.inf
        free[j] = own[:, j] <= bound
        if on:
            d[:, k] = np.minimum(own[:, j], bound)
    return d, free[0], free[-1]


BAND_LAST_POINTS = (4, 5, 6)
"""Numbers of last measured points the extension is refitted on for its spread (with all points)."""


def extension_band(curve: TbpCurve, pct) -> tuple[np.ndarray, np.ndarray, list[np.ndarray]]:
    """The spread of the back extension: the Riazi distribution refitted on all measured points and on the last
    :data:`BAND_LAST_POINTS` of them, each joined to the last measured point as the model's own extension is,
    and capped at the end point.

    Parameters
    ----------
    curve : TbpCurve
    pct : array_like
        Percents at which to evaluate (above the measured end). [vol %]

    Returns
    -------
    (numpy.ndarray, numpy.ndarray, list of numpy.ndarray)
        Lower and upper edge of the band [°C], and each refit's TBP [°C] at ``pct``.  Empty refits (and a band
        equal to the curve) when the curve is not extended.
    """
    pct = np.asarray(pct, dtype=float)
    own = np.asarray(curve.temp_at(pct), float)
    v, t = curve.measured_pct, curve.measured_temp_c
    if curve.fit is None or v.size < 3 or v[-1] >= 100.0:
        return own, own, []
    refits = [r[0] for r in extension_refits([v], [t], pct[None, :]) if r is not None]
    allt = np.vstack(refits + [own])
    return allt.min(axis=0), allt.max(axis=0), refits


def extension_refits(vs, ts, pct, choices=(None,) + BAND_LAST_POINTS) -> list:
    """The back extension of many curves refitted on all their measured points and on the last
    :data:`BAND_LAST_POINTS` of them (the fits batched, :func:`~assaycut.methods.riazi_distribution.
    fit_riazi_many`), each joined to its curve's last measured point and capped at the end point.

    Parameters
    ----------
    vs, ts : sequence of numpy.ndarray
        Each curve's measured points (percent [vol %], TBP [°C]), ending below 100 %.
    pct : numpy.ndarray
        (R, m) percents at which to evaluate each curve (above its measured end). [vol %]
    choices : tuple
        The refits: None for all the points, n for the last n.

    Returns
    -------
    list of numpy.ndarray or None
        One entry per refit choice: (R, m) TBP [°C] (NaN for a curve that choice cannot refit), or None when
        no curve could be refitted that way.
    """
    x = np.clip(np.asarray(pct, dtype=float) / 100.0, 0.0, END_FRACTION)
    inside = [(v[(v > 0.0) & (v < 100.0)], t[(v > 0.0) & (v < 100.0)]) for v, t in zip(vs, ts)]
    out = []
    for n in choices:
        rows = [k for k, (vv, _) in enumerate(inside) if n is None or n < vv.size]
        fits = fit_riazi_many([inside[k] if n is None else (inside[k][0][-n:], inside[k][1][-n:]) for k in rows])
        temps = np.full(x.shape, np.nan)
        for k, fit in zip(rows, fits):
            if isinstance(fit, RiaziFit):
                v, t = vs[k], ts[k]
                cap = max(END_CAP_C, float(t[-1]) + END_CAP_STEP_C)
                with np.errstate(over="ignore", invalid="ignore"):
                    tx = fit.temp_c(x[k]) + (t[-1] - fit.temp_c(v[-1] / 100.0))
                temps[k] = np.minimum(np.nan_to_num(tx, nan=cap, posinf=cap), cap)
        out.append(temps if np.isfinite(temps).any() else None)
    return out
