"""Cutting a crude model at a refinery's TBP cut points: per-cut yields and qualities.

All cuts are evaluated together in a few numpy passes (no Python loop per cut or per point).

Per-cut results (one row per cut of a :class:`~assaycut.cutting.cut_table.CutTable`):

* ``vol_pct`` = V(end) - V(start); ``wt_pct`` = W(end) - W(start) with W(V) = ∫ SG dv / SG_crude;
* ``tbp_5_c``, ``mid_vol_c``, ``tbp_95_c`` = TBP at 5, 50 and 95 % of the cut's own volume; ``overlap_c`` =
  this cut's TBP 95 % minus the next cut's TBP 5 % (the trade's TBP 5-95 overlap; negative for ideal cuts, a
  gap); ``vabp_c`` = (1/ΔV) ∫ T dV, the volume average of the
  cut's **TBP** curve;
* ``d86_c`` at 0/10/30/50/70/90/95 % of the cut: the cut's own TBP slice converted by Daubert 1994 (not for
  cuts ending at or below 40 °C, nor for the open last cut); ``vabp_d86_c`` = the **D86** volume average
  (T10 + T30 + T50 + T70 + T90)/5 of API TDB 2B1.1, for handbook methods that start from it;
* ``meabp_c``: the mean average boiling point of the cut's own **TBP** curve taken as pseudo-components
  (:func:`~assaycut.methods.characterisation.meabp_pseudo_components`, Gauss-Legendre nodes over the cut), the
  one characterising boiling point of every cut; ``watson_k`` = MeABP[°R]^(1/3) / SG; ``mw`` by
  Riazi-Daubert 1987 at (MeABP, SG) within its range;
* ``sg`` = (1/ΔV) ∫ SG dv; ``api``; ``density_15c_kg_m3``;
* ``sulfur_wt_pct`` = (1/ΔW) ∫ S dw; ``sulfur_share_pct`` = S_cut · wt_pct / S_crude;
* ``cetane_index_d4737`` from the cut's own D86 and density, and ``flash_c_est`` by API TDB 2B7.1 from its
  D86 10 %, for every cut with a D86 estimate; where the inputs lie outside the method's stated scope
  (:data:`~assaycut.methods.product_properties.CCI_RANGE`, ``FLASH_T10_RANGE_C``) the value is still given and
  flagged ``out_of_scope`` (the report names those cuts, and limits on it say so);
* ``extrapolated`` where the cut depends on the curve's extension.
"""

from __future__ import annotations

import numpy as np

from ..methods.characterisation import (
    meabp_pseudo_components,
    mw_in_range,
    mw_riazi_daubert_1987,
    watson_k,
)
from ..methods.d86 import D86_STD, tbp_to_d86_daubert_1994_array
from ..methods.fraction_properties import bmci
from ..methods.product_properties import cci_in_range, cetane_index_d4737, flash_in_range, flash_point_api_2b7_1
from ..model.crude import CrudeModel
from ..model.lightends import find_component
from ..model.tbp_curve import STEP_C
from .model_rows import BatchModel
from ..units import BBL_M3, barrel_mass_t, sg_to_api, sg_to_density15
from .cut_table import CutTable
from .cutset import CutSet
from .cut_qualities import add_indices, quality_columns, residue_estimates

LIGHT_ENDS_MAX_C = 40.0
"""Cuts ending at or below this TBP are light ends: no D86 is estimated for them (D86 does not apply to
gases). [°C]"""
GAUSS_NODES = 16
"""Gauss-Legendre nodes per cut for the pseudo-component MeABP (exact for polynomials of degree 31)."""
_GL_X, _GL_W = np.polynomial.legendre.leggauss(GAUSS_NODES)

FLAG_SETS = ("estimated", "out_of_scope")
"""Per-cut flag sets: {column name: bool array} in the column arrays, each cut's list of flagged columns in the
cut table. ``estimated``: the value rests in whole or part on a correlation where no narrow cut measured it;
``out_of_scope``: a correlation used outside its published scope (the value is indicative only)."""

