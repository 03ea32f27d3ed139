"""Crude models of many draws of one assay, as arrays over draws: the fast path of the uncertainty study.

The draws of a Monte Carlo study (:mod:`assaycut.studies.uncertainty`) share the assay's structure (the same
curves, points, light ends and narrow cuts) and differ in their measured values.  :func:`build_draws` takes
the steps of :func:`~assaycut.model.crude.build_model` for all of them at once, one row per draw, with the
same arithmetic, and gives the arrays the library engine cuts (:class:`DrawRows`); no CrudeModel is made per
draw and none of the models' texts (warnings, methods).

It covers the common case: a TBP curve on the volume basis (with any D1160 curves behind it), light ends
placed in front or none, extensions fitted past the last point (lumped at the end cap or not) and before the
first, density and sulfur from the narrow cuts.  A draw taking any other branch of the model building (a
repeated temperature, light ends that do not fit, a curve in the gas range without light ends, densities at
constant Watson K, estimated sulfur, a refused curve...), or whose row pattern differs from most draws' (the
nodes of its property splines, the points kept of a vacuum curve), is left to the reference builder:
:func:`build_draws` returns its index for the caller to build with :func:`~assaycut.model.crude.build_models`.
The tests compare the rows with the reference models.
"""

from __future__ import annotations

import copy
from dataclasses import dataclass

import numpy as np

from ..errors import AssaycutError, InputError
from ..methods.d1160 import vacuum_to_aet_maxwell_bonnell
from ..methods.riazi_distribution import RiaziFit, fit_riazi_many
from .assay import SG_RANGE, Assay, validate_assay
from .crude import AT_NODE_C
from .distributions import mean_match_arrays
from .lightends import GAS_RANGE_MAX_C, convert_basis, find_component
from ..methods.pchip import Pchip, pad_nodes, slopes_on
from .tbp_curve import END_CAP_C, END_CAP_STEP_C, END_FRACTION, LIGHT_ENDS_TOL_PCT, METHANE_NBP_C, STEP_C


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


@dataclass
class DrawRows:
    """The model arrays of draws built together, one row per draw: what the library engine cuts
    (:meth:`~assaycut.cutting.model_rows.BatchModel.from_rows`).

    Attributes
    ----------
    index : numpy.ndarray
        The draws' rows in the :class:`DrawValues`.
    curve : Pchip
        vol % distilled against TBP [°C], one row per draw (rows padded past their own nodes).
    safe_lo, safe_hi : numpy.ndarray
        The range where the curve does not depend on its extension (:class:`~assaycut.model.tbp_curve.TbpCurve`),
        (R,). [vol %]
    sg_dist, sulfur_dist : Pchip
        Density [-] against vol % and sulfur [wt %] against wt % distilled, one row per draw.
    sg, sulfur_wt_pct : numpy.ndarray
        Whole crude, (R,). [-], [wt %]
    on_extension : numpy.ndarray
        True where every cut's gravity depends on the extension (CrudeModel.all_on_extension not empty), (R,).
    """

    index: np.ndarray
    curve: Pchip
    safe_lo: np.ndarray
    safe_hi: np.ndarray
    sg_dist: Pchip
    sulfur_dist: Pchip
    sg: np.ndarray
    sulfur_wt_pct: np.ndarray
    on_extension: np.ndarray


class _Live:
    """Row arrays (attributes with one row per draw) of the draws still on the fast path, and the rows left to
    the reference builder (shared between the groups split from one set)."""

    def __init__(self, index: np.ndarray, left: list):
        self.__dict__.update(index=index, left=left)

    def only(self, mask) -> None:
        """Keep the rows where ``mask`` is true; the others are left to the reference builder."""
        mask = np.asarray(mask, dtype=bool)
        if mask.all():
            return
        self.left.extend(self.index[~mask].tolist())
        for k, v in list(vars(self).items()):
            if isinstance(v, np.ndarray):
                self.__dict__[k] = v[mask]

    def split(self, mask) -> "_Live":
        """A new set of the rows where ``mask`` is true (sharing the rows left)."""
        out = _Live(self.index[mask], self.left)
        for k, v in vars(self).items():
            if isinstance(v, np.ndarray) and k != "index":
                out.__dict__[k] = v[mask]
        return out

    @property
    def n(self) -> int:
        return self.index.size


