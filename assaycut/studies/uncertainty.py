"""Uncertainty bands: the assay's measurement uncertainty carried through to yields and qualities.

Monte Carlo over the curve model: each draw perturbs the measured TBP temperatures and percents, the
densities (whole crude and narrow cuts) and the sulfur contents by independent normal errors, rebuilds the
crude model (the draws of a chunk together, as rows of the one model builder,
:func:`~assaycut.model.crude.build_draws`), and all draws are cut together by the library engine (arrays over
draws).  Reported: P10, P50 and P90 per cut.  The extension is refitted in each draw, so the bands carry its
response to the measurement noise, but not the spread between alternative extension fits
(:func:`~assaycut.model.tbp_curve.extension_band`): :data:`EXTENSION_NOTE` says so with every band.

The default standard deviations are ASSUMPTIONS of ours, not values from the standards: the repeatability
figures of ASTM D2892 (TBP), D4052 (density) and D4294 / D2622 (sulfur) must be confirmed against the current
editions and the laboratory's own precision before the bands are relied on.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..cutting.cut_table import CutTable
from ..cutting.cutset import CutSet
from ..cutting.ideal import cut_columns
from ..cutting.model_rows import BatchModel
from ..errors import StudyError
from ..model.assay import Assay
from ..model.crude import build_draws
from ..model.draws import DrawValues


@dataclass(frozen=True)
class Sigmas:
    """One standard deviation of each measurement (assumed defaults; change them to your laboratory's)."""

    temp_c: float = 2.0
    """TBP (or other method) temperature of each curve point. [°C] (assumption)"""
    pct: float = 0.3
    """Cumulative percent distilled of each curve point. [%] (assumption)"""
    sg: float = 0.0005
    """Whole-crude and narrow-cut specific gravity. [-] (assumption)"""
    sulfur_rel: float = 0.03
    """Whole-crude and narrow-cut sulfur, relative. [-] (assumption)"""

    def describe(self) -> str:
        return (f"1-sigma assumptions (to confirm against the standards' repeatability and your laboratory): "
                f"temperature {self.temp_c:g} °C, percent {self.pct:g} %, SG {self.sg:g}, "
                f"sulfur {self.sulfur_rel * 100:g} % relative. " + EXTENSION_NOTE)


EXTENSION_NOTE = ("The bands do not include the spread of the curve's extension: each draw refits it on its "
                  "perturbed points, but the spread between alternative fits (the TBP plot's band) is not "
                  "drawn, so cuts flagged extrapolated are less certain than their bands show.")
"""What the bands leave out, said wherever they are shown."""


BAND_QUALITIES = ["vol_pct", "wt_pct", "sg", "api", "sulfur_wt_pct", "watson_k", "cetane_index_d4737",
                  "flash_c_est"]


def perturb(assay: Assay, sig: Sigmas, rng: np.random.Generator) -> Assay:
    """One Monte Carlo draw of the assay: measured values plus independent normal errors, curves kept
    monotone (running maximum) and percents inside 0-100 (:func:`draw_values` of one draw).

    With a light-ends analysis, the percent of the curve's first point is not perturbed: the light ends are the
    curve's first fraction (collected and analysed by gas chromatography in a TBP distillation), so their
    total and that percent are one measurement; perturbing it alone would leave the light ends off the curve
    in about a third of the draws (they are placed only where they meet the first point within 0.1 %).
    """
    return draw_values(assay, sig, rng, 1).assay(assay, 0)


def draw_values(assay: Assay, sig: Sigmas, rng: np.random.Generator, count: int) -> DrawValues:
    """``count`` draws of the assay's measured values (:func:`perturb`'s errors), one row per draw.

    Each draw takes its normal errors from ``rng`` in the order of the measurements: per curve its
    temperatures then its percents, the whole-crude SG, the whole-crude sulfur (when given), the narrow-cut
    SG and sulfur (with narrow cuts); the draws one after the other, so the values are those of ``count``
    calls of :func:`perturb` on the same generator.
    """
    le = assay.light_ends
    nc = assay.narrow_cuts
    scales = []
    for c in assay.curves:
        scales += [np.full(c.temp_c.size, sig.temp_c), np.full(c.percent.size, sig.pct)]
    scales.append(np.array([sig.sg]))
    if assay.sulfur_wt_pct is not None:
        scales.append(np.array([sig.sulfur_rel]))
    if nc is not None:
        scales += [np.full(nc.sg.size, sig.sg), np.full(nc.sg.size, sig.sulfur_rel)]
    sizes = [x.size for x in scales]
    err = np.split(0.0 + rng.standard_normal((count, sum(sizes))) * np.concatenate(scales),
                   np.cumsum(sizes)[:-1], axis=1)  # what rng.normal(0.0, scale) gives, value for value
    percent, temp_c = [], []
    for k, c in enumerate(assay.curves):
        t = c.temp_c + err[2 * k]
        p = np.clip(c.percent + err[2 * k + 1], 0.0, 100.0)
        if k == 0 and le is not None and le.amounts and c.percent[0] > 0:
            p[:, 0] = c.percent[0]  # the light ends' total: one measurement with the light-ends analysis
        nudge = np.arange(t.shape[1]) * 1e-6 if sig.temp_c > 0 else 0.0  # none when nothing is perturbed
        temp_c.append(np.maximum.accumulate(t + nudge, axis=1))
        percent.append(np.maximum.accumulate(p, axis=1))
    k = 2 * len(assay.curves)
    out = DrawValues(percent, temp_c, assay.sg + err[k][:, 0])
    if assay.sulfur_wt_pct is not None:
        k += 1
        out.sulfur_wt_pct = np.maximum(assay.sulfur_wt_pct * (1.0 + err[k][:, 0]), 0.0)
    if nc is not None:
        out.nc_sg = nc.sg + err[k + 1]
        out.nc_sulfur_wt_pct = np.maximum(nc.sulfur_wt_pct * (1.0 + err[k + 2]), 0.0)
    return out


DRAW_CHUNK = 250
"""Draws modelled together; chunk k draws from its own generator seeded with (seed, k), so the bands depend
on the seed alone, not on how many processes share the work."""


def _draw_chunk(args):
    """Model and cut one chunk of draws: (columns of :data:`BAND_QUALITIES` over the draws, failed draws).

    The draws are modelled together as rows (:func:`~assaycut.model.crude.build_draws`, the one model builder;
    each draw's model is the one :func:`~assaycut.model.crude.build_model` gives it) and cut together by the
    library engine.
    """
    assay, cut_set, sig, count, seed, k, method, scale = args
    rng = np.random.default_rng([seed, k])
    vals = draw_values(assay, sig, rng, count)
    leaves, failed = build_draws(assay, vals, method, scale)
    if not leaves:
        return {}, failed
    _, ends = cut_set.reported()
    batch = BatchModel.from_rows(leaves)
    cols = cut_columns(batch, np.repeat(ends[None, :], batch.n, axis=0), only=set())  # the bands read no quality
    return {q: np.asarray(cols[q], dtype=float) for q in BAND_QUALITIES}, failed


def monte_carlo(assay: Assay, cut_set: CutSet, sig: Sigmas = Sigmas(), n: int = 200, seed: int = 20261201,
                method: str = "daubert-1994", progress=None, map_fn=map, scale_cuts: bool = False):
    """P10/P50/P90 of each cut's yields and qualities under the assay's measurement uncertainty.

    Parameters
    ----------
    assay : Assay
    cut_set : CutSet
    sig : Sigmas
        Standard deviations (assumed defaults).
    n : int
        Number of draws (20-5000).
    seed : int
        Random seed; the same seed gives the same bands.
    method : str
        TBP <-> D86 method for D86 input curves.
    scale_cuts : bool
        Each draw's narrow cuts scaled to its whole crude (``reconcile`` of
        :func:`~assaycut.model.crude.build_model`) instead of kept as measured.
    progress : callable, optional
        ``progress(done, n)`` as chunks of draws are done.
    map_fn : callable
        A map-like callable for the chunks of :data:`DRAW_CHUNK` draws (e.g. a process pool's ``imap``, to
        share them between cores); the builtin ``map`` by default.

    Returns
    -------
    CutTable
        One row per cut: name, then ``<quality>_p10``, ``_p50``, ``_p90`` for :data:`BAND_QUALITIES`;
        ``attrs`` hold 'draws' (used), 'failed' (draws whose perturbed data could not be modelled) and 'sigmas'.
    """
    if not 20 <= n <= 5000:
        raise StudyError(f"the number of draws must be between 20 and 5000; got {n}")
    names, _ = cut_set.reported()
    jobs = [(assay, cut_set, sig, min(DRAW_CHUNK, n - k0), seed, k, method, scale_cuts)
            for k, k0 in enumerate(range(0, n, DRAW_CHUNK))]
    parts, failed, done = [], 0, 0
    for (cols, bad), job in zip(map_fn(_draw_chunk, jobs), jobs):
        failed += bad
        if cols:
            parts.append(cols)
        done += job[3]
        if progress is not None:
            progress(done, n)
    used = sum(p["vol_pct"].shape[0] for p in parts)
    if used < 10:
        raise StudyError(f"only {used} of {n} perturbed draws could be modelled; the uncertainties are too "
                         f"large for this curve")
    out = {"name": list(names)}
    for q in BAND_QUALITIES:
        v = np.concatenate([p[q] for p in parts], axis=0)
        ok = np.isfinite(v).sum(axis=0) >= max(5, v.shape[0] // 2)  # a quality estimated in most draws
        filled = np.where(np.isfinite(v), v, 0.0)
        for pct in (10, 50, 90):
            val = np.full(v.shape[1], np.nan)
            if ok.any():
                val[ok] = np.nanpercentile(np.where(np.isfinite(v[:, ok]), filled[:, ok], np.nan), pct, axis=0)
            out[f"{q}_p{pct}"] = val
    return CutTable(out, {"draws": used, "failed": failed, "sigmas": sig.describe()})


def overlapping(bands: dict[str, tuple[float, float]]) -> list[tuple[str, str]]:
    """Pairs of crudes whose P10-P90 bands overlap: their difference lies inside the uncertainty.

    Examples
    --------
    >>> overlapping({"A": (10.0, 12.0), "B": (11.5, 13.0), "C": (14.0, 15.0)})
    [('A', 'B')]
    """
    names = list(bands)
    out = []
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            (a0, a1), (b0, b1) = bands[a], bands[b]
            if a0 <= b1 and b0 <= a1:
                out.append((a, b))
    return out
