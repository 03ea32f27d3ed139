"""The lean workbook reader against the reference (openpyxl): the same rows of every sheet, the same assay or
the same refusal, on the bad-input corpus and on workbooks written by openpyxl and XlsxWriter (two
general-purpose writers from the package registry), with hand-edited XML for what they do not write."""

from __future__ import annotations

import pickle
import zipfile
from pathlib import Path

import pytest

from assaycut.io.cells import SourceLocation
from assaycut.io.tomlfiles import demo_assay_paths
from assaycut.io.workbook import (
    _check_archive,
    _open_lean,
    _open_workbook,
    _rows,
    read_workbook,
    read_workbook_lean,
    read_workbook_reference,
)
from assaycut.io.xlsxlean import Unusual
from tests.corpus import CASES, _sub, rezip
from tests.helpers import base_sheets, write_book


def _outcome(fn, path: Path):
    try:
        return "assay", pickle.dumps(fn(str(path)))
    except Exception as exc:  # noqa: BLE001 - the refusal itself is compared
        return type(exc).__name__, str(exc)


def _sheet_rows(path: Path, lean: bool) -> dict:
    data = path.read_bytes()
    z = _check_archive(data, str(path))
    if not lean:
        z.close()
    wb = _open_lean(z) if lean else _open_workbook(data, str(path))
    try:
        return {name: _rows(wb[name], SourceLocation(str(path), name)) for name in wb.sheetnames}
    finally:
        wb.close()


def _typed(rows: dict) -> dict:
    """Rows with each value's type beside it (1 == 1.0 == True in Python; the readers must agree on types)."""
    return {k: [[(type(v).__name__, v) for v in r] for r in rs] for k, rs in rows.items()}


def _same_rows(path: Path) -> None:
    ref = _sheet_rows(path, lean=False)  # first: it remembers the stylesheet for the lean reader
    assert _typed(_sheet_rows(path, lean=True)) == _typed(ref)


def test_demo_workbooks_read_alike_and_by_the_lean_reader():
    for p in demo_assay_paths():
        ref = pickle.dumps(read_workbook_reference(p))
        assert pickle.dumps(read_workbook_lean(p)) == ref  # no fallback: the lean reader reads them itself
        assert pickle.dumps(read_workbook(p)) == ref
        _same_rows(Path(p))


def test_every_corpus_workbook_gives_the_same_assay_or_the_same_refusal(tmp_path):
    books, lean_read = 0, 0
    for name, build, _ in CASES:
        d = tmp_path / name
        d.mkdir()
        try:
            _, inputs = build(d)
        except Exception:  # noqa: BLE001 - a case whose inputs cannot be built here is not a workbook case
            continue
        for p in inputs:
            if Path(p).suffix.lower() != ".xlsx":
                continue
            books += 1
            ref = _outcome(read_workbook_reference, p)
            assert _outcome(read_workbook, p) == ref, name
            try:
                lean = _outcome(read_workbook_lean, p)
            except Unusual:
                continue
            if lean[0] == "Unusual":
                continue
            lean_read += 1
            if ref[0] == "assay":
                assert lean == ref, name
    assert books >= 30
    assert lean_read >= books // 2  # the lean reader does the work (the rest goes to the reference)


def _openpyxl_book(path: Path) -> Path:
    import openpyxl
    from openpyxl.cell.rich_text import CellRichText, TextBlock
    from openpyxl.cell.text import InlineFont

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "values"
    ws.append(["text", "  spaced  ", "line\nbreak", "", "x005F_kept?", "tab\there", "ünïcødé", "<&>\"'"])
    ws.append([1, -2, 0, 10**15, 2.5, -1e-300, 1e300, 0.1 + 0.2, 1 / 3, True, False, None, 7])
    ws.append([CellRichText(["plain ", TextBlock(InlineFont(b=True), "bold"), " tail"])])
    ws["C9"] = "far cell"
    ws["Z4"] = 3.25
    ws2 = wb.create_sheet("second sheet")
    for r in range(1, 60):
        ws2.append([r, r * 0.5, f"row {r}"])
    wb.save(path)
    return path


