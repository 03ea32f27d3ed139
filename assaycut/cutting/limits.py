"""Product limits: each cut's estimated qualities checked against limits such as EN 590 or ASTM D1655.

A limit names a cut, a property, and a minimum and/or maximum.  Properties are the cut-table columns
(``density_15c_kg_m3``, ``flash_c_est``, ``cetane_index_d4737``, ``sulfur_wt_pct``...), the D86 points
``d86_<p>_c`` (p in 0, 10, 30, 50, 70, 90, 95), and ``recovered_at_<T>c_pct``: the D86 volume recovered at
T °C, interpolated linearly on the cut's estimated D86 (below the 0 % point: 0; above the 95 % point: 95, a
lower bound).  A property the estimate cannot give (for example the D86 final boiling point) is reported as
``n/a`` with the reason, never as a pass.

One vectorised evaluator (:func:`limit_values`) serves the yield report (:func:`check_limits`) and the
cut-point optimiser (:func:`limit_margins`) alike.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace

import numpy as np

from ..methods.blending_indices import RULES, VISCOSITY
from ..methods.d86 import D86_STD
from .cut_qualities import ESTIMATED
from .cut_table import CutTable

RECOVERED_AT = re.compile(r"^recovered_at_(\d+(?:\.\d+)?)c_pct$")
"""Property name of the D86 volume recovered at a temperature."""
D86_POINT = re.compile(r"^d86_(0|10|30|50|70|90|95)_c$")
"""Property name of a D86 point."""
SCALAR_PROPERTIES = ("vol_pct", "wt_pct", "mid_vol_c", "vabp_c", "meabp_c", "sg", "api", "density_15c_kg_m3",
                     "watson_k", "sulfur_wt_pct", "mw", "cetane_index_d4737", "flash_c_est")
_NO_FBP = ("the D86 final boiling point is not estimated: the D86 estimate stops at 95 % (whether Daubert 1994's "
           "end segment, used here for 90-95 %, runs to 95 % or to the final boiling point is not settled against "
           "the primary source); limit the D86 95 % point, or the cut's end point, instead")
UNAVAILABLE = {"d86_fbp_c": _NO_FBP, "d86_100_c": _NO_FBP}
LIMIT_KEYS = ("cut", "property", "min", "max", "strict", "label", "source")
"""Keys of a limit as the limits file gives it."""
TOL = 1e-6
"""A strict limit must be passed by at least this much in the optimiser's margins (the limit's unit)."""


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
        """The bounds as text, e.g. '>= 775 and <= 840'."""
        lo = "> " if self.strict else ">= "
        hi = "< " if self.strict else "<= "
        parts = []
        if self.min is not None:
            parts.append(f"{lo}{self.min:g}")
        if self.max is not None:
            parts.append(f"{hi}{self.max:g}")
        return " and ".join(parts)

    def describe(self) -> str:
        """The limit in one line, e.g. 'kerosene: jet fuel density at 15 °C >= 775 and <= 840', or 'diesel
        density at 15 °C >= 820 and <= 845' when the label already names the cut."""
        label = self.label or self.property
        if limit_title(self.cut, label) == label:
            return f"{label} {self.bounds_text()}"
        return f"{self.cut}: {label} {self.bounds_text()}"


def limit_title(cut: str, label: str) -> str:
    """A limit named once: its label alone when it already names the product ('diesel density at 15 °C'),
    else the cut and the label ('kerosene jet fuel flash point').

    Examples
    --------
    >>> limit_title("diesel", "diesel density at 15 °C"), limit_title("kerosene", "jet fuel flash point")
    ('diesel density at 15 °C', 'kerosene jet fuel flash point')
    """
    return label if cut.split()[0].lower() in label.lower().split() else f"{cut} {label}"


def is_quality(prop: str) -> bool:
    """True for a narrow-cut quality or estimated property name (:mod:`assaycut.methods.blending_indices`,
    :data:`assaycut.cutting.cut_qualities.ESTIMATED`)."""
    return prop in RULES or bool(VISCOSITY.match(prop)) or prop in ESTIMATED


def validate_property(prop: str) -> bool:
    """True if ``prop`` is a property name a limit can check (or is known to be unavailable)."""
    return (prop in SCALAR_PROPERTIES or bool(RECOVERED_AT.match(prop)) or bool(D86_POINT.match(prop))
            or prop in UNAVAILABLE or is_quality(prop))


