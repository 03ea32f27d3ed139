"""Reports of the studies: crude comparison (xlsx + grouped yield chart), sweep (CSV + chart), shift (text)."""

from __future__ import annotations

import numpy as np

from ..cutting.limits import limit_title
from ..cutting.pseudo import CP_FORM
from ..studies.compare import WORTH_CAVEAT
from ..units import sg_to_density15
from .plots import save_png, subplots
from .xlsx import finish_workbook, write_table

COMPARE_LABELS = {"vol_pct": "Yield [vol %]", "wt_pct": "Yield [wt %]", "bbl_per_day": "Rate [bbl/d]",
                  "t_per_day": "Rate [t/d]", "api": "API gravity [°API]", "sg": "SG 60/60 °F [-]",
                  "sulfur_wt_pct": "Sulfur [wt %]", "watson_k": "Watson K [-]", "bmci": "BMCI [-]",
                  "hydrogen_wt_pct": "Hydrogen [wt %]", "limits": "Limits", "extrapolated": "Extrapolated"}
"""The qualities of each cut in a comparison (those present), with their labels."""
HEAVY_ONLY = ("bmci", "hydrogen_wt_pct")
"""Qualities a comparison shows only for the heavy cuts, from :data:`HEAVY_START_C`."""
HEAVY_START_C = 300.0
"""Cuts starting at or above this TBP (vacuum gas oil, residues: the feeds of the conversion units, for which
BMCI and hydrogen content are read) show :data:`HEAVY_ONLY` in a comparison (common practice, no source). [°C]"""
SIDE_COLOURS = ("#283593", "#ef6c00")
"""Line colours of a sweep's lower and upper cut: a dark blue and an orange, apart for every colour vision."""
WHOLE_CRUDE = "whole crude"
"""Cut name of the comparison's whole-crude rows."""


def whole_crude_rows(results) -> list[list]:
    """The comparison's whole-crude rows: [WHOLE_CRUDE, label, key, one value per crude] for API gravity,
    SG, sulfur (None where not given), the measured end of the curve and the count of warnings."""
    rows = [("API gravity [°API]", "api", [r.assay.api for r in results]),
            ("SG 60/60 °F [-]", "sg", [r.assay.sg for r in results]),
            ("Sulfur [wt %]", "sulfur_wt_pct", [r.model.given_sulfur_wt_pct for r in results]),
            ("Curve measured to [vol %]", "vol_pct", [float(r.model.curve.measured_hi) for r in results]),
            ("Warnings [count]", "count", [str(len(r.warnings)) for r in results])]
    return [[WHOLE_CRUDE, lab, key, *vals] for lab, key, vals in rows]


def compare_wide(table, whole: list[list] | None = None, unit: str = "C"):
    """Comparison as rows [cut, label, key, one value per crude]: the ``whole`` crude rows first, then each
    cut's TBP range (text, in ``unit`` 'C' or 'F') and its qualities of :data:`COMPARE_LABELS` present in
    ``table``; extrapolated as 'yes' or ''."""
    from .precision import shown
    from .tables import deg, temp_in_unit

    def tbp(a, b):
        return "–".join("IBP" if k == 0 and v != v else "end" if v != v else shown("end_c", temp_in_unit(v, unit))
                        for k, v in enumerate((a, b)))

    crudes = list(dict.fromkeys(table["crude"]))
    cuts = list(dict.fromkeys(table["cut"]))
    idx = table.set_index(["cut", "crude"])
    rows = [list(r) for r in whole or []]
    for cut in cuts:
        if "start_c" in table:
            rows.append([cut, f"TBP cut [{deg(unit)}]", "tbp_range"]
                        + [tbp(idx.loc[(cut, c), "start_c"], idx.loc[(cut, c), "end_c"]) for c in crudes])
        heavy = "start_c" in table and all(idx.loc[(cut, c), "start_c"] >= HEAVY_START_C for c in crudes)
        for q, label in COMPARE_LABELS.items():
            if q not in table or (q in HEAVY_ONLY and not heavy):
                continue
            vals = [idx.loc[(cut, c), q] for c in crudes]
            if q == "hydrogen_wt_pct" and "hydrogen_estimated" in table:
                if all(v != v for v in vals):
                    continue
                if any(bool(idx.loc[(cut, c), "hydrogen_estimated"]) for c in crudes):
                    label = "Hydrogen, estimated [wt %]"
            if q == "extrapolated":
                vals = ["yes" if v else "" for v in vals]
            rows.append([cut, label, q] + [None if isinstance(v, float) and v != v else v for v in vals])
    return crudes, rows