def _xlsxwriter_book(path: Path) -> Path:
    import xlsxwriter

    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("values")
    bold = wb.add_format({"bold": True})
    ws.write_row(0, 0, ["text", "  spaced  ", "line\nbreak", "ünïcødé", "<&>", "x005F_x", "_x0041_"])
    ws.write_row(1, 0, [1, -2, 0.0, 2.5, 1e-12, 123456789012, 1 / 7, True, False])
    ws.write_rich_string(2, 0, "plain ", bold, "bold", " tail")
    ws.write_string(5, 3, "far cell")
    ws.write_blank(6, 0, None, bold)
    ws2 = wb.add_worksheet("Second")
    for r in range(40):
        ws2.write_row(r, 0, [r, r / 3, f"row {r}"])
    wb.close()
    return path


@pytest.mark.parametrize("writer", [_openpyxl_book, _xlsxwriter_book], ids=["openpyxl", "xlsxwriter"])
def test_rows_of_other_writers_workbooks_are_the_references(tmp_path, writer):
    p = writer(tmp_path / "book.xlsx")
    _same_rows(p)
    rows = _sheet_rows(p, lean=True)
    assert rows["values"][0][:3] == ["text", "  spaced  ", "line\nbreak"]  # what was written, read back
    assert rows["values"][2][0] == "plain bold tail"  # rich text: its runs' text


def test_the_test_assay_written_by_openpyxl_reads_alike(tmp_path):
    p = write_book(tmp_path / "a.xlsx", base_sheets())
    ref = pickle.dumps(read_workbook_reference(str(p)))
    assert pickle.dumps(read_workbook_lean(str(p))) == ref
    _same_rows(p)


def test_hand_edited_strings_and_cells_read_as_the_reference_reads_them(tmp_path):
    p = _xlsxwriter_book(tmp_path / "book.xlsx")  # XlsxWriter writes shared strings (openpyxl inline ones)
    with zipfile.ZipFile(p) as z:
        sst = z.read("xl/sharedStrings.xml")
    assert b"<si><t>text</t></si>" in sst
    # a phonetic run (not part of the text), a run without text, a cell without reference and an inline string
    # with runs, a value in a cell of unusual type, an empty value
    rezip(p, {
        "xl/sharedStrings.xml": _sub(b"<si><t>text</t></si>",
                                     b"<si><t>te</t><r><t>xt</t></r><r><rPr/></r><rPh sb=\"0\" eb=\"1\"><t>ph</t>"
                                     b"</rPh><phoneticPr fontId=\"1\"/></si>"),
        "xl/worksheets/sheet1.xml": _sub(b"</sheetData>",
                                         b'<row r="40"><c t="inlineStr"><is><r><t xml:space="preserve"> a </t></r>'
                                         b'<r><t>b</t></r></is></c><c t="e"><v>#DIV/0!</v></c><c><v></v></c>'
                                         b'<c t="str"><v>as text</v></c><c t="n"><v>1E3</v></c></row></sheetData>'),
    })
    _same_rows(p)
    rows = _sheet_rows(p, lean=True)["values"]
    assert rows[0][0] == "text"
    assert rows[39] == [" a b", "#DIV/0!", None, "as text", 1000.0]


def _with_doctype(x: bytes) -> bytes:
    decl = x.index(b"?>") + 2 if x.startswith(b"<?xml") else 0
    return x[:decl] + b'<!DOCTYPE worksheet [<!ENTITY a "b">]>' + x[decl:]