def _most(live: _Live, key) -> None:
    """Keep the rows whose ``key`` row (any shape per row) is the most common one."""
    if live.n == 0:
        return
    k = np.asarray(key).reshape(live.n, -1)
    if (k == k[:1]).all():  # the common case: every row alike
        return
    _, inv, counts = np.unique(k, axis=0, return_inverse=True, return_counts=True)
    live.only(inv.ravel() == int(np.argmax(counts)))


def build_draws(assay: Assay, vals: DrawValues) -> tuple[list[DrawRows], list[int]]:
    """Model the draws of ``assay`` as arrays over draws (the module docstring says which).

    Parameters
    ----------
    assay : Assay
        The assay drawn from (its structure: curves' methods and bases, light ends, narrow-cut temperatures).
    vals : DrawValues

    Returns
    -------
    (list of DrawRows, list of int)
        The draws built together (none or one DrawRows), and the rows left to the reference builder, whose
        model (or error) :func:`~assaycut.model.crude.build_model` gives.
    """
    n = vals.sg.size
    live = _Live(np.arange(n), [])
    if not _covered(assay):
        return [], list(range(n))
    _check_values(live, assay, vals)
    _tbp_points(live, assay)
    le = _light_ends(live, assay)
    _place_light_ends(live, le)
    _most(live, np.stack([live.v[:, -1] < 100.0, (live.v[:, 0] > 0.0) & ~live.placed], axis=1))
    if live.n == 0:
        return [], sorted(live.left)
    tail, front = bool(live.v[0, -1] < 100.0), bool(live.v[0, 0] > 0.0 and not live.placed[0])
    if tail or front:
        _fit(live)
    if front:
        _front(live)
    if tail:
        subs = _tail(live)
    else:
        live.tx = np.zeros((live.n, 0))
        live.vx = np.zeros((live.n, 0))
        subs = [live]
    subs = [sub for sub in subs if _curve(sub, assay, le, tail, front)]
    if not subs:
        return [], sorted(live.left)
    live = _merge(subs)
    rows = _distributions(live, assay, le)
    return ([rows] if rows is not None else []), sorted(live.left)


def _covered(assay: Assay) -> bool:
    """The assay's structure is one the fast path builds (else every draw goes to the reference builder)."""
    try:
        validate_assay(assay)
    except InputError:
        return False
    c0 = assay.curves[0]
    nc = assay.narrow_cuts
    return (c0.method == "TBP" and c0.basis == "vol"
            and all(c.method == "D1160" and c.basis == "vol" for c in assay.curves[1:])
            and nc is not None and np.isfinite(nc.sg).sum() >= 2 and np.isfinite(nc.sulfur_wt_pct).sum() >= 2)


def _check_values(live: _Live, assay: Assay, vals: DrawValues) -> None:
    """The row arrays of the draws, keeping those whose values validate_assay accepts (the refused ones are
    refused by the reference builder, with its message)."""
    ok = (vals.sg >= SG_RANGE[0]) & (vals.sg <= SG_RANGE[1])
    if vals.sulfur_wt_pct is not None:
        ok &= (vals.sulfur_wt_pct >= 0.0) & (vals.sulfur_wt_pct <= 15.0)
    for p, t in zip(vals.percent, vals.temp_c):
        ok &= np.isfinite(p).all(axis=1) & np.isfinite(t).all(axis=1)
        ok &= (p.min(axis=1) >= 0) & (p.max(axis=1) <= 100) & (t.min(axis=1) > -273.15) & (t.max(axis=1) <= 1500.0)
    live.v, live.t = vals.percent[0], vals.temp_c[0]
    for k, (p, t) in enumerate(zip(vals.percent[1:], vals.temp_c[1:])):
        setattr(live, f"pe{k}", p)
        setattr(live, f"te{k}", t)
    live.sg = vals.sg
    live.sulfur = vals.sulfur_wt_pct if vals.sulfur_wt_pct is not None else np.full(vals.sg.size, np.nan)
    live.ncsg, live.ncs = vals.nc_sg, vals.nc_sulfur_wt_pct
    live.only(ok)