def recovered_at(d86_c: np.ndarray, temp_c: float) -> np.ndarray:
    """D86 volume recovered at ``temp_c``, linear between the estimated D86 points, vectorised over rows.

    Below the 0 % point the answer is 0, at or above the 95 % point 95 (a lower bound); NaN for a row
    without a full D86 estimate.  The arithmetic is that of ``numpy.interp`` row by row.

    Parameters
    ----------
    d86_c : numpy.ndarray
        D86 at 0/10/30/50/70/90/95 %, shape (m, 7). [°C]
    temp_c : float
        Temperature. [°C]

    Returns
    -------
    numpy.ndarray
        Shape (m,). [vol %]

    Examples
    --------
    >>> recovered_at(np.array([[150.0, 170, 190, 210, 230, 250, 260]]), 200.0).tolist()
    [40.0]
    """
    pct = np.array(D86_STD, dtype=float)
    m = d86_c.shape[0]
    k = np.clip((d86_c <= temp_c).sum(axis=1) - 1, 0, len(D86_STD) - 2)
    rows = np.arange(m)
    t0, t1 = d86_c[rows, k], d86_c[rows, k + 1]
    with np.errstate(invalid="ignore", divide="ignore"):
        val = (pct[k + 1] - pct[k]) / (t1 - t0) * (temp_c - t0) + pct[k]
    val = np.where(temp_c == d86_c[:, -1], pct[-1], val)
    val = np.where(temp_c < d86_c[:, 0], 0.0, np.where(temp_c > d86_c[:, -1], pct[-1], val))
    return np.where(np.all(np.isfinite(d86_c), axis=1), val, np.nan)


def limit_values(cols: dict, j: int, prop: str) -> np.ndarray:
    """Values of ``prop`` for cut ``j`` over every row of cut-column arrays.

    Parameters
    ----------
    cols : dict of str to numpy.ndarray
        Cut columns as :func:`assaycut.cutting.ideal.cut_columns` returns them, shape (m, cuts) ('d86':
        (m, cuts, 7)).
    j : int
        Index of the cut.
    prop : str
        Property name (see the module docstring).

    Returns
    -------
    numpy.ndarray
        Shape (m,), NaN where the property is not available.
    """
    m = cols["vol_pct"].shape[0]
    if prop in UNAVAILABLE:
        return np.full(m, np.nan)
    d = D86_POINT.match(prop)
    if d:
        return cols["d86"][:, j, D86_STD.index(int(d.group(1)))]
    r = RECOVERED_AT.match(prop)
    if r:
        return recovered_at(cols["d86"][:, j, :], float(r.group(1)))
    if prop not in cols:  # a quality this crude has no narrow-cut data or estimate for
        return np.full(m, np.nan)
    return np.asarray(cols[prop][:, j], dtype=float)


def _why_missing(prop: str) -> str:
    if prop in UNAVAILABLE:
        return UNAVAILABLE[prop]
    if D86_POINT.match(prop) or RECOVERED_AT.match(prop):
        return "no D86 estimate for this cut"
    if is_quality(prop):
        return f"no narrow-cut {prop} covers this cut, and no estimate applies inside its correlation's range"
    return f"{prop} is not estimated for this cut"


def table_columns(cuts: CutTable) -> dict[str, np.ndarray]:
    """Cut-column arrays of one row from a cut table (the inverse of
    :func:`assaycut.cutting.ideal.columns_table` for the properties a limit can name)."""
    names = list(SCALAR_PROPERTIES) + [c for c in cuts.keys if c not in SCALAR_PROPERTIES and is_quality(c)]
    cols = {c: np.asarray(cuts[c], dtype=float)[None, :] for c in names}
    nan7 = [math.nan] * len(D86_STD)
    cols["d86"] = np.array([[[float(d[str(p)]) for p in D86_STD] if d else nan7 for d in cuts["d86_c"]]])
    if "out_of_scope" in cuts:
        flagged = {c for f in cuts["out_of_scope"] for c in f}
        cols["out_of_scope"] = {c: np.array([[c in f for f in cuts["out_of_scope"]]]) for c in flagged}
    return cols


OUT_OF_SCOPE_NOTE = ("evaluated on a value whose correlation is used outside its published scope (flagged "
                     "out_of_scope): indicative only, confirm by a measurement")
"""Note of a limit checked on an out-of-scope estimate."""


LOWER_BOUND_NOTE = "at least 95 %: the D86 estimate ends at 95 %, so the value is a lower bound"
"""Note of a D86 recovery read at or beyond the estimate's 95 % point."""


def is_lower_bound(prop: str, value: float) -> bool:
    """True for a D86 recovery at the 95 % end of the estimate (a lower bound, printed '≥ 95')."""
    return bool(RECOVERED_AT.match(prop)) and value >= D86_STD[-1]


def meets(lim: Limit, value: float) -> bool:
    """True when ``value`` lies inside the limit's bounds."""
    ok = True
    if lim.min is not None:
        ok &= value > lim.min if lim.strict else value >= lim.min
    if lim.max is not None:
        ok &= value < lim.max if lim.strict else value <= lim.max
    return ok


