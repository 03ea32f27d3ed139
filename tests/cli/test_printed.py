"""What a planner reads: printed tables and messages (no negative zero, '-' for missing, no doubled words,
short percentages, the right words), and a blank template that runs as written."""

from __future__ import annotations

import json
import re

import pytest

from typer.testing import CliRunner

from assaycut.cli import app

runner = CliRunner()


def _all_text(r) -> str:
    return r.stdout + r.stderr


def test_no_negative_zero_nan_or_doubled_words_in_printed_output(demo_paths):
    # Common practice, no source: a report never prints "-0", "nan" or a word twice in a row.
    outs = [runner.invoke(app, ["yields", *demo_paths]),
            runner.invoke(app, ["shift", demo_paths[0], "--end", "kerosene=240"]),
            runner.invoke(app, ["compare", *demo_paths]),
            runner.invoke(app, ["check", demo_paths[2]])]
    for r in outs:
        assert r.exit_code == 0, _all_text(r)
        text = _all_text(r)
        assert not re.search(r"(?<![\w.])[-−]0(\.0+)?(?![\d.])", text), re.search(r".{30}[-−]0(\.0+)?(?![\d.]).{10}", text)
        assert "nan" not in text.lower().replace("naphtha", "").replace("nann", "")
        doubled = re.search(r"\b([A-Za-z]{3,}) \1\b", text)  # in prose (table columns are wider apart)
        assert doubled is None, doubled.group(0)


def test_warning_percentages_are_short(demo_paths, book):
    # A computed percentage in a message has at most 2 decimals (common practice, no source).
    def mutate(s):
        s["distillation"] = s["distillation"][:5] + [[0.0, 20.0], [10.0, 90.0], [30.0, 180.0], [50.0, 290.0],
                                                     [73.4347, 430.0]]
    r = runner.invoke(app, ["yields", str(book(mutate)), "--json"])
    text = " ".join(json.loads(r.stdout)["warnings"]) + r.stderr
    assert not re.search(r"\d+\.\d{3,} ?(vol |wt )?%", text), re.search(r".{20}\d+\.\d{3,} ?(vol |wt )?%", text)


def test_recovery_at_the_end_of_the_estimate_prints_as_a_lower_bound(demo_paths, tmp_path):
    # The D86 estimate stops at 95 %: a recovery read beyond it is a lower bound, printed "≥ 95".
    p = tmp_path / "lim.toml"
    p.write_text('[[limit]]\ncut = "diesel"\nproperty = "recovered_at_350c_pct"\nmin = 99.0\n'
                 'label = "diesel recovered at 350 °C"\n')
    r = runner.invoke(app, ["yields", demo_paths[0], "--limits", str(p)])
    assert "diesel recovered at 350 °C: ≥ 95 %, needs >= 99 %" in r.stdout
    d = json.loads(runner.invoke(app, ["yields", demo_paths[0], "--limits", str(p), "--json"]).stdout)
    assert "lower bound" in d["limits"][0]["note"]


def test_blank_template_filled_in_crude_and_distillation_runs(tmp_path):
    # The template as written: only the crude and distillation sheets filled; the light-ends components it
    # lists without amounts, the empty vacuum and narrow-cut sheets are not used.
    import openpyxl

    path = tmp_path / "blank.xlsx"
    assert runner.invoke(app, ["template", str(path)]).exit_code == 0
    wb = openpyxl.load_workbook(path)
    ws = wb["crude"]
    rows = {ws.cell(row=i, column=1).value: i for i in range(1, ws.max_row + 1)}
    ws.cell(row=rows["name"], column=2, value="Template Crude")
    ws.cell(row=rows["api_gravity"], column=2, value=31.0)
    ws = wb["distillation"]
    for i, (p, t) in enumerate([(5, 60), (20, 150), (40, 260), (60, 380), (80, 520)], start=ws.max_row + 1):
        ws.cell(row=i, column=1, value=p)
        ws.cell(row=i, column=2, value=t)
    wb.save(path)
    r = runner.invoke(app, ["yields", str(path), "--json"])
    assert r.exit_code == 0, r.stderr
    assert json.loads(r.stdout)["assay"]["name"] == "Template Crude"
    assert "not used" in openpyxl.load_workbook(path)["light ends"]["A1"].value


def test_every_sheet_prints_to_the_page_width_with_a_header_and_numbers_formatted(tmp_path, demo_paths):
    # Printed or saved as PDF, a table must not split labels from values across pages (common practice, no
    # source): every sheet fits the page width, repeats its header row, names the report and says "estimates
    # for screening"; every numeric cell has a number format.
    import openpyxl

    r = runner.invoke(app, ["yields", demo_paths[0], "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    wb = openpyxl.load_workbook(tmp_path / "Selkie_Light_yields.xlsx")
    for ws in wb.worksheets:
        assert ws.sheet_properties.pageSetUpPr.fitToPage and ws.page_setup.fitToWidth == 1, ws.title
        assert "estimates for screening" in ws.oddHeader.center.text and "Selkie Light" in ws.oddHeader.center.text
        if ws.max_column > 8:
            assert ws.page_setup.orientation == "landscape", ws.title
        for row in ws.iter_rows(min_row=2):
            for c in row:
                if isinstance(c.value, float):
                    assert c.number_format != "General", (ws.title, c.coordinate)


@pytest.mark.parametrize("command", ["yields", "check", "template", "convert", "compare", "blend", "vectors", "shift",
                                     "sweep", "optimize", "explore"])
def test_help_shows_plain_metavars_and_the_cut_names(command):
    # A user reads "--cuts FILE", not "--cuts <file>" or "assays... <list[str]>" (common practice, no source).
    r = runner.invoke(app, [command, "--help"], env={"COLUMNS": "100"})
    assert r.exit_code == 0
    tags = re.findall(r"<(?:str|float|int|file|dir|path|list\[[^\]]*\]|[a-z]+ range|[A-Za-z0-9-]+\|[^>]*)>", r.stdout)
    assert tags == [], tags
    if "--end NAME=TEMP_C" in r.stdout:
        from assaycut.cutting.cutset import default_cut_set

        text = " ".join(r.stdout.split())
        assert "quote a name with spaces" in text
        assert all(n in text for n in default_cut_set().names[:-1])
