"""Reading cells and tables of assay files: numbers and text from cells, whole-crude gravity, curve tables,
and errors that name the file, sheet, row and column.  Shared by the workbook and CSV readers."""

from __future__ import annotations

import datetime as _dt
import math
import re

import numpy as np

from ..errors import InputError
from ..model.assay import CurveData
from ..units import api_to_sg, density15_to_sg, sg_to_api, to_celsius
from .layout import MAX_BYTES, PCT_COLUMNS, TEMP_COLUMNS


class SourceLocation:
    """Builds InputErrors that name the file and sheet."""

    def __init__(self, file: str, sheet: str | None = None):
        self.file, self.sheet = file, sheet

    def err(self, msg: str, row: int | None = None, column: str | None = None) -> InputError:
        return InputError(msg, file=self.file, sheet=self.sheet, row=row, column=column)


class FormulaText(str):
    """A formula cell's text (``=...``) that knows what kind of formula it was (``kind``: "formula", "array
    formula", "data-table formula"), so that a message says what the cell holds."""

    kind = "formula"


def plain_value(v):
    """A cell value as the reader handles it: numbers, texts, dates and None as they are; an openpyxl array or
    data-table formula object as its formula text (:class:`FormulaText`); anything else as a text naming its
    type, never a Python repr with a memory address."""
    if v is None or isinstance(v, (str, int, float, _dt.datetime, _dt.date, _dt.time, _dt.timedelta)):
        return v
    kind = type(v).__name__
    if kind == "ArrayFormula":
        t = FormulaText(str(getattr(v, "text", None) or "="))
        t.kind = "array formula"
        return t
    if kind == "DataTableFormula":
        t = FormulaText("=TABLE()")
        t.kind = "data-table formula"
        return t
    return f"(a cell of type {kind})"


def describe(v) -> str:
    """A cell value as a message shows it: text quoted and shortened, dates named."""
    if isinstance(v, str):
        s = v if len(v) <= 40 else v[:37] + "..."
        return f"text {s!r}"
    if isinstance(v, (_dt.datetime, _dt.date, _dt.time)):
        return f"a date/time ({v})"
    return repr(v)


