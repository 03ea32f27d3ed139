"""Cut-point optimiser: the cut points that maximise a product's yield, or the crude's worth, inside the
product limits.

* ``maximize=NAME`` moves the two cut points around product NAME (its start and end), each between its
  fixed neighbouring cut points, and keeps every limit on NAME and its two neighbours.
* ``prices=...`` moves every cut point (each between its neighbours) to maximise the gross product worth
  per barrel of crude, keeping every limit.

The search is scipy.optimize.minimize (SLSQP) on the limit margins, started from the best feasible point
of a coarse vectorised grid; the answer is checked against every limit again and is never returned when it
breaks one (the best feasible grid point is returned instead).  Limits whose value the estimates cannot
give (n/a) cannot constrain and are listed.  Pure computation on the crude model.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..cutting.cutset import CutSet
from ..cutting.ideal import cut_columns
from ..cutting.limits import TOL, Limit, applicable, limit_margins
from ..errors import StudyError
from ..model.crude import CrudeModel
from .compare import PriceSet

ACTIVE_REL = 0.005
"""A limit counts as active when its margin is below :data:`~assaycut.cutting.limits.TOL` (in the limit's
unit), or below this fraction of its value."""
GAP_C = 1.0
"""Smallest distance kept between neighbouring cut points. [°C]"""


@dataclass
class OptimResult:
    """Outcome of the optimiser.

    Attributes
    ----------
    ends_c : numpy.ndarray
        Optimised cut points (ends of all but the last cut). [°C]
    start_ends_c : numpy.ndarray
        The cut points it started from. [°C]
    objective, start_objective : float
        Yield [vol %] of the product, or worth [currency/bbl], at the optimum and at the start.
    feasible : bool
        False when no cut points inside the bounds meet every limit (then ends_c is the start).
    active : list of str
        Limits at their bound at the optimum.
    violated_at_start : list of str
    not_evaluated : list of str
        Limits the estimates cannot evaluate (n/a): they do not constrain.
    grid_best : float
        Best objective on the brute-force grid (a check on the optimiser).
    variables : list of str
        Which cut points moved ("end of kerosene"...).
    grid : dict
        The brute-force grid (for plots): 'x', 'y' (2-variable cases), 'objective', 'feasible'.
    """

    ends_c: np.ndarray
    start_ends_c: np.ndarray
    objective: float
    start_objective: float
    feasible: bool
    active: list[str] = field(default_factory=list)
    violated_at_start: list[str] = field(default_factory=list)
    not_evaluated: list[str] = field(default_factory=list)
    grid_best: float = math.nan
    variables: list[str] = field(default_factory=list)
    grid: dict = field(default_factory=dict)
    var_index: list[int] = field(default_factory=list)
    """Indices of the moving cut points in ``ends_c``."""


def needed(price) -> set[str]:
    """The properties a price's adjustments read."""
    return {a.property for a in price.adjust}


def _objective(cols: dict, names: list[str], maximize: str | None, prices: PriceSet | None) -> np.ndarray:
    if maximize is not None:
        return cols["vol_pct"][:, names.index(maximize)]
    total = np.zeros(cols["vol_pct"].shape[0])
    for j, n in enumerate(names):
        p = prices.products.get(n)
        if p is None:
            raise StudyError(f"{prices.label}: no price for cut {n!r}")
        rho = np.nan_to_num(cols["density_15c_kg_m3"][:, j], nan=1000.0)  # empty cuts weigh nothing anyway
        value, _ = p.adjusted({k: v[:, j] for k, v in cols.items() if k in needed(p)}, strict=False)
        total = total + cols["vol_pct"][:, j] / 100.0 * np.nan_to_num(p.per_bbl(rho, value), nan=-1e12)
    return total