def _tbp_points(live: _Live, assay: Assay) -> None:
    """The main curve extended by the points of the vacuum curves beyond it (crude._tbp_points), checked as
    tbp_curve._checked_points and _widen_repeats would pass it unchanged."""
    for k, extra in enumerate(assay.curves[1:]):
        try:
            te = vacuum_to_aet_maxwell_bonnell(getattr(live, f"te{k}"), extra.pressure_mmhg,
                                               watson_k=extra.watson_k)
        except AssaycutError:
            live.only(np.zeros(live.n, dtype=bool))
            return
        pe = getattr(live, f"pe{k}")
        keep = (pe > live.v[:, -1:]) & (te > live.t[:, -1:])
        live.te_ = np.asarray(te, dtype=float).reshape(pe.shape)
        _most(live, keep)
        if live.n == 0:
            return
        keep = (live.__dict__[f"pe{k}"] > live.v[:, -1:]) & (live.te_ > live.t[:, -1:])
        if keep[0].any():
            live.v = np.concatenate([live.v, live.__dict__[f"pe{k}"][:, keep[0]]], axis=1)
            live.t = np.concatenate([live.t, live.te_[:, keep[0]]], axis=1)
    v, t = live.v, live.t
    dv, dt = v[:, 1:] - v[:, :-1], t[:, 1:] - t[:, :-1]
    # in order already (the stable sort changes nothing), rising, and no repeated temperature to widen
    live.only((dv >= 0).all(axis=1) & (t[:, -1] - t[:, 0] >= 1.0) & (v[:, -1] - v[:, 0] > 0.0) & (dt > 0).all(axis=1))


@dataclass
class _LightEnds:
    """The light-ends components on the fast path: their staircase temperatures and SG (shared by the rows)."""

    t_nodes: np.ndarray
    sg: np.ndarray


def _light_ends(live: _Live, assay: Assay) -> _LightEnds | None:
    """crude._light_ends_nodes row-wise: the components boiling below the first point (the same count in every
    row kept), their cumulative vol % (live.le_v, staircase nodes) and mid vol % (live.le_mid)."""
    le = assay.light_ends
    comps = []
    if le is not None and le.amounts:
        for key, amt in le.amounts.items():
            c = find_component(key)
            if c is not None and amt > 0:
                comps.append((c, amt))
    comps.sort(key=lambda ca: ca[0].nbp_c)
    nbp = np.array([c.nbp_c for c, _ in comps], dtype=float)
    below = (nbp[None, :] < live.t[:, :1]).sum(axis=1)
    _most(live, below)
    m = int(below[0]) if live.n else 0
    if m == 0 or live.n == 0:
        return None
    comps = comps[:m]
    vol = np.stack([np.broadcast_to(convert_basis(amt, le.basis, "vol", c.sg, live.sg), (live.n,))
                    for c, amt in comps], axis=1)
    cum = np.cumsum(vol, axis=1)
    prev = np.concatenate([np.zeros((live.n, 1)), cum[:, :-1]], axis=1)
    live.le_v = np.stack([prev, cum], axis=2).reshape(live.n, 2 * m)
    live.le_mid = cum - vol / 2
    t_nodes = np.array([[c.nbp_c - STEP_C, c.nbp_c] for c, _ in comps]).ravel()
    return _LightEnds(t_nodes, np.array([c.sg for c, _ in comps]))


def _place_light_ends(live: _Live, le: _LightEnds | None) -> None:
    """tbp_curve._place_light_ends row-wise: live.placed, and live.le_v scaled to meet the first point where it
    is (the rows kept take the same branch)."""
    if le is None:
        live.placed = np.zeros(live.n, dtype=bool)
        return
    v0, t0, fv = live.v[:, 0], live.t[:, 0], live.le_v
    last, ft_last = fv[:, -1], le.t_nodes[-1]
    scale = (np.abs(last - v0) <= LIGHT_ENDS_TOL_PCT) & (last != v0) & (ft_last < t0)
    off = (last > v0 + 1e-9) | (ft_last >= t0)
    code = np.where(v0 == 0.0, 0, np.where(scale, 1, np.where(off, 0, 2)))
    _most(live, code)
    if live.n == 0:
        return
    live.placed = np.full(live.n, code[0] != 0) if live.n else np.zeros(0, dtype=bool)
    if code[0] == 1:
        v0, fv = live.v[:, 0], live.le_v
        live.le_v = np.minimum(fv * (v0 / fv[:, -1])[:, None], v0[:, None])


