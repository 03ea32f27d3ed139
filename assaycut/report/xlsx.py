"""Spreadsheet reports: real numeric cells, unit-bearing headers, frozen header rows, number formats.

Every text cell goes through :func:`assaycut.io.safe.safe_text`, so that nothing from an input file can
become a formula in the report.
"""

from __future__ import annotations

import math

import numpy as np

from ..files import safe_text
from .tables import (
    FORMATS,
    LABELS,
    display_cuts,
    flat_cut_rows,
    label_for,
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
                start_row: int = 1, widths: list[int] | None = None) -> None:
    """Write a header row and data rows; bold shaded header, frozen below it, number formats per column."""
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
            if formats and formats[j - 1] and isinstance(c.value, (int, float)):
                c.number_format = formats[j - 1]
    ws.freeze_panes = ws.cell(row=start_row + 1, column=2 if len(headers) > 1 else 1)
    for j, h in enumerate(headers, start=1):
        w = widths[j - 1] if widths else max(10, min(28, len(str(h)) + 2))
        ws.column_dimensions[get_column_letter(j)].width = w


def fmt_for(col: str) -> str:
    """The number format of a column: :data:`FORMATS`, else 0.0 for temperatures, else 0.00 (every numeric
    column has one)."""
    if col in FORMATS:
        return FORMATS[col]
    if col.endswith(("_c", "_c_est", "_f", "_f_est")):
        return "0.0"
    return "0.00"


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
    sheets : list of (name, headers, rows, formats, widths)
        One tuple per sheet; ``formats`` the number format of each column (None: none), or None.
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
    for name, headers, rows, formats, widths in sheets:
        ws = wb.add_worksheet(name)
        for j, h in enumerate(headers):
            ws.write_string(0, j, safe_text(h), head)
        cell_formats = [None] * len(headers)
        for j, f in enumerate(formats or []):
            if f:
                cell_formats[j] = number_formats.setdefault(f, wb.add_format({"num_format": f}))
        for i, row in enumerate(rows, start=1):
            for j, v in enumerate(row):
                v = _cell(v)
                if v is None:
                    continue
                if isinstance(v, str):
                    ws.write_string(i, j, v)
                elif cell_formats[j] is not None:
                    ws.write_number(i, j, v, cell_formats[j])
                else:
                    ws.write_number(i, j, v)
        ws.freeze_panes(1, 1 if len(headers) > 1 else 0)
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
    write_table(ws, [label_for(n) for n in names], rows, [fmt_for(n) for n in names])
    ws.column_dimensions["A"].width = 20
    if quality_names(cuts):
        _qualities_sheet(wb.create_sheet("qualities"), cuts)
    ws = wb.create_sheet("curve")
    write_table(ws, ["Distilled [vol %]", "TBP [°C]", "Distilled [wt %]", "Local SG 60/60 °F [-]",
                     "Local sulfur [wt %]", "Extrapolated"], curve_rows(result),
                ["0.0", "0.0", "0.00", "0.0000", "0.000", None], widths=[16, 12, 16, 20, 18, 13])
    ws = wb.create_sheet("curve wt basis")
    write_table(ws, ["Distilled [wt %]", "TBP [°C]", "Distilled [vol %]"], wt_curve_rows(result),
                ["0.0", "0.0", "0.00"], widths=[16, 12, 16])
    _limits_sheet(wb.create_sheet("limits"), result.limits)
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
    info = [("Crude", a.name, None), ("Origin", a.origin, None), ("API gravity [°API]", a.api, "0.0"),
            ("SG 60/60 °F [-]", a.sg, "0.0000"), ("Density 15 °C [kg/m3]", sg_to_density15(a.sg), "0.0"),
            ("Sulfur [wt %]", m.given_sulfur_wt_pct, "0.000"),
            ("Curve measured to [vol %]", m.curve.measured_hi, "0.0"),
            ("On the fitted extension [vol %]", m.curve.extrapolated_pct, "0.0"),
            ("Of it lumped at the end point [vol %]", m.curve.lumped_pct, "0.0"),
            ("Density reconciliation [%]", m.density_reconciliation_pct, "0.00"),
            ("Sulfur reconciliation [%]", m.sulfur_reconciliation_pct, "0.00"),
            ("SG given less the cuts' [-]", m.sg_closure, "0.0000"),
            ("Sulfur given less the cuts' [wt %]", m.sulfur_closure_wt_pct, "0.0000"),
            ("Closure residual, vol [%]", result.closure["vol_pct"], "0.000000"),
            ("Closure residual, wt [%]", result.closure["wt_pct"], "0.000000"),
            ("Cut set", result.cut_set.label, None)]
    for k, v in a.extras.items():
        info.append((f"Whole crude: {label_for(k)}", v, "0.00"))
    write_table(ws, ["Item", "Value"], [[k, v] for k, v, _ in info], [None, None], start_row=4, widths=[30, 44])
    for i, (_, _, f) in enumerate(info, start=5):
        if f and isinstance(ws.cell(row=i, column=2).value, (int, float)):
            ws.cell(row=i, column=2).number_format = f
    r0 = 6 + len(info)
    ws.cell(row=r0, column=1, value="Yields").font = Font(bold=True)
    yrows = [[rec["name"], rec["vol_pct"], rec["wt_pct"], rec["api"], rec["sulfur_wt_pct"]]
             for rec in result.cuts.rows()]
    write_table(ws, ["Cut", LABELS["vol_pct"], LABELS["wt_pct"], LABELS["api"], LABELS["sulfur_wt_pct"]], yrows,
                [None, "0.00", "0.00", "0.0", "0.000"], start_row=r0 + 1, widths=[30, 44, 14, 14, 14])
    ws.freeze_panes = "A4"


