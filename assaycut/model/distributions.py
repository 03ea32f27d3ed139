"""Property distributions of the crude model: density against volume distilled, sulfur against weight
distilled, each a monotone spline that reproduces every measured narrow cut's mean
(:mod:`assaycut.model.property_splines`), with the whole-crude balance closed on the part of the crude the cuts
do not cover (:mod:`assaycut.model.closure`).

Built row-wise for a set of crude models under construction (:class:`~assaycut.model.rows.Rows`, the model
builder's stages :func:`density_rows` and :func:`sulfur_rows`).
"""

from __future__ import annotations

import numpy as np

from ..errors import CurveError
from ..methods.characterisation import sg_from_watson_k, watson_k_numerator
from ..methods.pchip import Pchip
from .assay import Assay
from .closure import (DENSITY_CLOSURE, GAP_MIN_PCT, PRIOR_SLICES, SULFUR_CLOSURE, closed_by_difference, closure_text,
                      gap_slices, log_prior)
from .lightends import GAS_RANGE_MAX_C, gas_range_sg
from .property_splines import property_spline_rows
from .rows import Rows, each, interp_rows, row_sum
from .tbp_curve import BAND_LAST_POINTS, extension_refits


def cut_positions(spline: Pchip, start_c, end_c):
    """Start and end percent of cuts [start_c, end_c] (TBP [°C]; NaN start: 0 %, NaN end: 100 %) on a curve
    ``spline`` V(T): one curve with (k,) temperatures, or curves as rows with (R, k). [vol %]"""
    start_c, end_c = np.asarray(start_c, dtype=float), np.asarray(end_c, dtype=float)
    ends = np.concatenate([start_c, end_c], axis=-1)
    open_end = np.isnan(ends)
    v = spline(np.where(open_end, 0.0, ends))  # both ends in one call
    k = start_c.shape[-1]
    return np.where(open_end[..., :k], 0.0, v[..., :k]), np.where(open_end[..., k:], 100.0, v[..., k:])


def narrow_cut_positions(assay: Assay, curve):
    """Start and end vol % of each narrow cut of ``assay`` on ``curve`` (a TbpCurve; open start 0 %, open end
    100 %). [vol %]"""
    nc = assay.narrow_cuts
    return cut_positions(curve.spline, nc.start_c, nc.end_c)


_GAS_NOTE = ("; no light-ends analysis: the curve below n-pentane's boiling point (36.1 °C) is given the SG of the "
             "C2-C5 paraffins boiling at the same temperature (assumed)")
KW_GRID_STEP_PCT = 0.5
"""Width of the slices on which a constant-Watson-K density distribution is laid. [vol %]"""


def density_rows(g: Rows) -> list[Rows]:
    """The density distribution of every row: SG against vol % distilled, balanced on the whole-crude SG.

    From the narrow-cut densities (:func:`~assaycut.model.property_splines.property_spline_rows` against
    mid-volume %, light-ends components held
    at their own SG) where at least two cuts have one; else at constant Watson K fitted to the whole-crude
    gravity, SG = (1.8 T_b[K])^(1/3)/Kw along the curve (Watson & Nelson 1933; common practice, no single
    source), light ends at their own SG.  Without a light-ends analysis the part of the curve boiling below
    n-pentane takes the SG of the paraffins of the same boiling point
    (:func:`~assaycut.model.lightends.gas_range_sg`, assumed) where no narrow cut covers it.  Either way the
    narrow-cut densities are kept as measured and the whole-crude balance is closed on the part of the crude
    they do not cover (:func:`~assaycut.model.closure.closed_by_difference`), or scaled proportionally to it
    (``reconcile``); a constant-Watson-K distribution is scaled to the whole-crude SG.

    Row fields read: ``spline`` (the curve V(T)), ``placed``, ``le_mid`` with the shared ``le_sg`` (light ends
    placed: each component's mid vol % and SG), ``le_pct``, ``sg``, ``va``, ``vb`` and ``nc_sg`` (with narrow
    cuts, the shared ``has_nc``), ``warn``.  Row fields set: ``sg_dist`` (Pchip rows), ``dens_rec`` (the scale,
    (factor - 1) x 100 [%]; NaN when closed by difference), ``sg_closure`` and ``sg_gap_pct`` (the closure
    [-] and the share of the crude in gaps [vol %]; 0 and NaN when scaled), ``sg_given`` (the whole-crude SG
    as given) and ``sg`` (the model's, what its distribution integrates to), ``dens_src`` (the source
    described), ``kw`` (the fitted Watson K, NaN with narrow-cut densities).  A row whose light ends weigh as
    much as the crude gravity allows is refused.
    """
    gas = ~g.placed & (g.spline.lo < GAS_RANGE_MAX_C)  # the IBP is the TBP at 0 %
    key = np.column_stack([gas] + ([np.isfinite(g.nc_sg)] if g.has_nc else []))
    return each(g.split(key), _density_set)


