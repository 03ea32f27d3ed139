"""Spreadsheet reports: real numeric cells, unit-bearing headers, frozen header rows, number formats.

Every text cell goes through :func:`assaycut.io.safe.safe_text`, so that nothing from an input file can
become a formula in the report.
"""

from __future__ import annotations

import math

import numpy as np

from ..files import safe_text
from .precision import excel_format, limit_decimals
from .tables import (
    display_cuts,
    flat_cut_rows,
    label_for,
    limits_in_unit,
    quality_names,
)

HEADER_FILL = "DDE6EE"


def _cell(v):
    if v is None:
        return None
    if isinstance(v, (np.bool_, bool)):
        return "yes" if bool(v) else "no"
    if isinstance(v, (int, np.integer)):
        return int(v)
    if isinstance(v, (float, np.floating)):
        return None if not math.isfinite(float(v)) else float(v)
    return safe_text(str(v))


def write_table(ws, headers: list[str], rows: list[list], formats: list[str | None] | None = None,
                start_row: int = 1, widths: list[int] | None = None, keys: list[str | None] | None = None,
                freeze: str | None = None, autofilter: bool = True,
                row_keys: list[str | None] | None = None) -> None:
    """Write a header row and data rows: bold shaded header, panes frozen at the first data cell, an
    autofilter over the table, a width on every column, and a number format on every number.

    Parameters
    ----------
    formats : list of str or None, optional
        A fixed number format per column (None: none).
    keys : list of str or None, optional
        A column key per column (``sg``, ``sulfur_wt_pct``...): each number gets the format that shows it by
        :func:`~.precision.excel_format` (significant digits for a small sulfur), over ``formats``.
    row_keys : list of str or None, optional
        The same, one key per row, for a table whose rows are quantities (the summary's items, a comparison's
        qualities); over ``keys``.
    widths : list of int, optional
        Column widths [characters]. Default: fitted to the header and the cells (8 to 40).
    freeze : str, optional
        The first data cell ("C2" keeps the crude and cut columns in view). Default: below the header and right
        of the first column.
    autofilter : bool
        An autofilter on the header row.
    """
    from openpyxl.styles import Alignment, Font, PatternFill
    from openpyxl.utils import get_column_letter

    for j, h in enumerate(headers, start=1):
        c = ws.cell(row=start_row, column=j, value=safe_text(h))
        c.font = Font(bold=True)
        c.fill = PatternFill("solid", fgColor=HEADER_FILL)
        c.alignment = Alignment(wrap_text=True, vertical="top")
    for i, row in enumerate(rows, start=start_row + 1):
        for j, v in enumerate(row, start=1):
            c = ws.cell(row=i, column=j, value=_cell(v))
            if not isinstance(c.value, (int, float)):
                continue
            if row_keys and row_keys[i - start_row - 1]:
                c.number_format = excel_format(row_keys[i - start_row - 1], c.value)
            elif keys and keys[j - 1]:
                c.number_format = excel_format(keys[j - 1], c.value)
            elif formats and formats[j - 1]:
                c.number_format = formats[j - 1]
    ws.freeze_panes = freeze or ws.cell(row=start_row + 1, column=2 if len(headers) > 1 else 1).coordinate
    if autofilter and rows:
        ws.auto_filter.ref = f"A{start_row}:{get_column_letter(len(headers))}{start_row + len(rows)}"
    for j, h in enumerate(headers, start=1):
        if widths:
            w = widths[j - 1]
        else:
            cells = [len(_shown_text(r[j - 1])) for r in rows[:200] if j - 1 < len(r)]
            w = max(8, min(40, max([min(len(str(h)), 24) + 2] + [x + 2 for x in cells])))
        ws.column_dimensions[get_column_letter(j)].width = w


def _shown_text(v) -> str:
    """A cell's text as its column width needs it (a number to 4 significant digits: the width, not the shown
    digits, which the number format gives)."""
    if v is None:
        return ""
    if isinstance(v, (float, np.floating)):
        return f"{float(v):.4g}"
    return str(v)


def finish_workbook(wb, title: str) -> None:
    """Print set-up of every sheet: fit to the page width (landscape when wider than 8 columns), header rows
    repeated, and a page header naming the report and "estimates for screening"."""
    from openpyxl.worksheet.properties import PageSetupProperties

    for ws in wb.worksheets:
        ws.sheet_properties.pageSetUpPr = PageSetupProperties(fitToPage=True)
        ws.page_setup.fitToWidth = 1
        ws.page_setup.fitToHeight = 0
        ws.page_setup.orientation = "landscape" if ws.max_column > 8 else "portrait"
        ws.oddHeader.center.text = safe_text(f"{title}: estimates for screening")
        ws.oddFooter.right.text = "&P / &N"
        if ws.max_row > 1:
            ws.print_title_rows = "1:1"


