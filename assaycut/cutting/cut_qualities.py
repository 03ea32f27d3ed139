"""Every narrow-cut quality on every cut, and estimates where the narrow cuts do not cover a cut.

A quality measured on the narrow cuts (:mod:`assaycut.model.quality_distributions`) reaches a cut as the inverse of its
blending index's mean over the cut, on the index's basis.  The part of a cut the narrow cuts that measured it
do not cover takes an estimate, blended on the index by the shares (:func:`blend_parts`), so the value moves
continuously with the cut points; the value is then flagged *estimated*.  The estimate is a published
correlation from the cut's MeABP, SG and Watson K, inside the correlation's stated range only
(:mod:`assaycut.methods.fraction_properties`), or, without one, the nearest measured cut's index.  A cut no
narrow cut covers takes the correlation alone.  Viscosities measured at
two temperatures also give the 40 and 100 °C values by ASTM D341 (flagged estimated).
"""

from __future__ import annotations

import numpy as np

from ..methods.blending_indices import VISCOSITY
from ..methods.characterisation import mw_riazi_daubert_1987
from ..methods.d86 import D86_STD
from ..methods.fraction_properties import (
    hydrogen_astm_d3343,
    hydrogen_d3343_in_range,
    hydrogen_in_range,
    hydrogen_riazi_ch,
    aniline_point_api_2b9_1,
    aniline_point_in_range,
    cloud_point_api_2b12_1,
    cloud_point_in_range,
    freeze_point_api_2b11_1,
    freeze_point_in_range,
    pour_point_api_2b8_1,
    pour_point_in_range,
    refractive_index_in_range,
    refractive_index_riazi_daubert_1987,
    smoke_point_api_2b10_1,
    smoke_point_in_range,
    viscosity_api_11a4_2,
    viscosity_d341,
)

GRAVITY_COLUMNS = ("sg", "api", "density_15c_kg_m3", "watson_k")
"""The columns estimated with the density where no narrow cut measured it (a Watson K fitted to the crude)."""
T100F_C, T210F_C = 37.7778, 98.8889
"""100 °F and 210 °F. [°C]"""
STANDARD_VISCOSITY_C = (40.0, 100.0)
"""Temperatures at which a viscosity is always reported (estimated where not measured). [°C]"""
RESIDUE_START_C = (650.0 - 32.0) / 1.8
"""A residue: the open last cut starting at or above 650 °F (atmospheric residue and heavier; common practice,
no source). [°C]"""
RESIDUE_VISCOSITY_C = 135.0
"""The residue's second viscosity temperature, with 100 °C (the trade quotes residues and bitumens at 100 and
135 °C; common practice, no source). [°C]"""

ESTIMATED = {
    "viscosity_40c_cst": "API TDB 11A4.2 (ν at 100/210 °F from MeABP and Kw), moved to 40 °C by ASTM D341",
    "viscosity_100c_cst": "API TDB 11A4.2, moved to 100 °C by ASTM D341",
    "viscosity_135c_cst": "residues only (the open last cut from 650 °F): ASTM D341 through the cut's 100 °C value "
                          "and the nearest other temperature's; a residue's estimated values below 100 °C are left "
                          "empty",
    "pour_point_c": "API TDB 2B8.1 (SG 0.8-1.0, Tb 800-1500 °R, ν100°F 2-960 cSt)",
    "cloud_point_c": "API TDB 2B12.1 (SG 0.77-0.93, Tb 800-1225 °R)",
    "freeze_point_c": "API TDB 2B11.1 (SG 0.74-0.90, Tb 725-1130 °R)",
    "aniline_point_c": "API TDB 2B9.1 (SG 0.7-1.0, Tb 200-1100 °F)",
    "smoke_point_mm": "API TDB 2B10.1 (SG 0.70-0.86, Tb 200-550 °F)",
    "refractive_index_20c": "Riazi-Daubert 1987 parameter I (Tb 80-650 °F)",
    "hydrogen_wt_pct": "ASTM D3343 (API, aromatics, D86 10/50/90 %) on jet-range cuts (D86 90 % <= 300 °C) with "
                       "known aromatics; elsewhere Riazi MNL50 (2005) carbon-to-hydrogen weight ratio correlation "
                       "from MeABP and SG (M 70-700); none on residues",
}
"""The estimated qualities, with the correlation and the range each is used in."""
NOT_ESTIMATED = ("nitrogen, metals, CCR, asphaltenes, wax, acid number, mercaptan sulfur, RVP, octane and PNA are "
                 "not estimated: no correlation at hand covers them within a stated range (PNA: the Riazi-Daubert "
                 "forms' light-fraction coefficients and basis are unsettled)")