def _density_set(g: Rows) -> list[Rows]:
    gas = not bool(g.placed[0]) and bool(g.spline.lo[0] < GAS_RANGE_MAX_C)
    if gas:
        v_top = g.spline(np.full((g.n, 1), GAS_RANGE_MAX_C))
        g.put(gas_v=np.linspace(0.0, v_top[:, 0], 9, axis=1)[:, :-1] + v_top / 16.0, gas_top=v_top[:, 0])
    if g.has_nc and np.isfinite(g.nc_sg[0]).sum() >= 2:
        sets = each(g.split(np.isfinite(g.nc_sg) & (g.vb - g.va > GAP_MIN_PCT)), _density_from_cuts, gas)
    else:
        sets = _density_at_constant_kw(g, gas)
    for s in sets:
        for r in range(s.n):
            if s.dens_src[r].endswith(_GAS_NOTE):
                s.warn[r].append("no light-ends analysis: the gravity of the crude boiling below 36.1 °C "
                                 "(n-pentane) is assumed from the C2-C5 paraffins boiling at the same temperature; "
                                 "give a light-ends analysis for measured values")
    out = []
    for s in sets:
        if np.isnan(s.kw[0]) and not s.reconcile:  # narrow-cut densities kept, the balance closed on the gaps
            covered = (s.le_pct if bool(s.placed[0]) else np.minimum(s.gas_top, s.first) if gas
                       else np.zeros(s.n))  # the light ends, or the gas range's assumed paraffins
            for t in closed_by_difference(s, covered, s.sg, DENSITY_CLOSURE, _kw_prior):
                t.put(sg_dist=t.raw, dens_rec=np.full(t.n, np.nan), sg_closure=t.closure, sg_gap_pct=t.gap_pct)
                out.append(t)
            continue
        factor = 100.0 * s.sg / s.raw.integral(np.zeros((s.n, 1)), np.full((s.n, 1), 100.0))[:, 0]
        s.put(sg_dist=s.raw.scaled(factor), dens_rec=(factor - 1.0) * 100.0, sg_closure=np.zeros(s.n),
              sg_gap_pct=np.full(s.n, np.nan))
        out.append(s)
    for s in out:  # the model's own whole-crude SG: what its distribution integrates to
        s.put(sg_given=s.sg.copy(), sg=s.sg - s.sg_closure)
    return out


def _density_from_cuts(g: Rows, gas: bool) -> list[Rows]:
    ok = np.isfinite(g.nc_sg[0]) & (g.vb[0] - g.va[0] > GAP_MIN_PCT)
    first = g.va[:, ok].min(axis=1) if ok.any() else np.zeros(g.n)
    placed = bool(g.placed[0])
    le_x = g.le_mid if placed else np.zeros((g.n, 0))
    key = [le_x < first[:, None]]
    if gas:
        g.put(gas_sg=gas_range_sg(g.spline.inverse(g.gas_v)))
        key.append(g.gas_v < first[:, None])
    g.put(first=first)
    out = []
    for s in g.split(np.concatenate(key, axis=1)):
        le_x = s.le_mid if placed else np.zeros((s.n, 0))
        lm = le_x[0] < s.first[0]
        fx, fy = [le_x[:, lm]], [np.broadcast_to(s.le_sg[lm] if placed else np.zeros(0), (s.n, int(lm.sum())))]
        if gas:
            gm = s.gas_v[0] < s.first[0]
            fx.append(s.gas_v[:, gm])
            fy.append(s.gas_sg[:, gm])
        s.put(pl=s.va[:, ok], ph=s.vb[:, ok], pv=s.nc_sg[:, ok], pfx=np.concatenate(fx, axis=1),
              pfy=np.concatenate(fy, axis=1))
        note = _GAS_NOTE if gas and any(f.shape[1] for f in fx[1:]) else ""
        for t in property_spline_rows(s, "raw"):
            t.put(dens_src=["narrow-cut densities (monotone spline against mid-volume %, matching each cut's "
                            "mean)" + note] * t.n, kw=np.full(t.n, np.nan))
            out.append(t)
    return out


