"""The assay workbook reader (the layout is in :mod:`assaycut.io.layout`)."""

from __future__ import annotations

import io
import math
import re
import zipfile

import numpy as np

from ..errors import InputError
from ..methods.blending_indices import RULES
from ..model.assay import Assay, CurveData, LightEnds, NarrowCuts
from ..model.lightends import find_component, known_labels
from ..studies.compatibility import IN_KEY, NUMBER_RANGE, SBN_KEY
from ..text import escape_hidden, has_hidden_characters
from ..units import api_to_sg, density15_to_sg, to_celsius
from .cells import (
    SourceLocation,
    cell_text,
    describe,
    gravity_from_inputs,
    parse_curve_rows,
    plain_value,
    read_bytes,
    to_number,
)
from .layout import (
    MAX_CELLS,
    MAX_COLUMNS,
    MAX_MEMBER_BYTES,
    MAX_NAME_CHARS,
    MAX_ROWS,
    MAX_SHARED_STRINGS,
    MAX_UNPACKED_BYTES,
    MAX_XML_SPECIALS,
    MAX_XML_TOKEN,
    METHODS,
    PCT_COLUMNS,
    SHEET_CRUDE,
    SHEET_CURVE,
    SHEET_CUTS,
    SHEET_LIGHT,
    SHEET_VACUUM,
    TEMP_COLUMNS,
    UNIT_SUFFIX,
)


def _check_archive(data: bytes, path: str) -> None:
    """The checks on the zip archive before openpyxl reads any of its XML: a zip with xl/workbook.xml, no two
    parts of one name, no part above :data:`MAX_MEMBER_BYTES` unpacked and all of them within
    :data:`MAX_UNPACKED_BYTES`, and each XML part within the token and shared-string bounds (:func:`_check_xml`)."""
    from openpyxl.xml import DEFUSEDXML

    if not DEFUSEDXML:
        raise InputError("defusedxml is not installed; assaycut refuses to read workbooks without it "
                         "(pip install defusedxml)", file=path)
    if not zipfile.is_zipfile(io.BytesIO(data)):
        raise InputError("not an .xlsx workbook (the file is not a zip archive); save the assay as Excel .xlsx",
                         file=path)
    try:
        z = zipfile.ZipFile(io.BytesIO(data))
    except zipfile.BadZipFile as exc:
        raise InputError(f"a damaged zip archive ({exc}); expected an .xlsx workbook", file=path) from None
    try:
        infos = z.infolist()
        names: set[str] = set()
        for info in infos:
            if info.filename in names:
                raise InputError(f"the zip archive holds two parts named {info.filename!r} (only one would be "
                                 f"read); the file is damaged or was altered: save it again from a spreadsheet "
                                 f"program", file=path)
            names.add(info.filename)
        if "xl/workbook.xml" not in names:
            raise InputError("a zip archive but not an .xlsx workbook (no xl/workbook.xml)", file=path)
        for info in infos:
            if info.file_size > MAX_MEMBER_BYTES:
                raise InputError(f"part {info.filename!r} of the workbook unpacks to {info.file_size / 1e6:.0f} "
                                 f"MB; assaycut reads parts up to {MAX_MEMBER_BYTES / 1e6:.0f} MB (real assay "
                                 f"workbooks hold well under 1 MB)", file=path)
        total = sum(i.file_size for i in infos)
        if total > MAX_UNPACKED_BYTES:
            raise InputError(f"the workbook unpacks to {total / 1e6:.0f} MB; assaycut reads workbooks up to "
                             f"{MAX_UNPACKED_BYTES / 1e6:.0f} MB unpacked", file=path)
        strings = 0
        for info in infos:
            if info.filename.lower().endswith((".xml", ".rels", ".vml")):
                try:
                    part = z.read(info)
                except (zipfile.BadZipFile, OSError, EOFError, ValueError) as exc:
                    raise InputError(f"part {info.filename!r} cannot be unpacked ({exc}); the file is damaged",
                                     file=path) from None
                strings = _check_xml(part, info.filename, path, strings)
    finally:
        z.close()