def quality_columns(model, va, vb, wa, wb, meabp, sg, kw, gas,
                    only=None) -> tuple[dict[str, np.ndarray], dict[str, np.ndarray]]:
    """Per-cut values of every quality, and which are estimated.

    Parameters
    ----------
    model : BatchModel
        Its ``row_qualities`` and ``sulfur_rows_estimated``.
    va, vb, wa, wb : numpy.ndarray
        Each cut's bounds on the volume and weight bases. [%]
    meabp, sg, kw : numpy.ndarray
        The cut's MeABP [°C], SG [-] and Watson K [-].
    gas : numpy.ndarray
        True for cuts with no D86 estimate (light ends): nothing is estimated for them.
    only : set of str, optional
        Compute only these measured qualities (and the viscosities, which the 40/100 °C values come from);
        the estimates are computed in any case.  A study that reads few qualities saves the rest.

    Returns
    -------
    (dict, dict)
        {quality name: values} and {quality name: estimated flags}, arrays shaped like ``va``.
    """
    estimated: dict[str, np.ndarray] = {}
    some = (vb - va) > 1e-9
    rows = model.row_qualities
    if len(rows) == 1:  # one crude: every row of the queries is a cut set of that crude
        parts = _measured(_wanted(rows[0], only), va, vb, wa, wb, some)
    else:  # row r is crude r, each with its own qualities
        parts = {}
        for r, quals in enumerate(rows):
            for name, (c, icov, iwhole, rule, closed) in _measured(_wanted(quals, only), va[r], vb[r], wa[r], wb[r],
                                                                  some[r]).items():
                if name not in parts:
                    parts[name] = (np.zeros(va.shape), np.full(va.shape, np.nan), np.full(va.shape, np.nan), rule,
                                   np.zeros(va.shape, bool))
                parts[name][0][r], parts[name][1][r], parts[name][2][r], parts[name][4][r] = c, icov, iwhole, closed
    values: dict[str, np.ndarray] = {}
    estimated["sulfur_wt_pct"] = some & model.sulfur_rows_estimated.reshape((-1,) + (1,) * (va.ndim - 1))
    for name in GRAVITY_COLUMNS:  # a density distribution at a fitted Watson K
        estimated[name] = some & model.sg_rows_estimated.reshape((-1,) + (1,) * (va.ndim - 1))
    add_estimates(values, estimated, meabp, sg, kw, some & ~gas, parts)
    if len(rows) == 1:
        close_pna(values, pna_target(rows[0], va, vb))
    else:
        for r, quals in enumerate(rows):
            close_pna(values, pna_target(quals, va[r], vb[r]), r)
    return values, estimated


PNA = ("paraffins_vol_pct", "naphthenes_vol_pct", "aromatics_vol_pct")
"""The hydrocarbon-type shares that add up to the whole of a cut. [vol %]"""


