"""Product limits: checking each cut's estimated qualities against limits such as EN 590 or ASTM D1655.

A limit names a cut, a property, and a minimum and/or maximum.  Properties are the cut-table columns
(``density_15c_kg_m3``, ``flash_c_est``, ``cetane_index_d4737``, ``sulfur_wt_pct``...), the D86 points
``d86_<p>_c`` (p in 0, 10, 30, 50, 70, 90, 95), and ``recovered_at_<T>c_pct``: the D86 volume recovered at
T °C, interpolated on the cut's estimated D86 (below the 0 % point: 0; above the 95 % point: 95, a lower
bound).  A property the estimate cannot give (for example the D86 final boiling point) is reported as
``n/a`` with the reason, never as a pass.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from .errors import InputError

_REC = re.compile(r"^recovered_at_(\d+(?:\.\d+)?)c_pct$")
_D86 = re.compile(r"^d86_(0|10|30|50|70|90|95)_c$")
SCALAR_PROPERTIES = ("vol_pct", "wt_pct", "mid_vol_c", "vabp_c", "meabp_c", "sg", "api", "density_15c_kg_m3",
                     "watson_k", "sulfur_wt_pct", "mw", "cetane_index_d4737", "flash_c_est")
UNAVAILABLE = {"d86_fbp_c": "the D86 final boiling point is not estimated (Daubert 1994 stops at 95 %)",
               "d86_100_c": "the D86 final boiling point is not estimated (Daubert 1994 stops at 95 %)"}


@dataclass(frozen=True)
class Limit:
    """One product limit.

    Attributes
    ----------
    cut : str
        Cut name the limit applies to.
    property : str
        Property name (see the module docstring).
    min, max : float or None
        Bounds, in the property's unit; ``strict`` makes them exclusive.
    strict : bool
    label : str
        Short text for reports (e.g. "EN 590 flash point").
    source : str
        Where the value comes from, with "verify against the current edition" where recalled.
    """

    cut: str
    property: str
    min: float | None = None
    max: float | None = None
    strict: bool = False
    label: str = ""
    source: str = ""

    def bounds_text(self) -> str:
        lo = "> " if self.strict else ">= "
        hi = "< " if self.strict else "<= "
        parts = []
        if self.min is not None:
            parts.append(f"{lo}{self.min:g}")
        if self.max is not None:
            parts.append(f"{hi}{self.max:g}")
        return " and ".join(parts)


def validate_property(prop: str) -> bool:
    """True if ``prop`` is a property name a limit can check (or is known to be unavailable)."""
    return prop in SCALAR_PROPERTIES or bool(_REC.match(prop)) or bool(_D86.match(prop)) or prop in UNAVAILABLE


def property_value(row: dict, prop: str) -> tuple[float, str]:
    """The value of ``prop`` for one cut row, and a reason when it is not available."""
    if prop in UNAVAILABLE:
        return math.nan, UNAVAILABLE[prop]
    m = _D86.match(prop)
    if m:
        d = row.get("d86_c")
        return (float(d[m.group(1)]), "") if d else (math.nan, "no D86 estimate for this cut")
    m = _REC.match(prop)
    if m:
        d = row.get("d86_c")
        if not d:
            return math.nan, "no D86 estimate for this cut"
        t = float(m.group(1))
        pcts = np.array([float(k) for k in d])
        temps = np.array([float(v) for v in d.values()])
        return float(np.interp(t, temps, pcts, left=0.0, right=95.0)), ""
    v = row.get(prop)
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return math.nan, f"{prop} is not estimated for this cut"
    return float(v), ""


def check_limits(cuts, limits: list[Limit]):
    """Check every limit against the cut table.

    Parameters
    ----------
    cuts : pandas.DataFrame
        Cut table from :func:`assaycut.cutting.cut_table`.
    limits : list of Limit

    Returns
    -------
    pandas.DataFrame
        One row per limit whose cut exists: cut, property, label, limit, value, status ('pass', 'fail' or
        'n/a'), note, source.
    """
    import pandas as pd

    rows = {r["name"]: r for r in cuts.to_dict("records")}
    out = []
    for lim in limits:
        if lim.cut not in rows:
            continue
        value, why = property_value(rows[lim.cut], lim.property)
        if math.isnan(value):
            status = "n/a"
        else:
            ok = True
            if lim.min is not None:
                ok &= value > lim.min if lim.strict else value >= lim.min
            if lim.max is not None:
                ok &= value < lim.max if lim.strict else value <= lim.max
            status = "pass" if ok else "fail"
        out.append({"cut": lim.cut, "property": lim.property, "label": lim.label, "limit": lim.bounds_text(),
                    "value": value, "status": status, "note": why, "source": lim.source})
    return pd.DataFrame(out, columns=["cut", "property", "label", "limit", "value", "status", "note", "source"])


def limits_from_dicts(items: list[dict], where: str) -> list[Limit]:
    """Limits from parsed TOML tables, each checked; errors name the file and the limit's index."""
    out = []
    for i, it in enumerate(items, start=1):
        if not isinstance(it, dict):
            raise InputError(f"[[limit]] {i} is not a table", file=where)
        unknown = set(it) - {"cut", "property", "min", "max", "strict", "label", "source"}
        if unknown:
            raise InputError(f"[[limit]] {i}: unknown key {sorted(unknown)[0]!r}; expected cut, property, min, max, "
                             f"strict, label, source", file=where)
        for k in ("cut", "property"):
            if not isinstance(it.get(k), str) or not it[k].strip():
                raise InputError(f"[[limit]] {i}: '{k}' must be a non-empty text", file=where)
        if not validate_property(it["property"]):
            raise InputError(f"[[limit]] {i}: unknown property {it['property']!r}; expected a cut-table column "
                             f"({', '.join(SCALAR_PROPERTIES)}), d86_<p>_c or recovered_at_<T>c_pct", file=where)
        lo, hi = it.get("min"), it.get("max")
        for k, v in (("min", lo), ("max", hi)):
            if v is not None and (isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v)):
                raise InputError(f"[[limit]] {i}: '{k}' must be a number; found {v!r}", file=where)
        if lo is None and hi is None:
            raise InputError(f"[[limit]] {i}: give 'min', 'max' or both", file=where)
        if lo is not None and hi is not None and lo > hi:
            raise InputError(f"[[limit]] {i}: min {lo:g} is above max {hi:g}", file=where)
        out.append(Limit(it["cut"], it["property"], None if lo is None else float(lo),
                         None if hi is None else float(hi), bool(it.get("strict", False)),
                         str(it.get("label", "")), str(it.get("source", ""))))
    return out