_LONG_RUN = re.compile(rb"(?:\A|<)[^<]{%d}" % MAX_XML_TOKEN)
"""A run of MAX_XML_TOKEN bytes without '<' (a tag, its attribute values or a text: none may hold '<' in XML
1.0); tried only at '<', where each try ends at the next '<', so the search is linear."""
_SPECIAL_START = re.compile(rb"<!--|<!\[CDATA\[|<\?")
_SPECIAL_ENDS = {b"<!--": b"-->", b"<![CDATA[": b"]]>", b"<?": b"?>"}
_SHARED_STRING = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?si[\s/>]")


def _check_xml(part: bytes, name: str, path: str, strings: int) -> int:
    """Refuse, before parsing, an XML part with a token longer than :data:`MAX_XML_TOKEN` (tags and texts by
    the longest run without '<'; comments, processing instructions and CDATA, at most
    :data:`MAX_XML_SPECIALS` of them, one by one), or a workbook with more than :data:`MAX_SHARED_STRINGS`
    shared strings (``strings``: counted in the parts before; the new count is returned)."""
    too_long = f"part {name!r} holds an XML token of more than {MAX_XML_TOKEN / 1e6:g} MB; real assay " \
               f"workbooks hold none (the file is damaged or made to stall a reader)"
    if _LONG_RUN.search(part):
        raise InputError(too_long, file=path)
    if part.count(b"<!") + part.count(b"<?") > MAX_XML_SPECIALS:
        raise InputError(f"part {name!r} holds more than {MAX_XML_SPECIALS} XML comments or processing "
                         f"instructions; real assay workbooks hold one or two", file=path)
    pos = 0
    while (m := _SPECIAL_START.search(part, pos)) is not None:
        end = part.find(_SPECIAL_ENDS[m.group(0)], m.end())
        if end < 0:
            break  # unterminated: the XML reader refuses the part there
        if end - m.start() > MAX_XML_TOKEN:
            raise InputError(too_long, file=path)
        pos = end
    for _ in _SHARED_STRING.finditer(part):
        strings += 1
        if strings > MAX_SHARED_STRINGS:
            raise InputError(f"more than {MAX_SHARED_STRINGS:,} shared strings; real assay workbooks hold a few "
                             f"hundred", file=path)
    return strings


def _open_workbook(data: bytes, path: str):
    """The workbook by openpyxl's public reader (``openpyxl.load_workbook``, read-only, formulas kept as
    formulas, no external links), after :func:`_check_archive`; its sheets are parsed row by row by
    :func:`_rows`."""
    from openpyxl.reader.excel import ExcelReader

    try:
        reader = ExcelReader(io.BytesIO(data), read_only=True, data_only=False, keep_links=False)
        reader.read()  # what openpyxl.load_workbook does, keeping the reader to check the sheet list
        wb = reader.wb
        missing = [(s.name, r.target) for s, r in reader.parser.find_sheets() if r.target not in reader.valid_files]
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
    if missing:
        wb.close()
        raise InputError(f"sheet {missing[0][0]!r} is listed in the workbook but its part {missing[0][1]!r} is "
                         f"missing; the file is damaged: save it again from a spreadsheet program", file=path)
    wb.assaycut_budget = _Budget()
    return wb


OPENPYXL_PARSER_NAMES = ("openpyxl.worksheet._reader.WorkSheetParser", "ReadOnlyWorksheet._get_source",
                         "ExcelReader.parser.find_sheets", "ExcelReader.valid_files",
                         "ReadOnlyWorksheet._shared_strings", "Workbook._date_formats",
                         "Workbook._timedelta_formats")
