"""Blending crudes into a new assay.

Rules (reference sheet §8; API MPMS Ch. 11):

* the blended TBP curve is the fraction-weighted sum of the parents' cumulative curves on the chosen basis
  (volume or weight), evaluated on a temperature grid covering the range every parent measured;
* gravity blends by volume on SG (SG = Σ v_i SG_i), never by averaging API; on a mass basis 1/SG = Σ w_i/SG_i;
* sulfur and other mass-based properties blend by weight; kinematic viscosity by the Refutas blending number
  (Maples 2000), by mass fraction;
* narrow cuts of the blend are built by cutting every parent on common narrow boundaries and blending each
  cut by the same rules;
* optional light-ends shrinkage by API MPMS 12.3 (off by default):
  S[% of total volume] = 4.86e-8 · C · (100 - C)^0.819 · G^2.28, with C the volume percent of the lighter
  crude and G the API difference (coefficients recalled from memory).
"""

from __future__ import annotations

import math

import numpy as np

from .assay import Assay, CurveData, LightEnds, NarrowCuts
from .crude import CrudeModel
from .cutting import cut_columns
from .errors import StudyError
from .lightends import find_component

FRACTION_TOL = 0.01
"""Blend fractions must add up to 100 within this much. [%]"""
GRID_STEP_C = 2.0
"""Spacing of the blended curve's points (plus every parent's own curve nodes). [°C]"""
NARROW_STEP_C = 50.0
"""Spacing of the narrow cuts written for a blend. [°C]"""


def refutas_vbn(nu_cst):
    """Refutas viscosity blending number.

    .. math:: VBN = 14.534 \\ln(\\ln(\\nu + 0.8)) + 10.975

    Parameters
    ----------
    nu_cst : float or array_like
        Kinematic viscosity. [cSt]

    Returns
    -------
    float or numpy.ndarray
        Viscosity blending number. [-]

    Notes
    -----
    Maples, *Petroleum Refinery Process Economics* (2000).  Blend by mass fraction at one temperature.

    Examples
    --------
    The inverse recovers the viscosity (identity):

    >>> round(refutas_viscosity(refutas_vbn(10.0)), 9)
    10.0
    """
    return 14.534 * np.log(np.log(np.asarray(nu_cst, dtype=float) + 0.8)) + 10.975


def refutas_viscosity(vbn):
    """Kinematic viscosity [cSt] from a Refutas blending number: ν = exp(exp((VBN - 10.975)/14.534)) - 0.8."""
    return float(np.exp(np.exp((np.asarray(vbn, dtype=float) - 10.975) / 14.534)) - 0.8)


def shrinkage_mpms_12_3(light_vol_pct: float, api_diff: float) -> float:
    """Volume shrinkage of a light/heavy hydrocarbon blend, API MPMS 12.3 (coefficients from memory).

    .. math:: S = 4.86\\times10^{-8}\\,C\\,(100 - C)^{0.819}\\,G^{2.28}

    Parameters
    ----------
    light_vol_pct : float
        Volume percent of the lighter component. [%]
    api_diff : float
        API gravity difference between the components. [°API]

    Returns
    -------
    float
        Shrinkage as percent of the total (ideal) volume. [%]
    """
    c = float(light_vol_pct)
    return 4.86e-8 * c * (100.0 - c) ** 0.819 * abs(api_diff) ** 2.28


