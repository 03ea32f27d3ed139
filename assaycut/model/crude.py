"""The crude model: TBP curve on both bases plus density and sulfur distributions, built from an Assay.

Building it takes these steps:

1. every curve of the assay is put on the TBP basis (:func:`assaycut.model.input_curves.curve_to_tbp`);
   vacuum curves extend the atmospheric one past its last point;
2. a weight-basis curve is converted to volume (:func:`_weight_basis`);
3. light ends are placed at the front at their normal boiling points and the curve model is fitted
   (:func:`assaycut.model.tbp_curve.curve_rows`);
4. density and sulfur distributions are fitted to the narrow cuts and reconciled to the whole crude
   (:mod:`assaycut.model.distributions`).

There is one builder, :func:`build_rows`: each step is a function over rows (:mod:`assaycut.model.rows`), run
on all the assays of one structure at once (:func:`build_models`; :func:`build_model` is a batch of one) or on
the draws of one assay (:func:`build_draws`).  The warnings and method texts are made row by row beside the
arrays.

Weight percent follows from the density distribution: W(V) = ∫0^V SG dv / SG_crude.
"""

from __future__ import annotations

import numpy as np

from ..errors import AssaycutError, CurveError, InputError
from ..methods.characterisation import sg_from_watson_k, watson_k
from ..methods.pchip import Pchip
from ..units import pct_text
from .assay import Assay, CurveData, validate_assay, value_faults
from .crude_model import CrudeModel
from .cut_yields import cut_yield_points
from .distributions import (KW_EXTENSION_TOL_SG, closure_text, cut_positions, density_rows, kw_extension_sg_spread,
                            sulfur_rows, weight_distilled)
from .input_curves import curve_to_tbp
from .lightends import convert_basis, find_component
from .quality_distributions import estimated_sulfur_rows, quality_distributions
from .rows import Rows, each
from .tbp_curve import curve_rows, flat_tail_rows, staircase, tbp_curve_of


def build_model(assay: Assay, method: str = "daubert-1994", qualities: bool = True,
                reconcile: bool = False) -> CrudeModel:
    """Build the crude model from an assay (the steps are in the module docstring): :func:`build_models` of one.

    Parameters
    ----------
    assay : Assay
    method : str
        TBP <-> D86 method for D86 input curves: 'daubert-1994' (default) or 'riazi-daubert-1986'.
    qualities : bool
        Build the narrow-cut quality distributions (default); a study that reads only yields, gravity and
        sulfur skips them.
    reconcile : bool
        Scale the narrow cuts' density and sulfur proportionally to reproduce the whole-crude values, instead
        of keeping them as measured and closing the balance on the part of the crude they do not cover
        (:func:`~assaycut.model.closure.closed_by_difference`, the default).

    Returns
    -------
    CrudeModel

    Raises
    ------
    InputError
        For an assay the readers would have refused (:func:`~assaycut.model.assay.validate_assay`).
    CurveError
        For a curve that cannot be modelled.
    """
    out = build_models([assay], method, qualities, reconcile)[0]
    if isinstance(out, AssaycutError):
        raise out
    return out