"""The private openpyxl names :func:`_rows` needs (openpyxl is pinned below 3.2 for them; a test fails if one
moves).  The public row iterator cannot serve: it drops a repeated row silently and pads every row to its
last cell, so neither the row-order check nor the column bound could be kept through it."""


class _Budget:
    """Cells read so far from one workbook, against :data:`~assaycut.io.layout.MAX_CELLS`."""

    def __init__(self):
        self.cells = 0


def _rows(ws, loc: SourceLocation, budget: _Budget | None = None):
    """Rows of a sheet as lists of values, 1-based row numbers, at most MAX_ROWS.

    The sheet's XML is parsed row by row without trusting its declared ``<dimension>`` (a forged one would
    pad every row to 16,384 columns, an understated one would drop rows): every row present is read, rows
    must come in increasing order without repeats, at most :data:`MAX_COLUMNS` columns, and the workbook's
    cells count against :data:`MAX_CELLS`.  Damaged XML is one error naming the sheet and row.  The rows
    come from openpyxl's sheet parser (:data:`OPENPYXL_PARSER_NAMES`)."""
    budget = budget or getattr(ws.parent, "assaycut_budget", None) or _Budget()
    from openpyxl.worksheet._reader import WorkSheetParser

    wb = ws.parent
    last = [0]
    try:
        with ws._get_source() as src:
            parser = WorkSheetParser(src, ws._shared_strings, data_only=wb.data_only, epoch=wb.epoch,
                                     date_formats=wb._date_formats, timedelta_formats=wb._timedelta_formats)
            return _gather(parser.parse(), loc, budget, last)
    except InputError:
        raise
    except MemoryError:
        raise
    except Exception as exc:  # openpyxl's parser raises many types on damaged XML
        raise loc.err(f"damaged sheet XML after row {last[0]} ({type(exc).__name__}: {str(exc)[:120]}); save the "
                      f"workbook again from a spreadsheet program", last[0] + 1 if last[0] else None) from None


def _gather(parsed, loc: SourceLocation, budget: _Budget, last: list[int]) -> list[list]:
    """The checks and the row lists of :func:`_rows` over a sheet parser's ``(row number, cells)``; ``last[0]``
    follows the last row read (for the caller's message on damaged XML)."""
    out: list[list] = []
    for idx, cells in parsed:
        prev = last[0]
        if idx <= prev:
            raise loc.err(f"row {idx} appears {'twice' if idx == prev else 'after row ' + str(prev)} in "
                          f"the sheet's XML; the file is damaged or was edited by hand (save it again "
                          f"from a spreadsheet program)", idx)
        if idx > MAX_ROWS:
            raise loc.err(f"more than {MAX_ROWS} rows; assaycut reads at most {MAX_ROWS} rows per sheet")
        budget.cells += len(cells)
        if budget.cells > MAX_CELLS:
            raise loc.err(f"more than {MAX_CELLS:,} cells in the workbook; real assay workbooks hold a "
                          f"few thousand")
        width = max((c["column"] for c in cells if c["value"] is not None), default=0)
        if width > MAX_COLUMNS:
            raise loc.err(f"a value in column {width}, beyond the {MAX_COLUMNS} columns assaycut reads", idx)
        row = [None] * width
        for c in cells:
            if c["column"] <= width:
                row[c["column"] - 1] = plain_value(c["value"])
        out.extend([] for _ in range(idx - prev - 1))
        out.append(row)
        last[0] = idx
    while out and all(cell_text(v) == "" for v in out[-1]):
        out.pop()
    return out


def _norm(name: str) -> str:
    """A sheet name as matched: Unicode NFKC, case-folded, surrounding whitespace removed."""
    import unicodedata

    return unicodedata.normalize("NFKC", name).casefold().strip()


