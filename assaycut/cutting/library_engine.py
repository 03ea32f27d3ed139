"""The assay-library engine: many crude models cut with one cut set as arrays over assays.

Each model's splines (TBP curve, density and sulfur distributions) are stacked as the rows of one
:class:`~assaycut.model.spline.Pchip` (padded to a common node count); evaluation, exact integrals and
inverses run row-wise over all assays at once, each row's answers its own.  :class:`BatchModel` offers the same interface as
:class:`~assaycut.model.crude.CrudeModel` with the first axis running over assays, so the cutting code
(:func:`~assaycut.cutting.ideal.cut_columns`) serves a single assay, a sweep, and a whole library alike.
"""

from __future__ import annotations

import math

import numpy as np

from ..model.crude import CrudeModel
from ..model.spline import Pchip, interval_mean
from ..model.tbp_curve import TbpCurve
from .cutset import CutSet
from .ideal import cut_columns

CHUNK = 1024
"""Crudes cut together in one pass; a library is cut chunk by chunk."""


class BatchCurve:
    """Row-wise counterpart of :class:`~assaycut.model.tbp_curve.TbpCurve` for many crudes."""

    def __init__(self, models: list[CrudeModel] | None, spline: Pchip | None = None, safe_lo=None,
                 safe_hi=None):
        """From the crudes' models, or (``models`` None) from the rows' spline and the safe ranges [vol %]."""
        if models is not None:
            spline = Pchip.stack([m.curve.spline for m in models])
            safe_lo = [m.curve.safe_lo for m in models]
            safe_hi = [m.curve.safe_hi for m in models]
        self.spline = spline
        self.safe_lo = np.asarray(safe_lo, dtype=float).reshape(-1, 1)
        self.safe_hi = np.asarray(safe_hi, dtype=float).reshape(-1, 1)

    def pct_at(self, temp_c):
        return self.spline(temp_c)

    def temp_at(self, pct):
        return self.spline.inverse(pct)

    mean_temp = TbpCurve.mean_temp  # same formula; works row-wise through temp_at and spline.integral

    def is_extrapolated(self, pct_a, pct_b):
        lo = self.safe_lo.reshape((-1,) + (1,) * (np.ndim(pct_a) - 1))
        hi = self.safe_hi.reshape((-1,) + (1,) * (np.ndim(pct_b) - 1))
        return (np.asarray(pct_b) > hi + 1e-9) | (np.asarray(pct_a) < lo - 1e-9)


class BatchModel:
    """Row-wise counterpart of :class:`~assaycut.model.crude.CrudeModel`: axis 0 runs over the crudes."""

    def __init__(self, models: list[CrudeModel]):
        self._setup(BatchCurve(models), Pchip.stack([m.sg_dist for m in models]),
                    Pchip.stack([m.sulfur_dist for m in models]), [m.sg for m in models],
                    [np.nan if m.sulfur_wt_pct is None else m.sulfur_wt_pct for m in models],
                    [m.all_on_extension != "" for m in models], [m.qualities for m in models],
                    [m.sulfur_estimated for m in models])

    @classmethod
    def from_rows(cls, rows) -> "BatchModel":
        """The batch of draws modelled as arrays (:class:`~assaycut.model.draws.DrawRows`): no narrow-cut
        qualities, sulfur from the narrow cuts."""
        out = cls.__new__(cls)
        n = rows.sg.size
        curve = BatchCurve(None, rows.curve, rows.safe_lo, rows.safe_hi)
        out._setup(curve, rows.sg_dist, rows.sulfur_dist, rows.sg,
                   rows.sulfur_wt_pct, rows.on_extension, [{}] * n, np.zeros(n, dtype=bool))
        return out

    def _setup(self, curve, sg_dist, sulfur_dist, sg, sulfur_wt_pct, on_extension, qualities, estimated):
        self.curve, self.sg_dist, self.sulfur_dist = curve, sg_dist, sulfur_dist
        self.n = sg_dist.rows
        self.sg = np.asarray(sg, dtype=float).reshape(-1, 1)
        self.sulfur_wt_pct = np.asarray(sulfur_wt_pct, dtype=float).reshape(-1, 1)
        self._a0 = self.sg_dist.antiderivative(np.zeros((self.n, 1)))
        self.all_on_extension = np.asarray(on_extension, dtype=bool)
        self.row_qualities = qualities
        self.sulfur_rows_estimated = np.asarray(estimated, dtype=bool)

    def _col(self, arr, like):
        return arr.reshape((-1,) + (1,) * (np.ndim(like) - 1))

    def wt_at_vol(self, vol_pct):
        v = np.asarray(vol_pct, dtype=float)
        return (self.sg_dist.antiderivative(v) - self._col(self._a0, v)) / self._col(self.sg, v)

    mean_sg = CrudeModel.mean_sg  # same formula; works row-wise through sg_dist

    def mean_sulfur(self, wa, wb):
        out = interval_mean(self.sulfur_dist, wa, wb)
        return np.where(self._col(self.sulfur_dist.missing, out), np.nan, out)


