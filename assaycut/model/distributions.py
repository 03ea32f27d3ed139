"""Property distributions of the crude model: density against volume distilled, sulfur against weight
distilled, each a monotone spline through the narrow-cut measurements that reproduces each cut's mean.

Built row-wise for a set of crude models under construction (:class:`~assaycut.model.rows.Rows`, the model
builder's stages :func:`density_rows` and :func:`sulfur_rows`); one spline alone is a set of one
(:func:`property_spline`).
"""

from __future__ import annotations

import numpy as np

from ..errors import CurveError
from ..methods.characterisation import sg_from_watson_k, watson_k_numerator
from ..methods.pchip import Pchip, hermite_combine, hermite_integral_basis, search_rows, segment_integrals, slopes_on
from .assay import Assay
from .lightends import GAS_RANGE_MAX_C, gas_range_sg
from .rows import Rows, each


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


def property_spline(lo, hi, values, fixed=(), iterations: int = 30, floor: float | None = 0.0) -> Pchip:
    """Monotone property curve through narrow-cut values placed at their mid percent, adjusted so that its
    average over each narrow cut reproduces the measured value (:func:`property_spline_rows` of one row).

    Each measured value sits at the middle of its cut [lo, hi]; the PCHIP through them (held flat beyond the
    outermost points) is then corrected by fixed-point iteration, y_i <- y_i + (measured_i - mean_i), until
    the spline's mean over every cut matches its measurement (to 1e-7 of the largest value, or the best found
    before the correction stops improving).

    Parameters
    ----------
    lo, hi : array_like
        Cut boundaries on the property's basis. [%]
    values : array_like
        Measured cut averages (SG [-] or sulfur [wt %]).
    fixed : sequence of (x [%], value)
        Extra points held as given (pure light-ends components).
    floor : float or None
        Lowest node value allowed during the correction (0 for contents; None for an index that may be
        negative).

    Returns
    -------
    Pchip
        Property against percent distilled.
    """
    row = lambda z: np.asarray(z, dtype=float).reshape(1, -1)  # noqa: E731
    g = Rows([0]).put(pl=row(lo), ph=row(hi), pv=row(values), pfx=row([q[0] for q in fixed]),
                      pfy=row([q[1] for q in fixed]))
    sp = property_spline_rows(g, "prop", iterations, floor)[0].prop
    return Pchip(sp.X[0], sp.Y[0], sp.D[0], sp.C[0])


def property_spline_rows(g: Rows, name: str, iterations: int = 30, floor: float | None = 0.0) -> list[Rows]:
    """:func:`property_spline` of every row: the cuts ``pl``, ``ph`` (R, k) with their values ``pv`` and the
    points held ``pfx``, ``pfy`` (R, f) are row fields; the spline is set as the row field ``name`` (a Pchip of
    rows).  The sets are split where rows order their nodes differently."""
    out = []
    for s in g.split(np.argsort(np.concatenate([0.5 * (g.pl + g.ph), g.pfx], axis=1), axis=1, kind="stable")):
        mids = 0.5 * (s.pl + s.ph)
        order = np.argsort(np.concatenate([mids[:1], s.pfx[:1]], axis=1), axis=1, kind="stable")[0]
        x = np.concatenate([mids, s.pfx], axis=1)[:, order]
        for t in s.split(np.concatenate([np.ones((s.n, 1), dtype=bool), (x[:, 1:] - x[:, :-1]) > 1e-9], axis=1)):
            out.append(_property_spline_set(t, order, name, iterations, floor))
    return out


