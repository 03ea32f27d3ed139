"""The library engine: many crudes cut as arrays must equal one-by-one cutting exactly."""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.cutting.cutset import Cut, CutSet, default_cut_set
from assaycut.cutting.ideal import FLAG_SETS, cut_columns
from assaycut.cutting.library_engine import cut_library, library_summary
from assaycut.cutting.model_rows import BatchModel
from assaycut.io import load_assay
from assaycut.model.assay import Assay, CurveData
from assaycut.model.crude import build_model
from tests.helpers import reference_inverse


@pytest.fixture(scope="module")
def models():
    from assaycut.io.tomlfiles import demo_assay_paths

    ms = [build_model(load_assay(p)) for p in demo_assay_paths()]
    # a crude without narrow cuts or sulfur, and a short curve, to mix node counts and missing data
    ms.append(build_model(Assay("bare", 0.88, [CurveData("TBP", "vol", np.array([5.0, 30.0, 60.0]),
                                                         np.array([60.0, 220.0, 400.0]))])))
    return ms


@pytest.mark.parametrize("cs", [default_cut_set(), CutSet([Cut("a", 100.0), Cut("b", 250.0, swing=True),
                                                          Cut("c", 420.0), Cut("d", None)])])
def test_batch_equals_single(models, cs):
    # Identity: the batched engine and the single-assay engine compute the same numbers.
    names, cols = cut_library(models, cs)
    _, ends = cs.reported()
    for r, m in enumerate(models):
        single = cut_columns(BatchModel([m]), ends[None, :])
        for flag_set in FLAG_SETS:
            est = single.pop(flag_set)
            for key in set(est) | set(cols[flag_set]):
                one = est[key][0] if key in est else np.zeros(len(names), bool)
                assert np.array_equal(cols[flag_set][key][r], one), (flag_set, key, r)
        for key, val in single.items():
            np.testing.assert_allclose(np.asarray(cols[key][r], float), np.asarray(val[0], float),
                                       rtol=1e-12, atol=1e-9, equal_nan=True, err_msg=f"{key} of crude {r}")


def test_library_summary_rows(models):
    from assaycut.io.tomlfiles import demo_assay_paths

    assays = [load_assay(p) for p in demo_assay_paths()]
    df = library_summary(assays, models[:3], default_cut_set())
    assert list(df["crude"]) == ["Selkie Light", "Brannock Blend", "Tarn Heavy"]
    vol = df[[c for c in df.columns if c.endswith(" vol %")]].sum(axis=1)
    np.testing.assert_allclose(vol, 100.0, atol=1e-9)


def test_parallel_run_identical_to_serial(tmp_path, demo_paths):
    import json
    import shutil

    from assaycut.cli.batch_runner import YieldJob, run_batch
    from assaycut.io.tomlfiles import read_limits
    from assaycut.report.jsonout import yield_json

    paths = []
    for i in range(6):
        p = tmp_path / f"a{i}.xlsx"
        shutil.copy(demo_paths[i % 3], p)
        paths.append(str(p))
    job = YieldJob(default_cut_set(), read_limits())
    serial, _, f1 = run_batch(paths, job, parallel=False, progress=False)
    para, _, f2 = run_batch(paths, job, parallel=True, progress=False)
    assert f1 == f2 == []
    assert json.dumps([yield_json(r) for r in serial]) == json.dumps([yield_json(r) for r in para])


def test_batch_skips_bad_file_and_writes_summary(tmp_path, demo_paths):
    import shutil

    from typer.testing import CliRunner

    from assaycut.cli import app

    lib = tmp_path / "lib"
    lib.mkdir()
    for p in demo_paths:
        shutil.copy(p, lib)
    (lib / "broken.xlsx").write_bytes(b"not a workbook")
    r = CliRunner().invoke(app, ["yields", str(lib), "--out", str(tmp_path / "o"), "--summary-only"])
    assert r.exit_code == 2
    assert "skipped:" in r.stderr and "broken.xlsx" in r.stderr and "1 of 4 assays failed" in r.stderr
    assert "Traceback" not in r.stderr
    assert sorted(p.name for p in (tmp_path / "o").iterdir()) == ["library_long.csv", "library_summary.csv",
                                                            "library_summary.xlsx"]
    import openpyxl

    ws = openpyxl.load_workbook(tmp_path / "o" / "library_summary.xlsx")["library"]
    assert ws.max_row == 4  # header + three crudes
    assert isinstance(ws.cell(row=2, column=4).value, float)


