"""The measured values of many draws of one assay, one row per draw: what the uncertainty study perturbs
(:mod:`assaycut.studies.uncertainty`) and the model builder builds together
(:func:`~assaycut.model.crude.build_draws`, the same stages as every model).
"""

from __future__ import annotations

import copy
from dataclasses import dataclass

import numpy as np

from .assay import Assay

__all__ = ["DrawValues"]


@dataclass
class DrawValues:
    """The measured values of R draws of one assay, one row per draw (the rest of the assay is shared).

    Attributes
    ----------
    percent, temp_c : list of numpy.ndarray
        Per curve of the assay, shape (R, points): cumulative percent [% on the curve's basis] and temperature
        [°C on the curve's method].
    sg : numpy.ndarray
        Whole-crude SG 60/60 °F, shape (R,). [-]
    sulfur_wt_pct : numpy.ndarray or None
        Whole-crude sulfur, shape (R,). [wt %]
    nc_sg, nc_sulfur_wt_pct : numpy.ndarray or None
        Narrow-cut SG [-] and sulfur [wt %], shape (R, cuts).
    """

    percent: list
    temp_c: list
    sg: np.ndarray
    sulfur_wt_pct: np.ndarray | None = None
    nc_sg: np.ndarray | None = None
    nc_sulfur_wt_pct: np.ndarray | None = None

    def assay(self, base: Assay, r: int) -> Assay:
        """Draw ``r`` as an Assay: ``base`` with this row's values (shallow copies; the rest is shared)."""
        a = copy.copy(base)
        a.curves = [copy.copy(c) for c in base.curves]
        for c, p, t in zip(a.curves, self.percent, self.temp_c):
            c.percent, c.temp_c = p[r].copy(), t[r].copy()
        a.sg = float(self.sg[r])
        if self.sulfur_wt_pct is not None:
            a.sulfur_wt_pct = float(self.sulfur_wt_pct[r])
        if base.narrow_cuts is not None:
            a.narrow_cuts = copy.copy(base.narrow_cuts)
            a.narrow_cuts.sg, a.narrow_cuts.sulfur_wt_pct = self.nc_sg[r].copy(), self.nc_sulfur_wt_pct[r].copy()
        return a
