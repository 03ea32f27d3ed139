"""Cutting a crude model at a refinery's TBP cut points: per-cut yields and qualities.

All cuts are evaluated together in a few numpy passes (no Python loop per cut or per point).

Per-cut results (one DataFrame row per cut):

* ``vol_pct`` = V(end) - V(start); ``wt_pct`` = W(end) - W(start) with W(V) = ∫ SG dv / SG_crude;
* ``mid_vol_c`` = T at the cut's mid-volume point; ``vabp_c`` = (1/ΔV) ∫ T dV over the cut;
* ``d86_c`` at 0/10/30/50/70/90/95 % of the cut: the cut's own TBP slice converted by Daubert 1994;
* ``meabp_c`` by API TDB 2B1.1 from that D86; ``watson_k`` from MeABP (from the slice's VABP where the cut
  has no D86 estimate: light ends and the open last cut);
* ``sg`` = (1/ΔV) ∫ SG dv; ``api``; ``density_15c_kg_m3``;
* ``sulfur_wt_pct`` = (1/ΔW) ∫ S dw; ``sulfur_share_pct`` = S_cut · wt_pct / S_crude;
* ``mw`` by Riazi-Daubert 1987 within its range;
* ``cetane_index_d4737`` for middle distillates (cut within 150-400 °C TBP);
* ``flash_c_est`` by API TDB 2B7.1 for cuts starting at 150 °C or above (kerosene and heavier);
* ``extrapolated`` where the cut reaches into the curve's extension.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from . import conversions
from .correlations import (average_boiling_points, cetane_index_d4737, flash_point_api_2b7_1,
                           mw_in_range, riazi_daubert_1987_mw, watson_k)
from .crude import D86_STD, CrudeModel
from .errors import CutSetError
from .units import c_to_f, f_to_c, sg_to_api, sg_to_density15

MIDDLE_DISTILLATE_C = (150.0, 400.0)
"""TBP window of a middle distillate, for the cetane index: the cut must lie inside it. [°C]"""
FLASH_FROM_C = 150.0
"""Cuts starting at or above this TBP (kerosene and heavier) get a flash point estimate. [°C]"""
LIGHT_ENDS_MAX_C = 40.0
"""Cuts ending at or below this TBP are light ends: no D86 is estimated for them. [°C]"""

CUT_COLUMNS = ["name", "start_c", "end_c", "vol_pct", "wt_pct", "cum_vol_pct", "cum_wt_pct", "mid_vol_c",
               "vabp_c", "meabp_c", "sg", "api", "density_15c_kg_m3", "watson_k", "sulfur_wt_pct",
               "sulfur_share_pct", "mw", "d86_c", "cetane_index_d4737", "flash_c_est", "extrapolated"]


@dataclass(frozen=True)
class Cut:
    """One cut of a cut set: its name, its TBP end [°C] (None for the last cut) and swing flag."""

    name: str
    end_c: float | None
    swing: bool = False


@dataclass
class CutSet:
    """An ordered list of cuts; each starts where the one before it ends.

    Parameters
    ----------
    cuts : list of Cut
    label : str
        Where the cut set came from (file or 'default'), for messages.
    """

    cuts: list[Cut]
    label: str = "cut set"
    overlaps: dict[str, float] = field(default_factory=dict)
    """TBP 5-95 overlap [°C] at the end of named cuts, for a real column's products (empty: ideal cuts)."""

    def __post_init__(self):
        validate_cut_set(self.cuts, self.label)

    @property
    def names(self) -> list[str]:
        return [c.name for c in self.cuts]

    def reported(self) -> tuple[list[str], np.ndarray]:
        """Names and cut points as reported: each swing cut split at its mid temperature into a light and a
        heavy half, so that a planner can allocate either half to the product below or above. [°C]"""
        names: list[str] = []
        ends: list[float] = []
        start = None
        for c in self.cuts:
            if c.swing:
                mid = 0.5 * (start + c.end_c)
                names += [f"{c.name} (light half)", f"{c.name} (heavy half)"]
                ends += [mid, c.end_c]
            else:
                names.append(c.name)
                ends.append(c.end_c)
            start = c.end_c
        return names, np.array(ends[:-1], dtype=float)

    @property
    def ends_c(self) -> np.ndarray:
        """Cut points (ends of all but the last cut). [°C]"""
        return np.array([c.end_c for c in self.cuts[:-1]], dtype=float)

    def with_ends(self, changes: dict[str, float], label: str | None = None) -> "CutSet":
        """A copy with some cuts' ends changed: {cut name: new end [°C]}."""
        unknown = [n for n in changes if n not in self.names]
        if unknown:
            raise CutSetError(f"{self.label}: no cut named {unknown[0]!r}; the cuts are "
                              f"{', '.join(repr(n) for n in self.names)}")
        if self.cuts and self.cuts[-1].name in changes:
            raise CutSetError(f"{self.label}: the last cut {self.cuts[-1].name!r} runs to the end of the curve "
                              f"and has no end to change")
        cuts = [Cut(c.name, float(changes[c.name]) if c.name in changes else c.end_c, c.swing)
                for c in self.cuts]
        return CutSet(cuts, label or self.label, dict(self.overlaps))


