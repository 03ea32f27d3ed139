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
from ..methods.riazi_distribution import RiaziFit, fit_riazi_distribution, fit_riazi_many
from ..units import pct_text
from ..methods.pchip import Pchip
from .steps import Need, run_one

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
    """The vol % range where the curve does not depend on its extensions: the PCHIP's slope at the last
    (first) measured node comes from the extension, so the last (first) measured interval depends on it as
    well as the extension itself. [vol %]"""
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
        return volume_average_temp(self, pct_a, pct_b, ta, tb)

    def is_extrapolated(self, pct_a, pct_b):
        """True where [pct_a, pct_b] depends on the extension: it reaches outside :attr:`safe_lo` -
        :attr:`safe_hi` (the measured range less its end intervals when those are extended)."""
        return (np.asarray(pct_b) > self.safe_hi + 1e-9) | (np.asarray(pct_a) < self.safe_lo - 1e-9)


def volume_average_temp(curve, pct_a, pct_b, ta=None, tb=None):
    """Volume-average TBP of a curve over [pct_a, pct_b] [vol %], by parts: ∫T dV = [T V] - ∫V dT. [°C]

    Where the interval has no width, the temperature at that point is returned.  ``ta``, ``tb``: the TBP at
    ``pct_a`` and ``pct_b`` [°C] when the caller has them already (else found here).  ``curve`` is anything with
    ``temp_at`` and a ``spline`` V(T) (one curve, or curves as rows).
    """
    pct_a = np.asarray(pct_a, dtype=float)
    pct_b = np.asarray(pct_b, dtype=float)
    ta = curve.temp_at(pct_a) if ta is None else ta
    tb = curve.temp_at(pct_b) if tb is None else tb
    # the inverse returns the left end of flat steps; integrate V(T) over [ta, tb]
    area = tb * pct_b - ta * pct_a - curve.spline.integral(ta, tb)
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
    """Build the TBP curve model from measured points.

    Steps: order and check the points (:func:`_checked_points`), widen repeated temperatures into steps,
    place the light ends in front (:func:`_place_light_ends`), fit the Riazi distribution where the curve
    needs an extension, and join the extensions at the back (:func:`_tail_extension`) and front
    (:func:`_front_extension`).

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
    return run_one(build_curve_steps(percent, temp_c, front_t=front_t, front_v=front_v))


class RiaziNeed(Need):
    """The Riazi distribution fitted to a curve's measured points (:func:`fit_riazi_distribution`); many at
    once by :func:`~assaycut.methods.riazi_distribution.fit_riazi_many`."""

    __slots__ = ("percent", "temp_c")

    def __init__(self, percent, temp_c):
        self.percent, self.temp_c = percent, temp_c

    @classmethod
    def together(cls, needs):
        return fit_riazi_many([(n.percent, n.temp_c) for n in needs])


class CurveTempNeed(Need):
    """TBP [°C] of a curve at percents [vol %] (:meth:`TbpCurve.temp_at`); for many curves at once
    :meth:`together` inverts the curves with the same node count and number of percents row-wise
    (:meth:`~assaycut.methods.pchip.Pchip.inverse` of their stack: the same values to the last bit)."""

    __slots__ = ("curve", "pct")

    def __init__(self, curve: "TbpCurve", pct):
        self.curve, self.pct = curve, np.asarray(pct, dtype=float)

    @classmethod
    def together(cls, needs):
        out: list = [None] * len(needs)
        groups: dict[tuple, list[int]] = {}
        for k, n in enumerate(needs):
            groups.setdefault((n.curve.spline.x.size, n.pct.shape), []).append(k)
        for idx in groups.values():
            if len(idx) == 1:  # one curve: its own spline
                out[idx[0]] = needs[idx[0]].curve.temp_at(needs[idx[0]].pct)
                continue
            res = Pchip.stack([needs[k].curve.spline for k in idx]).inverse(
                np.array([needs[k].pct.ravel() for k in idx]))
            for r, k in enumerate(idx):
                out[k] = res[r].reshape(needs[k].pct.shape)
        return out


def build_curve_steps(percent, temp_c, *, front_t=None, front_v=None, fit: RiaziFit | None = None):
    """:func:`build_curve` as a step function (:mod:`assaycut.model.steps`): the extension's fit is a
    :class:`RiaziNeed`, unless ``fit`` gives the one to use."""
    given_fit = fit
    warnings: list[str] = []
    v, t = _checked_points(percent, temp_c)
    t = _widen_repeats(v, t, warnings)
    measured_lo, measured_hi = float(v[0]), float(v[-1])
    le_t, le_v = _place_light_ends(v, t, front_t, front_v, warnings)
    placed = le_t is not None
    fit = None
    need_tail = v[-1] < 100.0
    need_front = v[0] > 0.0 and not placed
    if need_tail or need_front:
        fit = given_fit if given_fit is not None else (yield RiaziNeed(v, t))
        if fit.rms_c > POOR_FIT_RMS_C:
            warnings.append(f"the distribution fitted for the curve's extension deviates from the measured "
                            f"points by {fit.rms_c:.1f} °C RMS (above {POOR_FIT_RMS_C:g} °C): extrapolated "
                            f"values are uncertain")
    tt, vv = [t], [v]
    lumped = 0.0
    if need_tail:
        tx, vx, lumped = _tail_extension(v, t, fit, warnings)
        tt.append(tx)
        vv.append(vx)
    if need_front:
        tx, vx = _front_extension(v, t, fit)
        if tx[0] < METHANE_NBP_C:
            raise CurveError(f"the curve starts at {pct_text(v[0])} % and its fitted front reaches {tx[0]:.0f} °C, "
                             f"below "
                             f"the boiling point of methane: give the initial boiling point (0 %) or a light-ends "
                             f"analysis")
        tt.insert(0, tx)
        vv.insert(0, vx)
    if placed:
        tt.insert(0, le_t)
        vv.insert(0, le_v)
    if placed or v[0] == 0.0:
        measured_lo = 0.0
    le_pct = float(le_v[-1]) if placed else 0.0
    T = np.concatenate(tt)
    V = np.concatenate(vv)
    if ((T[1:] - T[:-1]) <= 0).any():  # np.diff's arithmetic without its call
        raise CurveError("the curve's extension does not join the measured points monotonically; "
                         "check the last points of the curve")
    safe_lo = float(v[1]) if need_front else measured_lo
    safe_hi = float(v[-2]) if need_tail else measured_hi
    return TbpCurve(Pchip(T, V), measured_lo, measured_hi, fit, warnings, le_pct, float(t[0]), safe_lo, safe_hi,
                    lumped, v.copy(), t.copy())


def _checked_points(percent, temp_c) -> tuple[np.ndarray, np.ndarray]:
    """The points ordered by percent, refused when fewer than two, flat, or falling in temperature.

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    v = np.asarray(percent, dtype=float)
    t = np.asarray(temp_c, dtype=float)
    if v.size < 2:
        raise CurveError(f"a distillation curve needs at least 2 points; got {v.size}")
    order = np.argsort(v, kind="stable")
    v, t = v[order], t[order]
    if t[-1] - t[0] < 1.0 or v[-1] - v[0] <= 0.0:
        raise CurveError(f"the curve runs from {pct_text(v[0])} % at {t[0]:.2f} °C to {pct_text(v[-1])} % at "
                         f"{t[-1]:.2f} °C; a "
                         f"distillation curve must rise by at least 1 °C and some percent")
    if ((t[1:] - t[:-1]) < 0).any():
        k = int(np.argmax((t[1:] - t[:-1]) < 0))
        raise CurveError(f"temperature falls from {t[k]:.2f} °C at {pct_text(v[k])} % to {t[k + 1]:.2f} °C at "
                         f"{pct_text(v[k + 1])} %; temperatures must rise with percent distilled")
    return v, t