def to_number(v, loc: SourceLocation, row: int, column: str, *, allow_empty: bool = False):
    """A finite float from a cell value, or an InputError naming the cell."""
    if v is None or (isinstance(v, str) and not v.strip()):
        if allow_empty:
            return math.nan
        raise loc.err("empty cell; expected a number", row, column)
    if isinstance(v, bool):
        raise loc.err(f"found {v!r}; expected a number", row, column)
    if isinstance(v, int) and abs(v) > 10 ** 300:  # beyond any float's reach: float() would overflow
        raise loc.err(f"found a number of {len(str(abs(v)))} digits; expected a number", row, column)
    if isinstance(v, (int, float, np.integer, np.floating)):
        x = float(v)
    elif isinstance(v, str) and v.strip().startswith("="):
        raise loc.err(f"found the {getattr(v, 'kind', 'formula')} {str(v).strip()[:40]!r}; expected a number "
                      f"(formulas are not evaluated: paste values)", row, column)
    elif isinstance(v, str):
        s = v.strip().replace("\u2212", "-")
        if re.fullmatch(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?", s):
            x = float(s)
        else:
            raise loc.err(f"found {describe(v)}; expected a number", row, column)
    else:
        raise loc.err(f"found {describe(v)}; expected a number", row, column)
    if not math.isfinite(x):
        raise loc.err(f"found {x}; expected a finite number", row, column)
    return float(round(x, 9))  # removes float noise such as 239.85000000000002


def cell_text(v) -> str:
    """A cell value as stripped text; an empty cell is ''."""
    return "" if v is None else str(v).strip()


def read_bytes(path: str, max_bytes: int = MAX_BYTES, kind: str = "") -> bytes:
    """The whole file, refused clearly if missing, a folder, empty or larger than ``max_bytes`` (a ``kind`` of
    file, e.g. "cut, limit and price files", is named in that message)."""
    import os

    if not os.path.exists(path):
        raise InputError("file not found", file=path)
    if os.path.isdir(path):
        raise InputError("is a folder; expected an assay file (.xlsx or .csv)", file=path)
    size = os.path.getsize(path)
    if size == 0:
        raise InputError("the file is empty", file=path)
    if size > max_bytes:
        what = kind or "files"
        raise InputError(f"the file is {size / 1e6:.1f} MB; assaycut reads {what} up to {max_bytes / 1e6:g} MB",
                         file=path)
    with open(path, "rb") as fh:
        return fh.read()


def gravity_from_inputs(grav: dict[str, float], loc: SourceLocation, rows: dict[str, int] | None = None) -> float:
    """Whole-crude SG from any of api_gravity, sg_60f, density_15c_kg_m3, with range checks."""
    rows = rows or {}
    if not grav:
        raise loc.err("missing gravity: give api_gravity [°API], sg_60f or density_15c_kg_m3")
    if "api_gravity" in grav:
        api = grav["api_gravity"]
        if not 0.0 <= api <= 100.0:
            raise loc.err(f"api_gravity {api:g} °API is outside 0-100 °API", rows.get("api_gravity"),
                          "api_gravity")
        sg = api_to_sg(api)
    elif "sg_60f" in grav:
        sg = grav["sg_60f"]
    else:
        sg = density15_to_sg(grav["density_15c_kg_m3"])
    api = sg_to_api(sg) if sg > 0 else -1.0
    if not 0.0 <= api <= 100.0:
        key = "sg_60f" if "sg_60f" in grav else "density_15c_kg_m3"
        raise loc.err(f"{key} {grav[key]:g} gives {api:.1f} °API, outside 0-100 °API", rows.get(key), key)
    return float(sg)


def parse_curve_rows(rows, loc: SourceLocation, *, header_index: int, method: str, pressure: float | None,
                     where: str) -> CurveData:
    """Curve points from table rows under a header naming the percent and temperature columns."""
    hdr = [cell_text(v).lower() for v in rows[header_index]]
    pcol = [c for c in hdr if c in PCT_COLUMNS]
    tcol = [c for c in hdr if c in TEMP_COLUMNS]
    if len(pcol) != 1 or len(tcol) != 1:
        raise loc.err(f"the header must name one percent column (vol_pct or wt_pct) and one temperature column "
                      f"(temp_c, temp_f or temp_k); found {', '.join(h for h in hdr if h) or 'nothing'}",
                      header_index + 1)
    unknown = [c for c in hdr if c and c not in (pcol[0], tcol[0])]
    if unknown:
        raise loc.err(f"unknown column {unknown[0]!r}; a curve has only {pcol[0]} and {tcol[0]}",
                      header_index + 1, unknown[0])
    pi, ti = hdr.index(pcol[0]), hdr.index(tcol[0])
    unit = TEMP_COLUMNS[tcol[0]]
    pct, temp, rnum = [], [], []
    for r, row in enumerate(rows[header_index + 1:], start=header_index + 2):
        pv = row[pi] if pi < len(row) else None
        tv = row[ti] if ti < len(row) else None
        if cell_text(pv) == "" and cell_text(tv) == "":
            continue
        p = to_number(pv, loc, r, pcol[0])
        t = to_number(tv, loc, r, tcol[0])
        tc = float(to_celsius(t, unit))
        if tc < -273.15:
            raise loc.err(f"temperature {t:g} °{unit} is below absolute zero", r, tcol[0])
        if tc > 1500.0:
            raise loc.err(f"temperature {t:g} °{unit} is above 1500 °C; expected a distillation temperature",
                          r, tcol[0])
        pct.append(p)
        temp.append(tc)
        rnum.append(r)
    if not pct:
        raise loc.err("no curve points under the header", header_index + 1)
    if len(pct) == 1:
        raise loc.err("a single point is not a curve; give at least 2 points", rnum[0])
    p = np.array(pct)
    t = np.array(temp)
    warnings = []
    steps = []
    if p.max() <= 1.0 and p.min() >= 0.0:
        p = p * 100.0
        warnings.append(f"{where}: percents are given as fractions (0-1); read as percent")
    for k in range(p.size):
        if not 0.0 <= p[k] <= 100.0:
            raise loc.err(f"{pcol[0]} {p[k]:g} is outside 0-100 %", rnum[k], pcol[0])
    for k in range(1, p.size):
        if p[k] < p[k - 1]:
            raise loc.err(f"{pcol[0]} falls from {p[k - 1]:g} to {p[k]:g}; cumulative percents must not fall",
                          rnum[k], pcol[0])
        if t[k] < t[k - 1]:
            raise loc.err(f"temperature falls from {t[k - 1]:.2f} °C to {t[k]:.2f} °C as percent rises "
                          f"({p[k - 1]:g} -> {p[k]:g} %); temperatures must rise", rnum[k], tcol[0])
        if p[k] == p[k - 1] and t[k] == t[k - 1]:
            raise loc.err(f"the point ({p[k]:g} %, {t[k]:.2f} °C) is repeated", rnum[k])
        if p[k] == p[k - 1]:
            steps.append(f"rows {rnum[k - 1]}-{rnum[k]}: {p[k]:g} % at {t[k - 1]:.2f} and {t[k]:.2f} °C")
    if steps:
        warnings.append(f"{where}: the same cumulative percent at two temperatures, kept as a flat step (nothing "
                        f"distils between them): {'; '.join(steps[:3])}"
                        + (f" and {len(steps) - 3} more" if len(steps) > 3 else ""))
    return CurveData(method, PCT_COLUMNS[pcol[0]], p, t, pressure, where, warnings)