def _sheet(wb, name: str, path: str, required: bool):
    names: dict[str, str] = {}
    for s in wb.sheetnames:
        k = _norm(s)
        if k in names:
            raise InputError(f"sheets {names[k]!r} and {s!r} have the same name once case and spaces are ignored; "
                             f"rename or delete one (a hidden sheet must not stand in for a visible one)", file=path)
        names[k] = s
    if name not in names:
        if required:
            raise InputError(f"no sheet named '{name}'; the workbook has "
                             f"{', '.join(repr(s) for s in wb.sheetnames)} (see `assaycut template`)", file=path)
        return None
    return wb[names[name]]


def _find_header(rows, want: set[str], loc: SourceLocation, what: str) -> int:
    for i, row in enumerate(rows[:12]):
        cells = {cell_text(v).lower() for v in row}
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
    data = read_bytes(path) if data is None else data
    _check_archive(data, path)
    return _read_book(_open_workbook(data, path), path, data)


def _read_book(wb, path: str, data: bytes) -> Assay:
    """The assay from an opened workbook, closed after."""
    import hashlib

    try:
        crude = _read_crude(_sheet(wb, SHEET_CRUDE, path, True), SourceLocation(path, SHEET_CRUDE))
        curves = [_read_curve(_sheet(wb, SHEET_CURVE, path, True), SourceLocation(path, SHEET_CURVE))]
        vac = _sheet(wb, SHEET_VACUUM, path, False)
        if vac is not None:
            c = _read_curve(vac, SourceLocation(path, SHEET_VACUUM), optional=True)
            if c is not None:
                curves.append(c)
        ncs = _sheet(wb, SHEET_CUTS, path, False)
        narrow = _read_narrow_cuts(ncs, SourceLocation(path, SHEET_CUTS)) if ncs is not None else None
        les = _sheet(wb, SHEET_LIGHT, path, False)
        light = _read_light_ends(les, SourceLocation(path, SHEET_LIGHT)) if les is not None else None
    finally:
        wb.close()
    name, origin, sg, sulfur, extras, notes, grav = crude
    return Assay(name=name, origin=origin, sg=sg, sulfur_wt_pct=sulfur, curves=curves, narrow_cuts=narrow,
                 light_ends=light, extras=extras, source=path, sha256=hashlib.sha256(data).hexdigest(),
                 notes=notes, gravity_inputs=grav)


def _read_crude(ws, loc: SourceLocation):
    rows = _rows(ws, loc)
    if not rows:
        raise loc.err("the sheet is empty; expected rows 'field | value'")
    h = _find_header(rows, {"field"}, loc, "'field' and 'value'")
    hdr = [cell_text(v).lower() for v in rows[h]]
    if "value" not in hdr:
        raise loc.err("the header row has no 'value' column", h + 1)
    fi, vi = hdr.index("field"), hdr.index("value")
    name, origin, notes, sulfur = "", "", [], None
    grav: dict[str, float] = {}
    grows: dict[str, int] = {}
    extras: dict[str, float | str] = {}
    for r, row in enumerate(rows[h + 1:], start=h + 2):
        key = cell_text(row[fi] if fi < len(row) else None).lower()
        val = row[vi] if vi < len(row) else None
        if not key:
            if cell_text(val):
                raise loc.err(f"a value ({describe(val)}) without a field name", r, "field")
            continue
        if key == "name":
            name = cell_text(val)
        elif key == "origin":
            origin = cell_text(val)
        elif key == "notes":
            if cell_text(val):
                notes.append(cell_text(val))
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
        elif key in (SBN_KEY, IN_KEY):
            x = to_number(val, loc, r, "value", allow_empty=True)
            if not math.isnan(x):
                lo, hi = NUMBER_RANGE
                if not lo <= x <= hi:
                    raise loc.err(f"{key} {x:g} is outside {lo:g}-{hi:g} (an oil-compatibility number measured by "
                                  f"titration)", r, "value")
                extras[key] = x
        elif UNIT_SUFFIX.match(key) or key in RULES:
            x = to_number(val, loc, r, "value", allow_empty=True)
            if not math.isnan(x):
                extras[key] = x
        else:
            raise loc.err(f"unknown field {key!r}; expected name, origin, api_gravity, sg_60f, "
                          f"density_15c_kg_m3, sulfur_wt_pct, notes, {SBN_KEY}, {IN_KEY}, or an extra whose name "
                          f"ends in its unit (e.g. pour_point_c)", r, "field")
    if not name:
        raise loc.err("no crude name: add a row 'name | <crude name>'")
    for key, text in (("name", name), ("origin", origin)):
        if has_hidden_characters(text):
            raise loc.err(f"the crude {key} holds a control character or an invisible one "
                          f"({escape_hidden(text)[:60]!r}: line break, escape, bidi control, zero-width space...); "
                          f"use plain text")
    if len(name) > MAX_NAME_CHARS or len(origin) > MAX_NAME_CHARS:
        raise loc.err(f"the crude {'name' if len(name) > MAX_NAME_CHARS else 'origin'} is "
                      f"{max(len(name), len(origin))} characters long; at most {MAX_NAME_CHARS} are accepted")
    sg = gravity_from_inputs(grav, loc, grows)
    return name, origin, sg, sulfur, extras, notes, grav