def compare_workbook(results, table, worth, currency: str | None, products=None, unit: str = "C"):
    """openpyxl Workbook: sheets 'comparison' (temperatures in ``unit``, 'C' or 'F'), 'worth' and 'worth by
    product' (when priced), 'crudes', 'notes'."""
    import openpyxl

    from ..yields import CAUTIONS

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "comparison"
    crudes, rows = compare_wide(table, whole_crude_rows(results), unit)
    write_table(ws, ["Cut", "Quality"] + crudes, [[r[0], r[1], *r[3:]] for r in rows],
                widths=[20, 26] + [max(14, len(c) + 2) for c in crudes], freeze="C2", row_keys=[r[2] for r in rows])
    if worth is not None:
        ws = wb.create_sheet("worth")
        cur = currency or ""
        heads = ["Rank", "Crude", f"Worth [{cur}/bbl]", f"Worth [{cur}/t]", f"Crude price [{cur}/bbl]",
                 f"Crude price [{cur}/t]", f"Margin [{cur}/bbl]", f"Margin [{cur}/t]"]
        keys = [None, None, "worth_per_bbl", "worth_per_t", "price_per_bbl", "price_per_t", "margin_per_bbl",
                "margin_per_t"]
        if "worth_per_day" in worth:
            heads += [f"Worth [{cur}/d]", f"Margin [{cur}/d]"]
            keys += ["worth_per_day", "margin_per_day"]
        write_table(ws, heads, worth.values.tolist(), keys=keys, widths=[6, 22] + [16] * (len(heads) - 2))
        ws.cell(row=len(worth) + 3, column=1, value=WORTH_CAVEAT)
        basis = worth.attrs.get("ranked_by", "worth_per_bbl")
        ws.cell(row=len(worth) + 4, column=1, value="Ranked by margin per bbl (every crude has a price)"
                if basis == "margin_per_bbl" else "Ranked by worth per bbl (not every crude has a price)")
    if products is not None:
        ws = wb.create_sheet("worth by product")
        cur = currency or ""
        heads = ["Crude", "Cut", "Price unit", f"Base price [{cur}/unit]", f"Quality adjustment [{cur}/unit]",
                 f"Price [{cur}/unit]", f"Price [{cur}/bbl]", f"Price [{cur}/t]", "Yield [vol %]", "Yield [wt %]",
                 f"Worth [{cur}/bbl of crude]", f"Worth [{cur}/t of crude]"]
        cols = ["crude", "cut", "unit", "base_price", "adjustment", "price", "price_per_bbl", "price_per_t",
                "vol_pct", "wt_pct", "worth_per_bbl", "worth_per_t"]
        write_table(ws, heads, products[cols].values.tolist(), [None, None, None] + ["0.00"] * 9,
                    widths=[20, 18, 9] + [14] * 9)
    if results and results[0].bands is not None:
        ws = wb.create_sheet("uncertainty")
        rows = []
        for r in results:
            for b in r.bands.rows():
                rows.append([b["name"], r.assay.name, b["vol_pct_p10"], b["vol_pct_p50"], b["vol_pct_p90"]])
        write_table(ws, ["Cut", "Crude", "Yield P10 [vol %]", "Yield P50 [vol %]", "Yield P90 [vol %]"], rows,
                    [None, None, "0.00", "0.00", "0.00"], widths=[20, 20, 16, 16, 16])
        ws.cell(row=len(rows) + 3, column=1, value=results[0].bands.attrs["sigmas"])
    ws = wb.create_sheet("crudes")
    write_table(ws, ["Crude", "Source", "sha256", "API gravity [°API]", "Sulfur [wt %]", "Measured to [vol %]"],
                [[r.assay.name, r.assay.source, r.assay.sha256, r.assay.api, r.model.given_sulfur_wt_pct,
                  r.model.curve.measured_hi] for r in results],
                keys=[None, None, None, "api", "sulfur_wt_pct", "vol_pct"], widths=[20, 50, 66, 14, 14, 14])
    ws = wb.create_sheet("notes")
    notes = [("Caution", c) for c in CAUTIONS] + [("Note", WORTH_CAVEAT)]
    notes += [(f"Warning ({r.assay.name})", w) for r in results for w in r.warnings]
    write_table(ws, ["Topic", "Text"], [list(n) for n in notes], widths=[28, 120])
    finish_workbook(wb, "Crude comparison")
    return wb