def fast_table_workbook(sheets: list[tuple[str, list[str], list[list], list[str | None] | None, list[int]]],
                        title: str) -> bytes:
    """A workbook of plain tables written with XlsxWriter (for the large library summary: about 2.3 times
    faster than openpyxl), laid out as :func:`write_table` and :func:`finish_workbook` lay out the other
    reports: bold shaded header row, frozen below it and right of the first column, number formats per
    column, column widths, fit to the page width (landscape when wider than 8 columns), header row repeated,
    a page header naming the report and "estimates for screening".

    Every text is written as text (never a formula or a link) after :func:`~assaycut.files.safe_text`; NaN
    and None are empty cells; booleans are yes/no.

    Parameters
    ----------
    sheets : list of (name, headers, rows, keys, widths)
        One tuple per sheet; ``keys`` the column key of each column (None: text), whose number format each
        number gets by :func:`~.precision.excel_format` (significant digits for a small sulfur), or None.
    title : str
        The report's name for the page header.

    Returns
    -------
    bytes
        The .xlsx file.
    """
    import io

    import xlsxwriter

    buf = io.BytesIO()
    wb = xlsxwriter.Workbook(buf, {"in_memory": True, "strings_to_formulas": False, "strings_to_urls": False,
                                   "strings_to_numbers": False})
    head = wb.add_format({"bold": True, "bg_color": "#" + HEADER_FILL, "text_wrap": True, "valign": "top"})
    number_formats: dict[str, object] = {}
    for name, headers, rows, keys, widths in sheets:
        ws = wb.add_worksheet(name)
        for j, h in enumerate(headers):
            ws.write_string(0, j, safe_text(h), head)
        keys = keys or [None] * len(headers)
        for i, row in enumerate(rows, start=1):
            for j, v in enumerate(row):
                v = _cell(v)
                if v is None:
                    continue
                if isinstance(v, str):
                    ws.write_string(i, j, v)
                elif keys[j]:
                    f = excel_format(keys[j], v)
                    ws.write_number(i, j, v, number_formats.setdefault(f, wb.add_format({"num_format": f})))
                else:
                    ws.write_number(i, j, v)
        ws.freeze_panes(1, 1 if len(headers) > 1 else 0)
        if rows:
            ws.autofilter(0, 0, len(rows), len(headers) - 1)
        for j, w in enumerate(widths):
            ws.set_column(j, j, w)
        ws.fit_to_pages(1, 0)
        if len(headers) > 8:
            ws.set_landscape()
        else:
            ws.set_portrait()
        ws.set_header("&C" + safe_text(f"{title}: estimates for screening").replace("&", "&&"))
        ws.set_footer("&R&P / &N")
        if rows:
            ws.repeat_rows(0)
    wb.close()
    return buf.getvalue()


def curve_rows(result, step: float = 0.5) -> list[list]:
    """Interpolated curve on a vol % grid: vol %, TBP, wt %, local SG, local sulfur, extrapolated."""
    m = result.model
    v = np.arange(0.0, 100.0 + step / 2, step)
    t = m.curve.temp_at(v)
    w = m.wt_at_vol(v)
    sg = m.sg_dist(v)
    s = m.sulfur_dist(w) if m.sulfur_dist is not None else np.full_like(v, np.nan)
    ext = (v > m.curve.measured_hi + 1e-9) | (v < m.curve.measured_lo - 1e-9)
    return [list(r) for r in zip(v, t, w, sg, s, ext)]


def wt_curve_rows(result, step: float = 1.0) -> list[list]:
    """Interpolated curve on a wt % grid: wt %, TBP, vol %."""
    m = result.model
    w = np.arange(0.0, 100.0 + step / 2, step)
    v = m.vol_at_wt(w)
    return [list(r) for r in zip(w, m.curve.temp_at(v), v)]