def pna_target(qualities: dict, va, vb):
    """What the paraffins, naphthenes and aromatics of each interval add up to by the narrow cuts: the mean
    over [va, vb] of the narrow cuts' own sums, the cumulative shares taken linearly between their splines'
    nodes (exact over whole narrow cuts). [vol %]; None when the crude lacks one of the three."""
    if not all(n in qualities for n in PNA):
        return None
    with np.errstate(invalid="ignore", divide="ignore"):
        width = np.where(vb - va > 1e-12, vb - va, np.nan)
        return sum(np.interp(vb, qualities[n].cum.x, qualities[n].cum.y)
                   - np.interp(va, qualities[n].cum.x, qualities[n].cum.y) for n in PNA) / width


def close_pna(values: dict, target, row=None) -> None:
    """Paraffins, naphthenes and aromatics of each cut scaled together so that they add up to what the narrow
    cuts add up to (in place).

    Each share is blended on its own (volume-additive, :mod:`assaycut.methods.blending_indices`), and the three
    monotone partition splines do not add up to the spline of the sum where a cut ends inside a narrow cut
    (their sum drifted 95-110 vol % on the development set's crudes).  The target (:func:`pna_target`) is the
    narrow cuts' own sum over the cut: a cut made of whole narrow cuts keeps its measured values (scale 1),
    and a partly covered cut adds up to its narrow cuts' sum (100 vol % where the laboratory's shares do).
    Each share is scaled by target / sum.

    Parameters
    ----------
    values : dict of str to numpy.ndarray
        The cut values; updated where all three shares and the target are present.
    target : numpy.ndarray or None
        Each cut's target sum [vol %] (None: nothing to do).
    row : int, optional
        The row of ``values`` to update (a batch of crudes), else all of it.
    """
    if target is None or not all(n in values for n in PNA):
        return
    sl = slice(None) if row is None else row
    with np.errstate(invalid="ignore", divide="ignore"):
        total = sum(values[n][sl] for n in PNA)
        scale = np.where(np.isfinite(target) & (total > 0), target / total, 1.0)
    for n in PNA:
        values[n][sl] = values[n][sl] * scale


def product_quality_columns(model, slice_bounds, f, dv, mass, meabp, sg, kw, gas):
    """:func:`quality_columns` for real-column products made of slices of the crude.

    Parameters
    ----------
    model : CrudeModel
    slice_bounds : tuple of numpy.ndarray
        (va, vb, wa, wb) of each slice. [%]
    f : numpy.ndarray
        Fraction of each slice in each product, (slices, products).
    dv, mass : numpy.ndarray
        Each slice's volume [vol %] and SG x volume (the weight basis) [-].
    meabp, sg, kw, gas : numpy.ndarray
        Per product, as in :func:`quality_columns`.

    Returns
    -------
    (dict, dict)
        As :func:`quality_columns`: each product's index is the volume- or weight-weighted mean of its slices'
        indices, on the quality's basis.
    """
    va, vb, wa, wb = slice_bounds
    parts = {}
    for name, q in model.qualities.items():
        a, b, w = (wa, wb, mass) if q.rule.basis == "wt" else (va, vb, dv)
        weight = f * w[:, None]
        share, icov = q.covered_index(a, b)
        idx = q.mean_index(a, b)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            total = weight.sum(axis=0)
            covered = (weight * share[:, None]).sum(axis=0)
            parts[name] = (covered / total, (weight * (share * np.nan_to_num(icov))[:, None]).sum(axis=0) / covered,
                           (weight * np.nan_to_num(idx)[:, None]).sum(axis=0) / total, q.rule, q.gaps_closed)
    values: dict[str, np.ndarray] = {}
    estimated: dict[str, np.ndarray] = {}
    some = f.sum(axis=0) > 0
    if model.sulfur_estimated:
        estimated["sulfur_wt_pct"] = some.copy()
    if model.watson_k_fit is not None:
        for name in GRAVITY_COLUMNS:
            estimated[name] = some.copy()
    add_estimates(values, estimated, meabp, sg, kw, some & ~gas, parts)
    target = pna_target(model.qualities, va, vb)
    if target is not None:  # each product's target: its slices' targets, weighted by volume
        with np.errstate(invalid="ignore", divide="ignore"):
            weight = f * dv[:, None]
            close_pna(values, (weight * np.nan_to_num(target)[:, None]).sum(axis=0) / weight.sum(axis=0))
    return values, estimated


