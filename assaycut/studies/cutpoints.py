"""Cut-point studies on one crude: what a change of cut point moves (shift), and one cut point swept.

Pure computation returning DataFrames.
"""

from __future__ import annotations

import math

import numpy as np

from ..cutting.cut_table import CutTable
from ..cutting.cutset import CutSet
from ..cutting.ideal import FLAG_SETS, columns_table, cut_columns, take_rows
from ..cutting.model_rows import BatchModel
from ..errors import StudyError
from ..methods.d86 import D86_STD
from ..model.crude import CrudeModel

DELTA_COLUMNS = ["vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "cetane_index_d4737", "flash_c_est"]


def shift_delta(base, new):
    """Per-cut change between two yield results of the same crude (new minus base).

    Parameters
    ----------
    base, new : YieldResult
        Same assay, same cut names, different cut points.

    Returns
    -------
    CutTable
        One row per cut: name, end_c_base, end_c_new; the changes vol_pct, wt_pct, sg, sulfur_wt_pct,
        cetane_index_d4737, flash_c_est, d86_<p>_c (new minus base), and the new absolute values beside them
        (new_vol_pct, new_wt_pct, ..., new_d86_95_c); changed (bool), limit_flips (text).
    """
    b = {r["name"]: r for r in base.cuts.rows()}
    n = {r["name"]: r for r in new.cuts.rows()}
    if list(b) != list(n):
        raise StudyError("the two cut sets have different cuts; a shift compares the same cuts")
    rows = []
    bl = {(x["cut"], x["property"]): x["status"] for x in base.limits.rows()}
    nl = {(x["cut"], x["property"]): (x["status"], x["label"] or x["property"]) for x in new.limits.rows()}
    for name in b:
        rb, rn = b[name], n[name]
        row = {"name": name, "end_c_base": rb["end_c"], "end_c_new": rn["end_c"]}
        for c in DELTA_COLUMNS:
            row[c] = _d(rn[c], rb[c])
            row[f"new_{c}"] = float(rn[c]) if rn[c] is not None else math.nan
        db, dn = rb["d86_c"] or {}, rn["d86_c"] or {}
        for p in D86_STD:
            row[f"d86_{p}_c"] = _d(dn.get(str(p), math.nan), db.get(str(p), math.nan))
        row["new_d86_95_c"] = float(dn.get("95", math.nan))
        row["changed"] = bool(abs(row["vol_pct"]) > 1e-9 or abs(row["wt_pct"]) > 1e-9)
        flips = [f"{lab}: {bl[(name, prop)]} -> {st}" for (cut, prop), (st, lab) in nl.items()
                 if cut == name and bl.get((cut, prop)) not in (None, st)]
        row["limit_flips"] = "; ".join(flips)
        rows.append(row)
    return CutTable.from_rows(rows, list(rows[0]) if rows else ["name"])


def _d(a, b) -> float:
    a = math.nan if a is None else float(a)
    b = math.nan if b is None else float(b)
    return a - b


SWEEP_QUALITIES = ["vol_pct", "wt_pct", "sg", "api", "sulfur_wt_pct", "d86_10_c", "d86_95_c", "cetane_index_d4737",
                   "flash_c_est", "freeze_point_c", "smoke_point_mm", "cloud_point_c", "pour_point_c"]
"""The qualities a sweep gives for each of its two cuts: yields, gravity and sulfur, the D86 points at the
boundary, and the cold-flow, smoke and flash qualities that limit a kerosene or diesel end point (the last four
where measured on narrow cuts or estimated within a correlation's range; see
:mod:`assaycut.cutting.cut_qualities`)."""


def sweep(model: CrudeModel, cut_set: CutSet, name: str, t_from: float, t_to: float, step: float = 5.0):
    """Yields and key qualities of the two cuts on either side of one cut point as it moves.

    Computed in one vectorised pass over all steps (:func:`assaycut.cutting.ideal.cut_columns`).

    Parameters
    ----------
    model : CrudeModel
    cut_set : CutSet
    name : str
        The cut whose end moves; the cut after it is the other neighbour.
    t_from, t_to : float
        Range of the cut point. [°C]
    step : float
        Step. [°C]

    Returns
    -------
    pandas.DataFrame
        Column ``cut_point_c`` and, for ``lower`` and ``upper`` cut, ``<side>_<quality>`` for the qualities of
        :data:`SWEEP_QUALITIES` (those the crude has); ``attrs``: ``lower`` and ``upper`` (the two cut names)
        and ``estimated`` (the columns estimated by a correlation at some step, rather than measured).
    """
    import pandas as pd

    names = cut_set.names
    if name not in names:
        raise StudyError(f"no cut named {name!r}; the cuts are {', '.join(repr(n) for n in names)}")
    k = names.index(name)
    if k == len(names) - 1:
        raise StudyError(f"the last cut {name!r} has no end to move")
    if any(c.swing for c in cut_set.cuts):
        raise StudyError("sweep works on cut sets without swing cuts; unmark swing for the sweep")
    if not (step > 0 and math.isfinite(step)):
        raise StudyError(f"--step must be a positive number of °C; got {step:g}")
    if not t_to > t_from:
        raise StudyError(f"--to {t_to:g} °C must be above --from {t_from:g} °C")
    n_steps = int(math.floor((t_to - t_from) / step + 1e-9)) + 1
    if n_steps > 100_000:
        raise StudyError(f"{n_steps} steps is too many; at most 100000")
    ends = cut_set.ends_c
    lo = ends[k - 1] if k > 0 else -math.inf
    hi = ends[k + 1] if k + 1 < len(ends) else math.inf
    if t_from <= lo or t_to >= hi:
        raise StudyError(f"the sweep {t_from:g}-{t_to:g} °C must stay strictly between the neighbouring cut points "
                         f"({lo:.1f} and {hi:.1f} °C)")
    pts = t_from + step * np.arange(n_steps)
    # only the two neighbours change: cut with the cut points around them (prev end, moving point, next end)
    sub = [ends[k - 1]] if k > 0 else []
    j_lo = len(sub)
    sub += [np.nan] + ([ends[k + 1]] if k + 1 < len(ends) else [])
    grid = np.repeat(np.array(sub)[None, :], n_steps, axis=0)
    grid[:, j_lo] = pts
    cols = cut_columns(BatchModel([model]), grid)
    out = {"cut_point_c": pts}
    estimated = []
    for side, j in (("lower", j_lo), ("upper", j_lo + 1)):
        for q in SWEEP_QUALITIES:
            if q == "d86_10_c":
                out[f"{side}_{q}"] = cols["d86"][:, j, 1]
            elif q == "d86_95_c":
                out[f"{side}_{q}"] = cols["d86"][:, j, 6]
            elif q in cols:
                out[f"{side}_{q}"] = cols[q][:, j]
                if q in cols["estimated"] and np.any(cols["estimated"][q][:, j]):
                    estimated.append(f"{side}_{q}")
    df = pd.DataFrame(out)
    df.attrs["lower"], df.attrs["upper"] = names[k], names[k + 1]
    df.attrs["estimated"] = estimated
    return df


VECTOR_STEP_C = 0.5
"""Half-width of the central difference of :func:`cut_point_vectors`: each cut point is moved by ± this. [°C]"""


def cut_point_vectors(model: CrudeModel, cut_set: CutSet, step_c: float = VECTOR_STEP_C):
    """Base and delta vectors for planning models: the base cut table, and for each cut point the change per
    °C of every cut's yields and qualities.

    The derivative is the central difference of the exact model, (q(T + h) - q(T - h)) / 2h with h =
    ``step_c``, all cut points but one held; every candidate is cut in one batched call.

    Parameters
    ----------
    model : CrudeModel
    cut_set : CutSet
    step_c : float
        Half-width h. [°C]

    Returns
    -------
    (CutTable, dict of str to CutTable)
        The base cut table, and {cut-point name (the cut it ends): per-°C change of every numeric column of
        every cut [unit per °C]}; NaN where a quality is missing on either side.

    Raises
    ------
    StudyError
        When two cut points lie within 2h of each other (the step would cross them).
    """

    names, ends = cut_set.reported()
    gaps = np.diff(ends)
    if gaps.size and float(gaps.min()) <= 2.0 * step_c:
        raise StudyError(f"two cut points lie within {2 * step_c:g} °C of each other: the ±{step_c:g} °C step of "
                         f"the vectors would cross them")
    k = ends.size
    grid = np.repeat(ends[None, :], 2 * k + 1, axis=0)
    grid[1:k + 1][np.arange(k), np.arange(k)] += step_c
    grid[k + 1:][np.arange(k), np.arange(k)] -= step_c
    cols = cut_columns(BatchModel([model]), grid)
    tables = [columns_table(names, take_rows(cols, i)) for i in range(2 * k + 1)]
    base = tables[0]
    numeric = [c for c in base.keys if c not in ("name", "d86_c", "extrapolated") + FLAG_SETS]
    deltas = {}
    for j in range(k):
        plus, minus = tables[1 + j], tables[1 + k + j]
        d = {"name": list(names)}
        d.update({c: (np.asarray(plus[c], dtype=float) - np.asarray(minus[c], dtype=float)) / (2.0 * step_c)
                  for c in numeric if c not in ("start_c", "end_c")})
        for p in D86_STD:
            d[f"d86_{p}_c"] = np.array([((a or {}).get(str(p), math.nan) - (b or {}).get(str(p), math.nan))
                                        / (2.0 * step_c) for a, b in zip(plus["d86_c"], minus["d86_c"])])
        deltas[names[j]] = CutTable(d)
    return base, deltas