def plot_compare(table, target) -> None:
    """Grouped bar chart of volume yields: one group per cut, one bar per crude."""
    crudes = list(dict.fromkeys(table["crude"]))
    cuts = list(dict.fromkeys(table["cut"]))
    idx = table.set_index(["cut", "crude"])
    x = np.arange(len(cuts))
    width = 0.8 / max(len(crudes), 1)
    colours = ["#283593", "#ef6c00", "#2e7d32", "#6a1b9a", "#00838f", "#c62828", "#5d4037", "#9e9d24"]
    fig, ax = subplots(figsize=(max(9, 1.4 * len(cuts)), 5))
    for i, c in enumerate(crudes):
        vals = [idx.loc[(cut, c), "vol_pct"] for cut in cuts]
        ax.bar(x + (i - (len(crudes) - 1) / 2) * width, vals, width, label=c, color=colours[i % len(colours)])
    ax.set_xticks(x, cuts, rotation=25, ha="right")
    ax.set_ylabel("Yield [vol % of crude]")
    ax.set_title("Crude comparison: yields by cut (estimates for screening)")
    ax.grid(axis="y", alpha=0.3)
    ax.legend()
    save_png(fig, target, tight=True)


def vectors_files(name: str, base, deltas: dict, step_c: float) -> dict[str, bytes]:
    """The vectors of one crude as ``<crude>_vectors.xlsx`` (sheets 'base' and 'per degree C', one row per
    cut point and cut) and ``<crude>_vectors_long.csv`` (crude, cut_point, cut, property, unit, value, basis;
    the base as cut_point 'base', deltas in unit per °C)."""
    import io

    import openpyxl

    from .tables import basis_of, flat_cut_rows, label_for, long_rows, unit_of
    from .write import csv_text, slug
    from .xlsx import finish_workbook

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "base"
    names, rows = flat_cut_rows(base)
    write_table(ws, [label_for(n) for n in names], rows, keys=names)
    ws = wb.create_sheet("per degree C")
    cols = [c for c in next(iter(deltas.values())).keys if c != "name"] if deltas else []
    write_table(ws, ["Cut point (end of)", "Cut"] + [f"{label_for(c)} per °C" for c in cols],
                [[cp, r["name"], *[r[c] for c in cols]] for cp, d in deltas.items() for r in d.rows()],
                [None, None] + ["0.0000"] * len(cols), freeze="C2")
    ws.cell(row=ws.max_row + 2, column=1, value=f"Central difference of the exact model: each cut point ± {step_c:g} "
                                                f"°C, the others held; estimates for screening.")
    finish_workbook(wb, f"{name} base and delta vectors")
    buf = io.BytesIO()
    wb.save(buf)
    long = [[r[0], "base", *r[1:]] for r in long_rows(base, name)]
    for cp, d in deltas.items():
        for rec in d.rows():
            for c, v in rec.items():
                if c != "name" and v == v:
                    long.append([name, cp, rec["name"], c, f"{unit_of(c)}/°C", float(v), basis_of(c)])
    base_name = slug(name)
    return {f"{base_name}_vectors.xlsx": buf.getvalue(),
            f"{base_name}_vectors_long.csv": csv_text(["crude", "cut_point", "cut", "property", "unit", "value",
                                                       "basis"], long).encode("utf-8")}


def shift_csv(delta, unit: str = "C") -> bytes:
    """The shift table as CSV: each cut's new end, and per quality the new value and the change, labelled;
    temperatures in ``unit`` ('C' or 'F'; a change of temperature as a difference)."""
    from .tables import deg, is_temperature, label_for, temp_in_unit
    from .write import csv_text

    u = deg(unit)
    cols = delta.keys
    heads, conv = [], []
    for c in cols:
        if c.startswith("new_"):
            heads.append(f"New {label_for(c[4:])}".replace("°C", u))
            conv.append("t" if is_temperature(c) else "")
        elif c in ("name", "changed", "limit_flips", "end_c_base", "end_c_new"):
            heads.append({"name": "Cut", "changed": "Changed", "limit_flips": "Limits that flip",
                          "end_c_base": f"End TBP before [{u}]", "end_c_new": f"End TBP after [{u}]"}[c])
            conv.append("t" if c.startswith("end_c") else "")
        else:
            heads.append(f"Change in {label_for(c)}".replace("°C", u))
            conv.append("d" if is_temperature(c) else "")
    rows = [[temp_in_unit(r[c], unit, difference=k == "d") if k else r[c] for c, k in zip(cols, conv)]
            for r in delta.rows()]
    return csv_text(heads, rows).encode("utf-8")


