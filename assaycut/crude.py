"""The crude model: TBP curve on both bases plus density and sulfur distributions, built from an Assay.

* Every curve in the assay is first put on the TBP basis: D86 by Daubert 1994 (or Riazi-Daubert 1986),
  D2887 by API TDB 3A3.1, D1160 by Maxwell-Bonnell to the atmospheric equivalent temperature (AET, taken as
  TBP: common practice for the back end, no source).  Vacuum curves extend the atmospheric one past its
  last point.
* Density is a monotone PCHIP of narrow-cut SG against mid-volume percent (light-ends components included),
  held flat beyond the outermost points, integrated exactly over each cut.  Without narrow-cut densities,
  SG = (1.8 T[K])^(1/3)/Kw along the curve at constant Watson K (reference sheet §5, common practice).
  Either way the distribution is scaled so that the cuts reproduce the whole-crude SG; the scale is
  reported as the density reconciliation.
* Weight percent follows: W(V) = ∫0^V SG dv / SG_crude.
* Sulfur is a monotone PCHIP of narrow-cut sulfur against mid-weight percent (light ends carry none),
  scaled to reproduce the whole-crude sulfur; the scale is reported.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from . import conversions
from .assay import Assay, CurveData
from .curve import DistCurve, build_curve, staircase
from .errors import CurveError
from .lightends import find_component
from .spline import Pchip, hermite_combine, hermite_integral_basis, interval_mean, pchip_slopes

D86_STD = (0, 10, 30, 50, 70, 90, 95)
"""Standard ASTM D86 points of the TBP <-> D86 correlations. [vol %]"""
SD_STD = (0, 10, 30, 50, 70, 90, 95, 100)
METHANE_NBP_C = -161.5
"""Normal boiling point of methane, the lightest hydrocarbon: no converted TBP may lie below it. [°C]"""
"""Standard ASTM D2887 points of API TDB 3A3.1. [wt %]"""


@dataclass
class CrudeModel:
    """Whole-crude model used by cutting and the studies.

    Attributes
    ----------
    curve : DistCurve
        TBP [°C] vs vol % distilled.
    sg_dist : Pchip
        SG 60/60 °F [-] against vol % distilled (reconciled).
    sulfur_dist : Pchip or None
        Sulfur [wt %] against wt % distilled (reconciled); None without narrow-cut sulfur.
    sg : float
        Whole-crude SG 60/60 °F. [-]
    sulfur_wt_pct : float or None
        Whole-crude sulfur. [wt %]
    density_reconciliation_pct : float
        Scale applied to the density distribution, (factor - 1) * 100. [%]
    sulfur_reconciliation_pct : float or None
        Scale applied to the sulfur distribution, (factor - 1) * 100. [%]
    density_source : str
        'narrow cuts' or 'constant Watson K'.
    watson_k_fit : float or None
        Watson K fitted to the whole-crude SG when density comes from constant Watson K. [-]
    methods : dict
    warnings : list of str
    """

    curve: DistCurve
    sg_dist: Pchip
    sulfur_dist: Pchip | None
    sg: float
    sulfur_wt_pct: float | None
    density_reconciliation_pct: float
    sulfur_reconciliation_pct: float | None
    density_source: str
    watson_k_fit: float | None = None
    methods: dict[str, str] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    def wt_at_vol(self, vol_pct):
        """Cumulative wt % distilled at cumulative ``vol_pct`` [vol %]. [wt %]"""
        v = np.asarray(vol_pct, dtype=float)
        return (self.sg_dist.antiderivative(v) - self.sg_dist.antiderivative(0.0)) / self.sg

    def vol_at_wt(self, wt_pct):
        """Cumulative vol % at cumulative ``wt_pct`` [wt %] (vectorised bisection on W(V)). [vol %]"""
        w = np.asarray(wt_pct, dtype=float)
        lo = np.zeros_like(w)
        hi = np.full_like(w, 100.0)
        for _ in range(50):
            mid = 0.5 * (lo + hi)
            below = self.wt_at_vol(mid) < w
            lo = np.where(below, mid, lo)
            hi = np.where(below, hi, mid)
        return 0.5 * (lo + hi)

    def mean_sg(self, va, vb):
        """Volume-average SG over [va, vb] vol %; the point value for an empty interval. [-]"""
        return interval_mean(self.sg_dist, va, vb)

    def mean_sulfur(self, wa, wb):
        """Weight-average sulfur over [wa, wb] wt %; NaN without a sulfur distribution. [wt %]"""
        if self.sulfur_dist is None:
            return np.full(np.broadcast(np.asarray(wa), np.asarray(wb)).shape, np.nan)
        return interval_mean(self.sulfur_dist, wa, wb)


def _std_points(curve: CurveData, std) -> dict[float, float]:
    """The curve's temperatures at the standard percents it covers (PCHIP through its points)."""
    p, t = curve.percent, curve.temp_c
    keep = np.concatenate([[True], np.diff(p) > 0])
    p, t = p[keep], t[keep]
    if p.size < 2:
        raise CurveError(f"{curve.where}: a {curve.method} curve needs at least 2 points")
    sp = Pchip(p, t)
    return {s: float(sp(s)) for s in std if p[0] - 1e-9 <= s <= p[-1] + 1e-9}