CUT_COLUMNS = ["name", "start_c", "end_c", "vol_pct", "wt_pct", "cum_vol_pct", "cum_wt_pct", "tbp_5_c",
               "mid_vol_c", "tbp_95_c", "overlap_c", "vabp_c", "vabp_d86_c", "meabp_c", "sg", "api",
               "density_15c_kg_m3", "watson_k", "sulfur_wt_pct", "sulfur_share_pct", "mw", "bmci", "d86_c",
               "cetane_index_d4737", "flash_c_est", "extrapolated"]


def cut_table(model: CrudeModel, cut_set: CutSet) -> CutTable:
    """Cut the crude model: one row per cut with yields and qualities (see the module docstring).

    Parameters
    ----------
    model : CrudeModel
    cut_set : CutSet

    Returns
    -------
    CutTable
        Columns :data:`CUT_COLUMNS`, then the qualities any cut has, then ``estimated``; ``d86_c`` holds a dict
        {"0": .., "10": .., ...} [°C] or None.
    """
    names, ends = cut_set.reported()
    return columns_table(names, first_row(cut_columns(BatchModel([model]), ends[None, :])))


LPG_COLUMNS = (("C3", "lpg_c3_vol_pct"), ("iC4", "lpg_ic4_vol_pct"), ("nC4", "lpg_nc4_vol_pct"))
"""The LPG components of a cut, as shares of the cut: (light-ends key, column). [vol % of the cut]"""


def lpg_steps(model) -> np.ndarray:
    """Where propane, isobutane and n-butane lie on each crude's curve: the vol % bounds of each component's
    pure-component step (:mod:`~assaycut.model.lightends` boiling points, :data:`~assaycut.model.tbp_curve.STEP_C`
    wide), shape (R, 3, 2); NaN for a crude whose curve carries no light-ends analysis.  A component the
    analysis does not list has a step of no width. [vol %]"""
    nbp = np.array([find_component(key).nbp_c for key, _ in LPG_COLUMNS])
    temps = np.stack([nbp - STEP_C, nbp], axis=1).reshape(1, -1)
    v = np.asarray(model.curve.pct_at(np.broadcast_to(temps, (model.n, temps.shape[1]))), float)
    v = v.reshape(model.n, len(LPG_COLUMNS), 2)
    return np.where(model.light_ends_placed[:, None, None], v, np.nan)


def lpg_columns(steps: np.ndarray, va, vb, weights=None) -> dict[str, np.ndarray]:
    """Each product's propane, isobutane and n-butane as shares of its volume (the LPG split), from the
    analysis placed on the curve (:func:`lpg_steps`); NaN for a product with none of the three (or no
    analysis).  Arithmetic: the overlap of each component's step with the product's volume range, over the
    product's volume.

    Parameters
    ----------
    steps : numpy.ndarray
        (R, 3, 2) step bounds. [vol %]
    va, vb : numpy.ndarray
        Volume ranges, (R, n) (cuts) or (slices,) with ``weights``. [vol %]
    weights : numpy.ndarray, optional
        (slices, products): the fraction of each slice in each product (the real column, one crude).

    Returns
    -------
    dict
        {column of :data:`LPG_COLUMNS`: shares [vol % of the product]}.
    """
    va, vb = np.asarray(va, float), np.asarray(vb, float)
    lo = steps[..., 0].reshape(steps.shape[0], 1, -1) if weights is None else steps[0, :, 0][None, :]
    hi = steps[..., 1].reshape(steps.shape[0], 1, -1) if weights is None else steps[0, :, 1][None, :]
    with np.errstate(invalid="ignore", divide="ignore"):
        part = np.clip(np.minimum(vb[..., None], hi) - np.maximum(va[..., None], lo), 0.0, None)
        vol = vb - va
        if weights is not None:
            part = np.einsum("sp,sc->pc", weights, part)
            vol = weights.T @ vol
        share = 100.0 * part / vol[..., None]
        share = np.where((part.sum(axis=-1, keepdims=True) > 1e-9) & np.isfinite(share), share, np.nan)
    return {col: share[..., j] for j, (_, col) in enumerate(LPG_COLUMNS)}


def first_row(cols: dict) -> dict:
    """Row 0 of :func:`cut_columns` output (the :data:`FLAG_SETS` included)."""
    return take_rows(cols, 0)


def take_rows(cols: dict, index) -> dict:
    """:func:`cut_columns` output indexed on its first axis (an int or a slice), flag sets included."""
    return {k: ({n: f[index] for n, f in v.items()} if k in FLAG_SETS else v[index]) for k, v in cols.items()}