def sweep_headers(df) -> list[str]:
    """The sweep table's headers in the cut CSV's style: the cut's name, then the labelled quality with its
    unit ('kerosene Yield [vol %]'); the cut point as 'Cut point [°C TBP]' (or °F for a frame in °F)."""
    from .tables import label_for

    names = {"lower": df.attrs.get("lower", "lower cut"), "upper": df.attrs.get("upper", "upper cut")}
    out = []
    for c in df.columns:
        side, _, q = c.partition("_")
        if c in ("cut_point_c", "cut_point_f"):
            out.append(f"Cut point [°{c[-1].upper()} TBP]")
        else:
            out.append(f"{names.get(side, side)} {label_for(q)}")
    return out


def plot_sweep(df, target, crude: str, limits: list | None = None, unit: str = "C") -> None:
    """Yields and key qualities of the two neighbouring cuts against the moving cut point; ``df`` as
    :func:`~.tables.frame_in_unit` shows it in ``unit`` ('C' or 'F'), the temperature limits drawn in it."""
    from .tables import deg, is_temperature, temp_in_unit, unit_key

    def k(side, q):
        return f"{side}_{unit_key(q, unit)}"

    u = deg(unit)
    lo, hi = df.attrs.get("lower", "lower cut"), df.attrs.get("upper", "upper cut")
    t = df[unit_key("cut_point_c", unit)]
    fig, axs = subplots(2, 2, figsize=(11, 7.5), sharex=True)
    (a1, a2), (a3, a4) = axs
    a1.plot(t, df["lower_vol_pct"], color=SIDE_COLOURS[0], label=f"{lo} vol %")
    a1.plot(t, df["upper_vol_pct"], color=SIDE_COLOURS[1], label=f"{hi} vol %")
    a1.plot(t, df["lower_wt_pct"], color=SIDE_COLOURS[0], ls="--", label=f"{lo} wt %")
    a1.plot(t, df["upper_wt_pct"], color=SIDE_COLOURS[1], ls="--", label=f"{hi} wt %")
    a1.set_ylabel("Yield [% of crude]")
    a1.set_title("Yields")
    a2.plot(t, sg_to_density15(df["lower_sg"].to_numpy()), color=SIDE_COLOURS[0], label=lo)
    a2.plot(t, sg_to_density15(df["upper_sg"].to_numpy()), color=SIDE_COLOURS[1], label=hi)
    a2.set_ylabel("Density at 15 °C [kg/m3]")
    a2.set_title("Density")
    a3.plot(t, df[k("lower", "d86_95_c")], color=SIDE_COLOURS[0], label=f"{lo} D86 95 %")
    a3.plot(t, df[k("upper", "d86_10_c")], color=SIDE_COLOURS[1], label=f"{hi} D86 10 %")
    a3.set_ylabel(f"D86 estimate [{u}]")
    a3.set_title("Distillation at the boundary")
    a4.plot(t, df[k("lower", "flash_c_est")], color=SIDE_COLOURS[0], label=f"{lo} flash est.")
    a4.plot(t, df[k("upper", "flash_c_est")], color=SIDE_COLOURS[1], label=f"{hi} flash est.")
    a4.set_ylabel(f"Flash point estimate [{u}]")
    a4.set_title("Flash estimate (measure by ASTM D93) and cetane index")
    a5 = a4.twinx()  # the cetane index on its own axis: it is not a temperature
    for side, name, colour in (("lower", lo, SIDE_COLOURS[0]), ("upper", hi, SIDE_COLOURS[1])):
        if np.isfinite(df[f"{side}_cetane_index_d4737"]).any():
            a5.plot(t, df[f"{side}_cetane_index_d4737"], color=colour, ls=":", label=f"{name} CCI (right axis)")
    if a5.lines:
        a5.legend(fontsize=7, loc="lower right")
    a5.set_ylabel("Calculated cetane index D4737 [-]")
    drawn = {(lo, "d86_95_c"): a3, (hi, "d86_10_c"): a3, (lo, "flash_c_est"): a4, (hi, "flash_c_est"): a4,
             (lo, "cetane_index_d4737"): a5, (hi, "cetane_index_d4737"): a5, (lo, "density_15c_kg_m3"): a2,
             (hi, "density_15c_kg_m3"): a2}
    for lim in limits or []:
        ax = drawn.get((lim.cut, lim.property))  # only limits on a quality that is plotted for that cut
        if ax is not None:
            for v in (lim.min, lim.max):
                if v is not None:
                    v = temp_in_unit(v, unit) if is_temperature(lim.property) else v
                    ax.axhline(v, color="#c62828", lw=0.8, ls="-.")
                    right = ax is a5  # the right axis's limits are labelled at the right, the left's at the left
                    ax.text(t.iloc[-1] if right else t.iloc[0], v,
                            f" {limit_title(lim.cut, lim.label or lim.property)}: {v:g} ", color="#c62828",
                            fontsize=7, va="bottom", ha="right" if right else "left")
    for ax in (a1, a2, a3, a4):
        ax.grid(alpha=0.3)
        ax.legend(fontsize=7)
    for ax in (a3, a4):
        ax.set_xlabel(f"Cut point {lo} / {hi} [{u} TBP]")
    fig.suptitle(f"{crude}: cut-point sweep (estimates for screening)")
    save_png(fig, target, tight=True)


