"""Cut-point optimiser: the cut points that maximise a product's yield, or the crude's worth, inside the
product limits.

* ``maximize=NAME`` moves the two cut points around product NAME (its start and end), each between its
  fixed neighbouring cut points, and keeps every limit on NAME and its two neighbours.
* ``prices=...`` moves every cut point above the light ends (or the ``free`` ones), each between its
  neighbours, to maximise the gross product worth per barrel of crude, keeping every limit.  The light-ends
  cut point (at or below :data:`~assaycut.cutting.ideal.LIGHT_ENDS_MAX_C`) is set by the stabiliser, not the
  crude column, and stays unless freed.

Guard rails: every product keeps a minimum volume yield (``min_yields``; by default
:data:`DEFAULT_MIN_YIELD_PCT` or half its starting yield, whichever is smaller), so that no product is
squeezed to a sliver; neighbouring cut points stay :data:`GAP_C` apart.

The search is global: scipy's differential evolution (Storn and Price 1997) over all moving cut points, with
the limits as constraints (Lampinen's rule in scipy: feasible beats infeasible, and among infeasible the
smaller total violation wins), the whole population evaluated in one batched cut per generation.  Its best
point is then refined by SLSQP; the answer is checked against every limit again and is never returned when it
breaks one.  With one or two moving cut points a brute-force grid is also evaluated (for the plot, and as a
check).  Limits whose value the estimates cannot give (n/a) at the start cannot constrain and are listed.
Pure computation on the crude model.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from ..cutting.cutset import CutSet
from ..cutting.ideal import LIGHT_ENDS_MAX_C, cut_columns
from ..cutting.model_rows import BatchModel
from ..cutting.limits import TOL, Limit, applicable, limit_margins, limit_values
from ..errors import StudyError
from ..model.crude import CrudeModel
from .compare import PriceSet

ACTIVE_REL = 0.005
"""A limit counts as active when its margin is below :data:`~assaycut.cutting.limits.TOL` (in the limit's
unit), or below this fraction of its value."""
GAP_C = 1.0
"""Smallest distance kept between neighbouring cut points. [°C]"""
DEFAULT_MIN_YIELD_PCT = 3.0
"""Default guard rail: each product keeps at least this volume yield, or half its starting yield when that
is smaller. [vol % of crude] (our choice, common practice, no source)"""
METHOD = "differential evolution (scipy, Lampinen constraint handling) refined by SLSQP"
"""How the optimum is searched, as reported."""
POPSIZE = 6
"""Differential evolution population per moving cut point."""
MAXITER = 400
"""Differential evolution generations at most; stopping before means the population converged."""
STALL_GENERATIONS = 25
"""With no candidate meeting every requirement, the search stops when the smallest total violation has not
improved for this many generations (the problem is then reported infeasible); with feasible candidates, when
the best objective has not improved (:data:`SETTLED_REL`)."""
DE_TOL = 3e-4
MIN_GENERATIONS = 40
"""Generations the global search always runs."""
SETTLED_REL = 1e-6
"""The search also stops when its best feasible objective has improved by less than this fraction over the
last :data:`STALL_GENERATIONS` generations (then SLSQP refines)."""
"""Differential evolution stops when the spread of the population's objective falls below this fraction of
its mean."""
FD_STEP_C = 1e-3
"""Forward-difference step of the refinement's gradients. [°C]"""
SEED = 20261202
"""Random seed of the search: the same problem gives the same answer."""


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
    converged : bool
        True when the global search's population converged before its generation limit and the answer
        meets every limit; False means the answer is the best found, not a proven optimum.
    method : str
        The search method.
    active : list of str
        Limits (and minimum yields) at their bound at the optimum.
    violated_at_start : list of str
    not_evaluated : list of str
        Limits the estimates cannot evaluate (n/a) at the start: they do not constrain.
    shortfalls : list of dict
        When infeasible: each requirement broken at the least-violating point found, with 'limit' (text),
        'cut', 'property', 'bound', 'value' (at that point), 'short_by' (in the property's unit) and
        'alone_possible' (whether any point searched meets this one requirement on its own).
    min_yields : dict of str to float
        Minimum volume yield kept for each product. [vol %]
    grid_best : float
        Best objective on the brute-force grid (one or two moving cut points only; else NaN).
    variables : list of str
        Which cut points moved ("end of kerosene"...).
    grid : dict
        The brute-force grid (for plots): 'x', 'y' (2-variable cases), 'objective', 'feasible'.
    var_index : list of int
        Indices of the moving cut points in ``ends_c``.
    evaluations, generations : int
        Candidates evaluated in all, and generations of the global search.
    """

    ends_c: np.ndarray
    start_ends_c: np.ndarray
    objective: float
    start_objective: float
    feasible: bool
    converged: bool = False
    method: str = METHOD
    active: list[str] = field(default_factory=list)
    violated_at_start: list[str] = field(default_factory=list)
    not_evaluated: list[str] = field(default_factory=list)
    shortfalls: list[dict] = field(default_factory=list)
    min_yields: dict = field(default_factory=dict)
    grid_best: float = math.nan
    variables: list[str] = field(default_factory=list)
    grid: dict = field(default_factory=dict)
    var_index: list[int] = field(default_factory=list)
    evaluations: int = 0
    generations: int = 0
    bound_notes: list[str] = field(default_factory=list)
    """Optimum cut points that sit on their search bound (the span, or a neighbour) or beyond the measured
    curve, on the fitted extension: the answer there rests on the bound or on the extrapolation."""


def needed(price) -> set[str]:
    """The properties a price's adjustments read."""
    return {a.property for a in price.adjust}


def objective_values(cols: dict, names: list[str], maximize: str | None, prices: PriceSet | None) -> np.ndarray:
    """The optimiser's objective for rows of cut columns: the volume yield of cut ``maximize`` [vol %], or
    with ``prices`` the product worth per barrel of crude, Σ vol %/100 × adjusted price per bbl [currency/bbl]
    (a cut without a price is an error; an unpriceable row worth -1e12).

    Parameters
    ----------
    cols : dict of str to numpy.ndarray
        Cut columns of shape (rows, cuts) (:func:`~assaycut.cutting.ideal.cut_columns`).
    names : list of str
        The cuts' names, in column order.
    maximize : str or None
    prices : PriceSet or None

    Returns
    -------
    numpy.ndarray
        One value per row.
    """
    if maximize is not None:
        return cols["vol_pct"][:, names.index(maximize)]
    total = np.zeros(cols["vol_pct"].shape[0])
    for j, n in enumerate(names):
        p = prices.products.get(n)
        if p is None:
            raise StudyError(f"{prices.label}: no price for cut {n!r}")
        sg = np.nan_to_num(cols["sg"][:, j], nan=1.0)  # empty cuts weigh nothing anyway
        value, _ = p.adjusted({k: v[:, j] for k, v in cols.items() if k in needed(p)}, strict=False)
        total = total + cols["vol_pct"][:, j] / 100.0 * np.nan_to_num(p.per_bbl(sg, value), nan=-1e12)
    return total


def default_min_yields(start_vol_pct, names: list[str]) -> dict[str, float]:
    """The default guard rail: min(:data:`DEFAULT_MIN_YIELD_PCT`, half the starting yield rounded down to
    0.01) per product. [vol %]

    Examples
    --------
    >>> default_min_yields([1.0, 2.555, 20.0], ["light ends", "light naphtha", "diesel"])
    {'light ends': 0.5, 'light naphtha': 1.27, 'diesel': 3.0}
    """
    return {n: float(min(DEFAULT_MIN_YIELD_PCT, math.floor(50.0 * v) / 100.0)) for n, v in zip(names, start_vol_pct)}


def optimize_cut_points(model: CrudeModel, cut_set: CutSet, limits: list[Limit], *, maximize: str | None = None,
                        prices: PriceSet | None = None, span_c: float = 60.0, grid_points: int = 4000,
                        min_yields: dict[str, float] | None = None, free: list[str] | None = None,
                        progress: Callable[[int, int], None] | None = None) -> OptimResult:
    """Find the cut points that maximise a product's yield or the crude's worth inside the limits.

    Steps: choose the moving cut points and their bounds (:func:`_search_space`); with one or two of them,
    evaluate a brute-force grid; search globally by differential evolution, refine by SLSQP, and keep the
    best point that meets every limit (:func:`_refine`).

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
        Size of the brute-force grid for one or two moving cut points.
    min_yields : dict of str to float, optional
        Minimum volume yield of products [vol %]; ``"all"`` sets every product.  Products not named keep
        the default (:func:`default_min_yields`); 0 removes the guard rail.
    free : list of str, optional
        With ``prices``: names of the cuts whose end may move (default: all but a light-ends cut).
    progress : callable, optional
        Called as ``progress(generation, max_generations)`` during the search.

    Returns
    -------
    OptimResult
    """
    if (maximize is None) == (prices is None):
        raise StudyError("give one objective: --maximize NAME or --prices FILE")
    if any(c.swing for c in cut_set.cuts):
        raise StudyError("the optimiser works on cut sets without swing cuts")
    if not (span_c > 0 and math.isfinite(span_c)):
        raise StudyError(f"the span must be a positive number of °C; got {span_c:g}")
    names = cut_set.names
    ends0 = cut_set.ends_c.copy()
    var, lims, bounds = _search_space(model, names, ends0, limits, maximize, span_c, free)
    start_vol = cut_columns(BatchModel([model]), ends0[None, :])["vol_pct"][0]
    mins = _min_yields(names, start_vol, min_yields)
    problem = _Problem(model, names, ends0, var, lims, maximize, prices, mins)
    labels_all = [f"end of {names[i]}" for i in var]

    obj0, m0, _ = problem.evaluate(ends0[var][None, :])
    labels = problem.labels
    use = [i for i, v in enumerate(m0[0]) if not np.isnan(v)]
    not_eval = [lab for lab, v in zip(labels, m0[0]) if np.isnan(v)]
    violated0 = [labels[i] for i in use if m0[0, i] < 0]
    problem.use = use

    grid: dict = {}
    grid_best, x_start = math.nan, ends0[var].copy()
    if len(var) <= 2:
        cand, grid = _grid(bounds, grid_points)
        obj_g, ok_g, _ = problem.feasible(cand)
        grid.update(objective=obj_g, feasible=ok_g)
        if ok_g.any():
            i_best = int(np.argmax(np.where(ok_g, obj_g, -np.inf)))
            grid_best, x_start = float(obj_g[i_best]), cand[i_best]
    x_de, generations, converged = _global_search(problem, bounds, x_start, progress)
    common = dict(grid_best=grid_best, variables=labels_all, grid=grid, var_index=var, min_yields=mins,
                  evaluations=problem.evaluations, generations=generations, not_evaluated=not_eval,
                  violated_at_start=violated0)
    obj_d, ok_d, _ = problem.feasible(x_de[None, :])
    if not ok_d[0]:
        return OptimResult(ends0, ends0, float(obj0[0]), float(obj0[0]), False, converged=converged,
                           shortfalls=problem.shortfalls(x_de), **common)
    x_opt, obj_o, marg_o = _refine(problem, x_de, bounds)
    common["evaluations"] = problem.evaluations
    ends = problem.full(x_opt[None, :])[0]
    active = [labels[i] for i in use if marg_o[0, i] <= max(TOL, ACTIVE_REL * abs(problem.bounds[i]))]
    return OptimResult(ends, ends0, float(obj_o[0]), float(obj0[0]), True, converged=converged,
                       active=active, bound_notes=_bound_notes(model, names, var, ends, bounds, span_c), **common)


BOUND_TOL_C = 0.05
"""An optimum cut point this close to its search bound is said to sit on it. [°C]"""


def _bound_notes(model, names, var, ends, bounds, span_c) -> list[str]:
    """What :attr:`OptimResult.bound_notes` says of the optimum ``ends``."""
    out = []
    t_meas = float(model.curve.temp_at(model.curve.measured_hi))
    for k, i in enumerate(var):
        e, lo, hi = float(ends[i]), float(bounds[0][k]), float(bounds[1][k])
        if min(e - lo, hi - e) <= BOUND_TOL_C:
            side = "lower" if e - lo <= hi - e else "upper"
            out.append(f"end of {names[i]} at {e:.1f} °C sits on its {side} search bound (--span {span_c:g} °C, or "
                       f"a neighbouring cut point): the optimum may lie beyond it")
        if e > t_meas + BOUND_TOL_C:
            out.append(f"end of {names[i]} at {e:.1f} °C lies on the fitted extension (the curve is measured to "
                       f"{t_meas:.1f} °C): the answer there rests on extrapolation")
    return out


def _min_yields(names, start_vol, given) -> dict[str, float]:
    mins = default_min_yields(start_vol, names)
    given = dict(given or {})
    if "all" in given and "all" not in names:
        mins = dict.fromkeys(names, float(given.pop("all")))
    for n, v in given.items():
        if n not in names:
            raise StudyError(f"--min-yield: no cut named {n!r}; the cuts are {', '.join(repr(x) for x in names)}")
        if not (0.0 <= v < 100.0):
            raise StudyError(f"--min-yield {n}={v:g}: expected a yield from 0 to 100 vol %")
        mins[n] = float(v)
    return mins


def _search_space(model, names, ends0, limits, maximize, span_c, free):
    """The moving cut points (indices), the limits that apply, and each moving point's (low, high) bound."""
    n = ends0.size
    lo_curve, hi_curve = model.curve.ibp_c + GAP_C, model.curve.fbp_c - GAP_C
    if maximize is not None:
        if maximize not in names:
            raise StudyError(f"no cut named {maximize!r}; the cuts are {', '.join(repr(x) for x in names)}")
        if free:
            raise StudyError("--free goes with --prices; --maximize moves the two cut points around its product")
        k = names.index(maximize)
        var = [i for i in (k - 1, k) if 0 <= i < n]
        rel = {names[i] for i in (k - 1, k, k + 1) if 0 <= i < len(names)}
        lims = [x for x in limits if x.cut in rel]
    else:
        if free:
            unknown = [f for f in free if f not in names[:-1]]
            if unknown:
                raise StudyError(f"--free: no cut with an end named {unknown[0]!r}; the cuts with an end are "
                                 f"{', '.join(repr(x) for x in names[:-1])}")
            var = sorted({names.index(f) for f in free})
        else:  # the light-ends cut point is the stabiliser's, not the crude column's: it stays unless freed
            var = [i for i in range(n) if ends0[i] > LIGHT_ENDS_MAX_C]
        lims = list(limits)
    fixed_lo, fixed_hi = [], []
    for i in var:
        lo = max([lo_curve] + [b + GAP_C * (i - j) for j, b in zip(range(i), ends0[:i]) if j not in var])
        hi = min([hi_curve] + [a - GAP_C * (j - i) for j, a in zip(range(i + 1, n), ends0[i + 1:]) if j not in var])
        fixed_lo.append(max(lo, ends0[i] - span_c))
        fixed_hi.append(min(hi, ends0[i] + span_c))
    if any(h <= lo for lo, h in zip(fixed_lo, fixed_hi)):
        raise StudyError("a moving cut point has no room between its fixed neighbours; widen --span or free them")
    return var, lims, (np.array(fixed_lo), np.array(fixed_hi))


class _Problem:
    """Objective and requirement margins (limits, then minimum yields) of candidate cut points (rows of the
    moving points).  Tracks the number of candidates evaluated and each requirement's best margin seen."""

    def __init__(self, model, names, ends0, var, lims, maximize, prices, mins):
        self.model, self.names, self.ends0, self.var = BatchModel([model]), names, ends0, var
        self.maximize, self.prices = maximize, prices
        self.limits = applicable(lims, names)
        # only the qualities the limits and the prices read are computed for each candidate
        self.only = {lim.property for lim in self.limits}
        if prices is not None:
            self.only = self.only.union(*(needed(p) for p in prices.products.values()))
        self.mins = [(names.index(n), v) for n, v in mins.items() if v > 0]
        self.labels = ([lim.describe() for lim in self.limits]
                       + [f"{names[j]}: volume yield >= {v:g} vol % (guard rail)" for j, v in self.mins])
        self.bounds = [lim.max if lim.max is not None else (lim.min or 0.0) for lim in self.limits]
        self.bounds += [v for _, v in self.mins]
        self.scale = np.array([max(abs(b), 1.0) for b in self.bounds])
        self.use: list[int] = []
        self.evaluations = 0
        self.best_margin = np.full(len(self.labels), -np.inf)
        self.last_cols = None

    def full(self, x):
        e = np.repeat(self.ends0[None, :], x.shape[0], axis=0)
        e[:, self.var] = x
        return e

    def evaluate(self, x):
        """(objective, margins, order gaps) of candidates ``x`` (rows)."""
        x = np.atleast_2d(x)
        cols = cut_columns(self.model, self.full(x), only=self.only)
        self.last_cols = cols
        self.evaluations += x.shape[0]
        obj = objective_values(cols, self.names, self.maximize, self.prices)
        marg, _ = limit_margins(cols, self.names, self.limits)
        yld = np.stack([cols["vol_pct"][:, j] - v for j, v in self.mins], axis=1) if self.mins else \
            np.zeros((x.shape[0], 0))
        marg = np.concatenate([marg, yld], axis=1)
        if marg.shape[1]:
            self.best_margin = np.fmax(self.best_margin, np.nanmax(np.where(np.isnan(marg), -np.inf, marg), axis=0))
        order = np.diff(x, axis=1) - GAP_C if len(self.var) > 1 else np.zeros((x.shape[0], 0))
        return obj, marg, order

    def feasible(self, x):
        """(objective, meets every usable requirement and keeps the cut points in order, margins).

        A limit evaluable at the start that becomes n/a at a candidate (e.g. the flash estimate's range left
        behind) counts as broken there: the optimiser must not escape a limit through an estimate's gap."""
        obj, marg, order = self.evaluate(x)
        ok = np.all(np.nan_to_num(marg[:, self.use], nan=-1.0) >= 0, axis=1) & np.all(order >= -1e-9, axis=1)
        return obj, ok, marg

    def scaled(self, x):
        """(objective, constraints >= 0 when met: usable margins over their scale, order gaps) of rows x."""
        obj, marg, order = self.evaluate(x)
        m = np.nan_to_num(marg[:, self.use], nan=-1.0 * self.scale[self.use]) / self.scale[self.use]
        return obj, np.concatenate([m, order], axis=1)

    def shortfalls(self, x) -> list[dict]:
        """Each usable requirement broken at ``x``, by how much, and whether any point searched met it."""
        _, marg, _ = self.evaluate(x[None, :])
        cols = self.last_cols
        out = []
        for i in self.use:
            if not marg[0, i] < 0 and not np.isnan(marg[0, i]):
                continue
            if i < len(self.limits):
                lim = self.limits[i]
                value = float(limit_values(cols, self.names.index(lim.cut), lim.property)[0])
                cut, prop = lim.cut, lim.property
                bound = lim.min if lim.min is not None and (lim.max is None or value < lim.min) else lim.max
            else:
                j, bound = self.mins[i - len(self.limits)]
                value, cut, prop = float(cols["vol_pct"][0, j]), self.names[j], "vol_pct"
            out.append({"limit": self.labels[i], "cut": cut, "property": prop, "bound": bound,
                        "value": value, "short_by": float(-marg[0, i]) if not np.isnan(marg[0, i]) else math.nan,
                        "alone_possible": bool(self.best_margin[i] >= 0)})
        return out


def _grid(bounds, grid_points):
    """Brute-force candidates over one or two moving points, and the grid description for plots."""
    fixed_lo, fixed_hi = bounds
    nvar = len(fixed_lo)
    per_axis = max(int(grid_points ** (1.0 / nvar)), 3)
    axes = [np.linspace(fl, fh, per_axis) for fl, fh in zip(fixed_lo, fixed_hi)]
    mesh = np.meshgrid(*axes, indexing="ij")
    cand = np.stack([g.ravel() for g in mesh], axis=1)
    grid: dict = {}
    if nvar == 2:
        grid.update(x=axes[0], y=axes[1], shape=mesh[0].shape)
    return cand, grid


def _global_search(problem: _Problem, bounds, x0, progress):
    """Differential evolution over the moving cut points, the population cut in one batch per generation.

    scipy asks for the constraints of the whole population and then the objective of its feasible members:
    the second call is answered from the first's results (rows remembered by their bytes)."""
    from scipy.optimize import NonlinearConstraint, differential_evolution

    lo, hi = bounds
    memo: dict = {}
    state = {"feasible": False, "viol": math.inf, "history": []}

    def rows(xt):
        x = np.ascontiguousarray(np.asarray(xt, dtype=float).T)
        x = x.reshape(-1, len(lo))
        todo = [k for k in range(x.shape[0]) if x[k].tobytes() not in memo]
        if todo:
            if len(memo) > 20000:
                memo.clear()
            obj, cons = problem.scaled(x[todo])
            viol = np.sum(np.maximum(-cons, 0.0), axis=1)
            state["feasible"] = state["feasible"] or bool(np.any(viol == 0.0))
            state["viol"] = min(state["viol"], float(viol.min()))
            for k, o, c in zip(todo, obj, cons):
                memo[x[k].tobytes()] = (o, c)
        return [memo[r.tobytes()] for r in x]

    def f(xt):
        return -np.array([o for o, _ in rows(xt)])

    def g(xt):
        return np.array([c for _, c in rows(xt)]).T

    x0 = np.clip(x0, lo, hi)
    order_ok = np.all(np.diff(x0) >= GAP_C) if x0.size > 1 else True
    def tick(intermediate_result):
        hist = state["history"]
        hist.append(state["viol"])
        best = state.setdefault("best", [])
        best.append(float(intermediate_result.fun) if state["feasible"] else math.inf)
        if progress is not None:
            progress(len(hist), MAXITER)
        stalled = (not state["feasible"] and len(hist) > STALL_GENERATIONS
                   and hist[-STALL_GENERATIONS - 1] - hist[-1] <= 1e-9 * max(hist[-1], 1.0))
        # the best feasible point no longer improving: the refinement takes it from here
        settled = (state["feasible"] and len(best) > max(STALL_GENERATIONS, MIN_GENERATIONS)
                   and best[-STALL_GENERATIONS - 1] - best[-1] <= SETTLED_REL * abs(best[-1]))
        state["stalled"] = stalled or settled
        return stalled or settled

    cons = []
    n_con = len(problem.use) + max(len(lo) - 1, 0)
    if n_con:
        cons.append(NonlinearConstraint(g, 0.0, np.inf))
    # Latin hypercube start (numpy only): a Sobol start needs scipy.stats, whose import costs 0.27 s of a
    # 1.2 s run; answers on the demo crudes agree within 0.001 USD/bbl either way
    res = differential_evolution(f, list(zip(lo, hi)), constraints=cons, vectorized=True, updating="deferred",
                                 popsize=POPSIZE, maxiter=MAXITER, tol=DE_TOL, atol=0.0, init="latinhypercube",
                                 polish=False, rng=SEED, x0=x0 if order_ok else None, callback=tick)
    if progress is not None:
        progress(MAXITER, MAXITER)
    converged = bool(res.success) or bool(state.get("stalled"))
    return np.clip(res.x, lo, hi), int(res.nit), converged


def _refine(problem: _Problem, x_start, bounds):
    """SLSQP from the global search's best point (forward-difference gradients, batched), then the best point
    meeting every requirement on the straight line from that point to SLSQP's answer (SLSQP may stop a hair outside an active limit; the answer
    must never break one).  Returns (x, objective, margins) at that point."""
    from scipy.optimize import minimize

    fixed_lo, fixed_hi = bounds
    obj_s, _, _ = problem.evaluate(x_start[None, :])
    scale = max(abs(float(obj_s[0])), 1.0)
    n = x_start.size
    cache: dict = {}

    def at(x):
        """Objective, its gradient, the constraints and their Jacobian at x, from one batched evaluation of x
        and its n forward steps (SLSQP asks for all four at the same point)."""
        x = np.asarray(x, dtype=float)
        key = x.tobytes()
        if key not in cache:
            if len(cache) > 64:
                cache.clear()
            pts = np.vstack([x, x + FD_STEP_C * np.eye(n)])
            obj, cons = problem.scaled(pts)
            cache[key] = (-obj[0] / scale, -(obj[1:] - obj[0]) / FD_STEP_C / scale, cons[0],
                          ((cons[1:] - cons[0]) / FD_STEP_C).T)
        return cache[key]

    n_con = len(problem.use) + max(len(problem.var) - 1, 0)
    cons = [{"type": "ineq", "fun": lambda x: at(x)[2], "jac": lambda x: at(x)[3]}] if n_con else []
    res = minimize(lambda x: at(x)[0], x_start, jac=lambda x: at(x)[1], method="SLSQP",
                   bounds=list(zip(fixed_lo, fixed_hi)), constraints=cons,
                   options={"maxiter": 100, "ftol": 1e-10})
    x_opt = np.clip(res.x, fixed_lo, fixed_hi)
    lam = np.linspace(0.0, 1.0, 65)[:, None]
    line = x_start[None, :] + lam * (x_opt - x_start)[None, :]
    obj_l, ok_l, marg_l = problem.feasible(line)
    j = int(np.argmax(np.where(ok_l, obj_l, -np.inf)))
    return line[j], obj_l[j:j + 1], marg_l[j:j + 1]