def build_models(assays, method: str = "daubert-1994", qualities: bool = True, reconcile: bool = False) -> list:
    """Build many crude models together: the one model builder.

    The assays are grouped by structure (the same curves, point counts, light-ends components and narrow-cut
    count) and each group is built row-wise, stage by stage, over all its assays at once
    (:func:`build_rows`); one assay is a group of one, and each model is the same to the last bit whatever
    else is in the batch (tested).  The narrow-cut qualities are then built per assay.

    Parameters
    ----------
    assays : sequence of Assay
    method : str
        As for :func:`build_model`.
    qualities, reconcile : bool
        As for :func:`build_model`.

    Returns
    -------
    list of CrudeModel or AssaycutError
        In the order of ``assays``: the model, or the error :func:`build_model` would raise for that assay.
    """
    assays = list(assays)
    errors: dict[int, AssaycutError] = {}
    groups: dict[tuple, list[int]] = {}
    for i, a in enumerate(assays):
        try:
            validate_assay(a)
        except AssaycutError as e:
            errors[i] = e
            continue
        groups.setdefault(_structure(a), []).append(i)
    out: list = [None] * len(assays)
    for idx in groups.values():
        for k in range(0, len(idx), BUILD_CHUNK):
            part = idx[k:k + BUILD_CHUNK]
            for s in build_rows(_assay_rows([assays[i] for i in part], part, errors), method, reconcile):
                for r in range(s.n):
                    out[int(s.index[r])] = crude_model_of(s, r)
    for i, e in errors.items():
        out[i] = e
    if qualities:
        for i, m in enumerate(out):
            if isinstance(m, CrudeModel):
                try:
                    m.qualities = quality_distributions(assays[i], m, m.warnings, m.methods, reconcile)
                except AssaycutError as e:
                    out[i] = e
    return out


BUILD_CHUNK = 256
"""Models built side by side at most (bounds the memory of the models in progress)."""


def _structure(a: Assay) -> tuple:
    """What the assays built together share (everything else is a row value)."""
    nc, le = a.narrow_cuts, a.light_ends
    return (tuple((c.method, c.basis, np.size(c.percent), c.pressure_mmhg, c.watson_k) for c in a.curves),
            None if nc is None else len(nc), None if le is None or not le.amounts else (tuple(le.amounts), le.basis),
            a.sulfur_wt_pct is None)


def _assay_rows(assays: list, index, errors: dict) -> Rows:
    """The measured values of assays of one structure (:func:`_structure`) as the rows of one set."""
    nc = [a.narrow_cuts for a in assays]
    g = _rows(assays[0], list(assays), index, errors, np.array([float(a.sg) for a in assays]),
              np.array([np.nan if a.sulfur_wt_pct is None else float(a.sulfur_wt_pct) for a in assays]),
              np.array([a.sulfur_wt_pct is not None for a in assays]),
              [[np.asarray(a.curves[k].percent, dtype=float) for a in assays] for k in range(len(assays[0].curves))],
              [[np.asarray(a.curves[k].temp_c, dtype=float) for a in assays] for k in range(len(assays[0].curves))],
              None if nc[0] is None else {f: [getattr(x, f) for x in nc]
                                          for f in ("start_c", "end_c", "sg", "sulfur_wt_pct", "vol_pct", "wt_pct")},
              [[a.light_ends.amounts[key] for key in assays[0].light_ends.amounts] for a in assays]
              if assays[0].light_ends is not None and assays[0].light_ends.amounts else None)
    g.checked = True  # validate_assay has checked every value
    return g


def build_draws(assay: Assay, vals, method: str = "daubert-1994", reconcile: bool = False) -> tuple[list[Rows], int]:
    """The crude models of R draws of one assay's measured values (:class:`~assaycut.model.draws.DrawValues`),
    built together by :func:`build_rows` as rows (what :meth:`~assaycut.cutting.model_rows.BatchModel.from_rows`
    cuts), and the number of draws that could not be modelled.  Each draw's model is the one
    :func:`build_model` gives the draw's assay (tested).
    """
    n = vals.sg.size
    try:
        validate_assay(assay)
    except AssaycutError:
        return [], n
    nc, le = assay.narrow_cuts, assay.light_ends
    rep = lambda x: np.repeat(np.asarray(x, dtype=float)[None, :], n, axis=0)  # noqa: E731
    given = vals.sulfur_wt_pct is not None
    g = _rows(assay, [assay] * n, np.arange(n), {}, vals.sg, vals.sulfur_wt_pct if given else np.full(n, np.nan),
              np.full(n, given), vals.percent, vals.temp_c,
              None if nc is None else {"start_c": rep(nc.start_c), "end_c": rep(nc.end_c), "sg": vals.nc_sg,
                                       "sulfur_wt_pct": vals.nc_sulfur_wt_pct, "vol_pct": rep(nc.vol_pct),
                                       "wt_pct": rep(nc.wt_pct)},
              rep(list(le.amounts.values())) if le is not None and le.amounts else None)
    leaves = build_rows(g, method, reconcile)
    return leaves, len(g.errors)


