"""Non-ideal fractionation: what a real column makes, with overlapping products.

A real column does not cut at a single TBP: the heavy tail of one product reaches into the next.  The trade
measures how well two neighbouring products are fractionated by their *TBP 5-95 overlap*: the lighter
product's TBP 95 % minus the heavier product's TBP 5 %, both on the products' own TBP curves.  A negative
overlap is a gap; an ideal TBP cut gives a gap (its 95 % lies below the cut point, the next cut's 5 % above).

A named boundary is modelled as a smooth split: material boiling at TBP T goes to the products lighter than
cut point c with the fraction

.. math:: S_c(T) = \\Phi\\left(\\frac{T_c - T}{\\sigma_c}\\right),\\qquad \\sigma_c = \\frac{s_c}{2 \\times 1.6449}

where Φ is the standard normal distribution and s_c the split's own width (the TBP span over which the split
goes from 95 % to 5 % into the lighter product).  s_c is solved (:func:`solve_split_widths`) so that the
products' TBP 5-95 overlap comes out as asked, within :data:`OVERLAP_TOL_C`.  Product k takes
S_k(T) - S_{k-1}(T) (with the S made non-decreasing over the cut points), so at every TBP the fractions add up
to one: volume and mass are conserved exactly.  Boundaries not named stay ideal cuts, and a product that
touches no named boundary is the ideal cut exactly (its row is the ideal cut's).  The shape (a normal split)
is our modelling choice, common practice, no source.

The crude is integrated slice by slice (exact slice volumes, masses, sulfur and mean temperatures from the
crude model), and each product gets its own TBP curve with tails; its D86 is then estimated from that TBP by
Daubert 1994 like an ideal cut's, with the 0 % point taken at 0.5 % (a normal tail has no true end).
"""

from __future__ import annotations

import numpy as np

from ..errors import CutSetError
from ..methods.characterisation import meabp_pseudo_components
from ..methods.d86 import D86_STD
from ..model.crude import CrudeModel
from .cutset import CutSet
from .ideal import (
    FLAG_SETS,
    LIGHT_ENDS_MAX_C,
    columns_table,
    cut_columns,
    derive_qualities,
    first_row,
    lpg_columns,
    lpg_steps,
)
from .cut_qualities import add_indices, product_quality_columns, residue_estimates
from .model_rows import BatchModel

Z95 = 1.6448536269514722
"""Standard normal quantile of 95 %."""
N_SLICES = 2000
"""Uniform slices of the crude volume used for the integrals (cut points are added as slice edges)."""
TAIL_PCT = 0.5
"""A product's '0 %' TBP point on a split side is taken at this percent of the product (a normal tail has no
true end); on an ideal side it is the cut point. [%]"""
OVERLAP_TOL_C = 0.05
"""The products' TBP 5-95 overlap meets the asked value within this. [°C]"""
OVERLAP_RANGE_C = (-200.0, 200.0)
"""Accepted TBP 5-95 overlaps. [°C]"""
TBP_POINTS = ("5", "50", "95")
"""Percents of each product's own TBP curve reported as ``tbp_c``. [vol %]"""


def _phi(z):
    from scipy.special import ndtr

    return ndtr(z)


def split_fractions(temp_c, cut_points_c, widths_c):
    """Fraction of the material boiling at each TBP that goes to each product.

    Parameters
    ----------
    temp_c : numpy.ndarray
        TBP temperatures, shape (n,). [°C]
    cut_points_c : numpy.ndarray
        Cut points, increasing, shape (k,). [°C]
    widths_c : numpy.ndarray
        Split width at each cut point (TBP span from 95 % to 5 % into the lighter product), 0 for an ideal
        cut, shape (k,). [°C]

    Returns
    -------
    numpy.ndarray
        Shape (n, k + 1); each row adds up to 1.  A split's tails are cut off at the neighbouring cut
        points.

    Examples
    --------
    At the cut point of a non-ideal split, half goes each way:

    >>> split_fractions(np.array([200.0]), np.array([200.0]), np.array([20.0])).tolist()
    [[0.5, 0.5]]
    """
    t = np.asarray(temp_c, dtype=float)[:, None]
    c = np.asarray(cut_points_c, dtype=float)[None, :]
    w = np.asarray(widths_c, dtype=float)[None, :]
    sigma = w / (2.0 * Z95)
    with np.errstate(divide="ignore", invalid="ignore"):
        soft = _phi((c - t) / np.where(sigma > 0, sigma, 1.0))
    s = np.where(sigma > 0, soft, (t <= c).astype(float))
    # a split's tails stop at the neighbouring cut points: material between two other cut points never
    # reaches past them (so products touching no split keep the ideal cut exactly)
    c_prev = np.concatenate([[-np.inf], c[0, :-1]])[None, :]
    c_next = np.concatenate([c[0, 1:], [np.inf]])[None, :]
    s = np.where(t <= c_prev, 1.0, np.where(t > c_next, 0.0, s))
    s = np.maximum.accumulate(s, axis=1)
    full = np.concatenate([np.zeros((s.shape[0], 1)), s, np.ones((s.shape[0], 1))], axis=1)
    return np.diff(full, axis=1)


