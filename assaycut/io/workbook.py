"""The assay workbook layout of assaycut, and its reader.

Layout (row 1 of every sheet is a free instruction row; names are lower case):

``crude`` sheet
    Header row ``field | value``; then one row per field: ``name``, ``origin``, and at least one of
    ``api_gravity`` [°API], ``sg_60f`` [-], ``density_15c_kg_m3`` [kg/m3]; ``sulfur_wt_pct`` [wt %];
    optional extras whose names end in a unit (``pour_point_c``, ``viscosity_40c_cst``,
    ``acid_number_mg_koh_g``...) and ``notes`` (text).
``distillation`` sheet
    Rows ``method | TBP`` (TBP, D86, D2887 or D1160) and ``pressure_mmhg | P`` (D1160 only), then a header
    row naming the basis and unit, ``vol_pct`` or ``wt_pct`` and ``temp_c``, ``temp_f`` or ``temp_k``,
    then the points.
``vacuum distillation`` sheet (optional)
    Same layout; extends the main curve past its last point (typically D1160 at reduced pressure).
``narrow cuts`` sheet (optional)
    Header ``start_c | end_c | vol_pct | wt_pct | sg_60f | sulfur_wt_pct`` (``start_f``/``end_f`` in °F;
    ``api_gravity`` or ``density_15c_kg_m3`` instead of ``sg_60f``); an empty start means IBP, an empty
    end means the residue.  Further numeric columns are carried along under their own names.
``light ends`` sheet (optional)
    Header ``component | wt_pct`` (or ``vol_pct``); components C1, C2, C3, iC4, nC4, iC5, nC5.
"""

from __future__ import annotations

import datetime as _dt
import io
import math
import re
import zipfile

import numpy as np

from ..assay import Assay, CurveData, LightEnds, NarrowCuts
from ..errors import InputError
from ..lightends import find_component, known_labels
from ..units import api_to_sg, density15_to_sg, to_celsius

SHEET_CRUDE = "crude"
SHEET_CURVE = "distillation"
SHEET_VACUUM = "vacuum distillation"
SHEET_CUTS = "narrow cuts"
SHEET_LIGHT = "light ends"

METHODS = ("TBP", "D86", "D2887", "D1160")
TEMP_COLUMNS = {"temp_c": "C", "temp_f": "F", "temp_k": "K"}
PCT_COLUMNS = {"vol_pct": "vol", "wt_pct": "wt"}
UNIT_SUFFIX = re.compile(r"^[a-z][a-z0-9_]*_(c|f|k|pct|wt_pct|cst|cp|mg_koh_g|kg_m3|ppm|ppm_wt|mg_kg|kpa|psi|"
                         r"g_ml|bar|mmhg|api|sg|degc|degf)$")
MAX_ROWS = 100_000
"""Largest number of rows read from one sheet; larger tables are refused."""
MAX_BYTES = 20 * 1024 * 1024
"""Largest input file read. [bytes]"""

INSTRUCTIONS = {
    SHEET_CRUDE: "Whole-crude data. One field per row; give at least one of api_gravity, sg_60f, "
                 "density_15c_kg_m3. Extra fields end in their unit, e.g. pour_point_c.",
    SHEET_CURVE: "Main distillation curve. method: TBP, D86, D2887 or D1160 (then pressure_mmhg). Columns: "
                 "vol_pct or wt_pct (cumulative % distilled) and temp_c, temp_f or temp_k.",
    SHEET_VACUUM: "Optional vacuum curve (e.g. D1160 at reduced pressure) that extends the main curve. Same "
                  "layout as the distillation sheet. Delete this sheet if unused.",
    SHEET_CUTS: "Optional narrow cuts, TBP start/end (empty start = IBP, empty end = residue), yields on "
                "crude, gravity (sg_60f, api_gravity or density_15c_kg_m3), sulfur_wt_pct, extra numeric columns.",
    SHEET_LIGHT: "Optional light-ends analysis, % of whole crude: component (C1 C2 C3 iC4 nC4 iC5 nC5) and "
                 "wt_pct or vol_pct.",
}


class _Loc:
    """Builds InputErrors that name the file and sheet."""

    def __init__(self, file: str, sheet: str | None = None):
        self.file, self.sheet = file, sheet

    def err(self, msg: str, row: int | None = None, column: str | None = None) -> InputError:
        return InputError(msg, file=self.file, sheet=self.sheet, row=row, column=column)


