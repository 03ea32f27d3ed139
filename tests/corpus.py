"""The bad-input corpus: every case is built by code in a fresh folder (no committed binaries).

Each case returns (command-line arguments, input files, expected stderr pattern or None when the input is
rightly accepted).  ``python -m tests.corpus OUTDIR`` writes the whole corpus to a folder for inspection.
"""

from __future__ import annotations

import datetime
import zipfile
from pathlib import Path

from tests.bombs import entity_bomb
from tests.helpers import base_sheets, write_book

CASES = []


def case(name, expect):
    def deco(fn):
        CASES.append((name, fn, expect))
        return fn
    return deco


def _book(d: Path, name: str, mutate=None, hide=None, merge=None) -> Path:
    sheets = base_sheets()
    if mutate:
        mutate(sheets)
    p = write_book(d / name, sheets)
    if hide or merge:
        import openpyxl

        wb = openpyxl.load_workbook(p)
        if hide:
            wb[hide].sheet_state = "hidden"
        if merge:
            wb[merge[0]].merge_cells(merge[1])
        wb.save(p)
    return p


def set_cell(sheet, row, col, value):
    """A mutator of base sheets: sheet[row][col] = value."""
    def m(s):
        r = s[sheet][row]
        r.extend([None] * (col + 1 - len(r)))
        r[col] = value
    return m


def _wb_case(name, mutate, expect, cmd="yields"):
    @case(name, expect)
    def _(d):
        p = _book(d, f"{name}.xlsx", mutate)
        return [cmd, str(p)], [p]


for _name, _mut, _exp in [
    ("text_in_number", set_cell("distillation", 7, 1, "abc"), r"row 8, column 'temp_c': found text 'abc'"),
    ("formula_in_number", set_cell("distillation", 7, 1, "=1+1"), r"found the formula '=1\+1'"),
    ("nan_text", set_cell("distillation", 7, 1, "NaN"), r"found text 'NaN'; expected a number"),
    ("inf_text", set_cell("distillation", 7, 1, "-inf"), r"found text '-inf'"),
    ("falling_temperature", set_cell("distillation", 8, 1, 100.0), r"row 9, column 'temp_c': temperature falls"),
    ("percent_above_100", set_cell("distillation", 11, 0, 101.0), r"vol_pct 101 is outside 0-100 %"),
    ("percent_below_0", set_cell("distillation", 5, 0, -1.0), r"vol_pct -1 is outside 0-100 %"),
    ("below_absolute_zero", set_cell("distillation", 5, 1, -274.0), r"below absolute zero"),
    ("unknown_curve_column", set_cell("distillation", 4, 2, "density"), r"unknown column 'density'"),
    ("mixed_units_in_curve", set_cell("distillation", 4, 2, "temp_f"), r"one temperature column"),
    ("missing_gravity", set_cell("crude", 4, 1, None), r"missing gravity"),
    ("absurd_gravity", set_cell("crude", 4, 1, -5.0), r"api_gravity -5 °API is outside 0-100 °API"),
    ("absurd_sulfur", set_cell("crude", 5, 1, 40.0), r"sulfur_wt_pct 40 is outside 0-15 wt %"),
    ("unknown_crude_field", set_cell("crude", 5, 0, "colour"), r"unknown field 'colour'"),
    ("unknown_method", set_cell("distillation", 1, 1, "ASTM"), r"method 'ASTM' is not one of"),
    ("d1160_without_pressure", set_cell("distillation", 1, 1, "D1160"), r"a D1160 curve needs its pressure"),
    ("tbp_with_pressure", set_cell("distillation", 2, 1, 10.0), r"pressure_mmhg 10 applies to D1160 only"),
    ("unknown_component", set_cell("light ends", 2, 0, "C9"), r"unknown component 'C9'"),
    ("light_end_too_large", set_cell("light ends", 2, 1, 70.0), r"wt_pct 70 is outside 0-50 %"),
    ("duplicate_component", set_cell("light ends", 3, 0, "C3"), r"component C3 is listed twice"),
    ("narrow_cut_reversed", set_cell("narrow cuts", 3, 1, 10.0), r"the cut ends at 10.0 °C, not above its start"),
    ("narrow_cut_mixed_units", set_cell("narrow cuts", 1, 6, "end_f"), r"mixed temperature units"),
    ("narrow_cut_bad_gravity", set_cell("narrow cuts", 4, 4, 7.5), r"sg_60f 7.5 is not a plausible cut gravity"),
    ("date_in_number", set_cell("distillation", 7, 1, datetime.datetime(2025, 1, 2)), r"found a date/time"),
    ("bool_in_number", set_cell("distillation", 7, 1, True), r"found True; expected a number"),
    ("check_on_bad_curve", set_cell("distillation", 7, 1, "x"), r"found text 'x'"),
]:
    _wb_case(_name, _mut, _exp, "check" if _name.startswith("check") else "yields")


