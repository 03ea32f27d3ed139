"""Readers: good and bad assay inputs, through the library and through the CLI (exit code and message)."""

from __future__ import annotations

import math
import zipfile

import numpy as np
import pytest
from typer.testing import CliRunner

from assaycut.cli import app
from assaycut.errors import AssaycutError, InputError
from assaycut.io import load_assay
from tests.bombs import entity_bomb
from tests.corpus import set_cell
from tests.helpers import cli_error, sha256

runner = CliRunner()


def test_good_workbook_reads_and_normalises(good_book):
    a = load_assay(str(good_book))
    assert a.name == "Test Crude"
    assert a.sg == pytest.approx(141.5 / (33.0 + 131.5))  # API MPMS Ch. 11 definition
    assert a.curves[0].method == "TBP" and a.curves[0].basis == "vol"
    assert len(a.narrow_cuts) == 7 and math.isnan(a.narrow_cuts.start_c[0])
    assert a.light_ends.amounts == {"C3": 0.3, "iC4": 0.25, "nC4": 0.7}
    assert len(a.sha256) == 64


def test_fractions_float_noise_and_flat_step_accepted(book):
    def mutate(s):
        rows = s["distillation"]
        for r in rows[5:]:
            r[0] = r[0] / 100.0
        rows[7][1] = 150.00000000000003
        rows.insert(8, [0.20, 170.0])  # same cumulative percent at two temperatures: a flat step
    a = load_assay(str(book(mutate)))
    c = a.curves[0]
    assert c.percent.max() == pytest.approx(82.0)
    assert c.temp_c[2] == 150.0
    assert any("fractions" in w for w in c.warnings)
    assert any("flat step" in w for w in c.warnings)


def test_curve_starting_late_and_stopping_at_45(book):
    def mutate(s):
        s["distillation"] = s["distillation"][:5] + [[8.0, 70.0], [20.0, 150.0], [35.0, 230.0], [45.0, 290.0]]
    from assaycut.model.crude import build_model

    a = load_assay(str(book(mutate)))
    a.narrow_cuts.vol_pct[:] = np.nan  # the book's cut yields belong to its own curve: here the points alone
    a.narrow_cuts.wt_pct[:] = np.nan
    m = build_model(a)
    assert m.curve.measured_hi == 45.0
    assert m.curve.fbp_c > 290.0


def test_temperature_units_converted(book):
    def mutate(s):
        rows = s["distillation"]
        rows[4] = ["vol_pct", "temp_f"]
        for r in rows[5:]:
            r[1] = r[1] * 1.8 + 32.0
    a = load_assay(str(book(mutate)))
    assert a.curves[0].temp_c[1] == pytest.approx(70.0)


def _library_cases():
    """The corpus cases that are one workbook read by `yields` or `check` (tests/corpus.py)."""
    from tests.corpus import CASES

    return [c for c in CASES if c[2] is not None and c[0] not in ("missing_file", "folder_as_assay")
            and c[0].split("_")[0] not in ("cuts", "limits", "prices", "blend", "convert", "sweep", "shift",
                                           "usage", "template", "csv", "out")]


@pytest.mark.parametrize("name,build,match", _library_cases(), ids=[c[0] for c in _library_cases()])
def test_bad_workbook_cases_through_the_library(tmp_path, name, build, match):
    # The same corpus cases as the CLI test (tests/test_corpus.py), read through the library: the error is an
    # InputError (an AssaycutError and a ValueError) with the same message, and the file is unchanged.
    from assaycut.model.crude import build_model

    args, inputs = build(tmp_path)
    assert len(args) == 2 and args[0] in ("yields", "check"), "a case that is not one workbook: exclude it above"
    before = sha256(args[1]) if inputs else None
    with pytest.raises(AssaycutError, match=match):
        build_model(load_assay(args[1]))
    if inputs:
        assert sha256(args[1]) == before


def test_date_where_number_belongs(book):
    import datetime

    path = book(set_cell("distillation", 7, 1, datetime.datetime(2024, 3, 1)))
    cli_error(["yields", str(path)], r"row 8, column 'temp_c': found a date/time \(2024-03-01 00:00:00\); expected a number")


def test_single_point(book):
    def mutate(s):
        s["distillation"] = s["distillation"][:6]
    cli_error(["yields", str(book(mutate))], r"row 6: a single point is not a curve")


