"""The column as it runs: effective cut points and overlaps fitted to a plant test run.

A plant's column does not cut at its nominal points: side draws are set by rate, and each boundary has a
fractionation of its own.  From one test run (each product's draw rate, and optionally its laboratory
distillation and SG) this module fits, for every boundary between two neighbouring products, the effective
TBP cut point and the split width of the real-column product model (:mod:`assaycut.cutting.real_column`: the
material boiling at TBP T goes to the lighter product with the fraction Φ((T_c − T)/σ)).  The split width is
reported as the products' TBP 5-95 overlap, the trade's measure that ``--overlap`` and a cut set's
``overlap_c`` take, so the fitted column cuts the next crude through ``yields --cuts``.

The fit is weighted least squares (scipy ``least_squares``, trust-region reflective with bounds):

.. math:: \\min_{T, s} \\sum_i \\left(\\frac{\\hat y_i(T, s) - y_i}{\\sigma_i}\\right)^2

over the rates, the distillation points (each converted to TBP by the published conversion of
:func:`assaycut.methods.distillation.convert`) and the SGs, with the standard deviations of
:data:`SIGMAS` (common practice, no source: what a test run's meters and a laboratory's repeatability
usually allow).  The uncertainty of each fitted value is from the fit's Jacobian J of the weighted residuals,
cov = (JᵀJ)⁻¹, taking the stated σ as true (not rescaled by the residuals); an overlap's by the delta method.
A boundary with no distillation on either side cannot show its fractionation: its split is held ideal (an
ideal TBP cut, :data:`UNDETERMINED_OVERLAP`) and a warning says so.

The answer describes one test run of one column at its rates, feed and operation that day.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import StudyError
from ..cutting.cutset import Cut, CutSet
from ..cutting.real_column import boundary_overlap, crude_slices, product_cum_pct, split_fractions
from ..model.crude import CrudeModel
from ..units import barrel_mass_t

RATE_KEYS = {"vol_pct": "vol", "bbl_per_day": "vol", "wt_pct": "wt", "t_per_day": "wt"}
"""How a product's draw rate may be given, and its basis."""
DISTILLATIONS = ("tbp", "d86", "d2887")
"""The laboratory distillations a product may carry."""
SIGMAS = {"rate_pct": 0.3, "tbp_c": 2.0, "converted_c": 4.0, "sg": 0.002}
"""Standard deviations that weight the fit: a draw rate [% of crude], a TBP point [°C], a point converted to
TBP from D86 or D2887 [°C] (the conversion's own scatter added), a product SG [-].  Common practice, no
source."""
CLOSURE_TOL_PCT = 2.0
"""Products must add up to 100 % of the crude within this (a test run's balance); inside it, the rates are
scaled pro rata to close. [% of crude]"""
UNDETERMINED_OVERLAP = "ideal"
"""A boundary with no distillation on either side is held as an ideal TBP cut (split width 0)."""
WIDTH_MAX_C = 400.0
"""Largest split width searched (the TBP span from 95 % to 5 % into the lighter product). [°C]"""
IDEAL_SPLIT_C = 0.5
"""A fitted split narrower than this (the TBP span from 95 % to 5 % into the lighter product) is taken as an
ideal cut in the calibrated cut set, without an overlap. [°C]"""
FIT_POINTS = (1.0, 99.0)
"""Distillation points outside this range (IBP, FBP) are not fitted: a product's tails have no true end. [%]"""


@dataclass
class PlantProduct:
    """One product of a test run, as the plant file gives it.

    ``rate_key`` is one of :data:`RATE_KEYS` with its value ``rate``; ``method`` one of :data:`DISTILLATIONS`
    (or None) with ``points`` {percent [%]: temperature [°C]}; ``sg`` the product's SG 60/60 °F (or None).
    """

    name: str
    rate_key: str
    rate: float
    method: str | None = None
    points: dict[float, float] = field(default_factory=dict)
    sg: float | None = None


@dataclass
class PlantRun:
    """A test run: the products in column order (lightest first), the crude rate [bbl/d] when rates are per
    day, and the file it came from (for messages)."""

    products: list[PlantProduct]
    crude_bbl_per_day: float | None = None
    label: str = "plant file"