@case("single_point", r"a single point is not a curve")
def _(d):
    p = _book(d, "single.xlsx", lambda s: s.__setitem__("distillation", s["distillation"][:6]))
    return ["yields", str(p)], [p]


@case("empty_sheet", r"sheet 'crude': the sheet is empty")
def _(d):
    p = _book(d, "empty_sheet.xlsx", lambda s: s.__setitem__("crude", []))
    return ["yields", str(p)], [p]


@case("merged_cells_in_curve", r"row 9, column 'temp_c': empty cell; expected a number")
def _(d):
    p = _book(d, "merged.xlsx", merge=("distillation", "B8:B9"))
    return ["yields", str(p)], [p]


@case("hidden_sheet_is_read", None)
def _(d):
    p = _book(d, "hidden.xlsx", hide="narrow cuts")
    return ["yields", str(p), "--json"], [p]


@case("empty_file", r"the file is empty")
def _(d):
    p = d / "empty.xlsx"
    p.write_bytes(b"")
    return ["yields", str(p)], [p]


@case("random_bytes_as_xlsx", r"not an .xlsx workbook")
def _(d):
    p = d / "noise.xlsx"
    p.write_bytes(bytes(range(256)) * 40)
    return ["yields", str(p)], [p]


@case("zip_not_workbook", r"a zip archive but not an .xlsx workbook")
def _(d):
    p = d / "zip.xlsx"
    with zipfile.ZipFile(p, "w") as z:
        z.writestr("a.txt", "x")
    return ["yields", str(p)], [p]


@case("missing_file", r"file not found")
def _(d):
    return ["yields", str(d / "absent.xlsx")], []


@case("folder_as_assay", r"holds no .xlsx or .csv assays")
def _(d):
    (d / "sub").mkdir()
    return ["yields", str(d / "sub")], []


@case("entity_bomb", r"refused: the workbook's XML declares entities")
def _(d):
    good = _book(d, "good_for_bomb.xlsx")
    p = entity_bomb(good, d / "bomb.xlsx")
    return ["yields", str(p)], [p]


@case("workbook_50_mb", r"the file is 5\d\.\d MB; assaycut reads files up to 20 MB")
def _(d):
    import os

    p = _book(d, "big.xlsx")
    with zipfile.ZipFile(p, "a", zipfile.ZIP_STORED) as z:
        z.writestr("xl/media/padding.bin", os.urandom(50 * 1024 * 1024))
    return ["yields", str(p)], [p]


@case("csv_100k_rows", None)
def _(d):
    import numpy as np

    p = d / "long.csv"
    v = np.linspace(1.0, 70.0, 100_000)
    t = 20.0 + 6.5 * v + 0.02 * v ** 2
    p.write_text("vol_pct,temp_c\n" + "\n".join(f"{a:.6f},{b:.4f}" for a, b in zip(v, t)) + "\n")
    return ["yields", str(p), "--api", "33", "--json"], [p]


@case("csv_too_many_rows", r"more than 100000 rows")
def _(d):
    p = d / "huge.csv"
    p.write_text("vol_pct,temp_c\n" + "\n".join(f"{i / 2000:.5f},{20 + i / 100:.3f}" for i in range(100_002)) + "\n")
    return ["yields", str(p), "--api", "33"], [p]


@case("csv_bom_accepted", None)
def _(d):
    p = d / "bom.csv"
    p.write_bytes("\ufeffvol_pct,temp_c\n3,30\n20,150\n50,320\n70,450\n".encode())
    return ["yields", str(p), "--api", "30", "--json"], [p]


@case("csv_semicolon_decimal_comma_accepted", None)
def _(d):
    p = d / "semi.csv"
    p.write_text("vol_pct;temp_c\n3;30,5\n20;150,2\n50;320\n70;450,75\n")
    return ["yields", str(p), "--api", "30", "--json"], [p]


@case("csv_mixed_units", r"the header must name one percent column .* and one temperature column")
def _(d):
    p = d / "mixed.csv"
    p.write_text("vol_pct,temp_c,temp_f\n3,30,86\n20,150,302\n")
    return ["yields", str(p), "--api", "30"], [p]