def _describe(v) -> str:
    if isinstance(v, str):
        s = v if len(v) <= 40 else v[:37] + "..."
        return f"text {s!r}"
    if isinstance(v, (_dt.datetime, _dt.date, _dt.time)):
        return f"a date/time ({v})"
    return repr(v)


def to_number(v, loc: _Loc, row: int, column: str, *, allow_empty: bool = False):
    """A finite float from a cell value, or an InputError naming the cell."""
    if v is None or (isinstance(v, str) and not v.strip()):
        if allow_empty:
            return math.nan
        raise loc.err("empty cell; expected a number", row, column)
    if isinstance(v, bool):
        raise loc.err(f"found {v!r}; expected a number", row, column)
    if isinstance(v, (int, float, np.integer, np.floating)):
        x = float(v)
    elif isinstance(v, str) and v.strip().startswith("="):
        raise loc.err(f"found the formula {v.strip()[:40]!r}; expected a number (formulas are not evaluated: "
                      f"paste values)", row, column)
    elif isinstance(v, str):
        s = v.strip().replace("\u2212", "-")
        if re.fullmatch(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?", s):
            x = float(s)
        else:
            raise loc.err(f"found {_describe(v)}; expected a number", row, column)
    else:
        raise loc.err(f"found {_describe(v)}; expected a number", row, column)
    if not math.isfinite(x):
        raise loc.err(f"found {x}; expected a finite number", row, column)
    return float(round(x, 9))  # removes float noise such as 239.85000000000002


def _text(v) -> str:
    return "" if v is None else str(v).strip()


def read_bytes(path: str) -> bytes:
    """The whole file, refused clearly if missing, a folder, empty or too large."""
    import os

    if not os.path.exists(path):
        raise InputError("file not found", file=path)
    if os.path.isdir(path):
        raise InputError("is a folder; expected an assay file (.xlsx or .csv)", file=path)
    size = os.path.getsize(path)
    if size == 0:
        raise InputError("the file is empty", file=path)
    if size > MAX_BYTES:
        raise InputError(f"the file is {size / 1e6:.0f} MB; assaycut reads files up to {MAX_BYTES / 1e6:.0f} MB",
                         file=path)
    with open(path, "rb") as fh:
        return fh.read()


def _open_workbook(data: bytes, path: str):
    import openpyxl
    from openpyxl.xml import DEFUSEDXML

    if not DEFUSEDXML:
        raise InputError("defusedxml is not installed; assaycut refuses to read workbooks without it "
                         "(pip install defusedxml)", file=path)
    if not zipfile.is_zipfile(io.BytesIO(data)):
        raise InputError("not an .xlsx workbook (the file is not a zip archive); save the assay as Excel .xlsx",
                         file=path)
    try:
        with zipfile.ZipFile(io.BytesIO(data)) as z:
            names = set(z.namelist())
            if "xl/workbook.xml" not in names:
                raise InputError("a zip archive but not an .xlsx workbook (no xl/workbook.xml)", file=path)
            total = sum(i.file_size for i in z.infolist())
            if total > 20 * MAX_BYTES:
                raise InputError(f"the workbook unpacks to {total / 1e6:.0f} MB; refused as too large", file=path)
    except zipfile.BadZipFile as exc:
        raise InputError(f"a damaged zip archive ({exc}); expected an .xlsx workbook", file=path) from None
    try:
        return openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=False, keep_links=False)
    except InputError:
        raise
    except Exception as exc:  # openpyxl and defusedxml raise many types; all mean "unreadable"
        chain, e = [], exc
        while e is not None and len(chain) < 5:
            chain.append(type(e).__name__)
            e = e.__cause__ or e.__context__
        if any("Entit" in k or "DTD" in k for k in chain):
            raise InputError("refused: the workbook's XML declares entities (a possible XML bomb); assaycut does "
                             "not expand XML entities", file=path) from None
        raise InputError(f"not a readable .xlsx workbook ({chain[-1]}); save it again from a spreadsheet program "
                         f"as .xlsx", file=path) from None


def _rows(ws, loc: _Loc):
    """Rows of a sheet as lists of values, 1-based row numbers, at most MAX_ROWS."""
    out = []
    for i, row in enumerate(ws.iter_rows(values_only=True), start=1):
        if i > MAX_ROWS:
            raise loc.err(f"more than {MAX_ROWS} rows; assaycut reads at most {MAX_ROWS} rows per sheet")
        out.append(list(row))
    while out and all(_text(v) == "" for v in out[-1]):
        out.pop()
    return out