@dataclass
class Calibration:
    """The fitted column: its products in column order; per boundary (named after the lighter product, whose end it is) ``name``, ``end_c``,
    ``end_c_sd``, ``overlap_c``, ``overlap_c_sd`` (None where not fitted), ``fitted`` ('cut point and
    overlap' or 'cut point'); every residual (``product``, ``what``, ``measured``, ``fitted``, ``sigma``);
    warnings; the basis of the rates ('vol' or 'wt'); the fit's weighted sum of squares and its degrees of
    freedom."""

    products: list[str]
    cut_points: list[dict]
    residuals: list[dict]
    warnings: list[str]
    basis: str
    chi_square: float
    dof: int


def _rates_pct(run: PlantRun, model: CrudeModel) -> tuple[np.ndarray, str, list[str]]:
    """Each product's rate as % of the crude on one basis, closed to 100 %; the basis and warnings."""
    bases = {RATE_KEYS[p.rate_key] for p in run.products}
    if len(bases) > 1:
        raise StudyError(f"{run.label}: give every product's rate on one basis (vol_pct or bbl_per_day; or wt_pct "
                         f"or t_per_day); found both")
    basis = bases.pop()
    per_day = [p for p in run.products if p.rate_key in ("bbl_per_day", "t_per_day")]
    if per_day and not run.crude_bbl_per_day:
        raise StudyError(f"{run.label}: product {per_day[0].name!r} gives a rate per day; add crude_bbl_per_day")
    crude_t_per_day = (run.crude_bbl_per_day or 0.0) * float(barrel_mass_t(model.sg))
    rates = []
    for p in run.products:
        if p.rate_key == "bbl_per_day":
            rates.append(100.0 * p.rate / run.crude_bbl_per_day)
        elif p.rate_key == "t_per_day":
            rates.append(100.0 * p.rate / crude_t_per_day)
        else:
            rates.append(p.rate)
    rates = np.array(rates, dtype=float)
    total = float(rates.sum())
    if abs(total - 100.0) > CLOSURE_TOL_PCT:
        raise StudyError(f"{run.label}: the products add up to {total:.2f} {basis} % of the crude; a test run must "
                         f"close to 100 % within {CLOSURE_TOL_PCT:g} %")
    warnings = []
    if abs(total - 100.0) > 1e-9:
        warnings.append(f"the products add up to {total:.2f} {basis} % of the crude; each rate was scaled by "
                        f"{100.0 / total:.4f} to close the balance before the fit")
    return rates * 100.0 / total, basis, warnings


def _measured_tbp(p: PlantProduct) -> tuple[dict[float, float], float, str]:
    """A product's distillation as TBP points to fit {percent: °C}, their σ [°C] and how they were obtained."""
    from ..methods.distillation import convert

    if p.method is None or not p.points:
        return {}, math.nan, ""
    if p.method == "tbp":
        pts, how, sd = dict(p.points), "TBP", SIGMAS["tbp_c"]
    else:
        out, used, _ = convert(p.points, p.method.upper(), "TBP")
        pts = {k: v for k, v in out.items() if k in p.points}
        how, sd = f"TBP from {p.method.upper()} ({used})", SIGMAS["converted_c"]
    return {k: v for k, v in sorted(pts.items()) if FIT_POINTS[0] <= k <= FIT_POINTS[1]}, sd, how


class _Column:
    """The product model of a test run: products, rates, SGs and TBP points at given cut points and widths."""

    def __init__(self, model: CrudeModel, n: int):
        self.model, self.n = model, n

    def products(self, ends, widths):
        sl = crude_slices(self.model, ends)
        f = split_fractions(sl["t_mean"], ends, widths)
        vol = f.T @ sl["dv"]
        mass = f.T @ sl["mass"]
        with np.errstate(invalid="ignore", divide="ignore"):
            sg = mass / vol
        return {"vol": vol, "wt": mass / self.model.sg, "sg": sg, "cum": product_cum_pct(f, sl["dv"]),
                "t_edges": sl["t_edges"]}

    @staticmethod
    def tbp(prod, j: int, pcts) -> np.ndarray:
        return np.interp(np.asarray(pcts, float), prod["cum"][:, j], prod["t_edges"])

    def overlap(self, ends, widths, b: int) -> float:
        return float(boundary_overlap(crude_slices(self.model, ends), ends, widths, b))