def optimize_cut_points(model: CrudeModel, cut_set: CutSet, limits: list[Limit], *, maximize: str | None = None,
                        prices: PriceSet | None = None, span_c: float = 60.0, grid_points: int = 4000) -> OptimResult:
    """Find the cut points that maximise a product's yield or the crude's worth inside the limits.

    Steps: choose the moving cut points and their bounds (:func:`_search_space`), evaluate a brute-force
    grid (:func:`_grid`), then refine its best feasible point with SLSQP and keep the best point on the
    way to SLSQP's answer that meets every limit (:func:`_refine`).

    Parameters
    ----------
    model : CrudeModel
    cut_set : CutSet
        Starting cut points (no swing cuts).
    limits : list of Limit
    maximize : str, optional
        Name of the product whose volume yield is maximised.
    prices : PriceSet, optional
        Maximise worth per barrel instead.
    span_c : float
        Each moving cut point stays within this distance of its starting value (the column's practical
        range). [°C]
    grid_points : int
        Size of the brute-force grid that starts the search and checks it.

    Returns
    -------
    OptimResult
    """
    if (maximize is None) == (prices is None):
        raise StudyError("give one objective: --maximize NAME or --prices FILE")
    if any(c.swing for c in cut_set.cuts):
        raise StudyError("the optimiser works on cut sets without swing cuts")
    names = cut_set.names
    ends0 = cut_set.ends_c.copy()
    var, lims, bounds = _search_space(model, names, ends0, limits, maximize, span_c)
    if not (span_c > 0 and math.isfinite(span_c)):
        raise StudyError(f"the span must be a positive number of °C; got {span_c:g}")
    problem = _Problem(model, names, ends0, var, lims, maximize, prices)
    labels_all = [f"end of {names[i]}" for i in var]

    obj0, m0, _ = problem.evaluate(ends0[var][None, :])
    labels = [lim.describe() for lim in problem.limits]
    not_eval = [lab for lab, v in zip(labels, m0[0]) if np.isnan(v)]
    use = [i for i, v in enumerate(m0[0]) if not np.isnan(v)]
    violated0 = [labels[i] for i in use if m0[0, i] < 0]

    cand, grid = _grid(ends0[var], bounds, grid_points)
    obj_g, ok_g, _ = problem.feasible(cand, use)
    grid.update(objective=obj_g, feasible=ok_g)
    if not ok_g.any():
        return OptimResult(ends0, ends0, float(obj0[0]), float(obj0[0]), False, [], violated0, not_eval, math.nan,
                           labels_all, grid, var)
    best_i = int(np.argmax(np.where(ok_g, obj_g, -np.inf)))
    x_opt, obj_o, marg_o = _refine(problem, cand[best_i], float(obj_g[best_i]), bounds, use)
    ends = problem.full(x_opt[None, :])[0]
    active = [labels[i] for i in use if marg_o[0, i] <= max(TOL, ACTIVE_REL * abs(_bound(problem.limits[i])))]
    return OptimResult(ends, ends0, float(obj_o[0]), float(obj0[0]), True, active, violated0, not_eval,
                       float(obj_g[best_i]), labels_all, grid, var)


def _search_space(model, names, ends0, limits, maximize, span_c):
    """The moving cut points (indices), the limits that apply, and each moving point's (low, high) bound."""
    n = ends0.size
    lo_curve, hi_curve = model.curve.ibp_c + GAP_C, model.curve.fbp_c - GAP_C
    if maximize is not None:
        if maximize not in names:
            raise StudyError(f"no cut named {maximize!r}; the cuts are {', '.join(repr(x) for x in names)}")
        k = names.index(maximize)
        var = [i for i in (k - 1, k) if 0 <= i < n]
        rel = {names[i] for i in (k - 1, k, k + 1) if 0 <= i < len(names)}
        lims = [x for x in limits if x.cut in rel]
    else:
        var = list(range(n))
        lims = list(limits)
    fixed_lo, fixed_hi = [], []
    for i in var:
        lo = max([lo_curve] + [b + GAP_C * (i - j) for j, b in zip(range(i), ends0[:i]) if j not in var])
        hi = min([hi_curve] + [a - GAP_C * (j - i) for j, a in zip(range(i + 1, n), ends0[i + 1:]) if j not in var])
        fixed_lo.append(max(lo, ends0[i] - span_c))
        fixed_hi.append(min(hi, ends0[i] + span_c))
    return var, lims, (fixed_lo, fixed_hi)