def _rows(base: Assay, assays: list, index, errors: dict, sg, sulfur, s_given, percent, temp_c, nc,
          le_amounts) -> Rows:
    """A set of rows of one structure (that of ``base``) from their values: ``sulfur`` [wt %] and ``s_given``
    (R,), the whole-crude sulfur and whether it is given;
    ``percent``, ``temp_c`` per curve (R, n); ``nc`` the narrow-cut columns start_c, end_c, sg, vol_pct, wt_pct,
    sulfur_wt_pct (R, k) or None; ``le_amounts`` the light-ends amounts (R, m) in the order of ``base``'s, or
    None."""
    g = Rows(index, errors)
    g.base = base
    g.checked = False
    g.put(assay=assays, sg=np.asarray(sg, dtype=float), sulfur=np.asarray(sulfur, dtype=float),
          s_given=np.asarray(s_given, dtype=bool))
    for k in range(len(base.curves)):
        g.put(**{f"cpct{k}": np.array(percent[k], dtype=float), f"ctemp{k}": np.array(temp_c[k], dtype=float)})
    g.has_nc = nc is not None
    if g.has_nc:
        g.put(nc_start=np.array(nc["start_c"], dtype=float), nc_end=np.array(nc["end_c"], dtype=float),
              nc_sg=np.array(nc["sg"], dtype=float), nc_s=np.array(nc["sulfur_wt_pct"], dtype=float),
              nc_vol=np.array(nc["vol_pct"], dtype=float), nc_wt=np.array(nc["wt_pct"], dtype=float))
    le = base.light_ends
    g.le_basis = le.basis if le is not None else None
    g.le_keys = list(le.amounts) if le_amounts is not None else []
    if g.le_keys:
        g.put(le_amt=np.array(le_amounts, dtype=float))
    return g


def build_rows(g: Rows, method: str = "daubert-1994", reconcile: bool = False) -> list[Rows]:
    """The crude models of a set of rows of one structure (:func:`_assay_rows`, or the draws of one assay), built
    row-wise stage by stage; the rows' errors go to the set's error record.

    Stages: the measured values checked (:func:`~assaycut.model.assay.value_faults`), the curves put on the TBP
    basis (:func:`_tbp_points`), then on the volume basis for a weight-basis curve (:func:`_weight_basis`), the
    light ends (:func:`_light_ends_nodes`), the curve (:func:`~assaycut.model.tbp_curve.curve_rows`), the
    narrow cuts' positions on it, the density and sulfur distributions
    (:func:`~assaycut.model.distributions.density_rows`, :func:`~assaycut.model.distributions.sulfur_rows`,
    :func:`~assaycut.model.quality_distributions.estimated_sulfur_rows`).  Each stage splits the set where rows
    take different branches; the leaves come back, each with the row fields :func:`crude_model_of` reads.
    """
    base = g.base
    g.reconcile = reconcile
    g.put(warn=[[w for c in a.curves for w in c.warnings] for a in g.assay], meth=[{} for _ in range(g.n)])
    whats = [(c.where or f"curve {k}", not c.where) for k, c in enumerate(base.curves, start=1)]
    faults = [None] * g.n if g.checked else value_faults(
        g.sg, g.sulfur, g.s_given, [(getattr(g, f"cpct{k}"), getattr(g, f"ctemp{k}")) for k in range(len(base.curves))],
        whats)
    g = g.fail([f is not None for f in faults],
               lambda r: InputError(faults[r][0], file=(g.assay[r].source or None) if faults[r][1] else None))
    sets = each(each(_tbp_points(g, method), cut_yield_points, base.curves[0].basis), flat_tail_rows)
    if base.curves[0].basis == "wt":
        return each(sets, _weight_basis)
    for s in sets:
        s.put(v=s.p, fit=[None] * s.n)
    return each(sets, _model_set)