LIGHT_KW = (0.9, 50.0, 90.0)
"""The Watson K offset of the light naphtha: +A up to T1 °C, falling linearly to 0 at T2 °C, as (A, T1, T2)
(:func:`light_kw_offset`)."""
KW_NEWTON_STEPS = 8
"""Newton steps fitting the Watson K of a crude without narrow-cut densities (converged to machine precision
from the averaged start in 3-5 on the development set)."""


def _kw_prior(s: Rows, a, b):
    """The density gaps' first estimate (amounts, SG x vol %, (R, G)): each gap's SG from the Watson K of the
    measured cuts around it, K interpolated linearly in volume between the cuts' middles (held beyond the
    outermost), plus the light naphtha's offset (:func:`light_kw_offset`); SG = (1.8 T_b)^(1/3) / K over
    :data:`~assaycut.model.closure.PRIOR_SLICES` slices of the gap on the curve.  Cuts boiling in the gas range
    (their SG is that of light paraffins, not of a Watson K) are left out; with none left, the spline's
    integral.  Crude oils hold a nearly constant Watson K across their cuts above the light naphtha (on the
    development set within 0.11 of the crude's on average), so a gap takes its neighbours' K rather than an
    interpolation of their SG."""
    def slices(lo, hi):
        q = gap_slices(lo, hi)
        t = s.spline.inverse(q.reshape(s.n, -1)).reshape(q.shape)
        return watson_k_numerator(t), light_kw_offset(t), t, q

    cb, off, t, _ = slices(s.pl, s.ph)
    with np.errstate(invalid="ignore", divide="ignore"):
        k = row_sum(cb) / PRIOR_SLICES / s.pv - row_sum(off) / PRIOR_SLICES
    use = np.median(t[:1], axis=2)[0] >= GAS_RANGE_MAX_C
    if not use.any():
        return s.raw.integral(a, b)
    cbg, offg, _, q = slices(a, b)
    kg = interp_rows(q, 0.5 * (s.pl + s.ph)[:, use], k[:, use])
    return row_sum(cbg / (kg + offg)) / PRIOR_SLICES * (b - a)


def light_kw_offset(t_c):
    """How much higher the Watson K of a crude's light naphtha is than the crude's own, by TBP [°C]:
    ΔKw = A for T <= T1, A (T2 - T) / (T2 - T1) up to T2, 0 above, with (A, T1, T2) = :data:`LIGHT_KW`.

    An empirical profile of our own, fitted on the 25 open assays of the development set: there the cuts of
    60-165 °F (16-74 °C) have a Watson K 0.90 above the crude's constant-Watson-K fit on average (standard
    deviation 0.17), the cuts above 165 °F within 0.11 of it.  The light naphtha is mostly C5-C6 paraffins
    (n-hexane Kw 12.8) where the crude averages about 11.8.  Range: crudes like those (API 24-50).
    """
    a, t1, t2 = LIGHT_KW
    return a * np.clip((t2 - np.asarray(t_c, dtype=float)) / (t2 - t1), 0.0, 1.0)


