"""Blending crudes into a new assay.

Rules (API MPMS Ch. 11 for gravity; Maples, *Petroleum Refinery Process Economics* (2000) for viscosity):

* the blended TBP curve is the fraction-weighted sum of the parents' cumulative curves on the chosen basis
  (volume or weight), evaluated on a temperature grid covering the range every parent measured;
* gravity blends by volume on SG (SG = Σ v_i SG_i), never by averaging API; on a mass basis 1/SG = Σ w_i/SG_i;
* sulfur and other mass-based properties blend by weight; kinematic viscosity by the Refutas blending number
  (Maples 2000), by mass fraction;
* narrow cuts of the blend are built by cutting every parent on common narrow boundaries and blending each
  cut by the same rules;
* optional light-ends shrinkage by API MPMS 12.3 (off by default,
  :func:`assaycut.methods.blending_rules.shrinkage_api_mpms_12_3`).
"""

from __future__ import annotations

import math

import numpy as np

from ..cutting.ideal import cut_columns
from ..cutting.model_rows import BatchModel
from ..errors import StudyError
from ..methods.blending_indices import rule_for
from ..methods.blending_rules import (
    shrinkage_api_mpms_12_3,
    vbn_refutas,
    viscosity_from_vbn_refutas,
)
from ..model.assay import Assay, CurveData, LightEnds, NarrowCuts
from ..model.crude import CrudeModel
from ..model.lightends import convert_basis, find_component
from ..units import pct_text, sg_to_api
from .compatibility import IN_KEY, SBN_KEY, assess, numbers_of

FRACTION_TOL = 0.01
"""Blend fractions must add up to 100 within this much. [%]"""
GRID_STEP_C = 2.0
"""Spacing of the blended curve's points (plus every parent's own curve nodes). [°C]"""
NARROW_STEP_C = 50.0
"""Spacing of the narrow cuts written for a blend. [°C]"""


def blend(parents: list[tuple[Assay, CrudeModel, float]], basis: str = "vol", name: str | None = None,
          shrinkage: bool = False) -> Assay:
    """Blend crudes into a new assay that every command can read.

    Steps: the shares on both bases (:func:`_shares`), the blend gravity (:func:`_gravity`), the blended
    TBP curve (:func:`_curve`), narrow cuts on common boundaries (:func:`_narrow_cuts`), light ends
    (:func:`_light_ends`) and the other whole-crude properties (:func:`_extras`).

    Parameters
    ----------
    parents : list of (Assay, CrudeModel, percent)
        Each parent crude, its model, and its share of the blend. [% on ``basis``]
    basis : str
        'vol' or 'wt': the basis of the shares and of the blended curve.
    name : str, optional
        Name of the blend; default joins the parents' names and shares.
    shrinkage : bool
        Apply API MPMS 12.3 light-ends shrinkage to the blend gravity (off by default).

    Returns
    -------
    Assay
        TBP curve, narrow cuts, light ends, gravity, sulfur and mass-based extras of the blend; its notes
        record the parents, their sha256 and the rules used.
    """
    pct, sg, v, w = _shares(parents, basis)
    notes: list[str] = []
    sg_blend = _gravity(sg, v, w, shrinkage and len(parents) > 1, notes)
    models = [m for _, m, _ in parents]
    curve, t_hi = _curve(models, v, w, basis)
    narrow = _narrow_cuts(models, v, sg, t_hi)
    light = _light_ends(parents, w)
    sulfur = None
    if all(m.given_sulfur_wt_pct is not None for m in models):
        sulfur = float(sum(wi * m.given_sulfur_wt_pct for wi, m in zip(w, models)))
    extras = _extras(parents, v, w, notes)
    label = name or " + ".join(f"{a.name} {p:g}%" for (a, _, _), p in zip(parents, pct))
    notes.insert(0, f"blend on the {basis} basis: " + "; ".join(
        f"{a.name} {pct_text(p)} % (sha256 {a.sha256 or 'n/a'})" for (a, _, _), p in zip(parents, pct)))
    notes.append("curve: weighted sum of the parents' cumulative curves where all were measured; gravity by volume "
                 "on SG; sulfur and mass-based properties by weight; viscosity by Refutas")
    notes.append(assess([a.name for a, _, _ in parents], [numbers_of(a.extras) for a, _, _ in parents], v).text())
    return Assay(name=label, sg=sg_blend, curves=[curve], origin="blend of " + ", ".join(a.name for a, _, _ in parents),
                 sulfur_wt_pct=sulfur, narrow_cuts=narrow, light_ends=light, extras=extras, notes=notes)