def targets_for(cut_set: CutSet, overlaps: dict[str, float]) -> np.ndarray:
    """TBP 5-95 overlap asked at each reported cut point from {cut name: overlap [°C]} (the overlap at that
    cut's end), NaN where the boundary is an ideal cut."""
    names, _ = cut_set.reported()
    plain = cut_set.names
    unknown = [n for n in overlaps if n not in plain]
    if unknown:
        raise CutSetError(f"{cut_set.label}: no cut named {unknown[0]!r} for an overlap; the cuts are "
                          f"{', '.join(repr(n) for n in plain)}")
    if plain[-1] in overlaps:
        raise CutSetError(f"{cut_set.label}: the last cut {plain[-1]!r} has no end, so no overlap")
    lo, hi = OVERLAP_RANGE_C
    bad = {n: w for n, w in overlaps.items() if not (lo <= w <= hi)}
    if bad:
        n, w = next(iter(bad.items()))
        raise CutSetError(f"{cut_set.label}: overlap {w:g} °C for {n!r} is outside {lo:g} to {hi:g} °C")
    out = []
    for name in names[:-1]:
        base = name.removesuffix(" (light half)").removesuffix(" (heavy half)")
        named = base in overlaps and not name.endswith("(light half)")
        out.append(overlaps[base] if named else np.nan)
    return np.array(out, dtype=float)


def crude_slices(model: CrudeModel, ends):
    """The crude in uniform volume slices (:data:`N_SLICES`) with the cut points ``ends`` [°C] as edges:
    {'va', 'vb', 'dv': slice bounds and volumes [vol %], 't_mean': mean TBP [°C], 'mass': SG x vol %,
    'wa', 'wb': bounds on the weight basis [wt %], 't_edges': TBP at the slice edges [°C]}, exact from the
    crude model."""
    curve = model.curve
    v_cut = np.asarray(curve.pct_at(ends), float)
    edges = np.unique(np.concatenate([np.linspace(0.0, 100.0, N_SLICES + 1), v_cut]))
    va, vb = edges[:-1], edges[1:]
    keep = (vb - va) > 1e-12
    va, vb = va[keep], vb[keep]
    sl = {"va": va, "vb": vb, "dv": vb - va, "t_mean": curve.mean_temp(va, vb),
          "mass": model.sg_dist.integral(va, vb), "wa": model.wt_at_vol(va), "wb": model.wt_at_vol(vb)}
    sl["t_edges"] = np.concatenate([[curve.temp_at(va[0])], curve.temp_at(vb)])
    return sl


def product_cum_pct(f, dv):
    """Each product's cumulative volume percent of itself at the slice edges, shape (slices + 1, products)."""
    cum = np.concatenate([np.zeros((1, f.shape[1])), np.cumsum(f * dv[:, None], axis=0)], axis=0)
    with np.errstate(invalid="ignore", divide="ignore"):
        return 100.0 * cum / np.where(cum[-1] > 0, cum[-1], 1.0)[None, :]


def product_tbp_at(cum_pct_j, t_edges, pct) -> float:
    """TBP of a product at ``pct`` % of itself (linear between slice edges)."""
    return float(np.interp(pct, cum_pct_j, t_edges))