def _density_at_constant_kw(g: Rows, gas: bool) -> list[Rows]:
    if g.has_nc:
        for w in g.warn:
            w.append("fewer than 2 narrow cuts have a density: cut densities are estimated at constant Watson K "
                     "fitted to the whole-crude gravity")
    grid = np.linspace(0.0, 100.0, int(round(100.0 / KW_GRID_STEP_PCT)) + 1)
    mids = 0.5 * (grid[1:] + grid[:-1])
    t_mids = g.spline.inverse(np.broadcast_to(mids, (g.n, mids.size)))
    cbrt = watson_k_numerator(t_mids)
    fixed = mids[None, :] < g.le_pct[:, None]
    le_sg = np.full(t_mids.shape, np.nan)
    if bool(g.placed[0]):
        lm = g.le_mid
        le_sg = g.le_sg[np.clip((lm[:, None, :] < mids[None, :, None]).sum(axis=2), 0, lm.shape[1] - 1)]
    elif gas:
        le_sg = gas_range_sg(t_mids)
        fixed = np.isfinite(le_sg)
    dv = KW_GRID_STEP_PCT
    fixed_mass = np.array([(le_sg[r, fixed[r]] * dv).sum() for r in range(g.n)])  # each row's own sum
    gas_used = np.full(g.n, gas)
    if gas:  # a curve (nearly) all in the gas range: the paraffin assumption cannot meet the crude gravity
        drop = fixed.all(axis=1) | (fixed_mass >= 100.0 * g.sg)
        fixed[drop] = False
        fixed_mass = np.where(drop, 0.0, fixed_mass)
        gas_used &= ~drop
    g.put(fixed=fixed, fixed_mass=fixed_mass, gas_used=gas_used, t_mids=t_mids, cbrt=cbrt, le_sgm=le_sg)
    g = g.fail(g.fixed.all(axis=1) | (g.fixed_mass >= 100.0 * g.sg), lambda r: CurveError(
        "the light ends weigh as much as the whole crude's gravity allows; check the light-ends analysis "
        "against the crude gravity"))
    if not g.n:
        return []
    off = light_kw_offset(g.t_mids)
    free = np.where(g.fixed, 0.0, g.cbrt * dv)
    need = 100.0 * g.sg - g.fixed_mass
    kw = row_sum(free) / need - row_sum(free * off) / row_sum(free)  # start: the offsets averaged
    for _ in range(KW_NEWTON_STEPS):  # Newton on sum(cbrt dv / (Kw + offset)) = the mass the rest must weigh
        k = kw[:, None] + off
        kw = kw + (row_sum(free / k) - need) / row_sum(free / k ** 2)
    raw = Pchip(np.broadcast_to(mids, g.t_mids.shape), np.where(g.fixed, g.le_sgm, sg_from_watson_k(
        g.t_mids, kw[:, None] + off)))
    src = [f"Watson K {kw[r]:.2f} fitted to the whole-crude gravity, raised below {LIGHT_KW[2]:g} °C toward the "
           f"light naphtha's (up to +{LIGHT_KW[0]:g}; no narrow-cut densities)"
           + (_GAS_NOTE if g.gas_used[r] else "") for r in range(g.n)]
    return [g.put(raw=raw, dens_src=src, kw=kw)]


KW_EXTENSION_TOL_SG = 0.001
"""A Watson K fitted over a curve's extension moves the cuts' gravity by less than this between the extension's
alternative fits: the cuts are not flagged for it (our choice: the third decimal of a reported SG). [-]"""


def kw_extension_sg_spread(g: Rows) -> np.ndarray:
    """How far the cuts' SG moves with the curve's extension when the density rests on one Watson K fitted to
    the whole-crude gravity over the whole curve (:func:`_density_at_constant_kw`).

    The fit solves Σ dv C(T)/(Kw + ΔKw_light) = 100 SG - light ends, C = (1.8 T[K])^(1/3); replacing the
    extension's TBP by each alternative fit (:func:`~assaycut.model.tbp_curve.extension_refits`) changes the
    sum over the extension by ΔΣ (the refit on all the points is the model's own extension, not redone), so
    Kw by ΔKw/Kw ≈ ΔΣ/Σ (first order) and every cut's SG = C/Kw by the same
    share.  Returned: the largest |ΔΣ/Σ| over the alternatives times the heaviest SG of the distribution.

    Row fields read: ``kw``, ``spline``, ``mv``, ``mt``, ``mhi``, ``raw`` (the SG distribution).

    Returns
    -------
    numpy.ndarray
        (R,) SG change [-]; 0 for a curve that is not extended.
    """
    mids = np.arange(KW_GRID_STEP_PCT / 2, 100.0, KW_GRID_STEP_PCT)
    pct = np.broadcast_to(mids, (g.n, mids.size))
    t = g.spline.inverse(pct)
    k = g.kw[:, None] + light_kw_offset(t)
    total = row_sum(watson_k_numerator(t) * KW_GRID_STEP_PCT / k)
    ext = pct > g.mhi[:, None]
    out = np.zeros(g.n)
    for alt in extension_refits(list(g.mv), list(g.mt), pct, BAND_LAST_POINTS):  # all points: the model's own
        if alt is None:
            continue
        with np.errstate(invalid="ignore"):
            d = np.where(ext, watson_k_numerator(np.where(ext, alt, t)) - watson_k_numerator(t), 0.0)
        out = np.fmax(out, np.abs(row_sum(np.nan_to_num(d) * KW_GRID_STEP_PCT / k)) / total)
    heaviest = g.raw.y.max(axis=1) if g.raw.y.ndim == 2 else np.full(g.n, float(g.raw.y.max()))
    return out * heaviest