def _property_spline_set(t: Rows, order, name, iterations, floor) -> Rows:
    """The splines of a set of rows whose nodes come in the same ``order`` and merge alike."""
    vals = t.pv
    x = np.concatenate([0.5 * (t.pl + t.ph), t.pfx], axis=1)[:, order]
    keep = np.concatenate([[True], (x[0, 1:] - x[0, :-1]) > 1e-9])
    is_cut = (order < vals.shape[1])[keep]
    x = x[:, keep]
    y0 = np.concatenate([vals, t.pfy], axis=1)[:, order][:, keep]
    if x.shape[1] == 1:
        return t.put(**{name: Pchip(np.broadcast_to([0.0, 100.0], (t.n, 2)), np.repeat(y0, 2, axis=1))})
    cut_idx = order[keep][is_cut]
    tol = 1e-7 * np.maximum(np.max(np.abs(vals), axis=1), 1e-12)
    if iterations < 1:  # no iteration at all: the start values
        return t.put(**{name: Pchip(x, y0)})
    best, d, cum = mean_match_arrays(x, y0, is_cut, t.pl[:, cut_idx], t.ph[:, cut_idx], vals[:, cut_idx], tol,
                                     iterations, floor)
    return t.put(**{name: Pchip(x, best, d, cum)})


def mean_match_arrays(x, y, is_cut, a, b, target, tol, iterations: int, floor):
    """The node correction of :func:`property_spline_rows`, row-wise: nodes x and start values y
    (R, n), the cut nodes ``is_cut`` (n,) or (R, n) with every row alike, intervals a, b and their ``target``
    means (R, k), tolerances ``tol`` (R,); the best node values, their slopes and cumulative integrals, (R, n)
    each, every row as it would be alone."""
    is_cut = np.asarray(is_cut, dtype=bool)
    if is_cut.ndim == 2:
        is_cut = is_cut[0]
    y = np.array(y, dtype=float)
    means = _interval_means_rows(x, a, b)
    best = y.copy()
    best_d = np.zeros_like(y)
    best_cum = np.zeros_like(y)
    best_err = np.full(y.shape[0], np.inf)
    active = np.ones(y.shape[0], dtype=bool)
    for _ in range(iterations):
        m, d, cum = means(y)
        err = target - m
        worst = np.max(np.abs(err), axis=1) if err.shape[1] else np.zeros(y.shape[0])
        active &= ~(worst >= 0.95 * best_err)  # no longer improving: keeps its best
        keep = active[:, None]
        np.copyto(best, y, where=keep)
        np.copyto(best_d, d, where=keep)
        np.copyto(best_cum, cum, where=keep)
        best_err = np.where(active, worst, best_err)
        active &= ~(worst < tol)
        if not active.any():
            break
        moved = y[:, is_cut] + err if floor is None else np.maximum(y[:, is_cut] + err, floor)
        y[:, is_cut] = np.where(active[:, None], moved, y[:, is_cut])
    return best, best_d, best_cum


def _interval_means_rows(x: np.ndarray, a: np.ndarray, b: np.ndarray):
    """A function y -> (mean of the PCHIP through (x, y) over each [a, b] (held flat beyond the end nodes), its
    slopes, its cumulative segment integrals), one spline per row: x (R, n) nodes, a and b (R, k) intervals;
    y (R, n) -> means (R, k), slopes and cumulative integrals (R, n).

    The exact integral of :meth:`Pchip.integral`, with the interval ends located once, since only the node
    values change between the iterations of :func:`property_spline`.
    """
    h = np.diff(x, axis=1)
    rows = np.arange(x.shape[0])[:, None]
    n = x.shape[1]
    k = a.shape[1]
    q = np.concatenate([a, b], axis=1)  # both ends of every interval, located once
    qc = np.clip(q, x[:, :1], x[:, -1:])
    i = np.clip(search_rows(x, qc, "right") - 1, 0, n - 2)
    hi = h[rows, i]
    w = hermite_integral_basis((qc - x[rows, i]) / hi)
    below, above = np.minimum(q - x[:, :1], 0.0), np.maximum(q - x[:, -1:], 0.0)
    at = (rows * n + i).ravel()  # flat positions of each end's left node
    width = b - a
    slopes = slopes_on(x)

    def means(y):
        d = slopes(y)
        cum = np.concatenate([np.zeros((y.shape[0], 1)), np.cumsum(segment_integrals(h, y, d), axis=1)], axis=1)
        yf, df = y.ravel(), d.ravel()
        y0, y1 = yf[at].reshape(q.shape), yf[at + 1].reshape(q.shape)
        d0, d1 = df[at].reshape(q.shape), df[at + 1].reshape(q.shape)
        anti = (cum.ravel()[at].reshape(q.shape) + hi * hermite_combine(w, y0, y1, hi * d0, hi * d1)
                + below * y[:, :1] + above * y[:, -1:])
        return (anti[:, k:] - anti[:, :k]) / width, d, cum

    return means