def test_stacked_inverse_equals_the_reference_and_each_rows_own():
    # The row-wise fast inverse of stacked splines (padded rows) against the reference solve
    # and against each row's own Pchip.inverse, on the demo crudes' TBP curves and random monotone curves with
    # flat steps: equal to 1e-9 °C where the root is well conditioned (the allowance of
    # tests/model/test_spline.py where the curve is nearly flat), and never NaN.
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import demo_assay_paths
    from assaycut.model.crude import build_model
    from assaycut.methods.pchip import Pchip

    rng = np.random.default_rng(7)
    splines = [build_model(load_assay(p)).curve.spline for p in demo_assay_paths()]
    while len(splines) < 150:
        x = np.unique(rng.uniform(-50.0, 900.0, rng.integers(2, 40)))
        if x.size >= 2:
            steps = rng.choice([0.0, 0.0, 0.5, 3.0, 20.0], x.size) * rng.uniform(0, 1, x.size)
            splines.append(Pchip(x, np.cumsum(steps)))
    b = Pchip.stack(splines)
    q = np.stack([rng.uniform(s.y[0] - 1.0, s.y[-1] + 1.0, 200) for s in splines])
    q[:, :3] = np.stack([s.y[[0, -1, len(s.y) // 2]] for s in splines])  # nodes themselves
    fast = b.inverse(q)
    ref = np.stack([reference_inverse(s, row) for s, row in zip(splines, q)])
    own = np.stack([s.inverse(row) for s, row in zip(splines, q)])
    assert np.all(np.isfinite(fast))
    for r, s in enumerate(splines):
        qc = np.clip(q[r], s.y[0], s.y[-1])
        slope = np.abs(s(ref[r] + 1e-3) - s(ref[r] - 1e-3)) / 2e-3
        rounding = 1e-13 * max(1.0, float(np.max(np.abs(s.y))))
        allow = 1e-9 + (np.abs(s(ref[r]) - qc) + rounding) / np.maximum(slope, 1e-300)
        assert np.all(np.abs(fast[r] - ref[r]) <= allow), r
        assert fast[r].tobytes() == own[r].tobytes(), r  # a row's answer is its own, to the last bit


def test_json_batch_cut_together_equals_each_file_alone(tmp_path, demo_paths):
    # `yields --json` over many files cuts them together (library engine, in chunks, serially or in worker
    # processes) and joins objects encoded in the workers; each object must equal that file's own
    # `yields FILE --json` to 1e-9 (the fast path against the reference path), with the same texts.
    import json
    import shutil

    from typer.testing import CliRunner

    from assaycut.cli import app
    from tests.cutting.test_cut_table import assert_close_docs

    rng = np.random.default_rng(5)  # invented quick curves, inputs only
    books, curves = tmp_path / "books", tmp_path / "curves"
    books.mkdir()
    curves.mkdir()
    for i in range(11):
        shutil.copy(demo_paths[i % 3], books / f"d{i:02d}.xlsx")
    for i in range(55):  # 50 or more: worker processes
        t = np.array([20.0, 90.0, 180.0, 270.0, 380.0, 480.0, 560.0]) * rng.uniform(0.95, 1.05)
        (curves / f"q{i:02d}.csv").write_text("vol_pct,temp_c\n" + "".join(
            f"{p},{x:.1f}\n" for p, x in zip((2, 10, 30, 50, 70, 85, 95), t)))
    runner = CliRunner()
    for folder, extra in ((books, []), (curves, ["--api", "31"])):
        r = runner.invoke(app, ["yields", str(folder), "--json", *extra])
        assert r.exit_code == 0, r.stderr
        assert r.stdout.count("\n") == 1  # more than 10 assays: one line
        doc = json.loads(r.stdout)
        assert doc["errors"] == [] and len(doc["assays"]) == len(list(folder.iterdir()))
        for obj in doc["assays"]:
            one = runner.invoke(app, ["yields", obj["assay"]["source"], "--json", *extra])
            assert_close_docs(json.loads(one.stdout), obj, obj["assay"]["source"])


def test_summary_rows_made_in_the_workers_give_the_same_files(tmp_path, demo_paths):
    # Identity of two paths: a summary-only batch sends back each assay's summary row and long-table lines
    # (made with its chunk, in the workers) instead of its whole result; the library files must be the same
    # bytes (CSV) and values (xlsx) as when the parent makes them from whole results.
    import shutil

    import openpyxl

    from assaycut.cli.batch_runner import SummaryResult, YieldJob, run_batch
    from assaycut.io.tomlfiles import read_limits
    from assaycut.report.write import write_library_summary

    paths = []
    for i in range(23):
        p = tmp_path / "in" / f"a{i:02d}.xlsx"
        p.parent.mkdir(exist_ok=True)
        shutil.copy(demo_paths[i % 3], p)
        paths.append(str(p))
    bad = tmp_path / "in" / "bad.xlsx"
    bad.write_text("not a workbook")
    paths.insert(5, str(bad))
    cs = default_cut_set()
    files = {}
    for summary in (False, True):
        for parallel in (False, True):
            job = YieldJob(cs, read_limits(None), output="summary" if summary else "result")
            results, _, failures = run_batch(paths, job, parallel=parallel, progress=False)
            assert [p for p, _ in failures] == [str(bad)]
            assert all(isinstance(r, SummaryResult) for r in results) == summary
            out = tmp_path / f"out_{summary}_{parallel}"
            write_library_summary(results, cs, out, tuple(paths))
            ws = openpyxl.load_workbook(out / "library_summary.xlsx")["library"]
            files[summary, parallel] = ((out / "library_summary.csv").read_bytes(),
                                        (out / "library_long.csv").read_bytes(),
                                        [[c.value for c in row] for row in ws.iter_rows()])
    ref = files[False, False]
    assert len(ref[2]) == 1 + 23

    def same(a, b):
        # numbers to 1e-9 (the library engine cuts chunk by chunk, and a chunk's rows agree with each assay
        # cut alone to 1e-9, not to the last bit), every text exactly
        try:
            return float(a) == pytest.approx(float(b), rel=1e-9, abs=1e-12)
        except (TypeError, ValueError):
            return a == b

    for key, (summary_csv, long_csv, cells) in files.items():
        for got, want in ((summary_csv, ref[0]), (long_csv, ref[1])):
            g = [line.split(",") for line in got.decode().splitlines()]
            w = [line.split(",") for line in want.decode().splitlines()]
            assert len(g) == len(w) and all(len(x) == len(y) for x, y in zip(g, w)), key
            assert all(same(x, y) for gl, wl in zip(g, w) for x, y in zip(gl, wl)), key
        assert all(same(x, y) for gr, wr in zip(cells, ref[2]) for x, y in zip(gr, wr)), key