def _fit(live: _Live) -> None:
    """The Riazi distribution of each row's points (fit_riazi_many); rows it refuses go to the reference
    builder."""
    fits = fit_riazi_many([(live.v[r], live.t[r]) for r in range(live.n)])
    ok = np.array([isinstance(f, RiaziFit) for f in fits], dtype=bool)
    good = [f for f in fits if isinstance(f, RiaziFit)]
    live.only(ok)
    live.t0_k = np.array([f.t0_k for f in good], dtype=float)
    live.a = np.array([f.a for f in good], dtype=float)
    live.b = np.array([f.b for f in good], dtype=float)


def _riazi_temp(live: _Live, x):
    """RiaziFit.temp_c row-wise: x of shape (R, m) -> TBP [°C]."""
    x = np.clip(x, 0.0, 1.0 - 1e-12)
    z = np.log(1.0 / (1.0 - x))
    t0, a, b = live.t0_k[:, None], live.a[:, None], live.b[:, None]
    return t0 * (1.0 + (a / b * z) ** (1.0 / b)) - 273.15


def _front(live: _Live) -> None:
    """tbp_curve._front_extension row-wise: live.ftx, live.fvx from 0 % to the first point; rows whose front
    falls below methane's boiling point are refused by the reference builder."""
    x_first = live.v[:, 0] / 100.0
    xs = np.linspace(0.0, x_first, 12, axis=1)[:, :-1]
    live.ftx = _riazi_temp(live, xs) + live.t[:, :1] - _riazi_temp(live, x_first[:, None])
    live.fvx = 100.0 * xs
    live.only(~(live.ftx[:, 0] < METHANE_NBP_C))


def _tail(live: _Live) -> list[_Live]:
    """tbp_curve._tail_extension row-wise: live.tx, live.vx; one group per number of nodes under the cap."""
    v, t = live.v, live.t
    x_last = v[:, -1] / 100.0
    z = np.linspace(np.log(1 / (1 - x_last)), np.log(1 / (1 - END_FRACTION)), 40, axis=1)[:, 1:]
    xs = 1.0 - np.exp(-z)
    off = t[:, -1] - _riazi_temp(live, x_last[:, None])[:, 0]
    with np.errstate(over="ignore", invalid="ignore"):
        tx = _riazi_temp(live, xs) + off[:, None]
    vx = 100.0 * xs
    cap = np.maximum(END_CAP_C, t[:, -1] + END_CAP_STEP_C)
    under = np.isfinite(tx) & (tx < cap[:, None])
    j = under.sum(axis=1)
    prefix = (under == (np.arange(under.shape[1])[None, :] < j[:, None])).all(axis=1)
    live.tx, live.vx, live.cap, live.j = tx, vx, cap, j
    live.only(prefix)
    out = []
    for jj in np.unique(live.j):
        sub = live.split(live.j == jj)
        jj = int(jj)
        if jj == sub.tx.shape[1]:  # all under the cap: the last node closes at 100 %
            sub.vx = np.concatenate([sub.vx[:, :-1], np.full((sub.n, 1), 100.0)], axis=1)
        else:  # lumped: the nodes under the cap but the last, then the cap at 100 %
            k = max(jj - 1, 0)
            sub.tx = np.concatenate([sub.tx[:, :k], sub.cap[:, None]], axis=1)
            sub.vx = np.concatenate([sub.vx[:, :k], np.full((sub.n, 1), 100.0)], axis=1)
        out.append(sub)
    return out