def calibrate(model: CrudeModel, run: PlantRun, start_ends_c=None) -> Calibration:
    """Fit each boundary's effective TBP cut point and TBP 5-95 overlap to a plant test run.

    Parameters
    ----------
    model : CrudeModel
        The crude charged during the test run.
    run : PlantRun
        The products in column order with their rates, and optionally distillations and SGs.
    start_ends_c : sequence of float, optional
        Cut points to start from (a cut set's); default: the TBP at each product's cumulative rate (the
        ideal cut that gives the measured yields). [°C]

    Returns
    -------
    Calibration

    Notes
    -----
    Parameters: per boundary b, the cut point T_b (bounded halfway to its neighbours' starting values, so
    the cut points stay in order) and the split width s_b in [0, :data:`WIDTH_MAX_C`] (fitted only where
    product b or b+1 has a distillation).  Residuals: each rate [% of crude on the rates' basis], each
    distillation point as TBP at its percent of the product's own curve, each SG, divided by :data:`SIGMAS`.
    The products of the fitted column are those of ``yields --cuts`` with the written cut set (the same
    model), to the overlap solver's tolerance (0.05 °C).
    """
    from scipy.optimize import least_squares

    prods = run.products
    n = len(prods)
    if n < 2:
        raise StudyError(f"{run.label}: a test run needs at least two products to place a cut point between them")
    rates, basis, warnings = _rates_pct(run, model)
    curve = model.curve
    cum = np.cumsum(rates)[:-1]
    if basis == "wt":
        cum = np.array([float(model.vol_at_wt(w)) for w in cum])
    ideal = np.asarray(curve.temp_at(np.clip(cum, 1e-6, 100.0 - 1e-6)), float)
    start = ideal if start_ends_c is None else np.asarray(start_ends_c, float)
    if len(start) != n - 1:
        raise StudyError(f"{run.label}: {n} products need {n - 1} cut points to start from; got {len(start)}")
    if np.any(np.diff(start) <= 0):
        raise StudyError(f"{run.label}: the starting cut points must rise from product to product")
    mids = (start[1:] + start[:-1]) / 2
    lo = np.concatenate([[start[0] - 100.0], mids + 0.01])
    hi = np.concatenate([mids - 0.01, [start[-1] + 100.0]])
    meas = [_measured_tbp(p) for p in prods]
    has = [bool(m[0]) for m in meas]
    free_w = [b for b in range(n - 1) if has[b] or has[b + 1]]
    for b in range(n - 1):
        if b not in free_w:
            warnings.append(f"the boundary between {prods[b].name!r} and {prods[b + 1].name!r} has no distillation on "
                            f"either side: its overlap cannot be determined and is held as an ideal TBP cut; only its "
                            f"cut point is fitted, from the rates")
    col = _Column(model, n)

    def unpack(x):
        widths = np.zeros(n - 1)
        widths[free_w] = x[n - 1:]
        return x[:n - 1], widths

    def predicted(x):
        ends, widths = unpack(x)
        prod = col.products(ends, widths)
        out = list(prod[basis])
        for j, (pts, _, _) in enumerate(meas):
            if pts:
                out += list(col.tbp(prod, j, list(pts)))
        out += [prod["sg"][j] for j, p in enumerate(prods) if p.sg is not None]
        return np.array(out), prod

    observed = list(rates)
    sigma = [SIGMAS["rate_pct"]] * n
    for pts, sd, _ in meas:
        observed += list(pts.values())
        sigma += [sd] * len(pts)
    observed += [p.sg for p in prods if p.sg is not None]
    sigma += [SIGMAS["sg"]] * sum(p.sg is not None for p in prods)
    observed, sigma = np.array(observed), np.array(sigma)

    def resid(x):
        return (predicted(x)[0] - observed) / sigma

    x0 = np.concatenate([np.clip(start, lo, hi), np.full(len(free_w), 10.0)])
    lb = np.concatenate([lo, np.zeros(len(free_w))])
    ub = np.concatenate([hi, np.full(len(free_w), WIDTH_MAX_C)])
    fit = least_squares(resid, x0, bounds=(lb, ub), x_scale=np.concatenate([np.full(n - 1, 5.0),
                                                                             np.full(len(free_w), 10.0)]),
                        diff_step=1e-4, xtol=1e-10, ftol=1e-12, gtol=1e-10, max_nfev=400)
    if not fit.success:
        warnings.append(f"the fit stopped before converging ({fit.message}); the values are the best found")
    cov = _covariance(fit.jac)
    ends, widths = unpack(fit.x)
    yhat, prod = predicted(fit.x)
    cut_points = []
    for b in range(n - 1):
        sd_t = math.sqrt(cov[b, b]) if np.isfinite(cov[b, b]) else None
        row = {"name": prods[b].name, "end_c": float(ends[b]), "end_c_sd": sd_t, "overlap_c": None,
               "overlap_c_sd": None, "fitted": "cut point"}
        if b in free_w:
            k = n - 1 + free_w.index(b)
            row["fitted"] = "cut point and overlap"
            row["overlap_c"] = col.overlap(ends, widths, b)
            row["overlap_c_sd"] = _overlap_sd(col, fit.x, unpack, b, cov, [b, k])
            row["split_width_c"] = float(widths[b])
            if widths[b] <= 1e-6:
                warnings.append(f"the split at the end of {prods[b].name!r} fits as sharp as an ideal TBP cut "
                                f"(width 0, on its bound): the overlap is the ideal cut's, and its uncertainty "
                                f"is not given")
                row["overlap_c_sd"] = None
        if sd_t is None:
            warnings.append(f"the cut point at the end of {prods[b].name!r} cannot be determined from these data: the "
                            f"products do not change as it moves (it lies where the crude boils nothing, e.g. "
                            f"between two light-end components)")
        cut_points.append(row)
    residuals = []
    for i, (name, what) in enumerate(_labels(prods, meas, basis)):
        residuals.append({"product": name, "what": what, "measured": float(observed[i]), "fitted": float(yhat[i]),
                          "sigma": float(sigma[i])})
    chi2 = float(np.sum(fit.fun ** 2))
    dof = len(observed) - len(fit.x)
    return Calibration([p.name for p in prods], cut_points, residuals, warnings, basis, chi2, dof)