def _sheet(wb, name: str, path: str, required: bool):
    names = {s.lower().strip(): s for s in wb.sheetnames}
    if name not in names:
        if required:
            raise InputError(f"no sheet named '{name}'; the workbook has "
                             f"{', '.join(repr(s) for s in wb.sheetnames)} (see `assaycut template`)", file=path)
        return None
    return wb[names[name]]


def _find_header(rows, want: set[str], loc: _Loc, what: str) -> int:
    for i, row in enumerate(rows[:12]):
        cells = {_text(v).lower() for v in row}
        if cells & want:
            return i
    raise loc.err(f"no header row naming {what}; expected a row with {', '.join(sorted(want))}")


def read_workbook(path: str, data: bytes | None = None) -> Assay:
    """Read an assay workbook (layout in the module docstring) into an :class:`Assay`.

    Parameters
    ----------
    path : str
        Path of the workbook, used for messages (and read if ``data`` is None).
    data : bytes, optional
        The file's bytes, already read.

    Returns
    -------
    Assay
        Units normalised (°C, SG 60/60 °F, wt %); ``source`` and ``sha256`` set.

    Raises
    ------
    InputError
        With file, sheet, row and column of the first problem found.
    """
    import hashlib

    data = read_bytes(path) if data is None else data
    wb = _open_workbook(data, path)
    try:
        crude = _read_crude(_sheet(wb, SHEET_CRUDE, path, True), _Loc(path, SHEET_CRUDE))
        curves = [_read_curve(_sheet(wb, SHEET_CURVE, path, True), _Loc(path, SHEET_CURVE))]
        vac = _sheet(wb, SHEET_VACUUM, path, False)
        if vac is not None:
            c = _read_curve(vac, _Loc(path, SHEET_VACUUM), optional=True)
            if c is not None:
                curves.append(c)
        ncs = _sheet(wb, SHEET_CUTS, path, False)
        narrow = _read_narrow_cuts(ncs, _Loc(path, SHEET_CUTS)) if ncs is not None else None
        les = _sheet(wb, SHEET_LIGHT, path, False)
        light = _read_light_ends(les, _Loc(path, SHEET_LIGHT)) if les is not None else None
    finally:
        wb.close()
    name, origin, sg, sulfur, extras, notes, grav = crude
    return Assay(name=name, origin=origin, sg=sg, sulfur_wt_pct=sulfur, curves=curves, narrow_cuts=narrow,
                 light_ends=light, extras=extras, source=path, sha256=hashlib.sha256(data).hexdigest(),
                 notes=notes, gravity_inputs=grav)


def gravity_from_inputs(grav: dict[str, float], loc: _Loc, rows: dict[str, int] | None = None) -> float:
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
    api = 141.5 / sg - 131.5 if sg > 0 else -1.0
    if not 0.0 <= api <= 100.0:
        key = "sg_60f" if "sg_60f" in grav else "density_15c_kg_m3"
        raise loc.err(f"{key} {grav[key]:g} gives {api:.1f} °API, outside 0-100 °API", rows.get(key), key)
    return float(sg)


def _read_crude(ws, loc: _Loc):
    rows = _rows(ws, loc)
    if not rows:
        raise loc.err("the sheet is empty; expected rows 'field | value'")
    h = _find_header(rows, {"field"}, loc, "'field' and 'value'")
    hdr = [_text(v).lower() for v in rows[h]]
    if "value" not in hdr:
        raise loc.err("the header row has no 'value' column", h + 1)
    fi, vi = hdr.index("field"), hdr.index("value")
    name, origin, notes, sulfur = "", "", [], None
    grav: dict[str, float] = {}
    grows: dict[str, int] = {}
    extras: dict[str, float | str] = {}
    for r, row in enumerate(rows[h + 1:], start=h + 2):
        key = _text(row[fi] if fi < len(row) else None).lower()
        val = row[vi] if vi < len(row) else None
        if not key:
            if _text(val):
                raise loc.err(f"a value ({_describe(val)}) without a field name", r, "field")
            continue
        if key == "name":
            name = _text(val)
        elif key == "origin":
            origin = _text(val)
        elif key == "notes":
            if _text(val):
                notes.append(_text(val))
        elif key in ("api_gravity", "sg_60f", "density_15c_kg_m3"):
            x = to_number(val, loc, r, "value", allow_empty=True)
            if not math.isnan(x):
                if key != "api_gravity" and x <= 0:
                    raise loc.err(f"{key} {x:g} must be positive", r, "value")
                grav[key], grows[key] = x, r
        elif key == "sulfur_wt_pct":
            x = to_number(val, loc, r, "value", allow_empty=True)
            if not math.isnan(x):
                if not 0.0 <= x <= 15.0:
                    raise loc.err(f"sulfur_wt_pct {x:g} is outside 0-15 wt %", r, "value")
                sulfur = x
        elif UNIT_SUFFIX.match(key):
            x = to_number(val, loc, r, "value", allow_empty=True)
            if not math.isnan(x):
                extras[key] = x
        else:
            raise loc.err(f"unknown field {key!r}; expected name, origin, api_gravity, sg_60f, "
                          f"density_15c_kg_m3, sulfur_wt_pct, notes, or an extra whose name ends in its unit "
                          f"(e.g. pour_point_c)", r, "field")
    if not name:
        raise loc.err("no crude name: add a row 'name | <crude name>'")
    sg = gravity_from_inputs(grav, loc, grows)
    return name, origin, sg, sulfur, extras, notes, grav