def _shares(parents, basis: str):
    """The shares as given [%], the parents' SG, and the shares as volume and weight fractions, each checked."""
    if basis not in ("vol", "wt"):
        raise StudyError(f"basis must be 'vol' or 'wt'; got {basis!r}")
    if len(parents) < 1:
        raise StudyError("a blend needs at least one crude")
    pct = np.array([p for _, _, p in parents], dtype=float)
    if np.any(~np.isfinite(pct)) or np.any(pct <= 0):
        raise StudyError(f"every share must be a positive percent; got {', '.join(f'{p:g}' for p in pct)}")
    if abs(pct.sum() - 100.0) > FRACTION_TOL:
        raise StudyError(f"the shares add up to {pct_text(pct.sum())} %, not 100 %: "
                         + " + ".join(f"{a.name} {p:g}" for (a, _, _), p in zip(parents, pct)))
    f = pct / pct.sum()
    sg = np.array([a.sg for a, _, _ in parents])
    if basis == "vol":
        v, w = f, f * sg / (f * sg).sum()
    else:
        w, v = f, (f / sg) / (f / sg).sum()
    return pct, sg, v, w


def _gravity(sg, v, w, shrinkage: bool, notes: list[str]) -> float:
    """Blend SG by volume on SG (1/SG = Σ w/SG on mass), raised by the API MPMS 12.3 shrinkage if asked."""
    sg_blend = float(1.0 / (w / sg).sum())  # same as Σ v SG
    if not shrinkage:
        notes.append("no light-ends shrinkage applied (API MPMS 12.3 is available as an option)")
        return sg_blend
    api = sg_to_api(sg)
    light = int(np.argmax(api))
    rest = np.arange(sg.size) != light
    heavy_sg = (v[rest] * sg[rest]).sum() / v[rest].sum()
    g = api[light] - sg_to_api(heavy_sg)
    s = shrinkage_api_mpms_12_3(100.0 * v[light], g)
    notes.append(f"light-ends shrinkage by API MPMS 12.3 (coefficients from memory): {s:.3f} % of volume; "
                 f"the blend SG is raised accordingly, its cut percents are not")
    return sg_blend / (1.0 - s / 100.0)


def _curve(models, v, w, basis: str):
    """The blended TBP curve on ``basis`` over the range every parent measured, and its last temperature."""
    t_lo = max(m.curve.first_measured_c for m in models)
    t_hi = min(float(m.curve.temp_at(m.curve.measured_hi)) for m in models)
    if not t_hi > t_lo + 1.0:
        raise StudyError("the parents' measured curves do not overlap in temperature; cannot blend their curves")
    nodes = np.concatenate([m.curve.spline.x for m in models])
    grid = np.unique(np.concatenate([[t_lo, t_hi], nodes, np.arange(math.ceil(t_lo / GRID_STEP_C) * GRID_STEP_C,
                                                                     t_hi, GRID_STEP_C)]).round(6))
    grid = grid[(grid >= t_lo) & (grid <= t_hi)]
    cum = []
    for m in models:
        pv = np.asarray(m.curve.pct_at(grid), float)
        cum.append(pv if basis == "vol" else m.wt_at_vol(pv))
    shares = v if basis == "vol" else w
    blended = np.sum(shares[:, None] * np.array(cum), axis=0)
    return CurveData("TBP", basis, blended, grid, None, "blend"), t_hi


