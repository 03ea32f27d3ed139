"""Nothing lost, nothing smuggled: interruption leaves no partial files; text is escaped against formula
injection; formulas in inputs are never evaluated."""

from __future__ import annotations

import csv
import json
import os
import shutil
import signal
import subprocess
import sys
import time

import pytest
from typer.testing import CliRunner

from assaycut.cli import app
from tests.helpers import ctrl_c_as_at_a_terminal

runner = CliRunner()


@pytest.mark.parametrize("sig,code", [(signal.SIGTERM, 143), (signal.SIGINT, 130)])
def test_interrupted_run_leaves_no_partial_files(tmp_path, demo_paths, sig, code):
    src = tmp_path / "in"
    src.mkdir()
    for i in range(40):
        shutil.copy(demo_paths[i % 3], src / f"a{i:02d}.xlsx")
    out = tmp_path / "out"
    proc = subprocess.Popen([sys.executable, "-m", "assaycut", "yields", str(src), "--out", str(out)],
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True,
                            preexec_fn=ctrl_c_as_at_a_terminal)
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

    for x in out.rglob("*.xlsx"):  # every report file present is whole
        openpyxl.load_workbook(x).close()
    core = ("_yields.xlsx", "_cuts.csv", "_long.csv", "_summary.md", "_tbp.png", "_yields.png", "_properties.png")
    for folder in (d for d in out.iterdir() if d.is_dir()):  # and so is every report set (README promise)
        names = [p.name for p in folder.iterdir()]
        assert not names or all(any(n.endswith(c) for n in names) for c in core), (folder, sorted(names))


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
    # --help loads not even numpy (its --end text names the shipped cuts from plain data)
    code = ("import sys; from assaycut.cli import app; from typer.testing import CliRunner; "
            "r = CliRunner().invoke(app, ['yields', '--help']); assert r.exit_code == 0, r.output; "
            "print('numpy' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         env={**os.environ, "PYTHONWARNINGS": "ignore"})
    assert out.returncode == 0 and out.stdout.strip() == "False", (out.stdout, out.stderr)


def test_report_file_modes_follow_the_umask_and_keep_an_existing_mode(tmp_path):
    # POSIX: a new file gets 0666 less the umask (0644 under umask 022); replacing a file keeps its mode.
    old = os.umask(0o022)
    try:
        assert runner.invoke(app, ["yields", "--out", str(tmp_path)]).exit_code == 0
        csvp = tmp_path / "Selkie_Light_cuts.csv"
        assert csvp.stat().st_mode & 0o777 == 0o644
        csvp.chmod(0o444)
        assert runner.invoke(app, ["yields", "--out", str(tmp_path)]).exit_code == 0
        assert csvp.stat().st_mode & 0o777 == 0o444
    finally:
        os.umask(old)


def test_report_set_checked_before_any_file_is_written_and_stale_parts_removed(tmp_path):
    (tmp_path / "Selkie_Light_summary.md").mkdir()
    r = runner.invoke(app, ["yields", "--out", str(tmp_path)])
    assert r.exit_code == 2 and "in the way of a report file; nothing was written" in r.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["Selkie_Light_summary.md"]
    (tmp_path / "Selkie_Light_summary.md").rmdir()
    stale = tmp_path / ".Selkie_Light_yields.xlsx.k3j2h1.part"  # left by a killed run
    stale.write_bytes(b"half")
    assert runner.invoke(app, ["yields", "--out", str(tmp_path)]).exit_code == 0
    assert not stale.exists()


def test_read_only_report_folder_is_one_line_exit_2(tmp_path, monkeypatch):
    # root may write anywhere, so the folder's permission check is exercised by refusing write access
    real = os.access
    monkeypatch.setattr(os, "access", lambda p, mode: False if str(p) == str(tmp_path) and mode & os.W_OK
                        else real(p, mode))
    r = runner.invoke(app, ["yields", "--out", str(tmp_path)])
    assert r.exit_code == 2
    assert r.stderr.strip().endswith("the report folder is read-only; give another --out")


def test_batch_report_folders_never_collide(tmp_path, book):
    # "Crude A", "Crude/A" and "Crude:A" give the same folder name; each gets its own folder, and it is said.
    from tests.corpus import set_cell

    paths = [book(set_cell("crude", 2, 1, n), name=f"c{i}.xlsx") for i, n in enumerate(["Crude A", "Crude/A",
                                                                                         "Crude:A"])]
    out = tmp_path / "out"
    r = runner.invoke(app, ["yields", *map(str, paths), "--out", str(out)])
    assert r.exit_code == 0, r.stderr
    folders = sorted(p.name for p in out.iterdir() if p.is_dir())
    assert folders == ["Crude_A", "Crude_A_2", "Crude_A_3"]
    assert all(len(list((out / f).glob("*_yields.xlsx"))) == 1 for f in folders)
    assert r.stderr.count("is taken by another assay of this run") == 2
    assert not list(out.rglob(".assaycut*"))  # no claim markers left in the reports


def test_control_characters_never_reach_the_terminal(tmp_path):
    p = tmp_path / "crude\x1b]0;owned\x07.csv"
    p.write_text("vol_pct,temp_c\n10,abc\n")
    r = runner.invoke(app, ["check", str(p), "--api", "30"])
    out = r.stdout + r.stderr
    assert "\x1b" not in out and "\x07" not in out
    assert "\\x1b]0;owned\\x07" in out


def test_markdown_summary_escapes_names(tmp_path, book):
    from tests.corpus import set_cell

    p = book(set_cell("crude", 2, 1, "Evil <script>alert(1)</script> [link](http://x) *bold*"))
    assert runner.invoke(app, ["yields", str(p), "--out", str(tmp_path)]).exit_code == 0
    md = next(tmp_path.glob("*_summary.md")).read_text()
    first = md.splitlines()[0]
    assert first == "# Yield report: Evil &lt;script&gt;alert(1)&lt;/script&gt; \\[link\\](http://x) \\*bold\\*"
    assert "<script>" not in md
    # a line break in a name cannot reach the summary: the reader refuses control characters in names
    q = book(set_cell("crude", 2, 1, "Evil\n# injected"), name="nl.xlsx")
    r = runner.invoke(app, ["yields", str(q), "--out", str(tmp_path / "q")])
    assert r.exit_code == 2 and "control character" in r.stderr


def test_a_curve_file_name_with_hidden_characters_gives_a_plain_crude_name(tmp_path):
    # U+2066 (left-to-right isolate) and U+200B (zero-width space) in a file name: the crude name made from it
    # has "_" in their place (JSON and reports), and the file name is printed escaped, never raw.
    p = tmp_path / "Selkie\u2066Light\u200b.csv"
    p.write_text("vol_pct,temp_c\n2,20\n10,90\n30,180\n50,270\n70,380\n90,520\n")  # invented curve
    r = runner.invoke(app, ["yields", str(p), "--api", "33", "--json"])
    assert r.exit_code == 0, r.stderr
    assert json.loads(r.stdout)["assay"]["name"] == "Selkie_Light_"
    r = runner.invoke(app, ["yields", str(p)])  # no --api: the error line names the file
    assert r.exit_code == 2
    assert "Selkie\\u2066Light\\u200b.csv" in r.stderr and "\u2066" not in r.stderr and "\u200b" not in r.stderr


def test_library_warnings_never_reach_stderr(capsys):
    import warnings

    from assaycut.cli.common import guarded

    @guarded
    def noisy():
        import numpy as np

        warnings.warn("glyph missing", UserWarning)
        return np.log(np.array([0.0]))  # RuntimeWarning: divide by zero

    noisy()
    assert capsys.readouterr().err == ""


def test_blend_plan_files_written_before_printing(tmp_path, demo_paths):
    # Piped into `head -1`, the command must still write its files (written first, printed after).
    from tests.helpers import DEMO_PRICES

    out = tmp_path / "mix.xlsx"
    cmd = (f"{sys.executable} -m assaycut blend --optimize '{demo_paths[0]}=20:60' '{demo_paths[2]}' --prices "
           f"'{DEMO_PRICES}' --out '{out}' | head -1")
    r = subprocess.run(cmd, shell=True, capture_output=True, text=True, timeout=120)
    assert r.stdout.startswith("Optimal blend")
    assert out.exists() and (tmp_path / "blend_plan.json").exists()


def test_core_errors_in_a_batch_name_the_file(tmp_path, monkeypatch):
    import json

    from assaycut.errors import CurveError

    good = tmp_path / "a.csv"
    good.write_text("vol_pct,temp_c\n2,20\n10,90\n50,270\n90,520\n")
    bad = tmp_path / "b.csv"
    bad.write_text("vol_pct,temp_c\n2,20\n10,90\n50,270\n90,520\n")
    import assaycut.yields as y

    real = y.build_model

    def fail_for_b(assay, method="daubert-1994", reconcile=False):
        if assay.name == "b":
            raise CurveError("the curve cannot be modelled")
        return real(assay, method, reconcile=reconcile)

    def fail_for_b_together(assays, method="daubert-1994", reconcile=False):  # the batch builder: errors in place
        out = []
        for a in assays:
            try:
                out.append(fail_for_b(a, method, reconcile))
            except CurveError as e:
                out.append(e)
        return out

    monkeypatch.setattr(y, "build_model", fail_for_b)
    monkeypatch.setattr(y, "build_models", fail_for_b_together)
    r = runner.invoke(app, ["yields", str(good), str(bad), "--api", "30", "--json"])
    assert r.exit_code == 2
    errors = json.loads(r.stdout)["errors"]
    assert len(errors) == 1 and errors[0].startswith(f"{bad}: the curve cannot be modelled")


LOST_INTERRUPT = r'''
import sys, weakref
from assaycut import files
from assaycut.cli import _unraisable

sys.unraisablehook = _unraisable(sys.unraisablehook)
import os
stage = sys.argv[1]
files._PENDING.add(stage)
os.mkdir(stage)
open(os.path.join(stage, "report.xlsx"), "w").write("half a report")


class Plot:
    pass


def callback(_ref):  # Ctrl-C arriving while Python runs a weak-reference callback
    raise KeyboardInterrupt


p = Plot()
r = weakref.ref(p, callback)
del p  # the callback runs here; its exception cannot propagate
print("went on after Ctrl-C")
'''


def test_ctrl_c_inside_a_weakref_callback_still_stops_the_run(tmp_path):
    # Python cannot raise KeyboardInterrupt out of a weak-reference callback (it prints "Exception ignored in"
    # with a traceback and goes on; CPython documentation, sys.unraisablehook); matplotlib runs such callbacks
    # while drawing, so a Ctrl-C there was lost and a batch went on writing reports.  The hook stops it.
    part = tmp_path / ".assaycut-stage-1-abc"
    r = subprocess.run([sys.executable, "-c", LOST_INTERRUPT, str(part)], capture_output=True, text=True,
                       timeout=60)
    assert r.returncode == 130, r.stderr
    assert "went on" not in r.stdout
    assert "Traceback" not in r.stderr
    assert r.stderr.strip() == "assaycut: error: interrupted; no partial report was left"
    assert not part.exists()


HELD_LOCK_INTERRUPT = r'''
import time
from assaycut.cli.batch_runner import worker_pool
from assaycut.cli.common import guarded


def slow(x):
    time.sleep(1.0)
    return x


@guarded
def batch():
    with worker_pool(2) as pool:
        fut = pool.submit(slow, 1)
        fut._condition.acquire()  # Ctrl-C arrives while a future's lock is held (as inside as_completed)
        raise KeyboardInterrupt


batch()
print("went on after Ctrl-C")
'''


def test_ctrl_c_while_a_pool_lock_is_held_still_exits(tmp_path):
    # A Ctrl-C can arrive while the main thread holds a worker-pool future's lock (between the lock calls of
    # as_completed, say); the normal interpreter exit then joins the pool's manager thread, which waits for
    # that lock for ever (this test hung so before).  The interrupt now ends the process at once after its
    # cleanup.  (concurrent.futures: the executor's atexit hook joins its threads; CPython source.)
    r = subprocess.run([sys.executable, "-c", HELD_LOCK_INTERRUPT], capture_output=True, text=True, timeout=30,
                       cwd=tmp_path)
    assert r.returncode == 130, r.stderr
    assert "went on" not in r.stdout
    assert r.stderr.strip() == "assaycut: error: interrupted; no partial report was left"


STOP_AT_RENAME = r'''
import os, signal, sys
from assaycut import cli

at, count, real = int(sys.argv[1]), [0], os.replace


def replace(src, dst):  # Ctrl-C as the at-th report file is moved into place
    if str(dst).endswith((".xlsx", ".csv", ".md", ".png")):
        count[0] += 1
        if count[0] == at:
            os.kill(os.getpid(), signal.SIGINT)
    real(src, dst)


os.replace = replace
sys.argv = ["assaycut", "yields", sys.argv[2], "--out", sys.argv[3]]
cli.main()
'''


@pytest.fixture(scope="module")
def earlier_report(tmp_path_factory):
    """A report made with diesel ending at 300 °C (the default set ends it at 343 °C)."""
    from assaycut.io.tomlfiles import demo_assay_paths

    demo_paths = demo_assay_paths()
    out = tmp_path_factory.mktemp("earlier")
    r = subprocess.run([sys.executable, "-m", "assaycut", "yields", str(demo_paths[0]), "--end", "diesel=300",
                        "--out", str(out)], capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    return out


@pytest.mark.parametrize("at", [1, 4, 7])
def test_ctrl_c_while_a_set_is_placed_never_leaves_a_mix(tmp_path, earlier_report, demo_paths, at):
    # Over an earlier report, a default run is interrupted as its at-th file is moved into place: the folder
    # holds the earlier set or the new one, whole (by modification time: the new files are written after the
    # run starts), and the last line says which (before: 3 of 7 files new, and "no partial report was left").
    out = tmp_path / "r"
    shutil.copytree(earlier_report, out, copy_function=shutil.copy2)
    before = {p.name: p.stat().st_mtime_ns for p in out.iterdir()}
    time.sleep(0.01)
    t0 = time.time_ns()
    r = subprocess.run([sys.executable, "-c", STOP_AT_RENAME, str(at), str(demo_paths[0]), str(out)],
                       capture_output=True, text=True, timeout=120, preexec_fn=ctrl_c_as_at_a_terminal)
    assert r.returncode == 130, r.stderr
    after = {p.name: p.stat().st_mtime_ns for p in out.iterdir()}
    new = {n for n, t in after.items() if t >= t0}
    assert not any(n.startswith(".") for n in after)
    assert new == set() or new == set(after), f"a mix: new {sorted(new)}, earlier {sorted(set(after) - new)}"
    if new:
        assert "was complete; it was written whole" in r.stderr
        assert set(after) >= set(before) - {n for n in before if n.endswith("_products.png")}
    else:
        assert after == before and "no partial report was left" in r.stderr