def columns_table(names: list[str], cols: dict[str, np.ndarray]) -> CutTable:
    """The cut table from one row of :func:`cut_columns`-style arrays: ``name``, :data:`CUT_COLUMNS` (``d86_c``
    as a dict per cut, None where any point is missing), the quality columns some cut has a value of (sorted),
    and the :data:`FLAG_SETS` (each cut's list of flagged columns)."""
    arrays = {k: np.asarray(v) for k, v in cols.items() if k != "d86" and k not in FLAG_SETS}
    extra = sorted(c for c, v in arrays.items() if c not in CUT_COLUMNS and np.isfinite(v.astype(float)).any())
    out: dict = {"name": list(names)}
    for k in CUT_COLUMNS[1:] + extra:
        out[k] = _d86_dicts(cols["d86"]) if k == "d86_c" else arrays[k]
    for key in FLAG_SETS:
        flags = cols.get(key, {})
        out[key] = [[k for k in sorted(flags) if bool(flags[k][i])] for i in range(len(names))]
    return CutTable(out)


def _d86_dicts(d86) -> list:
    """Each cut's D86 as {"0": .., "10": .., ...} [°C], or None where any point is missing."""
    return [None if not np.all(np.isfinite(r)) else {str(p): float(x) for p, x in zip(D86_STD, r)} for r in d86]


def with_table_d86(cols: dict) -> dict:
    """Cut columns with each cut's D86 all missing where any of its points is, as the cut table holds it
    (the limits then read the same D86 from the columns as from the table)."""
    d86 = np.array(cols["d86"], dtype=float)
    d86[~np.all(np.isfinite(d86), axis=-1)] = np.nan
    return {**cols, "d86": d86}


def cut_columns(model: BatchModel, ends: np.ndarray, only=None) -> dict[str, np.ndarray]:
    """Per-cut yields and qualities for many cut-point sets at once.

    Parameters
    ----------
    model : BatchModel
        One crude (``BatchModel([crude_model])``: ``ends`` are m alternative cut sets of it), or m crudes (row
        r of ``ends`` cuts crude r).
    ends : numpy.ndarray
        Cut points, shape (m, n-1): m cut sets of n cuts. [°C]
    only : set of str, optional
        Measured narrow-cut qualities to compute (default all; see
        :func:`~assaycut.cutting.cut_qualities.quality_columns`).

    Returns
    -------
    dict of str to numpy.ndarray
        Each value has shape (m, n) ('d86': (m, n, 7)).
    """
    ends = np.asarray(ends, float)
    m, k = ends.shape
    nan_col = np.full((m, 1), np.nan)
    t_start = np.concatenate([nan_col, ends], axis=1)
    t_end = np.concatenate([ends, nan_col], axis=1)
    v_cut = np.asarray(model.curve.pct_at(ends), float)
    v_pts = np.concatenate([np.zeros((m, 1)), v_cut, np.full((m, 1), 100.0)], axis=1)
    va, vb = v_pts[:, :-1], v_pts[:, 1:]
    w_pts = model.wt_at_vol(v_pts)
    wa, wb = w_pts[:, :-1], w_pts[:, 1:]
    vol = vb - va
    wt = wb - wa
    curve = model.curve
    fr = np.array(D86_STD + (5,), float) / 100.0
    slice_v = va[..., None] + fr * vol[..., None]
    nodes = 0.5 * (va + vb)[..., None] + 0.5 * vol[..., None] * _GL_X
    mid, ta, tb, tbp_all, t_nodes = _temps_at(curve, [0.5 * (va + vb), va, vb, slice_v, nodes])
    mid_vol_c = np.where(vol > 1e-9, mid, np.nan)
    lpg = lpg_columns(lpg_steps(model), va, vb)
    vabp = curve.mean_temp(va, vb, ta, tb)
    sg = model.mean_sg(va, vb)
    sulfur = model.mean_sulfur(wa, wb)
    tbp = tbp_all[..., :-1]
    s_crude = np.nan if model.sulfur_wt_pct is None else model.sulfur_wt_pct
    meabp = meabp_pseudo_components(t_nodes, model.sg_dist(nodes), _GL_W)
    out = {"start_c": t_start, "end_c": t_end, "vol_pct": vol, "wt_pct": wt, "cum_vol_pct": vb, "cum_wt_pct": wb,
           "mid_vol_c": mid_vol_c}
    out.update(derive_qualities(t_start, t_end, vol, wt, vabp, sg, sulfur, tbp, s_crude, meabp))
    some = vol > 1e-9
    out["tbp_5_c"] = np.where(some, tbp_all[..., -1], np.nan)
    out["tbp_95_c"] = np.where(some, tbp[..., -1], np.nan)
    out["overlap_c"] = np.concatenate([out["tbp_95_c"][:, :-1] - out["tbp_5_c"][:, 1:], nan_col], axis=1)
    gas = ~(np.isfinite(t_end) & ~(t_end <= LIGHT_ENDS_MAX_C)) & ~np.isnan(t_end)
    vals, est = quality_columns(model, va, vb, wa, wb, out["meabp_c"], out["sg"], out["watson_k"],
                                gas | (vol <= 1e-9), only)
    residue_estimates(vals, est, t_start, t_end)
    out.update(vals)
    out["estimated"] = est
    add_indices(out, np.array(["hydrogen_wt_pct" in q for q in model.row_qualities]).reshape(-1, 1))
    out.update(lpg)
    out["extrapolated"] = (curve.is_extrapolated(va, vb) | _all_flag(model, vol)) & (vol > 1e-9)
    return out


