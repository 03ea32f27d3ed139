"""Property distributions of the crude model: density against volume distilled, sulfur against weight
distilled, each a monotone spline through the narrow-cut measurements that reproduces each cut's mean.
"""

from __future__ import annotations

import numpy as np

from ..errors import CurveError
from ..methods.characterisation import sg_from_watson_k, watson_k_numerator
from .assay import Assay
from .lightends import GAS_RANGE_MAX_C, gas_range_sg
from ..methods.pchip import Pchip, hermite_combine, hermite_integral_basis, search_rows, segment_integrals, slopes_on
from .steps import Need, run_one
from .tbp_curve import CurveTempNeed, TbpCurve


def narrow_cut_positions(assay: Assay, curve: TbpCurve):
    """Start and end vol % of each narrow cut on the curve (open start 0 %, open end 100 %). [vol %]"""
    nc = assay.narrow_cuts
    ends = np.concatenate([nc.start_c, nc.end_c])
    open_end = np.isnan(ends)
    v = curve.pct_at(np.where(open_end, 0.0, ends))  # both ends in one call
    k = nc.start_c.size
    return np.where(open_end[:k], 0.0, v[:k]), np.where(open_end[k:], 100.0, v[k:])


def property_spline(lo, hi, values, fixed=(), iterations: int = 30, floor: float | None = 0.0) -> Pchip:
    """Monotone property curve through narrow-cut values placed at their mid percent, adjusted so that its
    average over each narrow cut reproduces the measured value.

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
    return run_one(property_spline_steps(lo, hi, values, fixed, iterations, floor))


def property_spline_steps(lo, hi, values, fixed=(), iterations: int = 30, floor: float | None = 0.0):
    """:func:`property_spline` as a step function (:mod:`assaycut.model.steps`): the node correction is a
    :class:`MeanMatchNeed`, so that many splines can be corrected in one array call.

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    lo, hi, vals = (np.asarray(z, dtype=float) for z in (lo, hi, values))
    mids = 0.5 * (lo + hi)
    fx = np.array([q[0] for q in fixed], dtype=float)
    fy = np.array([q[1] for q in fixed], dtype=float)
    x = np.concatenate([mids, fx])
    order = np.argsort(x, kind="stable")
    x = x[order]
    keep = np.concatenate([[True], (x[1:] - x[:-1]) > 1e-9])
    is_cut = (order < mids.size)[keep]
    x = x[keep]
    y0 = np.concatenate([vals, fy])[order][keep]
    if x.size == 1:
        return Pchip(np.array([0.0, 100.0]), np.array([y0[0], y0[0]]))
    cut_idx = order[keep][is_cut]
    tol = 1e-7 * max(float(np.max(np.abs(vals))), 1e-12)
    best, d, cum = yield MeanMatchNeed(x, y0, is_cut, lo[cut_idx], hi[cut_idx], vals[cut_idx], tol, iterations,
                                       floor)
    return Pchip(x, best, d, cum)


class MeanMatchNeed(Need):
    """The node correction of :func:`property_spline`: node values y (nodes x fixed) such that the PCHIP's mean
    over each cut [a, b] reproduces ``target`` (fixed-point iteration y_i <- y_i + (target_i - mean_i) on the
    cut nodes, at most ``iterations`` times, stopping below ``tol`` or when it no longer improves; the best
    node values found).  Many are solved in one array call by :meth:`together`."""

    __slots__ = ("x", "y0", "is_cut", "a", "b", "target", "tol", "iterations", "floor")

    def __init__(self, x, y0, is_cut, a, b, target, tol, iterations, floor):
        self.x, self.y0, self.is_cut, self.a, self.b, self.target = x, y0, is_cut, a, b, target
        self.tol, self.iterations, self.floor = tol, iterations, floor

    @classmethod
    def together(cls, needs):
        groups: dict[tuple, list[int]] = {}
        for k, n in enumerate(needs):
            key = (n.x.size, n.iterations, n.floor, n.is_cut.tobytes())
            groups.setdefault(key, []).append(k)
        out: list = [None] * len(needs)
        for idx in groups.values():
            for k, y in zip(idx, _mean_match_rows([needs[k] for k in idx])):
                out[k] = y
        return out


def _mean_match_rows(rows: list[MeanMatchNeed]) -> list[np.ndarray]:
    """The node correction of many problems with the same node count, cut pattern, iteration limit and floor,
    row-wise: (best node values, their PCHIP slopes, their cumulative segment integrals) of each, every row
    stopping where it would alone (:func:`mean_match_arrays`)."""
    first = rows[0]
    if first.iterations < 1:  # no iteration at all: the start values
        out = []
        for r in rows:
            d = slopes_on(r.x)(r.y0)
            out.append((r.y0.copy(), d, _cumulative(r.x, r.y0, d)))
        return out
    best, best_d, best_cum = mean_match_arrays(*(np.array([getattr(r, a) for r in rows])
                                                  for a in ("x", "y0", "is_cut", "a", "b", "target", "tol")),
                                                first.iterations, first.floor)
    return [(best[r], best_d[r], best_cum[r]) for r in range(len(rows))]