def _tbp_points(g: Rows, method: str) -> list[Rows]:
    """The main curve on the TBP basis (``p``, ``t``), extended by the points of any vacuum curve that lie beyond
    it (:func:`~assaycut.model.input_curves.curve_to_tbp`)."""
    out = []
    for s in _curve_on_tbp(g, 0, method):
        for r in range(s.n):
            s.warn[r] += s.cw[r]
            s.meth[r]["curve"] = s.cdesc[r]
        s.put(p=s.cp, t=s.ct)
        parts = [s]
        for k in range(1, len(g.base.curves)):
            parts = each(parts, _vacuum_behind, k, method)
        out += parts
    return out


def _curve_on_tbp(g: Rows, k: int, method: str) -> list[Rows]:
    """Curve ``k`` of every row on the TBP basis: row fields ``cp``, ``ct`` (the points), ``cw`` (the conversion's
    warnings, naming the row's own curve) and ``cdesc`` (the method used); sets split by the points converted."""
    c = g.base.curves[k]
    P, T = getattr(g, f"cpct{k}"), getattr(g, f"ctemp{k}")
    done = False
    if c.method in ("TBP", "D1160"):  # point by point: all rows at once (a refusal: row by row, below)
        try:
            p, t, w, desc = curve_to_tbp(CurveData(c.method, c.basis, P, T, c.pressure_mmhg, c.where, [],
                                                   c.watson_k), method)
            cp, ct, warns, descs, done = p.reshape(P.shape), t.reshape(P.shape), [w] * g.n, [desc] * g.n, True
        except AssaycutError:
            pass
    if not done:  # at standard points: row by row
        res: list = []
        for r in range(g.n):
            try:
                res.append(curve_to_tbp(CurveData(c.method, c.basis, P[r], T[r], c.pressure_mmhg,
                                                  g.assay[r].curves[k].where, [], c.watson_k), method))
            except AssaycutError as e:
                res.append(e)
        g = g.fail([isinstance(x, AssaycutError) for x in res], lambda r: res[r])
        res = [x for x in res if not isinstance(x, AssaycutError)]
        cp, ct, warns, descs = ([x[j] for x in res] for j in range(4))
    if not g.n:
        return []
    g.put(cp=cp, ct=ct, cdesc=descs, cw=[[f"{a.curves[k].where}: {m}" for m in w] for a, w in zip(g.assay, warns)])
    out = []
    for s in g.split(np.array([len(x) for x in g.cp])):  # rows grouped by the points converted
        s.put(cp=np.array(s.cp), ct=np.array(s.ct))
        out.append(s)
    return out


def _vacuum_behind(g: Rows, k: int, method: str) -> list[Rows]:
    """The points of vacuum curve ``k`` that lie beyond the main curve, appended to it (``p``, ``t``)."""
    main, extra = g.base.curves[0], g.base.curves[k]
    out = []
    for s in _curve_on_tbp(g, k, method):
        if extra.basis != main.basis:
            s.fail(np.ones(s.n, dtype=bool), lambda r, s=s: CurveError(
                f"{s.assay[r].curves[k].where}: the vacuum curve is on the {extra.basis} basis but the main curve "
                f"is on the {main.basis} basis; give both on one basis"))
            continue
        for u in s.split((s.cp > s.p[:, -1:]) & (s.ct > s.t[:, -1:])):
            keep = (u.cp[0] > u.p[0, -1]) & (u.ct[0] > u.t[0, -1])
            for r in range(u.n):
                u.warn[r] += u.cw[r]
                where = u.assay[r].curves[k].where
                if not keep.any():
                    u.warn[r].append(f"{where}: no point lies beyond the main curve ({pct_text(u.p[r, -1])} %, "
                                     f"{u.t[r, -1]:.1f} °C); the vacuum curve is not used")
                elif not keep.all():
                    u.warn[r].append(f"{where}: {int((~keep).sum())} point(s) overlapping the main curve are not used")
            if keep.any():
                u.put(p=np.concatenate([u.p, u.cp[:, keep]], axis=1), t=np.concatenate([u.t, u.ct[:, keep]], axis=1))
                for m, d in zip(u.meth, u.cdesc):
                    m["vacuum curve"] = d
            out.append(u)
    return out