def round_levels(lo: float, hi: float, n: int = 20) -> np.ndarray:
    """Contour levels at round numbers (steps of 1, 2, 2.5 or 5 times a power of ten) covering ``lo`` to
    ``hi`` in at most ``n`` bands, so that the colour bar's ticks read as round values.

    Examples
    --------
    >>> round_levels(11.73, 12.41, 10).tolist()[:3]
    [11.7, 11.8, 11.9]
    """
    from matplotlib.ticker import MaxNLocator

    if not hi > lo:  # a flat objective: one band around it
        lo, hi = lo - 0.5, hi + 0.5
    lev = MaxNLocator(nbins=n, steps=[1, 2, 2.5, 5, 10]).tick_values(lo, hi)
    lev = lev[(lev >= lev[lev <= lo].max()) & (lev <= lev[lev >= hi].min())]
    step = float(lev[1] - lev[0])
    return np.round(lev, max(0, 2 - int(np.floor(np.log10(step)))))  # no float noise in the tick labels


def plot_optimum(res, target, names_moved: list[str], title: str, objective_label: str, before=None,
                 after=None, temp_unit: str = "C") -> None:
    """The optimiser's answer: for two moving cut points, the objective over the brute-force grid with the
    region breaking a limit greyed out, the start and the optimum marked, cut points in ``temp_unit`` ('C' or
    'F'); otherwise yields before and after."""
    from .tables import deg, temp_in_unit

    g = dict(res.grid)
    if "x" in g:
        g["x"], g["y"] = (np.array([temp_in_unit(v, temp_unit) for v in g[k]]) for k in ("x", "y"))
        start = [temp_in_unit(v, temp_unit) for v in res.start_ends_c[res.var_index]]
        best = [temp_in_unit(v, temp_unit) for v in res.ends_c[res.var_index]]
        fig, ax = subplots(figsize=(8, 6))
        obj = g["objective"].reshape(g["shape"])
        ok = g["feasible"].reshape(g["shape"])
        # the colour bar spans the feasible values; infeasible cells are clipped into it and hatched over
        finite = obj[np.isfinite(obj) & ok] if (ok & np.isfinite(obj)).any() else obj[np.isfinite(obj)]
        lo_v, hi_v = (float(finite.min()), float(finite.max())) if finite.size else (0.0, 1.0)
        levels = round_levels(lo_v, hi_v)
        shown = np.clip(np.where(np.isfinite(obj), obj, levels[0]), levels[0], levels[-1])
        cs = ax.contourf(g["x"], g["y"], shown.T, levels=levels, cmap="viridis")
        fig.colorbar(cs, ax=ax, label=objective_label)
        if (~ok).any():
            ax.contourf(g["x"], g["y"], (~ok).T.astype(float), levels=[0.5, 1.5], colors=["#616161"], alpha=0.55,
                        hatches=["///"])
            ax.contour(g["x"], g["y"], (~ok).T.astype(float), levels=[0.5], colors=["#212121"], linewidths=1.2)
        ax.plot(*start, "o", color="#c62828", ms=9, label="start")
        ax.plot(*best, "*", color="#ffeb3b", mec="black", ms=16, label="optimum")
        ax.set_xlabel(f"{names_moved[0]} [{deg(temp_unit)} TBP]")
        ax.set_ylabel(f"{names_moved[1]} [{deg(temp_unit)} TBP]")
        ax.legend(loc="lower right", fontsize=8)
        ax.text(0.01, 0.99, "hatched grey: breaks a product limit (infeasible)", transform=ax.transAxes, va="top",
                fontsize=8, bbox={"fc": "white", "ec": "none", "alpha": 0.8})
    else:
        fig, ax = subplots(figsize=(9, 5))
        x = np.arange(len(before))
        ax.bar(x - 0.2, before["vol_pct"], 0.4, label="start", color="#90a4ae")
        ax.bar(x + 0.2, after["vol_pct"], 0.4, label="optimum", color="#2e7d32")
        ax.set_xticks(x, list(before["name"]), rotation=25, ha="right")
        ax.set_ylabel("Yield [vol % of crude]")
        ax.legend()
        ax.grid(axis="y", alpha=0.3)
    ax.set_title(title)
    save_png(fig, target, tight=True)


