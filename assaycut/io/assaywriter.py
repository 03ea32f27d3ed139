"""Write assay workbooks in assaycut's layout: a blank template for a laboratory, or a full assay (used by
`assaycut blend` and by the demo build).  Text cells are escaped against spreadsheet formula injection."""

from __future__ import annotations

import math

from ..files import place_set, safe_text
from ..model.assay import Assay
from .layout import (
    INSTRUCTIONS,
    SHEET_CRUDE,
    SHEET_CURVE,
    SHEET_CUTS,
    SHEET_LIGHT,
    SHEET_VACUUM,
)


def _new_sheet(wb, name: str):
    from openpyxl.styles import Font

    ws = wb.create_sheet(name)
    ws.append([INSTRUCTIONS[name]])
    ws["A1"].font = Font(italic=True, color="555555")
    return ws


def _bold(ws, row: int):
    from openpyxl.styles import Font

    for cell in ws[row]:
        cell.font = Font(bold=True)


def _build(assay: Assay | None):
    import openpyxl

    wb = openpyxl.Workbook()
    wb.remove(wb.active)
    ws = _new_sheet(wb, SHEET_CRUDE)
    ws.append(["field", "value"])
    _bold(ws, 2)
    if assay is None:
        for f in ("name", "origin", "api_gravity", "sg_60f", "density_15c_kg_m3", "sulfur_wt_pct",
                  "pour_point_c", "viscosity_40c_cst", "acid_number_mg_koh_g", "notes"):
            ws.append([f, None])
    else:
        ws.append(["name", safe_text(assay.name)])
        ws.append(["origin", safe_text(assay.origin)])
        ws.append(["sg_60f", round(assay.sg, 6)])
        if assay.sulfur_wt_pct is not None:
            ws.append(["sulfur_wt_pct", round(assay.sulfur_wt_pct, 6)])
        for k, v in assay.extras.items():
            ws.append([k, v])
        for n in assay.notes:
            ws.append(["notes", safe_text(n)])
    ws.column_dimensions["A"].width = 24
    ws.column_dimensions["B"].width = 48
    curves = assay.curves if assay else [None, None]
    for sheet, curve in zip((SHEET_CURVE, SHEET_VACUUM), curves):
        ws = _new_sheet(wb, sheet)
        ws.append(["method", curve.method if curve else ("TBP" if sheet == SHEET_CURVE else "D1160")])
        ws.append(["pressure_mmhg", curve.pressure_mmhg if curve else (None if sheet == SHEET_CURVE else 10.0)])
        kw = curve.watson_k if curve else None
        ws.append(["watson_k", kw] if kw is not None or (curve is None and sheet == SHEET_VACUUM) else [])
        ws.append([f"{curve.basis if curve else 'vol'}_pct", "temp_c"])
        _bold(ws, 5)
        if curve is not None:
            for p, t in zip(curve.percent, curve.temp_c):
                ws.append([round(float(p), 6), round(float(t), 6)])
    nc = assay.narrow_cuts if assay else None
    ws = _new_sheet(wb, SHEET_CUTS)
    extra_names = list(nc.extras) if nc else []
    ws.append(["start_c", "end_c", "vol_pct", "wt_pct", "sg_60f", "sulfur_wt_pct", *extra_names])
    _bold(ws, 2)
    if nc is not None:
        num = lambda x: None if x is None or (isinstance(x, float) and math.isnan(x)) else round(float(x), 6)  # noqa: E731
        for i in range(len(nc)):
            ws.append([num(nc.start_c[i]), num(nc.end_c[i]), num(nc.vol_pct[i]), num(nc.wt_pct[i]), num(nc.sg[i]),
                       num(nc.sulfur_wt_pct[i]), *[num(nc.extras[k][i]) for k in extra_names]])
    ws = _new_sheet(wb, SHEET_LIGHT)
    le = assay.light_ends if assay else None
    ws.append(["component", f"{le.basis if le else 'wt'}_pct"])
    _bold(ws, 2)
    if le is not None:
        for k, v in le.amounts.items():
            ws.append([k, round(float(v), 6)])
    elif assay is None:
        for k in ("C1", "C2", "C3", "iC4", "nC4", "iC5", "nC5"):
            ws.append([k, None])
    return wb


def write_assay_workbook(assay: Assay | None, path: str, *, inputs: tuple[str, ...] = ()) -> None:
    """Write ``assay`` (or, if None, a blank template) as an assay workbook, atomically.

    Parameters
    ----------
    assay : Assay or None
    path : str
        Output .xlsx path.
    inputs : tuple of str
        Input files of the run; writing over one is refused.
    """
    import io
    from pathlib import Path

    buf = io.BytesIO()
    _build(assay).save(buf)
    target = Path(path)
    place_set(target.parent, {target.name: buf.getvalue()}, inputs)
