"""What a reader sees on the TBP plot: no cut label is crossed by the curve (common practice, no source: a
label under a line cannot be read).  Checked on the rendered figure, in display coordinates, for the demo
crudes and for open real assays (tests/data/open_assays.json: US Government, CC0)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from assaycut.cutting.cutset import default_cut_set
from assaycut.io import load_assay
from assaycut.report.plots import tbp_figure
from assaycut.yields import run_yields


def _labels_clear_of_the_curve(result):
    fig = tbp_figure(result)
    fig.canvas.draw()
    ax = fig.axes[0]
    curve = np.vstack([ln.get_xydata() for ln in ax.get_lines()[:2]])
    curve = curve[np.isfinite(curve).all(axis=1)]
    xy = ax.transData.transform(curve)
    r = fig.canvas.get_renderer()
    for t in ax.texts:
        box = t.get_window_extent(r)
        if t.get_bbox_patch() is not None:
            box = t.get_bbox_patch().get_window_extent(r)
        inside = (xy[:, 0] > box.x0) & (xy[:, 0] < box.x1) & (xy[:, 1] > box.y0) & (xy[:, 1] < box.y1)
        assert not inside.any(), f"{t.get_text()!r} is crossed by the curve"
    # leader lines of narrow cuts never cross each other (segments from the band to the label; a crossing is
    # a sign change of both orientation tests: plane geometry)
    leaders = [(np.asarray(t.xy, float), np.asarray(t.xyann, float)) for t in ax.texts if hasattr(t, "xyann")]

    def side(a, b, c):
        return np.sign((b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]))

    for i, (p1, q1) in enumerate(leaders):
        for p2, q2 in leaders[i + 1:]:
            crossing = side(p1, q1, p2) * side(p1, q1, q2) < 0 and side(p2, q2, p1) * side(p2, q2, q1) < 0
            assert not crossing, "two leader lines cross"


def test_no_cut_label_is_crossed_by_the_curve_nor_leaders_by_each_other_on_the_demo_crudes(demo_paths):
    for p in demo_paths:
        _labels_clear_of_the_curve(run_yields(load_assay(p), default_cut_set()))


@pytest.mark.parametrize("index", [0, 3, 7])
def test_no_cut_label_is_crossed_by_the_curve_on_open_assays(index, tmp_path):
    a = json.loads((Path(__file__).parents[1] / "data" / "open_assays.json").read_text())[index]
    p = tmp_path / "c.csv"
    p.write_text("vol_pct,temp_c\n" + "".join(f"{v},{t}\n" for v, t in a["tbp"]))
    assay = load_assay(str(p), sg=a["density_g_cm3_15_6c"] / 0.999016, sulfur=a["sulfur_wt_pct"])
    _labels_clear_of_the_curve(run_yields(assay, default_cut_set()))