def validate_cut_set(cuts: list[Cut], label: str) -> None:
    """Refuse empty sets, duplicate names, missing ends and cut points that do not increase."""
    if not cuts:
        raise CutSetError(f"{label}: no cuts; give at least one [[cut]] with a name")
    seen = set()
    for i, c in enumerate(cuts):
        if not c.name or not str(c.name).strip():
            raise CutSetError(f"{label}: cut {i + 1} has an empty name")
        if c.name in seen:
            raise CutSetError(f"{label}: duplicate cut name {c.name!r}; each cut needs its own name")
        seen.add(c.name)
        last = i == len(cuts) - 1
        if not last and c.end_c is None:
            raise CutSetError(f"{label}: cut {c.name!r} has no end; only the last cut runs to the end of the curve")
        if last and c.end_c is not None:
            raise CutSetError(f"{label}: the last cut {c.name!r} has an end ({c.end_c:g} °C); the last cut must "
                              f"have none, as it runs to the end of the curve")
        if c.swing and (i == 0 or last):
            raise CutSetError(f"{label}: cut {c.name!r} is marked swing but is the {'first' if i == 0 else 'last'} "
                              f"cut; a swing cut lies between two cut points")
        if c.end_c is not None and not (-273.15 < c.end_c < 1500.0):
            raise CutSetError(f"{label}: cut {c.name!r} ends at {c.end_c:g} °C; expected a TBP between "
                              f"-273.15 and 1500 °C")
    ends = [c.end_c for c in cuts[:-1]]
    for a, b, ca, cb in zip(ends, ends[1:], cuts, cuts[1:]):
        if not b > a:
            raise CutSetError(f"{label}: cut points must increase: {cb.name!r} ends at {b:g} °C, not above "
                              f"{ca.name!r} at {a:g} °C")


DEFAULT_CUTS = [Cut("light ends", 15.0), Cut("light naphtha", 85.0), Cut("heavy naphtha", 177.0),
                Cut("kerosene", 232.0), Cut("diesel", 343.0), Cut("vacuum gas oil", 566.0),
                Cut("vacuum residue", None)]
"""The shipped default cut set: TBP cut points from the usual °F round numbers (15 °C for C4-minus, 185 °F,
350 °F, 450 °F, 650 °F, 1050 °F; common practice, no source)."""


def default_cut_set() -> CutSet:
    """The shipped default cut set (see :data:`DEFAULT_CUTS`)."""
    return CutSet(list(DEFAULT_CUTS), "default cut set")


def d86_from_tbp_slices(tbp: np.ndarray) -> np.ndarray:
    """Daubert 1994 TBP -> D86, vectorised over rows of a (n, 7) array at 0/10/30/50/70/90/95 %.

    Same formulas as :func:`assaycut.conversions.daubert_1994_inverse` (°F; 50 % point anchored, then
    segment differences X = (Y/A)^(1/B)); NaN where the TBP 50 % point is at or below 0 °F.

    Parameters
    ----------
    tbp : numpy.ndarray
        TBP temperatures, shape (n, 7). [°C]

    Returns
    -------
    numpy.ndarray
        D86 temperatures, shape (n, 7). [°C]
    """
    f = c_to_f(np.asarray(tbp, float))
    out = np.full_like(f, np.nan)
    a50, b50 = conversions.D94_50
    with np.errstate(invalid="ignore"):
        out[:, 3] = np.where(f[:, 3] > 0, (f[:, 3] / a50) ** (1.0 / b50), np.nan)
        idx = {p: i for i, p in enumerate(D86_STD)}
        for lo, hi in ((50, 70), (70, 90), (90, 95)):
            a, b = conversions.D94_SEGMENTS[(lo, hi)]
            y = np.maximum(f[:, idx[hi]] - f[:, idx[lo]], 0.0)
            out[:, idx[hi]] = out[:, idx[lo]] + (y / a) ** (1.0 / b)
        for lo, hi in ((30, 50), (10, 30), (0, 10)):
            a, b = conversions.D94_SEGMENTS[(lo, hi)]
            y = np.maximum(f[:, idx[hi]] - f[:, idx[lo]], 0.0)
            out[:, idx[lo]] = out[:, idx[hi]] - (y / a) ** (1.0 / b)
    return f_to_c(out)


def cut_table(model: CrudeModel, cut_set: CutSet):
    """Cut the crude model: one row per cut with yields and qualities (see the module docstring).

    Parameters
    ----------
    model : CrudeModel
    cut_set : CutSet

    Returns
    -------
    pandas.DataFrame
        Columns :data:`CUT_COLUMNS`; ``d86_c`` holds a dict {"0": .., "10": .., ...} [°C] or None.
    """
    names, ends = cut_set.reported()
    return columns_frame(names, {k: v[0] for k, v in cut_columns(model, ends[None, :]).items()})