_GAS_NOTE = ("; no light-ends analysis: the curve below n-pentane's boiling point (36.1 °C) is given the SG of the "
             "C2-C5 paraffins boiling at the same temperature (assumed)")
KW_GRID_STEP_PCT = 0.5
"""Width of the slices on which a constant-Watson-K density distribution is laid. [vol %]"""


def density_rows(g: Rows) -> list[Rows]:
    """The density distribution of every row: SG against vol % distilled, reconciled to the whole-crude SG.

    From the narrow-cut densities (:func:`property_spline_rows` against mid-volume %, light-ends components held
    at their own SG) where at least two cuts have one; else at constant Watson K fitted to the whole-crude
    gravity, SG = (1.8 T_b[K])^(1/3)/Kw along the curve (Watson & Nelson 1933; common practice, no single
    source), light ends at their own SG.  Without a light-ends analysis the part of the curve boiling below
    n-pentane takes the SG of the paraffins of the same boiling point
    (:func:`~assaycut.model.lightends.gas_range_sg`, assumed) where no narrow cut covers it.  Either way the
    distribution is scaled so that the whole crude integrates to its SG.

    Row fields read: ``spline`` (the curve V(T)), ``placed``, ``le_mid`` with the shared ``le_sg`` (light ends
    placed: each component's mid vol % and SG), ``le_pct``, ``sg``, ``va``, ``vb`` and ``nc_sg`` (with narrow
    cuts, the shared ``has_nc``), ``warn``.  Row fields set: ``sg_dist`` (Pchip rows), ``dens_rec`` (the scale,
    (factor - 1) x 100 [%]), ``dens_src`` (the source described), ``kw`` (the fitted Watson K, NaN with
    narrow-cut densities).  A row whose light ends weigh as much as the crude gravity allows is refused.
    """
    gas = ~g.placed & (g.spline.lo < GAS_RANGE_MAX_C)  # the IBP is the TBP at 0 %
    key = np.column_stack([gas] + ([np.isfinite(g.nc_sg)] if g.has_nc else []))
    return each(g.split(key), _density_set)


def _density_set(g: Rows) -> list[Rows]:
    gas = not bool(g.placed[0]) and bool(g.spline.lo[0] < GAS_RANGE_MAX_C)
    if gas:
        v_top = g.spline(np.full((g.n, 1), GAS_RANGE_MAX_C))
        g.put(gas_v=np.linspace(0.0, v_top[:, 0], 9, axis=1)[:, :-1] + v_top / 16.0)
    if g.has_nc and np.isfinite(g.nc_sg[0]).sum() >= 2:
        sets = each(g.split(np.isfinite(g.nc_sg) & (g.vb > g.va)), _density_from_cuts, gas)
    else:
        sets = _density_at_constant_kw(g, gas)
    for s in sets:
        for r in range(s.n):
            if s.dens_src[r].endswith(_GAS_NOTE):
                s.warn[r].append("no light-ends analysis: the gravity of the crude boiling below 36.1 °C "
                                 "(n-pentane) is assumed from the C2-C5 paraffins boiling at the same temperature; "
                                 "give a light-ends analysis for measured values")
        factor = 100.0 * s.sg / s.raw.integral(np.zeros((s.n, 1)), np.full((s.n, 1), 100.0))[:, 0]
        s.put(sg_dist=s.raw.scaled(factor), dens_rec=(factor - 1.0) * 100.0)
    return sets


def _density_from_cuts(g: Rows, gas: bool) -> list[Rows]:
    ok = np.isfinite(g.nc_sg[0]) & (g.vb[0] > g.va[0])
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
    kw = np.array([(g.cbrt[r, ~g.fixed[r]] * dv).sum() for r in range(g.n)]) / (100.0 * g.sg - g.fixed_mass)
    raw = Pchip(np.broadcast_to(mids, g.t_mids.shape), np.where(g.fixed, g.le_sgm, sg_from_watson_k(g.t_mids,
                                                                                                     kw[:, None])))
    src = [f"constant Watson K {kw[r]:.2f} fitted to the whole-crude gravity (no narrow-cut densities)"
           + (_GAS_NOTE if g.gas_used[r] else "") for r in range(g.n)]
    return [g.put(raw=raw, dens_src=src, kw=kw)]


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