def boundary_overlap(sl, ends, widths, b) -> float:
    """The TBP 5-95 overlap at boundary ``b``: TBP 95 % of product b minus TBP 5 % of product b + 1, for the
    crude slices ``sl`` (:func:`crude_slices`), cut points ``ends`` and split widths ``widths``. [°C]"""
    f = split_fractions(sl["t_mean"], ends, widths)[:, b:b + 2]
    cum = product_cum_pct(f, sl["dv"])
    return product_tbp_at(cum[:, 0], sl["t_edges"], 95.0) - product_tbp_at(cum[:, 1], sl["t_edges"], 5.0)


def solve_split_widths(sl, ends, targets, ideal_overlap, label: str, names) -> np.ndarray:
    """Split widths that give each named boundary its asked TBP 5-95 overlap.

    One boundary at a time (Brent's method on its width, the others held), repeated until every boundary
    meets its target within :data:`OVERLAP_TOL_C`; neighbouring boundaries interact only through the
    products between them.

    Parameters
    ----------
    sl : dict
        Slices (:func:`crude_slices`).
    ends : numpy.ndarray
        Cut points. [°C]
    targets : numpy.ndarray
        Asked overlap per boundary, NaN for an ideal one. [°C]
    ideal_overlap : numpy.ndarray
        The ideal cuts' overlap per boundary (the sharpest possible). [°C]
    label : str
        Cut-set name, for errors.
    names : list of str
        Product names, for errors.

    Returns
    -------
    numpy.ndarray
        Split width per boundary, 0 at ideal ones. [°C]
    """
    from scipy.optimize import brentq

    widths = np.zeros(len(ends))
    named = [b for b in range(len(ends)) if np.isfinite(targets[b])]
    for b in named:
        if targets[b] < ideal_overlap[b] - OVERLAP_TOL_C:
            raise CutSetError(f"{label}: overlap {targets[b]:g} °C for {names[b]!r} is sharper than an ideal cut, "
                              f"which gives {ideal_overlap[b]:.1f} °C ({names[b]} TBP 95 % minus {names[b + 1]} "
                              f"TBP 5 %)")
    for _ in range(20):
        worst = 0.0
        for b in named:
            def g(w, b=b):
                trial = widths.copy()
                trial[b] = w
                return boundary_overlap(sl, ends, trial, b) - targets[b]

            if abs(g(widths[b])) <= OVERLAP_TOL_C / 4:
                continue
            if g(0.0) >= 0.0:
                widths[b] = 0.0
                continue
            hi = 10.0
            while g(hi) < 0.0:
                hi *= 2.0
                if hi > 5000.0:
                    raise CutSetError(f"{label}: overlap {targets[b]:g} °C for {names[b]!r} cannot be reached "
                                      f"on this crude")
            widths[b] = brentq(g, 0.0, hi, xtol=1e-4)
        for b in named:
            worst = max(worst, abs(boundary_overlap(sl, ends, widths, b) - targets[b]) if widths[b] > 0 else 0.0)
        if worst <= OVERLAP_TOL_C:
            return widths
    raise CutSetError(f"{label}: the overlaps asked could not all be met together (worst by {worst:.2f} °C)")