def blend_plan_workbook(plan):
    """openpyxl Workbook of the blend plan: sheets 'shares' and 'targets' (slack and marginal value)."""
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "shares"
    bounds = {b["crude"]: b for b in plan.share_bounds}
    rows = []
    for k, v in plan.shares_pct.items():
        b = bounds.get(k, {})
        at = {"min": "at its minimum", "max": "at its maximum"}.get(b.get("at"), "")
        rows.append([k, v, b.get("min_pct"), b.get("max_pct"), at, b.get("marginal_per_pct")])
    write_table(ws, ["Crude", "Share [vol %]", "Minimum [vol %]", "Maximum [vol %]", "On a bound",
                     "Marginal value per vol % of the bound"], rows, [None, "0.00", "0.00", "0.00", None, "0.000"],
                widths=[28, 14, 16, 16, 16, 34])
    r = len(plan.shares_pct) + 3
    for k, (lab, val, fmt) in enumerate([("Objective", plan.objective, None), ("Value", plan.value, "0.00"),
                                          ("Blend API [°API]", plan.api, "0.00"),
                                          ("Blend sulfur [wt %]", plan.sulfur_wt_pct, "0.000"),
                                          ("Feasible", "yes" if plan.feasible else "no", None),
                                          ("Compatibility", plan.compatibility.text()
                                           if plan.compatibility is not None else "not assessed", None)]):
        ws.cell(row=r + k, column=1, value=lab)
        c = ws.cell(row=r + k, column=2, value=val if val == val else None)
        if fmt:
            c.number_format = fmt
    ws = wb.create_sheet("targets")
    write_table(ws, ["Target", "Limit", "Achieved", "Unit", "Slack", "Binding", "Marginal value per unit"],
                [[t["target"], t["limit"], t["achieved"], t["unit"], t["slack"], t["binding"],
                  t["marginal_per_unit"]] for t in plan.targets],
                [None, "0.000", "0.000", None, "0.000", None, "0.0000"], widths=[30, 10, 10, 8, 10, 9, 22])
    ws.cell(row=len(plan.targets) + 3, column=1,
            value="Marginal value: change of the objective per unit of the target (linear programme duals); "
                  "linear blending rules, estimates for screening.")
    finish_workbook(wb, "Blend plan")
    return wb


def plot_blend_plan(plan, target) -> None:
    """The :func:`blend_plan_figure` of ``plan`` as PNG into ``target``."""
    fig = blend_plan_figure(plan)
    save_png(fig, target, tight=True)