def parse_curve_rows(rows, loc: _Loc, *, header_index: int, method: str, pressure: float | None,
                     where: str) -> CurveData:
    """Curve points from table rows under a header naming the percent and temperature columns."""
    hdr = [_text(v).lower() for v in rows[header_index]]
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
        if _text(pv) == "" and _text(tv) == "":
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


def _read_curve(ws, loc: _Loc, optional: bool = False) -> CurveData | None:
    rows = _rows(ws, loc)
    if not rows:
        if optional:
            return None
        raise loc.err("the sheet is empty; expected a method row and a curve table")
    method, pressure = None, None
    h = None
    for i, row in enumerate(rows[:12]):
        first = _text(row[0] if row else None).lower()
        cells = {_text(v).lower() for v in row}
        if first == "method":
            method = _text(row[1] if len(row) > 1 else None).upper()
            if method not in METHODS:
                raise loc.err(f"method {method or '(empty)'!r} is not one of {', '.join(METHODS)}", i + 1, "B")
        elif first == "pressure_mmhg":
            x = to_number(row[1] if len(row) > 1 else None, loc, i + 1, "B", allow_empty=True)
            if not math.isnan(x):
                if x <= 0:
                    raise loc.err(f"pressure_mmhg {x:g} must be positive", i + 1, "B")
                pressure = x
        elif cells & (set(PCT_COLUMNS) | set(TEMP_COLUMNS)):
            h = i
            break
    if h is None:
        if optional and all(_text(v) == "" for row in rows[1:] for v in row[:1]):
            return None
        raise loc.err("no header row naming the columns; expected vol_pct or wt_pct and temp_c, temp_f or temp_k")
    if method is None:
        raise loc.err("no 'method' row; expected method | TBP, D86, D2887 or D1160")
    if method == "D1160" and pressure is None:
        raise loc.err("a D1160 curve needs its pressure: add a row 'pressure_mmhg | P'")
    if method != "D1160" and pressure is not None and abs(pressure - 760.0) > 1e-6:
        raise loc.err(f"a {method} curve is atmospheric; pressure_mmhg {pressure:g} applies to D1160 only")
    if optional and len(rows) <= h + 1:
        return None
    return parse_curve_rows(rows, loc, header_index=h, method=method, pressure=pressure,
                            where=f"{loc.file}, sheet '{loc.sheet}'")