def to_tbp(curve: CurveData, method: str = "daubert-1994") -> tuple[np.ndarray, np.ndarray, list[str], str]:
    """Put one measured curve on the TBP (or AET) basis.

    Parameters
    ----------
    curve : CurveData
    method : str
        TBP <-> D86 method name, 'daubert-1994' or 'riazi-daubert-1986'.

    Returns
    -------
    (percent [%], temperature [°C], warnings, description of the method used)
    """
    warnings: list[str] = []
    if curve.method == "TBP":
        return curve.percent.copy(), curve.temp_c.copy(), warnings, "TBP as measured"
    if curve.method == "D1160":
        aet = conversions.maxwell_bonnell(curve.temp_c, curve.pressure_mmhg)
        return curve.percent.copy(), np.asarray(aet, float), warnings, (
            f"D1160 at {curve.pressure_mmhg:g} mmHg to AET by Maxwell-Bonnell (API TDB 5A1.19), AET taken as TBP")
    if curve.method == "D86":
        pts = _std_points(curve, D86_STD)
        out, used, w = conversions.convert(pts, "D86", "TBP", method=method)
        desc = f"D86 to TBP by {used}"
    elif curve.method == "D2887":
        pts = _std_points(curve, SD_STD)
        out, used, w = conversions.convert(pts, "D2887", "TBP")
        desc = "D2887 to TBP by API TDB 3A3.1"
    else:
        raise CurveError(f"{curve.where}: unknown distillation method {curve.method!r}")
    warnings += [f"{curve.where}: {m}" for m in w]
    low = min(out.values())
    if low < METHANE_NBP_C:
        raise CurveError(f"{curve.where}: the {desc} conversion gives {low:.0f} °C, below the boiling point of "
                         f"methane: the correlation does not apply to this curve (it is meant for petroleum "
                         f"fractions, whose segments are narrow). For a whole-crude simulated distillation, give "
                         f"the curve as method TBP on the wt basis (common practice)")
    ks = sorted(out)
    src = dict(pts)
    for lo, hi in zip(ks, ks[1:]):
        d_in, d_out = src[hi] - src[lo], out[hi] - out[lo]
        if d_in > 0 and not 0.5 <= d_out / d_in <= 2.0:
            warnings.append(f"{curve.where}: {desc} changes the {lo:g}-{hi:g} % segment from {d_in:.0f} to "
                            f"{d_out:.0f} °C; the curve is probably outside the correlation's range")
    if len(out) < 2:
        raise CurveError(f"{curve.where}: the {curve.method} curve covers too few standard points "
                         f"({', '.join(f'{k:g} %' for k in pts)}) to convert to TBP")
    ks = sorted(out)
    return np.array(ks, float), np.array([out[k] for k in ks]), warnings, desc


def _kw_of_crude(t50_c: float, sg: float) -> float:
    """Rough crude Watson K from its 50 % TBP point, for basis conversion only. [-]"""
    return float(np.cbrt(1.8 * (t50_c + 273.15)) / sg)


