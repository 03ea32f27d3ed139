"""The library engine's cutting as a plain compiled loop over assays (numba), for `library_vs_compiled`.

    python benchmarks/compiled.py          # check against the engine, then time both (10,000 assays)

The same operation list as :func:`assaycut.cutting.ideal.cut_columns` for the properties below, written as one
loop over assays and cuts: the PCHIP evaluation and exact integrals, the inverse by a table of 8 points per
segment and Newton steps (bisection where they do not converge), the volume-average TBP by parts, the mean
SG and sulfur, the 16-node pseudo-component MeABP with the Riazi-Daubert 1987 molecular weight, Watson K,
the molecular weight inside its range, API and density at 15 °C, the Daubert 1994 D86 of each cut's TBP slice,
the ASTM D4737 cetane index and the API TDB 2B7.1 flash estimate (their out-of-scope flags are not computed).  The engine computes
more than this list (the estimated qualities, the TBP 5/95 % points, the overlaps and the flags); the figure
therefore flatters the compiled loop.  The results are checked equal to the engine's to 1e-9 before anything
is timed.  numba is a benchmark tool only (the ``[bench]`` extra), never a dependency of assaycut.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from numba import njit  # noqa: E402
from run import median_time  # noqa: E402  (benchmarks/run.py: the same timing for every figure)

from assaycut.methods.characterisation import MW_RANGE_API, MW_RANGE_TB_C  # noqa: E402
from assaycut.methods.d86 import D94_50, D94_SEGMENTS  # noqa: E402
from assaycut.methods.product_properties import CCI_RANGE, FLASH_T10_RANGE_C  # noqa: E402
from assaycut.units import K0_CRUDE, WATER_60F_KG_M3  # noqa: E402

GL_X, GL_W = np.polynomial.legendre.leggauss(16)
FRACTIONS = np.array([0.0, 0.1, 0.3, 0.5, 0.7, 0.9, 0.95])
SEG = np.array([D94_SEGMENTS[k] for k in ((0, 10), (10, 30), (30, 50), (50, 70), (70, 90), (90, 95))])
CCI = np.array(list(CCI_RANGE.values()))
CONST = np.array([D94_50[0], D94_50[1], K0_CRUDE, WATER_60F_KG_M3, MW_RANGE_TB_C[0], MW_RANGE_TB_C[1],
                  MW_RANGE_API[0], MW_RANGE_API[1], FLASH_T10_RANGE_C[0], FLASH_T10_RANGE_C[1]])
COLUMNS = ["vol_pct", "wt_pct", "mid_vol_c", "vabp_c", "meabp_c", "sg", "sulfur_wt_pct", "watson_k", "mw", "api",
           "density_15c_kg_m3", "cetane_index_d4737", "flash_c_est"]


@njit(cache=False)
def _locate(X, n, q):
    if q < X[0]:
        q = X[0]
    if q > X[n - 1]:
        q = X[n - 1]
    lo, hi = 0, n - 1
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if X[mid] <= q:
            lo = mid
        else:
            hi = mid
    h = X[lo + 1] - X[lo]
    return lo, (q - X[lo]) / h, h


@njit(cache=False)
def _value(X, Y, D, n, q):
    i, t, h = _locate(X, n, q)
    t2 = t * t
    t3 = t2 * t
    return ((2 * t3 - 3 * t2 + 1) * Y[i] + (t3 - 2 * t2 + t) * h * D[i] + (-2 * t3 + 3 * t2) * Y[i + 1]
            + (t3 - t2) * h * D[i + 1])


@njit(cache=False)
def _cumulative(X, Y, D, n, C):
    C[0] = 0.0
    for j in range(n - 1):
        h = X[j + 1] - X[j]
        C[j + 1] = C[j] + h * (0.5 * (Y[j] + Y[j + 1]) + h * (D[j] - D[j + 1]) / 12.0)


@njit(cache=False)
def _anti(X, Y, D, C, n, q):
    below = min(q - X[0], 0.0) * Y[0]
    above = max(q - X[n - 1], 0.0) * Y[n - 1]
    i, t, h = _locate(X, n, q)
    t2 = t * t
    t3 = t2 * t
    t4 = t3 * t
    part = h * ((t4 / 2 - t3 + t) * Y[i] + (t4 / 4 - 2 * t3 / 3 + t2 / 2) * h * D[i] + (-t4 / 2 + t3) * Y[i + 1]
                + (t4 / 4 - t3 / 3) * h * D[i + 1])
    return C[i] + part + below + above


@njit(cache=False)
def _table(X, Y, D, n, tab):
    w = 0
    for j in range(n - 1):
        h = X[j + 1] - X[j]
        for s in range(8):
            t = s / 8.0
            t2 = t * t
            t3 = t2 * t
            v = ((2 * t3 - 3 * t2 + 1) * Y[j] + (t3 - 2 * t2 + t) * h * D[j] + (-2 * t3 + 3 * t2) * Y[j + 1]
                 + (t3 - t2) * h * D[j + 1])
            tab[w] = v if w == 0 or v > tab[w - 1] else tab[w - 1]
            w += 1
    tab[w] = Y[n - 1] if Y[n - 1] > tab[w - 1] else tab[w - 1]
    return w + 1


@njit(cache=False)
def _inverse(X, Y, D, n, tab, w, q):
    if q < Y[0]:
        q = Y[0]
    if q > Y[n - 1]:
        q = Y[n - 1]
    lo, hi = 0, w
    while lo < hi:
        mid = (lo + hi) // 2
        if tab[mid] < q:
            lo = mid + 1
        else:
            hi = mid
    j = min(max(lo - 1, 0), w - 2)
    i = min(j // 8, n - 2)
    h = X[i + 1] - X[i]
    y0, y1, m0, m1 = Y[i], Y[i + 1], h * D[i], h * D[i + 1]
    if q == y0:
        return X[i]
    if q == y1:
        return X[i + 1]
    if not y1 > y0:
        return X[i]
    tl = (j - i * 8) / 8.0
    th = min(tl + 0.125, 1.0)
    dy = tab[j + 1] - tab[j]
    t = tl + (q - tab[j]) / dy * (th - tl) if dy > 0 else tl
    c3 = 2 * y0 - 2 * y1 + m0 + m1
    c2 = -3 * y0 + 3 * y1 - 2 * m0 - m1
    c0 = y0 - q
    for _ in range(4):
        f = ((c3 * t + c2) * t + m0) * t + c0
        fp = (3 * c3 * t + 2 * c2) * t + m0
        if fp > 0:
            t = min(max(t - f / fp, tl), th)
    f = ((c3 * t + c2) * t + m0) * t + c0
    if abs(f) > 1e-13 * max(abs(y0) + abs(y1), 1e-300):  # a zero slope at the root: bisection
        a, b = 0.0, 1.0
        for _ in range(60):
            mid = 0.5 * (a + b)
            if ((c3 * mid + c2) * mid + m0) * mid + c0 < 0:
                a = mid
            else:
                b = mid
        t = b
    return X[i] + t * h


@njit(cache=False)
def _mw(tb_c, s):
    tb = tb_c + 273.15
    return 42.965 * math.exp(2.097e-4 * tb - 7.78712 * s + 2.08476e-3 * tb * s) * tb ** 1.26007 * s ** 4.98308


@njit(cache=False)
def cut_all(CX, CY, CD, CN, SX, SY, SD, SN, UX, UY, UD, UN, umiss, sg_crude, ends, glx, glw, fr, seg, cci, k,
            out, d86):
    """Every assay r, every cut j: out[r, j, :] in COLUMNS order, d86[r, j, :] at 0/10/30/50/70/90/95 %."""
    R, width = CX.shape
    ncut = ends.size + 1
    tab = np.empty((width - 1) * 8 + 1)
    cc = np.empty(width)
    cs = np.empty(SX.shape[1])
    cu = np.empty(UX.shape[1])
    v = np.empty(ncut + 1)
    wts = np.empty(ncut + 1)
    f = np.empty(7)
    for r in range(R):
        n, ns, nu = CN[r], SN[r], UN[r]
        X, Y, D = CX[r], CY[r], CD[r]
        w = _table(X, Y, D, n, tab)
        _cumulative(X, Y, D, n, cc)
        _cumulative(SX[r], SY[r], SD[r], ns, cs)
        _cumulative(UX[r], UY[r], UD[r], nu, cu)
        a0 = _anti(SX[r], SY[r], SD[r], cs, ns, 0.0)
        v[0], v[ncut] = 0.0, 100.0
        for j in range(ends.size):
            v[j + 1] = _value(X, Y, D, n, ends[j])
        for j in range(ncut + 1):
            wts[j] = (_anti(SX[r], SY[r], SD[r], cs, ns, v[j]) - a0) / sg_crude[r]
        for j in range(ncut):
            va, vb, wa, wb = v[j], v[j + 1], wts[j], wts[j + 1]
            vol, wt = vb - va, wb - wa
            some = vol > 1e-9
            ta = _inverse(X, Y, D, n, tab, w, va)
            tb = _inverse(X, Y, D, n, tab, w, vb)
            mid = _inverse(X, Y, D, n, tab, w, 0.5 * (va + vb))
            if vol > 1e-12:
                vabp = (tb * vb - ta * va - (_anti(X, Y, D, cc, n, tb) - _anti(X, Y, D, cc, n, ta))) / vol
                sg = (_anti(SX[r], SY[r], SD[r], cs, ns, vb) - _anti(SX[r], SY[r], SD[r], cs, ns, va)) / vol
            else:
                vabp = ta
                sg = _value(SX[r], SY[r], SD[r], ns, va)
            if umiss[r]:
                sul = np.nan
            elif wb - wa > 1e-12:
                sul = (_anti(UX[r], UY[r], UD[r], cu, nu, wb) - _anti(UX[r], UY[r], UD[r], cu, nu, wa)) / (wb - wa)
            else:
                sul = _value(UX[r], UY[r], UD[r], nu, wa)
            sw = scb = sm = smt = 0.0
            for g in range(glx.size):
                p = 0.5 * (va + vb) + 0.5 * vol * glx[g]
                tn = _inverse(X, Y, D, n, tab, w, p)
                sgn = _value(SX[r], SY[r], SD[r], ns, p)
                tr = tn * 1.8 + 32.0 + 459.67
                mole = glw[g] * sgn / _mw((tr - 459.67 - 32.0) / 1.8, max(sgn, 0.3))
                sw += glw[g]
                scb += glw[g] * np.cbrt(tr)
                sm += mole
                smt += mole * tr
            meabp = ((0.5 * ((scb / sw) ** 3 + smt / sm) - 459.67) - 32.0) / 1.8
            kw = np.cbrt(meabp * 1.8 + 32.0 + 459.67) / sg
            api = 141.5 / sg - 131.5
            mw = _mw(meabp, sg) if (k[4] <= meabp <= k[5] and k[6] <= api <= k[7]) else np.nan
            rho60 = sg * k[3]
            a60 = k[2] / (rho60 * rho60)
            dens = rho60 * math.exp(a60 * (1.0 - 0.8 * a60))
            end_c = ends[j] if j < ends.size else np.nan
            has = j < ends.size and end_c > 40.0 and some
            for p in range(7):
                d86[r, j, p] = np.nan
            cci_v = flash = np.nan
            if has:
                for p in range(7):
                    f[p] = _inverse(X, Y, D, n, tab, w, va + fr[p] * vol) * 1.8 + 32.0
                o = np.empty(7)
                o[3] = (f[3] / k[0]) ** (1.0 / k[1])
                for s in range(3, 6):  # upward from 50 %: 50-70, 70-90, 90-95
                    o[s + 1] = o[s] + (max(f[s + 1] - f[s], 0.0) / seg[s, 0]) ** (1.0 / seg[s, 1])
                for s in range(2, -1, -1):  # downward: 30-50, 10-30, 0-10
                    o[s] = o[s + 1] - (max(f[s + 1] - f[s], 0.0) / seg[s, 0]) ** (1.0 / seg[s, 1])
                for p in range(7):
                    d86[r, j, p] = (o[p] - 32.0) / 1.8
                t10, t50, t90 = d86[r, j, 1], d86[r, j, 3], d86[r, j, 5]
                # given outside their scope too (the engine flags those; the flags are not compared here)
                b = math.exp(-3.5 * (dens / 1000.0 - 0.85)) - 1.0
                x10, x50, x90 = t10 - 215.0, t50 - 260.0, t90 - 310.0
                cci_v = (45.2 + 0.0892 * x10 + (0.131 + 0.901 * b) * x50 + (0.0523 - 0.420 * b) * x90
                         + 0.00049 * (x10 * x10 - x90 * x90) + 107.0 * b + 60.0 * b * b)
                flash = (0.69 * (t10 * 1.8 + 32.0) - 118.2 - 32.0) / 1.8
            vals = (vol, wt, mid, vabp, meabp, sg, sul, kw, mw, api, dens, cci_v, flash)
            for c in range(13):
                out[r, j, c] = vals[c] if (some or c < 2) else np.nan


@njit(cache=False)
def riazi_grid(v, t, passes, out):
    """The grid search of :func:`assaycut.methods.riazi_distribution.fit_riazi_many` for curves of n points, one
    per row of v (fractions) and t [K]: out[r] = (T0, A, B, rms), NaN where no trial T0 gives a finite fit."""
    rows, n = v.shape
    xx = np.empty(n)
    for r in range(rows):
        tmin = t[r].min()
        lo, hi = 0.2 * tmin, tmin * (1 - 1e-6)
        xm = 0.0
        for i in range(n):
            xx[i] = math.log(-math.log1p(-v[r, i]))
            xm += xx[i]
        xm /= n
        sxx = 0.0
        for i in range(n):
            sxx += (xx[i] - xm) ** 2
        alive = False
        for grid in passes:
            best_sse, bt0, ba, bb = np.inf, np.nan, np.nan, np.nan
            step = (hi - lo) / (grid - 1)
            for g in range(grid):
                t0 = hi if g == grid - 1 else g * step + lo  # numpy.linspace's points
                ym = 0.0
                for i in range(n):
                    ym += math.log(max((t[r, i] - t0) / t0, 1e-300))
                ym /= n
                sxy = 0.0
                for i in range(n):
                    sxy += (math.log(max((t[r, i] - t0) / t0, 1e-300)) - ym) * (xx[i] - xm)
                slope = max(sxy / sxx if sxx > 0 else 1.0, 1e-6)
                icpt = ym - slope * xm
                sse = 0.0
                for i in range(n):
                    d = (math.exp(slope * xx[i] + icpt) + 1.0) * t0 - t[r, i]
                    sse += d * d
                if sse < best_sse:
                    b = 1.0 / slope
                    best_sse, bt0, ba, bb = sse, t0, b * math.exp(icpt * b), b
            alive = alive or best_sse < np.inf
            out[r, 0], out[r, 1], out[r, 2], out[r, 3] = bt0, ba, bb, math.sqrt(best_sse / n)
            lo, hi = max(bt0 - step, 1e-3), min(bt0 + step, tmin * (1 - 1e-9))
        if not alive:
            out[r, :] = np.nan


def riazi_fit_vs_compiled(assays, repeats: int = 3) -> dict:
    """Time the extension's Riazi fit of every assay's main curve (fit_riazi_many, the model builder's largest
    kernel) against the same grid search compiled, after checking the fits: the RMS deviation to 1e-9
    (relative), T0 to two steps of the last grid (where two trials tie to rounding)."""
    from assaycut.methods.riazi_distribution import GRID_PASSES, fit_riazi_many
    from assaycut.model.crude import build_model

    curves = []
    for a in assays:  # the TBP points the model builder fits: the curve as the model put it on the TBP basis
        m = build_model(a, qualities=False)
        curves.append((m.curve.measured_pct, m.curve.measured_temp_c))
    fits = fit_riazi_many(curves)
    by_size: dict = {}
    for (p, tc), f in zip(curves, fits):
        inside = (p > 0.0) & (p < 100.0)
        by_size.setdefault(int(inside.sum()), []).append((p[inside] / 100.0, tc[inside] + 273.15, f))
    blocks = [(np.array([x[0] for x in rows]), np.array([x[1] for x in rows]), [x[2] for x in rows])
              for rows in by_size.values()]
    passes = np.array(GRID_PASSES)
    worst, worst_steps = 0.0, 0.0
    for v, t, want in blocks:
        out = np.empty((v.shape[0], 4))
        riazi_grid(v, t, passes, out)
        for r, f in enumerate(want):
            if isinstance(f, Exception):  # refused by the model: no fit to compare
                continue
            # a grid search is defined to its last step: T0 may land on a neighbouring trial where two give
            # the same squared deviation to rounding (the two use different log/exp); the deviation itself, the
            # objective, must agree to 1e-9
            last = 0.8 * float(t[r].min()) / (GRID_PASSES[0] - 1)
            for grid in GRID_PASSES[1:]:
                last = 2.0 * last / (grid - 1)
            worst_steps = max(worst_steps, abs(out[r, 0] - f.t0_k) / last)
            worst = max(worst, abs(out[r, 3] - f.rms_c) / max(1.0, abs(f.rms_c)))
    if worst > 1e-9 or worst_steps > 2.0:
        raise AssertionError(f"the compiled Riazi fit differs from the model's: RMS by {worst:.3g} (relative), T0 "
                             f"by {worst_steps:.3g} steps of the last grid")

    def compiled():
        for v, t, _ in blocks:
            riazi_grid(v, t, passes, np.empty((v.shape[0], 4)))

    t_engine = median_time(lambda: fit_riazi_many(curves), repeats)
    t_compiled = median_time(compiled, repeats)
    return {"riazi_fit_vs_compiled": t_engine / t_compiled, "riazi_fit_s": t_engine,
            "riazi_fit_compiled_s": t_compiled, "riazi_rms_max_rel_diff": worst, "riazi_t0_max_steps": worst_steps}


def arrays(batch):
    """The padded spline arrays of a BatchModel (curve, SG, sulfur), each row's node count, the missing sulfur
    flags and the crude SG."""
    def parts(s):  # each row's node count: its nodes up to its own last one (padding lies beyond it)
        counts = np.array([int(np.searchsorted(s.X[r], s.hi[r], side="right")) for r in range(s.X.shape[0])])
        return s.X, s.Y, s.D, counts

    return (*parts(batch.curve.spline), *parts(batch.sg_dist), *parts(batch.sulfur_dist),
            np.asarray(batch.sulfur_dist.missing, bool), batch.sg[:, 0].copy())


def run_compiled(arrs, ends):
    R = arrs[0].shape[0]
    out = np.empty((R, ends.size + 1, 13))
    d86 = np.empty((R, ends.size + 1, 7))
    cut_all(*arrs, ends, GL_X, GL_W, FRACTIONS, SEG, CCI, CONST, out, d86)
    return out, d86


def check(batch, ends, cols, arrs) -> float:
    """The compiled loop's columns against the engine's (``cols`` of cut_columns): the largest difference
    relative to max(1, |value|); raises when any exceeds 1e-9."""
    out, d86 = run_compiled(arrs, ends)
    worst = 0.0
    for c, name in enumerate(COLUMNS):
        want = np.asarray(cols[name], float)
        got = out[:, :, c]
        assert np.array_equal(np.isnan(want), np.isnan(got)), name
        ok = ~np.isnan(want)
        worst = max(worst, float(np.max(np.abs(got[ok] - want[ok]) / np.maximum(1.0, np.abs(want[ok])), initial=0)))
    want = np.asarray(cols["d86"], float)
    assert np.array_equal(np.isnan(want), np.isnan(d86)), "d86"
    ok = ~np.isnan(want)
    worst = max(worst, float(np.max(np.abs(d86[ok] - want[ok]) / np.maximum(1.0, np.abs(want[ok])), initial=0)))
    if worst > 1e-9:
        raise AssertionError(f"the compiled loop differs from the engine by {worst:.3g} (relative)")
    return worst


def library_vs_compiled(models, cut_set, chunk: int = 1024, repeats: int = 3) -> dict:
    """Time the engine's cut (cut_columns on prebuilt batches, no narrow-cut qualities) and the compiled loop
    (on the same prebuilt arrays) over ``models``, after checking them equal; their ratio and the raw times."""
    from assaycut.cutting.ideal import cut_columns
    from assaycut.cutting.model_rows import BatchModel

    ends = cut_set.reported()[1]
    batches = [BatchModel(models[i:i + chunk]) for i in range(0, len(models), chunk)]
    grids = [np.repeat(ends[None, :], len(models[i:i + chunk]), axis=0) for i in range(0, len(models), chunk)]
    arrs = [arrays(b) for b in batches]
    worst = 0.0
    for b, g, a in zip(batches, grids, arrs):  # compiles on the first call; checks every row
        worst = max(worst, check(b, ends, cut_columns(b, g, only=set()), a))

    t_engine = median_time(lambda: [cut_columns(b, g, only=set()) for b, g in zip(batches, grids)], repeats)
    t_compiled = median_time(lambda: [run_compiled(a, ends) for a in arrs], repeats)
    return {"library_vs_compiled": t_engine / t_compiled, "engine_cut_s": t_engine, "compiled_cut_s": t_compiled,
            "compiled_max_rel_diff": worst}


if __name__ == "__main__":
    import importlib.util
    import json

    spec = importlib.util.spec_from_file_location("bench_run", ROOT / "benchmarks" / "run.py")
    bench = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(bench)
    from assaycut.model.crude import build_models

    n = int(sys.argv[1]) if len(sys.argv) > 1 else 10_000
    lib = bench.generate_library(n)
    models = build_models(lib)
    print(json.dumps({**library_vs_compiled(models, bench.CUTS8), **riazi_fit_vs_compiled(lib[:2000])}))
