"""Whole-crude balances closed by difference: the narrow cuts stay as measured, and the part of the crude they do
not cover (gaps between cuts, a missing residue or front) takes what the whole-crude value leaves
(:func:`closed_by_difference`, with the rules :data:`DENSITY_CLOSURE` and :data:`SULFUR_CLOSURE`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..methods.pchip import Pchip
from .property_splines import partition_spline_rows
from .rows import Rows, each, row_sum


def closure_text(gap_pct, basis, closure, unit, what, digits) -> str:
    """The methods note's words on how a property's whole-crude balance was closed."""
    text = ""
    if gap_pct > GAP_MIN_PCT:
        text = (f"; the {gap_pct:.2f} {basis} of the crude no cut covers estimated from the cuts around it and "
                f"closed on the whole-crude {what} by least squares")
    if np.isfinite(closure) and abs(closure) >= 0.5 * 10.0 ** -digits:
        text += (f"; the cuts and the whole-crude {what} disagree by {closure:+.{digits}f} {unit} (left as "
                 f"measured)")
    return text


GAP_MIN_PCT = 1e-6
"""A stretch of the crude narrower than this between measured cuts is not a gap, and a measured cut narrower than
this on the curve carries no weight in the distributions. [%]"""


@dataclass(frozen=True)
class Closure:
    """How a property's whole-crude balance is closed on the part of the crude the narrow cuts do not cover.

    The distribution through the measured cuts (:func:`~assaycut.model.property_splines.property_spline_rows`)
    or a prior of the property's own gives each uncovered stretch (a
    *gap*: before the first cut, between two, after the last) a first estimate; the whole-crude value then
    says how much the gaps hold together.  The two are combined by least squares with the stated standard
    deviations: the gaps move by Δ·var_g / (Σ var + var_balance), where Δ = 100·whole-crude value - the first
    estimate's integral over the crude, var_g = (sd_g · width_g)² and var_balance = (100 · ``balance_sd``)².
    A wide gap (a missing residue) thus takes nearly all of the balance (closed by difference), a narrow one
    (a cut held back) keeps nearly its estimate, whose error the balance would multiply by 100/width.  The
    measured cuts stay as measured; what the gaps cannot take is the closure, reported.

    Attributes
    ----------
    interior_sd, end_sd : float
        Standard deviation of a gap's first estimate between two measured cuts and at an end: absolute
        (density, SG [-]) or relative to the estimate (``relative``, sulfur).
    balance_sd : float
        Standard deviation of the whole-crude balance: the whole-crude value's uncertainty and the
        laboratory's own closure between the crude and its cuts; absolute or relative to the whole-crude
        value.
    relative : bool
    """

    interior_sd: float
    end_sd: float
    balance_sd: float
    relative: bool


DENSITY_CLOSURE = Closure(0.010, 0.030, 0.003, False)
"""The density's: a gap's SG estimated to 0.010 between measured cuts and 0.030 at an end, the balance to 0.003
SG (the 25 open development-set assays' cuts add up to their crude's gravity within 0.0021 SG on average, up to
0.0050; the estimates' figures are our choice, set on the same records' held-back cuts)."""
SULFUR_CLOSURE = Closure(0.6, 0.6, 0.01, True)
"""The sulfur's: a gap's first estimate (:func:`log_prior`) uncertain by 60 % (its error on the development
set's held-back cuts averages 45 %), the balance by 1 % of the whole-crude sulfur (our choice: a crude's sulfur
and its cuts' usually close within a few per cent in a laboratory's assay; the development set's close within
0.02 %, so there the gaps are closed nearly by difference)."""


def closed_by_difference(g: Rows, covered_to, total, rule: Closure, prior=None) -> list[Rows]:
    """The property splines of a set with the whole-crude balance closed on the gaps (see :class:`Closure`).

    Row fields read: ``pl``, ``ph``, ``pv`` (the measured cuts, as
    :func:`~assaycut.model.property_splines.property_spline_rows` took them),
    ``pfx``, ``pfy`` (the points held) and ``raw`` (their spline).  ``covered_to`` (R,): the percent up to which
    the light ends cover the crude [%]; ``total`` (R,): the whole-crude value (NaN: none given, the gaps then
    keep their estimate).  Row fields set: ``raw`` (the spline through the cuts and the gaps), ``closure`` (the
    whole-crude value less the spline's, per 100 %; NaN without one) and ``gap_pct`` (the share of the crude
    in gaps [%]).  ``prior(s, a, b)``: the gaps' first estimate, amounts (R, G) over the gaps [a, b]; by default
    the spline's integral, or :func:`log_prior` for a ``relative`` rule.
    """
    g.put(c0=np.asarray(covered_to, dtype=float), total=np.asarray(total, dtype=float))
    out = []
    for s in g.split(np.argsort(g.pl, axis=1, kind="stable")):
        order = np.argsort(s.pl[0], kind="stable")
        lo, hi = s.pl[:, order], s.ph[:, order]
        starts = np.concatenate([s.c0[:, None], np.maximum.accumulate(hi, axis=1)], axis=1)
        ends = np.concatenate([lo, np.full((s.n, 1), 100.0)], axis=1)
        s.put(ga=starts, gb=ends)
        out += each(s.split(ends - starts > GAP_MIN_PCT), _close_set, rule, prior)
    return out


def _close_set(s: Rows, rule: Closure, prior_fn=None) -> list[Rows]:
    gap = s.gb[0] - s.ga[0] > GAP_MIN_PCT
    a, b = s.ga[:, gap], s.gb[:, gap]
    if gap.any():
        _close_gaps(s, a, b, rule, prior_fn)
    out = partition_spline_rows(s, "raw")
    for t in out:
        t.put(closure=(100.0 * t.total - t.raw.integral(np.zeros((t.n, 1)), np.full((t.n, 1), 100.0))[:, 0]) / 100.0,
              gap_pct=row_sum((t.gb - t.ga)[:, gap]))
    return out


def _close_gaps(s: Rows, a, b, rule: Closure, prior_fn) -> None:
    """The gaps [a, b] (R, G) added to the set's intervals with their means closed on the whole crude."""
    gap = s.gb[0] - s.ga[0] > GAP_MIN_PCT
    width = b - a
    prior = (prior_fn(s, a, b) if prior_fn is not None else log_prior(s, a, b) if rule.relative
             else s.raw.integral(a, b))
    measured = row_sum(s.pv * (s.ph - s.pl)) + s.raw.integral(np.zeros((s.n, 1)), s.c0[:, None])[:, 0]
    delta = 100.0 * s.total - measured - row_sum(prior)
    end = (np.flatnonzero(gap) == 0) | (np.flatnonzero(gap) == gap.size - 1)
    target = (prior + gap_moves(delta, prior, width, end, s.total, rule)) / width
    if rule.relative:  # a content is never negative
        target = np.maximum(target, 0.0)
    s.put(pl=np.concatenate([s.pl, a], axis=1), ph=np.concatenate([s.ph, b], axis=1),
          pv=np.concatenate([s.pv, target], axis=1))