def columns_frame(names: list[str], cols: dict[str, np.ndarray]):
    """The cut-table DataFrame from one row of :func:`cut_columns`-style arrays (``d86`` as a dict per cut)."""
    import pandas as pd

    df = pd.DataFrame({k: v for k, v in cols.items() if k != "d86"})
    df.insert(0, "name", names)
    df["d86_c"] = [None if not np.all(np.isfinite(r)) else {str(p): float(x) for p, x in zip(D86_STD, r)}
                   for r in cols["d86"]]
    return df[CUT_COLUMNS]


def cut_columns(model: CrudeModel, ends: np.ndarray) -> dict[str, np.ndarray]:
    """Per-cut yields and qualities for many cut-point sets at once.

    Parameters
    ----------
    model : CrudeModel
    ends : numpy.ndarray
        Cut points, shape (m, n-1): m alternative cut sets of n cuts. [°C]

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
    mid_vol_c = np.where(vol > 1e-9, curve.temp_at(0.5 * (va + vb)), np.nan)
    vabp = curve.mean_temp(va, vb)
    sg = model.mean_sg(va, vb)
    sulfur = model.mean_sulfur(wa, wb)
    fr = np.array(D86_STD, float) / 100.0
    slice_v = va[..., None] + fr * vol[..., None]
    tbp = curve.temp_at(slice_v)
    s_crude = np.nan if model.sulfur_wt_pct is None else model.sulfur_wt_pct
    out = {"start_c": t_start, "end_c": t_end, "vol_pct": vol, "wt_pct": wt, "cum_vol_pct": vb, "cum_wt_pct": wb,
           "mid_vol_c": mid_vol_c}
    out.update(derive_qualities(t_start, t_end, vol, wt, vabp, sg, sulfur, tbp, s_crude))
    out["extrapolated"] = curve.is_extrapolated(va, vb) & (vol > 1e-9)
    return out


def derive_qualities(t_start, t_end, vol, wt, vabp, sg, sulfur, tbp, s_crude) -> dict[str, np.ndarray]:
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

    Returns
    -------
    dict of str to numpy.ndarray
        vabp_c, meabp_c, sg, api, density_15c_kg_m3, watson_k, sulfur_wt_pct, sulfur_share_pct, mw, d86,
        cetane_index_d4737, flash_c_est (empty cuts give NaN, a zero sulfur share).
    """
    shape = vol.shape
    has_d86 = np.isfinite(t_end) & ~(t_end <= LIGHT_ENDS_MAX_C) & (vol > 1e-9)
    d86 = d86_from_tbp_slices(tbp.reshape(-1, 7)).reshape(shape + (7,))
    d86 = np.where(has_d86[..., None], d86, np.nan)
    abp = average_boiling_points(np.where(has_d86[..., None], d86, 100.0)[..., 1:6])
    meabp = np.where(has_d86, abp["meabp"], np.nan)
    kw = watson_k(np.where(has_d86, meabp, vabp), sg)
    tb_mw = np.where(has_d86, meabp, vabp)
    mw = np.where(mw_in_range(tb_mw, sg), riazi_daubert_1987_mw(tb_mw, sg), np.nan)
    dens15 = sg_to_density15(sg)
    mid_dist = (np.nan_to_num(t_start, nan=-np.inf) >= MIDDLE_DISTILLATE_C[0]) & \
               (np.nan_to_num(t_end, nan=np.inf) <= MIDDLE_DISTILLATE_C[1]) & has_d86
    cci = np.where(mid_dist, cetane_index_d4737(d86[..., 1], d86[..., 3], d86[..., 5], dens15 / 1000.0), np.nan)
    flash_ok = (np.nan_to_num(t_start, nan=-np.inf) >= FLASH_FROM_C) & has_d86
    flash = np.where(flash_ok, flash_point_api_2b7_1(d86[..., 1]), np.nan)
    with np.errstate(invalid="ignore", divide="ignore"):
        share = sulfur * wt / s_crude
    some = vol > 1e-9
    return {
        "vabp_c": np.where(some, vabp, np.nan), "meabp_c": meabp, "sg": np.where(some, sg, np.nan),
        "api": np.where(some, sg_to_api(sg), np.nan), "density_15c_kg_m3": np.where(some, dens15, np.nan),
        "watson_k": np.where(some, kw, np.nan), "sulfur_wt_pct": np.where(some, sulfur, np.nan),
        "sulfur_share_pct": np.where(some, share, 0.0), "mw": np.where(some, mw, np.nan), "d86": d86,
        "cetane_index_d4737": cci, "flash_c_est": flash,
    }


def closure(df) -> dict[str, float]:
    """Yield closure residuals: Σ vol % - 100, Σ wt % - 100, and Σ(vol·SG)/SG_crude - Σ wt %. [%]"""
    return {"vol_pct": float(df["vol_pct"].sum() - 100.0), "wt_pct": float(df["wt_pct"].sum() - 100.0)}
