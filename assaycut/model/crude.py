"""The crude model: TBP curve on both bases plus density and sulfur distributions, built from an Assay.

Building it (:func:`build_model`) takes these steps:

1. every curve of the assay is put on the TBP basis (:func:`assaycut.model.input_curves.curve_to_tbp`);
   vacuum curves extend the atmospheric one past its last point;
2. a weight-basis curve is converted to volume (:func:`_to_volume_basis`);
3. light ends are placed at the front at their normal boiling points and the curve model is fitted
   (:func:`assaycut.model.tbp_curve.build_curve`);
4. density and sulfur distributions are fitted to the narrow cuts and reconciled to the whole crude
   (:mod:`assaycut.model.distributions`).

Weight percent follows from the density distribution: W(V) = ∫0^V SG dv / SG_crude.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import AssaycutError, CurveError
from ..methods.characterisation import sg_from_watson_k, watson_k
from ..units import pct_text
from .assay import Assay, validate_assay
from .distributions import density_distribution_steps, narrow_cut_positions, sulfur_distribution_steps
from .input_curves import curve_to_tbp
from .lightends import convert_basis, find_component
from .quality_distributions import estimated_sulfur_steps, quality_distributions
from ..methods.pchip import Pchip, interval_mean
from .steps import run_together
from .tbp_curve import TbpCurve, build_curve_steps, staircase


@dataclass
class CrudeModel:
    """Whole-crude model used by cutting and the studies.

    Attributes
    ----------
    curve : TbpCurve
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
    sulfur_estimated : bool
        Cut sulfur is estimated from the whole-crude sulfur (no narrow-cut sulfur).
    qualities : dict of str to Quality
        The other narrow-cut qualities (:mod:`assaycut.model.quality_distributions`).
    all_on_extension : str
        Why every cut's gravity (and what follows from it: weight yields, Watson K, sulfur, estimates) depends
        on the curve's fitted extension; empty when it does not (:func:`_properties_on_extension`).
    methods : dict
    warnings : list of str
    """

    curve: TbpCurve
    sg_dist: Pchip
    sulfur_dist: Pchip | None
    sg: float
    sulfur_wt_pct: float | None
    density_reconciliation_pct: float
    sulfur_reconciliation_pct: float | None
    density_source: str
    watson_k_fit: float | None = None
    all_on_extension: str = ""
    sulfur_estimated: bool = False
    qualities: dict = field(default_factory=dict)
    methods: dict[str, str] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)

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


def build_model(assay: Assay, method: str = "daubert-1994", qualities: bool = True) -> CrudeModel:
    """Build the crude model from an assay (the steps are in the module docstring).

    Parameters
    ----------
    assay : Assay
    method : str
        TBP <-> D86 method for D86 input curves: 'daubert-1994' (default) or 'riazi-daubert-1986'.
    qualities : bool
        Build the narrow-cut quality distributions (default); a study that reads only yields, gravity and
        sulfur (the uncertainty draws) skips them.

    Returns
    -------
    CrudeModel

    Raises
    ------
    InputError
        For an assay the readers would have refused (:func:`~assaycut.model.assay.validate_assay`).
    """
    out = build_models([assay], method, qualities)[0]
    if isinstance(out, AssaycutError):
        raise out
    return out


def build_models(assays, method: str = "daubert-1994", qualities: bool = True) -> list:
    """Build many crude models together, the expensive kernels (the extension's distribution fit, the density
    and sulfur distributions' mean matching) run over all the assays at once
    (:func:`~assaycut.model.steps.run_together`).  The one model builder: :func:`build_model` is a batch of one,
    and each model is the same to the last bit whatever else is in the batch (tested).

    Parameters
    ----------
    assays : sequence of Assay
    method : str
        As for :func:`build_model`.
    qualities : bool
        As for :func:`build_model`.

    Returns
    -------
    list of CrudeModel or AssaycutError
        In the order of ``assays``: the model, or the error :func:`build_model` would raise for that assay.
    """
    assays = list(assays)
    out: list = []
    for k in range(0, len(assays), BUILD_CHUNK):
        out += run_together([model_steps(a, method, qualities) for a in assays[k:k + BUILD_CHUNK]])
    return out


BUILD_CHUNK = 256
"""Models built side by side at most (bounds the memory of the models in progress)."""


def model_steps(assay: Assay, method: str = "daubert-1994", qualities: bool = True):
    """:func:`build_model` as a step function (:mod:`assaycut.model.steps`)."""
    validate_assay(assay)
    warnings: list[str] = [w for c in assay.curves for w in c.warnings]
    methods: dict[str, str] = {}
    p, t = _tbp_points(assay, method, warnings, methods)
    if assay.curves[0].basis != "wt":
        model = yield from _fit(assay, p, t, warnings, methods)
    else:
        model = yield from _fit_weight_basis(assay, p, t, warnings, methods)
    if qualities:
        model.qualities = quality_distributions(assay, model, model.warnings, model.methods)
    return model


WT_NODE_TOL = 1e-9
"""How closely a weight-basis curve's own nodes are reproduced by the model's wt % distilled. [wt %]"""
FREEZE_FIT_WT = 1e-6
"""Once every node of a weight-basis curve is this close, the passes keep the extension's fit as it is: the fit
is a grid search, so refitting points that move by less than this can hop between two neighbouring grid values
and stall the passes just above :data:`WT_NODE_TOL`; the extension still joins the last point exactly. [wt %]"""


def _fit_weight_basis(assay: Assay, w, t, warnings: list[str], methods: dict[str, str]):
    """The crude model of a weight-basis curve, exact at its nodes (a step function).

    The volume percent of each node is found so that the model's own weight distilled, W(V) = ∫0^V SG dv /
    SG_crude with the density distribution the model then uses for every cut, equals the measured wt % at
    that node: starting from the narrow-cut/Watson K estimate (:func:`_wt_to_vol`), each pass refits the
    curve and the density distribution and moves every node by dV = (w_i - W(V_i)) SG_crude / SG(V_i)
    (Newton's step for the fixed distribution), until every node is within :data:`WT_NODE_TOL` wt %.
    """
    v = _to_volume_basis(w, t, assay, warnings, methods)
    closes = abs(float(w[-1]) - 100.0) < 1e-9
    model = None
    fit = None
    for _ in range(60):
        model = yield from _fit(assay, v, t, list(warnings), dict(methods), fit)
        miss = w - model.wt_at_vol(v)
        worst = float(np.max(np.abs(miss)))
        if worst < WT_NODE_TOL:
            break
        if worst < FREEZE_FIT_WT:  # from here on the extension keeps this fit (see FREEZE_FIT_WT)
            fit = model.curve.fit
        v = np.clip(v + miss * model.sg / model.sg_dist(v), 0.0, 100.0)
        if closes:
            v[-1] = 100.0
        v = np.maximum.accumulate(v)
    else:
        raise CurveError(f"{assay.curves[0].where}: the weight-basis curve could not be put on the volume basis "
                         f"consistently with the cut densities (nodes missed by up to "
                         f"{float(np.max(np.abs(miss))):.2g} wt %)")
    model.methods["basis"] = ("weight-basis curve: volume percents solved so that the model's weight distilled, "
                              "from its density distribution, reproduces every measured wt % point")
    return model


def _fit(assay: Assay, p, t, warnings: list[str], methods: dict[str, str], fit=None):
    """Curve model, density and sulfur distributions for volume-basis TBP points (p [vol %], t [°C]); a step
    function.  ``fit``: the extension's Riazi fit to use instead of fitting these points."""
    le_t, le_v, le_mids = _light_ends_nodes(assay, float(t[0]))
    curve = yield from build_curve_steps(p, t, front_t=le_t, front_v=le_v, fit=fit)
    warnings += curve.warnings
    if curve.light_ends_pct == 0.0:
        le_mids = []
    if curve.fit is not None:
        methods["extension"] = (f"Riazi distribution fitted to {curve.fit.npoints} points "
                                f"(RMS {curve.fit.rms_c:.1f} °C); used past {pct_text(curve.measured_hi)} vol %"
                                + (f" and before {pct_text(curve.measured_lo)} vol %" if curve.measured_lo > 0 else ""))
    positions = narrow_cut_positions(assay, curve) if assay.narrow_cuts is not None else None
    sg_dist, dens_rec, dens_src, kw_fit = yield from density_distribution_steps(assay, curve, le_mids, warnings,
                                                                                positions)
    methods["density"] = (f"{dens_src}; scaled by {dens_rec:+.2f} % to reproduce the whole-crude SG "
                          f"{assay.sg:.4f}")
    model = CrudeModel(curve, sg_dist, None, assay.sg, assay.sulfur_wt_pct, dens_rec, None, dens_src,
                       kw_fit, _properties_on_extension(assay, curve, kw_fit), methods=methods, warnings=warnings)
    yield from sulfur_distribution_steps(model, assay, le_mids, positions)
    if model.sulfur_dist is None and model.sulfur_wt_pct is not None:
        model.sulfur_dist = yield from estimated_sulfur_steps(model)
        model.sulfur_estimated = True
        model.sulfur_reconciliation_pct = None
        warnings[:] = [w for w in warnings if not w.startswith("no narrow-cut sulfur")]
        warnings.append("no narrow-cut sulfur: cut sulfur is estimated from the whole-crude sulfur (Riazi, Nasimi & "
                        "Roomi 1999 over the curve, scaled to the crude) and flagged estimated")
        methods["sulfur"] = ("estimated: Riazi, Nasimi & Roomi (1999) on pseudo-components of the curve (M and n20 "
                             "by Riazi-Daubert 1987), non-decreasing with boiling range, scaled to the whole-crude "
                             f"sulfur {model.sulfur_wt_pct:.3f} wt %")
    return model


AT_NODE_C = 1e-3
"""A narrow-cut boundary this close to a measured point counts as on it: its position then moves with the
extension by less than the curve's slope x 0.001 °C, far below laboratory precision. [°C]"""


def _properties_on_extension(assay: Assay, curve: TbpCurve, kw_fit: float | None) -> str:
    """Why the density and sulfur distributions, hence every cut's gravity, depend on the fitted extension;
    '' when they do not.

    They do when the curve is extended and either the density comes from one Watson K fitted to the whole-crude
    gravity over the whole curve, or a narrow cut's boundary lies where the curve depends on the extension and
    not on a measured point (its position on the curve, hence the distributions through their whole-crude
    reconciliation, then moves with the extension).

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them).
    """
    if curve.fit is None:
        return ""
    if kw_fit is not None:
        return ("without narrow-cut densities, every cut's gravity comes from one Watson K fitted to the "
                "whole-crude gravity over the whole curve, its fitted extension included")
    nc = assay.narrow_cuts
    if nc is None:
        return ""
    lo, hi = curve.temp_at_node(curve.safe_lo), curve.temp_at_node(curve.safe_hi)  # both are measured nodes
    bounds = np.concatenate([nc.start_c, nc.end_c])
    at_node = (np.abs(bounds[:, None] - curve.measured_temp_c[None, :]) <= AT_NODE_C).any(axis=1)
    out = bounds[np.isfinite(bounds) & ((bounds > hi + 1e-9) | (bounds < lo - 1e-9)) & ~at_node]
    if out.size:
        return (f"narrow-cut boundaries at {', '.join(f'{b:g}' for b in np.unique(out))} °C lie where the curve "
                f"depends on its fitted extension, so the density and sulfur distributions move with it")
    return ""


def _tbp_points(assay: Assay, method: str, warnings: list[str], methods: dict[str, str]):
    """The main curve on the TBP basis, extended by the points of any vacuum curve that lie beyond it.

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    main = assay.curves[0]
    p, t, w, desc = curve_to_tbp(main, method)
    warnings += w
    methods["curve"] = desc
    for extra in assay.curves[1:]:
        pe, te, we, de = curve_to_tbp(extra, method)
        warnings += we
        if extra.basis != main.basis:
            raise CurveError(f"{extra.where}: the vacuum curve is on the {extra.basis} basis but the main curve "
                             f"is on the {main.basis} basis; give both on one basis")
        keep = (pe > p[-1]) & (te > t[-1])
        if not np.any(keep):
            warnings.append(f"{extra.where}: no point lies beyond the main curve ({pct_text(p[-1])} %, "
                            f"{t[-1]:.1f} °C); "
                            f"the vacuum curve is not used")
            continue
        if np.any(~keep):
            warnings.append(f"{extra.where}: {int((~keep).sum())} point(s) overlapping the main curve are not used")
        p = np.concatenate([p, pe[keep]])
        t = np.concatenate([t, te[keep]])
        methods["vacuum curve"] = de
    return p, t


def _wt_to_vol(pct_w, temp_c, assay: Assay) -> np.ndarray:
    """First estimate of the vol % of cumulative wt % points: dV = dW * SG_crude / SG(interval).

    SG of each interval is the narrow-cut SG covering its mid temperature, else constant Watson K from the
    crude's own 50 % point.  The starting point of :func:`_fit_weight_basis`, which makes it exact.
    """
    t_mid = np.concatenate([[temp_c[0]], 0.5 * (temp_c[1:] + temp_c[:-1])])
    kw = watson_k(float(np.interp(50.0, pct_w, temp_c)), assay.sg)
    sg = sg_from_watson_k(t_mid, kw)
    nc = assay.narrow_cuts
    if nc is not None:
        for s, e, g in zip(nc.start_c, nc.end_c, nc.sg):
            if np.isfinite(g):
                lo = -np.inf if np.isnan(s) else s
                hi = np.inf if np.isnan(e) else e
                sg = np.where((t_mid > lo) & (t_mid <= hi), g, sg)
    dw = np.diff(np.concatenate([[0.0], pct_w]))
    return np.cumsum(dw * assay.sg / sg)


def _to_volume_basis(p, t, assay: Assay, warnings: list[str], methods: dict[str, str]) -> np.ndarray:
    """Volume percents of a weight-basis curve, closed at 100 % when the weight curve is."""
    w_last = float(p[-1])
    p = _wt_to_vol(p, t, assay)
    if abs(w_last - 100.0) < 1e-9 and abs(p[-1] - 100.0) > 1e-9:
        factor = 100.0 / p[-1]
        if abs(factor - 1.0) > 0.02:
            warnings.append(f"the weight-basis curve converts to {p[-1]:.1f} vol % at 100 wt %: the cut "
                            f"densities and the crude gravity disagree by {abs(factor - 1) * 100:.1f} %; the "
                            f"volume percents are scaled to close at 100 %")
        p = p * factor
    elif p[-1] > 100.0 + 1e-6:
        raise CurveError(f"the weight-basis curve converts to {p[-1]:.1f} vol % at {pct_text(w_last)} wt %, above "
                         f"100 %: the crude gravity and the cut densities disagree")
    return p


def _light_ends_nodes(assay: Assay, first_t: float):
    """Light-ends staircase nodes, component vol % of crude and the per-component (mid vol %, SG).

    Its row-wise twin for uncertainty draws is in :mod:`assaycut.model.draws`: change both
    (tests/studies/test_uncertainty_zero.py and tests/model/test_draws.py compare them)."""
    le = assay.light_ends
    if le is None or not le.amounts:
        return None, None, []
    comps = []
    for key, amt in le.amounts.items():
        c = find_component(key)
        if c is None or amt <= 0:
            continue
        comps.append((c, convert_basis(amt, le.basis, "vol", c.sg, assay.sg)))
    comps.sort(key=lambda cv: cv[0].nbp_c)
    comps = [(c, v) for c, v in comps if c.nbp_c < first_t]
    if not comps:
        return None, None, []
    cum = np.cumsum([v for _, v in comps])
    t, v = staircase([c.nbp_c for c, _ in comps], cum)
    mids = [(float(cu - vo / 2), c.sg) for (c, vo), cu in zip(comps, cum)]
    return t, v, mids