@case("csv_binary", r"not a UTF-8 text file|contains binary data")
def _(d):
    p = d / "bin.csv"
    p.write_bytes(b"\xff\xfe\x00\x01" * 100)
    return ["yields", str(p), "--api", "30"], [p]


@case("csv_line_of_commas", r"row 2: more than 256 columns; a curve CSV has two")
def _(d):  # before: 20 million fields built (507 MB for 19.9 MB), then "the curve has 2 point(s)"
    p = d / "commas.csv"
    p.write_text("vol_pct,temp_c\n" + "," * 5_000_000 + "\n3,30\n20,150\n50,320\n")
    return ["yields", str(p), "--api", "30"], [p]


@case("csv_quoted_wide_line", r"row 2: more than 256 columns")
def _(d):  # quotes make the delimiter count inexact: the reader's row is bounded after it is built
    p = d / "quoted.csv"
    p.write_text('vol_pct,temp_c\n"a",' + ",".join(["1"] * 300) + "\n3,30\n20,150\n50,320\n")
    return ["yields", str(p), "--api", "30"], [p]


@case("csv_1200000_values", r"more than 1,000,000 values; a curve CSV holds two columns")
def _(d):  # 100,000 rows of 12 fields: under the row and column bounds, over the cell bound
    p = d / "cells.csv"
    p.write_text("vol_pct,temp_c" + ",x" * 10 + "\n" + ("1,2" + ",0" * 10 + "\n") * 99_999)
    return ["yields", str(p), "--api", "30"], [p]


@case("csv_gravity_twice", r"give one of --api, --sg or --density")
def _(d):
    p = d / "c.csv"
    p.write_text("vol_pct,temp_c\n3,30\n20,150\n50,320\n")
    return ["yields", str(p), "--api", "30", "--sg", "0.87"], [p]


def _toml_case(name, text, expect, opt="--cuts"):
    @case(name, expect)
    def _(d):
        p = d / f"{name}.toml"
        p.write_text(text)
        return ["yields", opt, str(p)], [p]


_toml_case("cuts_overlapping", '[[cut]]\nname="a"\nend_c=200\n[[cut]]\nname="b"\nend_c=180\n[[cut]]\nname="c"\n',
           r"cut points must increase")
_toml_case("cuts_none", "# nothing here\n", r"no cuts; expected \[\[cut\]\] tables")
_toml_case("cuts_absurd_temperature", '[[cut]]\nname="a"\nend_c=5000\n[[cut]]\nname="b"\n',
           r"cut 'a' ends at 5000 °C; expected a TBP between")
_toml_case("cuts_duplicate_names", '[[cut]]\nname="a"\nend_c=100\n[[cut]]\nname="a"\n', r"duplicate cut name 'a'")
_toml_case("cuts_last_has_end", '[[cut]]\nname="a"\nend_c=100\n[[cut]]\nname="b"\nend_c=200\n',
           r"the last cut 'b' has an end")
_toml_case("cuts_text_temperature", '[[cut]]\nname="a"\nend_c="hot"\n[[cut]]\nname="b"\n', r"'end_c' must be a number")
_toml_case("cuts_not_toml", "[[cut\nname=", r"not valid TOML")
_toml_case("cuts_swing_last", '[[cut]]\nname="a"\nend_c=100\n[[cut]]\nname="b"\nswing=true\n',
           r"marked swing but is the last cut")
_toml_case("limits_unknown_property", '[[limit]]\ncut="diesel"\nproperty="smell"\nmax=1\n', r"unknown property 'smell'",
           "--limits")
_toml_case("limits_min_above_max", '[[limit]]\ncut="diesel"\nproperty="sg"\nmin=0.9\nmax=0.8\n',
           r"min 0.9 is above max 0.8", "--limits")


def _price_case(name, text, expect):
    @case(name, expect)
    def _(d):
        from assaycut.io.tomlfiles import demo_assay_paths

        p = d / f"{name}.toml"
        p.write_text(text)
        return ["compare", *demo_assay_paths()[:2], "--prices", str(p), "--json"], [p]


_ALL = "".join(f'"{n}" = {{ per_bbl = 80.0 }}\n' for n in ("light ends", "light naphtha", "heavy naphtha", "kerosene",
                                                          "diesel", "vacuum gas oil"))