class _Problem:
    """Objective and limit margins of candidate cut points (rows of the moving points)."""

    def __init__(self, model, names, ends0, var, lims, maximize, prices):
        self.model, self.names, self.ends0, self.var = model, names, ends0, var
        self.maximize, self.prices = maximize, prices
        self.limits = applicable(lims, names)

    def full(self, x):
        e = np.repeat(self.ends0[None, :], x.shape[0], axis=0)
        e[:, self.var] = x
        return e

    def evaluate(self, x):
        """(objective, margins, order gaps) of candidates ``x`` (rows)."""
        x = np.atleast_2d(x)
        cols = cut_columns(self.model, self.full(x))
        obj = _objective(cols, self.names, self.maximize, self.prices)
        marg, _ = limit_margins(cols, self.names, self.limits)
        order = np.diff(x, axis=1) - GAP_C if len(self.var) > 1 else np.zeros((x.shape[0], 0))
        return obj, marg, order

    def feasible(self, x, use):
        """(objective, meets every usable limit and keeps the cut points in order, margins) of candidates ``x``.

        A limit evaluable at the start that becomes n/a at a candidate (e.g. the flash estimate's range left
        behind) counts as broken there: the optimiser must not escape a limit through an estimate's gap."""
        obj, marg, order = self.evaluate(x)
        ok = np.all(np.nan_to_num(marg[:, use], nan=-1.0) >= 0, axis=1) & np.all(order >= -1e-9, axis=1)
        return obj, ok, marg


def _grid(x0, bounds, grid_points):
    """Brute-force candidates: a full grid for one or two moving points, else per-point sweeps from the
    start; and the grid description for plots."""
    fixed_lo, fixed_hi = bounds
    nvar = len(x0)
    grid: dict = {}
    if nvar <= 2:
        per_axis = max(int(grid_points ** (1.0 / nvar)), 3)
        axes = [np.linspace(fl, fh, per_axis) for fl, fh in zip(fixed_lo, fixed_hi)]
        mesh = np.meshgrid(*axes, indexing="ij")
        cand = np.stack([g.ravel() for g in mesh], axis=1)
        if nvar == 2:
            grid.update(x=axes[0], y=axes[1], shape=mesh[0].shape)
        return cand, grid
    pts = [x0[None, :]]
    for j, (fl, fh) in enumerate(zip(fixed_lo, fixed_hi)):
        lo_j = max(fl, x0[j - 1] + GAP_C) if j > 0 else fl
        hi_j = min(fh, x0[j + 1] - GAP_C) if j + 1 < nvar else fh
        vals = np.linspace(lo_j, hi_j, 41)
        block = np.repeat(x0[None, :], vals.size, axis=0)
        block[:, j] = vals
        pts.append(block)
    return np.concatenate(pts), grid


def _refine(problem: _Problem, x_grid, obj_grid: float, bounds, use):
    """SLSQP from the best feasible grid point, then the best point meeting every limit on the straight line
    from the grid point to SLSQP's answer (SLSQP may stop a hair outside an active limit; the answer must
    never break one).  Returns (x, objective, margins) at that point."""
    from scipy.optimize import minimize

    fixed_lo, fixed_hi = bounds
    scale = max(abs(obj_grid), 1.0)
    cache: dict = {}

    def at(x):  # SLSQP asks for the objective and each constraint at the same point: evaluate once
        key = np.asarray(x, dtype=float).tobytes()
        if key not in cache:
            if len(cache) > 256:
                cache.clear()
            cache[key] = problem.evaluate(np.asarray(x, dtype=float))
        return cache[key]

    cons = [{"type": "ineq", "fun": (lambda x, i=i: float(np.nan_to_num(at(x)[1][0, i], nan=-1e3)))}
            for i in use]
    if len(problem.var) > 1:
        cons.append({"type": "ineq", "fun": lambda x: at(x)[2][0]})
    res = minimize(lambda x: -float(at(x)[0][0]) / scale, x_grid, method="SLSQP",
                   bounds=list(zip(fixed_lo, fixed_hi)), constraints=cons,
                   options={"maxiter": 100, "ftol": 1e-10})
    x_opt = np.clip(res.x, fixed_lo, fixed_hi)
    lam = np.linspace(0.0, 1.0, 65)[:, None]
    line = x_grid[None, :] + lam * (x_opt - x_grid)[None, :]
    obj_l, ok_l, marg_l = problem.feasible(line, use)
    j = int(np.argmax(np.where(ok_l, obj_l, -np.inf)))
    return line[j], obj_l[j:j + 1], marg_l[j:j + 1]


def _bound(lim: Limit) -> float:
    return lim.max if lim.max is not None else (lim.min or 0.0)