WT_NODE_TOL = 1e-9
"""How closely a weight-basis curve's own nodes are reproduced by the model's wt % distilled. [wt %]"""
FREEZE_FIT_WT = 1e-6
"""Once every node of a weight-basis curve is this close, the passes keep the extension's fit as it is: the fit
is a grid search, so refitting points that move by less than this can hop between two neighbouring grid values
and stall the passes just above :data:`WT_NODE_TOL`; the extension still joins the last point exactly. [wt %]"""
WT_PASSES = 60
"""Passes at most for a weight-basis curve's nodes."""


def _weight_basis(g: Rows) -> list[Rows]:
    """The crude models of weight-basis curves, exact at their nodes.

    The volume percent of each node is found so that the model's own weight distilled, W(V) = ∫0^V SG dv /
    SG_crude with the density distribution the model then uses for every cut, equals the measured wt % at
    that node: starting from the narrow-cut/Watson K estimate (:func:`_wt_to_vol`), each pass refits the
    curve and the density distribution and moves every node by dV = (w_i - W(V_i)) SG_crude / SG(V_i)
    (Newton's step for the fixed distribution), until every node is within :data:`WT_NODE_TOL` wt %.  Each
    row passes on its own until it closes.
    """
    g = _to_volume_basis(g)
    if not g.n:
        return []
    g.put(v=g.v0, fit=[None] * g.n)
    pos = {int(i): r for r, i in enumerate(g.index)}  # row of each index in g
    v, fits = g.v0.copy(), [None] * g.n
    closes = np.abs(g.p[:, -1] - 100.0) < 1e-9
    pending = g
    done: list[Rows] = []
    miss_worst = np.zeros(g.n)
    for _ in range(WT_PASSES):
        trial = pending.take(np.arange(pending.n))
        trial.put(warn=[list(w) for w in pending.warn], meth=[dict(m) for m in pending.meth])
        again = []
        for s in _model_set(trial):
            miss = s.p - weight_distilled(s.sg_dist, s.sg[:, None], s.v)
            worst = np.max(np.abs(miss), axis=1)
            ok = worst < WT_NODE_TOL
            for r in np.flatnonzero(ok):
                s.meth[r]["basis"] = ("weight-basis curve: volume percents solved so that the model's weight "
                                      "distilled, from its density distribution, reproduces every measured wt % point")
            done.append(s.take(ok))
            nk = np.flatnonzero(~ok)
            if not nk.size:
                continue
            at = np.array([pos[int(i)] for i in s.index[nk]])
            vn = np.clip(s.v[nk] + miss[nk] * s.sg[nk, None] / s.sg_dist.take(nk)(s.v[nk]), 0.0, 100.0)
            vn[closes[at], -1] = 100.0
            v[at] = np.maximum.accumulate(vn, axis=1)
            miss_worst[at] = worst[nk]
            for r, i in zip(nk, at):
                if worst[r] < FREEZE_FIT_WT:  # from here on the extension keeps this fit (see FREEZE_FIT_WT)
                    fits[i] = s.fit[r]
            again += at.tolist()
        if not again:
            break
        pending = g.take(np.array(sorted(again)))
        pending.put(v=v[sorted(again)], fit=[fits[i] for i in sorted(again)])
    if again:  # still missing after every pass
        left = sorted(again)
        g.take(np.array(left)).fail(np.ones(len(left), dtype=bool), lambda r: CurveError(
            f"{g.assay[left[r]].curves[0].where}: the weight-basis curve could not be put on the volume basis "
            f"consistently with the cut densities (nodes missed by up to {miss_worst[left[r]]:.2g} wt %)"))
    return done