def add_estimates(values: dict, estimated: dict, meabp, sg, kw, ok, parts=None) -> None:
    """The narrow-cut qualities of each cut from the part of it the narrow cuts cover, blended with an estimate
    for the rest (:func:`blend_parts`), then the estimated qualities (:data:`ESTIMATED`) where nothing was
    measured, inside each correlation's range and where ``ok``; viscosities measured at two temperatures also
    give the 40 and 100 °C values by ASTM D341.  ``parts``: {quality: (covered share, covered mean index, whole
    mean index, rule, closed)} (:func:`_measured`; a closed distribution is used only where ``ok``)."""
    shape = np.shape(meabp)
    ok = ok & np.isfinite(meabp) & np.isfinite(sg)
    est = _estimates(meabp, sg, kw, ok)
    for name, part in (parts or {}).items():  # no closed values on gases either
        part = (*part[:4], np.asarray(part[4], dtype=bool) & ok)
        values[name], estimated[name] = blend_parts(*part, *est.get(name, (np.full(shape, np.nan), False)))
    _d341_from_measured(values, estimated)
    for name, (v, valid) in est.items():
        have = values.get(name, np.full(shape, np.nan))
        fill = ~np.isfinite(have) & valid & np.isfinite(v)
        values[name] = np.where(fill, v, have)
        estimated[name] = fill | estimated.get(name, np.zeros(shape, bool))


def blend_parts(share, covered_index, whole_index, rule, closed, estimate, valid):
    """A quality of cuts partly covered by the narrow cuts that measured it: the covered part's mean index and
    an estimate for the rest, blended on the quality's index by their shares, I = c I_covered + (1 - c)
    I(estimate); without an estimate for the cut, the rest takes the index of the nearest narrow cut (the
    distribution held flat beyond the measured cuts).  Where the quality's whole-crude balance was closed by
    difference on the uncovered part (``closed``), the rest takes that closed distribution instead, and a cut
    no narrow cut covers takes it too.  Continuous in the cut's ends: a cut wholly covered is its measured
    value, and the share moves with the ends.  Returns the values and whether any part is estimated (c < 1);
    NaN where nothing of the cut is covered and nothing was closed."""
    share = np.asarray(share, dtype=float)
    closed = np.asarray(closed, dtype=bool)
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        ie = rule.to_index(np.asarray(estimate, dtype=float))
        use = np.asarray(valid, dtype=bool) & np.isfinite(ie) & ~closed
        partly = np.where(use, share * np.nan_to_num(covered_index) + (1.0 - share) * ie, whole_index)
        idx = np.where(share >= 1.0, covered_index, np.where((share > 0) | closed, partly, np.nan))
        v = rule.from_index(idx)
    return v, (share < 1.0) & np.isfinite(v)


def _estimates(meabp, sg, kw, ok) -> dict:
    """{quality: (estimate, inside the correlation's range and ``ok``)} for :data:`ESTIMATED`."""
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        nu100f, nu210f = viscosity_api_11a4_2(meabp, kw)
        est = {
            "viscosity_40c_cst": (viscosity_d341(nu100f, T100F_C, nu210f, T210F_C, 40.0), ok),
            "viscosity_100c_cst": (viscosity_d341(nu100f, T100F_C, nu210f, T210F_C, 100.0), ok),
            "pour_point_c": (pour_point_api_2b8_1(sg, meabp, nu100f), ok & pour_point_in_range(sg, meabp, nu100f)),
            "cloud_point_c": (cloud_point_api_2b12_1(sg, meabp), ok & cloud_point_in_range(sg, meabp)),
            "freeze_point_c": (freeze_point_api_2b11_1(sg, meabp, kw), ok & freeze_point_in_range(sg, meabp)),
            "aniline_point_c": (aniline_point_api_2b9_1(sg, meabp, kw), ok & aniline_point_in_range(sg, meabp)),
            "smoke_point_mm": (smoke_point_api_2b10_1(meabp, kw), ok & smoke_point_in_range(sg, meabp)),
            "refractive_index_20c": (refractive_index_riazi_daubert_1987(meabp, sg),
                                     ok & refractive_index_in_range(meabp)),
        }
        mw = mw_riazi_daubert_1987(meabp, sg)
        est["hydrogen_wt_pct"] = (hydrogen_riazi_ch(meabp, sg, mw), ok & hydrogen_in_range(mw))
    return est