def test_empty_sheet(book):
    def mutate(s):
        s["distillation"] = []
    cli_error(["check", str(book(mutate))], r"sheet 'distillation': the sheet is empty")


def test_missing_sheet(book):
    def mutate(s):
        del s["crude"]
    cli_error(["yields", str(book(mutate))], r"no sheet named 'crude'")


def test_empty_file(tmp_path):
    p = tmp_path / "empty.xlsx"
    p.write_bytes(b"")
    cli_error(["yields", str(p)], r"empty.xlsx: the file is empty")


def test_random_bytes_as_xlsx(tmp_path):
    p = tmp_path / "noise.xlsx"
    p.write_bytes(np.random.default_rng(1).bytes(4096))
    cli_error(["yields", str(p)], r"noise.xlsx: not an .xlsx workbook \(the file is not a zip archive\)")


def test_zip_that_is_not_a_workbook(tmp_path):
    p = tmp_path / "other.xlsx"
    with zipfile.ZipFile(p, "w") as z:
        z.writestr("hello.txt", "not a workbook")
    cli_error(["yields", str(p)], r"other.xlsx: a zip archive but not an .xlsx workbook")


def test_missing_file(tmp_path):
    cli_error(["yields", str(tmp_path / "nope.xlsx")], r"nope.xlsx: file not found")


def test_unknown_extension(tmp_path):
    p = tmp_path / "assay.pdf"
    p.write_bytes(b"%PDF")
    cli_error(["yields", str(p)], r"assay.pdf: unknown assay file type .pdf")


def test_entity_bomb_refused_quickly(good_book, tmp_path):
    import time

    bomb = entity_bomb(good_book, tmp_path / "bomb.xlsx")
    before = sha256(bomb)
    t = time.perf_counter()
    cli_error(["yields", str(bomb)], r"bomb.xlsx: refused: the workbook's XML declares entities")
    assert time.perf_counter() - t < 5.0
    assert sha256(bomb) == before


def test_defusedxml_active():
    # openpyxl uses defusedxml when it is installed (openpyxl.xml.DEFUSEDXML).
    from openpyxl.xml import DEFUSEDXML

    assert DEFUSEDXML


# -- quick-curve CSV -----------------------------------------------------------------------------------------
def test_csv_good_with_bom_and_semicolons(tmp_path):
    p = tmp_path / "c.csv"
    p.write_bytes("\ufeffvol_pct;temp_c\n5;40,5\n30;180\n60;330\n80;460\n".encode("utf-8"))
    a = load_assay(str(p), api=35.0, sulfur=0.8)
    assert a.curves[0].temp_c[0] == 40.5
    assert a.sg == pytest.approx(141.5 / 166.5)


def test_csv_needs_gravity(tmp_path):
    p = tmp_path / "c.csv"
    p.write_text("vol_pct,temp_c\n5,40\n30,180\n60,330\n")
    cli_error(["yields", str(p)], r"c.csv: missing gravity: a curve CSV needs the whole-crude gravity")


def test_csv_bad_header(tmp_path):
    p = tmp_path / "c.csv"
    p.write_text("percent,temperature\n5,40\n30,180\n")
    cli_error(["yields", str(p), "--api", "30"], r"c.csv, row 1: the header must name one percent column")


def test_csv_yields_run(tmp_path):
    p = tmp_path / "quick.csv"
    p.write_text("vol_pct,temp_c\n3,30\n10,80\n30,190\n50,310\n70,440\n")
    r = runner.invoke(app, ["yields", str(p), "--api", "32", "--sulfur", "1.2", "--json"])
    assert r.exit_code == 0, r.stderr
    import json

    d = json.loads(r.stdout)
    assert d["assay"]["name"] == "quick"
    assert any("Watson K" in m and "fitted to the whole-crude gravity" in m for m in d["methods"].values())
    assert any("sulfur" in w for w in d["warnings"])


def test_library_errors_are_value_errors():
    # One base class whose instances are also ValueErrors (style guide).
    assert issubclass(InputError, AssaycutError) and issubclass(InputError, ValueError)


def _curve_book(book, method, basis, points):
    def mutate(s):
        s["distillation"] = [["x"], ["method", method], ["pressure_mmhg", None], [], [f"{basis}_pct", "temp_c"]] + \
            [[p, t] for p, t in points]
    return book(mutate)


