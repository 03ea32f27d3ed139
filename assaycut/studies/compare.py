"""Crude selection: several crudes side by side, and their gross product worth and margin.

Pure computation returning DataFrames.

Worth (gross product worth, GPW): worth per barrel of crude = Σ_cuts (vol % / 100) x price per barrel of the
cut; per tonne = Σ_cuts (wt % / 100) x price per tonne.  A price given per tonne converts to per barrel with
the cut's own density at 15 °C: price/bbl = price/t x rho[kg/m3] x 0.158987 m3/bbl / 1000 (common practice, no
source).  Worth ignores operating costs, unit capacities and product-quality give-away.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import StudyError
from ..units import sg_to_density15

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