def _wt_to_vol(pct_w, temp_c, assay: Assay) -> np.ndarray:
    """Convert cumulative wt % points to vol %: dV = dW * SG_crude / SG(interval).

    SG of each interval is the narrow-cut SG covering its mid temperature, else constant Watson K from the
    crude's own 50 % point.  An approximation used only for weight-basis input curves.
    """
    t_mid = np.concatenate([[temp_c[0]], 0.5 * (temp_c[1:] + temp_c[:-1])])
    kw = _kw_of_crude(float(np.interp(50.0, pct_w, temp_c)), assay.sg)
    sg = np.cbrt(1.8 * (t_mid + 273.15)) / kw
    nc = assay.narrow_cuts
    if nc is not None:
        for s, e, g in zip(nc.start_c, nc.end_c, nc.sg):
            if np.isfinite(g):
                lo = -np.inf if np.isnan(s) else s
                hi = np.inf if np.isnan(e) else e
                sg = np.where((t_mid > lo) & (t_mid <= hi), g, sg)
    dw = np.diff(np.concatenate([[0.0], pct_w]))
    return np.cumsum(dw * assay.sg / sg)


def _light_ends_nodes(assay: Assay, first_t: float):
    """Light-ends staircase nodes, component vol % of crude and the per-component (mid vol %, SG)."""
    le = assay.light_ends
    if le is None or not le.amounts:
        return None, None, []
    comps = []
    for key, amt in le.amounts.items():
        c = find_component(key)
        if c is None or amt <= 0:
            continue
        vol = amt * assay.sg / c.sg if le.basis == "wt" else amt
        comps.append((c, vol))
    comps.sort(key=lambda cv: cv[0].nbp_c)
    comps = [(c, v) for c, v in comps if c.nbp_c < first_t]
    if not comps:
        return None, None, []
    cum = np.cumsum([v for _, v in comps])
    t, v = staircase([c.nbp_c for c, _ in comps], cum)
    mids = [(float(cu - vo / 2), c.sg) for (c, vo), cu in zip(comps, cum)]
    return t, v, mids


def build_model(assay: Assay, method: str = "daubert-1994") -> CrudeModel:
    """Build the crude model from an assay.

    Parameters
    ----------
    assay : Assay
    method : str
        TBP <-> D86 method for D86 input curves: 'daubert-1994' (default) or 'riazi-daubert-1986'.

    Returns
    -------
    CrudeModel
    """
    warnings: list[str] = [w for c in assay.curves for w in c.warnings]
    methods: dict[str, str] = {}
    main = assay.curves[0]
    p, t, w, desc = to_tbp(main, method)
    warnings += w
    methods["curve"] = desc
    basis = main.basis
    for extra in assay.curves[1:]:
        pe, te, we, de = to_tbp(extra, method)
        warnings += we
        if extra.basis != basis:
            raise CurveError(f"{extra.where}: the vacuum curve is on the {extra.basis} basis but the main curve "
                             f"is on the {basis} basis; give both on one basis")
        keep = (pe > p[-1]) & (te > t[-1])
        if not np.any(keep):
            warnings.append(f"{extra.where}: no point lies beyond the main curve ({p[-1]:g} %, {t[-1]:.1f} °C); "
                            f"the vacuum curve is not used")
            continue
        if np.any(~keep):
            warnings.append(f"{extra.where}: {int((~keep).sum())} point(s) overlapping the main curve are not used")
        p = np.concatenate([p, pe[keep]])
        t = np.concatenate([t, te[keep]])
        methods["vacuum curve"] = de
    if basis == "wt":
        w_last = float(p[-1])
        p = _wt_to_vol(p, t, assay)
        methods["basis"] = ("weight-basis curve converted to volume with narrow-cut SG (constant Watson K "
                            "between them); approximate")
        if abs(w_last - 100.0) < 1e-9 and abs(p[-1] - 100.0) > 1e-9:
            factor = 100.0 / p[-1]
            if abs(factor - 1.0) > 0.02:
                warnings.append(f"the weight-basis curve converts to {p[-1]:.1f} vol % at 100 wt %: the cut "
                                f"densities and the crude gravity disagree by {abs(factor - 1) * 100:.1f} %; the "
                                f"volume percents are scaled to close at 100 %")
            p = p * factor
        elif p[-1] > 100.0 + 1e-6:
            raise CurveError(f"the weight-basis curve converts to {p[-1]:.1f} vol % at {w_last:g} wt %, above "
                             f"100 %: the crude gravity and the cut densities disagree")
    le_t, le_v, le_mids = _light_ends_nodes(assay, float(t[0]))
    curve = build_curve(p, t, front_t=le_t, front_v=le_v)
    warnings += curve.warnings
    if curve.light_ends_pct == 0.0:
        le_mids = []
    if curve.fit is not None:
        methods["extension"] = (f"Riazi distribution fitted to {curve.fit.npoints} points "
                                f"(RMS {curve.fit.rms_c:.1f} °C); used past {curve.measured_hi:g} vol %"
                                + (f" and before {curve.measured_lo:g} vol %" if curve.measured_lo > 0 else ""))
    sg_dist, dens_rec, dens_src, kw_fit = _density_distribution(assay, curve, le_mids, warnings)
    methods["density"] = (f"{dens_src}; scaled by {dens_rec:+.2f} % to reproduce the whole-crude SG "
                          f"{assay.sg:.4f}")
    model = CrudeModel(curve, sg_dist, None, assay.sg, assay.sulfur_wt_pct, dens_rec, None, dens_src,
                       kw_fit, methods, warnings)
    _sulfur_distribution(model, assay, le_mids)
    return model