def blend_plan_figure(plan):
    """The blend optimiser's plan as a matplotlib figure: each crude's share inside its allowed range (a bound
    the share sits on marked and named), the blend's yields, and a table of the targets and the binding share
    bounds with what the blend achieves, the slack and the marginal value."""
    from .precision import fixed, shown

    fig, (a1, a2, a3) = subplots(1, 3, figsize=(14, 4.8), gridspec_kw={"width_ratios": [1.1, 1.0, 1.5]})
    bounds = plan.share_bounds or [{"crude": k, "share_pct": x, "min_pct": 0.0, "max_pct": 100.0, "at": None,
                                    "marginal_per_pct": None} for k, x in plan.shares_pct.items()]
    y = np.arange(len(bounds))[::-1]
    for yk, b in zip(y, bounds):
        a1.barh(yk, b["max_pct"] - b["min_pct"], left=b["min_pct"], height=0.7, color="#e0e0e0", zorder=1)
        a1.barh(yk, b["share_pct"], height=0.45, color="#00838f", zorder=2)
        label = f" {shown('share_pct', b['share_pct'])} %"
        if b["at"]:
            edge = b["min_pct"] if b["at"] == "min" else b["max_pct"]
            a1.plot([edge, edge], [yk - 0.4, yk + 0.4], color="#b71c1c", lw=2.5, zorder=3)
            label += f" (at its {'minimum' if b['at'] == 'min' else 'maximum'})"
        a1.text(b["share_pct"], yk, label, va="center", fontsize=8, zorder=4,
                color="#b71c1c" if b["at"] else "black")
    a1.set_yticks(y, [b["crude"] for b in bounds])
    a1.set_xlabel("Share of the blend [vol %]; grey: allowed range")
    a1.set_xlim(0, 118)
    a1.set_xticks([0, 20, 40, 60, 80, 100])
    a1.set_title("Shares")
    a1.grid(axis="x", alpha=0.3)
    cuts = list(plan.yields)
    yc = np.arange(len(cuts))[::-1]
    a2.barh(yc, [plan.yields[c] for c in cuts], color="#7fa7c9")
    for yk, c in zip(yc, cuts):
        a2.text(plan.yields[c], yk, f" {shown('vol_pct', plan.yields[c])}", va="center", fontsize=8)
    a2.set_yticks(yc, cuts)
    a2.set_xlim(0, max(plan.yields.values(), default=1.0) * 1.25)
    a2.set_xlabel("Yield of the blend [vol %]")
    a2.set_title(f"Blend: {shown('api', plan.api)} °API, sulfur "
                 + (f"{shown('sulfur_wt_pct', plan.sulfur_wt_pct)} wt %" if plan.sulfur_wt_pct == plan.sulfur_wt_pct
                    else "not given"), fontsize=10)
    a2.grid(axis="x", alpha=0.3)
    rows = [[t["target"], fixed(t["achieved"], 2), fixed(t["slack"], 2),
             "yes" if t["binding"] else "", "-" if t["marginal_per_unit"] is None
             else fixed(t["marginal_per_unit"], 3, signed=True)] for t in plan.targets]
    rows += [[f"{b['crude']} share {'>=' if b['at'] == 'min' else '<='} "
              f"{b['min_pct' if b['at'] == 'min' else 'max_pct']:g} %", shown("share_pct", b["share_pct"]), "0.00",
              "yes", "-" if b["marginal_per_pct"] is None else fixed(b["marginal_per_pct"], 3, signed=True)]
             for b in bounds if b["at"]]
    a3.axis("off")
    if rows:
        from matplotlib.table import Table

        height = min(0.1 * (len(rows) + 1), 0.75)
        tab = Table(a3, bbox=[0.0, 0.95 - height, 1.0, height])
        widths = [0.5, 0.14, 0.11, 0.1, 0.15]
        for r, cells in enumerate([["Target or bound", "Achieved", "Slack", "Binds", "Marginal"]] + rows):
            for col, text in enumerate(cells):
                cell = tab.add_cell(r, col, widths[col], 1.0 / (len(rows) + 1), text=text,
                                    loc="left" if col == 0 else "right",
                                    facecolor="#fdecea" if r > 0 and rows[r - 1][3] == "yes" else "white")
                cell.set_fontsize(8)
        tab.auto_set_font_size(False)
        a3.add_table(tab)
    else:
        a3.text(0.5, 0.9, "no targets and no share bound binding", ha="center", fontsize=9)
    notes = [f"NOT MET: {k} (short by {fixed(v, 2)})" for k, v in plan.shortfalls.items()]
    if plan.compatibility is not None:
        c = plan.compatibility
        notes.append(f"Crude compatibility: {c.word}" + (f" (S_BN {fixed(c.sbn_mix, 1)} vs I_N max "
                                                         f"{fixed(c.in_max, 1)})" if c.sbn_mix is not None else ""))
    notes += ["Marginal: change of the objective per unit of a target", "or per vol % of a share bound "
              "(linear programme duals)"]
    a3.text(0.0, 0.02, "\n".join(notes), fontsize=7, va="bottom", wrap=True,
            color="#b71c1c" if plan.shortfalls else "#424242")
    a3.set_title(f"{plan.objective}: {fixed(plan.value, 2)}")
    fig.suptitle("Blend optimiser (linear blending rules; estimates for screening)")
    fig.tight_layout()
    return fig


def calibration_csv(cal) -> bytes:
    """Every measurement of the calibration beside its fitted value: product, what, measured, fitted, the
    residual (fitted less measured) and the standard deviation that weighted it."""
    from .write import csv_text

    rows = [[r["product"], r["what"], r["measured"], r["fitted"], r["fitted"] - r["measured"], r["sigma"]]
            for r in cal.residuals]
    return csv_text(["Product", "Measured quantity", "Measured", "Fitted", "Residual (fitted - measured)",
                     "Standard deviation"], rows).encode("utf-8")


