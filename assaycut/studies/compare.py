"""Crude selection: several crudes side by side, and their gross product worth and margin.

Pure computation returning DataFrames.

Worth (gross product worth, GPW): worth per barrel of crude = Σ_cuts (vol % / 100) x price per barrel of the
cut; per tonne = Σ_cuts (wt % / 100) x price per tonne.  A price given per tonne converts to per barrel by
the mass of the cut's barrel at 60 °F: price/bbl = price/t x SG x 999.016 kg/m³ x 0.158987 m³/bbl / 1000
(:func:`~assaycut.units.barrel_mass_t`; the barrel is a volume at 60 °F, API MPMS Ch. 11.1).  Worth ignores
operating costs, unit capacities and product-quality give-away.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import StudyError
from ..units import barrel_mass_t, sg_to_density15

WORTH_CAVEAT = ("Gross product worth only: operating costs, unit capacities, product-quality give-away, "
                "freight and blending are ignored.")


@dataclass(frozen=True)
class Adjustment:
    """A quality adjustment of a price: ``per_unit`` x (value of ``property`` - ``base``), in the price's own
    unit (currency per bbl or per t)."""

    property: str
    base: float
    per_unit: float


@dataclass(frozen=True)
class Price:
    """A price: ``value`` in currency per ``unit`` ('bbl' or 't'), moved by quality adjustments and bounded by
    optional ``min``/``max`` (same unit); ``line`` names the price file line for messages."""

    value: float
    unit: str
    adjust: tuple[Adjustment, ...] = ()
    min: float | None = None
    max: float | None = None
    line: str = ""

    def adjusted(self, props, strict: bool = True):
        """The adjusted price and the adjustment, in the price's own unit.

        price = value + Σ per_unit x (props[property] - base), then bounded to [min, max].

        Parameters
        ----------
        props : mapping of str to float or numpy.ndarray
            The product's (or crude's) property values.
        strict : bool
            Raise when a property is missing or has no value (True), or give NaN (False: an optimiser's trial).

        Returns
        -------
        (numpy.ndarray, numpy.ndarray)
            Adjusted price and adjustment. [currency/bbl or /t]

        Examples
        --------
        A residue at 390/t with -12 per wt % of sulfur above 1.0, for a 3.5 wt % sulfur residue: by hand
        390 - 12 x 2.5 = 360:

        >>> p = Price(390.0, "t", (Adjustment("sulfur_wt_pct", 1.0, -12.0),))
        >>> [float(x) for x in p.adjusted({"sulfur_wt_pct": 3.5})]
        [360.0, -30.0]
        """
        adj = 0.0
        for a in self.adjust:
            v = props.get(a.property) if hasattr(props, "get") else None
            v = np.asarray(np.nan if v is None else v, dtype=float)
            if strict and (a.property not in props or not np.all(np.isfinite(v))):
                raise StudyError(f"{self.line or 'a price'}: the adjustment on {a.property!r} needs a value the "
                                 f"{'cut' if 'products' in self.line else 'crude'} does not have")
            adj = adj + a.per_unit * (v - a.base)
        val = np.asarray(self.value + adj, dtype=float)
        if self.min is not None:
            val = np.maximum(val, self.min)
        if self.max is not None:
            val = np.minimum(val, self.max)
        return val, val - self.value

    def per_tonne(self, sg, value=None):
        """Price per metric tonne of a product of specific gravity ``sg`` (60/60 °F), by its 60 °F barrel's
        mass (:func:`~assaycut.units.barrel_mass_t`); ``value`` an adjusted price in the own unit (default the
        unadjusted one). [currency/t]"""
        v = self.value if value is None else value
        return v if self.unit == "t" else v / barrel_mass_t(sg)

    def per_bbl(self, sg, value=None):
        """Price per barrel (at 60 °F) of a product of specific gravity ``sg``; ``value`` as in
        :meth:`per_tonne`. [currency/bbl]"""
        v = self.value if value is None else value
        return v if self.unit == "bbl" else v * barrel_mass_t(sg)


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
        One row per (cut, crude): start_c and end_c (the cut's TBP range, NaN for an open end) [°C], vol_pct,
        wt_pct, bbl_per_day and t_per_day (with a crude run), sg, api,
        sulfur_wt_pct, watson_k, bmci, hydrogen_wt_pct (NaN where the cut has none) with hydrogen_estimated,
        limits ('pass', 'fail', 'n/a' or '' when the cut has no limits; 'fail' if any
        limit fails), extrapolated (the cut rests partly on the fitted extension).
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
        lim = r.limits.rows()
        status = {cut: limit_summary([x["status"] for x in lim if x["cut"] == cut])
                  for cut in dict.fromkeys(x["cut"] for x in lim)}
        for c in r.cuts.rows():
            rows.append({"cut": c["name"], "crude": r.assay.name, "start_c": c["start_c"], "end_c": c["end_c"],
                         "vol_pct": c["vol_pct"], "wt_pct": c["wt_pct"],
                         **{k: c[k] for k in ("bbl_per_day", "t_per_day") if k in c},
                         "sg": c["sg"], "api": c["api"], "sulfur_wt_pct": c["sulfur_wt_pct"],
                         "watson_k": c["watson_k"], "bmci": c.get("bmci", np.nan),
                         "hydrogen_wt_pct": c.get("hydrogen_wt_pct", np.nan),
                         "hydrogen_estimated": "hydrogen_wt_pct" in c.get("estimated", []),
                         "limits": status.get(c["name"], ""),
                         "extrapolated": bool(c["extrapolated"])})
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
        margin_per_bbl, margin_per_t [currency/bbl or /t of crude]; with a crude run (``--rate``, in the cut
        tables) also worth_per_day and margin_per_day [currency/d] = per-bbl figure x run.  Ranked by margin
        per barrel when every crude has a price, else by worth per barrel.
    """
    import pandas as pd

    rows = []
    for r in results:
        detail = worth_by_product(r, prices)
        wb, wt = float(detail["worth_per_bbl"].sum()), float(detail["worth_per_t"].sum())
        cp = prices.crudes.get(r.assay.name)
        if cp:
            value, _ = cp.adjusted(crude_properties(r))
            cpb, cpt = float(cp.per_bbl(r.assay.sg, value)), float(cp.per_tonne(r.assay.sg, value))
        else:
            cpb = cpt = math.nan
        rows.append({"crude": r.assay.name, "worth_per_bbl": wb, "worth_per_t": wt, "crude_price_per_bbl": cpb,
                     "crude_price_per_t": cpt, "margin_per_bbl": wb - cpb, "margin_per_t": wt - cpt})
        run = r.cuts.attrs.get("rate_bbl_per_day")
        if run:
            rows[-1].update({"worth_per_day": wb * run, "margin_per_day": (wb - cpb) * run})
    df = pd.DataFrame(rows)
    key = ranked_by(df)
    df = df.sort_values(key, ascending=False, kind="stable").reset_index(drop=True)
    df.insert(0, "rank", np.arange(1, len(df) + 1))
    df.attrs["ranked_by"] = key
    return df


def ranked_by(worth) -> str:
    """What a worth table ranks by: 'margin_per_bbl' when every crude has a price, else 'worth_per_bbl'."""
    return "margin_per_bbl" if worth["margin_per_bbl"].notna().all() else "worth_per_bbl"


def crude_properties(result) -> dict:
    """The whole-crude properties a crude price may be adjusted on: api, sg, density_15c_kg_m3,
    sulfur_wt_pct and the crude sheet's extras."""
    a = result.assay
    props = {"api": a.api, "sg": a.sg, "density_15c_kg_m3": float(sg_to_density15(a.sg))}
    if result.model.given_sulfur_wt_pct is not None:
        props["sulfur_wt_pct"] = result.model.given_sulfur_wt_pct
    props.update({k: v for k, v in a.extras.items() if isinstance(v, (int, float))})
    return props


def worth_by_product(result, prices: PriceSet):
    """Each product's price, its quality adjustment and its share of the crude's worth.

    Parameters
    ----------
    result : YieldResult
    prices : PriceSet

    Returns
    -------
    pandas.DataFrame
        One row per cut: crude, cut, unit ('bbl' or 't'), base_price, adjustment, price (adjusted, in the
        price's unit), price_per_bbl, price_per_t [currency], vol_pct, wt_pct, worth_per_bbl, worth_per_t
        (the cut's contribution per bbl / t of crude).
    """
    import pandas as pd

    missing = [c for c in result.cuts["name"] if c not in prices.products]
    if missing:
        raise StudyError(f"{prices.label}: no price for cut {missing[0]!r}; give a price for every cut of the "
                         f"cut set ({', '.join(repr(n) for n in result.cuts['name'])})")
    rows = []
    for c in result.cuts.rows():
        p = prices.products[c["name"]]
        empty = not c["vol_pct"] > 0
        value, adj = (np.float64(p.value), np.float64(0.0)) if empty else p.adjusted(c)
        pb = float(p.per_bbl(c["sg"], value)) if not empty else math.nan
        pt = float(p.per_tonne(c["sg"], value)) if not empty else math.nan
        rows.append({"crude": result.assay.name, "cut": c["name"], "unit": p.unit, "base_price": p.value,
                     "adjustment": float(adj), "price": float(value), "price_per_bbl": pb, "price_per_t": pt,
                     "vol_pct": c["vol_pct"], "wt_pct": c["wt_pct"],
                     "worth_per_bbl": 0.0 if empty else c["vol_pct"] / 100.0 * pb,
                     "worth_per_t": 0.0 if empty else c["wt_pct"] / 100.0 * pt})
    return pd.DataFrame(rows)
