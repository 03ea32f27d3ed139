"""PNG plots of a yield report (matplotlib, Agg backend, imported only when a plot is drawn)."""

from __future__ import annotations

import numpy as np

from ..model.tbp_curve import BAND_LAST_POINTS as BAND_LAST

CUT_COLOURS = ["#f1cfe0", "#6f8f5a", "#ede4cf", "#d9a441", "#7fa7c9", "#9c7b5b", "#f4d58d", "#4f7fb0", "#e9b3a6",
               "#8f86b8"]
"""Fill colours of the cuts, in order (cycled), drawn at :data:`FILL_ALPHA`: our own palette.  Neighbouring
products differ by at least 20 CAM02-UCS ΔE in normal colour vision and under simulated deuteranopia, protanopia and tritanopia (tested), so that
touching bands stay apart for colour-blind readers."""
FILL_ALPHA = 0.85
"""Opacity of the cut bands over the white plot."""
LABEL_MIN_PCT = 6.0
"""A cut narrower than this [vol %] gets its label outside, on a leader line, instead of inside its band."""
PLOT_TOP_PCT = 99.0
"""The TBP plot stops at this percent: the last fraction of a percent of the extension is not informative."""


def subplots(*args, figsize=None, layout=None, **kwargs):
    """A new figure and its axes (``Figure.subplots`` arguments), drawn by matplotlib's Agg canvas without
    pyplot: no global figure registry to close, and a tenth of a second less to import."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=figsize, layout=layout)
    FigureCanvasAgg(fig)
    return fig, fig.subplots(*args, **kwargs)


PNG_DPI = 150
"""Resolution of every PNG of the reports [dots per inch]."""


def margins(fig, left: float, right: float, top: float, bottom: float, wspace: float | None = None) -> None:
    """Fixed margins around a figure's axes, in inches (a fixed layout saves a second rendering pass that a
    tight bounding box needs)."""
    w, h = fig.get_size_inches()
    fig.subplots_adjust(left=left / w, right=1.0 - right / w, top=1.0 - top / h, bottom=bottom / h, wspace=wspace)


def save_png(fig, target, tight: bool = False) -> None:
    """Render ``fig`` as PNG to ``target`` (a binary file object; the report writer places it atomically), at
    :data:`PNG_DPI`; ``tight=True`` for a figure without fixed margins (:func:`margins`), which costs a second
    rendering pass."""
    fig.savefig(target, dpi=PNG_DPI, bbox_inches="tight" if tight else None, format="png")


def plot_tbp(result, target) -> None:
    """The :func:`tbp_figure` of ``result`` as PNG into ``target``."""
    fig = tbp_figure(result)
    save_png(fig, target)


def tbp_figure(result):
    """TBP curve with the cuts shaded and named; measured part solid, extrapolated part dashed, with the
    spread of the extension (:func:`~assaycut.model.tbp_curve.extension_band`) as a band.  Each wide cut is
    named inside its band on the side the curve leaves free; narrow cuts on leaders, stacked under the curve.
    Returns the matplotlib Figure (the caller closes it)."""
    m = result.model
    c = m.curve
    v = np.linspace(0.0, PLOT_TOP_PCT, 600)
    t = c.temp_at(v)
    fig, ax = subplots(figsize=(9, 5.5))
    meas = (v >= c.measured_lo) & (v <= c.measured_hi)
    ax.plot(np.where(meas, v, np.nan), np.where(meas, t, np.nan), color="#1a237e", lw=2, label="TBP, measured")
    ext = ~meas
    ax.plot(np.where(ext, v, np.nan), np.where(ext, t, np.nan), color="#c62828", lw=2, ls="--",
            label="TBP, extrapolated (fitted distribution)")
    if c.fit is not None and c.measured_hi < 100.0:
        from ..model.tbp_curve import extension_band

        vb = np.linspace(c.measured_hi, PLOT_TOP_PCT, 120)
        lo_b, hi_b, refits = extension_band(c, vb)
        if refits:
            ax.fill_between(vb, lo_b, hi_b, facecolor="#6a1b9a", alpha=0.28, edgecolor="#4a148c", lw=0.8,
                            zorder=3,
                            label=f"extension spread: refits on all and the last {min(BAND_LAST)}-{max(BAND_LAST)} "
                                  f"points")
    pts = np.asarray(c.spline.x)
    pv = np.asarray(c.spline.y)
    keep = (pv >= c.measured_lo) & (pv <= c.measured_hi)
    ax.plot(pv[keep], pts[keep], "o", ms=3.5, color="#1a237e", label="curve nodes")
    tmin, tmax = float(t.min()), float(t.max())
    span = tmax - tmin
    n_out = 0
    rows = result.cuts.rows()
    def band(r):
        return r["cum_vol_pct"] - r["vol_pct"], min(r["cum_vol_pct"], PLOT_TOP_PCT)

    narrow = [r for r in rows if 0.0 < band(r)[1] - band(r)[0] < LABEL_MIN_PCT]  # labelled on leader lines
    right = max([band(r)[1] for r in narrow] or [0.0])
    for i, r in enumerate(rows):
        lo, hi = band(r)
        if hi <= lo:
            continue
        ax.axvspan(lo, hi, color=CUT_COLOURS[i % len(CUT_COLOURS)], alpha=FILL_ALPHA, lw=0)
        text = f"{r['name']} {r['vol_pct']:.1f}%"
        if hi - lo >= LABEL_MIN_PCT:  # the label on the side of the band the curve leaves free
            low_curve = float(c.temp_at((lo + hi) / 2)) < tmin + 0.5 * span
            ax.text((lo + hi) / 2, tmax - 0.03 * span if low_curve else tmin + 0.03 * span,
                    text.replace(" ", "\n", 1) if len(text) > 14 else text, rotation=90, ha="center",
                    va="top" if low_curve else "bottom", fontsize=8)
        else:  # a narrow cut: its label on a leader line, stacked under the curve to the right of the narrow cuts,
            # the lightest on top, so that leaders from bands further right end lower and never cross
            level = len(narrow) - 1 - n_out
            ax.annotate(text, xy=((lo + hi) / 2, tmin + 0.01 * span),
                        xytext=(right + 3.0, tmin + (0.04 + 0.075 * level) * span), fontsize=8, va="center",
                        arrowprops={"arrowstyle": "-", "lw": 0.7, "color": "#424242"},
                        bbox={"boxstyle": "round,pad=0.2", "fc": "white", "ec": "#9e9e9e", "lw": 0.5})
            n_out += 1
    for e in result.cut_set.ends_c:
        ax.axhline(e, color="#616161", lw=0.6, ls=":")
    ax.set_xlim(0, 100)
    ax.set_xlabel("Distilled [vol % of crude]")
    ax.set_ylabel("TBP [°C]")
    ax.set_title(f"{result.assay.name}: TBP curve and cuts (estimates for screening)")
    ax.grid(alpha=0.3)
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.11), ncol=2, fontsize=8, frameon=False)
    margins(fig, left=0.75, right=0.2, top=0.4, bottom=1.1)
    return fig


def plot_yields(result, target) -> None:
    """Yield bar chart on the volume and weight bases."""
    cuts = result.cuts
    x = np.arange(len(cuts))
    fig, ax = subplots(figsize=(9, 4.8))
    err_v = err_w = None
    if result.bands is not None:  # P10-P90 bands as error bars
        b = result.bands
        err_v = np.abs(np.vstack([cuts["vol_pct"] - b["vol_pct_p10"], b["vol_pct_p90"] - cuts["vol_pct"]]))
        err_w = np.abs(np.vstack([cuts["wt_pct"] - b["wt_pct_p10"], b["wt_pct_p90"] - cuts["wt_pct"]]))
    b1 = ax.bar(x - 0.2, cuts["vol_pct"], 0.4, label="vol %", color="#3949ab", yerr=err_v, capsize=3)
    b2 = ax.bar(x + 0.2, cuts["wt_pct"], 0.4, label="wt %", color="#ef6c00", yerr=err_w, capsize=3)
    for bars, err in ((b1, err_v), (b2, err_w)):
        for i, rect in enumerate(bars):
            top = rect.get_height() + (float(np.nan_to_num(err[1][i])) if err is not None else 0.0)
            ax.text(rect.get_x() + rect.get_width() / 2, top, f"{rect.get_height():.1f}",
                    ha="center", va="bottom", fontsize=7)
    ax.set_xticks(x, [str(n) for n in cuts["name"]], rotation=25, ha="right")
    ax.set_ylabel("Yield [% of crude]")
    ax.set_title(f"{result.assay.name}: yields by cut"
                 + (f" (bars: P10-P90 of {result.bands.attrs['draws']} draws, assumed uncertainties)"
                    if result.bands is not None else ""), fontsize=10)
    ax.legend()
    ax.grid(axis="y", alpha=0.3)
    margins(fig, left=0.75, right=0.2, top=0.4, bottom=1.15)
    save_png(fig, target)


def plot_properties(result, target) -> None:
    """Local density (volume basis) and sulfur (weight basis) against percent distilled, with narrow cuts."""
    m = result.model
    v = np.linspace(0.0, 100.0, 401)
    fig, (a1, a2) = subplots(1, 2, figsize=(11, 4.5))
    a1.plot(v, m.sg_dist(v), color="#2e7d32", label="density distribution (cuts as measured)" if m.density_reconciliation_pct is None else
            "density distribution (scaled to the crude)")
    nc = result.assay.narrow_cuts
    if nc is not None and m.density_source.startswith("narrow"):
        from ..model.distributions import narrow_cut_positions

        va, vb = narrow_cut_positions(result.assay, m.curve)
        ok = np.isfinite(nc.sg)
        a1.plot(((va + vb) / 2)[ok], nc.sg[ok], "s", color="#1b5e20", ms=4, label="narrow cuts (measured)")
    a1.set_xlabel("Distilled [vol %]")
    a1.set_ylabel("SG 60/60 °F [-]")
    a1.set_title("Density")
    a1.grid(alpha=0.3)
    a1.legend(fontsize=8)
    w = np.linspace(0.0, 100.0, 401)
    if m.sulfur_dist is not None:
        a2.plot(w, m.sulfur_dist(w), color="#f9a825",
                label=("ESTIMATED from the whole-crude sulfur (development-set shape)" if m.sulfur_estimated else
                       "sulfur distribution (cuts as measured)" if m.sulfur_reconciliation_pct is None else
                       "sulfur distribution (scaled to the crude)"))
        if nc is not None:
            from ..model.distributions import narrow_cut_positions

            va, vb = narrow_cut_positions(result.assay, m.curve)
            wa, wb = m.wt_at_vol(va), m.wt_at_vol(vb)
            ok = np.isfinite(nc.sulfur_wt_pct)
            a2.plot(((wa + wb) / 2)[ok], nc.sulfur_wt_pct[ok], "s", color="#e65100", ms=4,
                    label="narrow cuts (measured)")
        a2.legend(fontsize=8)
    else:
        a2.text(0.5, 0.5, "no sulfur data", ha="center", transform=a2.transAxes)
    a2.set_xlabel("Distilled [wt %]")
    a2.set_ylabel("Sulfur [wt %]")
    a2.set_title("Sulfur")
    a2.grid(alpha=0.3)
    fig.suptitle(f"{result.assay.name}: property distributions (estimates)")
    margins(fig, left=0.75, right=0.2, top=0.75, bottom=0.6, wspace=0.25)
    save_png(fig, target)


def plot_products(result, target) -> None:
    """Real-column products over the crude: how each product's material spreads over TBP (tails into the
    neighbours), and each product's own TBP curve against the ideal cut's."""
    pc = result.products
    fig, (a1, a2) = subplots(1, 2, figsize=(12, 5))
    t = pc["slice_temp_c"]
    dv = pc["slice_pct"]
    edges = pc["temp_c"]
    top = float(np.quantile(t, 0.98))
    bins = np.arange(np.floor(t.min() / BIN_C) * BIN_C, top + BIN_C, BIN_C)
    mids = 0.5 * (bins[1:] + bins[:-1])
    crude, _ = np.histogram(t, bins=bins, weights=dv)
    a1.fill_between(mids, crude / BIN_C, color="#bdbdbd", alpha=0.6, label="crude", step="mid")
    names = list(result.cuts["name"])
    for j, n in enumerate(names):
        h, _ = np.histogram(t, bins=bins, weights=pc["fractions"][:, j] * dv)
        a1.step(mids, h / BIN_C, where="mid", color=CUT_COLOURS_DARK[j % len(CUT_COLOURS_DARK)], lw=1.4,
                ls=CUT_DASHES[j % len(CUT_DASHES)], label=n)
    a1.set_xlabel("TBP [°C]")
    a1.set_ylabel(f"Distribution [vol % of crude per °C, {BIN_C:g} °C bins]")
    a1.set_title("Where each product's material boils")
    a1.grid(alpha=0.3)
    a1.legend(fontsize=7)
    c = result.model.curve
    ideal = result.cuts
    p = np.linspace(0.5, 99.5, 100)
    for j, r in enumerate(ideal.rows()):
        if r["vol_pct"] <= 1e-9:
            continue
        colour = CUT_COLOURS_DARK[j % len(CUT_COLOURS_DARK)]
        a2.plot(p, np.interp(p, pc["cum"][:, j], edges), color=colour, lw=1.6, label=f"{r['name']} (real column)")
        va = (r["cum_vol_pct"] - r["vol_pct"]) if np.isnan(r["start_c"]) else float(c.pct_at(r["start_c"]))
        vb = 100.0 if np.isnan(r["end_c"]) else float(c.pct_at(r["end_c"]))
        if vb > va:
            a2.plot(p, c.temp_at(va + p / 100.0 * (vb - va)), color=colour, lw=0.9, ls="--")
    a2.set_ylim(top=min(float(np.nanmax(edges)), 900.0))
    a2.set_xlabel("Distilled [vol % of the product]")
    a2.set_ylabel("TBP [°C]")
    a2.set_title("Product TBP curves (dashed: ideal cuts)")
    a2.grid(alpha=0.3)
    a2.legend(fontsize=6, loc="upper left")
    fig.suptitle(f"{result.assay.name}: real-column products, TBP 5-95 overlaps "
                 + ", ".join(f"{n} {w:g} °C" for n, w in result.cut_set.overlaps.items()))
    save_png(fig, target, tight=True)


BIN_C = 5.0
"""Temperature bin of the product distribution plot. [°C]"""
CUT_COLOURS_DARK = ["#5b3f8f", "#d1495b", "#6fb7e8", "#b0a23a", "#2b2b2b", "#2a9d8f", "#7a4f00", "#8d8d8d",
                    "#1f4e9c", "#e08a1e"]
"""Line colours of the products, in order (cycled; our own palette).  Neighbouring products, whose tails overlap,
differ by at least 25 CAM02-UCS ΔE in normal colour vision and under simulated deuteranopia, protanopia and
tritanopia (tested); :data:`CUT_DASHES` tells apart the products further apart."""
CUT_DASHES = ["-", "--", "-.", (0, (1, 1.5))]
"""Line styles of the products' distribution lines, in order (cycled)."""