def _widen_repeats(v: np.ndarray, t: np.ndarray, warnings: list[str]) -> np.ndarray:
    """Repeated temperatures at rising percent become vertical steps :data:`STEP_C` wide.

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    rep = (t[1:] - t[:-1]) == 0
    if not rep.any():
        return t
    for k in np.nonzero(rep)[0]:
        warnings.append(f"the same temperature {t[k]:.2f} °C is given at {pct_text(v[k])} % and "
                        f"{pct_text(v[k + 1])} %; "
                        f"treated as a step {STEP_C} °C wide")
    return t + np.concatenate([[0.0], np.cumsum(rep * STEP_C)])


def _place_light_ends(v, t, front_t, front_v, warnings: list[str]):
    """Light-ends staircase nodes (T, V) placed in front of the first measured point, or (None, None) when
    there are none or they do not fit there (with a warning).

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    if front_t is None or len(front_t) == 0:
        return None, None
    ft, fv = np.asarray(front_t, float), np.asarray(front_v, float)
    if v[0] == 0.0:
        warnings.append("the curve starts at 0 %, so the light-ends analysis is not placed on it")
        return None, None
    if abs(fv[-1] - v[0]) <= LIGHT_ENDS_TOL_PCT and fv[-1] != v[0] and ft[-1] < t[0]:
        if abs(v[0] / fv[-1] - 1.0) > 0.01:
            warnings.append(f"the light ends add up to {fv[-1]:.3f} vol %, the first measured point is "
                            f"{pct_text(v[0])} %; the light-ends volumes are scaled by "
                            f"{(v[0] / fv[-1] - 1) * 100:+.2f} % to meet it")
        # scaled to meet the first point exactly (rounding must not leave a node above it)
        return ft, np.minimum(fv * (v[0] / fv[-1]), v[0])
    if fv[-1] > v[0] + 1e-9 or ft[-1] >= t[0]:
        warnings.append(f"the light ends ({fv[-1]:.2f} vol % up to {ft[-1]:.1f} °C) do not fit before the "
                        f"first measured point ({pct_text(v[0])} % at {t[0]:.1f} °C); not placed on the curve, and "
                        f"the front of the curve is extrapolated")
        return None, None
    return ft, fv