def weight_distilled(sg_dist: Pchip, sg, vol_pct, a0=None):
    """Cumulative wt % distilled at cumulative vol % ``vol_pct``: W(V) = ∫0^V SG dv / SG_crude, the mass distilled
    over the crude's (the model's definition of the weight basis). [wt %]

    ``sg_dist``: SG [-] against vol % distilled, one spline or rows (a query's first axis then runs over the
    rows); ``sg``: the crude's SG [-], and ``a0``: the spline's antiderivative at 0 % (found here when not
    given), each shaped to broadcast against the answer.
    """
    if a0 is None:
        a0 = sg_dist.antiderivative(0.0 if sg_dist.single else np.zeros((sg_dist.rows, 1)))
    return (sg_dist.antiderivative(np.asarray(vol_pct, dtype=float)) - a0) / sg


SULFUR_SHAPE = ((50.0, -4.565, -1.02), (121.0, -2.958, -0.68), (207.0, -1.65, -0.45), (296.0, -0.414, -0.29),
                (426.0, -0.041, -0.31), (625.0, 0.276, -0.44))
"""The sulfur of a cut over the crude's by the cut's mid TBP [°C], as (T, a, b): log10(S_cut / S_crude) =
a + b log10(S_crude [wt %]), fitted on the 25 open assays of the development set (NOAA ADIOS records, CC0;
their seven cuts at the cuts' mid-volume TBP on the model's curve): b by least squares on the logarithms, then
a so that the mean relative error of each cut, after the scaling to the crude, is least (the weighted median).
Low-sulfur crudes carry relatively more of it in their light cuts: the light naphtha holds about the same few
ppm whatever the crude.  On the logarithm the cuts scatter about the fit by 0.76 (light naphtha) down to 0.17
(480-650 °F), a factor of 6 to 1.5."""


def sulfur_shape(tb_c, crude_sulfur_wt_pct):
    """Relative sulfur content by TBP [°C] for a crude of the given sulfur [wt %] (:data:`SULFUR_SHAPE`): an
    empirical shape of our own, a and b interpolated linearly in T between the points, held beyond the last,
    extended below the first; 0 below n-pentane's boiling point (36.1 °C).  Range: crudes like the development
    set's (0.003-2.9 wt % S, API 24-50)."""
    t = np.asarray(tb_c, dtype=float)
    x = np.array([p[0] for p in SULFUR_SHAPE])
    log = np.zeros(np.broadcast(t, np.asarray(crude_sulfur_wt_pct)).shape)
    ls = np.log10(np.maximum(np.asarray(crude_sulfur_wt_pct, dtype=float), 1e-6))
    for k in (1, 2):
        y = np.array([p[k] for p in SULFUR_SHAPE])
        slope = (y[1] - y[0]) / (x[1] - x[0])
        part = np.where(t < x[0], y[0] + slope * (t - x[0]), np.interp(t, x, y))
        log = log + (part if k == 1 else part * ls)
    return np.where(t < GAS_RANGE_MAX_C, 0.0, 10.0 ** log)