def cut_library(models: list[CrudeModel], cut_set: CutSet, only=None) -> tuple[list[str], dict[str, np.ndarray]]:
    """Cut many crude models with one cut set, as arrays over crudes.

    Parameters
    ----------
    models : list of CrudeModel
    cut_set : CutSet
    only : set of str, optional
        Measured narrow-cut qualities to compute (default all; an empty set for none).

    Returns
    -------
    (names, columns)
        The reported cut names and :func:`~assaycut.cutting.ideal.cut_columns` arrays of shape (crudes, cuts)
        ('d86': (crudes, cuts, 7)).
    """
    names, ends = cut_set.reported()
    parts = []
    for i in range(0, len(models), CHUNK):  # fixed-size chunks: time linear in the library, memory bounded
        chunk = models[i:i + CHUNK]
        parts.append(cut_columns(BatchModel(chunk), np.repeat(ends[None, :], len(chunk), axis=0), only=only))
    if len(parts) == 1:
        return names, parts[0]
    out = {k: np.concatenate([p[k] for p in parts], axis=0) for k in parts[0] if k != "estimated"}
    out["estimated"] = {n: np.concatenate([p["estimated"][n] for p in parts], axis=0)
                        for n in parts[0]["estimated"]}
    return names, out


SUMMARY_QUALITIES = [("vol_pct", "vol %"), ("wt_pct", "wt %"), ("api", "API"), ("sulfur_wt_pct", "S wt %"),
                     ("watson_k", "Kw"), ("cetane_index_d4737", "CCI"), ("flash_c_est", "flash est. °C")]
"""Per-cut columns of the library summary, with their short unit-bearing labels."""


def summary_columns(cut_set: CutSet) -> list[str]:
    """The columns of :func:`library_summary` for a cut set."""
    names, _ = cut_set.reported()
    return (["crude", "source", "sha256", "api", "sulfur_wt_pct"]
            + [f"{cut} {label}" for cut in names for _, label in SUMMARY_QUALITIES] + ["extrapolated_cuts"])


def summary_rows(assays, models: list[CrudeModel], cut_set: CutSet) -> list[list]:
    """The rows of :func:`library_summary` as lists of plain values (no pandas), in :func:`summary_columns`
    order; a missing value is NaN."""
    names, cols = cut_library(models, cut_set, only=set())  # the summary reads no narrow-cut quality
    per_cut = np.stack([cols[key][:, j] for j in range(len(names)) for key, _ in SUMMARY_QUALITIES], axis=1)
    return [_summary_line(a, m, values, [n for n, e in zip(names, flags) if e])
            for a, m, values, flags in zip(assays, models, per_cut.tolist(), cols["extrapolated"])]


def summary_row(assay, model: CrudeModel, cuts: list[dict]) -> list:
    """An assay's :func:`summary_rows` row from its ideal cut table already made as row dicts (the library
    engine's values for that assay: the same numbers; None where a value is missing)."""
    return _summary_line(assay, model, [c[key] for c in cuts for key, _ in SUMMARY_QUALITIES],
                         [c["name"] for c in cuts if c["extrapolated"]])


def _summary_line(assay, model: CrudeModel, values: list, flagged: list[str]) -> list:
    """One row in :func:`summary_columns` order: the crude's own columns, the per-cut ``values``, then the
    names of the cuts that use the extension."""
    sulfur = model.sulfur_wt_pct if model.sulfur_wt_pct is not None else math.nan
    return [assay.name, assay.source, assay.sha256, assay.api, sulfur, *values, ", ".join(flagged)]


def library_summary(assays, models: list[CrudeModel], cut_set: CutSet):
    """One row per crude with its yields and key qualities per cut.

    Parameters
    ----------
    assays : list of Assay
    models : list of CrudeModel
    cut_set : CutSet

    Returns
    -------
    pandas.DataFrame
        Columns: crude, source, sha256, api, sulfur_wt_pct, then '<cut> <label>' for each cut and quality of
        :data:`SUMMARY_QUALITIES`, then extrapolated_cuts (:func:`summary_rows` in a DataFrame).
    """
    import pandas as pd

    return pd.DataFrame(summary_rows(assays, models, cut_set), columns=summary_columns(cut_set))
