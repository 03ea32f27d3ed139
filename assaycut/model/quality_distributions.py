"""Distributions of the narrow-cut qualities other than gravity and sulfur, and the sulfur estimate of a crude
given with whole-crude sulfur only.

Each quality's distribution is held as the *cumulative* amount of its blending index
(:mod:`assaycut.methods.blending_indices`) against percent distilled on the index's own basis (weight or
volume): a monotone PCHIP through the narrow cuts' edges, where it equals the sum of index x width of the cuts
below (a conservative "histospline").  Its mean over any cut is (C(b) - C(a))/(b - a), so every narrow cut's
index is reproduced exactly and a cut made of whole narrow cuts returns exactly the rule's blend of them;
inside a narrow cut the index varies smoothly.  Gaps between narrow cuts, and the crude beyond the outermost
ones, take the nearest cut's index (those parts are not covered: :meth:`Quality.covered_index`).  A whole-crude
value of the same name on the crude sheet, where the narrow cuts cover the whole crude, scales the index
distribution to reproduce it (as sulfur is reconciled), and the scale is reported.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..methods.blending_indices import BlendRule, rule_for
from ..methods.pchip import Pchip
from .assay import Assay
from .distributions import narrow_cut_positions, sulfur_shape, weight_distilled
from .closure import GAP_MIN_PCT, Closure, gap_moves
from .property_splines import property_spline_rows
from .rows import Rows
from .tbp_curve import volume_average_temp



FULL_SHARE_TOL = 1e-9
"""A cut covered but for this share of it (the rounding of its ends on the weight basis) is wholly covered."""


@dataclass
class Quality:
    """One quality's distribution over the crude.

    Attributes
    ----------
    name : str
        Column name (with its unit), e.g. 'nitrogen_wt_ppm'.
    rule : BlendRule
    cum : Pchip
        Cumulative blending index (index x percent) against percent distilled on ``rule.basis``, 0-100 %.
    covered : numpy.ndarray
        (k, 2) intervals on that basis covered by narrow cuts that measured the quality. [%]
    reconciliation_pct : float or None
        Scale applied to reproduce the whole-crude value, (factor - 1) x 100; None when not reconciled. [%]
    closure : float or None
        The crude as its distribution adds up minus the crude sheet's value, after closing by difference
        (None without a whole-crude value, or when reconciled). [the quality's unit]
    gaps_closed : bool
        True when the part no narrow cut covers was closed on the whole-crude value: cuts there take the
        distribution rather than a correlation.
    """

    name: str
    rule: BlendRule
    cum: Pchip
    covered: np.ndarray
    reconciliation_pct: float | None = None
    closure: float | None = None
    gaps_closed: bool = False

    def mean_index(self, a, b):
        """Mean blending index over [a, b] (basis %); NaN for an empty interval."""
        a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
        w = b - a
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(w > 1e-12, (self.cum(b) - self.cum(a)) / np.where(w > 1e-12, w, 1.0), np.nan)

    def covered_index(self, a, b):
        """The share of [a, b] (basis %) inside the covered intervals [-] (:meth:`coverage`) and the mean blending
        index over that covered part (NaN where none is covered)."""
        a, b = np.asarray(a, dtype=float)[..., None], np.asarray(b, dtype=float)[..., None]
        lo, hi = np.maximum(a, self.covered[:, 0]), np.minimum(b, self.covered[:, 1])
        over = np.clip(hi - lo, 0.0, None)
        amount = np.where(over > 0, self.cum(np.where(over > 0, hi, 0.0)) - self.cum(np.where(over > 0, lo, 0.0)),
                          0.0).sum(axis=-1)
        width_over = over.sum(axis=-1)
        with np.errstate(invalid="ignore", divide="ignore"):
            idx = np.where(width_over > 1e-12, amount / np.where(width_over > 1e-12, width_over, 1.0), np.nan)
        return self._share(a[..., 0], b[..., 0], width_over), idx

    def coverage(self, a, b):
        """Fraction of [a, b] (basis %) inside the covered intervals; 1 for an empty interval inside one, or one
        covered but for rounding (:data:`FULL_SHARE_TOL`)."""
        a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
        over = np.clip(np.minimum(b[..., None], self.covered[:, 1]) - np.maximum(a[..., None], self.covered[:, 0]),
                       0.0, None).sum(axis=-1)
        return self._share(a, b, over)

    def _share(self, a, b, over):
        """The share of [a, b] that ``over`` (the covered width in it) makes, as :meth:`coverage` states it."""
        width = b - a
        inside = ((a[..., None] >= self.covered[:, 0]) & (a[..., None] <= self.covered[:, 1])).any(axis=-1)
        with np.errstate(invalid="ignore", divide="ignore"):
            share = np.where(width > 1e-12, np.minimum(over / np.where(width > 1e-12, width, 1.0), 1.0),
                             inside.astype(float))
        return np.where(share > 1.0 - FULL_SHARE_TOL, 1.0, share)


def quality_distributions(assay: Assay, model, warnings: list[str], methods: dict[str, str],
                          reconcile: bool = False) -> dict[str, Quality]:
    """The distribution of every extra narrow-cut column (see the module docstring).

    Parameters
    ----------
    assay : Assay
    model : CrudeModel
        Its curve and density distribution place the narrow cuts on the volume and weight bases.
    warnings, methods : list, dict
        Appended to: columns without a blending rule of their own are named in one warning.
    reconcile : bool
        Scale each quality's narrow cuts proportionally to reproduce a whole-crude value of the same name
        (instead of closing the balance by difference on the part they do not cover; :func:`_close`).

    Returns
    -------
    dict of str to Quality
    """
    nc = assay.narrow_cuts
    if nc is None or not nc.extras:
        return {}
    va, vb = narrow_cut_positions(assay, model.curve)
    wa, wb = model.wt_at_vol(va), model.wt_at_vol(vb)
    out: dict[str, Quality] = {}
    unknown = []
    for name, values in nc.extras.items():
        rule = rule_for(name)
        lo, hi = (wa, wb) if rule.basis == "wt" else (va, vb)
        idx = rule.to_index(values)
        ok = np.isfinite(idx) & (hi > lo)
        if not ok.any():
            continue
        if not rule.known:
            unknown.append(name)
        q = Quality(name, rule, cumulative_index(lo[ok], hi[ok], idx[ok]), np.column_stack([lo[ok], hi[ok]]))
        note = _reconcile(q, assay, warnings) if reconcile else _close(q, assay, warnings)
        out[name] = q
        methods[f"quality {name}"] = (f"{rule.label}; distribution of the index against "
                                      f"{'weight' if rule.basis == 'wt' else 'volume'} % distilled matching each "
                                      f"narrow cut" + (f"; reconciled to the whole crude by "
                                                       f"{q.reconciliation_pct:+.2f} %"
                                                       if q.reconciliation_pct is not None else "")
                                      + (f"; {note}" if note else ""))
    if unknown:
        warnings.append(f"narrow-cut column(s) {', '.join(unknown)} have no blending rule of their own: carried to "
                        f"the cuts and blended linearly by weight")
    return out


RECONCILE_WARN_PCT = 20.0
"""A reconciliation of a quality's index larger than this is warned about (our choice). [%]"""


def cumulative_index(lo, hi, idx) -> Pchip:
    """Monotone-shaped PCHIP of the cumulative index over 0-100 % from cuts [lo, hi] of mean index ``idx``
    (overlapping cuts: the later start wins); gaps and the ends take the nearest cut's index.

    Examples
    --------
    Two cuts, 0-40 % at index 2 and 40-100 % at 5: the mean over 0-40 % is 2 and over 0-100 % 3.8:

    >>> c = cumulative_index(np.array([0.0, 40.0]), np.array([40.0, 100.0]), np.array([2.0, 5.0]))
    >>> round(float(c(40.0)) / 40, 9), round(float(c(100.0)) / 100, 9)
    (2.0, 3.8)
    """
    order = np.argsort(lo, kind="stable")
    lo, hi, idx = lo[order], np.minimum(hi[order], np.append(lo[order][1:], np.inf)), idx[order]
    edges, values = [0.0], []
    for a, b, v in zip(lo, hi, idx):
        if a > edges[-1] + 1e-9:  # a gap (or the front): the nearest cut's index, split at the middle
            mid = a if not values else 0.5 * (edges[-1] + a)
            if mid > edges[-1] + 1e-9:
                edges.append(mid)
                values.append(values[-1] if values else v)
            if a > edges[-1] + 1e-9:
                edges.append(a)
                values.append(v)
        if b > edges[-1] + 1e-9:
            edges.append(b)
            values.append(v)
    if edges[-1] < 100.0 - 1e-9:
        edges.append(100.0)
        values.append(values[-1])
    e = np.array(edges)
    cum = np.concatenate([[0.0], np.cumsum(np.diff(e) * np.array(values))])
    return Pchip(e, cum)


QUALITY_CLOSURE = Closure(0.6, 0.6, 0.01, True)
"""How a quality's whole-crude balance is closed: as sulfur's (:data:`~assaycut.model.closure.SULFUR_CLOSURE`),
a gap's first estimate (the nearest narrow cut's index) uncertain by 60 %, the balance by 1 % (our choice)."""


def _close(q: Quality, assay: Assay, warnings: list[str]) -> str:
    """Close the quality's whole-crude balance by difference on the part of the crude the narrow cuts do not
    cover (in place), the narrow cuts kept as measured; returns the methods note.

    Each gap (before the first cut, between two, after the last) starts at the nearest cut's index
    (:func:`cumulative_index`); Δ = 100 x the crude sheet's index - the integral of that first estimate over
    the crude is shared between the gaps and the balance by least squares (:data:`QUALITY_CLOSURE`,
    :func:`~assaycut.model.closure.gap_moves`, as the density and sulfur closures).  What the gaps cannot
    take is the closure, reported; a gap index the rule cannot turn back into a value (a negative
    concentration) leaves the first estimate.
    """
    crude = assay.extras.get(q.name)
    if not isinstance(crude, (int, float)) or not np.isfinite(crude):
        return ""
    target = float(q.rule.to_index(crude))
    if not np.isfinite(target):
        return f"the crude sheet's {crude:g} has no blending index: not used"
    e, cum = q.cum.x, q.cum.y
    width = np.diff(e)
    idx = np.diff(cum) / width
    mid = 0.5 * (e[1:] + e[:-1])
    covered = ((mid[:, None] > q.covered[:, 0]) & (mid[:, None] < q.covered[:, 1])).any(axis=1)
    gap = ~covered & (width > GAP_MIN_PCT)
    move = gap_moves(np.array([100.0 * target - float(cum[-1])]), (idx * width)[None, gap], width[None, gap],
                     np.zeros(int(gap.sum()), bool), np.array([target]), QUALITY_CLOSURE)[0]
    new = idx.copy()
    new[gap] += move / width[gap]
    positive = bool(np.all(idx[covered] > 0)) if covered.any() else True
    with np.errstate(invalid="ignore", over="ignore"):
        ok = np.all(np.isfinite(q.rule.from_index(new[gap]))) and (not positive or np.all(new[gap] > 0))
    if gap.any() and ok:
        q.cum = Pchip(e, np.concatenate([[0.0], np.cumsum(new * width)]))
        q.gaps_closed = True
    left = float(q.rule.from_index(q.cum.y[-1] / 100.0)) - float(crude)
    q.closure = left
    text = ""
    if gap.any():
        text = (f"the {float(width[gap].sum()):.2f} % of the crude no narrow cut covers closed on the crude sheet's "
                f"{crude:g} by least squares" if ok else
                f"the uncovered part keeps the nearest cut's value: closing on the crude sheet's {crude:g} would "
                f"need a value the blending rule cannot give")
    if abs(left) > 1e-9 * max(abs(float(crude)), 1.0):
        text += ("; " if text else "") + (f"the cuts, kept as measured, and the crude sheet's {crude:g} disagree by "
                                          f"{left:+.4g}")
        rel = abs(q.cum.y[-1] / 100.0 - target) / abs(target) * 100.0 if target else np.inf
        if ok and rel > RECONCILE_WARN_PCT:  # a real disagreement, not a rule that could not close the gaps
            warnings.append(f"{q.name}: the narrow cuts, kept as measured, add up to {crude + left:.4g} against the "
                            f"crude sheet's {crude:g} (blending indices {rel:.0f} % apart); check the cuts or the "
                            f"whole-crude figure")
    return text


def _reconcile(q: Quality, assay: Assay, warnings: list[str]) -> str:
    """Scale the index so the whole crude reproduces the crude sheet's value of the same name, where the narrow
    cuts cover the whole crude and the index is positive; returns a note when the value cannot be used."""
    crude = assay.extras.get(q.name)
    if not isinstance(crude, (int, float)) or not np.isfinite(crude):
        return ""
    if q.coverage(0.0, 100.0) < 0.999:
        return f"the crude sheet's {crude:g} is not used to reconcile it: the narrow cuts do not cover the whole crude"
    target = float(q.rule.to_index(crude))
    mean = float(q.mean_index(0.0, 100.0))
    if not (target > 0 and mean > 0 and np.all(np.diff(q.cum.y) >= 0)):
        return f"the crude sheet's {crude:g} is not used to reconcile it: the blending index is not positive"
    f = target / mean
    q.cum = q.cum.scaled(f)
    q.reconciliation_pct = (f - 1.0) * 100.0
    if abs(q.reconciliation_pct) > RECONCILE_WARN_PCT:
        warnings.append(f"{q.name}: the narrow cuts are scaled by {q.reconciliation_pct:+.1f} % to reproduce the "
                        f"crude sheet's {crude:g}; the cuts and the whole-crude figure disagree")
    return ""


SULFUR_SLICES = 100
"""Slices of the curve on which the sulfur of a crude without narrow-cut sulfur is estimated."""


def estimated_sulfur_rows(g: Rows) -> list[Rows]:
    """Sulfur against weight % distilled, estimated when only the whole-crude sulfur is known.

    Each slice of the curve takes the relative sulfur of its mean TBP (:func:`sulfur_shape`, the development
    set's median shape); the distribution through the slices is then scaled so that the crude reproduces its
    sulfur (the shape gives the profile, the crude's measured sulfur the level; the values are estimates, and
    on the development set they miss a cut's sulfur by about 40 % on average).  Published correlations of
    sulfur from Tb, SG and refractive index (Riazi, Nasimi & Roomi 1999) were tried first and left: on the
    development set they gave no sulfur in light naphtha and two to three times too much in kerosene.

    Row fields read: ``spline`` (the curve V(T)), ``sg_dist``, ``sg`` and ``sulfur`` (the whole crude's
    sulfur [wt %]).  Row field set: ``sulfur_dist``, sulfur [wt %] against weight % distilled, reconciled.
    """
    edges = np.linspace(0.0, 100.0, SULFUR_SLICES + 1)
    va, vb = (np.broadcast_to(e, (g.n, SULFUR_SLICES)) for e in (edges[:-1], edges[1:]))
    tb = volume_average_temp(g.spline, va, vb)
    s = sulfur_shape(tb, g.sulfur[:, None])
    s = np.maximum.accumulate(np.nan_to_num(s, nan=0.0), axis=1)
    w = weight_distilled(g.sg_dist, g.sg[:, None], np.concatenate([va, vb], axis=1))
    g.put(pl=w[:, :SULFUR_SLICES], ph=w[:, SULFUR_SLICES:], pv=s, pfx=np.zeros((g.n, 0)), pfy=np.zeros((g.n, 0)))
    out = property_spline_rows(g, "raw")
    for t in out:
        total = t.raw.integral(np.zeros((t.n, 1)), np.full((t.n, 1), 100.0))[:, 0] / 100.0
        with np.errstate(divide="ignore", invalid="ignore"):
            factor = np.where(total > 0, t.sulfur / total, 0.0)
        t.put(sulfur_dist=t.raw.scaled(factor))
    return out
