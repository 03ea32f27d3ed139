"""Benchmark of the assay-library engine.

    python benchmarks/run.py            # full run: 10,000 generated assays
    python benchmarks/run.py --smoke    # tiny sizes, for CI (never judged on speed)

Prints a readable table, then as its last line one JSON object with library_vs_naive, library_vs_compiled (the
engine's cut against the same operations as a compiled loop, benchmarks/compiled.py; with numba installed,
the ``[bench]`` extra), sweep_ms, help_vs_bare,
scaling_10k_vs_1k, peak_mb, model_build_ms, batched_vs_alone (models built together against one at a time),
and the command-line figures json_400_vs_40, summary_400_vs_40 (with json_startup_s and json_per_assay_ms:
the fixed start-up and the marginal cost of one assay, from the two batch sizes), optimize_vs_yields,
report_vs_json (the default run, every report file written, against yields --json),
uncertainty_2000_vs_yields, workbooks_10k_s and
workbooks_10k_vs_read, and explore_update_ms (one explorer update of one crude, server time), with
the raw timings.  Figures are medians of several runs.  The generated library perturbs the three invented
demo crudes (temperatures, percents, gravity and sulfur), so every assay has its own curve, density and
sulfur distribution.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from assaycut.cutting.cutset import Cut, CutSet  # noqa: E402
from assaycut.model.assay import Assay, CurveData, LightEnds, NarrowCuts  # noqa: E402
from assaycut.model.crude import build_model, build_models  # noqa: E402

CUTS8 = CutSet([Cut("light ends", 15.0), Cut("light naphtha", 85.0), Cut("heavy naphtha", 177.0),
                Cut("kerosene", 232.0), Cut("light gas oil", 290.0), Cut("heavy gas oil", 343.0),
                Cut("vacuum gas oil", 566.0), Cut("vacuum residue", None)], "benchmark 8 cuts")


def median_time(fn, repeats: int) -> float:
    out = []
    for _ in range(repeats):
        t = time.perf_counter()
        fn()
        out.append(time.perf_counter() - t)
    return statistics.median(out)


def generate_library(n: int, seed: int = 7) -> list[Assay]:
    """n assays made by perturbing the demo crudes (temperatures +-4 %, gravity +-2 %, sulfur +-20 %)."""
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import demo_assay_paths

    bases = [load_assay(p) for p in demo_assay_paths()]
    rng = np.random.default_rng(seed)
    out = []
    for i in range(n):
        b = bases[i % len(bases)]
        f_t = rng.uniform(0.96, 1.04)
        f_sg = rng.uniform(0.98, 1.02)
        f_s = rng.uniform(0.8, 1.2)
        curves = [CurveData(c.method, c.basis, c.percent.copy(), (c.temp_c + 273.15) * f_t - 273.15,
                            c.pressure_mmhg, c.where) for c in b.curves]
        nc = b.narrow_cuts
        narrow = NarrowCuts((nc.start_c + 273.15) * f_t - 273.15, (nc.end_c + 273.15) * f_t - 273.15, nc.vol_pct,
                            nc.wt_pct, nc.sg * f_sg, nc.sulfur_wt_pct * f_s)
        out.append(Assay(f"gen{i:05d}", b.sg * f_sg, curves, sulfur_wt_pct=b.sulfur_wt_pct * f_s, narrow_cuts=narrow,
                         light_ends=LightEnds(dict(b.light_ends.amounts), b.light_ends.basis)))
    return out


def naive_cut(models, cut_set) -> None:
    """A plain per-assay, per-cut scipy implementation of the same property set, for comparison.

    One PchipInterpolator per assay for V(T), T(V), SG(v) and S(w); scipy.integrate.quad for each cut's
    volume-average TBP, mean SG, mass and mean sulfur; the cut's D86 by the dict-based Daubert 1994 inverse.
    """
    from scipy.integrate import quad
    from scipy.interpolate import PchipInterpolator

    from assaycut.methods.d86 import tbp_to_d86_daubert_1994

    ends = cut_set.ends_c
    for m in models:
        c = m.curve.spline
        v_of_t = PchipInterpolator(c.x, c.y)
        keep = np.concatenate([[True], np.diff(c.y) > 0])
        t_of_v = PchipInterpolator(c.y[keep], c.x[keep])
        sg = PchipInterpolator(m.sg_dist.x, m.sg_dist.y, extrapolate=True)
        sul = PchipInterpolator(m.sulfur_dist.x, m.sulfur_dist.y, extrapolate=True) if m.sulfur_dist else None
        v = np.concatenate([[0.0], v_of_t(ends), [100.0]])
        mass = [quad(lambda x: float(sg(x)), 0.0, b, limit=100)[0] for b in v]
        for a, b, ma, mb in zip(v[:-1], v[1:], mass[:-1], mass[1:]):
            if b - a <= 1e-9:
                continue
            quad(lambda x: float(t_of_v(x)), a, b, limit=100)
            wa, wb = ma / m.sg, mb / m.sg
            if sul is not None:
                quad(lambda x: float(sul(x)), wa, wb, limit=100)
            tb = {p: float(t_of_v(a + p / 100.0 * (b - a))) for p in (0, 10, 30, 50, 70, 90, 95)}
            tbp_to_d86_daubert_1994(tb)


def help_time(cmd: list[str], repeats: int) -> float:
    times = []
    for _ in range(repeats):
        t = time.perf_counter()
        subprocess.run(cmd, capture_output=True, check=True)
        times.append(time.perf_counter() - t)
    return statistics.median(times)


BARE_APP = '''
import typer
app = typer.Typer(add_completion=False)
for _n in ("yields", "check", "template", "convert", "compare", "blend", "shift", "sweep"):
    app.command(name=_n)(lambda: None)
app()
'''


def peak_child(n: int) -> None:
    """Child process: generate, model and cut n assays; print the peak resident memory in MB."""
    import resource

    from assaycut.cutting.library_engine import cut_library

    models = [build_model(a) for a in generate_library(n)]
    cut_library(models, CUTS8)
    print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0)


QUICK_CSV = "vol_pct,temp_c\n" + "".join(f"{p},{{t{i}:.1f}}\n" for i, p in enumerate((2, 10, 30, 50, 70, 85, 95)))
QUICK_T = (20.0, 90.0, 180.0, 270.0, 380.0, 480.0, 560.0)


def write_quick_csvs(folder: Path, n: int, seed: int = 11) -> None:
    """n quick-curve CSVs (the invented demo curve shape, temperatures scaled by ±5 %)."""
    rng = np.random.default_rng(seed)
    folder.mkdir(parents=True, exist_ok=True)
    for i in range(n):
        f = rng.uniform(0.95, 1.05)
        (folder / f"c{i:05d}.csv").write_text(QUICK_CSV.format(**{f"t{k}": t * f for k, t in enumerate(QUICK_T)}))


def cli_time(args: list[str], repeats: int) -> float:
    """Median wall time of one assaycut command (a fresh process, as a user runs it). [s]"""
    return help_time([sys.executable, "-m", "assaycut", *args], repeats)


def cli_figures(smoke: bool) -> tuple[dict, dict]:
    """The command-line ratios: 400 vs 40 assays through ``yields --json`` and ``--summary-only``;
    ``optimize --prices``, ``--uncertainty 2000`` and ``--summary-only`` over many workbooks against their
    references."""
    import shutil

    from assaycut.io.tomlfiles import demo_assay_paths

    few, many, reps = (4, 12, 1) if smoke else (40, 400, 3)
    draws = 40 if smoke else 2000
    n_books = 30 if smoke else 10_000
    prices = str(ROOT / "assays_demo" / "prices_demo.toml")
    with tempfile.TemporaryDirectory() as d:
        d = Path(d)
        write_quick_csvs(d / "few", few)
        write_quick_csvs(d / "many", many)
        t_few = cli_time(["yields", str(d / "few"), "--api", "33", "--json"], reps)
        t_many = cli_time(["yields", str(d / "many"), "--api", "33", "--json"], reps)
        s_few = cli_time(["yields", str(d / "few"), "--api", "33", "--summary-only", "--out", str(d / "o1")], reps)
        s_many = cli_time(["yields", str(d / "many"), "--api", "33", "--summary-only", "--out", str(d / "o2")], reps)
        t_one = cli_time(["yields", "--json"], reps)
        t_report = cli_time(["yields", "--out", str(d / "report")], reps)  # the default run: every file written
        t_opt = cli_time(["optimize", "--prices", prices, "--json"], reps)
        t_unc = cli_time(["yields", "--json", "--uncertainty", str(draws)], 1 if not smoke else reps)
        books = d / "books"
        books.mkdir()
        demos = demo_assay_paths()
        for i in range(n_books):
            shutil.copy(demos[i % len(demos)], books / f"b{i:05d}.xlsx")
        t0 = time.perf_counter()
        for p in sorted(books.iterdir()):
            p.read_bytes()
        t_read = time.perf_counter() - t0
        t_books = cli_time(["yields", str(books), "--summary-only", "--out", str(d / "o3")], 1)
    per_assay = (t_many - t_few) / (many - few)  # the marginal cost of one more assay in a JSON batch
    figures = {"json_400_vs_40": t_many / t_few, "summary_400_vs_40": s_many / s_few,
               "json_startup_s": t_few - few * per_assay, "json_per_assay_ms": per_assay * 1000.0,
               "optimize_vs_yields": t_opt / t_one, "uncertainty_2000_vs_yields": t_unc / t_one,
               "report_vs_json": t_report / t_one,
               "workbooks_10k_s": t_books, "workbooks_10k_vs_read": t_books / t_read}
    raw = {"json_few_s": t_few, "json_many_s": t_many, "summary_few_s": s_few, "summary_many_s": s_many,
           "yields_json_s": t_one, "report_s": t_report, "optimize_s": t_opt, "uncertainty_s": t_unc,
           "uncertainty_draws": draws,
           "workbooks": n_books, "workbooks_read_s": t_read, "cli_few": few, "cli_many": many}
    return figures, raw


def explore_update_ms(smoke: bool) -> float:
    """Server time of one explorer update for one crude: ``POST /api/cut`` through the ASGI application
    (routing, token check, body parsing, the cut, JSON encoding), median over cut points moved 1 °C at a time.
    [ms]"""
    from starlette.testclient import TestClient

    from assaycut.cutting.cutset import default_cut_set
    from assaycut.explore.server import make_app
    from assaycut.explore.session import Explorer
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import demo_assay_paths, read_limits, read_prices

    paths = demo_assay_paths()
    ex = Explorer([(p, load_assay(p)) for p in paths], default_cut_set(), read_limits(None),
                  read_prices(str(ROOT / "assays_demo" / "prices_demo.toml")))
    client = TestClient(make_app(ex, "bench"), base_url="http://127.0.0.1")
    headers = {"Authorization": "Bearer bench"}
    times = []
    for k in range(5 if smoke else 40):
        body = {"assay": ex.names[k % len(ex.names)], "ends": {"kerosene": 222.0 + k, "diesel": 350.0 - k / 2}}
        t = time.perf_counter()
        r = client.post("/api/cut", json=body, headers=headers)
        times.append(time.perf_counter() - t)
        assert r.status_code == 200, r.text
    return statistics.median(times) * 1000.0


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--smoke", action="store_true", help="tiny sizes for CI")
    ap.add_argument("--peak-child", type=int, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.peak_child:
        peak_child(args.peak_child)
        return
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.cutting.library_engine import cut_library
    from assaycut.studies.cutpoints import sweep

    big, small, naive_n, reps = (10_000, 1_000, 100, 5) if not args.smoke else (30, 10, 3, 1)
    t0 = time.perf_counter()
    lib = generate_library(big)
    t_gen = time.perf_counter() - t0
    t0 = time.perf_counter()
    models = build_models(lib)
    t_models = time.perf_counter() - t0
    t0 = time.perf_counter()
    for a in lib[:small]:
        build_model(a)
    t_alone = (time.perf_counter() - t0) / small * big
    t_lib = median_time(lambda: cut_library(models, CUTS8), reps)
    t_small = median_time(lambda: cut_library(models[:small], CUTS8), reps)
    t_naive_sub = median_time(lambda: naive_cut(models[:naive_n], CUTS8), 1 if args.smoke else 3)
    t_naive = t_naive_sub * big / naive_n
    sweep(models[0], default_cut_set(), "kerosene", 180.0, 200.0, 1.0)  # warm-up: first-use imports
    t_sweep = median_time(lambda: sweep(models[0], default_cut_set(), "kerosene", 180.0, 339.84, 0.16), reps)
    exe = [sys.executable, "-m", "assaycut", "--help"]
    with tempfile.TemporaryDirectory() as d:
        bare = Path(d) / "bare.py"
        bare.write_text(BARE_APP)
        t_help = help_time(exe, 5 if not args.smoke else 1)
        t_bare = help_time([sys.executable, str(bare), "--help"], 5 if not args.smoke else 1)
    peak = float(subprocess.run([sys.executable, __file__, "--peak-child", str(big)], capture_output=True,
                                text=True, check=True).stdout.strip().splitlines()[-1])
    try:  # benchmarks/compiled.py needs numba (pip install ".[bench]"); without it the figures are left out
        from compiled import library_vs_compiled, riazi_fit_vs_compiled
    except ImportError:
        compiled = {}
    else:
        compiled = {**library_vs_compiled(models, CUTS8, repeats=reps),
                    **riazi_fit_vs_compiled(lib[:min(big, 2000)], repeats=reps)}
    cli, cli_raw = cli_figures(args.smoke)
    t_explore = explore_update_ms(args.smoke)
    figures = {
        "library_vs_naive": t_naive / t_lib,
        **({k: compiled[k] for k in ("library_vs_compiled", "riazi_fit_vs_compiled")} if compiled else {}),
        "sweep_ms": t_sweep * 1000.0,
        "help_vs_bare": t_help / t_bare,
        "scaling_10k_vs_1k": t_lib / t_small,
        "peak_mb": peak,
        "model_build_ms": t_models / big * 1000.0,
        "batched_vs_alone": t_models / t_alone,
        **cli,
        "explore_update_ms": t_explore,
    }
    raw = {"assays": big, "cuts": len(CUTS8.cuts), "cores": os.cpu_count(), "generate_s": t_gen,
           "model_build_s": t_models, "model_build_alone_ms": t_alone / big * 1000.0, "library_cut_s": t_lib,
           "library_cut_small_s": t_small,
           "naive_estimated_s": t_naive, "naive_subsample": naive_n,
           **{k: v for k, v in compiled.items() if not k.endswith("_vs_compiled")},
           "help_s": t_help, "bare_help_s": t_bare, "smoke": args.smoke, **cli_raw}
    goals = {"library_vs_naive": ">= 20", "library_vs_compiled": "<= 2", "riazi_fit_vs_compiled": "-",
             "batched_vs_alone": "<= 0.25",
             "json_startup_s": "-",
             "json_per_assay_ms": "-", "sweep_ms": "<= 50", "help_vs_bare": "<= 1.3",
             "scaling_10k_vs_1k": "8 to 12", "peak_mb": "<= 300", "model_build_ms": "<= 0.5",
             "json_400_vs_40": "<= 2", "summary_400_vs_40": "<= 2", "optimize_vs_yields": "<= 3",
             "report_vs_json": "<= 3", "uncertainty_2000_vs_yields": "<= 2", "workbooks_10k_s": "<= 60",
             "workbooks_10k_vs_read": "-",
             "explore_update_ms": "<= 100"}
    print(f"assaycut library benchmark: {big} assays, {len(CUTS8.cuts)} cuts, {os.cpu_count()} cores"
          + (" (smoke sizes)" if args.smoke else ""))
    print(f"  generate library            {t_gen:9.3f} s")
    print(f"  build models together       {t_models:9.3f} s   ({t_models / big * 1000:.2f} ms per assay; "
          f"{t_alone / big * 1000:.2f} one at a time)")
    print(f"  cut library, all properties {t_lib:9.3f} s")
    print(f"  cut {small} assays           {t_small:9.3f} s")
    print(f"  naive scipy (est. from {naive_n}) {t_naive:9.3f} s")
    print(f"  {'figure':<20}{'value':>12}  goal")
    for k, v in figures.items():
        print(f"  {k:<20}{v:12.2f}  {goals[k]}")
    print(json.dumps({**{k: round(v, 3) for k, v in figures.items()}, "raw": raw}))


if __name__ == "__main__":
    main()