def gap_moves(delta, prior, width, end, total, rule: Closure) -> np.ndarray:
    """How much of a whole-crude balance each gap takes, by least squares (:class:`Closure`): gap g moves by
    Δ var_g / (Σ var + var_balance), var_g = (sd_g · |prior_g|)² for a ``relative`` rule, else (sd_g · width_g)²,
    var_balance = (100 · balance_sd · |total|)² (relative) or (100 · balance_sd)².

    Parameters
    ----------
    delta : numpy.ndarray
        (R,) 100 x the whole-crude value less the first estimate's integral over the crude (NaN: no value, no
        move). [value x %]
    prior, width : numpy.ndarray
        (R, G) each gap's first estimate (an amount, value x %) and width [%].
    end : numpy.ndarray
        (G,) True for a gap at an end of the crude (:attr:`Closure.end_sd`), else between two cuts.
    total : numpy.ndarray
        (R,) the whole-crude value.
    rule : Closure

    Returns
    -------
    numpy.ndarray
        (R, G) the amount each gap moves by. [value x %]
    """
    sd = np.where(end, rule.end_sd, rule.interior_sd)[None, :]
    var = (sd * (np.abs(prior) if rule.relative else width)) ** 2
    bal = ((100.0 * rule.balance_sd * (np.abs(total) if rule.relative else np.ones(np.shape(total)))) ** 2)[:, None]
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(np.isfinite(delta)[:, None], delta[:, None] * var / (row_sum(var)[:, None] + bal), 0.0)


PRIOR_SLICES = 8
"""Slices of a gap on which a first estimate is averaged."""


def gap_slices(a, b) -> np.ndarray:
    """The middles of :data:`PRIOR_SLICES` equal slices of each interval [a, b] (R, G): (R, G, PRIOR_SLICES)."""
    frac = (np.arange(PRIOR_SLICES) + 0.5) / PRIOR_SLICES
    return a[:, :, None] + (b - a)[:, :, None] * frac


def log_prior(s: Rows, a, b):
    """A content's first estimate of each gap [a, b] (R, G): its amount (mean x width), the mean of exp(L) with L
    the monotone spline of the logarithm of the measured cuts' values against their middles (held flat beyond
    them), over :data:`PRIOR_SLICES` slices: contents such as sulfur vary by orders of magnitude over the
    crude, about exponentially with boiling point, so a gap between two cuts takes about their geometric
    interpolation."""
    mids = 0.5 * (s.pl + s.ph)
    order = np.argsort(mids[0], kind="stable")
    x = mids[:, order]
    keep = np.concatenate([[True], (x[0, 1:] - x[0, :-1]) > 1e-9])
    logs = Pchip(x[:, keep], np.log(np.maximum(s.pv[:, order][:, keep], 1e-12)))
    q = gap_slices(a, b)
    vals = np.exp(logs(q.reshape(s.n, -1))).reshape(q.shape)
    return row_sum(vals) / PRIOR_SLICES * (b - a)
