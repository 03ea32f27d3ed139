"""The plant file of a test run (TOML of our own layout), for ``assaycut calibrate``.

Layout::

    crude_bbl_per_day = 100000          # optional: needed when rates are given per day
    [[product]]
    name = "heavy naphtha"              # products in column order, lightest first
    vol_pct = 18.2                      # or wt_pct, or bbl_per_day, or t_per_day
    d86 = { 10 = 120.5, 50 = 140.1, 90 = 165.0 }   # optional; or tbp = {...}, or d2887 = {...}
    sg = 0.7512                         # optional

Every error names the file and the product (its number and name) and says what was expected.
"""

from __future__ import annotations

import math

from ..errors import InputError
from ..studies.calibration import DISTILLATIONS, RATE_KEYS, PlantProduct, PlantRun
from .tomlfiles import load_toml

MAX_PRODUCTS = 50
"""Most products in a plant file (a column has a handful of draws)."""
TEMP_RANGE_C = (-200.0, 1000.0)
"""Accepted distillation temperatures. [°C]"""
SG_RANGE = (0.3, 1.5)
"""Accepted product SGs. [-]"""
MAX_RATE = 1e8
"""Largest rate of a product or of the crude in any of its units."""


def _positive(v, what: str, path: str, largest: float = MAX_RATE) -> float:
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or not 0 < v <= largest:
        raise InputError(f"{what} must be a positive number up to {largest:g}; found {v!r}", file=path)
    return float(v)


def _points(table, where: str, path: str) -> dict[float, float]:
    if not isinstance(table, dict) or not table:
        raise InputError(f"{where} must be a table of percent = °C, e.g. {{ 10 = 120.5, 50 = 140.1 }}", file=path)
    out = {}
    for k, v in table.items():
        try:
            pct = float(k)
        except ValueError:
            raise InputError(f"{where}: {k!r} is not a percent distilled (0 to 100)", file=path) from None
        if not 0.0 <= pct <= 100.0:
            raise InputError(f"{where}: {k!r} is not a percent distilled (0 to 100)", file=path)
        lo, hi = TEMP_RANGE_C
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or not lo <= v <= hi:
            raise InputError(f"{where}: the {pct:g} % point must be a temperature from {lo:g} to {hi:g} °C; found "
                             f"{v!r}", file=path)
        if pct in out:
            raise InputError(f"{where}: the {pct:g} % point is given twice", file=path)
        out[pct] = float(v)
    pts = sorted(out.items())
    for (p1, t1), (p2, t2) in zip(pts, pts[1:]):
        if t2 < t1:
            raise InputError(f"{where}: the temperature falls from {t1:g} °C at {p1:g} % to {t2:g} °C at {p2:g} %; "
                             f"a distillation rises", file=path)
    return dict(pts)


def read_plant(path: str) -> PlantRun:
    """Read a plant file (see the module's layout) into a :class:`~assaycut.studies.calibration.PlantRun`.

    Each product has a name (unique), exactly one rate key of
    :data:`~assaycut.studies.calibration.RATE_KEYS`, at most one distillation of
    :data:`~assaycut.studies.calibration.DISTILLATIONS` ({percent: °C}, rising) and an optional SG.
    """
    doc = load_toml(path)
    unknown = set(doc) - {"crude_bbl_per_day", "product"}
    if unknown:
        raise InputError(f"unknown key {sorted(unknown)[0]!r}; a plant file has crude_bbl_per_day and [[product]] "
                         f"tables", file=path)
    crude = doc.get("crude_bbl_per_day")
    crude = None if crude is None else _positive(crude, "crude_bbl_per_day", path)
    items = doc.get("product")
    if not isinstance(items, list) or len(items) < 2:
        raise InputError("expected at least two [[product]] tables, in column order, lightest first", file=path)
    if len(items) > MAX_PRODUCTS:
        raise InputError(f"{len(items)} products; a plant file holds at most {MAX_PRODUCTS}", file=path)
    products, names = [], set()
    allowed = {"name", "sg", *RATE_KEYS, *DISTILLATIONS}
    for i, it in enumerate(items, start=1):
        if not isinstance(it, dict):
            raise InputError(f"[[product]] {i} is not a table", file=path)
        name = it.get("name")
        if not isinstance(name, str) or not name.strip():
            raise InputError(f"[[product]] {i}: 'name' must be a non-empty text", file=path)
        name = name.strip()
        where = f"[[product]] {i} ({name!r})"
        if name in names:
            raise InputError(f"{where}: the name is used twice", file=path)
        names.add(name)
        extra = set(it) - allowed
        if extra:
            raise InputError(f"{where}: unknown key {sorted(extra)[0]!r}; expected name, one of "
                             f"{', '.join(RATE_KEYS)}, optionally one of {', '.join(DISTILLATIONS)}, and sg",
                             file=path)
        rates = [k for k in RATE_KEYS if k in it]
        if len(rates) != 1:
            raise InputError(f"{where}: give exactly one rate: {', '.join(RATE_KEYS)}", file=path)
        largest = 100.0 if rates[0].endswith("_pct") else MAX_RATE
        rate = _positive(it[rates[0]], f"{where}: {rates[0]}", path, largest)
        dist = [k for k in DISTILLATIONS if k in it]
        if len(dist) > 1:
            raise InputError(f"{where}: give at most one distillation ({', '.join(DISTILLATIONS)})", file=path)
        method = dist[0] if dist else None
        points = _points(it[method], f"{where}: {method}", path) if method else {}
        sg = None
        if "sg" in it:
            lo, hi = SG_RANGE
            v = it["sg"]
            if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or not lo <= v <= hi:
                raise InputError(f"{where}: 'sg' must be a specific gravity 60/60 °F from {lo:g} to {hi:g}; "
                                 f"found {v!r}", file=path)
            sg = float(v)
        products.append(PlantProduct(name, rates[0], rate, method, points, sg))
    return PlantRun(products, crude, path)