def _read_curve(ws, loc: SourceLocation, optional: bool = False) -> CurveData | None:
    rows = _rows(ws, loc)
    if not rows:
        if optional:
            return None
        raise loc.err("the sheet is empty; expected a method row and a curve table")
    method, pressure, kw = None, None, None
    h = None
    for i, row in enumerate(rows[:12]):
        first = cell_text(row[0] if row else None).lower()
        cells = {cell_text(v).lower() for v in row}
        if first == "method":
            method = cell_text(row[1] if len(row) > 1 else None).upper()
            if method not in METHODS:
                raise loc.err(f"method {method or '(empty)'!r} is not one of {', '.join(METHODS)}", i + 1, "B")
        elif first == "pressure_mmhg":
            x = to_number(row[1] if len(row) > 1 else None, loc, i + 1, "B", allow_empty=True)
            if not math.isnan(x):
                if x <= 0:
                    raise loc.err(f"pressure_mmhg {x:g} must be positive", i + 1, "B")
                pressure = x
        elif first == "watson_k":
            x = to_number(row[1] if len(row) > 1 else None, loc, i + 1, "B", allow_empty=True)
            if not math.isnan(x):
                if not 8.0 <= x <= 14.0:
                    raise loc.err(f"watson_k {x:g} is outside 8-14; expected the Watson K of the distilled "
                                  f"material", i + 1, "B")
                kw = x
        elif cells & (set(PCT_COLUMNS) | set(TEMP_COLUMNS)):
            h = i
            break
    if h is None:
        if optional and all(cell_text(v) == "" for row in rows[1:] for v in row[:1]):
            return None
        raise loc.err("no header row naming the columns; expected vol_pct or wt_pct and temp_c, temp_f or temp_k")
    if method is None:
        raise loc.err("no 'method' row; expected method | TBP, D86, D2887 or D1160")
    if method == "D1160" and pressure is None:
        raise loc.err("a D1160 curve needs its pressure: add a row 'pressure_mmhg | P'")
    if method != "D1160" and pressure is not None and abs(pressure - 760.0) > 1e-6:
        raise loc.err(f"a {method} curve is atmospheric; pressure_mmhg {pressure:g} applies to D1160 only")
    if method != "D1160" and kw is not None:
        raise loc.err(f"watson_k applies to D1160 data only (the Maxwell-Bonnell correction); the curve is {method}")
    if optional and len(rows) <= h + 1:
        return None
    curve = parse_curve_rows(rows, loc, header_index=h, method=method, pressure=pressure,
                             where=f"{loc.file}, sheet '{loc.sheet}'")
    curve.watson_k = kw
    return curve


