"""What a planner reads, as printed at 80 columns and as opened in a spreadsheet: tables that fit, one
precision rule, warnings once per run naming their crude before the last line, rates and worth per day,
extrapolation flagged in compare, workbook panes, filters and number formats.

Expected texts come from the laboratory precision rule (common practice, no source; see
assaycut.report.precision), from the demo crudes' own JSON output (the same values, shown), and from
arithmetic (worth per day = worth per bbl x bbl/d).
"""

from __future__ import annotations

import json
from pathlib import Path

import openpyxl
import pytest
from typer.testing import CliRunner

from assaycut.cli import app

runner = CliRunner()
PRICES = str(Path(__file__).parents[2] / "assays_demo" / "prices_demo.toml")
NARROW = {"COLUMNS": "80"}


def _run(args, codes=(0,)):
    r = runner.invoke(app, args, env=NARROW)
    assert r.exit_code in codes, r.output
    return r


def _fits(text: str, width: int = 80):
    for line in text.splitlines():
        if line.startswith(("Report written", "Plot written", "Sweep written", "Vectors written")):
            continue  # a folder path cannot be split
        assert len(line) <= width, line
        assert line == line.rstrip(), repr(line)


@pytest.mark.parametrize("args", [["yields", "{0}", "{1}", "{2}", "--rate", "100000"], ["compare", "{0}", "{1}", "{2}"],
                                  ["shift", "{1}", "--end", "kerosene=240"], ["sweep", "{1}"],
                                  ["optimize", "{1}", "--maximize", "kerosene"], ["check", "{2}"]])
def test_every_printed_line_fits_80_columns_without_trailing_blanks(args, demo_paths, tmp_path):
    r = _run([a.format(*demo_paths) for a in args] + (["--out", str(tmp_path)] if args[0] != "check" else []),
             codes=(0, 1))
    _fits(r.output)


def test_warnings_come_once_name_their_crudes_and_precede_the_written_line(demo_paths, tmp_path):
    r = _run(["yields", *demo_paths, "--out", str(tmp_path)])
    lines = r.output.splitlines()
    warn = [k for k, x in enumerate(lines) if x.startswith("warning: ")]
    last = max(k for k, x in enumerate(lines) if x.startswith("Report written"))
    assert warn and max(warn) < last
    texts = [lines[k] for k in warn]
    assert len(texts) == len(set(texts))  # de-duplicated across crudes
    names = ["Selkie Light", "Brannock Blend", "Tarn Heavy", "all 3 crudes"]
    assert all(any(x.startswith(f"warning: {n}") for n in names) for x in texts)
    assert any(x.startswith("warning: all 3 crudes:") for x in texts)
    full = {w for p in demo_paths for w in json.loads(_run(["yields", p, "--json"]).stdout)["warnings"]}
    assert len(texts) < len(full) + 3  # five shared warnings printed once, not three times


def test_a_failed_limit_shows_one_decimal_more_than_the_limit(demo_paths, tmp_path):
    d = json.loads(_run(["yields", demo_paths[1], "--json"]).stdout)
    lim = next(x for x in d["limits"] if x["cut"] == "kerosene" and x["property"] == "sulfur_wt_pct")
    assert lim["status"] == "fail" and lim["limit"] == "<= 0.3"
    r = _run(["yields", demo_paths[1], "--out", str(tmp_path)])
    assert f"{lim['value']:.2f} wt %, needs <= 0.3 wt %" in r.stdout  # 0.32, never "0.3 ... needs <= 0.3"
    md = next(tmp_path.glob("*_summary.md")).read_text()
    assert f"| <= 0.3 | {lim['value']:.2f} | wt % | FAIL |" in md


def test_rates_are_printed_in_the_table_the_summary_sheet_and_the_markdown(demo_paths, tmp_path):
    d = json.loads(_run(["yields", demo_paths[0], "--rate", "100000", "--json"]).stdout)
    ln = d["cuts"][0]
    r = _run(["yields", demo_paths[0], "--rate", "100000", "--out", str(tmp_path)])
    assert "crude run 100000 bbl/d" in r.stdout and "bbl/d" in r.stdout.split("\n")[3]
    assert f"{ln['bbl_per_day']:.0f}" in r.stdout and "2549.99" not in r.stdout
    ws = openpyxl.load_workbook(next(tmp_path.glob("*_yields.xlsx")))["summary"]
    values = {ws.cell(row=i, column=1).value: ws.cell(row=i, column=2).value for i in range(1, ws.max_row + 1)}
    assert values["Crude run [bbl/d]"] == 100000
    heads = [c.value for row in ws.iter_rows() for c in row]
    assert "Rate [bbl/d]" in heads and "Rate [t/d]" in heads
    md = next(tmp_path.glob("*_summary.md")).read_text()
    assert "- Crude run: 100000 bbl/d" in md and f"| {ln['bbl_per_day']:.0f} |" in md