def _shape_prior(s: Rows, a, b):
    """The sulfur gaps' first estimate (amounts, wt % S x wt %, (R, G)): the development set's shape
    (:func:`sulfur_shape`) times the measured cuts' own ratio to it, the logarithm of the ratio interpolated
    linearly in weight between the cuts' middles (held beyond the outermost), averaged over
    :data:`~assaycut.model.closure.PRIOR_SLICES` slices of each gap.  A gap's TBP comes from its volume, read
    linearly between the narrow cuts' positions on the two bases.  Cuts in the gas range (the shape has none
    there) are left out; a gap without such a cut on both sides takes
    :func:`~assaycut.model.closure.log_prior` (the geometric interpolation of its neighbours), which the
    development set's held-back light naphtha prefers."""
    if not (np.isfinite(s.total) & (s.total > 0)).all():  # no level to set the shape by
        return log_prior(s, a, b)
    wpts = np.concatenate([np.zeros((s.n, 1)), s.wa, s.wb, np.full((s.n, 1), 100.0)], axis=1)
    vpts = np.concatenate([np.zeros((s.n, 1)), s.va, s.vb, np.full((s.n, 1), 100.0)], axis=1)

    def shape(lo, hi):
        q = gap_slices(lo, hi)
        t = s.spline.inverse(interp_rows(q, wpts, vpts).reshape(s.n, -1)).reshape(q.shape)
        return sulfur_shape(t, s.total[:, None, None]), q

    f_cut, _ = shape(s.pl, s.ph)
    base = row_sum(f_cut) / PRIOR_SLICES
    use = (base[0] > 0) & (s.pv[0] > 0)
    if not use.any():
        return log_prior(s, a, b)
    mids = 0.5 * (s.pl + s.ph)
    with np.errstate(divide="ignore", invalid="ignore"):
        lr = np.log(s.pv / base)
    f_gap, q = shape(a, b)
    lg = interp_rows(q, mids[:, use], lr[:, use])
    inner = ((mids[:, use][:, None, :] < a[:, :, None]).any(axis=2)
             & (mids[:, use][:, None, :] > b[:, :, None]).any(axis=2))  # measured cuts on both sides
    return np.where(inner, row_sum(f_gap * np.exp(lg)) / PRIOR_SLICES * (b - a), log_prior(s, a, b))


def sulfur_rows(g: Rows) -> list[Rows]:
    """The sulfur distribution of every row from its narrow cuts: sulfur against wt % distilled.

    A :func:`~assaycut.model.property_splines.property_spline_rows` of narrow-cut sulfur against mid-weight %
    (light ends carry none), kept as measured with the whole-crude balance closed on the part no cut covers
    (:func:`~assaycut.model.closure.closed_by_difference`, the gaps first estimated by :func:`_shape_prior`),
    or scaled to reproduce the whole-crude sulfur (``reconcile``); without a whole-crude sulfur the narrow
    cuts give the figure.  Fewer than two
    narrow-cut sulfur values leave the distribution empty (``sulfur_dist`` None for the set), with a warning.

    Row fields read: those of :func:`density_rows`' result, ``nc_s`` (narrow-cut sulfur), ``sulfur`` and
    ``s_given`` (whole-crude sulfur [wt %], given or not).  Row fields set: ``sulfur_dist``, ``sulfur`` (the
    model's), ``sulfur_given``, ``s_rec`` (the scale, (factor - 1) x 100 [%]; NaN when not scaled),
    ``s_closure`` and ``s_gap_pct`` (as :func:`density_rows`' ``sg_closure``, ``sg_gap_pct``).
    """
    if not g.has_nc:
        return [_no_sulfur(g)]
    return each(g.split(np.isfinite(g.nc_s)), _sulfur_set)


def _no_sulfur(g: Rows) -> Rows:
    for w, m in zip(g.warn, g.meth):
        w.append("no narrow-cut sulfur (fewer than 2 values): cut sulfur is left empty")
        m["sulfur"] = "not estimated (no narrow-cut sulfur)"
    g.sulfur_dist = None
    return g.put(s_rec=np.full(g.n, np.nan), s_closure=np.zeros(g.n), s_gap_pct=np.full(g.n, np.nan))