def _wanted(qualities: dict, only) -> dict:
    """The qualities named in ``only`` (all when None), with every viscosity when one is wanted (ASTM D341
    needs the measured pair)."""
    if only is None:
        return qualities
    visc = any(VISCOSITY.match(n) for n in only)
    return {n: q for n, q in qualities.items() if n in only or (visc and VISCOSITY.match(n))}


def _measured(qualities: dict, va, vb, wa, wb, some) -> dict[str, tuple]:
    """The narrow-cut qualities of one crude over its cuts: {quality: (covered share, the covered part's mean
    index, the whole cut's mean index, rule, whether its balance was closed on the uncovered part)} (share 0 for
    an empty cut)."""
    out = {}
    for name, q in qualities.items():
        a, b = (wa, wb) if q.rule.basis == "wt" else (va, vb)
        share, icov = q.covered_index(a, b)
        out[name] = (np.where(some, share, 0.0), icov, q.mean_index(a, b), q.rule,
                     np.full(share.shape, q.gaps_closed))
    return out


def _d341_from_measured(values: dict[str, np.ndarray], estimated: dict[str, np.ndarray]) -> None:
    """Viscosities at 40 and 100 °C from the two measured temperatures nearest each, by ASTM D341 (Walther),
    where not measured at that temperature."""
    measured = sorted((float(VISCOSITY.match(n).group(1)), n) for n in values if VISCOSITY.match(n))
    if len(measured) < 2:
        return
    for target in STANDARD_VISCOSITY_C:
        name = f"viscosity_{target:g}c_cst"
        if any(t == target for t, _ in measured):
            continue
        (t1, n1), (t2, n2) = sorted(measured, key=lambda tn: abs(tn[0] - target))[:2]
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            v = viscosity_d341(values[n1], t1, values[n2], t2, target)
        values[name] = v
        estimated[name] = np.isfinite(v)


