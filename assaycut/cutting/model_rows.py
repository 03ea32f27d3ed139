"""Crude models as the cutting code reads them: R crudes as rows (a library chunk, a block of uncertainty draws),
or one crude as a batch of one.

:func:`~assaycut.cutting.ideal.cut_columns` takes a :class:`BatchModel` and nothing else, so a single assay, a
sweep, an optimiser and a whole library are cut by the same code.
"""

from __future__ import annotations

import numpy as np

from ..model.crude import CrudeModel
from ..model.distributions import weight_distilled
from ..methods.pchip import Pchip, interval_mean
from ..model.tbp_curve import volume_average_temp

__all__ = ["BatchCurve", "BatchModel"]


class BatchCurve:
    """The TBP curves of R crudes (:class:`~assaycut.model.tbp_curve.TbpCurve`'s cutting interface), one per
    row; one crude's curve answers queries of any shape."""

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

    def mean_temp(self, pct_a, pct_b, ta=None, tb=None):
        """Volume-average TBP over [pct_a, pct_b] [vol %] (:func:`~assaycut.model.tbp_curve.volume_average_temp`).
        [°C]"""
        return volume_average_temp(self.spline, pct_a, pct_b, ta, tb)

    def is_extrapolated(self, pct_a, pct_b):
        lo = self.safe_lo.reshape((-1,) + (1,) * (np.ndim(pct_a) - 1))
        hi = self.safe_hi.reshape((-1,) + (1,) * (np.ndim(pct_b) - 1))
        return (np.asarray(pct_b) > hi + 1e-9) | (np.asarray(pct_a) < lo - 1e-9)


class BatchModel:
    """R crude models as the cutting code reads them (:func:`~assaycut.cutting.ideal.cut_columns`): axis 0 of
    every query runs over the crudes.  One crude is a batch of one: its own splines, which answer queries of
    any shape (a sweep's or an optimiser's many cut-point sets).

    Attributes
    ----------
    curve : BatchCurve
    sg_dist, sulfur_dist : Pchip
        SG [-] against vol % and sulfur [wt %] against wt % distilled; ``sulfur_dist.missing`` flags the crudes
        without one.
    sg, sulfur_wt_pct : numpy.ndarray
        Whole crude, (R, 1). [-], [wt %] (NaN: not known)
    on_extension : numpy.ndarray
        (R,) True where every cut's gravity depends on the curve's extension (CrudeModel.all_on_extension).
    row_qualities : list of dict
        Each crude's narrow-cut qualities.
    sulfur_rows_estimated : numpy.ndarray
        (R,) True where the sulfur distribution is estimated from the whole crude.
    sg_rows_estimated : numpy.ndarray
        (R,) True where the density distribution is estimated (a Watson K fitted to the whole crude).
    light_ends_placed : numpy.ndarray
        (R,) True where a light-ends analysis is placed on the curve as pure-component steps (none for the
        rows of uncertainty draws).
    """

    def __init__(self, models: list[CrudeModel]):
        if len(models) == 1:  # a batch of one: the model's own splines
            m = models[0]
            sulfur = m.sulfur_dist
            if sulfur is None:
                sulfur = Pchip([0.0, 1.0], [0.0, 0.0])
                sulfur.missing = np.array([True])
            curve = BatchCurve(None, m.curve.spline, [m.curve.safe_lo], [m.curve.safe_hi])
            sg_dist = m.sg_dist
        else:
            curve = BatchCurve(models)
            sg_dist, sulfur = Pchip.stack([m.sg_dist for m in models]), Pchip.stack([m.sulfur_dist for m in models])
        self._setup(curve, sg_dist, sulfur, [m.sg for m in models],
                    [np.nan if m.sulfur_wt_pct is None else m.sulfur_wt_pct for m in models],
                    [m.all_on_extension != "" for m in models], [m.qualities for m in models],
                    [m.sulfur_estimated for m in models], [m.watson_k_fit is not None for m in models])
        self.light_ends_placed = np.array([m.curve.light_ends_pct > 0 for m in models])

    @classmethod
    def from_rows(cls, sets) -> "BatchModel":
        """The crude models built as rows (the leaf sets of :func:`~assaycut.model.crude.build_draws`), one row
        per model in the sets' order, without narrow-cut qualities."""
        out = cls.__new__(cls)
        cat = lambda name: np.concatenate([getattr(s, name) for s in sets])  # noqa: E731
        curve = BatchCurve(None, Pchip.stack([s.spline for s in sets]), cat("safe_lo"), cat("safe_hi"))
        # a set without a sulfur distribution: zero splines flagged missing (Pchip.stack of None)
        sulfur = Pchip.stack([s.sulfur_dist if s.sulfur_dist is not None else Pchip.stack([None] * s.n)
                              for s in sets])
        n = sum(s.n for s in sets)
        out._setup(curve, Pchip.stack([s.sg_dist for s in sets]), sulfur, cat("sg"),
                   np.concatenate([np.where(s.s_given | (s.sulfur_dist is not None), s.sulfur, np.nan) for s in sets]),
                   np.array([t != "" for s in sets for t in s.on_ext]), [{}] * n,
                   np.concatenate([np.full(s.n, s.estimated) for s in sets]),
                   np.concatenate([~np.isnan(s.kw) for s in sets]))
        out.light_ends_placed = np.zeros(n, dtype=bool)
        return out

    def _setup(self, curve, sg_dist, sulfur_dist, sg, sulfur_wt_pct, on_extension, qualities, estimated,
               sg_estimated):
        self.curve, self.sg_dist, self.sulfur_dist = curve, sg_dist, sulfur_dist
        self.n = len(sg)
        self.sg = np.asarray(sg, dtype=float).reshape(-1, 1)
        self.sulfur_wt_pct = np.asarray(sulfur_wt_pct, dtype=float).reshape(-1, 1)
        self._a0 = self.sg_dist.antiderivative(np.zeros((self.n, 1)))
        self.on_extension = np.asarray(on_extension, dtype=bool)
        self.row_qualities = qualities
        self.sulfur_rows_estimated = np.asarray(estimated, dtype=bool)
        self.sg_rows_estimated = np.asarray(sg_estimated, dtype=bool)

    def _col(self, arr, like):
        return arr.reshape((-1,) + (1,) * (np.ndim(like) - 1))

    def wt_at_vol(self, vol_pct):
        """Cumulative wt % distilled at cumulative ``vol_pct`` [vol %]
        (:func:`~assaycut.model.distributions.weight_distilled`). [wt %]"""
        return weight_distilled(self.sg_dist, self._col(self.sg, vol_pct), vol_pct, self._col(self._a0, vol_pct))

    def mean_sg(self, va, vb):
        """Volume-average SG over [va, vb] vol %; the point value for an empty interval. [-]"""
        return interval_mean(self.sg_dist, va, vb)

    def mean_sulfur(self, wa, wb):
        """Weight-average sulfur over [wa, wb] wt %; NaN for a crude without a sulfur distribution. [wt %]"""
        out = interval_mean(self.sulfur_dist, wa, wb)
        return np.where(self._col(self.sulfur_dist.missing, out), np.nan, out)
