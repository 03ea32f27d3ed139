"""The assay workbook layout of assaycut: sheet names, column names and the instruction row of each sheet.

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

import re

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
MAX_BYTES = 20_000_000
"""Largest input file read (20 MB). [bytes]"""
MAX_MEMBER_BYTES = 50_000_000
"""Largest uncompressed size of one part of an .xlsx (a sheet, the shared strings); real assay workbooks
hold well under 1 MB. [bytes]"""
MAX_UNPACKED_BYTES = 200_000_000
"""Largest uncompressed size of a whole .xlsx. [bytes]"""
MAX_XML_TOKEN = 1_000_000
"""Longest single XML token (a tag with its attributes, a text, a comment) in any part of an .xlsx: the XML
reader's time grows with the square of a token's length (a 50 MB comment: 85 s, measured). [bytes]"""
MAX_XML_SPECIALS = 1000
"""Most comments, processing instructions and CDATA sections in one part (a real part holds one or two)."""
MAX_SHARED_STRINGS = 100_000
"""Most shared strings in a workbook, counted before parsing (real assay workbooks hold a few hundred)."""
MAX_CELLS = 1_000_000
"""Largest number of cells read from one workbook (real assay workbooks hold a few thousand)."""
MAX_COLUMNS = 256
"""Columns read per sheet: a value further right is refused."""
MAX_NAME_CHARS = 200
"""Longest crude, cut or quality name accepted. [characters]"""

INSTRUCTIONS = {
    SHEET_CRUDE: "Whole-crude data. One field per row; give at least one of api_gravity, sg_60f, "
                 "density_15c_kg_m3. Extra fields end in their unit, e.g. pour_point_c.",
    SHEET_CURVE: "Main distillation curve. method: TBP, D86, D2887 or D1160 (then pressure_mmhg, and optionally "
                 "watson_k for the Maxwell-Bonnell correction; empty = 12, no correction). Columns: "
                 "vol_pct or wt_pct (cumulative % distilled) and temp_c, temp_f or temp_k.",
    SHEET_VACUUM: "Optional vacuum curve (e.g. D1160 at reduced pressure) that extends the main curve. Same "
                  "layout as the distillation sheet. Left without points, it is not used.",
    SHEET_CUTS: "Optional narrow cuts, TBP start/end (empty start = IBP, empty end = residue), yields on "
                "crude, gravity (sg_60f, api_gravity or density_15c_kg_m3), sulfur_wt_pct, extra numeric columns.",
    SHEET_LIGHT: "Optional light-ends analysis, % of whole crude: component (C1 C2 C3 iC4 nC4 iC5 nC5) and "
                 "wt_pct or vol_pct. Components left without an amount are not used; an empty sheet is not used.",
}