ESTIMATED_FILL = "FFF2CC"
"""Fill of an estimated value (a correlation, not the narrow cuts) in the qualities sheet."""
EXTRAPOLATED_FILL = "F4CCCC"
"""Fill of the name of a cut flagged extrapolated."""


def _qualities_sheet(ws, cuts) -> None:
    """Every quality of every cut; estimated values shaded, extrapolated cuts marked, with a legend."""
    from openpyxl.styles import Font, PatternFill

    names = quality_names(cuts)
    rows = [[r["name"], *[r[n] for n in names]] for r in cuts.rows()]
    write_table(ws, ["Cut", *[label_for(n) for n in names]], rows, [None, *[fmt_for(n) or "0.00" for n in names]],
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


def _limits_sheet(ws, lim) -> None:
    """Pass / fail / n/a per product limit, coloured."""
    from openpyxl.styles import PatternFill

    write_table(ws, ["Cut", "Property", "Limit", "Required", "Value", "Status", "Note", "Source"],
                [[r["cut"], r["property"], r["label"], r["limit"], r["value"], r["status"].upper(), r["note"],
                  r["source"]] for r in lim.rows()],
                [None, None, None, None, "0.0", None, None, None], widths=[16, 24, 40, 14, 10, 8, 40, 50])
    colors = {"PASS": "C6EFCE", "FAIL": "FFC7CE", "N/A": "EDEDED"}
    for i in range(2, len(lim) + 2):
        c = ws.cell(row=i, column=6)
        if c.value in colors:
            c.fill = PatternFill("solid", fgColor=colors[c.value])


def _bands_sheet(ws, bands) -> None:
    """P10/P50/P90 of each cut's yields and qualities, and the draws and sigmas behind them."""
    from ..studies.uncertainty import BAND_QUALITIES

    heads, keys, fmts = ["Cut"], ["name"], [None]
    for q in BAND_QUALITIES:
        for pct in (10, 50, 90):
            heads.append(f"{LABELS[q]} P{pct}")
            keys.append(f"{q}_p{pct}")
            fmts.append(fmt_for(q) or "0.00")
    write_table(ws, heads, [[r[k] for k in keys] for r in bands.rows()], fmts)
    ws.column_dimensions["A"].width = 20
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