def calibrated_cut_set(cal: Calibration) -> CutSet:
    """The fitted column as a cut set for ``yields --cuts``: each product ending at its fitted cut point
    (rounded to 0.01 °C) and, where the overlap was fitted and the split is wider than
    :data:`IDEAL_SPLIT_C`, with that TBP 5-95 overlap (rounded to 0.01 °C)."""
    ends = [c["end_c"] for c in cal.cut_points]
    overlaps = {c["name"]: round(c["overlap_c"], 2) for c in cal.cut_points
                if c["overlap_c"] is not None and c.get("split_width_c", 0.0) >= IDEAL_SPLIT_C}
    cuts = [Cut(n, round(e, 2)) for n, e in zip(cal.products, ends)] + [Cut(cal.products[-1], None)]
    return CutSet(cuts, "calibrated", overlaps)


def _labels(prods, meas, basis):
    out = [(p.name, f"rate [{basis} % of crude]") for p in prods]
    for p, (pts, _, how) in zip(prods, meas):
        out += [(p.name, f"{how} {k:g} % [°C]") for k in pts]
    out += [(p.name, "SG 60/60 °F [-]") for p in prods if p.sg is not None]
    return out


def _covariance(jac) -> np.ndarray:
    """(JᵀJ)⁻¹ of the weighted residuals' Jacobian; NaN rows and columns where a parameter is not determined
    (a zero or near-zero singular direction)."""
    jtj = jac.T @ jac
    u, s, vt = np.linalg.svd(jtj)
    tol = s.max() * 1e-12 if s.size else 0.0
    good = s > tol
    inv = (vt[good].T / s[good]) @ u[:, good].T
    cov = np.full_like(jtj, np.nan)
    sure = np.all(np.abs(vt[~good]) < 1e-6, axis=0) if (~good).any() else np.ones(jtj.shape[0], bool)
    cov[np.ix_(sure, sure)] = inv[np.ix_(sure, sure)]
    return cov


def _overlap_sd(col: _Column, x, unpack, b: int, cov, idx) -> float | None:
    """The overlap's standard deviation by the delta method: the overlap's gradient in the boundary's cut
    point and width (central differences), through their covariance. [°C]"""
    sub = cov[np.ix_(idx, idx)]
    if not np.all(np.isfinite(sub)):
        return None
    g = []
    for k, h in zip(idx, (0.05, 0.5)):
        xp, xm = x.copy(), x.copy()
        xp[k] += h
        xm[k] = max(xm[k] - h, 0.0) if k >= col.n - 1 else xm[k] - h
        g.append((col.overlap(*unpack(xp), b) - col.overlap(*unpack(xm), b)) / (xp[k] - xm[k]))
    g = np.array(g)
    return float(math.sqrt(max(g @ sub @ g, 0.0)))
