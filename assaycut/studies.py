"""Studies on top of the yield calculation: crude comparison and worth, cut-point shift, cut-point sweep.

Pure computation returning DataFrames; the blend of crudes is in :mod:`assaycut.blending`.

Worth (gross product worth, GPW): worth per barrel of crude = Σ_cuts (vol % / 100) x price per barrel of the
cut; per tonne = Σ_cuts (wt % / 100) x price per tonne.  A price given per tonne converts to per barrel with
the cut's own density at 15 °C: price/bbl = price/t x rho[kg/m3] x 0.158987 m3/bbl / 1000 (common practice, no
source).  Worth ignores operating costs, unit capacities and product-quality give-away.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .crude import D86_STD, CrudeModel
from .cutting import CutSet, cut_columns
from .errors import StudyError
from .units import sg_to_density15

BBL_M3 = 0.158987294928
"""One US oil barrel. [m3] (exact definition, 42 US gallons)"""

WORTH_CAVEAT = ("Gross product worth only: operating costs, unit capacities, product-quality give-away, "
                "freight and blending are ignored.")


@dataclass(frozen=True)
class Price:
    """A price: ``value`` in currency per ``unit`` ('bbl' or 't')."""

    value: float
    unit: str

    def per_tonne(self, density_kg_m3: float) -> float:
        """Price per metric tonne at the given density at 15 °C. [currency/t]"""
        return self.value if self.unit == "t" else self.value / (density_kg_m3 * BBL_M3 / 1000.0)

    def per_bbl(self, density_kg_m3: float) -> float:
        """Price per barrel at the given density at 15 °C. [currency/bbl]"""
        return self.value if self.unit == "bbl" else self.value * density_kg_m3 * BBL_M3 / 1000.0


@dataclass
class PriceSet:
    """Product prices by cut name, crude prices by crude name, and the currency."""

    products: dict[str, Price]
    crudes: dict[str, Price] = field(default_factory=dict)
    currency: str = "USD"
    label: str = "prices"


def limit_summary(statuses) -> str:
    """One word for a cut's limits: 'fail' if any fails, else 'pass', noting limits not evaluated ('n/a').

    Examples
    --------
    >>> limit_summary(["pass", "n/a", "pass"])
    'pass (1 n/a)'
    >>> limit_summary(["pass", "fail"])
    'fail'
    """
    st = list(statuses)
    if "fail" in st:
        return "fail"
    na = st.count("n/a")
    if na == len(st):
        return "n/a"
    return "pass" + (f" ({na} n/a)" if na else "")


def comparison_table(results):
    """Side-by-side comparison of several crudes cut with the same cut set.

    Parameters
    ----------
    results : list of YieldResult

    Returns
    -------
    pandas.DataFrame
        One row per (cut, crude): vol_pct, wt_pct, sg, api, sulfur_wt_pct, watson_k, limits ('pass', 'fail',
        'n/a' or '' when the cut has no limits; 'fail' if any limit fails).
    """
    import pandas as pd

    names = [r.assay.name for r in results]
    if len(set(names)) != len(names):
        dup = next(n for n in names if names.count(n) > 1)
        raise StudyError(f"two assays are both named {dup!r}; rename one to compare them")
    cutnames = [list(r.cuts["name"]) for r in results]
    if any(c != cutnames[0] for c in cutnames):
        raise StudyError("the assays were cut with different cut sets; compare needs one cut set")
    rows = []
    for r in results:
        status = {cut: limit_summary(g["status"]) for cut, g in r.limits.groupby("cut")} if len(r.limits) else {}
        for c in r.cuts.to_dict("records"):
            rows.append({"cut": c["name"], "crude": r.assay.name, "vol_pct": c["vol_pct"], "wt_pct": c["wt_pct"],
                         "sg": c["sg"], "api": c["api"], "sulfur_wt_pct": c["sulfur_wt_pct"],
                         "watson_k": c["watson_k"], "limits": status.get(c["name"], "")})
    return pd.DataFrame(rows)


def worth_table(results, prices: PriceSet):
    """Gross product worth of each crude, and its margin over the crude price, ranked.

    Parameters
    ----------
    results : list of YieldResult
    prices : PriceSet

    Returns
    -------
    pandas.DataFrame
        One row per crude: rank, crude, worth_per_bbl, worth_per_t, crude_price_per_bbl, crude_price_per_t,
        margin_per_bbl, margin_per_t [currency/bbl or /t of crude].  Ranked by margin per barrel when every
        crude has a price, else by worth per barrel.
    """
    import pandas as pd

    rows = []
    for r in results:
        missing = [c for c in r.cuts["name"] if c not in prices.products]
        if missing:
            raise StudyError(f"{prices.label}: no price for cut {missing[0]!r}; give a price for every cut of the "
                             f"cut set ({', '.join(repr(n) for n in r.cuts['name'])})")
        wb = wt = 0.0
        for c in r.cuts.to_dict("records"):
            if c["vol_pct"] <= 0:
                continue
            p = prices.products[c["name"]]
            rho = c["density_15c_kg_m3"]
            wb += c["vol_pct"] / 100.0 * p.per_bbl(rho)
            wt += c["wt_pct"] / 100.0 * p.per_tonne(rho)
        rho_crude = sg_to_density15(r.assay.sg)
        cp = prices.crudes.get(r.assay.name)
        cpb = cp.per_bbl(rho_crude) if cp else math.nan
        cpt = cp.per_tonne(rho_crude) if cp else math.nan
        rows.append({"crude": r.assay.name, "worth_per_bbl": wb, "worth_per_t": wt, "crude_price_per_bbl": cpb,
                     "crude_price_per_t": cpt, "margin_per_bbl": wb - cpb, "margin_per_t": wt - cpt})
    df = pd.DataFrame(rows)
    key = "margin_per_bbl" if df["margin_per_bbl"].notna().all() else "worth_per_bbl"
    df = df.sort_values(key, ascending=False, kind="stable").reset_index(drop=True)
    df.insert(0, "rank", np.arange(1, len(df) + 1))
    return df


DELTA_COLUMNS = ["vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "cetane_index_d4737", "flash_c_est"]


def shift_delta(base, new):
    """Per-cut change between two yield results of the same crude (new minus base).

    Parameters
    ----------
    base, new : YieldResult
        Same assay, same cut names, different cut points.

    Returns
    -------
    pandas.DataFrame
        One row per cut: name, old and new end_c, d_vol_pct, d_wt_pct, d_sg, d_sulfur_wt_pct,
        d_cetane_index_d4737, d_flash_c_est, d_d86_<p>_c, changed (bool), limit_flips (text).
    """
    import pandas as pd

    b = base.cuts.set_index("name")
    n = new.cuts.set_index("name")
    if list(b.index) != list(n.index):
        raise StudyError("the two cut sets have different cuts; a shift compares the same cuts")
    rows = []
    bl = {(x["cut"], x["property"]): x["status"] for x in base.limits.to_dict("records")}
    nl = {(x["cut"], x["property"]): (x["status"], x["label"] or x["property"]) for x in new.limits.to_dict("records")}
    for name in b.index:
        rb, rn = b.loc[name], n.loc[name]
        row = {"name": name, "end_c_base": rb["end_c"], "end_c_new": rn["end_c"]}
        for c in DELTA_COLUMNS:
            row[c] = _d(rn[c], rb[c])
        db, dn = rb["d86_c"] or {}, rn["d86_c"] or {}
        for p in D86_STD:
            row[f"d86_{p}_c"] = _d(dn.get(str(p), math.nan), db.get(str(p), math.nan))
        row["changed"] = bool(abs(row["vol_pct"]) > 1e-9 or abs(row["wt_pct"]) > 1e-9)
        flips = [f"{lab}: {bl[(name, prop)]} -> {st}" for (cut, prop), (st, lab) in nl.items()
                 if cut == name and bl.get((cut, prop)) not in (None, st)]
        row["limit_flips"] = "; ".join(flips)
        rows.append(row)
    return pd.DataFrame(rows)


def _d(a, b) -> float:
    a = math.nan if a is None else float(a)
    b = math.nan if b is None else float(b)
    return a - b


SWEEP_QUALITIES = ["vol_pct", "wt_pct", "sg", "api", "sulfur_wt_pct", "d86_10_c", "d86_95_c", "cetane_index_d4737",
                   "flash_c_est"]


def sweep(model: CrudeModel, cut_set: CutSet, name: str, t_from: float, t_to: float, step: float = 5.0):
    """Yields and key qualities of the two cuts on either side of one cut point as it moves.

    Computed in one vectorised pass over all steps (:func:`assaycut.cutting.cut_columns`).

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
        :data:`SWEEP_QUALITIES`.
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
                         f"({lo:g} and {hi:g} °C)")
    pts = t_from + step * np.arange(n_steps)
    # only the two neighbours change: cut with the cut points around them (prev end, moving point, next end)
    sub = [ends[k - 1]] if k > 0 else []
    j_lo = len(sub)
    sub += [np.nan] + ([ends[k + 1]] if k + 1 < len(ends) else [])
    grid = np.repeat(np.array(sub)[None, :], n_steps, axis=0)
    grid[:, j_lo] = pts
    cols = cut_columns(model, grid)
    out = {"cut_point_c": pts}
    for side, j in (("lower", j_lo), ("upper", j_lo + 1)):
        for q in SWEEP_QUALITIES:
            if q == "d86_10_c":
                out[f"{side}_{q}"] = cols["d86"][:, j, 1]
            elif q == "d86_95_c":
                out[f"{side}_{q}"] = cols["d86"][:, j, 6]
            else:
                out[f"{side}_{q}"] = cols[q][:, j]
    df = pd.DataFrame(out)
    df.attrs["lower"], df.attrs["upper"] = names[k], names[k + 1]
    return df