def mean_match_arrays(x, y, is_cut, a, b, target, tol, iterations: int, floor):
    """The node correction of :class:`MeanMatchNeed` row-wise (iterations >= 1): nodes x and start values y
    (R, n), the cut nodes ``is_cut`` (n,) or (R, n) with every row alike, intervals a, b and their ``target``
    means (R, k), tolerances ``tol`` (R,); the best node values, their slopes and cumulative integrals, (R, n)
    each, every row as it would be alone."""
    is_cut = np.asarray(is_cut, dtype=bool)
    if is_cut.ndim == 2:
        is_cut = is_cut[0]
    y = np.array(y, dtype=float)
    means = _interval_means_rows(x, a, b)
    best = y.copy()
    best_d = np.zeros_like(y)
    best_cum = np.zeros_like(y)
    best_err = np.full(y.shape[0], np.inf)
    active = np.ones(y.shape[0], dtype=bool)
    for _ in range(iterations):
        m, d, cum = means(y)
        err = target - m
        worst = np.max(np.abs(err), axis=1) if err.shape[1] else np.zeros(y.shape[0])
        active &= ~(worst >= 0.95 * best_err)  # no longer improving: keeps its best
        keep = active[:, None]
        np.copyto(best, y, where=keep)
        np.copyto(best_d, d, where=keep)
        np.copyto(best_cum, cum, where=keep)
        best_err = np.where(active, worst, best_err)
        active &= ~(worst < tol)
        if not active.any():
            break
        moved = y[:, is_cut] + err if floor is None else np.maximum(y[:, is_cut] + err, floor)
        y[:, is_cut] = np.where(active[:, None], moved, y[:, is_cut])
    return best, best_d, best_cum


def _cumulative(x, y, d):
    """Cumulative segment integrals of the PCHIP (x, y, d), from 0 at x[0]."""
    return np.concatenate([[0.0], np.cumsum(segment_integrals(x[1:] - x[:-1], y, d))])



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

_GAS_NOTE = ("; no light-ends analysis: the curve below n-pentane's boiling point (36.1 °C) is given the SG of the "
             "C2-C5 paraffins boiling at the same temperature (assumed)")


def density_distribution(assay: Assay, curve: TbpCurve, le_mids, warnings: list[str]):
    """SG against vol % distilled, reconciled to the whole-crude SG.

    From the narrow-cut densities (:func:`property_spline` against mid-volume %, light-ends components
    held at their own SG) where at least two cuts have one; else at constant Watson K fitted to the
    whole-crude gravity, SG = (1.8 T_b[K])^(1/3)/Kw along the curve (Watson & Nelson 1933; common
    practice, no single source), light ends at their own SG.  Without a light-ends analysis the part of the
    curve boiling below n-pentane takes the SG of the paraffins of the same boiling point
    (:func:`~assaycut.model.lightends.gas_range_sg`, assumed) where no narrow cut covers it.  Either way the
    distribution is scaled so that the whole crude integrates to its SG.

    Parameters
    ----------
    assay : Assay
    curve : TbpCurve
    le_mids : list of (mid vol % [%], SG [-])
        Light-ends components placed on the curve.
    warnings : list of str
        Appended to.

    Returns
    -------
    (Pchip, float, str, float or None)
        SG [-] against vol % [%]; the scale applied, (factor - 1) x 100 [%]; the source described; the fitted
        Watson K [-] (None with narrow-cut densities).
    """
    return run_one(density_distribution_steps(assay, curve, le_mids, warnings))