_price_case("prices_negative", "[products]\n" + _ALL + '"vacuum residue" = { per_t = -3 }\n', r"the price -3 must be positive")
_price_case("prices_missing_product", "[products]\n" + _ALL, r"no price for cut 'vacuum residue'")
_price_case("prices_zero", "[products]\n" + _ALL + '"vacuum residue" = { per_t = 0 }\n', r"the price 0 must be positive")
_price_case("prices_text", "[products]\n" + _ALL + '"vacuum residue" = { per_t = "cheap" }\n', r"the price must be a number")


@case("blend_not_100", r"the shares add up to 95 %, not 100 %")
def _(d):
    from assaycut.io.tomlfiles import demo_assay_paths

    a, b = demo_assay_paths()[:2]
    return ["blend", f"{a}=50", f"{b}=45", "--out", str(d / "mix.xlsx")], []


@case("blend_negative_share", r"every share must be a positive percent")
def _(d):
    from assaycut.io.tomlfiles import demo_assay_paths

    a, b = demo_assay_paths()[:2]
    return ["blend", f"{a}=120", f"{b}=-20", "--out", str(d / "mix.xlsx")], []


@case("blend_onto_input", r"refusing to write the report over the input file")
def _(d):
    a = _book(d, "parent.xlsx")
    return ["blend", f"{a}=100", "--out", str(a)], [a]


@case("blend_onto_a_hard_link_of_input", r"refusing to write the report over the input file")
def _(d):
    import os

    a = _book(d, "parent.xlsx")
    twin = d / "twin.xlsx"
    os.link(a, twin)  # the same file by another name
    return ["blend", f"{a}=100", "--out", str(twin)], [a]


@case("blend_onto_a_symbolic_link_of_input", r"refusing to write the report over the input file")
def _(d):
    a = _book(d, "parent.xlsx")
    alias = d / "alias.xlsx"
    alias.symlink_to(a)
    return ["blend", f"{a}=100", "--out", str(alias)], [a]


@case("blend_bad_syntax", r"expected ASSAY=PERCENT")
def _(d):
    return ["blend", "just_a_file.xlsx", "--out", str(d / "m.xlsx")], []


@case("convert_missing_50", r"needs the 50 % point")
def _(d):
    return ["convert", "10=100", "30=150"], []


@case("convert_percent_out_of_range", r"expected PERCENT=TEMP with a percent between 0 and 100")
def _(d):
    return ["convert", "150=100"], []


@case("convert_file_bad", r"found text 'hot'")
def _(d):
    p = d / "pts.csv"
    p.write_text("vol_pct,temp_c\n10,hot\n50,200\n")
    return ["convert", "--file", str(p)], [p]


@case("sweep_outside_neighbours", r"must stay strictly between the neighbouring cut points")
def _(d):
    return ["sweep", "--end", "diesel", "--from", "200", "--to", "400", "--out", str(d)], []


@case("shift_unknown_cut", r"no cut named 'jet'")
def _(d):
    return ["shift", "--end", "jet=250"], []


@case("usage_error_one_line", r"No such option: --colour")
def _(d):
    return ["yields", "--colour"], []


@case("template_wrong_suffix", r"give a path ending in .xlsx")
def _(d):
    return ["template", str(d / "blank.ods")], []


# -- hostile workbooks: the XML inside the zip edited by hand ------------------------------------------------
SHEET_XML = {"crude": "xl/worksheets/sheet1.xml", "distillation": "xl/worksheets/sheet2.xml"}
"""Where openpyxl puts the base sheets (in :func:`tests.helpers.base_sheets` order)."""


def rezip(path: Path, edits: dict, out: Path | None = None) -> Path:
    """Rewrite members of an .xlsx: {member: function(bytes) -> bytes} (a new member when absent)."""
    out = out or path
    with zipfile.ZipFile(path) as z:
        items = {i.filename: z.read(i.filename) for i in z.infolist()}
    for member, fn in edits.items():
        items[member] = fn(items.get(member, b""))
    tmp = out.with_suffix(".tmp")
    with zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as z:
        for k, v in items.items():
            z.writestr(k, v)
    tmp.replace(out)
    return out


def _xml_case(name, sheet, fn, expect):
    @case(name, expect)
    def _(d):
        p = rezip(_book(d, f"{name}.xlsx"), {SHEET_XML[sheet]: fn})
        return ["yields", str(p)], [p]


def _sub(old: bytes, new: bytes, count: int = 1):
    def fn(x: bytes) -> bytes:
        assert old in x, old
        return x.replace(old, new, count)
    return fn


def _forge_dimension(x: bytes) -> bytes:
    import re

    out = re.sub(rb'<dimension ref="[^"]*"\s*/>', b'<dimension ref="A1:XFD1048576"/>', x)
    assert out != x
    return out


