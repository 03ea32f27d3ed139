"""Blend optimiser: the crude shares that meet blend targets at the best worth or the lowest crude cost.

Linear blending rules on volume shares v_i (API MPMS Ch. 11 for gravity; no shrinkage):

* blend SG = Σ v_i SG_i, so an API range is a linear SG range;
* blend sulfur = Σ v_i SG_i S_i / Σ v_i SG_i, so S ≤ S_max is Σ v_i SG_i (S_i - S_max) ≤ 0;
* product yield k = Σ v_i y_ik (ideal cuts of the same cut set);
* worth per barrel of blend = Σ v_i worth_i, margin = Σ v_i (worth_i - price_i), crude cost = Σ v_i price_i.

Solved with scipy.optimize.linprog (HiGHS).  When the targets cannot all be met, an elastic problem (one
slack per target, minimised in each target's own scale) tells which targets fail and by how much.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .compatibility import MARGIN_RATIO, Compatibility, assess, numbers_of
from ..errors import StudyError
from ..units import api_to_sg, sg_to_api
from .compare import PriceSet, crude_properties, worth_table


@dataclass
class BlendTargets:
    """Targets of a blend: API range [°API], sulfur maximum [wt %], minimum product yields {cut: vol %}."""

    api_min: float | None = None
    api_max: float | None = None
    sulfur_max: float | None = None
    min_yield: dict[str, float] = field(default_factory=dict)


@dataclass
class BlendPlan:
    """Outcome: shares [%], objective value, blend qualities, and (when infeasible) the shortfalls."""

    feasible: bool
    shares_pct: dict[str, float]
    objective: str
    value: float
    api: float
    sulfur_wt_pct: float
    yields: dict[str, float]
    shortfalls: dict[str, float] = field(default_factory=dict)
    binding: list[str] = field(default_factory=list)
    targets: list[dict] = field(default_factory=list)
    """Each target: ``target`` (label), ``achieved``, ``limit``, ``unit``, ``slack`` (in the target's unit,
    >= 0 when met), ``binding``, and ``marginal_per_unit``: the change of the objective's value when the target
    moves by one unit (from the linear programme's duals; None when infeasible)."""
    compatibility: Compatibility | None = None
    """The blend's crude compatibility (Wiehe & Kennedy 2000, :func:`~.compatibility.assess`); when every
    candidate has the numbers, the optimiser keeps S_BN,mix >= MARGIN_RATIO x I_N,max as a constraint (a
    target row named 'compatibility: ...')."""
    share_bounds: list[dict] = field(default_factory=list)
    """Each crude's share bounds: ``crude``, ``min_pct``, ``max_pct``, ``share_pct``, ``at`` ('min', 'max' or
    None: where the share sits on a bound the user set, a minimum above 0 or a maximum below 100 %), and
    ``marginal_per_pct``: the change of the objective's value per vol % the bound moves (the linear
    programme's bound duals; None when infeasible)."""


def optimize_blend(results, bounds: dict[str, tuple[float, float]], targets: BlendTargets,
                   prices: PriceSet | None, objective: str = "worth") -> BlendPlan:
    """Shares of the candidate crudes that meet the targets at the best worth or the lowest crude cost.

    Parameters
    ----------
    results : list of YieldResult
        Each candidate crude cut with one cut set (ideal cuts).
    bounds : dict of str to (float, float)
        Share bounds by crude name, in % of the blend volume (default 0-100).
    targets : BlendTargets
    prices : PriceSet or None
        Product prices (worth) and crude prices (margin, cost).
    objective : str
        'worth' (margin when every crude has a price, else gross worth) or 'cost' (lowest crude cost).

    Returns
    -------
    BlendPlan

    Notes
    -----
    Steps: the objective vector (:func:`_objective`), the share bounds (:func:`_share_bounds`), one linear
    row per target (:func:`_target_rows`), then ``linprog``; when that is infeasible, the elastic problem.
    """
    from scipy.optimize import linprog

    names = [r.assay.name for r in results]
    if len(set(names)) != len(names):
        raise StudyError("two candidate crudes have the same name; rename one")
    n = len(results)
    if n < 2:
        raise StudyError("a blend optimisation needs at least two candidate crudes")
    sg = np.array([r.assay.sg for r in results])
    s = np.array([np.nan if r.model.given_sulfur_wt_pct is None else r.model.given_sulfur_wt_pct for r in results])
    cuts = list(results[0].cuts["name"])
    y = np.array([[r.cuts["vol_pct"][r.cuts.index(c)] for c in cuts] for r in results])  # (crudes, cuts)
    c, label, sign = _objective(results, names, prices, objective)
    lo, hi = _share_bounds(bounds, names)
    rows, rhs, labels, scales = _target_rows(targets, sg, s, y, cuts)
    numbers = [numbers_of(r.assay.extras) for r in results]
    compat = None
    if all(x is not None for x in numbers):  # compatibility as a constraint: the best over the sets of crudes used
        res, rows, rhs, labels, scales, compat = _compatible_solve(c, rows, rhs, labels, scales, lo, hi, numbers,
                                                                   names)
    else:
        res = _solve(c, rows, rhs, lo, hi)
    A = np.array(rows) if rows else None
    b = np.array(rhs) if rows else None
    if res.status == 0:
        v = res.x
        slack = (b - A @ v) if rows else np.array([])
        binding = [lab for lab, sl, sc in zip(labels, slack, scales) if abs(sl) <= 1e-7 * max(1.0, sc * 100)]
        plan = _plan(True, names, v, label, float(sign * (c @ v)), sg, s, y, cuts, {}, binding)
        duals = res.ineqlin.marginals if rows else np.array([])
        plan.targets = _target_report(targets, plan, v, sg, labels, binding, duals, sign, compat)
        plan.share_bounds = _bound_report(names, v, lo, hi, res.lower.marginals, res.upper.marginals, sign)
        plan.compatibility = assess(names, numbers, v)
        return plan
    # elastic problem: minimise the scaled violations
    m = len(rows)
    if m == 0:
        raise StudyError("no shares within the bounds add up to 100 %")
    c2 = np.concatenate([np.zeros(n), 1.0 / np.array(scales)])
    A2 = np.hstack([A, -np.eye(m)])
    res2 = linprog(c2, A_ub=A2, b_ub=b, A_eq=np.hstack([np.ones((1, n)), np.zeros((1, m))]), b_eq=[1.0],
                   bounds=list(zip(lo, hi)) + [(0, None)] * m, method="highs")
    v = res2.x[:n]
    viol = res2.x[n:]
    short = {}
    for lab, amount, row in zip(labels, viol, rows):
        if amount > 1e-9:
            short[lab] = _in_target_units(lab, amount, row, v, sg)
    plan = _plan(False, names, v, label, float(sign * (c @ v)), sg, s, y, cuts, short, [])
    plan.targets = _target_report(targets, plan, v, sg, labels, [], None, sign, compat)
    plan.share_bounds = _bound_report(names, v, lo, hi, None, None, sign)
    plan.compatibility = assess(names, numbers, v)
    return plan


MAX_COMPAT_CRUDES = 10
"""Up to this many candidates, compatibility is imposed exactly: one linear programme per set of crudes that
may be present (I_N,max counts only the crudes used).  Above it, every candidate's I_N counts (conservative)."""


def _solve(c, rows, rhs, lo, hi):
    from scipy.optimize import linprog

    return linprog(c, A_ub=np.array(rows) if rows else None, b_ub=np.array(rhs) if rows else None,
                   A_eq=np.ones((1, len(c))), b_eq=[1.0], bounds=list(zip(lo, hi)), method="highs")


def _compatible_solve(c, rows, rhs, labels, scales, lo, hi, numbers, names):
    """The best blend that stays compatible with margin: S_BN,mix >= MARGIN_RATIO x I_N,max over the crudes
    present (Wiehe & Kennedy 2000; :mod:`.compatibility`).  I_N,max depends on which crudes are used, so each
    set of crudes that may be present (every crude with a minimum share in it) is solved as its own linear
    programme, with the others held at 0, and the best feasible one kept; with more than
    :data:`MAX_COMPAT_CRUDES` candidates, or when none is feasible, all crudes count.  Returns the solution,
    the rows with the compatibility row added, and (limit, S_BN vector) of that row."""
    import itertools

    n = len(c)
    sbn = np.array([x[0] for x in numbers])
    ins = np.array([x[1] for x in numbers])
    must = [k for k in range(n) if lo[k] > 0]

    def problem(present):
        limit = MARGIN_RATIO * float(ins[list(present)].max())
        k_max = names[max(present, key=lambda k: ins[k])]
        lab = (f"compatibility: S_BN of the blend >= {MARGIN_RATIO:g} x I_N max ({limit / MARGIN_RATIO:g}, "
               f"{k_max})")
        hi_p = np.array([hi[k] if k in present else 0.0 for k in range(n)])
        return rows + [list(-sbn)], rhs + [-limit], labels + [lab], scales + [1.0], hi_p, limit

    best = None
    if n <= MAX_COMPAT_CRUDES:
        for size in range(1, n + 1):
            for present in itertools.combinations(range(n), size):
                if not set(must) <= set(present):
                    continue
                r2, b2, l2, s2, hi_p, limit = problem(present)
                if hi_p.sum() < 1 - 1e-9:
                    continue
                res = _solve(c, r2, b2, lo, hi_p)
                if res.status == 0 and (best is None or c @ res.x < c @ best[0].x - 1e-12):
                    best = (res, r2, b2, l2, s2, (limit, sbn))
    if best is None:
        r2, b2, l2, s2, _, limit = problem(tuple(range(n)))
        best = (_solve(c, r2, b2, lo, hi), r2, b2, l2, s2, (limit, sbn))
    return best


BOUND_TOL = 1e-7
"""A share this close to its bound (as a fraction of the blend) sits on it."""


def _bound_report(names, v, lo, hi, lower_duals, upper_duals, sign) -> list[dict]:
    """Each crude's share against its bounds (see :attr:`BlendPlan.share_bounds`).  A bound's dual from linprog
    (HiGHS) is d(objective)/d(bound) per unit fraction of the blend: divided by 100 per vol %, multiplied by
    ``sign`` to read in the objective's own sense."""
    out = []
    for k, nm in enumerate(names):
        at = None
        if lo[k] > 0 and v[k] <= lo[k] + BOUND_TOL:
            at = "min"
        elif hi[k] < 1 and v[k] >= hi[k] - BOUND_TOL:
            at = "max"
        marg = None
        if lower_duals is not None and at is not None:
            d = lower_duals[k] if at == "min" else upper_duals[k]
            marg = float(sign * d / 100.0) + 0.0  # + 0.0: no negative zero
        out.append({"crude": nm, "min_pct": float(lo[k] * 100), "max_pct": float(hi[k] * 100),
                    "share_pct": float(v[k] * 100), "at": at, "marginal_per_pct": marg})
    return out


def _target_report(targets: BlendTargets, plan: BlendPlan, v, sg, labels, binding, duals, sign,
                   compat=None) -> list[dict]:
    """Each target's achieved value, slack and marginal value (see :attr:`BlendPlan.targets`).

    The duals of linprog (HiGHS) are d(objective)/d(b) of each row A v <= b; the marginal value of a target
    follows from how its row's b moves with the target: d SG / d API = -141.5/(API + 131.5)^2 for the API
    rows, the blend's SG x volume for the sulfur row (whose coefficients carry the target), -1 for a minimum
    yield; multiplied by ``sign`` to read in the objective's own sense (a margin that rises is positive).
    """
    out = []
    k = 0
    sg_v = float(sg @ v)

    def add(limit, achieved, slack, unit, db):
        nonlocal k
        lab = labels[k]
        marg = None if duals is None else float(sign * duals[k] * db) + 0.0  # + 0.0: no negative zero
        slack = 0.0 if abs(slack) < 1e-9 else float(slack)  # float rounding of a binding target is no slack
        out.append({"target": lab, "limit": limit, "achieved": achieved, "unit": unit, "slack": slack,
                    "binding": lab in binding, "marginal_per_unit": marg})
        k += 1

    if targets.api_min is not None:
        add(targets.api_min, plan.api, plan.api - targets.api_min, "°API", -141.5 / (targets.api_min + 131.5) ** 2)
    if targets.api_max is not None:
        add(targets.api_max, plan.api, targets.api_max - plan.api, "°API", 141.5 / (targets.api_max + 131.5) ** 2)
    if targets.sulfur_max is not None:
        add(targets.sulfur_max, plan.sulfur_wt_pct, targets.sulfur_max - plan.sulfur_wt_pct, "wt %", sg_v)
    for cut, ymin in targets.min_yield.items():
        add(ymin, plan.yields[cut], plan.yields[cut] - ymin, "vol %", -1.0)
    if compat is not None:  # the row -S_BN . v <= -limit: b moves by -1 per unit of the limit
        limit, sbn = compat
        add(limit, float(sbn @ v), float(sbn @ v) - limit, "S_BN", -1.0)
    return out


def _objective(results, names, prices: PriceSet | None, objective: str):
    """(coefficients to minimise per crude, label of the objective, sign turning the minimum into its value)."""
    if objective == "cost":
        if prices is None or any(nm not in prices.crudes for nm in names):
            raise StudyError("--objective cost needs a crude price for every candidate in the price file")
        c = np.array([float(prices.crudes[nm].per_bbl(r.assay.sg,
                                                     prices.crudes[nm].adjusted(crude_properties(r))[0]))
                      for nm, r in zip(names, results)])
        label = f"crude cost [{prices.currency}/bbl]"
        sign = 1.0
    else:
        if prices is None:
            raise StudyError("the blend optimiser needs a price file (--prices) for worth or cost")
        w = worth_table(results, prices).set_index("crude").loc[names]
        margin = w["margin_per_bbl"].to_numpy()
        if np.all(np.isfinite(margin)):
            c, label = -margin, f"margin [{prices.currency}/bbl]"
        else:
            c, label = -w["worth_per_bbl"].to_numpy(), f"gross product worth [{prices.currency}/bbl]"
        sign = -1.0
    return c, label, sign


def _share_bounds(bounds: dict[str, tuple[float, float]], names: list[str]):
    """Lower and upper share of each crude as fractions, checked to be able to add up to 1."""
    lo = np.array([bounds.get(nm, (0.0, 100.0))[0] for nm in names]) / 100.0
    hi = np.array([bounds.get(nm, (0.0, 100.0))[1] for nm in names]) / 100.0
    unknown = [b for b in bounds if b not in names]
    if unknown:
        raise StudyError(f"share bounds name {unknown[0]!r}, which is not a candidate crude")
    for nm, (a, b) in bounds.items():
        if not (np.isfinite(a) and np.isfinite(b) and 0.0 <= a <= 100.0 and 0.0 <= b <= 100.0):
            raise StudyError(f"share bounds {a:g}:{b:g} % for {nm!r}: each bound must be a number from 0 to 100 %")
        if a > b:
            raise StudyError(f"share bounds {a:g}:{b:g} % for {nm!r}: the minimum is above the maximum")
    if np.any(lo > hi) or lo.sum() > 1 + 1e-9 or hi.sum() < 1 - 1e-9:
        raise StudyError(f"the share bounds cannot add up to 100 %: minimums add to {lo.sum() * 100:g} %, "
                         f"maximums to {hi.sum() * 100:g} %")
    return lo, hi


def _target_rows(targets: BlendTargets, sg, s, y, cuts: list[str]):
    """Inequality rows A v <= b of the targets, each with a label and a scale for the elastic problem."""
    rows, rhs, labels, scales = [], [], [], []
    if targets.api_min is not None:  # API >= min  <=>  SG <= SG(api_min)
        rows.append(sg)
        rhs.append(api_to_sg(targets.api_min))
        labels.append(f"blend API >= {targets.api_min:g}")
        scales.append(0.01)
    if targets.api_max is not None:
        rows.append(-sg)
        rhs.append(-api_to_sg(targets.api_max))
        labels.append(f"blend API <= {targets.api_max:g}")
        scales.append(0.01)
    if targets.sulfur_max is not None:
        if np.any(np.isnan(s)):
            raise StudyError("a sulfur target needs the sulfur of every candidate crude")
        rows.append(sg * (s - targets.sulfur_max))
        rhs.append(0.0)
        labels.append(f"blend sulfur <= {targets.sulfur_max:g} wt %")
        scales.append(0.01)
    for cut, ymin in targets.min_yield.items():
        if cut not in cuts:
            raise StudyError(f"no cut named {cut!r} for a minimum yield; the cuts are {', '.join(cuts)}")
        rows.append(-y[:, cuts.index(cut)])
        rhs.append(-ymin)
        labels.append(f"{cut} yield >= {ymin:g} vol %")
        scales.append(1.0)
    return rows, rhs, labels, scales


def _in_target_units(label: str, amount: float, row, v, sg) -> float:
    """A violation expressed in the target's own unit (°API, wt %, vol %)."""
    if label.startswith("blend API"):
        sg_b = float(sg @ v)
        target_sg = sg_b - amount if ">=" in label else sg_b + amount
        return abs(sg_to_api(sg_b) - sg_to_api(target_sg))
    if label.startswith("blend sulfur"):
        return amount / float(sg @ v)
    return amount


def _plan(ok, names, v, label, value, sg, s, y, cuts, short, binding) -> BlendPlan:
    sg_b = float(sg @ v)
    sulfur = float((v * sg * s).sum() / sg_b) if not np.any(np.isnan(s)) else math.nan
    return BlendPlan(ok, {nm: float(x * 100) for nm, x in zip(names, v)}, label, value, float(sg_to_api(sg_b)),
                     sulfur, {c: float(yv) for c, yv in zip(cuts, v @ y)}, short, binding)