def density_distribution_steps(assay: Assay, curve: TbpCurve, le_mids, warnings: list[str], positions=None):
    """:func:`density_distribution` as a step function (:mod:`assaycut.model.steps`); ``positions`` as for
    :func:`sulfur_distribution_steps`.

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    nc = assay.narrow_cuts
    gas_v = np.array([])
    if not le_mids and curve.ibp_c < GAS_RANGE_MAX_C:  # the IBP is the TBP at 0 %
        v_top = float(curve.pct_at(GAS_RANGE_MAX_C))
        gas_v = np.linspace(0.0, v_top, 9)[:-1] + v_top / 16.0
    if nc is not None and np.isfinite(nc.sg).sum() >= 2:
        va, vb = narrow_cut_positions(assay, curve) if positions is None else positions
        ok = np.isfinite(nc.sg) & (vb > va)
        first = float(va[ok].min()) if ok.any() else 0.0
        gas = []
        if gas_v.size:
            t_gas = yield CurveTempNeed(curve, gas_v)
            gas = [(float(m), float(g)) for m, g in zip(gas_v, gas_range_sg(t_gas)) if m < first]
        raw = yield from property_spline_steps(va[ok], vb[ok], nc.sg[ok],
                                               [(m, g) for m, g in le_mids if m < first] + gas)
        source = "narrow-cut densities (monotone spline against mid-volume %, matching each cut's mean)"
        if gas:
            source += _GAS_NOTE
        kw = None
    else:
        if nc is not None:
            warnings.append("fewer than 2 narrow cuts have a density: cut densities are estimated at constant "
                            "Watson K fitted to the whole-crude gravity")
        grid = np.linspace(0.0, 100.0, 201)
        mids = 0.5 * (grid[1:] + grid[:-1])
        t_mids = yield CurveTempNeed(curve, mids)
        cbrt = watson_k_numerator(t_mids)
        fixed = mids < curve.light_ends_pct
        le_sg = np.full_like(mids, np.nan)
        if le_mids:
            lm = np.array([m for m, _ in le_mids])
            lg = np.array([g for _, g in le_mids])
            le_sg = lg[np.clip(np.searchsorted(lm, mids), 0, lm.size - 1)]
        elif gas_v.size:
            le_sg = gas_range_sg(t_mids)
            fixed = np.isfinite(le_sg)
        dv = 0.5
        fixed_mass = float((le_sg[fixed] * dv).sum()) if fixed.any() else 0.0
        if gas_v.size and (fixed.all() or fixed_mass >= 100.0 * assay.sg):
            # a curve (nearly) all in the gas range: the paraffin assumption cannot meet the crude gravity
            fixed[:] = False
            fixed_mass = 0.0
            gas_v = np.array([])
        if fixed.all() or fixed_mass >= 100.0 * assay.sg:
            raise CurveError("the light ends weigh as much as the whole crude's gravity allows; check the "
                             "light-ends analysis against the crude gravity")
        kw = float((cbrt[~fixed] * dv).sum() / (100.0 * assay.sg - fixed_mass))
        raw = Pchip(mids, np.where(fixed, le_sg, sg_from_watson_k(t_mids, kw)))
        source = f"constant Watson K {kw:.2f} fitted to the whole-crude gravity (no narrow-cut densities)"
        if gas_v.size:
            source += _GAS_NOTE
    if source.endswith(_GAS_NOTE):
        warnings.append("no light-ends analysis: the gravity of the crude boiling below 36.1 °C (n-pentane) is "
                        "assumed from the C2-C5 paraffins boiling at the same temperature; give a light-ends "
                        "analysis for measured values")
    factor = 100.0 * assay.sg / raw.integral(0.0, 100.0)
    return raw.scaled(factor), (factor - 1.0) * 100.0, source, kw


def sulfur_distribution(model, assay: Assay, le_mids) -> None:
    """Sulfur against wt % distilled, set on ``model`` (its sulfur_dist, sulfur_wt_pct, reconciliation,
    methods and warnings).

    A :func:`property_spline` of narrow-cut sulfur against mid-weight % (light ends carry none), scaled to
    reproduce the whole-crude sulfur; without it the narrow cuts give the whole-crude figure.  Fewer than two
    narrow-cut sulfur values leave cut sulfur empty, with a warning.

    Parameters
    ----------
    model : CrudeModel
        Its curve and density distribution are used; its sulfur fields are set.
    assay : Assay
    le_mids : list of (mid vol % [%], SG [-])
        Light-ends components placed on the curve.
    """
    run_one(sulfur_distribution_steps(model, assay, le_mids))


def sulfur_distribution_steps(model, assay: Assay, le_mids, positions=None):
    """:func:`sulfur_distribution` as a step function (:mod:`assaycut.model.steps`); ``positions``: the narrow
    cuts' (start, end) vol % on the model's curve when the caller has them (:func:`narrow_cut_positions`).

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    nc = assay.narrow_cuts
    if nc is None or np.isfinite(nc.sulfur_wt_pct).sum() < 2:
        model.warnings.append("no narrow-cut sulfur (fewer than 2 values): cut sulfur is left empty")
        model.methods["sulfur"] = "not estimated (no narrow-cut sulfur)"
        return
    va, vb = narrow_cut_positions(assay, model.curve) if positions is None else positions
    k = va.size
    w = model.wt_at_vol(np.concatenate([va, vb, np.array([m for m, _ in le_mids], dtype=float)]))  # one call
    wa, wb = w[:k], w[k:2 * k]
    ok = np.isfinite(nc.sulfur_wt_pct) & (wb > wa)
    first = float(wa[ok].min())
    le_w = w[2 * k:].tolist()
    fixed = [(w, 0.0) for w in le_w if w < first]
    raw = yield from property_spline_steps(wa[ok], wb[ok], nc.sulfur_wt_pct[ok], fixed)
    total = raw.integral(0.0, 100.0) / 100.0
    if model.sulfur_wt_pct is None:
        model.sulfur_wt_pct = float(total)
        model.sulfur_reconciliation_pct = 0.0
        model.warnings.append(f"no whole-crude sulfur given: {total:.3f} wt % is taken from the narrow cuts")
        model.sulfur_dist = raw
    else:
        factor = model.sulfur_wt_pct / total if total > 0 else 1.0
        model.sulfur_dist = raw.scaled(factor)
        model.sulfur_reconciliation_pct = (factor - 1.0) * 100.0
    model.methods["sulfur"] = (f"narrow-cut sulfur (monotone spline against mid-weight %, matching each cut's "
                               f"mean); scaled by {model.sulfur_reconciliation_pct:+.2f} % to reproduce the "
                               f"whole-crude sulfur {model.sulfur_wt_pct:.3f} wt %")