def _read_narrow_cuts(ws, loc: _Loc) -> NarrowCuts | None:
    rows = _rows(ws, loc)
    if len(rows) <= 1:
        return None
    h = _find_header(rows, {"start_c", "start_f", "end_c", "end_f"}, loc, "start_c/end_c")
    hdr = [_text(v).lower() for v in rows[h]]
    has_c = [c for c in ("start_c", "end_c") if c in hdr]
    has_f = [c for c in ("start_f", "end_f") if c in hdr]
    if has_c and has_f:
        raise loc.err(f"mixed temperature units: {has_f[0]!r} beside {has_c[0]!r}; give both in °C (start_c, "
                      f"end_c) or both in °F (start_f, end_f)", h + 1, has_f[0])
    unit = "F" if has_f else "C"
    s_col, e_col = ("start_f", "end_f") if unit == "F" else ("start_c", "end_c")
    for need in (s_col, e_col):
        if need not in hdr:
            raise loc.err(f"no {need!r} column", h + 1)
    grav_cols = [c for c in ("sg_60f", "api_gravity", "density_15c_kg_m3") if c in hdr]
    if len(grav_cols) > 1:
        raise loc.err(f"give one gravity column, not {' and '.join(grav_cols)}", h + 1)
    known = {s_col, e_col, "vol_pct", "wt_pct", "sulfur_wt_pct", *grav_cols}
    extras_cols = []
    for c in hdr:
        if c and c not in known:
            if c in ("start_c", "end_c", "start_f", "end_f"):
                raise loc.err(f"mixed temperature units: {c!r} beside {s_col!r}; use one unit", h + 1, c)
            if not UNIT_SUFFIX.match(c):
                raise loc.err(f"unknown column {c!r}; extra property columns must end in their unit "
                              f"(e.g. nitrogen_ppm, viscosity_50c_cst)", h + 1, c)
            extras_cols.append(c)
    cols: dict[str, list[float]] = {c: [] for c in hdr if c}
    rnums = []
    for r, row in enumerate(rows[h + 1:], start=h + 2):
        if all(_text(v) == "" for v in row):
            continue
        for c in cols:
            idx = hdr.index(c)
            cols[c].append(to_number(row[idx] if idx < len(row) else None, loc, r, c, allow_empty=True))
        rnums.append(r)
    if not rnums:
        return None
    n = len(rnums)
    get = lambda c: np.array(cols[c]) if c in cols else np.full(n, np.nan)  # noqa: E731
    start = to_celsius(get(s_col), unit)
    end = to_celsius(get(e_col), unit)
    for k in range(n):
        if not np.isnan(start[k]) and not np.isnan(end[k]) and end[k] <= start[k]:
            raise loc.err(f"the cut ends at {end[k]:.1f} °C, not above its start {start[k]:.1f} °C", rnums[k], e_col)
        if np.isnan(start[k]) and np.isnan(end[k]):
            raise loc.err("a cut needs a start or an end temperature", rnums[k], s_col)
    for c in ("vol_pct", "wt_pct", "sulfur_wt_pct"):
        arr = get(c)
        bad = np.nonzero((arr < 0) | (arr > 100))[0]
        if bad.size:
            raise loc.err(f"{c} {arr[bad[0]]:g} is outside 0-100", rnums[bad[0]], c)
    if grav_cols:
        g = get(grav_cols[0])
        if grav_cols[0] == "api_gravity":
            bad = np.nonzero((g < -10) | (g > 150))[0]
            sg = api_to_sg(g)
        elif grav_cols[0] == "sg_60f":
            bad = np.nonzero((g < 0.3) | (g > 1.3))[0]
            sg = g
        else:
            bad = np.nonzero((g < 300) | (g > 1300))[0]
            sg = density15_to_sg(g)
        if bad.size:
            raise loc.err(f"{grav_cols[0]} {g[bad[0]]:g} is not a plausible cut gravity", rnums[bad[0]], grav_cols[0])
    else:
        sg = np.full(n, np.nan)
    return NarrowCuts(start, end, get("vol_pct"), get("wt_pct"), np.asarray(sg, float), get("sulfur_wt_pct"),
                      {c: get(c) for c in extras_cols}, rnums)


def _read_light_ends(ws, loc: _Loc) -> LightEnds | None:
    rows = _rows(ws, loc)
    if len(rows) <= 1:
        return None
    h = _find_header(rows, {"component"}, loc, "component")
    hdr = [_text(v).lower() for v in rows[h]]
    bases = [c for c in hdr if c in PCT_COLUMNS]
    if len(bases) != 1:
        raise loc.err("the light-ends header needs 'component' and one of wt_pct or vol_pct", h + 1)
    unknown = [c for c in hdr if c and c not in ("component", bases[0])]
    if unknown:
        raise loc.err(f"unknown column {unknown[0]!r}", h + 1, unknown[0])
    ci, vi = hdr.index("component"), hdr.index(bases[0])
    amounts: dict[str, float] = {}
    for r, row in enumerate(rows[h + 1:], start=h + 2):
        label = _text(row[ci] if ci < len(row) else None)
        if not label:
            continue
        comp = find_component(label)
        if comp is None:
            raise loc.err(f"unknown component {label!r}; expected one of {known_labels()}", r, "component")
        x = to_number(row[vi] if vi < len(row) else None, loc, r, bases[0])
        if not 0.0 <= x <= 50.0:
            raise loc.err(f"{bases[0]} {x:g} is outside 0-50 % for a light-ends component", r, bases[0])
        if comp.key in amounts:
            raise loc.err(f"component {comp.key} is listed twice", r, "component")
        amounts[comp.key] = x
    if not amounts:
        return None
    return LightEnds(amounts, PCT_COLUMNS[bases[0]])