def sulfur_rows(g: Rows) -> list[Rows]:
    """The sulfur distribution of every row from its narrow cuts: sulfur against wt % distilled.

    A :func:`property_spline_rows` of narrow-cut sulfur against mid-weight % (light ends carry none), scaled to
    reproduce the whole-crude sulfur; without it the narrow cuts give the whole-crude figure.  Fewer than two
    narrow-cut sulfur values leave the distribution empty (``sulfur_dist`` None for the set), with a warning.

    Row fields read: those of :func:`density_rows`' result, ``nc_s`` (narrow-cut sulfur), ``sulfur`` and
    ``s_given`` (whole-crude sulfur [wt %], given or not).  Row fields set: ``sulfur_dist``, ``sulfur``,
    ``s_rec`` (the scale, (factor - 1) x 100 [%]; NaN when not reconciled).
    """
    if not g.has_nc:
        return [_no_sulfur(g)]
    return each(g.split(np.isfinite(g.nc_s)), _sulfur_set)


def _no_sulfur(g: Rows) -> Rows:
    for w, m in zip(g.warn, g.meth):
        w.append("no narrow-cut sulfur (fewer than 2 values): cut sulfur is left empty")
        m["sulfur"] = "not estimated (no narrow-cut sulfur)"
    g.sulfur_dist = None
    return g.put(s_rec=np.full(g.n, np.nan))


def _sulfur_set(g: Rows) -> list[Rows]:
    if np.isfinite(g.nc_s[0]).sum() < 2:
        return [_no_sulfur(g)]
    k = g.va.shape[1]
    le_x = g.le_mid if bool(g.placed[0]) else np.zeros((g.n, 0))
    w = weight_distilled(g.sg_dist, g.sg[:, None], np.concatenate([g.va, g.vb, le_x], axis=1))  # one call
    g.put(wa=w[:, :k], wb=w[:, k:2 * k], le_w=w[:, 2 * k:])
    out = []
    for s in g.split(np.isfinite(g.nc_s) & (g.wb > g.wa)):
        ok = np.isfinite(s.nc_s[0]) & (s.wb[0] > s.wa[0])
        s.put(first=s.wa[:, ok].min(axis=1))
        for t in s.split(s.le_w < s.first[:, None]):
            fix = t.le_w[0] < t.first[0]
            t.put(pl=t.wa[:, ok], ph=t.wb[:, ok], pv=t.nc_s[:, ok], pfx=t.le_w[:, fix],
                  pfy=np.zeros((t.n, int(fix.sum()))))
            out += [_sulfur_scaled(u) for u in property_spline_rows(t, "raw")]
    return out


def _sulfur_scaled(g: Rows) -> Rows:
    """The narrow cuts' sulfur distribution scaled to the whole-crude sulfur where it is given; else the whole
    crude's sulfur taken from it."""
    total = g.raw.integral(np.zeros((g.n, 1)), np.full((g.n, 1), 100.0))[:, 0] / 100.0
    with np.errstate(divide="ignore", invalid="ignore"):
        factor = np.where(g.s_given, np.where(total > 0, g.sulfur / total, 1.0), 1.0)
    for r in np.flatnonzero(~g.s_given):
        g.warn[r].append(f"no whole-crude sulfur given: {total[r]:.3f} wt % is taken from the narrow cuts")
    g.put(sulfur=np.where(g.s_given, g.sulfur, total), s_rec=(factor - 1.0) * 100.0,
          sulfur_dist=g.raw.scaled(factor))
    for r, m in enumerate(g.meth):
        m["sulfur"] = (f"narrow-cut sulfur (monotone spline against mid-weight %, matching each cut's mean); scaled "
                       f"by {g.s_rec[r]:+.2f} % to reproduce the whole-crude sulfur {g.sulfur[r]:.3f} wt %")
    return g