def yield_workbook(result, unit: str = "C"):
    """The openpyxl Workbook of one yield report (sheets: summary, cuts, curve, curve wt basis, limits,
    uncertainty with bands, notes)."""
    import openpyxl

    wb = openpyxl.Workbook()
    _summary_sheet(wb.active, result)
    cuts = display_cuts(result.cuts, unit)
    names, rows = flat_cut_rows(cuts)
    ws = wb.create_sheet("cuts")
    names, rows = ["crude"] + names, [[result.assay.name] + r for r in rows]
    write_table(ws, [label_for(n) for n in names], rows, keys=names, freeze="C2")
    if quality_names(cuts):
        _qualities_sheet(wb.create_sheet("qualities"), cuts)
    ws = wb.create_sheet("curve")
    write_table(ws, ["Distilled [vol %]", "TBP [°C]", "Distilled [wt %]", "Local SG 60/60 °F [-]",
                     "Local sulfur [wt %]", "Extrapolated"], curve_rows(result),
                keys=["vol_pct", "temp_c", "wt_pct", "sg", "sulfur_wt_pct", None], widths=[16, 12, 16, 20, 18, 13],
                freeze="A2")
    ws = wb.create_sheet("curve wt basis")
    write_table(ws, ["Distilled [wt %]", "TBP [°C]", "Distilled [vol %]"], wt_curve_rows(result),
                keys=["wt_pct", "temp_c", "vol_pct"], widths=[16, 12, 16], freeze="A2")
    _limits_sheet(wb.create_sheet("limits"), result.limits, unit)
    if result.bands is not None:
        _bands_sheet(wb.create_sheet("uncertainty"), result.bands)
    _notes_sheet(wb.create_sheet("notes"), result)
    finish_workbook(wb, f"{result.assay.name} yield report")
    return wb


def _summary_sheet(ws, result) -> None:
    """Whole-crude data, reconciliations, closure and the yields."""
    from openpyxl.styles import Font

    from ..units import sg_to_density15

    a, m = result.assay, result.model
    ws.title = "summary"
    ws["A1"] = safe_text(f"Yield report: {a.name}")
    ws["A1"].font = Font(bold=True, size=14)
    ws["A2"] = "Estimates for screening and planning, not measured properties. See the notes sheet."
    ws["A2"].font = Font(italic=True)
    rate = result.cuts.attrs.get("rate_bbl_per_day")
    info = [("Crude", a.name, None), ("Origin", a.origin, None), ("API gravity [°API]", a.api, "api"),
            ("SG 60/60 °F [-]", a.sg, "sg"), ("Density 15 °C [kg/m3]", sg_to_density15(a.sg), "density_15c_kg_m3"),
            ("Sulfur [wt %]", m.given_sulfur_wt_pct, "sulfur_wt_pct"),
            ("Curve measured to [vol %]", m.curve.measured_hi, "vol_pct"),
            ("On the fitted extension [vol %]", m.curve.extrapolated_pct, "vol_pct"),
            ("Of it lumped at the end point [vol %]", m.curve.lumped_pct, "vol_pct"),
            ("Density reconciliation [%]", m.density_reconciliation_pct, "vol_pct"),
            ("Sulfur reconciliation [%]", m.sulfur_reconciliation_pct, "vol_pct"),
            ("SG given less the cuts' [-]", m.sg_closure, "sg"),
            ("Sulfur given less the cuts' [wt %]", m.sulfur_closure_wt_pct, "sulfur_wt_pct"),
            ("Closure residual, vol [%]", result.closure["vol_pct"], "vol_pct"),
            ("Closure residual, wt [%]", result.closure["wt_pct"], "wt_pct"),
            ("Cut set", result.cut_set.label, None)]
    if rate:
        info.insert(6, ("Crude run [bbl/d]", rate, "bbl_per_day"))
    for k, v in a.extras.items():
        info.append((f"Whole crude: {label_for(k)}", v, k))
    write_table(ws, ["Item", "Value"], [[k, v] for k, v, _ in info], start_row=4, widths=[34, 44], autofilter=False,
                freeze="A5", row_keys=[key for _, _, key in info])
    r0 = 6 + len(info)
    ws.cell(row=r0, column=1, value="Yields").font = Font(bold=True)
    ykeys = ["name", "vol_pct", "wt_pct"] + [k for k in ("bbl_per_day", "t_per_day") if k in result.cuts] \
        + ["api", "sulfur_wt_pct"]
    yrows = [[rec[k] for k in ykeys] for rec in result.cuts.rows()]
    write_table(ws, ["Cut"] + [label_for(k) for k in ykeys[1:]], yrows, keys=[None] + ykeys[1:], start_row=r0 + 1,
                widths=[34, 44] + [14] * (len(ykeys) - 2), autofilter=False, freeze="A5")


ESTIMATED_FILL = "FFF2CC"
"""Fill of an estimated value (a correlation, not the narrow cuts) in the qualities sheet."""
EXTRAPOLATED_FILL = "F4CCCC"
"""Fill of the name of a cut flagged extrapolated."""