def _curve(live: _Live, assay: Assay, le: _LightEnds | None, tail: bool, front: bool) -> bool:
    """The curve of one group (its extension's length alike): nodes live.T, live.V, slopes live.D, the safe
    range, the narrow cuts' positions live.va, live.vb and live.on_ext; False when no row is left."""
    placed = live.n > 0 and bool(live.placed[0])
    front_t = [np.broadcast_to(le.t_nodes, (live.n, le.t_nodes.size))] if placed else []
    front_v = [live.le_v] if placed else []
    if front:
        front_t, front_v = [live.ftx], [live.fvx]
    live.T = np.concatenate(front_t + [live.t, live.tx], axis=1)
    live.V = np.concatenate(front_v + [live.v, live.vx], axis=1)
    del live.tx, live.vx
    live.only(((live.T[:, 1:] - live.T[:, :-1]) > 0).all(axis=1))
    if not placed:  # the density's gas range (no light ends and an IBP below n-pentane): reference builder
        live.only(~(live.T[:, 0] < GAS_RANGE_MAX_C))
    if live.n == 0:
        return False
    live.D = slopes_on(live.T)(live.V)
    measured_lo = np.where(live.placed | (live.v[:, 0] == 0.0), 0.0, live.v[:, 0])
    live.safe_lo = live.v[:, 1] if front else measured_lo
    live.safe_hi = live.v[:, -2] if tail else live.v[:, -1]
    nc = assay.narrow_cuts
    ends = np.concatenate([nc.start_c, nc.end_c])
    open_end = np.isnan(ends)
    pos = Pchip(live.T, live.V, live.D)(np.broadcast_to(np.where(open_end, 0.0, ends), (live.n, ends.size)))
    k = nc.start_c.size
    live.va = np.where(open_end[:k], 0.0, pos[:, :k])
    live.vb = np.where(open_end[k:], 100.0, pos[:, k:])
    live.on_ext = _on_extension(live, nc) if tail or front else np.zeros(live.n, dtype=bool)
    live.lens = np.full(live.n, live.T.shape[1])
    return True


def _merge(subs: list[_Live]) -> _Live:
    """The groups in one set again, their curves padded to one node count as :class:`~assaycut.methods.pchip.Pchip`
    pads rows (nodes 1, 2, ... °C past the last, its value held, slope 0)."""
    if len(subs) == 1:
        return subs[0]
    width = max(sub.T.shape[1] for sub in subs)
    for sub in subs:
        sub.T, sub.V, sub.D = pad_nodes(sub.T, sub.V, sub.D, width)
    out = _Live(np.concatenate([sub.index for sub in subs]), subs[0].left)
    for k, v in vars(subs[0]).items():
        if isinstance(v, np.ndarray) and k != "index":
            out.__dict__[k] = np.concatenate([getattr(sub, k) for sub in subs], axis=0)
    return out


def _distributions(live: _Live, assay: Assay, le: _LightEnds | None) -> DrawRows | None:
    """The density and sulfur distributions of the draws: the rows as the library engine takes them."""
    placed = bool(live.placed[0])
    nc = assay.narrow_cuts
    k = nc.start_c.size
    # density: narrow-cut SG at mid-volume %, light ends below the first cut held at their own SG
    _most(live, np.isfinite(live.ncsg) & (live.vb > live.va))
    if live.n == 0:
        return None
    ok = np.isfinite(live.ncsg[0]) & (live.vb[0] > live.va[0])
    if placed:
        _most(live, live.le_mid < live.va[:, ok].min(axis=1)[:, None])
        if live.n == 0:
            return None
        fix = live.le_mid[0] < live.va[0, ok].min()
        fx, fy = live.le_mid[:, fix], np.broadcast_to(le.sg[fix], (live.n, int(fix.sum())))
    else:
        fx = fy = np.zeros((live.n, 0))
    live.fx, live.fy = fx, np.array(fy)
    live.lo, live.hi, live.val = live.va[:, ok], live.vb[:, ok], live.ncsg[:, ok]
    sg_spline = _property_rows(live)
    if sg_spline is None:
        return None
    sg_dist = sg_spline.scaled(100.0 * live.sg / _integral_0_100(sg_spline))
    live.sx, live.sy, live.sd, live.scum = sg_dist.X, sg_dist.Y, sg_dist.D, sg_dist.C  # kept row by row
    # sulfur: narrow-cut sulfur at mid-weight %, light ends below the first cut carrying none
    mids = live.le_mid if placed else np.zeros((live.n, 0))
    q = np.concatenate([live.va, live.vb, mids], axis=1)
    a0 = sg_dist.antiderivative(np.zeros((live.n, 1)))
    w = (sg_dist.antiderivative(q) - a0) / live.sg[:, None]
    live.wa, live.wb, live.lew = w[:, :k], w[:, k:2 * k], w[:, 2 * k:]
    _most(live, np.isfinite(live.ncs) & (live.wb > live.wa))
    if live.n == 0:
        return None
    ok = np.isfinite(live.ncs[0]) & (live.wb[0] > live.wa[0])
    _most(live, live.lew < live.wa[:, ok].min(axis=1)[:, None])
    if live.n == 0:
        return None
    fix = live.lew[0] < live.wa[0, ok].min()
    live.fx, live.fy = live.lew[:, fix], np.zeros((live.n, int(fix.sum())))
    live.lo, live.hi, live.val = live.wa[:, ok], live.wb[:, ok], live.ncs[:, ok]
    s_spline = _property_rows(live)
    if s_spline is None:
        return None
    total = _integral_0_100(s_spline) / 100.0
    given = np.isfinite(live.sulfur)
    with np.errstate(divide="ignore", invalid="ignore"):
        factor = np.where(given, np.where(total > 0, live.sulfur / total, 1.0), 1.0)
    sulfur = np.where(given, live.sulfur, total)
    return DrawRows(live.index, Pchip(live.T, live.V, live.D, last=live.lens - 1), live.safe_lo, live.safe_hi,
                    Pchip(live.sx, live.sy, live.sd, live.scum), s_spline.scaled(factor), live.sg, sulfur,
                    live.on_ext)