def test_compare_flags_extrapolation_shows_the_whole_crude_and_the_same_digits_as_yields(demo_paths, tmp_path):
    r = _run(["compare", *demo_paths, "--out", str(tmp_path)])
    tarn = json.loads(_run(["yields", demo_paths[2], "--json"]).stdout)
    res = next(c for c in tarn["cuts"] if c["name"] == "vacuum residue")
    assert res["extrapolated"] is True
    assert "Extrapolated" in r.stdout and "yes" in r.stdout
    assert f"{res['vol_pct']:.2f}" in r.stdout and f"{res['vol_pct']:.3f}" not in r.stdout
    assert f"{res['sg']:.4f}" in r.stdout  # SG to 4 decimals, as yields prints it
    assert "whole crude" in r.stdout and f"{tarn['assay']['api']:.1f}" in r.stdout
    assert "Warnings [count]" in r.stdout and str(len(tarn["warnings"])) in r.stdout


def test_compare_gives_worth_per_day_at_the_crude_run(demo_paths):
    d = json.loads(_run(["compare", *demo_paths, "--prices", PRICES, "--rate", "80000", "--json"]).stdout)
    for w in d["worth"]:
        assert w["worth_per_day"] == pytest.approx(w["worth_per_bbl"] * 80000, rel=1e-12)
        assert w["margin_per_day"] == pytest.approx(w["margin_per_bbl"] * 80000, rel=1e-12)
    r = _run(["compare", *demo_paths, "--prices", PRICES, "--rate", "80000", "--out", "c"])
    assert "worth/d" in r.stdout and f"{d['worth'][0]['worth_per_day']:.0f}" in r.stdout


def test_workbook_panes_filters_widths_and_formats(demo_paths, tmp_path):
    _run(["yields", *demo_paths, "--out", str(tmp_path)])
    wb = openpyxl.load_workbook(next(tmp_path.glob("Selkie*/*_yields.xlsx")))
    cuts = wb["cuts"]
    assert cuts.freeze_panes == "C2" and cuts["B1"].value == "Cut"  # the cut name stays in view
    assert cuts.auto_filter.ref and cuts.auto_filter.ref.startswith("A1:")
    from openpyxl.utils import get_column_letter
    assert all(cuts.column_dimensions[get_column_letter(j)].width for j in range(1, cuts.max_column + 1))
    summary = wb["summary"]
    assert summary["A4"].value == "Item" and summary.freeze_panes == "A5"  # frozen under its header
    lim = wb["limits"]
    heads = [c.value for c in lim[1]]
    assert "Unit" in heads
    lib = openpyxl.load_workbook(tmp_path / "library_summary.xlsx")["library"]
    assert lib.auto_filter.ref
    heads = [c.value for c in lib[1]]
    j = heads.index("light naphtha S wt %") + 1
    for i in range(2, lib.max_row + 1):
        c = lib.cell(row=i, column=j)
        if isinstance(c.value, float) and 0 < c.value < 0.001:  # Selkie light naphtha sulfur ~0.0005 wt %
            assert c.number_format.count("0") >= 5, c.number_format  # shows 2 significant digits, not 0.00
            break
    else:
        pytest.fail("no small sulfur in the library summary")


def test_unit_f_puts_the_limits_sheet_markdown_and_warnings_in_fahrenheit(demo_paths, tmp_path):
    r = _run(["yields", demo_paths[1], "--unit", "F", "--out", str(tmp_path)])
    warnings = [x for x in r.output.splitlines() if x.startswith("warning")]
    assert warnings and "°C" not in "\n".join(warnings) and any("°F" in x for x in warnings)
    wb = openpyxl.load_workbook(next(tmp_path.glob("*_yields.xlsx")))
    lim = wb["limits"]
    heads = [c.value for c in lim[1]]
    rows = [[c.value for c in row] for row in lim.iter_rows(min_row=2)]
    flash = [r for r in rows if r[heads.index("Property")] == "flash_c_est"]
    assert flash and all(r[heads.index("Unit")] == "°F" for r in flash)
    assert any(r[heads.index("Required")] == ">= 100" for r in flash)  # 38 °C (Jet A-1 flash) is 100.4 °F
    md = next(tmp_path.glob("*_summary.md")).read_text()
    assert "TBP range °F" in md and "°F TBP" in md


def test_the_optimiser_says_when_an_end_sits_on_its_bound_or_on_the_extension(demo_paths):
    # Selkie Light with the demo prices pushes the VGO end up to its span: 1050 °F (565.6 °C) + 60 °C (arithmetic),
    # beyond the end of the measured curve (565 °C, the assay's distillation sheet).
    d = json.loads(_run(["optimize", demo_paths[0], "--prices", PRICES, "--json"]).stdout)
    assert d["feasible"]
    vgo = d["optimum"]["cut_points_c"]["vacuum gas oil"]
    bound = (1050.0 - 32.0) / 1.8 + 60.0
    assert vgo == pytest.approx(bound, abs=0.05)
    notes = " ".join(d["bound_notes"])
    assert f"end of vacuum gas oil at {bound:.1f} °C sits on its upper search bound" in notes
    assert "lies on the fitted extension" in notes
    r = _run(["optimize", demo_paths[0], "--prices", PRICES, "--out", "o"])
    assert "sits on its upper search bound" in r.stdout