def _node_cuts(temps):
    from assaycut.cutting.cutset import Cut, CutSet

    return CutSet([Cut(f"c{i}", float(x)) for i, x in enumerate(temps)] + [Cut("rest", None)])


def test_weight_basis_tbp_curve_exact_at_its_nodes(book):
    # Identity (the measured curve itself): cut at the temperatures of a weight-basis curve's own points, the
    # wt % yields are the measured differences (to 1e-6 wt %), with narrow-cut densities (the test book) and
    # without them (constant Watson K), and the volume basis closes.
    from assaycut.cutting.ideal import cut_table
    from assaycut.model.crude import build_model

    pts = [(0, 20), (10, 90), (30, 180), (50, 290), (70, 410), (90, 560), (95, 620), (100, 700)]
    for drop_cuts in (False, True):
        path = _curve_book(book, "TBP", "wt", pts)
        a = load_assay(str(path))
        a.narrow_cuts.vol_pct[:] = np.nan  # the book's cut yields belong to its own curve: here the points alone
        a.narrow_cuts.wt_pct[:] = np.nan
        if drop_cuts:
            a.narrow_cuts = None
        m = build_model(a)
        df = cut_table(m, _node_cuts([t for _, t in pts[1:-1]])).frame()
        diffs = np.diff([p for p, _ in pts[:-1]])
        assert_wt = df["wt_pct"].to_numpy()
        assert np.allclose(assert_wt[1:-1], diffs[1:], atol=1e-6), assert_wt
        assert assert_wt[0] == pytest.approx(10.0, abs=1e-6)
        assert df["vol_pct"].sum() == pytest.approx(100.0, abs=1e-9)
        assert df["wt_pct"].sum() == pytest.approx(100.0, abs=1e-9)


def test_heavy_weight_basis_curve_open_data_exact_at_nodes():
    # A heavy crude's TBP on the wt basis as it appears in open assay data (5-70 wt %, API 10.9): cut at its
    # node temperatures, the wt % yields equal the measured differences 10/20/20/50... (identity, 1e-6 wt %).
    from assaycut.cutting.ideal import cut_table
    from assaycut.model.assay import Assay, CurveData
    from assaycut.model.crude import build_model
    from assaycut.units import api_to_sg

    w = np.array([5, 10, 20, 30, 40, 50, 60, 70.0])
    t = np.array([239.85, 306.85, 395.85, 463.85, 519.85, 572.85, 625.85, 683.85])
    m = build_model(Assay("heavy", float(api_to_sg(10.9)), [CurveData("TBP", "wt", w, t)]))
    df = cut_table(m, _node_cuts(t[[1, 3, 5, 7]])).frame()
    assert np.allclose(df["wt_pct"].to_numpy()[:4], [10.0, 20.0, 20.0, 20.0], atol=1e-6)
    assert np.allclose(m.wt_at_vol(m.curve.pct_at(t)), w, atol=1e-6)


def test_vacuum_sheet_watson_k_row_applies_correction(book):
    # The optional watson_k row reaches the Maxwell-Bonnell conversion (API TDB 5A1.19): below 760 mmHg an
    # aromatic Kw (< 12) raises the AET above the uncorrected one.
    from assaycut.model.input_curves import curve_to_tbp

    def vac(kw):
        def mutate(s):
            s["vacuum distillation"] = [["x"], ["method", "D1160"], ["pressure_mmhg", 10.0], ["watson_k", kw], [],
                                        ["vol_pct", "temp_c"], [85.0, 330.0], [92.0, 380.0]]
        return load_assay(str(book(mutate))).curves[1]
    plain, aromatic = vac(None), vac(11.0)
    assert plain.watson_k is None and aromatic.watson_k == 11.0
    t_plain, t_arom = curve_to_tbp(plain)[1], curve_to_tbp(aromatic)[1]
    assert np.all(t_arom > t_plain)
    assert "Watson K correction with the given Kw 11" in curve_to_tbp(aromatic)[3]
    path = book(lambda s: s.update({"vacuum distillation": [["x"], ["method", "D1160"], ["pressure_mmhg", 10.0],
                                                            ["watson_k", 20.0], [], ["vol_pct", "temp_c"],
                                                            [85.0, 330.0], [92.0, 380.0]]}))
    cli_error(["yields", str(path)], r"sheet 'vacuum distillation', row 4, column 'B': watson_k 20 is outside 8-14")