def _narrow_cuts(models, v, sg, t_hi: float) -> NarrowCuts:
    """Narrow cuts of the blend: every parent cut on common boundaries, each cut blended by volume on SG and
    by weight on sulfur."""
    bounds = np.unique(np.concatenate([[15.0], np.arange(50.0, t_hi + 1e-9, NARROW_STEP_C), [t_hi]]))
    bounds = bounds[bounds <= t_hi]
    cols = [cut_columns(BatchModel([m]), bounds[None, :]) for m in models]
    vol = np.array([c["vol_pct"][0] for c in cols])          # (parents, cuts), % of each parent
    sgc = np.array([np.nan_to_num(c["sg"][0]) for c in cols])
    sul = np.array([c["sulfur_wt_pct"][0] for c in cols])
    have_s = np.all([m.sulfur_dist is not None for m in models])
    bvol = (v[:, None] * vol).sum(axis=0)
    bmass = (v[:, None] * vol * sgc).sum(axis=0)
    with np.errstate(invalid="ignore", divide="ignore"):
        bsg = np.where(bvol > 0, bmass / bvol, np.nan)
        bs = np.where(bmass > 0, (v[:, None] * vol * sgc * np.nan_to_num(sul)).sum(axis=0) / bmass, np.nan) \
            if have_s else np.full(bvol.shape, np.nan)
    bwt = bvol * bsg / (v * sg).sum()
    starts = np.concatenate([[np.nan], bounds])
    endsb = np.concatenate([bounds, [np.nan]])
    return NarrowCuts(starts, endsb, bvol, bwt, bsg, bs, _blended_qualities(models, cols, v, vol, sgc))


def _blended_qualities(models, cols, v, vol, sgc) -> dict[str, np.ndarray]:
    """The parents' narrow-cut qualities on the blend's narrow cuts, each blended by its rule
    (:mod:`assaycut.methods.blending_indices`) on its basis: a quality every parent measured (estimates are not
    carried: the blend's own model estimates again); NaN where a parent has no value for the cut."""
    names = set.intersection(*[set(m.qualities) for m in models]) if models else set()
    out = {}
    for name in sorted(names):
        rule = rule_for(name)
        vals = np.array([c[name][0] if name in c else np.full(vol.shape[1], np.nan) for c in cols])
        est = np.array([c["estimated"].get(name, np.zeros((1, vol.shape[1]), bool))[0] for c in cols])
        vals = np.where(est, np.nan, vals)
        weight = v[:, None] * vol * (sgc if rule.basis == "wt" else 1.0)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            idx = rule.to_index(vals)
            mean = (weight * idx).sum(axis=0) / weight.sum(axis=0)
            out[name] = np.where(np.all(np.isfinite(idx) | (weight <= 0), axis=0), rule.from_index(mean), np.nan)
    return out


def _light_ends(parents, w) -> LightEnds | None:
    """Light ends of the blend, by weight of whole crude."""
    amounts: dict[str, float] = {}
    for (a, _, _), wi in zip(parents, w):
        if a.light_ends is None:
            continue
        for k, x in a.light_ends.amounts.items():
            c = find_component(k)
            wt = convert_basis(x, a.light_ends.basis, "wt", c.sg, a.sg)
            amounts[c.key] = amounts.get(c.key, 0.0) + wi * wt
    return LightEnds(amounts, "wt") if amounts else None


def _extras(parents, v, w, notes: list[str]) -> dict[str, float]:
    """Whole-crude extras every parent has: viscosities by Refutas, mass-based contents by weight, the oil
    compatibility numbers as the blend acts in a further blend (S_BN by volume, I_N the largest: Wiehe &
    Kennedy 2000); the rest is named in the notes as not blended."""
    extras: dict[str, float] = {}
    keys = set.intersection(*[set(a.extras) for a, _, _ in parents]) if parents else set()
    dropped = sorted(set().union(*[set(a.extras) for a, _, _ in parents]) - keys)
    for k in sorted(keys):
        vals = np.array([float(a.extras[k]) for a, _, _ in parents])
        if k == SBN_KEY:
            extras[k] = round(float((v * vals).sum()), 6)
        elif k == IN_KEY:
            extras[k] = float(vals.max())
        elif k.endswith("_cst") and np.all(vals > 0):
            extras[k] = round(viscosity_from_vbn_refutas((w * vbn_refutas(vals)).sum()), 6)
        elif k.endswith(("_mg_koh_g", "_ppm", "_ppm_wt", "_mg_kg", "_wt_pct")):
            extras[k] = round(float((w * vals).sum()), 6)
        else:
            dropped.append(k)
    if dropped:
        notes.append(f"not blended (no linear rule, or not given for every parent): {', '.join(sorted(dropped))}")
    return extras