def _sulfur_set(g: Rows) -> list[Rows]:
    if np.isfinite(g.nc_s[0]).sum() < 2:
        return [_no_sulfur(g)]
    k = g.va.shape[1]
    le_x = g.le_mid if bool(g.placed[0]) else np.zeros((g.n, 0))
    w = weight_distilled(g.sg_dist, g.sg[:, None], np.concatenate([g.va, g.vb, le_x], axis=1))  # one call
    g.put(wa=w[:, :k], wb=w[:, k:2 * k], le_w=w[:, 2 * k:])
    out = []
    for s in g.split(np.isfinite(g.nc_s) & (g.wb - g.wa > GAP_MIN_PCT)):
        ok = np.isfinite(s.nc_s[0]) & (s.wb[0] - s.wa[0] > GAP_MIN_PCT)
        s.put(first=s.wa[:, ok].min(axis=1))
        for t in s.split(s.le_w < s.first[:, None]):
            fix = t.le_w[0] < t.first[0]
            t.put(pl=t.wa[:, ok], ph=t.wb[:, ok], pv=t.nc_s[:, ok], pfx=t.le_w[:, fix],
                  pfy=np.zeros((t.n, int(fix.sum()))))
            for u in property_spline_rows(t, "raw"):
                if u.reconcile:
                    out.append(_sulfur_scaled(u))
                    continue
                le_end = (weight_distilled(u.sg_dist, u.sg[:, None], u.le_pct[:, None])[:, 0] if bool(u.placed[0])
                          else np.zeros(u.n))
                out += [_sulfur_closed(v) for v in closed_by_difference(
                    u, le_end, np.where(u.s_given, u.sulfur, np.nan), SULFUR_CLOSURE, _shape_prior)]
    return out


def _sulfur_closed(g: Rows) -> Rows:
    """The narrow cuts' sulfur kept as measured, the whole-crude balance closed on the gaps
    (:func:`~assaycut.model.closure.closed_by_difference`); the model's whole-crude sulfur is what its
    distribution integrates to."""
    total = g.raw.integral(np.zeros((g.n, 1)), np.full((g.n, 1), 100.0))[:, 0] / 100.0
    for r in np.flatnonzero(~g.s_given):
        g.warn[r].append(f"no whole-crude sulfur given: {total[r]:.3f} wt % is taken from the narrow cuts")
    g.put(sulfur_given=np.where(g.s_given, g.sulfur, np.nan), sulfur=total, s_rec=np.full(g.n, np.nan),
          sulfur_dist=g.raw, s_closure=np.where(g.s_given, g.closure, 0.0), s_gap_pct=g.gap_pct)
    for r, m in enumerate(g.meth):
        m["sulfur"] = ("narrow-cut sulfur kept as measured (monotone spline against mid-weight %, matching each "
                       "cut's mean)" + closure_text(g.s_gap_pct[r], "wt %", g.s_closure[r], "wt %", "sulfur", 3))
    return g


def _sulfur_scaled(g: Rows) -> Rows:
    """The narrow cuts' sulfur distribution scaled to the whole-crude sulfur where it is given; else the whole
    crude's sulfur taken from it."""
    total = g.raw.integral(np.zeros((g.n, 1)), np.full((g.n, 1), 100.0))[:, 0] / 100.0
    with np.errstate(divide="ignore", invalid="ignore"):
        factor = np.where(g.s_given, np.where(total > 0, g.sulfur / total, 1.0), 1.0)
    for r in np.flatnonzero(~g.s_given):
        g.warn[r].append(f"no whole-crude sulfur given: {total[r]:.3f} wt % is taken from the narrow cuts")
    g.put(sulfur_given=np.where(g.s_given, g.sulfur, np.nan), sulfur=np.where(g.s_given, g.sulfur, total),
          s_rec=(factor - 1.0) * 100.0, sulfur_dist=g.raw.scaled(factor), s_closure=np.zeros(g.n),
          s_gap_pct=np.full(g.n, np.nan))
    for r, m in enumerate(g.meth):
        m["sulfur"] = (f"narrow-cut sulfur (monotone spline against mid-weight %, matching each cut's mean); scaled "
                       f"by {g.s_rec[r]:+.2f} % to reproduce the whole-crude sulfur {g.sulfur[r]:.3f} wt %")
    return g