def fractionate(model: CrudeModel, cut_set: CutSet, overlaps: dict[str, float]):
    """Products of a real column: yields and qualities with overlapping product boundaries.

    Parameters
    ----------
    model : CrudeModel
    cut_set : CutSet
    overlaps : dict of str to float
        TBP 5-95 overlap [°C] at the end of each named cut (lighter product's TBP 95 % minus the heavier
        product's TBP 5 %, on their own curves; negative: a gap); cuts not named are ideal.

    Returns
    -------
    (CutTable, dict)
        The product table (same columns as :func:`~assaycut.cutting.cut_table`; ``start_c``/``end_c`` are the
        cut points, ``mid_vol_c`` the product's own 50 % TBP; products touching no named boundary are the ideal
        cut's rows) and the product curves: 'temp_c' (slice edges, [°C]), 'crude_pct' (crude vol % at the
        edges), 'fractions' (slices x products), 'cum' (each product's cumulative vol % of itself at the
        edges), 'split_width_c' (the solved split widths).
    """
    names, ends = cut_set.reported()
    targets = targets_for(cut_set, overlaps)
    batch = BatchModel([model])
    ideal = first_row(cut_columns(batch, ends[None, :]))
    sl = crude_slices(model, ends)
    widths = solve_split_widths(sl, ends, targets, ideal["overlap_c"][:-1], cut_set.label, names)
    va, vb, dv, t_mean, mass, wa, wb = (sl[k] for k in ("va", "vb", "dv", "t_mean", "mass", "wa", "wb"))
    if model.sulfur_dist is not None:
        s_mass = model.sulfur_dist.integral(wa, wb) * model.sg  # sulfur x SG x vol % per slice
    else:
        s_mass = np.full_like(dv, np.nan)
    f = split_fractions(t_mean, ends, widths)                  # (slices, products)
    vol = f.T @ dv
    pmass = f.T @ mass
    with np.errstate(invalid="ignore", divide="ignore"):
        sg = pmass / vol
        sulfur = (f.T @ s_mass) / pmass
        vabp = (f.T @ (t_mean * dv)) / vol
    wt = pmass / model.sg
    t_edges = sl["t_edges"]
    cum_pct = product_cum_pct(f, dv)
    split = np.isfinite(targets) & (widths > 0)
    lower_split = np.concatenate([[False], split])
    upper_split = np.concatenate([split, [False]])
    t_start = np.concatenate([[np.nan], ends])
    t_end = np.concatenate([ends, [np.nan]])
    pts = np.array(D86_STD, dtype=float)
    tbp = np.stack([np.interp(pts, cum_pct[:, j], t_edges) for j in range(f.shape[1])])
    for j in range(f.shape[1]):  # an ideal side starts at the cut point itself (the crude's IBP for the first)
        if not lower_split[j]:
            tbp[j, 0] = t_start[j] if j > 0 else float(model.curve.temp_at(0.0))
        else:
            tbp[j, 0] = np.interp(TAIL_PCT, cum_pct[:, j], t_edges)
    tbp_pts = np.stack([[product_tbp_at(cum_pct[:, j], t_edges, float(p)) for p in TBP_POINTS]
                        for j in range(f.shape[1])])
    s_crude = np.nan if model.sulfur_wt_pct is None else model.sulfur_wt_pct
    cols = {"start_c": t_start, "end_c": t_end, "vol_pct": vol, "wt_pct": wt, "cum_vol_pct": np.cumsum(vol),
            "cum_wt_pct": np.cumsum(wt), "mid_vol_c": np.where(vol > 1e-9, tbp_pts[:, 1], np.nan)}
    with np.errstate(invalid="ignore", divide="ignore"):
        meabp = meabp_pseudo_components(t_mean, mass / dv, (f * dv[:, None]).T)
    cols.update(derive_qualities(t_start, t_end, vol, wt, vabp, sg, sulfur, tbp, s_crude, meabp))
    cols["tbp_5_c"], cols["tbp_95_c"] = tbp_pts[:, 0], tbp_pts[:, 2]
    gas = (np.isfinite(t_end) & (t_end <= LIGHT_ENDS_MAX_C)) | (vol <= 1e-9)
    vals, est = product_quality_columns(model, (va, vb, wa, wb), f, dv, mass, cols["meabp_c"], cols["sg"],
                                        cols["watson_k"], gas)
    residue_estimates(vals, est, t_start, t_end)
    cols.update(vals)
    cols["estimated"] = est
    add_indices(cols, "hydrogen_wt_pct" in model.qualities)
    cols.update(lpg_columns(lpg_steps(batch), va, vb, f))
    reach = (f * dv[:, None] > 1e-9 * dv.sum())
    out_of_range = model.curve.is_extrapolated(va, vb)[:, None]
    cols["extrapolated"] = (np.any(reach & out_of_range, axis=0) | bool(model.all_on_extension)) & (vol > 1e-9)
    untouched = ~(lower_split | upper_split)
    for k in list(cols):  # a product touching no split is the ideal cut, exactly
        if k in FLAG_SETS:
            for q, flags in cols[k].items():
                flags[untouched] = np.asarray(ideal[k][q])[untouched]
        elif k in ideal:
            cols[k] = np.where(untouched[:, None] if np.ndim(cols[k]) == 2 else untouched, ideal[k], cols[k])
    cols["overlap_c"] = np.concatenate([cols["tbp_95_c"][:-1] - cols["tbp_5_c"][1:], [np.nan]])
    curves = {"temp_c": t_edges, "crude_pct": np.concatenate([[va[0]], vb]), "fractions": f, "cum": cum_pct,
              "slice_temp_c": t_mean, "slice_pct": dv, "split_width_c": widths}
    return columns_table(names, cols), curves
