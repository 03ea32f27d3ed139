"""The assay-library engine: many crude models cut with one cut set as arrays over assays.

Each model's splines (TBP curve, density and sulfur distributions) are padded to a common node count and
stacked; evaluation, exact integrals and inverses run row-wise over all assays at once, using one flat
``searchsorted`` on row-offset nodes.  :class:`BatchModel` offers the same interface as
:class:`~assaycut.model.crude.CrudeModel` with the first axis running over assays, so the cutting code
(:func:`~assaycut.cutting.ideal.cut_columns`) serves a single assay, a sweep, and a whole library alike.
"""

from __future__ import annotations

import math

import numpy as np

from ..model.crude import CrudeModel
from ..model.spline import (
    Pchip,
    hermite_basis,
    hermite_combine,
    hermite_solve,
    INVERSE_TABLE_STEPS,
    interval_mean,
    inverse_table,
    newton_on_segment,
    segment_antiderivative,
    segment_integrals,
)
from ..model.tbp_curve import TbpCurve
from .cutset import CutSet
from .ideal import cut_columns

CHUNK = 1024
"""Crudes cut together in one pass; a library is cut chunk by chunk."""


class BatchPchip:
    """Many monotone cubic Hermite interpolants evaluated row-wise (row r of a query uses spline r).

    Parameters
    ----------
    splines : list of Pchip
        One per row; None rows are filled with a zero spline and flagged in ``missing``.
    """

    def __init__(self, splines: list[Pchip | None]):
        n = len(splines)
        missing = np.array([s is None for s in splines])
        real = [s if s is not None else Pchip([0.0, 1.0], [0.0, 0.0]) for s in splines]
        lens = np.array([s.x.size for s in real])
        k = int(lens.max())
        inside = np.arange(k)[None, :] < lens[:, None]
        X = np.zeros((n, k))
        Y = np.zeros((n, k))
        D = np.zeros((n, k))
        X[inside] = np.concatenate([s.x for s in real])
        Y[inside] = np.concatenate([s.y for s in real])
        D[inside] = np.concatenate([s.d for s in real])
        last = lens - 1
        rows = np.arange(n)
        # padding: flat continuation past each spline's last node
        hi = X[rows, last]
        extra = np.arange(k)[None, :] - last[:, None]
        self._setup(np.where(inside, X, hi[:, None] + extra), np.where(inside, Y, Y[rows, last][:, None]), D, hi,
                    missing)

    @classmethod
    def from_rows(cls, x, y, d, lens=None) -> "BatchPchip":
        """The batch of the splines whose nodes [unit of x], values and slopes are the rows of x, y, d (R, n),
        as made by the PCHIP construction (:func:`~assaycut.model.spline.slopes_on_rows`); ``lens``: each row's
        node count when rows are padded past it as this class pads them (default: none is).  Equal to the
        batch of their Pchip objects."""
        x = np.asarray(x, float)
        last = np.full(x.shape[0], x.shape[1] - 1) if lens is None else np.asarray(lens) - 1
        out = cls.__new__(cls)
        out._setup(x, np.asarray(y, float), np.asarray(d, float), x[np.arange(x.shape[0]), last],
                   np.zeros(x.shape[0], dtype=bool))
        return out

    def _setup(self, X, Y, D, hi, missing):
        """Set the padded node arrays (R, k), each row's last real node ``hi`` and the rows missing."""
        n, k = X.shape
        self.missing = missing
        self.lo, self.hi = X[:, 0].copy(), hi
        self.X, self.Y, self.D = X, Y, D
        self.H = np.diff(X, axis=1)
        self.C = np.concatenate([np.zeros((n, 1)), np.cumsum(segment_integrals(self.H, Y, D), axis=1)], axis=1)
        span = float(np.max(X) - np.min(X)) + 10.0
        self.off = np.arange(n)[:, None] * span
        self.flat = (X + self.off).ravel()
        self.n, self.k = n, k
        self._inv = None

    def _rows(self, q):
        q = np.asarray(q, dtype=float)
        if q.ndim == 0 or q.shape[0] != self.n:
            q = np.broadcast_to(q, (self.n,) + (q.shape if q.ndim else ()))
        return q.reshape(self.n, -1), q.shape

    def _locate(self, q2):
        q2 = np.clip(q2, self.lo[:, None], self.hi[:, None])
        g = np.searchsorted(self.flat, (q2 + self.off).ravel(), side="right").reshape(q2.shape) - 1
        i = np.clip(g - np.arange(self.n)[:, None] * self.k, 0, self.k - 2)
        rows = np.broadcast_to(np.arange(self.n)[:, None], i.shape)
        h = self.H[rows, i]
        t = (q2 - self.X[rows, i]) / h
        return rows, i, t, h

    def _hermite(self, rows, i, t, h):
        return hermite_combine(hermite_basis(t), self.Y[rows, i], self.Y[rows, i + 1], h * self.D[rows, i],
                               h * self.D[rows, i + 1])

    def __call__(self, q):
        q2, shape = self._rows(q)
        return self._hermite(*self._locate(q2)).reshape(shape)

    def antiderivative(self, q):
        """Row-wise integral from each row's first node, constant continuation outside the nodes."""
        q2, shape = self._rows(q)
        below = np.minimum(q2 - self.lo[:, None], 0.0) * self.Y[:, :1]
        above = np.maximum(q2 - self.hi[:, None], 0.0) * self.Y[:, -1:]
        rows, i, t, h = self._locate(q2)
        part = segment_antiderivative(t, h, self.Y[rows, i], self.Y[rows, i + 1], self.D[rows, i],
                                      self.D[rows, i + 1])
        return (self.C[rows, i] + part + below + above).reshape(shape)

    def integral(self, a, b):
        return self.antiderivative(b) - self.antiderivative(a)

    def inverse(self, yq):
        """Row-wise x where the (non-decreasing) spline reaches ``yq``; the left end of flat steps.

        The method of :meth:`~assaycut.model.spline.Pchip.inverse`, row-wise: a table of every spline at
        :data:`~assaycut.model.spline.INVERSE_TABLE_STEPS` points per segment (made once) brackets the root,
        Newton steps on the segment's cubic finish it, and any point not converged is solved by
        :func:`~assaycut.model.spline.hermite_solve` (:meth:`inverse_reference`, which it is tested against).
        """
        q2, shape = self._rows(yq)
        ymin, ymax = self.Y[:, :1], self.Y[:, -1:]
        q2 = np.clip(q2, ymin, ymax)
        ys, yoff = self._table()
        k = INVERSE_TABLE_STEPS
        width = ys.shape[1]
        rows = np.broadcast_to(np.arange(self.n)[:, None], q2.shape)
        g = np.searchsorted((ys + yoff).ravel(), (q2 + yoff).ravel(), side="left").reshape(q2.shape) - 1
        j = np.clip(g - rows * width, 0, width - 2)
        i = np.minimum(j // k, self.k - 2)
        h = self.H[rows, i]
        y0, y1 = self.Y[rows, i], self.Y[rows, i + 1]
        m0, m1 = h * self.D[rows, i], h * self.D[rows, i + 1]
        t = newton_on_segment(y0, y1, m0, m1, q2, ys[rows, j], ys[rows, j + 1], (j - i * k) / k)
        x = self.X[rows, i] + t * h
        x = np.where(q2 == y1, self.X[rows, i + 1], x)
        x = np.where(q2 == y0, self.X[rows, i], x)
        return x.reshape(shape)

    def _table(self):
        """Each row's spline at INVERSE_TABLE_STEPS points per segment and at its last node, made once, and the
        row offsets that let one flat search serve every row."""
        if self._inv is None:
            ys = inverse_table(self.Y, self.H, self.D)
            span = float(np.max(ys) - np.min(ys)) + 10.0
            self._inv = (ys, np.arange(self.n)[:, None] * span)
        return self._inv

    def inverse_reference(self, yq):
        """The reference row-wise inverse: :func:`~assaycut.model.spline.hermite_solve` on the segment found by
        a search of the nodes."""
        q2, shape = self._rows(yq)
        ymin, ymax = self.Y[:, :1], self.Y[:, -1:]
        q2 = np.clip(q2, ymin, ymax)
        yspan = float(np.max(self.Y) - np.min(self.Y)) + 10.0
        yoff = np.arange(self.n)[:, None] * yspan
        g = np.searchsorted((self.Y + yoff).ravel(), (q2 + yoff).ravel(), side="left").reshape(q2.shape) - 1
        i = np.clip(g - np.arange(self.n)[:, None] * self.k, 0, self.k - 2)
        rows = np.broadcast_to(np.arange(self.n)[:, None], i.shape)
        h = self.H[rows, i]
        t = hermite_solve(self.Y[rows, i], self.Y[rows, i + 1], h * self.D[rows, i], h * self.D[rows, i + 1], q2)
        x = self.X[rows, i] + t * h
        x = np.where(q2 == self.Y[rows, i + 1], self.X[rows, i + 1], x)
        x = np.where(q2 == self.Y[rows, i], self.X[rows, i], x)
        return x.reshape(shape)


class BatchCurve:
    """Row-wise counterpart of :class:`~assaycut.model.tbp_curve.TbpCurve` for many crudes."""

    def __init__(self, models: list[CrudeModel] | None, spline: BatchPchip | None = None, safe_lo=None,
                 safe_hi=None):
        """From the crudes' models, or (``models`` None) from the batch spline and the safe ranges [vol %]."""
        if models is not None:
            spline = BatchPchip([m.curve.spline for m in models])
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
        self._setup(BatchCurve(models), BatchPchip([m.sg_dist for m in models]),
                    BatchPchip([m.sulfur_dist for m in models]), [m.sg for m in models],
                    [np.nan if m.sulfur_wt_pct is None else m.sulfur_wt_pct for m in models],
                    [m.all_on_extension != "" for m in models], [m.qualities for m in models],
                    [m.sulfur_estimated for m in models])

    @classmethod
    def from_rows(cls, rows) -> "BatchModel":
        """The batch of draws modelled as arrays (:class:`~assaycut.model.draws.DrawRows`): no narrow-cut
        qualities, sulfur from the narrow cuts."""
        out = cls.__new__(cls)
        n = rows.sg.size
        curve = BatchCurve(None, BatchPchip.from_rows(*rows.curve), rows.safe_lo, rows.safe_hi)
        out._setup(curve, BatchPchip.from_rows(*rows.sg_dist), BatchPchip.from_rows(*rows.sulfur_dist), rows.sg,
                   rows.sulfur_wt_pct, rows.on_extension, [{}] * n, np.zeros(n, dtype=bool))
        return out

    def _setup(self, curve, sg_dist, sulfur_dist, sg, sulfur_wt_pct, on_extension, qualities, estimated):
        self.curve, self.sg_dist, self.sulfur_dist = curve, sg_dist, sulfur_dist
        self.n = sg_dist.n
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