SWING_HALVES = (" (light half)", " (heavy half)")
"""Suffixes of the two halves a swing cut is reported as (see :meth:`~.cutset.CutSet.reported`)."""


def applicable(limits: list[Limit], names: list[str]) -> list[Limit]:
    """The limits whose cut is among ``names`` (a limit on a cut the cut set lacks does not apply; see
    :func:`unmatched_cuts`).  A limit on a swing cut applies to each of its halves: either half may go to the
    product, so each must meet the product's limits (common practice, no source)."""
    out = []
    for lim in limits:
        if lim.cut in names:
            out.append(lim)
        elif all(lim.cut + h in names for h in SWING_HALVES):
            out += [replace(lim, cut=lim.cut + h) for h in SWING_HALVES]
    return out


def unmatched_cuts(limits: list[Limit], names: list[str]) -> list[str]:
    """Cut names that limits refer to but the cut set does not have (e.g. 'kerosene' after a renaming to
    'kero'), in the limits' order: those limits are not checked, and reports say so.  A swing cut's name is
    matched by its halves (:func:`applicable`)."""
    return list(dict.fromkeys(lim.cut for lim in limits if lim.cut not in names
                              and not all(lim.cut + h in names for h in SWING_HALVES)))


def nearest_cut(name: str, names: list[str]) -> str | None:
    """The cut name closest to ``name`` (difflib's ratio, at least 0.6), for a message; None if none is close.

    Examples
    --------
    >>> nearest_cut("kerosine", ["naphtha", "kerosene", "diesel"])
    'kerosene'
    """
    import difflib

    close = difflib.get_close_matches(name, names, n=1, cutoff=0.6)
    return close[0] if close else None


def check_limits(cuts: CutTable, limits: list[Limit]) -> CutTable:
    """Check every limit against the cut table.

    Parameters
    ----------
    cuts : CutTable
        Cut table from :func:`assaycut.cutting.ideal.cut_table`.
    limits : list of Limit

    Returns
    -------
    CutTable
        One row per limit whose cut exists: cut, property, label, limit, value, status ('pass', 'fail' or
        'n/a'), note, source (:data:`LIMIT_COLUMNS`).
    """
    names = cuts["name"]
    return limit_table(limit_rows(names, table_columns(cuts) if limits else {}, limits))


def limit_table(rows: list[dict]) -> CutTable:
    """The limit-status table of :func:`limit_rows`' rows (``value`` a float column when there are rows)."""
    return CutTable.from_rows(rows, LIMIT_COLUMNS)


LIMIT_COLUMNS = ["cut", "property", "label", "limit", "value", "status", "note", "source"]
"""Columns of the limit-status table."""


def limit_rows(names: list[str], cols: dict, limits: list[Limit]) -> list[dict]:
    """The rows of :func:`check_limits` as dicts (keys :data:`LIMIT_COLUMNS`), from one row of cut columns
    (:func:`table_columns`, or the library engine's columns)."""
    out = []
    for lim in applicable(limits, names):
        j = names.index(lim.cut)
        value = float(limit_values(cols, j, lim.property)[0])
        missing = math.isnan(value)
        status = "n/a" if missing else ("pass" if meets(lim, value) else "fail")
        note = _why_missing(lim.property) if missing else ""
        scope = cols.get("out_of_scope", {}).get(lim.property)
        if not missing and scope is not None and bool(np.asarray(scope)[0, j]):
            note = OUT_OF_SCOPE_NOTE
        if is_lower_bound(lim.property, value):
            note = LOWER_BOUND_NOTE
        out.append({"cut": lim.cut, "property": lim.property, "label": lim.label, "limit": lim.bounds_text(),
                    "value": value, "status": status, "note": note, "source": lim.source})
    return out


def limit_margins(cols: dict, names: list[str], limits: list[Limit]):
    """Margins of every limit over candidate cut-point rows: >= 0 means met.

    Parameters
    ----------
    cols : dict of str to numpy.ndarray
        Cut columns of the candidates (see :func:`limit_values`).
    names : list of str
        Cut names, in column order.
    limits : list of Limit

    Returns
    -------
    (numpy.ndarray, list of Limit)
        Margins (candidates x limits) in each limit's unit, NaN where not evaluable; the limits whose cut
        exists, in column order.
    """
    out, used = [], applicable(limits, names)
    for lim in used:
        vals = limit_values(cols, names.index(lim.cut), lim.property)
        eps = TOL if lim.strict else 0.0
        m = np.full(vals.shape, np.inf)
        if lim.min is not None:
            m = np.minimum(m, vals - lim.min - eps)
        if lim.max is not None:
            m = np.minimum(m, lim.max - vals - eps)
        out.append(np.where(np.isfinite(vals), m, np.nan))
    if not out:
        return np.zeros((cols["vol_pct"].shape[0], 0)), used
    return np.stack(out, axis=1), used