def _temps_at(curve, pcts: list[np.ndarray]) -> list[np.ndarray]:
    """``curve.temp_at`` of several arrays of percents in one call (the inverse is pointwise, so the values are
    those of separate calls; row-wise curves keep their rows: the arrays share the leading axis). [°C]"""
    m = pcts[0].shape[0]
    flat = [p.reshape(m, -1) for p in pcts]
    t = curve.temp_at(np.concatenate(flat, axis=1))
    cuts = np.cumsum([f.shape[1] for f in flat])[:-1]
    return [part.reshape(p.shape) for part, p in zip(np.split(t, cuts, axis=1), pcts)]


def _all_flag(model, like) -> np.ndarray:
    """True for every cut of a model whose distributions depend on the extension (row-wise for a batch)."""
    return np.broadcast_to(model.on_extension.reshape((-1,) + (1,) * (np.ndim(like) - 1)), np.shape(like))


def derive_qualities(t_start, t_end, vol, wt, vabp, sg, sulfur, tbp, s_crude, meabp) -> dict[str, np.ndarray]:
    """Qualities that follow from a cut's yields, mean properties and TBP slice, for ideal cuts and real
    products alike (the correlations named in the module docstring).

    Parameters
    ----------
    t_start, t_end : numpy.ndarray
        Cut points around each cut, NaN at the IBP and the end of the curve. [°C]
    vol, wt : numpy.ndarray
        Yields. [vol %], [wt %]
    vabp, sg, sulfur : numpy.ndarray
        Volume-average TBP [°C], mean SG [-], mean sulfur [wt %].
    tbp : numpy.ndarray
        The cut's own TBP at 0/10/30/50/70/90/95 % (last axis of 7). [°C]
    s_crude : float or numpy.ndarray
        Whole-crude sulfur (NaN when unknown). [wt %]
    meabp : numpy.ndarray
        The cut's pseudo-component MeABP from its TBP curve. [°C]

    Returns
    -------
    dict of str to numpy.ndarray
        vabp_c, vabp_d86_c, meabp_c, bmci (Bureau of Mines correlation index from the TBP VABP, not for
        light ends), sg, api, density_15c_kg_m3, watson_k, sulfur_wt_pct, sulfur_share_pct,
        mw, d86, cetane_index_d4737, flash_c_est (empty cuts give NaN, a zero sulfur share), and
        ``out_of_scope`` {column: bool array} for the last two.
    """
    shape = vol.shape
    has_d86 = np.isfinite(t_end) & ~(t_end <= LIGHT_ENDS_MAX_C) & (vol > 1e-9)
    # only cuts with a D86 estimate are converted: a cut point set out of order (an optimiser's trial) gives a
    # cut of negative volume, whose falling TBP slice the conversion would refuse
    slices = np.where(has_d86[..., None], tbp, np.nan)
    d86 = tbp_to_d86_daubert_1994_array(slices.reshape(-1, 7)).reshape(shape + (7,))
    vabp_d86 = np.where(has_d86, d86[..., 1:6].mean(axis=-1), np.nan)
    with np.errstate(invalid="ignore"):
        kw = watson_k(meabp, sg)
        mw = np.where(mw_in_range(meabp, sg), mw_riazi_daubert_1987(meabp, sg), np.nan)
    dens15 = sg_to_density15(sg)
    with np.errstate(invalid="ignore", over="ignore"):
        cci = np.where(has_d86, cetane_index_d4737(d86[..., 1], d86[..., 3], d86[..., 5], dens15 / 1000.0), np.nan)
        flash = np.where(has_d86, flash_point_api_2b7_1(d86[..., 1]), np.nan)
    scope = {"cetane_index_d4737": np.isfinite(cci) & ~cci_in_range(d86[..., 1], d86[..., 3], d86[..., 5], dens15),
             "flash_c_est": np.isfinite(flash) & ~flash_in_range(d86[..., 1])}
    with np.errstate(invalid="ignore", divide="ignore"):
        share = sulfur * wt / s_crude
    some = vol > 1e-9
    gas_cut = np.isfinite(t_end) & (t_end <= LIGHT_ENDS_MAX_C)  # no BMCI for gases
    return {
        "vabp_c": np.where(some, vabp, np.nan), "vabp_d86_c": vabp_d86, "meabp_c": np.where(some, meabp, np.nan),
        "bmci": np.where(some & ~gas_cut, bmci(vabp, sg), np.nan),
        "sg": np.where(some, sg, np.nan),
        "api": np.where(some, sg_to_api(sg), np.nan), "density_15c_kg_m3": np.where(some, dens15, np.nan),
        "watson_k": np.where(some, kw, np.nan), "sulfur_wt_pct": np.where(some, sulfur, np.nan),
        "sulfur_share_pct": np.where(some, share, 0.0), "mw": np.where(some, mw, np.nan), "d86": d86,
        "cetane_index_d4737": cci, "flash_c_est": flash, "out_of_scope": scope,
    }