def test_whole_crude_simdis_as_d2887_refused_clearly(book):
    # API TDB 3A3.1 is a correlation for petroleum fractions: on a whole crude's wide segments it gives
    # temperatures below methane's boiling point (-161.5 °C, chemicals library), which must be refused.
    pts = [(0, 20), (10, 90), (30, 180), (50, 290), (70, 410), (90, 560), (95, 620), (100, 700)]
    path = _curve_book(book, "D2887", "wt", pts)
    cli_error(["yields", str(path)], r"below the boiling point of methane: the correlation does not apply")


def test_d2887_fraction_converts(book):
    # A diesel-range simulated distillation: the TBP 50 % point equals the D2887 50 % point (API TDB 3A3.1).
    from assaycut.model.input_curves import curve_to_tbp

    pts = [(0, 180), (10, 215), (30, 245), (50, 270), (70, 295), (90, 330), (95, 345), (100, 370)]
    a = load_assay(str(_curve_book(book, "D2887", "wt", pts)))
    p, t, warnings, desc = curve_to_tbp(a.curves[0])
    assert dict(zip(p, t))[50] == pytest.approx(270.0, abs=1e-9)
    assert "3A3.1" in desc


@pytest.mark.parametrize("method", ["daubert-1994", "riazi-daubert-1986"])
def test_d86_curve_converted_by_chosen_method(book, method):
    import json

    pts = [(0, 40), (10, 95), (30, 170), (50, 250), (70, 320), (90, 370), (95, 385)]
    path = _curve_book(book, "D86", "vol", pts)
    r = runner.invoke(app, ["yields", str(path), "--json", "--method", method])
    assert r.exit_code == 0, r.stderr
    d = json.loads(r.stdout)
    assert d["methods"]["curve"] == f"D86 to TBP by {method}"
    assert sum(c["vol_pct"] for c in d["cuts"]) == pytest.approx(100.0, abs=1e-9)


def test_understated_dimension_loses_no_row(good_book, tmp_path):
    # A sheet whose <dimension> claims fewer rows than it holds (A1:B3 on a 12-row curve) is read whole: the
    # same points as the honest file (identity), none silently dropped.
    import re

    from tests.corpus import SHEET_XML, rezip

    liar = rezip(good_book, {SHEET_XML["distillation"]: lambda x: re.sub(rb'<dimension ref="[^"]*"\s*/>',
                                                                            b'<dimension ref="A1:B3"/>', x)},
                 out=tmp_path / "liar.xlsx")
    a, b = load_assay(str(good_book)), load_assay(str(liar))
    np.testing.assert_array_equal(a.curves[0].percent, b.curves[0].percent)
    np.testing.assert_array_equal(a.curves[0].temp_c, b.curves[0].temp_c)
    assert a.curves[0].percent.size == 7


def test_openpyxl_private_parser_names_still_there():
    """The reader needs openpyxl's sheet parser (row numbers, repeated rows) through the private names of
    OPENPYXL_PARSER_NAMES; pyproject pins openpyxl below 3.2 for them.  This fails as soon as one moves."""
    import importlib
    from pathlib import Path

    from openpyxl.reader.excel import ExcelReader
    from assaycut.io.workbook import OPENPYXL_PARSER_NAMES

    parser_cls = getattr(importlib.import_module("openpyxl.worksheet._reader"), "WorkSheetParser")
    demo = Path(__file__).parents[2] / "assays_demo" / "selkie_light.xlsx"
    reader = ExcelReader(demo, read_only=True, data_only=False, keep_links=False)
    reader.read()
    wb = reader.wb
    try:
        ws = wb["distillation"]
        for name in OPENPYXL_PARSER_NAMES[1:]:
            owner, *attrs = name.split(".")
            obj = {"ReadOnlyWorksheet": ws, "Workbook": wb, "ExcelReader": reader}[owner]
            for attr in attrs:
                assert hasattr(obj, attr), name
                obj = getattr(obj, attr)
        with ws._get_source() as src:
            rows = list(parser_cls(src, ws._shared_strings, data_only=False, epoch=wb.epoch,
                                   date_formats=wb._date_formats, timedelta_formats=wb._timedelta_formats).parse())
    finally:
        wb.close()
    idx, cells = rows[0]
    assert idx == 1 and {"column", "value"} <= set(cells[0])