def residue_estimates(values: dict[str, np.ndarray], estimated: dict[str, np.ndarray], t_start, t_end) -> None:
    """Residues' estimates (in place): viscosities at the trade's temperatures, 100 and 135 °C, and no
    correlation hydrogen.

    For each residue cut (the open last cut, ``t_end`` NaN, starting at or above :data:`RESIDUE_START_C`), ν at
    135 °C by ASTM D341 (Walther) from its ν at 100 °C and its value at the nearest other temperature,
    flagged estimated unless a narrow cut measured it; its *estimated* viscosities below 100 °C are left
    empty (a residue is not handled, nor its viscosity measured, that cold: a correlation's value there
    reads as a fact).  Its estimated hydrogen is left empty too: Riazi's CH form, where a residue's
    extrapolated MeABP keeps M inside 70-700, reads 1.4-3.2 wt % high on the open assays' vacuum residues (3
    records; README accuracy section).  Measured values are kept.

    Parameters
    ----------
    values, estimated : dict of str to numpy.ndarray
        The cut values and their estimated flags (updated).
    t_start, t_end : numpy.ndarray
        Each cut's TBP cut points, shaped like the values (NaN at the IBP and the end of the curve). [°C]
    """
    residue = np.isnan(t_end) & (np.asarray(t_start, dtype=float) >= RESIDUE_START_C)
    if "hydrogen_wt_pct" in estimated:
        drop = residue & estimated["hydrogen_wt_pct"]
        values["hydrogen_wt_pct"] = np.where(drop, np.nan, values["hydrogen_wt_pct"])
        estimated["hydrogen_wt_pct"] = estimated["hydrogen_wt_pct"] & ~drop
    v100 = values.get("viscosity_100c_cst")
    if v100 is None or not residue.any():
        return
    name = f"viscosity_{RESIDUE_VISCOSITY_C:g}c_cst"
    temps = sorted(((float(VISCOSITY.match(n).group(1)), n) for n in values
                    if VISCOSITY.match(n) and n not in (name, "viscosity_100c_cst")),
                   key=lambda tn: abs(tn[0] - RESIDUE_VISCOSITY_C))
    other, t_other = np.full(residue.shape, np.nan), np.full(residue.shape, np.nan)
    for t, n in temps:
        take = np.isnan(other) & np.isfinite(values[n])
        other, t_other = np.where(take, values[n], other), np.where(take, t, t_other)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        est = np.where(residue, viscosity_d341(v100, 100.0, other, t_other, RESIDUE_VISCOSITY_C), np.nan)
    have = values.get(name, np.full(residue.shape, np.nan))
    fill = ~np.isfinite(have) & np.isfinite(est)
    values[name] = np.where(fill, est, have)
    estimated[name] = fill | estimated.get(name, np.zeros(residue.shape, bool))
    for t, n in temps:
        if t < 100.0 and n in estimated:
            cold = residue & estimated[n]
            values[n] = np.where(cold, np.nan, values[n])
            estimated[n] = estimated[n] & ~cold


def add_indices(cols: dict, hydrogen_measured=False) -> None:
    """The values that follow from a cut's other columns.

    - ``n_plus_2a_vol_pct`` = naphthenes + 2 x aromatics [vol %] where the cut has both (common practice, no
      source), estimated where either is.
    - ``hydrogen_wt_pct`` by ASTM D3343 (:func:`~assaycut.methods.fraction_properties.hydrogen_astm_d3343`) on
      jet-range cuts (D86 90 % at or below 300 °C) with known aromatics, where the crude's narrow cuts did not
      measure hydrogen (``hydrogen_measured``: bool, or one per row of a batch); it replaces Riazi's CH estimate
      there and is flagged estimated.  A crude with measured hydrogen keeps it, with Riazi's estimate filling
      the parts of a cut not measured.
    """
    est = cols.get("estimated")
    if "naphthenes_vol_pct" in cols and "aromatics_vol_pct" in cols:
        n, a = np.asarray(cols["naphthenes_vol_pct"], float), np.asarray(cols["aromatics_vol_pct"], float)
        cols["n_plus_2a_vol_pct"] = n + 2.0 * a
        if est is not None:
            est["n_plus_2a_vol_pct"] = (np.asarray(est.get("naphthenes_vol_pct", False))
                                        | np.asarray(est.get("aromatics_vol_pct", False))) \
                & np.isfinite(cols["n_plus_2a_vol_pct"])
    if "aromatics_vol_pct" in cols and "d86" in cols and "hydrogen_wt_pct" in cols:
        d86 = np.asarray(cols["d86"], float)
        i10, i50, i90 = (D86_STD.index(p) for p in (10, 50, 90))
        with np.errstate(invalid="ignore"):
            h = hydrogen_astm_d3343(cols["api"], cols["aromatics_vol_pct"], d86[..., i10], d86[..., i50],
                                    d86[..., i90])
            use = np.isfinite(h) & hydrogen_d3343_in_range(d86[..., i90]) & ~np.asarray(hydrogen_measured, bool)
        cols["hydrogen_wt_pct"] = np.where(use, h, cols["hydrogen_wt_pct"])
        if est is not None:
            est["hydrogen_wt_pct"] = np.asarray(est.get("hydrogen_wt_pct", False)) | use
