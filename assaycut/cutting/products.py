"""Non-ideal fractionation: what a real column makes, with overlapping products.

A real column does not cut at a single TBP: the heavy tail of one product reaches into the next.  Each cut
point is modelled as a smooth split: material boiling at TBP T goes to the products lighter than cut point
c with the fraction

.. math:: S_c(T) = \\Phi\\left(\\frac{T_c - T}{\\sigma_c}\\right),\\qquad \\sigma_c = \\frac{w_c}{2 \\times 1.6449}

where Φ is the standard normal distribution and w_c the TBP *5-95 overlap* of the two neighbouring products
(the TBP span over which the split goes from 95 % to 5 % into the lighter product; a trade measure of
fractionation).  Product k takes S_k(T) - S_{k-1}(T) (with the S made non-decreasing over the cut points),
so at every TBP the fractions add up to one: volume and mass are conserved exactly.  Zero width is the
ideal TBP cut.  The shape (a normal split) is our modelling choice, common practice, no source.

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
from .ideal import LIGHT_ENDS_MAX_C, columns_frame, derive_qualities
from .qualities import product_quality_columns

Z95 = 1.6448536269514722
"""Standard normal quantile of 95 %."""
N_SLICES = 2000
"""Uniform slices of the crude volume used for the integrals (cut points are added as slice edges)."""
TAIL_PCT = 0.5
"""A product's '0 %' TBP point is taken at this percent of the product. [%]"""


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
        TBP 5-95 overlap at each cut point, 0 for an ideal cut, shape (k,). [°C]

    Returns
    -------
    numpy.ndarray
        Shape (n, k + 1); each row adds up to 1.

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
    s = np.maximum.accumulate(s, axis=1)
    full = np.concatenate([np.zeros((s.shape[0], 1)), s, np.ones((s.shape[0], 1))], axis=1)
    return np.diff(full, axis=1)


def widths_for(cut_set: CutSet, overlaps: dict[str, float]) -> np.ndarray:
    """TBP 5-95 overlap at each reported cut point from {cut name: width [°C]} (the width at that cut's end)."""
    names, _ = cut_set.reported()
    plain = cut_set.names
    unknown = [n for n in overlaps if n not in plain]
    if unknown:
        raise CutSetError(f"{cut_set.label}: no cut named {unknown[0]!r} for an overlap; the cuts are "
                          f"{', '.join(repr(n) for n in plain)}")
    if plain[-1] in overlaps:
        raise CutSetError(f"{cut_set.label}: the last cut {plain[-1]!r} has no end, so no overlap")
    bad = {n: w for n, w in overlaps.items() if not (0.0 <= w <= 200.0)}
    if bad:
        n, w = next(iter(bad.items()))
        raise CutSetError(f"{cut_set.label}: overlap {w:g} °C for {n!r} is outside 0-200 °C")
    out = []
    for name in names[:-1]:
        base = name.removesuffix(" (light half)").removesuffix(" (heavy half)")
        out.append(overlaps.get(base, 0.0) if not name.endswith("(light half)") else 0.0)
    return np.array(out, dtype=float)


def fractionate(model: CrudeModel, cut_set: CutSet, overlaps: dict[str, float]):
    """Products of a real column: yields and qualities with overlapping product boundaries.

    Parameters
    ----------
    model : CrudeModel
    cut_set : CutSet
    overlaps : dict of str to float
        TBP 5-95 overlap [°C] at the end of each named cut; cuts not named are ideal.

    Returns
    -------
    (pandas.DataFrame, dict)
        The product table (same columns as :func:`~assaycut.cutting.cut_table`; ``start_c``/``end_c`` are the
        cut points, ``mid_vol_c`` the product's own 50 % TBP) and the product curves: 'temp_c' (slice edges,
        [°C]), 'crude_pct' (crude vol % at the edges), 'fractions' (slices x products), 'cum' (each product's
        cumulative vol % of itself at the edges).
    """
    names, ends = cut_set.reported()
    widths = widths_for(cut_set, overlaps)
    curve = model.curve
    v_cut = np.asarray(curve.pct_at(ends), float)
    edges = np.unique(np.concatenate([np.linspace(0.0, 100.0, N_SLICES + 1), v_cut]))
    va, vb = edges[:-1], edges[1:]
    dv = vb - va
    keep = dv > 1e-12
    va, vb, dv = va[keep], vb[keep], dv[keep]
    t_mean = curve.mean_temp(va, vb)
    mass = model.sg_dist.integral(va, vb)                      # SG x vol % per slice
    wa, wb = model.wt_at_vol(va), model.wt_at_vol(vb)
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
    t_edges = np.concatenate([[curve.temp_at(va[0])], curve.temp_at(vb)])
    cum = np.concatenate([np.zeros((1, f.shape[1])), np.cumsum(f * dv[:, None], axis=0)], axis=0)
    with np.errstate(invalid="ignore", divide="ignore"):
        cum_pct = 100.0 * cum / np.where(vol > 0, vol, 1.0)[None, :]
    pts = np.array(D86_STD, dtype=float)
    pts[0] = TAIL_PCT
    tbp = np.stack([np.interp(pts, cum_pct[:, j], t_edges) for j in range(f.shape[1])])
    mid = np.array([np.interp(50.0, cum_pct[:, j], t_edges) for j in range(f.shape[1])])
    t_start = np.concatenate([[np.nan], ends])
    t_end = np.concatenate([ends, [np.nan]])
    s_crude = np.nan if model.sulfur_wt_pct is None else model.sulfur_wt_pct
    cols = {"start_c": t_start, "end_c": t_end, "vol_pct": vol, "wt_pct": wt, "cum_vol_pct": np.cumsum(vol),
            "cum_wt_pct": np.cumsum(wt), "mid_vol_c": np.where(vol > 1e-9, mid, np.nan)}
    with np.errstate(invalid="ignore", divide="ignore"):
        meabp = meabp_pseudo_components(t_mean, mass / dv, (f * dv[:, None]).T)
    cols.update(derive_qualities(t_start, t_end, vol, wt, vabp, sg, sulfur, tbp, s_crude, meabp))
    gas = (np.isfinite(t_end) & (t_end <= LIGHT_ENDS_MAX_C)) | (vol <= 1e-9)
    vals, est = product_quality_columns(model, (va, vb, wa, wb), f, dv, mass, cols["meabp_c"], cols["sg"],
                                        cols["watson_k"], gas)
    cols.update(vals)
    cols["estimated"] = est
    reach = (f * dv[:, None] > 1e-9 * dv.sum())
    out_of_range = curve.is_extrapolated(va, vb)[:, None]
    cols["extrapolated"] = (np.any(reach & out_of_range, axis=0) | bool(model.all_on_extension)) & (vol > 1e-9)
    curves = {"temp_c": t_edges, "crude_pct": np.concatenate([[va[0]], vb]), "fractions": f, "cum": cum_pct,
              "slice_temp_c": t_mean, "slice_pct": dv}
    return columns_frame(names, cols), curves
