"""The development set: open real crude assays, and how well the tool reproduces and predicts their cuts.

Source of the data (tests/data/open_assays.json, extracted by tests/data/extract_open_assays.py): the NOAA
ADIOS oil database records EX00004-EX00058, works of the United States Government released under CC0, each
compiled from a producer's published crude assay: the whole crude's density, sulfur and TBP curve (to 95 vol
%), and seven cuts (IBP-60, 60-165, 165-330, 330-480, 480-650, 650-1000, 1000+ °F) with their volume
percent, density, sulfur and other measured qualities.

For every record the tool is run as a user would, at the record's own cut points:

- ``all``: all seven cuts given as narrow cuts; each must come back as measured;
- ``to650``: the cuts up to 650 °F only; those must come back as measured;
- ``holdout``: each interior cut held back in turn; its prediction from the rest;
- ``whole``: whole-crude data only; every cut predicted.

``python -m tests.open_assays`` prints the table of errors.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np

from assaycut.cutting.cutset import Cut, CutSet
from assaycut.model.assay import Assay, CurveData, NarrowCuts
from assaycut.yields import run_yields

DATA = Path(__file__).parent / "data" / "open_assays.json"
SG_PER_G_CM3 = 1.0 / 0.999016
"""g/cm3 at 15.6 °C (60 °F) to SG 60/60 °F: divided by the density of water at 60 °F, 0.999016 g/cm3 (the
data's README; API MPMS 11.1 gives 999.016 kg/m3)."""


def records() -> list[dict]:
    """The development-set records (tests/data/open_assays.json)."""
    return json.loads(DATA.read_text())


def f_to_c(f):
    """°F to °C (None to NaN)."""
    return np.nan if f is None else (f - 32.0) / 1.8


def assay_of(rec: dict, keep=None, extras=()) -> Assay:
    """The record as an Assay: the whole crude's gravity, sulfur and TBP curve (to 95 %), and the cuts at
    positions ``keep`` (all by default; none for whole-crude data only) as narrow cuts with their SG and
    sulfur, and the record fields named in ``extras`` (e.g. 'aromatics_vol_pct') as narrow-cut qualities."""
    cuts = rec["cuts"]
    keep = range(len(cuts)) if keep is None else list(keep)
    tbp = np.array(rec["tbp"], dtype=float)
    curve = CurveData("TBP", "vol", tbp[:, 0].copy(), tbp[:, 1].copy(), where=f"{rec['id']} TBP")
    nc = None
    if keep:
        sel = [cuts[k] for k in keep]
        col = lambda key, f=float: np.array([np.nan if c[key] is None else f(c[key]) for c in sel])  # noqa: E731
        nc = NarrowCuts(np.array([f_to_c(c["start_f"]) for c in sel]), np.array([f_to_c(c["end_f"]) for c in sel]),
                        col("vol_pct"), np.full(len(sel), np.nan), col("density_g_cm3_15_6c") * SG_PER_G_CM3,
                        col("sulfur_wt_pct"), extras={k: col(k) for k in extras})
    return Assay(rec["name"], rec["density_g_cm3_15_6c"] * SG_PER_G_CM3, [curve],
                 sulfur_wt_pct=rec["sulfur_wt_pct"], narrow_cuts=nc, source=rec["id"])


def own_cut_set(rec: dict) -> CutSet:
    """The record's seven cuts as a cut set (ends at the published °F boundaries)."""
    return CutSet([Cut(c["name"], None if c["end_f"] is None else f_to_c(c["end_f"])) for c in rec["cuts"]],
                  "record cuts")


def measured(rec: dict) -> dict[str, np.ndarray]:
    """The record's cut values: vol %, SG, sulfur [wt %]."""
    cuts = rec["cuts"]
    return {"vol_pct": np.array([c["vol_pct"] for c in cuts], dtype=float),
            "sg": np.array([c["density_g_cm3_15_6c"] for c in cuts], dtype=float) * SG_PER_G_CM3,
            "sulfur_wt_pct": np.array([c["sulfur_wt_pct"] for c in cuts], dtype=float)}


def predicted(rec: dict, keep=None) -> dict[str, np.ndarray]:
    """The tool's cut values at the record's own cut points, given the cuts at ``keep``."""
    t = run_yields(assay_of(rec, keep), own_cut_set(rec)).cuts
    return {k: np.asarray(t.column(k), dtype=float) for k in ("vol_pct", "sg", "sulfur_wt_pct")}


def errors(rec: dict, case: str) -> list[dict]:
    """Per cut compared in ``case`` ('all', 'to650', 'holdout', 'whole'): the cut's index and the errors
    (model - measured) in SG [-], vol % and sulfur relative [-]."""
    meas = measured(rec)
    n = len(rec["cuts"])
    if case == "holdout":
        runs = [([j for j in range(n) if j != k], [k]) for k in range(1, n - 1)]
    elif case == "to650":
        upto = [k for k, c in enumerate(rec["cuts"]) if c["end_f"] is not None and c["end_f"] <= 650.0]
        runs = [(upto, upto)]
    else:
        runs = [(list(range(n)) if case == "all" else [], list(range(n)))]
    out = []
    for keep, look in runs:
        got = predicted(rec, keep)
        for k in look:
            s_meas = meas["sulfur_wt_pct"][k]
            out.append({"cut": k, "sg": got["sg"][k] - meas["sg"][k], "vol_pct": got["vol_pct"][k] - meas["vol_pct"][k],
                        "sulfur_rel": (got["sulfur_wt_pct"][k] - s_meas) / s_meas if s_meas > 0 else np.nan})
    return out


def table() -> dict[str, dict[str, float]]:
    """Per case, the mean and largest absolute errors over the development set."""
    out = {}
    recs = records()
    for case in ("all", "to650", "holdout", "whole"):
        errs = [e for r in recs for e in errors(r, case)]
        sg = np.abs([e["sg"] for e in errs])
        vol = np.abs([e["vol_pct"] for e in errs])
        s = np.abs([e["sulfur_rel"] for e in errs])
        out[case] = {"n": len(errs), "sg_mean": float(np.nanmean(sg)), "sg_max": float(np.nanmax(sg)),
                     "vol_mean": float(np.nanmean(vol)), "vol_max": float(np.nanmax(vol)),
                     "sulfur_mean_pct": 100 * float(np.nanmean(s)), "sulfur_max_pct": 100 * float(np.nanmax(s))}
    return out


def per_cut(case: str) -> list[dict]:
    """Per cut position of the records, the mean absolute SG error and mean relative sulfur error in ``case``."""
    recs = records()
    errs = [e for r in recs for e in errors(r, case)]
    out = []
    for k, c in enumerate(recs[0]["cuts"]):
        e = [x for x in errs if x["cut"] == k]
        if e:
            with np.errstate(invalid="ignore"):
                out.append({"cut": c["name"], "n": len(e), "sg": float(np.nanmean(np.abs([x["sg"] for x in e]))),
                            "sulfur_pct": 100 * float(np.nanmean(np.abs([x["sulfur_rel"] for x in e])))})
    return out


QUALITIES = {  # record field -> (tool column, conversion to the tool's unit, relative error?)
    "cetane_index_d4737": ("cetane_index_d4737", float, False),
    "viscosity_40": ("viscosity_40c_cst", float, True),
    "pour_point_c": ("pour_point_c", float, False),
    "cloud_point_f": ("cloud_point_c", f_to_c, False),
    "freeze_point_f": ("freeze_point_c", f_to_c, False),
    "smoke_point_mm": ("smoke_point_mm", float, False),
    "aniline_point_f": ("aniline_point_c", f_to_c, False),
    "hydrogen_wt_pct": ("hydrogen_wt_pct", float, False),
}
"""The records' other measured qualities compared with the tool's estimates."""


def quality_errors(extras=()) -> dict[str, list[dict]]:
    """Per quality, the tool's estimate against the record's measurement for every cut that has one: the
    seven cuts given with their SG and sulfur only (and the record fields named in ``extras``; the quality
    itself not given), at the record's own cut points; model - measured, relative for viscosity [-], else in
    the quality's unit (°C, mm, index, wt %)."""
    out: dict[str, list[dict]] = {k: [] for k in QUALITIES}
    for rec in records():
        rows = run_yields(assay_of(rec, extras=extras), own_cut_set(rec)).cuts.rows()
        for k, (cut, row) in enumerate(zip(rec["cuts"], rows)):
            for field, (col, conv, rel) in QUALITIES.items():
                meas = cut["viscosity_cst"].get("40.0") if field == "viscosity_40" else cut[field]
                got = row.get(col)
                if meas is None or got is None or not np.isfinite(got):
                    continue
                m = conv(meas)
                out[field].append({"cut": k, "err": (got - m) / m if rel else got - m,
                                   "out_of_scope": col in row.get("out_of_scope", [])})
    return out


def quality_table(extras=()) -> list[dict]:
    """Per quality and cut position, the number compared, the mean absolute error and the mean error (the cuts
    given as in :func:`quality_errors`)."""
    names = [c["name"] for c in records()[0]["cuts"]]
    table = []
    for field, errs in quality_errors(extras).items():
        for k in sorted({e["cut"] for e in errs}):
            e = np.array([x["err"] for x in errs if x["cut"] == k])
            table.append({"quality": field, "cut": names[k], "n": int(e.size), "mae": float(np.mean(np.abs(e))),
                          "bias": float(np.mean(e)), "relative": QUALITIES[field][2],
                          "out_of_scope": sum(x["out_of_scope"] for x in errs if x["cut"] == k)})
    return table


def main() -> None:
    print(f"{'case':<9}{'cuts':>5}{'SG mean':>9}{'SG max':>8}{'vol mean':>9}{'vol max':>8}{'S mean %':>9}"
          f"{'S max %':>8}")
    for case, r in table().items():
        print(f"{case:<9}{r['n']:>5}{r['sg_mean']:>9.4f}{r['sg_max']:>8.4f}{r['vol_mean']:>9.2f}{r['vol_max']:>8.2f}"
              f"{r['sulfur_mean_pct']:>9.1f}{r['sulfur_max_pct']:>8.1f}")
    for case in ("holdout", "whole"):
        print(f"\n{case}: per cut, mean absolute SG error and mean relative sulfur error")
        for r in per_cut(case):
            print(f"  {r['cut']:<34}{r['n']:>4}{r['sg']:>9.4f}{r['sulfur_pct']:>8.0f} %")
    print("\nother qualities, estimated (cuts given with SG and sulfur only): mean abs. error, mean error "
          "(viscosity relative)")
    for r in quality_table():
        f = (lambda x: f"{100 * x:+.0f} %") if r["relative"] else (lambda x: f"{x:+.1f}")
        print(f"  {r['quality']:<20}{r['cut']:<34}{r['n']:>4}{f(r['mae'])[1:]:>9}{f(r['bias']):>9}"
              + (f"  ({r['out_of_scope']} out of scope)" if r["out_of_scope"] else ""))
    print("\nhydrogen, wt %, the cuts' measured aromatics also given (ASTM D3343 on the jet range): mean abs. "
          "error, mean error")
    for r in quality_table(("aromatics_vol_pct",)):
        if r["quality"] == "hydrogen_wt_pct":
            print(f"  {r['quality']:<20}{r['cut']:<34}{r['n']:>4}{r['mae']:>8.2f}{r['bias']:>+9.2f}")


if __name__ == "__main__":
    main()
