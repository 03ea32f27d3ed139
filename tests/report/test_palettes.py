"""Colours a colour-blind reader can tell apart: neighbouring cut bands and product lines in the plots, and the
first crudes of the explorer.

The check simulates deuteranopia, protanopia and tritanopia at full severity by the model of Machado, Oliveira &
Fernandes (2009, IEEE TVCG 15(6):1291-1298) as implemented in the open library `colorspacious`, and measures
colour differences in CAM02-UCS (Luo, Cui & Li 2006), `colorspacious`'s default ΔE.  The bounds (20 ΔE for
translucent fills, 25 for lines) are our choice: a difference of this size reads as a different category at a
glance (common practice, no source).
"""

from __future__ import annotations

import itertools
import re
from pathlib import Path

import colorspacious
import numpy as np

VISIONS = [None] + [{"name": "sRGB1+CVD", "cvd_type": t, "severity": 100}
                    for t in ("deuteranomaly", "protanomaly", "tritanomaly")]


def _rgb(hex_colour: str, alpha: float = 1.0) -> np.ndarray:
    c = np.array([int(hex_colour[i:i + 2], 16) for i in (1, 3, 5)]) / 255.0
    return alpha * c + (1.0 - alpha)  # drawn over white


def _least_difference(pairs, alpha: float = 1.0) -> float:
    out = np.inf
    for a, b in pairs:
        for v in VISIONS:
            ca, cb = _rgb(a, alpha), _rgb(b, alpha)
            if v is not None:
                ca = np.clip(colorspacious.cspace_convert(ca, v, "sRGB1"), 0, 1)
                cb = np.clip(colorspacious.cspace_convert(cb, v, "sRGB1"), 0, 1)
            out = min(out, float(colorspacious.deltaE(ca, cb, input_space="sRGB1")))
    return out


def _neighbours(palette):
    return list(zip(palette, palette[1:] + palette[:1]))  # cycled: the last colour meets the first again


def test_neighbouring_cut_bands_stay_apart_for_colour_blind_readers():
    from assaycut.report.plots import CUT_COLOURS, FILL_ALPHA

    assert _least_difference(_neighbours(CUT_COLOURS), alpha=FILL_ALPHA) >= 20.0


def test_neighbouring_product_lines_stay_apart_for_colour_blind_readers():
    from assaycut.report.plots import CUT_COLOURS_DARK

    assert _least_difference(_neighbours(CUT_COLOURS_DARK)) >= 25.0


def test_the_explorers_first_four_crudes_stay_apart_for_colour_blind_readers():
    js = (Path(__file__).parents[2] / "assaycut" / "explore" / "static" / "explorer.js").read_text()
    palette = re.findall(r"#[0-9a-fA-F]{6}", re.search(r"const PALETTE = \[(.*?)\]", js).group(1))
    assert _least_difference(itertools.combinations(palette[:4], 2)) >= 25.0  # all on one chart: every pair