def _model_set(g: Rows) -> list[Rows]:
    """Curve, density and sulfur distributions of rows with volume-basis TBP points (``v`` [vol %], ``t`` [°C];
    ``fit``: the extension's Riazi fit to use instead of fitting, or None)."""
    g.put(cwarn=[[] for _ in range(g.n)])
    out = []
    for s in _light_ends_nodes(g):
        out += curve_rows(s)
    for s in out:
        for r in range(s.n):
            s.warn[r] += s.cwarn[r]
            f = s.fit[r]
            if f is not None:
                s.meth[r]["extension"] = (f"Riazi distribution fitted to {f.npoints} points (RMS {f.rms_c:.1f} °C); "
                                          f"used past {pct_text(s.mhi[r])} vol %"
                                          + (f" and before {pct_text(s.mlo[r])} vol %" if s.mlo[r] > 0 else ""))
        if s.has_nc:
            va, vb = cut_positions(s.spline, s.nc_start, s.nc_end)
            s.put(va=va, vb=vb)
    out = each(out, density_rows)
    for s in out:
        for r in range(s.n):
            if np.isfinite(s.sg_gap_pct[r]):  # kept as measured, closed on the gaps
                s.meth[r]["density"] = (s.dens_src[r].replace("narrow-cut densities", "narrow-cut densities kept as "
                                                              "measured", 1)
                                        + closure_text(s.sg_gap_pct[r], "vol %", s.sg_closure[r], "SG", "SG", 4))
            else:
                s.meth[r]["density"] = (f"{s.dens_src[r]}; scaled by {s.dens_rec[r]:+.2f} % to reproduce the "
                                        f"whole-crude SG {s.sg_given[r]:.4f}")
        _properties_on_extension(s)
    out = each(out, sulfur_rows)
    done = []
    for s in out:
        if s.sulfur_dist is None and s.s_given[0]:
            for t in estimated_sulfur_rows(s):
                for w, m, x in zip(t.warn, t.meth, t.sulfur):
                    w[:] = [w_ for w_ in w if not w_.startswith("no narrow-cut sulfur")]
                    w.append("no narrow-cut sulfur: cut sulfur is estimated from the whole-crude sulfur (Riazi, "
                             "Nasimi & Roomi 1999 over the curve, scaled to the crude) and flagged estimated")
                    m["sulfur"] = ("estimated: Riazi, Nasimi & Roomi (1999) on pseudo-components of the curve (M and "
                                   "n20 by Riazi-Daubert 1987), non-decreasing with boiling range, scaled to the "
                                   f"whole-crude sulfur {x:.3f} wt %")
                t.estimated = True
                done.append(t)
        else:
            s.estimated = False
            done.append(s)
    return done


def _light_ends_nodes(g: Rows) -> list[Rows]:
    """The light-ends components boiling below each row's first point, as a staircase in front of the curve:
    the shared nodes ``front_t`` and the rows' ``front_v`` (cumulative vol %), each component's mid vol %
    ``le_mid`` and the shared SG ``le_sg``; sets split by the components placed."""
    comps = [(find_component(key), j) for j, key in enumerate(g.le_keys)]
    comps = [(c, j) for c, j in comps if c is not None]
    if not comps:
        return [g]
    out = []
    for s in g.split(np.column_stack([g.le_amt[:, j] > 0 for _, j in comps])):
        cs = sorted([(c, j) for c, j in comps if s.le_amt[0, j] > 0], key=lambda cj: cj[0].nbp_c)
        nbp = np.array([c.nbp_c for c, _ in cs])
        for u in s.split((nbp[None, :] < s.t[:, :1]).sum(axis=1)):
            m = int((nbp < u.t[0, 0]).sum())
            if m == 0:
                out.append(u)
                continue
            vol = np.column_stack([convert_basis(u.le_amt[:, j], u.le_basis, "vol", c.sg, u.sg) for c, j in cs[:m]])
            cum = np.cumsum(vol, axis=1)
            ft, _ = staircase(nbp[:m], cum[0])
            u.front_t = ft
            u.le_sg = np.array([c.sg for c, _ in cs[:m]])
            u.put(front_v=np.stack([np.concatenate([np.zeros((u.n, 1)), cum[:, :-1]], axis=1), cum],
                                   axis=2).reshape(u.n, 2 * m),
                  le_mid=cum - vol / 2)
            out.append(u)
    return out