def _property_rows(live: _Live):
    """distributions.property_spline row-wise from live.lo, live.hi, live.val (the cuts) and live.fx, live.fy
    (the points held): the splines (a :class:`~assaycut.methods.pchip.Pchip` of rows) of the rows kept (those
    whose nodes fall in the most common order), or None when the spline would be one constant (the reference
    builder's)."""
    mids = 0.5 * (live.lo + live.hi)
    x = np.concatenate([mids, live.fx], axis=1)
    order = np.argsort(x, axis=1, kind="stable")
    _most(live, order)
    if live.n == 0:
        return None
    mids = 0.5 * (live.lo + live.hi)
    order = np.argsort(np.concatenate([mids, live.fx], axis=1)[:1], axis=1, kind="stable")[0]
    x = np.concatenate([mids, live.fx], axis=1)[:, order]
    _most(live, (x[:, 1:] - x[:, :-1]) > 1e-9)
    if live.n == 0:
        return None
    mids = 0.5 * (live.lo + live.hi)
    x = np.concatenate([mids, live.fx], axis=1)[:, order]
    keep = np.concatenate([[True], (x[0, 1:] - x[0, :-1]) > 1e-9])
    if keep.sum() == 1:
        live.only(np.zeros(live.n, dtype=bool))
        return None
    ncut = mids.shape[1]
    is_cut = (order < ncut)[keep]
    x = x[:, keep]
    y0 = np.concatenate([live.val, live.fy], axis=1)[:, order][:, keep]
    cut_idx = order[keep][is_cut]
    tol = 1e-7 * np.maximum(np.max(np.abs(live.val), axis=1), 1e-12)
    best, d, cum = mean_match_arrays(x, y0, is_cut, live.lo[:, cut_idx], live.hi[:, cut_idx],
                                      live.val[:, cut_idx], tol, 30, 0.0)
    return Pchip(x, best, d, cum)


def _integral_0_100(spline: Pchip) -> np.ndarray:
    """Each row's integral from 0 to 100 % (R,)."""
    n = spline.rows
    return spline.integral(np.zeros((n, 1)), np.full((n, 1), 100.0))[:, 0]


def _on_extension(live: _Live, nc) -> np.ndarray:
    """crude._properties_on_extension row-wise (with narrow-cut densities): a narrow-cut boundary where the
    curve depends on its extension and not on a measured point."""
    rows = np.arange(live.n)
    lo = live.T[rows, (live.V < live.safe_lo[:, None]).sum(axis=1)]  # temp_at_node: the first node at the value
    hi = live.T[rows, (live.V < live.safe_hi[:, None]).sum(axis=1)]
    bounds = np.concatenate([nc.start_c, nc.end_c])
    at_node = (np.abs(bounds[None, :, None] - live.t[:, None, :]) <= AT_NODE_C).any(axis=2)
    out = np.isfinite(bounds)[None, :] & ((bounds[None, :] > hi[:, None] + 1e-9)
                                          | (bounds[None, :] < lo[:, None] - 1e-9)) & ~at_node
    return out.any(axis=1)