def narrow_cut_positions(assay: Assay, curve: DistCurve):
    """Start and end vol % of each narrow cut on the curve (open start 0 %, open end 100 %). [vol %]"""
    nc = assay.narrow_cuts
    va = np.where(np.isnan(nc.start_c), 0.0, curve.pct_at(np.nan_to_num(nc.start_c)))
    vb = np.where(np.isnan(nc.end_c), 100.0, curve.pct_at(np.nan_to_num(nc.end_c)))
    return va, vb


def property_spline(lo, hi, values, fixed=(), iterations: int = 30) -> Pchip:
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

    Returns
    -------
    Pchip
        Property against percent distilled.
    """
    lo, hi, vals = (np.asarray(z, dtype=float) for z in (lo, hi, values))
    mids = 0.5 * (lo + hi)
    fx = np.array([q[0] for q in fixed], dtype=float)
    fy = np.array([q[1] for q in fixed], dtype=float)
    x = np.concatenate([mids, fx])
    order = np.argsort(x, kind="stable")
    x = x[order]
    keep = np.concatenate([[True], np.diff(x) > 1e-9])
    is_cut = (order < mids.size)[keep]
    x = x[keep]
    y0 = np.concatenate([vals, fy])[order][keep]
    if x.size == 1:
        return Pchip(np.array([0.0, 100.0]), np.array([y0[0], y0[0]]))
    cut_idx = order[keep][is_cut]
    a, b, target = lo[cut_idx], hi[cut_idx], vals[cut_idx]
    y = y0.copy()
    best, best_err = y.copy(), np.inf
    tol = 1e-7 * max(float(np.max(np.abs(vals))), 1e-12)
    means = _interval_means(x, a, b)
    for _ in range(iterations):
        err = target - means(y)
        worst = float(np.max(np.abs(err))) if err.size else 0.0
        if worst >= 0.95 * best_err:  # no longer improving
            break
        best, best_err = y.copy(), worst
        if worst < tol:
            break
        y[is_cut] = np.maximum(y[is_cut] + err, 0.0)
    return Pchip(x, best)


def _interval_means(x: np.ndarray, a: np.ndarray, b: np.ndarray):
    """A function y -> mean of the PCHIP through (x, y) over each [a, b] (held flat beyond the end nodes).

    The same exact integral as :meth:`Pchip.integral`, with the interval ends located once, since only the
    node values change between the iterations of :func:`property_spline`.
    """
    h = np.diff(x)

    def locate(q):
        qc = np.clip(q, x[0], x[-1])
        i = np.clip(np.searchsorted(x, qc, side="right") - 1, 0, x.size - 2)
        t = (qc - x[i]) / h[i]
        return i, hermite_integral_basis(t), np.minimum(q - x[0], 0.0), np.maximum(q - x[-1], 0.0)

    ends = [locate(a), locate(b)]
    width = b - a

    def means(y):
        d = pchip_slopes(x, y)
        cum = np.concatenate([[0.0], np.cumsum(h * (0.5 * (y[:-1] + y[1:]) + h * (d[:-1] - d[1:]) / 12.0))])
        anti = []
        for i, basis, below, above in ends:
            hi_ = h[i]
            anti.append(cum[i] + hi_ * hermite_combine(basis, y[i], y[i + 1], hi_ * d[i], hi_ * d[i + 1])
                        + below * y[0] + above * y[-1])
        return (anti[1] - anti[0]) / width

    return means


def _density_distribution(assay: Assay, curve: DistCurve, le_mids, warnings):
    nc = assay.narrow_cuts
    if nc is not None and np.isfinite(nc.sg).sum() >= 2:
        va, vb = narrow_cut_positions(assay, curve)
        ok = np.isfinite(nc.sg) & (vb > va)
        first = float(va[ok].min()) if ok.any() else 0.0
        raw = property_spline(va[ok], vb[ok], nc.sg[ok], [(m, g) for m, g in le_mids if m < first])
        source = "narrow-cut densities (monotone spline against mid-volume %, matching each cut's mean)"
        kw = None
    else:
        if nc is not None:
            warnings.append("fewer than 2 narrow cuts have a density: cut densities are estimated at constant "
                            "Watson K fitted to the whole-crude gravity")
        grid = np.linspace(0.0, 100.0, 201)
        mids = 0.5 * (grid[1:] + grid[:-1])
        cbrt = np.cbrt(1.8 * (curve.temp_at(mids) + 273.15))
        fixed = mids < curve.light_ends_pct
        le_sg = np.full_like(mids, np.nan)
        if le_mids:
            lm = np.array([m for m, _ in le_mids])
            lg = np.array([g for _, g in le_mids])
            le_sg = lg[np.clip(np.searchsorted(lm, mids), 0, lm.size - 1)]
        dv = 0.5
        fixed_mass = float((le_sg[fixed] * dv).sum()) if fixed.any() else 0.0
        kw = float((cbrt[~fixed] * dv).sum() / (100.0 * assay.sg - fixed_mass))
        raw = Pchip(mids, np.where(fixed, le_sg, cbrt / kw))
        source = f"constant Watson K {kw:.2f} fitted to the whole-crude gravity (no narrow-cut densities)"
    factor = 100.0 * assay.sg / raw.integral(0.0, 100.0)
    return Pchip(raw.x, raw.y * factor), (factor - 1.0) * 100.0, source, kw


def _sulfur_distribution(model: CrudeModel, assay: Assay, le_mids) -> None:
    nc = assay.narrow_cuts
    if nc is None or np.isfinite(nc.sulfur_wt_pct).sum() < 2:
        model.warnings.append("no narrow-cut sulfur (fewer than 2 values): cut sulfur is left empty")
        model.methods["sulfur"] = "not estimated (no narrow-cut sulfur)"
        return
    va, vb = narrow_cut_positions(assay, model.curve)
    wa, wb = model.wt_at_vol(va), model.wt_at_vol(vb)
    ok = np.isfinite(nc.sulfur_wt_pct) & (wb > wa)
    first = float(wa[ok].min())
    fixed = [(float(model.wt_at_vol(m)), 0.0) for m, _ in le_mids if model.wt_at_vol(m) < first]
    raw = property_spline(wa[ok], wb[ok], nc.sulfur_wt_pct[ok], fixed)
    total = raw.integral(0.0, 100.0) / 100.0
    if model.sulfur_wt_pct is None:
        model.sulfur_wt_pct = float(total)
        model.sulfur_reconciliation_pct = 0.0
        model.warnings.append(f"no whole-crude sulfur given: {total:.3f} wt % is taken from the narrow cuts")
        model.sulfur_dist = raw
    else:
        factor = model.sulfur_wt_pct / total if total > 0 else 1.0
        model.sulfur_dist = Pchip(raw.x, raw.y * factor)
        model.sulfur_reconciliation_pct = (factor - 1.0) * 100.0
    model.methods["sulfur"] = (f"narrow-cut sulfur (monotone spline against mid-weight %, matching each cut's "
                               f"mean); scaled by {model.sulfur_reconciliation_pct:+.2f} % to reproduce the "
                               f"whole-crude sulfur {model.sulfur_wt_pct:.3f} wt %")