def _qualities_sheet(ws, cuts) -> None:
    """Every quality of every cut; estimated values shaded, extrapolated cuts marked, with a legend."""
    from openpyxl.styles import Font, PatternFill

    names = quality_names(cuts)
    rows = [[r["name"], *[r[n] for n in names]] for r in cuts.rows()]
    write_table(ws, ["Cut", *[label_for(n) for n in names]], rows, keys=[None, *names],
                widths=[20] + [14] * len(names))
    est = list(cuts["estimated"])
    for i, r in enumerate(cuts.rows(), start=2):
        if r["extrapolated"]:
            ws.cell(row=i, column=1).fill = PatternFill("solid", fgColor=EXTRAPOLATED_FILL)
        for j, n in enumerate(names, start=2):
            if n in est[i - 2] and ws.cell(row=i, column=j).value is not None:
                ws.cell(row=i, column=j).fill = PatternFill("solid", fgColor=ESTIMATED_FILL)
                ws.cell(row=i, column=j).font = Font(italic=True)
    r0 = len(rows) + 3
    legend = [("measured", "from the narrow cuts, blended by each property's rule (plain)", None),
              ("estimated", "in whole or part: the part no narrow cut measured by a published correlation inside its "
                            "range, or the nearest measured cut (shaded, italic; see the notes sheet)",
               ESTIMATED_FILL),
              ("extrapolated", "the cut depends on the curve's fitted extension (cut name shaded)", EXTRAPOLATED_FILL),
              ("empty", "no narrow-cut data covers the cut and no correlation applies", None)]
    for k, (what, text, fill) in enumerate(legend):
        c = ws.cell(row=r0 + k, column=1, value=what)
        if fill:
            c.fill = PatternFill("solid", fgColor=fill)
        ws.cell(row=r0 + k, column=2, value=text)


def _limits_sheet(ws, lim, unit: str = "C") -> None:
    """Pass / fail / n/a per product limit, coloured, with the unit of each limit; temperature limits in
    ``unit`` ('C' or 'F'); each value with one decimal more than its limit (:func:`~.precision.limit_decimals`)."""
    from openpyxl.styles import PatternFill

    rows = limits_in_unit(lim.rows(), unit)
    write_table(ws, ["Cut", "Property", "Limit", "Required", "Value", "Unit", "Status", "Note", "Source"],
                [[r["cut"], r["property"], r["label"], r["limit"], r["value"], r["unit"], r["status"].upper(),
                  r["note"], r["source"]] for r in rows], widths=[16, 24, 40, 18, 10, 9, 8, 40, 50])
    colors = {"PASS": "C6EFCE", "FAIL": "FFC7CE", "N/A": "EDEDED"}
    for i, r in enumerate(rows, start=2):
        c = ws.cell(row=i, column=7)
        if c.value in colors:
            c.fill = PatternFill("solid", fgColor=colors[c.value])
        v = ws.cell(row=i, column=5)
        if isinstance(v.value, (int, float)):
            nd = limit_decimals(r["limit"])
            v.number_format = "0." + "0" * nd if nd else "0"


def _bands_sheet(ws, bands) -> None:
    """P10/P50/P90 of each cut's yields and qualities, and the draws and sigmas behind them."""
    from ..studies.uncertainty import BAND_QUALITIES

    heads, keys, fmts = ["Cut"], ["name"], [None]
    for q in BAND_QUALITIES:
        for pct in (10, 50, 90):
            heads.append(f"{label_for(q)} P{pct}")
            keys.append(f"{q}_p{pct}")
            fmts.append(q)
    write_table(ws, heads, [[r[k] for k in keys] for r in bands.rows()], keys=fmts)
    ws.cell(row=len(bands) + 3, column=1, value=safe_text(f"{bands.attrs['draws']} Monte Carlo draws; "
                                                          f"{bands.attrs['sigmas']}"))


def _notes_sheet(ws, result) -> None:
    """Cautions, notes, warnings, methods, the input file with its sha256, the version."""
    from .. import __version__
    from ..yields import CAUTIONS

    a = result.assay
    notes = [("Caution" if n in CAUTIONS else "Note", n) for n in result.notes]
    notes += [("Warning", w) for w in result.warnings]
    notes += [(f"Method: {k}", v) for k, v in result.methods.items()]
    notes += [("Input file", a.source), ("Input sha256", a.sha256), ("assaycut version", __version__)]
    write_table(ws, ["Topic", "Text"], [list(n) for n in notes], widths=[28, 120])