def _duplicate_row(x: bytes) -> bytes:
    import re

    m = re.search(rb'<row r="8".*?</row>', x)
    return x[:m.end()] + m.group(0) + x[m.end():]


def _swap_rows(x: bytes) -> bytes:
    import re

    m7, m8 = re.search(rb'<row r="7".*?</row>', x), re.search(rb'<row r="8".*?</row>', x)
    return x[:m7.start()] + m8.group(0) + m7.group(0) + x[m8.end():]


def _huge_row(x: bytes) -> bytes:  # a sheet that inflates to about 60 MB from a small zip member
    filler = b'<row r="99000"><c r="A99000" t="inlineStr"><is><t>' + b"x" * 60_000_000 + b"</t></is></c></row>"
    return x.replace(b"</sheetData>", filler + b"</sheetData>")


_xml_case("forged_dimension", "distillation", _forge_dimension, None)
_xml_case("forged_dimension_far_row", "distillation",
          lambda x: _forge_dimension(x).replace(b"</sheetData>", b'<row r="99999"><c r="XFD99999"><v>1</v></c>'
                                                b"</row></sheetData>"), r"column 16384, beyond the 256 columns")
_xml_case("duplicate_row", "distillation", _duplicate_row, r"sheet 'distillation'.*row 8 appears twice")
_xml_case("rows_out_of_order", "distillation", _swap_rows, r"sheet 'distillation'.*row 7 appears after row 8")
_xml_case("sheet_inflates_too_far", "distillation", _huge_row, r"unpacks to 60 MB; assaycut reads parts up to 50 MB")
_xml_case("number_cell_holds_text", "distillation", _sub(b"<v>70</v>", b"<v>seventy</v>"),
          r"sheet 'distillation'.*damaged sheet XML")
_xml_case("bad_shared_string_index", "crude",
          _sub(b'<c r="A1" t="inlineStr"><is><t>Whole-crude data (test)</t></is></c>', b'<c r="A1" t="s"><v>99999</v></c>'),
          r"sheet 'crude'.*damaged sheet XML")
_xml_case("bad_cell_reference", "distillation", _sub(b'r="A8"', b'r="8A"'), r"sheet 'distillation'.*damaged sheet XML")
_xml_case("bad_date_serial", "distillation", _sub(b'<c r="B8" t="n"><v>150</v></c>', b'<c r="B8" t="d"><v>soon</v></c>'),
          r"sheet 'distillation'.*damaged sheet XML")
_xml_case("bad_boolean_cell", "distillation", _sub(b'<c r="B8" t="n"><v>150</v></c>', b'<c r="B8" t="b"><v>maybe</v></c>'),
          r"sheet 'distillation'")
_xml_case("bad_style_index", "distillation", _sub(b'<c r="B8" t="n"><v>150</v></c>', b'<c r="B8" s="999"><v>150</v></c>'),
          None)  # a style that does not exist changes no value: the number is read as it is
_xml_case("integer_of_400_digits", "distillation", _sub(b"<v>70</v>", b"<v>1" + b"0" * 399 + b"</v>"),
          r"sheet 'distillation', row 7, column 'temp_c': found a number of 400 digits; expected a number")
_xml_case("integer_of_5000_digits", "distillation", _sub(b"<v>70</v>", b"<v>1" + b"0" * 4999 + b"</v>"),
          r"sheet 'distillation'.*damaged sheet XML")