def _read_narrow_cuts(ws, loc: SourceLocation) -> NarrowCuts | None:
    """The narrow-cut table: header checked (:func:`_narrow_cut_columns`), cells read, temperatures,
    percents and gravities checked (:func:`_narrow_cut_gravity`)."""
    rows = _rows(ws, loc)
    if len(rows) <= 1:
        return None
    h = _find_header(rows, {"start_c", "start_f", "end_c", "end_f"}, loc, "start_c/end_c")
    hdr = [cell_text(v).lower() for v in rows[h]]
    unit, s_col, e_col, grav_cols, extras_cols = _narrow_cut_columns(hdr, h, loc)
    cols: dict[str, list[float]] = {c: [] for c in hdr if c}
    rnums = []
    for r, row in enumerate(rows[h + 1:], start=h + 2):
        if all(cell_text(v) == "" for v in row):
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
    sg = _narrow_cut_gravity(grav_cols[0], get(grav_cols[0]), rnums, loc) if grav_cols else np.full(n, np.nan)
    return NarrowCuts(start, end, get("vol_pct"), get("wt_pct"), np.asarray(sg, float), get("sulfur_wt_pct"),
                      {c: get(c) for c in extras_cols}, rnums)


def _narrow_cut_columns(hdr: list[str], h: int, loc: SourceLocation):
    """(temperature unit, start column, end column, gravity columns, extra columns) of a narrow-cut header."""
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
            extras_cols.append(c)
    return unit, s_col, e_col, grav_cols, extras_cols


def _narrow_cut_gravity(col: str, g: np.ndarray, rnums: list[int], loc: SourceLocation) -> np.ndarray:
    """SG 60/60 °F of each narrow cut from its gravity column, each value checked to be plausible."""
    if col == "api_gravity":
        bad = np.nonzero((g < -10) | (g > 150))[0]
        sg = api_to_sg(g)
    elif col == "sg_60f":
        bad = np.nonzero((g < 0.3) | (g > 1.3))[0]
        sg = g
    else:
        bad = np.nonzero((g < 300) | (g > 1300))[0]
        sg = density15_to_sg(g)
    if bad.size:
        raise loc.err(f"{col} {g[bad[0]]:g} is not a plausible cut gravity", rnums[bad[0]], col)
    return sg


def _read_light_ends(ws, loc: SourceLocation) -> LightEnds | None:
    rows = _rows(ws, loc)
    if len(rows) <= 1:
        return None
    h = _find_header(rows, {"component"}, loc, "component")
    hdr = [cell_text(v).lower() for v in rows[h]]
    bases = [c for c in hdr if c in PCT_COLUMNS]
    if len(bases) != 1:
        raise loc.err("the light-ends header needs 'component' and one of wt_pct or vol_pct", h + 1)
    unknown = [c for c in hdr if c and c not in ("component", bases[0])]
    if unknown:
        raise loc.err(f"unknown column {unknown[0]!r}", h + 1, unknown[0])
    ci, vi = hdr.index("component"), hdr.index(bases[0])
    amounts: dict[str, float] = {}
    for r, row in enumerate(rows[h + 1:], start=h + 2):
        label = cell_text(row[ci] if ci < len(row) else None)
        if not label:
            continue
        comp = find_component(label)
        if comp is None:
            raise loc.err(f"unknown component {label!r}; expected one of {known_labels()}", r, "component")
        x = to_number(row[vi] if vi < len(row) else None, loc, r, bases[0], allow_empty=True)
        if math.isnan(x):  # a component listed with no amount (as the blank template has them): not used
            continue
        if not 0.0 <= x <= 50.0:
            raise loc.err(f"{bases[0]} {x:g} is outside 0-50 % for a light-ends component", r, bases[0])
        if comp.key in amounts:
            raise loc.err(f"component {comp.key} is listed twice", r, "component")
        amounts[comp.key] = x
    if not amounts:
        return None
    return LightEnds(amounts, PCT_COLUMNS[bases[0]])
