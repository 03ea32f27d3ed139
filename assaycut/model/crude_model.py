"""The crude model as cutting and the studies read it: the TBP curve on both bases and the density and sulfur
distributions (:class:`CrudeModel`), made by the one model builder (:mod:`assaycut.model.crude`).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..methods.pchip import Pchip, interval_mean
from .distributions import weight_distilled
from .tbp_curve import TbpCurve


@dataclass
class CrudeModel:
    """Whole-crude model used by cutting and the studies.

    Attributes
    ----------
    curve : TbpCurve
        TBP [°C] vs vol % distilled.
    sg_dist : Pchip
        SG 60/60 °F [-] against vol % distilled (narrow cuts as measured, or scaled to the crude).
    sulfur_dist : Pchip or None
        Sulfur [wt %] against wt % distilled (narrow cuts as measured, or scaled to the crude); None without
        narrow-cut or whole-crude sulfur.
    sg : float
        Whole-crude SG 60/60 °F of the model: what its density distribution integrates to, the given SG less
        :attr:`sg_closure`. [-]
    sulfur_wt_pct : float or None
        Whole-crude sulfur of the model (the given value less :attr:`sulfur_closure_wt_pct`). [wt %]
    density_reconciliation_pct, sulfur_reconciliation_pct : float or None
        Scale applied to the density and sulfur distributions, (factor - 1) * 100 [%]: None when the narrow
        cuts are kept as measured and the balance closed by difference (the default).
    density_source : str
        'narrow cuts' or 'constant Watson K'.
    watson_k_fit : float or None
        Watson K fitted to the whole-crude SG when density comes from constant Watson K. [-]
    sulfur_estimated : bool
        Cut sulfur is estimated from the whole-crude sulfur (no narrow-cut sulfur).
    sg_gap_pct, sulfur_gap_wt_pct : float
        The share of the crude no narrow cut covers, where the balance was closed (NaN when scaled or
        estimated). [vol %, wt %]
    sg_closure, sulfur_closure_wt_pct : float
        The whole-crude SG [-] and sulfur [wt %] as given less the model's (what its cuts add up to): the part
        of the balance the narrow cuts, kept as measured, leave open (0 when the distribution is scaled or
        estimated from the whole crude).
    qualities : dict of str to Quality
        The other narrow-cut qualities (:mod:`assaycut.model.quality_distributions`).
    all_on_extension : str
        Why every cut's gravity (and what follows from it: weight yields, Watson K, sulfur, estimates) depends
        on the curve's fitted extension; empty when it does not (:func:`_properties_on_extension`).
    methods : dict
    warnings : list of str
    """

    curve: TbpCurve
    sg_dist: Pchip
    sulfur_dist: Pchip | None
    sg: float
    sulfur_wt_pct: float | None
    density_reconciliation_pct: float | None
    sulfur_reconciliation_pct: float | None
    density_source: str
    watson_k_fit: float | None = None
    all_on_extension: str = ""
    sulfur_estimated: bool = False
    sg_closure: float = 0.0
    sulfur_closure_wt_pct: float = 0.0
    sg_gap_pct: float = float("nan")
    sulfur_gap_wt_pct: float = float("nan")
    qualities: dict = field(default_factory=dict)
    methods: dict[str, str] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)

    @property
    def given_sg(self) -> float:
        """The whole-crude SG 60/60 °F as given: the model's plus the closure. [-]"""
        return self.sg + self.sg_closure

    @property
    def given_sulfur_wt_pct(self) -> float | None:
        """The whole-crude sulfur as given (the model's plus the closure); the model's (from the narrow cuts)
        when none was given; None without any. [wt %]"""
        return None if self.sulfur_wt_pct is None else self.sulfur_wt_pct + self.sulfur_closure_wt_pct

    def balance_notes(self) -> list[str]:
        """How the whole-crude balances were made, one line each, for a report's notes."""
        out = []
        for what, rec, clo, gap, unit, given, digits, basis in (
                ("density", self.density_reconciliation_pct, self.sg_closure, self.sg_gap_pct, "SG", self.given_sg,
                 4, "vol"),
                ("sulfur", self.sulfur_reconciliation_pct, self.sulfur_closure_wt_pct, self.sulfur_gap_wt_pct,
                 "wt %", self.given_sulfur_wt_pct, 3, "wt")):
            if rec is not None:
                out.append(f"{what}: narrow cuts scaled by {rec:+.2f} % to reproduce the whole crude")
            elif np.isfinite(gap) and given is not None:
                out.append(f"{what}: narrow cuts kept as measured; the {gap:.2f} {basis} % of the crude they do not "
                           f"cover closes the balance on the whole-crude {given:.{digits}f} {unit}; the cuts and the "
                           f"whole crude differ by {clo:+.{digits}f} {unit}")
        return out

    def wt_at_vol(self, vol_pct):
        """Cumulative wt % distilled at cumulative ``vol_pct`` [vol %]
        (:func:`~assaycut.model.distributions.weight_distilled`). [wt %]"""
        return weight_distilled(self.sg_dist, self.sg, vol_pct)

    def vol_at_wt(self, wt_pct):
        """Cumulative vol % at cumulative ``wt_pct`` [wt %] (vectorised bisection on W(V)). [vol %]"""
        w = np.asarray(wt_pct, dtype=float)
        lo = np.zeros_like(w)
        hi = np.full_like(w, 100.0)
        for _ in range(50):
            mid = 0.5 * (lo + hi)
            below = self.wt_at_vol(mid) < w
            lo = np.where(below, mid, lo)
            hi = np.where(below, hi, mid)
        return 0.5 * (lo + hi)

    def mean_sg(self, va, vb):
        """Volume-average SG over [va, vb] vol %; the point value for an empty interval. [-]"""
        return interval_mean(self.sg_dist, va, vb)

    def mean_sulfur(self, wa, wb):
        """Weight-average sulfur over [wa, wb] wt %; NaN without a sulfur distribution. [wt %]"""
        if self.sulfur_dist is None:
            return np.full(np.broadcast(np.asarray(wa), np.asarray(wb)).shape, np.nan)
        return interval_mean(self.sulfur_dist, wa, wb)