@pytest.mark.parametrize("what", ["formula", "doctype", "defined name", "date", "bad style", "two inline strings"])
def test_what_the_lean_reader_does_not_read_goes_to_the_reference(tmp_path, what):
    import openpyxl

    p = _openpyxl_book(tmp_path / "book.xlsx")
    _sheet_rows(p, lean=False)  # the stylesheet is known: only the edit below sends the file away
    if what == "formula":
        rezip(p, {"xl/worksheets/sheet1.xml": _sub(b"</sheetData>", b'<row r="50"><c r="A50"><f>1+1</f><v>2</v>'
                                                                  b"</c></row></sheetData>")})
    elif what == "doctype":
        rezip(p, {"xl/worksheets/sheet1.xml": _with_doctype})
    elif what == "bad style":  # openpyxl: int("x") fails, a damaged sheet
        rezip(p, {"xl/worksheets/sheet1.xml": _sub(b'<c r="A1" t="inlineStr">', b'<c r="A1" s="x" t="inlineStr">')})
    elif what == "two inline strings":  # openpyxl takes the first
        rezip(p, {"xl/worksheets/sheet1.xml": _sub(b"<is><t>text</t></is>", b"<is><t>text</t></is><is><t>b</t></is>")})
    else:
        wb = openpyxl.load_workbook(p)
        if what == "defined name":
            wb.defined_names["n"] = openpyxl.workbook.defined_name.DefinedName("n", attr_text="values!$A$1")
        else:
            import datetime

            wb["values"]["A30"] = datetime.date(2026, 12, 3)
        wb.save(p)
        _sheet_rows(p, lean=False)
    with pytest.raises(Unusual):
        _sheet_rows(p, lean=True)


def test_a_formula_cell_is_still_refused_with_its_cell_named(tmp_path):
    # common practice, no source: an assay value must be the measured number, not a formula to evaluate
    sheets = base_sheets()
    p = write_book(tmp_path / "f.xlsx", sheets)
    with zipfile.ZipFile(p) as z:
        src = z.read("xl/worksheets/sheet2.xml")
    import re

    m = re.search(rb'<c r="B8"([^>]*)><v>([^<]*)</v></c>', src)
    assert m is not None
    rezip(p, {"xl/worksheets/sheet2.xml": lambda _: src.replace(m.group(0), b'<c r="B8"><f>100+50</f><v>150</v></c>')})
    with pytest.raises(Exception) as e:
        read_workbook(str(p))
    assert "formula" in str(e.value) and "row 8, column 'temp_c'" in str(e.value)
    assert str(e.value) == _outcome(read_workbook_reference, p)[1]


def test_rows_are_handed_on_as_parsed_so_the_limits_stop_a_huge_sheet_early(tmp_path):
    # the reference parser yields row by row; the row and cell limits must stop the lean one as early
    p = _openpyxl_book(tmp_path / "book.xlsx")
    _sheet_rows(p, lean=False)
    many = b"".join(b'<row r="%d"><c r="A%d"><v>1</v></c></row>' % (r, r) for r in range(100, 100 + 20_000))
    rezip(p, {"xl/worksheets/sheet2.xml": lambda x: x.replace(b"</sheetData>", many)})  # then damaged: no end
    data = p.read_bytes()
    wb = _open_lean(_check_archive(data, str(p)))
    rows = wb["second sheet"].rows()
    assert next(rows)[0] == 1  # the first row, before the damage far below is met
    with pytest.raises(Unusual):
        list(rows)
    wb.close()


def test_a_failure_of_any_kind_in_the_lean_reader_gives_the_references_refusal(tmp_path):
    p = write_book(tmp_path / "a.xlsx", base_sheets())
    read_workbook_reference(str(p))  # the stylesheet is known
    with zipfile.ZipFile(p) as z:
        src = z.read("xl/worksheets/sheet1.xml")
    assert b'<c r="A1" t="inlineStr">' in src
    rezip(p, {"xl/worksheets/sheet1.xml": lambda _: src.replace(b'<c r="A1" t="inlineStr">',
                                                                b'<c r="A1" s="x" t="inlineStr">', 1)})
    ref = _outcome(read_workbook_reference, p)
    assert ref[0] == "InputError" and "damaged sheet XML" in ref[1]
    assert _outcome(read_workbook, p) == ref