_xml_case("truncated_sheet", "distillation", lambda x: x[: len(x) // 2], r"sheet 'distillation'.*damaged sheet XML")


@case("many_shared_strings", r"part 'xl/sharedStrings.xml' of the workbook unpacks to")
def _(d):
    n = 3_000_000
    sst = (b'<?xml version="1.0" encoding="UTF-8"?><sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/'
           b'2006/main" count="%d" uniqueCount="%d">' % (n, n) + b"<si><t>abcdefghij</t></si>" * n + b"</sst>")
    p = rezip(_book(d, "sst.xlsx"), {"xl/sharedStrings.xml": lambda _: sst})
    return ["yields", str(p)], [p]


# Python's XML reader (expat, through defusedxml and openpyxl) takes time growing with the square of one token's
# length (a 50 MB comment: 85 s, measured); such tokens are refused before parsing (common practice, no source)
_xml_case("xml_comment_of_2_mb", "distillation", _sub(b"<sheetData>", b"<!--" + b"c" * 2_000_000 + b"--><sheetData>"),
          r"part 'xl/worksheets/sheet2.xml' holds an XML token of more than 1 MB")
_xml_case("xml_attribute_of_2_mb", "distillation", _sub(b"<sheetData>", b'<sheetData x="' + b"a" * 2_000_000 + b'">'),
          r"part 'xl/worksheets/sheet2.xml' holds an XML token of more than 1 MB")
_xml_case("xml_1001_comments", "distillation", _sub(b"<sheetData>", b"<!--c-->" * 1001 + b"<sheetData>"),
          r"more than 1000 XML comments or processing instructions")


@case("shared_strings_200000", r"more than 100,000 shared strings")
def _(d):  # small strings, a 2.6 MB part: under the part bound, refused by the count before parsing
    n = 200_000
    sst = (b'<?xml version="1.0" encoding="UTF-8"?><sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/'
           b'2006/main" count="%d" uniqueCount="%d">' % (n, n) + b"<si><t>a</t></si>" * n + b"</sst>")
    p = rezip(_book(d, "sst.xlsx"), {"xl/sharedStrings.xml": lambda _: sst})
    return ["yields", str(p)], [p]


@case("zip_duplicate_member", r"the zip archive holds two parts named 'xl/worksheets/sheet3.xml'")
def _(d):  # a second copy of the narrow cuts whose sulfur differs: which one is read must not be a guess
    import warnings

    p = _book(d, "twice.xlsx")
    with zipfile.ZipFile(p) as z:
        part = z.read("xl/worksheets/sheet3.xml")
    assert b"<v>0.9</v>" in part
    with warnings.catch_warnings(), zipfile.ZipFile(p, "a") as z:
        warnings.simplefilter("ignore")  # zipfile warns of the duplicate name it is asked to write
        z.writestr("xl/worksheets/sheet3.xml", part.replace(b"<v>0.9</v>", b"<v>0.1</v>"))
    return ["yields", str(p)], [p]


@case("zip_listed_sheet_missing", r"sheet 'narrow cuts' is listed in the workbook but its part "
                                  r"'xl/worksheets/sheet3.xml' is missing")
def _(d):  # before, the narrow cuts vanished silently and the cut sulfurs changed
    p = _book(d, "holed.xlsx")
    with zipfile.ZipFile(p) as z:
        items = {i.filename: z.read(i.filename) for i in z.infolist() if i.filename != "xl/worksheets/sheet3.xml"}
    with zipfile.ZipFile(p, "w", zipfile.ZIP_DEFLATED) as z:
        for k, v in items.items():
            z.writestr(k, v)
    return ["yields", str(p)], [p]


@case("array_formula_in_number_cell", r"row 8, column 'temp_c': found the array formula '=SUM\(A1:A2\)'; expected a "
                                      r"number \(formulas are not evaluated")
def _(d):
    import openpyxl
    from openpyxl.worksheet.formula import ArrayFormula

    p = _book(d, "array.xlsx")
    wb = openpyxl.load_workbook(p)
    wb["distillation"]["B8"] = ArrayFormula("B8", "=SUM(A1:A2)")
    wb.save(p)
    return ["yields", str(p)], [p]


@case("hidden_sheet_with_near_name", r"sheets 'crude' and 'crude ' have the same name")
def _(d):
    import openpyxl

    p = _book(d, "twin.xlsx")
    wb = openpyxl.load_workbook(p)
    ws = wb.copy_worksheet(wb["crude"])
    ws.title = "crude "
    ws.sheet_state = "hidden"
    wb.save(p)
    return ["yields", str(p)], [p]


@case("csv_name_with_control_characters", None)
def _(d):  # the crude name of a curve CSV is its file name: control characters become "_"
    p = d / "crude\x07bell.csv"
    p.write_text("vol_pct,temp_c\n2,20\n10,90\n30,180\n50,270\n70,380\n90,520\n")
    return ["yields", str(p), "--api", "30", "--out", str(d / "out")], [p]


# Bidi controls and zero-width characters let one crude display as another (Unicode UAX #9, section 2)
_wb_case("crude_name_with_bidi_override", set_cell("crude", 2, 1, "Tarn\u202eyvaeH"),
         r"the crude name holds a control character or an invisible one \('Tarn\\\\u202eyvaeH'")
_wb_case("crude_name_with_line_separator", set_cell("crude", 2, 1, "Selkie\u2028Light"),
         r"the crude name holds a control character or an invisible one")
_wb_case("crude_origin_with_isolate", set_cell("crude", 3, 1, "North\u2066 field"),
         r"the crude origin holds a control character or an invisible one")
_toml_case("cuts_zero_width_space_in_name", '[[cut]]\nname = "die\u200bsel"\nend_c = 200\n[[cut]]\nname = "rest"\n',
           r"cut 1's name holds a control character or an invisible one \('die\\\\u200bsel'")


@case("crude_name_too_long", r"the crude name is 30000 characters long; at most 200")
def _(d):
    p = _book(d, "long.xlsx", set_cell("crude", 2, 1, "N" * 30_000))
    return ["yields", str(p)], [p]


@case("cuts_name_too_long", r"name is 2000 characters long; at most 200")
def _(d):
    p = d / "cuts.toml"
    p.write_text(f'[[cut]]\nname = "{"k" * 2000}"\nend_c = 200\n[[cut]]\nname = "rest"\n')
    return ["yields", "--cuts", str(p)], [p]


@case("cuts_too_many", r"5000 cuts; a cut set holds at most 100")
def _(d):
    p = d / "cuts.toml"
    p.write_text("".join(f'[[cut]]\nname = "c{i}"\nend_c = {i * 0.1}\n' for i in range(4999))
                 + '[[cut]]\nname = "rest"\n')
    return ["yields", "--cuts", str(p)], [p]


@case("cuts_control_character_in_name", r"name holds a control character or an invisible one")
def _(d):
    p = d / "cuts.toml"
    p.write_text('[[cut]]\nname = "naph\\u001b]0;x\\u0007"\nend_c = 200\n[[cut]]\nname = "rest"\n')
    return ["yields", "--cuts", str(p)], [p]


# -- numbers out of range, odd outputs --------------------------------------------------------------------
_toml_case("cuts_nested_too_deeply", "x = " + "[" * 5000 + "]" * 5000 + "\n", r"TOML nested more than 32 deep")
_price_case("prices_huge", "[products]\n" + _ALL + '"vacuum residue" = { per_t = 1e308 }\n',
            r"products.vacuum residue.per_t: 1e\+308 is out of range; numbers here lie within ±1e\+15")
_price_case("prices_out_of_range", "[products]\n" + _ALL + '"vacuum residue" = { per_t = 2e9 }\n',
            r"the price 2e\+09 is out of range; a price file's numbers lie within ±1e\+09")
# Python's TOML reader takes time and memory growing with the square of a dotted key's parts (a 56 KB file of
# one key: 20 s and 3 GB); such a key is refused before parsing (measured; common practice, no source)
_toml_case("cuts_dotted_key_of_28000_parts", "a" + ".a" * 28_000 + " = 1\n", r"a dotted key of more than 16 parts")
_toml_case("cuts_quoted_dotted_key", '"a b".' * 40 + '"c" = 1\n', r"a dotted key of more than 16 parts")
_toml_case("cuts_file_over_1_mb", "# padding\n" * 110_000, r"assaycut reads cut, limit and price files up to 1 MB")
_toml_case("cuts_integer_of_400_digits", '[[cut]]\nname="a"\nend_c=1' + "0" * 399 + '\n[[cut]]\nname="b"\n',
           r"cut\[1\].end_c: a number of 400 digits is out of range")
_toml_case("cuts_integer_of_5000_digits", '[[cut]]\nname="a"\nend_c=' + "9" * 5000 + '\n[[cut]]\nname="b"\n',
           r"a number of more than 4,300 digits")
_toml_case("limits_integer_of_400_digits", '[[limit]]\ncut="diesel"\nproperty="sg"\nmax=-1' + "0" * 399 + "\n",
           r"limit\[1\].max: a number of 400 digits is out of range", "--limits")
_toml_case("limits_1001", "".join(f'[[limit]]\ncut="diesel"\nproperty="sg"\nmax={0.8 + i * 1e-4}\n'
                                  for i in range(1001)), r"1001 limits; a limits file holds at most 1000", "--limits")
_price_case("prices_1001_crudes", "[products]\n" + _ALL + '"vacuum residue" = { per_t = 300 }\n[crudes]\n'
            + "".join(f'"c{i}" = {{ per_bbl = 80 }}\n' for i in range(1001)),
            r"1001 prices in \[crudes\]; a price file holds at most 1000 per table")


@case("usage_rate_of_400_digits", r"Invalid value for '--rate': Input should be less than or equal to 100000000")
def _(d):  # before: accepted as an infinite crude run (exit 0)
    return ["yields", "--rate", "1" + "0" * 400, "--json"], []


@case("usage_end_of_400_digits", r"--end 'diesel=10{49}\.\.\.': the value is not a temperature")
def _(d):  # the message quotes the option shortened, not 400 digits
    return ["yields", "--end", "diesel=1" + "0" * 400], []


@case("limits_unknown_name", r"nonsense: file not found; give a limits file, or a shipped set: 'blendstock', "
                             r"'finished'$")
def _(d):
    return ["yields", "--limits", "nonsense", "--json"], []


@case("convert_nan", r"'50=nan': expected PERCENT=TEMP with finite numbers")
def _(d):
    return ["convert", "10=100", "50=nan", "90=300", "--json"], []


@case("convert_inf", r"'50=inf': expected PERCENT=TEMP with finite numbers")
def _(d):
    return ["convert", "10=100", "50=inf", "90=300", "--json"], []


@case("convert_huge_temperature", r"'50=1e308': the temperature must lie between absolute zero and 1500 °C")
def _(d):
    return ["convert", "10=100", "50=1e308", "90=300", "--json"], []


@case("convert_d1160_pressure_too_high", r"pressure 1000000.0 mmHg is outside 0.01-1520 mmHg")
def _(d):
    return ["convert", "10=100", "50=200", "90=300", "--from", "D1160", "--to", "AET", "--pressure-mmhg", "1e6"], []


@case("convert_d1160_pressure_too_low", r"pressure 1e-09 mmHg is outside 0.01-1520 mmHg")
def _(d):
    return ["convert", "10=100", "50=200", "90=300", "--from", "D1160", "--to", "AET", "--pressure-mmhg", "1e-9"], []


@case("d1160_pressure_out_of_range", r"sheet 'distillation': a D1160 curve needs its pressure in mmHg \(0.01-1520\); "
                                    r"got 1000000.0$")
def _(d):
    def m(s):
        s["distillation"][1][1] = "D1160"
        s["distillation"][2][1] = 1e6
    p = _book(d, "d1160.xlsx", m)
    return ["yields", str(p)], [p]


def _blend_bounds_case(name, bound, expect):
    @case(name, expect)
    def _(d):
        from assaycut.io.tomlfiles import demo_assay_paths

        a, b = demo_assay_paths()[:2]
        return ["blend", "--optimize", f"{a}={bound}", str(b), "--prices", str(_DEMO_PRICES), "--out",
                str(d / "mix.xlsx")], []


_DEMO_PRICES = Path(__file__).resolve().parent.parent / "assays_demo" / "prices_demo.toml"
_blend_bounds_case("blend_bounds_outside_0_100", "-50:150", r"share bounds -50:150 % for .*from 0 to 100 %")
_blend_bounds_case("blend_bounds_nan", "nan:50", r"share bounds nan:50 % for .*from 0 to 100 %")
_blend_bounds_case("blend_bounds_reversed", "60:20", r"share bounds 60:20 % for .*the minimum is above the maximum")


@case("csv_field_too_long", r"long.csv, row 2: not a readable CSV \(field larger than field limit")
def _(d):
    p = d / "long.csv"
    p.write_text("vol_pct,temp_c\n10," + "1" * 200_000 + "\n50,200\n")
    return ["yields", str(p), "--api", "30"], [p]


@case("csv_cr_only_line_endings", None)
def _(d):
    p = d / "mac.csv"
    p.write_bytes(b"vol_pct,temp_c\r2,20\r10,90\r30,180\r\n50,270\n70,380\r90,520\r")
    return ["yields", str(p), "--api", "30", "--out", str(d / "out")], [p]


@case("out_is_dev_null", r"/dev/null: is not a folder")
def _(d):
    return ["yields", "--out", "/dev/null"], []


@case("out_blocked_by_a_folder", r"a folder named 'Selkie_Light_cuts.csv' is in the way")
def _(d):
    (d / "out" / "Selkie_Light_cuts.csv").mkdir(parents=True)
    return ["yields", "--out", str(d / "out")], []


if __name__ == "__main__":  # pragma: no cover - writes the corpus for inspection
    import sys

    out = Path(sys.argv[1] if len(sys.argv) > 1 else "corpus")
    for name, fn, expect in CASES:
        folder = out / name
        folder.mkdir(parents=True, exist_ok=True)
        args, _ = fn(folder)
        (folder / "command.txt").write_text("assaycut " + " ".join(args) + f"\nexpect: {expect or 'accepted'}\n")
    print(f"{len(CASES)} cases written to {out}")