AT_NODE_C = 1e-3
"""A narrow-cut boundary this close to a measured point counts as on it: its position then moves with the
extension by less than the curve's slope x 0.001 °C, far below laboratory precision. [°C]"""


def _properties_on_extension(g: Rows) -> None:
    """Why the density and sulfur distributions, hence every cut's gravity, depend on the fitted extension
    (row field ``on_ext``: the text, '' when they do not).

    They do when the curve is extended and either the density comes from one Watson K fitted to the whole-crude
    gravity over the whole curve and the extension's alternative fits move the cuts' SG by
    :data:`~assaycut.model.distributions.KW_EXTENSION_TOL_SG` or more (:func:`kw_extension_sg_spread`), or a
    narrow cut's boundary lies where the curve depends on the extension and not on a measured point (its
    position on the curve, hence the distributions through their whole-crude reconciliation, then moves with
    the extension).
    """
    texts = [""] * g.n
    if g.fit[0] is not None:  # extended (every row of a set alike)
        if g.has_nc and np.isnan(g.kw[0]):
            rows = np.arange(g.n)
            lo = g.T[rows, (g.V < g.safe_lo[:, None]).sum(axis=1)]  # both are measured nodes: the first node there
            hi = g.T[rows, (g.V < g.safe_hi[:, None]).sum(axis=1)]
            bounds = np.concatenate([g.nc_start, g.nc_end], axis=1)
            at_node = (np.abs(bounds[:, :, None] - g.mt[:, None, :]) <= AT_NODE_C).any(axis=2)
            out = np.isfinite(bounds) & ((bounds > hi[:, None] + 1e-9) | (bounds < lo[:, None] - 1e-9)) & ~at_node
            for r in np.flatnonzero(out.any(axis=1)):
                texts[r] = (f"narrow-cut boundaries at {', '.join(f'{b:g}' for b in np.unique(bounds[r, out[r]]))} °C "
                            f"lie where the curve depends on its fitted extension, so the density and sulfur "
                            f"distributions move with it")
        elif np.isfinite(g.kw[0]):
            spread = kw_extension_sg_spread(g)
            for r in np.flatnonzero(spread >= KW_EXTENSION_TOL_SG):
                texts[r] = (f"without narrow-cut densities, every cut's gravity comes from one Watson K fitted to the "
                            f"whole-crude gravity over the whole curve, its fitted extension included (the "
                            f"extension's alternative fits move the cuts' SG by up to {spread[r]:.4f})")
    g.put(on_ext=texts)


def crude_model_of(g: Rows, r: int) -> CrudeModel:
    """Row ``r`` of a leaf set of :func:`build_rows` (or :func:`build_draws`) as a CrudeModel (its own single
    splines)."""
    one = lambda p: Pchip(p.X[r], p.Y[r], p.D[r], p.C[r])  # noqa: E731
    given = bool(g.s_given[r])
    has_sulfur = g.sulfur_dist is not None
    return CrudeModel(tbp_curve_of(g, r), one(g.sg_dist), one(g.sulfur_dist) if has_sulfur else None,
                      float(g.sg[r]), float(g.sulfur[r]) if (given or has_sulfur) else None, _num(g.dens_rec[r]),
                      _num(g.s_rec[r]) if has_sulfur and not g.estimated else None, g.dens_src[r],
                      None if np.isnan(g.kw[r]) else float(g.kw[r]), g.on_ext[r], g.estimated,
                      float(g.sg_closure[r]), float(g.s_closure[r]), float(g.sg_gap_pct[r]), float(g.s_gap_pct[r]),
                      methods=g.meth[r], warnings=g.warn[r])


