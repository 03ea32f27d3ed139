"""Nothing lost, nothing smuggled: interruption leaves no partial files; text is escaped against formula
injection; formulas in inputs are never evaluated."""

from __future__ import annotations

import csv
import os
import shutil
import signal
import subprocess
import sys
import time

import pytest
from typer.testing import CliRunner

from assaycut.cli import app

runner = CliRunner()


@pytest.mark.parametrize("sig,code", [(signal.SIGTERM, 143), (signal.SIGINT, 130)])
def test_interrupted_run_leaves_no_partial_files(tmp_path, demo_paths, sig, code):
    src = tmp_path / "in"
    src.mkdir()
    for i in range(40):
        shutil.copy(demo_paths[i % 3], src / f"a{i:02d}.xlsx")
    out = tmp_path / "out"
    proc = subprocess.Popen([sys.executable, "-m", "assaycut", "yields", str(src), "--out", str(out)],
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    deadline = time.time() + 60
    while time.time() < deadline and not (out.exists() and any(out.rglob("*.png"))):
        time.sleep(0.05)  # wait until the run is writing reports
    proc.send_signal(sig)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == code, err
    assert "Traceback" not in err
    assert "no partial report was left" in err
    leftovers = [p for p in out.rglob("*") if p.name.startswith(".") or p.suffix == ".part"]
    assert leftovers == []
    import openpyxl

    for x in out.rglob("*.xlsx"):  # every report present is whole
        openpyxl.load_workbook(x).close()


def test_formula_injection_escaped_in_reports(tmp_path, book):
    name = '=HYPERLINK("http://example.invalid","x")'

    def mutate(s):
        s["crude"][2][1] = name
        s["crude"][3][1] = "+cmd|' /C calc'!A0"
    path = book(mutate)
    r = runner.invoke(app, ["yields", str(path), "--out", str(tmp_path / "o")])
    assert r.exit_code == 0, r.stderr
    import openpyxl

    files = list((tmp_path / "o").iterdir())
    xlsx = next(p for p in files if p.suffix == ".xlsx")
    wb = openpyxl.load_workbook(xlsx)
    cells = [c for ws in wb.worksheets for row in ws.iter_rows() for c in row if isinstance(c.value, str)]
    assert not any(c.data_type == "f" for c in cells)
    assert any(c.value == "'" + name for c in cells)
    assert not any(c.value.startswith(("=", "+", "@")) for c in cells)


def test_csv_cells_escaped():
    from assaycut.report.write import csv_text

    text = csv_text(["name", "v"], [["=1+2", 1.0], ["-3", 2.0], ["@SUM(A1)", float("nan")]])
    rows = list(csv.reader(text.splitlines()))
    assert rows[1][0] == "'=1+2" and rows[2][0] == "'-3" and rows[3][0] == "'@SUM(A1)" and rows[3][1] == ""


def test_formulas_in_inputs_are_not_evaluated(book):
    from assaycut.errors import InputError
    from assaycut.io import load_assay

    def mutate(s):
        s["crude"][4][1] = "=30+3"
    with pytest.raises(InputError, match=r"found the formula '=30\+3'; expected a number \(formulas are not evaluated"):
        load_assay(str(book(mutate)))


def test_output_over_input_refused(good_book):
    r = runner.invoke(app, ["blend", f"{good_book}=100", "--out", str(good_book)])
    assert r.exit_code == 2 and "refusing to write the report over the input file" in r.stderr


def test_existing_report_replaced_whole(tmp_path):
    out = tmp_path / "o"
    assert runner.invoke(app, ["yields", "--out", str(out)]).exit_code == 0
    first = {p.name: p.stat().st_size for p in out.iterdir()}
    assert runner.invoke(app, ["yields", "--out", str(out)]).exit_code == 0
    assert {p.name for p in out.iterdir()} == set(first)  # replaced, no temporary files beside them
    assert not [p for p in out.iterdir() if p.name.startswith(".")]


def test_help_and_convert_do_not_import_heavy_libraries():
    # Fast start (library issue): --help and convert must not import pandas, scipy or matplotlib.
    code = ("import sys; from assaycut.cli import app; from typer.testing import CliRunner; "
            "r = CliRunner().invoke(app, {args!r}); assert r.exit_code == 0, r.output; "
            "print(sorted(m for m in ('pandas', 'scipy', 'matplotlib') if m in sys.modules))")
    for args in (["--help"], ["convert", "--json", "50=200", "10=150", "30=180"]):
        out = subprocess.run([sys.executable, "-c", code.format(args=args)], capture_output=True, text=True,
                             env={**os.environ, "PYTHONWARNINGS": "ignore"})
        assert out.returncode == 0, out.stderr
        assert out.stdout.strip() == "[]", (args, out.stdout)