def add_rates(cuts: CutTable, rate_bbl_per_day: float, crude_sg: float) -> CutTable:
    """The cut table with daily rates for a crude run of ``rate_bbl_per_day`` (barrels at 60 °F).

    bbl_per_day = rate x vol % / 100; m3_per_day = bbl_per_day x 0.158987 m³/bbl (at 60 °F); t_per_day = rate
    x the crude's 60 °F barrel mass (:func:`~assaycut.units.barrel_mass_t`) x wt % / 100 (a mass balance on the
    crude's own gravity).

    Parameters
    ----------
    cuts : CutTable
        A cut table (vol_pct, wt_pct).
    rate_bbl_per_day : float
        Crude run. [bbl/d]
    crude_sg : float
        Whole-crude specific gravity 60/60 °F. [-]

    Returns
    -------
    CutTable
        A copy with ``bbl_per_day``, ``m3_per_day`` and ``t_per_day`` after ``cum_wt_pct``, and the crude
        run in ``attrs["rate_bbl_per_day"]``.
    """
    crude_t = rate_bbl_per_day * barrel_mass_t(crude_sg)
    out = cuts.with_columns("cum_wt_pct", {"bbl_per_day": rate_bbl_per_day * cuts["vol_pct"] / 100.0,
                                            "m3_per_day": rate_bbl_per_day * BBL_M3 * cuts["vol_pct"] / 100.0,
                                            "t_per_day": crude_t * cuts["wt_pct"] / 100.0})
    out.attrs["rate_bbl_per_day"] = float(rate_bbl_per_day)
    return out


def closure(cuts: CutTable) -> dict[str, float]:
    """Yield closure residuals of a cut table: Σ vol % - 100 and Σ wt % - 100. [%]

    Examples
    --------
    >>> closure(CutTable({"vol_pct": np.array([40.0, 60.0]), "wt_pct": np.array([35.0, 65.0])}))
    {'vol_pct': 0.0, 'wt_pct': 0.0}
    """
    return {"vol_pct": float(cuts["vol_pct"].sum() - 100.0), "wt_pct": float(cuts["wt_pct"].sum() - 100.0)}