def _tail_extension(v, t, fit: RiaziFit, warnings: list[str]):
    """Nodes (T, V) past the last measured point: the fitted distribution shifted to meet it, up to its
    :data:`END_FRACTION` point, capped at :data:`END_CAP_C` (the residue above is lumped at the cap), and the
    lumped share [vol %].

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    x_last = v[-1] / 100.0
    z = np.linspace(np.log(1 / (1 - x_last)), np.log(1 / (1 - END_FRACTION)), 40)[1:]
    xs = 1.0 - np.exp(-z)
    off = t[-1] - fit.temp_c(x_last)
    with np.errstate(over="ignore", invalid="ignore"):
        tx = fit.temp_c(xs) + off
    vx = 100.0 * xs
    cap = max(END_CAP_C, t[-1] + END_CAP_STEP_C)
    under = np.isfinite(tx) & (tx < cap)
    tx = np.concatenate([tx[under][:-1], [cap if not under.all() else tx[-1]]])
    vx = np.concatenate([vx[under][:-1], [100.0]])
    lumped = 0.0
    if not under.all():
        lumped = 100.0 - 100.0 * float(xs[~under][0])
        warnings.append(f"the fitted extension passes {cap:.0f} °C at {100.0 * xs[~under][0]:.1f} vol %; the "
                        f"material above is lumped up to an end point of {cap:.0f} °C")
    return tx, vx, lumped


def _front_extension(v, t, fit: RiaziFit):
    """Nodes (T, V) before the first measured point, from 0 %: the fitted distribution shifted to meet it.

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    x_first = v[0] / 100.0
    xs = np.linspace(0.0, x_first, 12)[:-1]
    return fit.temp_c(xs) + t[0] - fit.temp_c(x_first), 100.0 * xs


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
    x = np.clip(np.asarray(pct, dtype=float) / 100.0, 0.0, END_FRACTION)
    own = np.asarray(curve.temp_at(np.asarray(pct, dtype=float)), float)
    v, t = curve.measured_pct, curve.measured_temp_c
    if curve.fit is None or v.size < 3 or v[-1] >= 100.0:
        return own, own, []
    cap = max(END_CAP_C, float(t[-1]) + END_CAP_STEP_C)
    refits = []
    inside = (v > 0.0) & (v < 100.0)
    for n in (None,) + BAND_LAST_POINTS:
        vv, tt = v[inside], t[inside]
        if n is not None:
            if n >= vv.size:
                continue
            vv, tt = vv[-n:], tt[-n:]
        try:
            fit = fit_riazi_distribution(vv, tt)
        except CurveError:
            continue
        with np.errstate(over="ignore", invalid="ignore"):
            tx = fit.temp_c(x) + (t[-1] - fit.temp_c(v[-1] / 100.0))
        refits.append(np.minimum(np.nan_to_num(tx, nan=cap, posinf=cap), cap))
    allt = np.vstack(refits + [own])
    return allt.min(axis=0), allt.max(axis=0), refits