def blend(parents: list[tuple[Assay, CrudeModel, float]], basis: str = "vol", name: str | None = None,
          shrinkage: bool = False) -> Assay:
    """Blend crudes into a new assay that every command can read.

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
    if basis not in ("vol", "wt"):
        raise StudyError(f"basis must be 'vol' or 'wt'; got {basis!r}")
    if len(parents) < 1:
        raise StudyError("a blend needs at least one crude")
    pct = np.array([p for _, _, p in parents], dtype=float)
    if np.any(~np.isfinite(pct)) or np.any(pct <= 0):
        raise StudyError(f"every share must be a positive percent; got {', '.join(f'{p:g}' for p in pct)}")
    if abs(pct.sum() - 100.0) > FRACTION_TOL:
        raise StudyError(f"the shares add up to {pct.sum():g} %, not 100 %: "
                         + " + ".join(f"{a.name} {p:g}" for (a, _, _), p in zip(parents, pct)))
    f = pct / pct.sum()
    sg = np.array([a.sg for a, _, _ in parents])
    if basis == "vol":
        v, w = f, f * sg / (f * sg).sum()
    else:
        w, v = f, (f / sg) / (f / sg).sum()
    sg_blend = float(1.0 / (w / sg).sum())  # same as Σ v SG
    notes = []
    if shrinkage and len(parents) > 1:
        api = 141.5 / sg - 131.5
        light = int(np.argmax(api))
        rest = np.arange(len(parents)) != light
        heavy_sg = (v[rest] * sg[rest]).sum() / v[rest].sum()
        g = api[light] - (141.5 / heavy_sg - 131.5)
        s = shrinkage_mpms_12_3(100.0 * v[light], g)
        sg_blend = sg_blend / (1.0 - s / 100.0)
        notes.append(f"light-ends shrinkage by API MPMS 12.3 (coefficients from memory): {s:.3f} % of volume; "
                     f"the blend SG is raised accordingly, its cut percents are not")
    else:
        notes.append("no light-ends shrinkage applied (API MPMS 12.3 is available as an option)")

    models = [m for _, m, _ in parents]
    # temperature grid: where every parent has measured data
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
    curve = CurveData("TBP", basis, blended, grid, None, "blend")

    # narrow cuts on common boundaries
    bounds = np.unique(np.concatenate([[15.0], np.arange(50.0, t_hi + 1e-9, NARROW_STEP_C), [t_hi]]))
    bounds = bounds[bounds <= t_hi]
    cols = [cut_columns(m, bounds[None, :]) for m in models]
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
    narrow = NarrowCuts(starts, endsb, bvol, bwt, bsg, bs)

    # light ends, by weight of whole crude
    amounts: dict[str, float] = {}
    for (a, _, _), wi in zip(parents, w):
        if a.light_ends is None:
            continue
        for k, x in a.light_ends.amounts.items():
            c = find_component(k)
            wt = x if a.light_ends.basis == "wt" else x * c.sg / a.sg
            amounts[c.key] = amounts.get(c.key, 0.0) + wi * wt
    light = LightEnds(amounts, "wt") if amounts else None

    sulfur = None
    if all(m.sulfur_wt_pct is not None for m in models):
        sulfur = float(sum(wi * m.sulfur_wt_pct for wi, m in zip(w, models)))
    extras: dict[str, float] = {}
    keys = set.intersection(*[set(a.extras) for a, _, _ in parents]) if parents else set()
    dropped = sorted(set().union(*[set(a.extras) for a, _, _ in parents]) - keys)
    for k in sorted(keys):
        vals = np.array([float(a.extras[k]) for a, _, _ in parents])
        if k.endswith("_cst") and np.all(vals > 0):
            extras[k] = round(refutas_viscosity((w * refutas_vbn(vals)).sum()), 6)
        elif k.endswith(("_mg_koh_g", "_ppm", "_ppm_wt", "_mg_kg", "_wt_pct")):
            extras[k] = round(float((w * vals).sum()), 6)
        else:
            dropped.append(k)
    if dropped:
        notes.append(f"not blended (no linear rule, or not given for every parent): {', '.join(sorted(dropped))}")
    label = name or " + ".join(f"{a.name} {p:g}%" for (a, _, _), p in zip(parents, pct))
    notes.insert(0, f"blend on the {basis} basis: " + "; ".join(
        f"{a.name} {p:g} % (sha256 {a.sha256 or 'n/a'})" for (a, _, _), p in zip(parents, pct)))
    notes.append("curve: weighted sum of the parents' cumulative curves where all were measured; gravity by volume "
                 "on SG; sulfur and mass-based properties by weight; viscosity by Refutas")
    return Assay(name=label, sg=sg_blend, curves=[curve], origin="blend of " + ", ".join(a.name for a, _, _ in parents),
                 sulfur_wt_pct=sulfur, narrow_cuts=narrow, light_ends=light, extras=extras, notes=notes)