def _num(x) -> float | None:
    """A float, or None for NaN."""
    return None if np.isnan(x) else float(x)


def _wt_to_vol(g: Rows) -> tuple[np.ndarray, np.ndarray]:
    """First estimate of the vol % of each row's cumulative wt % points (``p``, ``t``): dV = dW * SG_crude /
    SG(interval), and per row whether a measured narrow-cut SG entered it.

    SG of each interval is the narrow-cut SG covering its mid temperature, else constant Watson K from the
    crude's own 50 % point.  The starting point of :func:`_weight_basis`, which makes it exact.
    """
    w, t = g.p, g.t
    t_mid = np.concatenate([t[:, :1], 0.5 * (t[:, 1:] + t[:, :-1])], axis=1)
    kw = watson_k(np.array([np.interp(50.0, w[r], t[r]) for r in range(g.n)]), g.sg)
    sg = sg_from_watson_k(t_mid, kw[:, None])
    measured = np.zeros(g.n, bool)
    if g.has_nc:
        for j in range(g.nc_sg.shape[1]):
            s, e, x = g.nc_start[:, j:j + 1], g.nc_end[:, j:j + 1], g.nc_sg[:, j:j + 1]
            lo = np.where(np.isnan(s), -np.inf, s)
            hi = np.where(np.isnan(e), np.inf, e)
            inside = np.isfinite(x) & (t_mid > lo) & (t_mid <= hi)
            sg = np.where(inside, x, sg)
            measured |= inside.any(axis=1)
    dw = np.diff(np.concatenate([np.zeros((g.n, 1)), w], axis=1), axis=1)
    return np.cumsum(dw * g.sg[:, None] / sg, axis=1), measured


def _to_volume_basis(g: Rows) -> Rows:
    """Volume percents ``v0`` of weight-basis curves, closed at 100 % where the weight curve is; rows whose curve
    converts to more than 100 % are refused."""
    w_last = g.p[:, -1]
    p, measured = _wt_to_vol(g)
    closes = (np.abs(w_last - 100.0) < 1e-9) & (np.abs(p[:, -1] - 100.0) > 1e-9)
    factor = np.where(closes, 100.0 / p[:, -1], 1.0)
    for r in np.flatnonzero(closes & (np.abs(factor - 1.0) > 0.02)):
        g.warn[r].append(f"the weight-basis curve converts to {p[r, -1]:.1f} vol % at 100 wt %: "
                         f"{_disagree(measured[r])}, by {abs(factor[r] - 1) * 100:.1f} %; the volume percents are "
                         f"scaled to close at 100 %")
    g.put(v0=np.where(closes[:, None], p * factor[:, None], p))
    return g.fail(~closes & (p[:, -1] > 100.0 + 1e-6), lambda r: CurveError(
        f"the weight-basis curve converts to {p[r, -1]:.1f} vol % at {pct_text(w_last[r])} wt %, above 100 %: "
        f"{_disagree(measured[r])}; check the curve's basis and temperatures and the crude gravity"))


def _disagree(measured: bool) -> str:
    """What disagrees in a weight-to-volume conversion that does not close, for its messages."""
    if measured:
        return "the narrow cuts' densities and the crude gravity disagree"
    return ("the curve and the crude gravity disagree (no narrow-cut densities: each interval's density is "
            "estimated at constant Watson K from the crude gravity and the curve's 50 % point)")
