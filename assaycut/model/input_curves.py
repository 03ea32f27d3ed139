"""Laboratory curves put on the TBP basis for the curve model: TBP as measured, D86 and D2887 converted at
their standard points (:mod:`assaycut.methods.distillation`), D1160 to the atmospheric equivalent
temperature (:mod:`assaycut.methods.d1160`)."""

from __future__ import annotations

import numpy as np

from ..errors import CurveError
from ..methods.d86 import D86_STD
from ..methods.d1160 import vacuum_to_aet_maxwell_bonnell
from ..methods.d2887 import SD_STD
from ..methods.distillation import convert, vacuum_warnings
from .assay import CurveData
from ..methods.pchip import Pchip
from .tbp_curve import METHANE_NBP_C


def standard_points(curve: CurveData, std) -> dict[float, float]:
    """The curve's temperatures at the standard percents it covers (PCHIP through its points). [°C]"""
    p, t = curve.percent, curve.temp_c
    keep = np.concatenate([[True], np.diff(p) > 0])
    p, t = p[keep], t[keep]
    if p.size < 2:
        raise CurveError(f"{curve.where}: a {curve.method} curve needs at least 2 points")
    sp = Pchip(p, t)
    return {s: float(sp(s)) for s in std if p[0] - 1e-9 <= s <= p[-1] + 1e-9}


def curve_to_tbp(curve: CurveData, method: str = "daubert-1994") -> tuple[np.ndarray, np.ndarray, list[str], str]:
    """Put one measured curve on the TBP (or AET) basis.

    D86 by Daubert 1994 (or Riazi-Daubert 1986) at its standard points, D2887 by API TDB 3A3.1, D1160 by
    Maxwell-Bonnell to the atmospheric equivalent temperature, taken as TBP (common practice for the back
    end, no source).

    Parameters
    ----------
    curve : CurveData
    method : str
        TBP <-> D86 method name, 'daubert-1994' or 'riazi-daubert-1986'.

    Returns
    -------
    (percent [%], temperature [°C], warnings, description of the method used)
        The warnings are about this curve and do not name it (the caller prefixes the curve's ``where``); the
        errors name it.
    """
    if curve.method == "TBP":
        return curve.percent.copy(), curve.temp_c.copy(), [], "TBP as measured"
    if curve.method == "D1160":
        kw = curve.watson_k
        aet = vacuum_to_aet_maxwell_bonnell(curve.temp_c, curve.pressure_mmhg, watson_k=kw)
        w = vacuum_warnings(curve.pressure_mmhg)
        return curve.percent.copy(), np.atleast_1d(np.asarray(aet, float)), w, (
            f"D1160 at {curve.pressure_mmhg:g} mmHg to AET by Maxwell-Bonnell (API TDB 5A1.19), "
            + (f"Watson K correction with the given Kw {kw:g}" if kw is not None else
               "no Watson K correction (Kw 12; give watson_k on the sheet to correct)")
            + ", AET taken as TBP")
    if curve.method == "D86":
        pts = standard_points(curve, D86_STD)
        out, used, w = convert(pts, "D86", "TBP", method=method)
        desc = f"D86 to TBP by {used}"
    elif curve.method == "D2887":
        pts = standard_points(curve, SD_STD)
        out, used, w = convert(pts, "D2887", "TBP")
        desc = "D2887 to TBP by API TDB 3A3.1"
    else:
        raise CurveError(f"{curve.where}: unknown distillation method {curve.method!r}")
    warnings = list(w)
    _refuse_below_methane(out, curve, desc)
    warnings += _segment_warnings(pts, out, desc)
    if len(out) < 2:
        raise CurveError(f"{curve.where}: the {curve.method} curve covers too few standard points "
                         f"({', '.join(f'{k:g} %' for k in pts)}) to convert to TBP")
    ks = sorted(out)
    return np.array(ks, float), np.array([out[k] for k in ks]), warnings, desc


def _refuse_below_methane(out: dict, curve: CurveData, desc: str) -> None:
    low = min(out.values())
    if low < METHANE_NBP_C:
        raise CurveError(f"{curve.where}: the {desc} conversion gives {low:.0f} °C, below the boiling point of "
                         f"methane: the correlation does not apply to this curve (it is meant for petroleum "
                         f"fractions, whose segments are narrow). For a whole-crude simulated distillation, give "
                         f"the curve as method TBP on the wt basis (common practice)")


def _segment_warnings(src: dict, out: dict, desc: str) -> list[str]:
    """Warnings where a conversion more than doubles or halves a segment (outside the correlation's range)."""
    ks = sorted(out)
    warnings = []
    for lo, hi in zip(ks, ks[1:]):
        d_in, d_out = src[hi] - src[lo], out[hi] - out[lo]
        if d_in > 0 and not 0.5 <= d_out / d_in <= 2.0:
            warnings.append(f"{desc} changes the {lo:g}-{hi:g} % segment from {d_in:.0f} to "
                            f"{d_out:.0f} °C; the curve is probably outside the correlation's range")
    return warnings