PSEUDO_COLUMNS = [("name", "Component"), ("product", "Product"), ("pure", "Pure component"), ("nbp_c", "NBP [°C]"),
                  ("sg", "SG 60/60 °F [-]"), ("api", "API gravity [°API]"), ("watson_k", "Watson K [-]"),
                  ("mw", "Molar mass [g/mol]"), ("tc_c", "Tc [°C]"), ("pc_bar", "Pc [bar]"),
                  ("omega", "Acentric factor [-]"), ("vc_m3_kmol", "Vc [m³/kmol]"), ("zc", "Zc [-]"),
                  ("vol_pct", "Crude [vol %]"), ("wt_pct", "Crude [wt %]"), ("mol_pct", "Crude [mol %]"),
                  ("product_vol_pct", "Product [vol %]"), ("product_wt_pct", "Product [wt %]"),
                  ("product_mol_pct", "Product [mol %]"), ("start_c", "From TBP [°C]"), ("end_c", "To TBP [°C]"),
                  ("hydrogen_wt_pct", "Hydrogen for Cp [wt %]"), ("cp_a", "Cp° a [J/(mol·K)]"),
                  ("cp_b", "Cp° b [J/(mol·K²)]"), ("cp_c", "Cp° c [J/(mol·K³)]"), ("cp_d", "Cp° d [J/(mol·K⁴)]"),
                  ("in_range", "Inside the method's range"), ("extrapolated", "On the fitted extension")]
"""The neutral export of the pseudo-components: one row per component, these columns (those present)."""


def pseudo_files(assay, model, comps, method: str) -> dict[str, bytes]:
    """``<crude>_pseudo.csv`` (one row per component, units in the headers, the method in a column) and
    ``<crude>_pseudo.xlsx`` (sheets 'components' and 'notes')."""
    import io

    import openpyxl

    from .write import csv_text, slug

    flat = [{**c, **{f"cp_{k}": c["cp_ideal_gas"][k] for k in "abcd"}} for c in comps]
    cols = [(k, h) for k, h in PSEUDO_COLUMNS if k in flat[0]]
    heads = [h for _, h in cols] + ["Method"]
    rows = [[c[k] for k, _ in cols] + ["chemicals (pure component)" if c["pure"] else method] for c in flat]
    base = slug(assay.name)
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "components"
    write_table(ws, heads, rows, keys=[k for k, _ in cols] + [None], widths=[16] * len(heads), freeze="B2")
    ws = wb.create_sheet("notes")
    write_table(ws, ["Topic", "Text"], [[k, v] for k, v in pseudo_notes(assay, model, comps, method)],
                widths=[24, 120])
    finish_workbook(wb, "Pseudo-components")
    buf = io.BytesIO()
    wb.save(buf)
    return {f"{base}_pseudo.csv": csv_text(heads, rows).encode("utf-8"), f"{base}_pseudo.xlsx": buf.getvalue()}


def pseudo_notes(assay, model, comps, method: str) -> list[tuple[str, str]]:
    """What a reader of the components must know: the method, the pure components' source, the recombination
    against the model and the crude, the slices outside the method's range or on the extension, the caution."""
    sg_v = sum(c["vol_pct"] * c["sg"] for c in comps) / 100.0
    out = [("Method", f"{method}: MW, Tc, Pc, acentric factor and Vc of each pseudo-component from its NBP and SG "
                      f"(see the README's pseudo-components section)"),
           ("Pure components", "light ends placed on the curve as pure components: NBP, MW, Tc, Pc, acentric "
                               "factor and Vc of the chemicals library; SG from GPA 2145"),
           ("Recombination", f"volume {sum(c['vol_pct'] for c in comps):.6f} %, weight "
                             f"{sum(c['wt_pct'] for c in comps):.6f} %, moles {sum(c['mol_pct'] for c in comps):.6f} "
                             f"%; volume-average SG {sg_v:.5f} against the model's {model.sg:.5f} and the whole "
                             f"crude's {assay.sg:.5f} (the model keeps the narrow cuts as measured and reports the "
                             f"difference as its closure)")]
    out.append(("Ideal-gas heat capacity", CP_FORM + "; the light ends at their formula's hydrogen, the "
                "pseudo-components at Riazi's CH estimate from NBP and SG (whatever the method above)"))
    h_out = [c["name"] for c in comps if not c["cp_ideal_gas"]["hydrogen_in_range"]]
    if h_out:
        out.append(("Hydrogen extrapolated", ", ".join(h_out) + ": outside M 70-700, Riazi's CH form "
                                                                "extrapolated for the heat capacity"))
    outside = [c["name"] for c in comps if not c["in_range"]]
    if outside:
        out.append(("Outside the method's range", ", ".join(outside) + ": computed beyond the data the method "
                                                                    "was fitted to; indicative only"))
    ext = [c["name"] for c in comps if c["extrapolated"]]
    if ext:
        out.append(("Extrapolated", ", ".join(ext) + ": on the curve's fitted extension"))
    out.append(("Caution", "estimates for screening, not measured properties: check the components against your "
                           "simulator's own characterisation and the laboratory's data"))
    return out