def quality_order(cuts, names: list[str]) -> list[str]:
    """Quality columns in boiling order: by the volume-weighted middle of the cuts that carry a value (RVP and
    octane of the naphthas first, the residue's CCR and metals last), then by name."""
    mids = np.asarray(cuts["cum_vol_pct"], dtype=float) - 0.5 * np.asarray(cuts["vol_pct"], dtype=float)
    vol = np.asarray(cuts["vol_pct"], dtype=float)

    def where(n):
        v = np.array([x is not None and np.isfinite(x) for x in cuts[n]], dtype=bool)
        return float(np.sum(mids[v] * vol[v]) / np.sum(vol[v])) if v.any() and np.sum(vol[v]) > 0 else 101.0

    return sorted(names, key=lambda n: (where(n), n))


def plot_qualities(result, target) -> None:
    """One panel per quality, in boiling order (:func:`quality_order`), all against distilled vol %: the
    narrow cuts' measured values as steps over their range, and each cut's value as a bar across the cut
    (solid: from the narrow cuts; hatched: estimated by a correlation), named under the axis.  Laid out with
    fixed margins (tight layout over twenty panels took most of a report's time)."""
    from ..model.distributions import narrow_cut_positions
    from .tables import label_for, quality_names

    cuts = result.cuts
    names = quality_order(cuts, quality_names(cuts))
    ncol = 4
    nrow = -(-len(names) // ncol)
    fig, axes = subplots(nrow, ncol, figsize=(4.4 * ncol, 3.1 * nrow + 0.9), squeeze=False)
    top, bottom = 1.0 - 0.75 / (3.1 * nrow + 0.9), 0.75 / (3.1 * nrow + 0.9)
    fig.subplots_adjust(left=0.05, right=0.99, top=top, bottom=bottom, wspace=0.28, hspace=0.75)
    m = result.model
    nc = result.assay.narrow_cuts
    pos = narrow_cut_positions(result.assay, m.curve) if nc is not None else None
    recs = cuts.rows()
    for ax, name in zip(axes.flat, names):
        ticks, labels = [], []
        for r in recs:
            val = r[name]
            if val is None or not np.isfinite(val):
                continue
            lo, hi = r["cum_vol_pct"] - r["vol_pct"], r["cum_vol_pct"]
            est = name in r["estimated"]
            ax.bar((lo + hi) / 2, val, width=hi - lo, color="#9fa8da" if not est else "#ffe082",
                   edgecolor="#283593" if not est else "#ff8f00", hatch="//" if est else None,
                   lw=1.4 if r["extrapolated"] else 0.6, ls="--" if r["extrapolated"] else "-", alpha=0.8)
            ticks.append((lo + hi) / 2)
            labels.append(r["name"])
        if pos is not None and name in nc.extras:
            va, vb = pos
            y = nc.extras[name]
            ok = np.isfinite(y)
            ax.hlines(y[ok], va[ok], vb[ok], color="#b71c1c", lw=2, label="narrow cuts (measured)")
        ax.set_title(label_for(name), fontsize=9, y=1.0, pad=4)  # a fixed place: no title-position search
        spans = [(r["cum_vol_pct"] - r["vol_pct"], r["cum_vol_pct"]) for r in recs
                 if r[name] is not None and np.isfinite(r[name])]
        lo_x = min([a for a, _ in spans], default=0.0)
        hi_x = max([b for _, b in spans], default=100.0)
        ax.set_xlim(lo_x, hi_x if hi_x > lo_x else lo_x + 1.0)  # the cuts that carry the quality, spread out
        ax.set_xticks(ticks, labels, rotation=30, ha="right", fontsize=6.5)
        ax.tick_params(axis="y", labelsize=7)
        ax.grid(alpha=0.3, axis="y")
        if name.startswith("viscosity") and np.nanmax(np.asarray(cuts[name], dtype=float)) > 50:
            ax.set_yscale("log")
    for ax in list(axes.flat)[len(names):]:
        ax.axis("off")
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    fig.legend(handles=[Patch(facecolor="#9fa8da", edgecolor="#283593", label="cut, from the narrow cuts"),
                        Patch(facecolor="#ffe082", edgecolor="#ff8f00", hatch="//", label="cut, estimated"),
                        Patch(facecolor="white", edgecolor="#283593", ls="--", lw=1.4,
                              label="cut flagged extrapolated (dashed edge)"),
                        Line2D([], [], color="#b71c1c", lw=2, label="narrow cut, measured")],
               loc="lower center", ncol=4, fontsize=9, frameon=False)
    fig.suptitle(f"{result.assay.name}: qualities per cut, each bar across its cut's share of the crude "
                 f"[vol %] (estimates for screening)")
    save_png(fig, target)
