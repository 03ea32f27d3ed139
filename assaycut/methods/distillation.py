"""Conversions between laboratory distillation methods by name.

The published methods live one family to a module: :mod:`~assaycut.methods.d86` (Daubert 1994,
Riazi-Daubert 1986), :mod:`~assaycut.methods.d2887` (API TDB 3A3.1, 3A3.2) and
:mod:`~assaycut.methods.d1160` (Maxwell-Bonnell).  :func:`convert` picks one by name.  Non-monotone results
and points outside a correlation's data range are reported as warnings, never hidden.

Contents
--------
- :class:`Conversion`: A published conversion: the function, the name reports give it, and the...
- :func:`fill_standard_points`: Fill the standard points that lie between the given ones and are missing, by...
- :func:`check_monotone`: Warnings for a converted curve whose temperature falls as percent rises
- :func:`range_warnings`: Warnings for input points outside the temperature range of the data behind...
- :func:`below_start_warnings`: Warnings for a simulated distillation converted to a TBP that starts below...
- :func:`vacuum_warnings`: Warnings for a D1160 pressure: above 760 mmHg the method (a vacuum...
- :func:`filled_inputs`: The input points :func:`convert` fills for a (``frm``, ``to``) conversion,...
- :func:`convert`: Convert a curve between methods by name
- constants: ``METHODS``, ``CONVERSIONS``, ``STANDARD_POINTS``
"""

from __future__ import annotations

from typing import Callable, Mapping, NamedTuple

import numpy as np

from ..errors import ConversionError
from .d86 import (
    D86_STD,
    d86_to_tbp_daubert_1994,
    d86_to_tbp_riazi_daubert_1986,
    tbp_to_d86_daubert_1994,
    tbp_to_d86_riazi_daubert_1986,
)
from .d1160 import vacuum_to_aet_maxwell_bonnell
from .d2887 import SD_D86_POINTS, SD_STD, d2887_to_d86_api_3a3_2, d2887_to_tbp_api_3a3_1
from .segments import normalise_points

__all__ = ["Conversion", "fill_standard_points", "check_monotone", "range_warnings", "below_start_warnings",
           "vacuum_warnings",
           "filled_inputs", "convert", "METHODS", "CONVERSIONS", "STANDARD_POINTS"]

METHODS = ("daubert-1994", "riazi-daubert-1986")
"""Names of the TBP <-> D86 methods."""


class Conversion(NamedTuple):
    """A published conversion: the function, the name reports give it, and the temperature range of the data
    behind it [°C] (from Riazi MNL50 (2005) ch. 3, recalled from memory)."""

    func: Callable[[Mapping[float, float]], dict]
    label: str
    valid_c: tuple[float, float]


CONVERSIONS = {
    ("D86", "TBP", "daubert-1994"): Conversion(d86_to_tbp_daubert_1994, "daubert-1994", (-18.0, 400.0)),
    ("TBP", "D86", "daubert-1994"): Conversion(tbp_to_d86_daubert_1994, "daubert-1994-inverse", (-18.0, 430.0)),
    ("D86", "TBP", "riazi-daubert-1986"): Conversion(d86_to_tbp_riazi_daubert_1986, "riazi-daubert-1986",
                                                     (0.0, 400.0)),
    ("TBP", "D86", "riazi-daubert-1986"): Conversion(tbp_to_d86_riazi_daubert_1986, "riazi-daubert-1986-inverse",
                                                     (0.0, 430.0)),
    ("D2887", "TBP", None): Conversion(d2887_to_tbp_api_3a3_1, "api-tdb-3a3-1", (0.0, 540.0)),
    ("D2887", "D86", None): Conversion(d2887_to_d86_api_3a3_2, "api-tdb-3a3-2", (0.0, 540.0)),
}
"""Every conversion :func:`convert` offers, by (from, to, TBP <-> D86 method or None)."""

STANDARD_POINTS = {("D86", "TBP"): D86_STD, ("TBP", "D86"): D86_STD, ("D2887", "TBP"): SD_STD,
                   ("D2887", "D86"): SD_D86_POINTS}
"""The points each conversion is built on, by (from, to). [%]"""


def fill_standard_points(points: Mapping[float, float], std) -> tuple[dict[float, float], list[float]]:
    """Fill the standard points that lie between the given ones and are missing, by monotone (PCHIP)
    interpolation through the given points (Fritsch & Carlson 1980, :class:`~assaycut.methods.pchip.Pchip`), so
    that a curve given at 10/50/90 % converts at every point given.

    Parameters
    ----------
    points : mapping
        {percent [%]: temperature [°C]}, sorted or not.
    std : sequence of float
        The method's standard points. [%]

    Returns
    -------
    (dict, list of float)
        All points (given and filled) sorted by percent, and the percents filled.

    Examples
    --------
    >>> pts, filled = fill_standard_points({10: 176.7, 50: 206.7, 90: 242.8}, (0, 10, 30, 50, 70, 90, 95))
    >>> filled, [round(pts[p], 1) for p in filled]
    ([30.0, 70.0], [191.0, 224.0])
    """
    keys = sorted(points)
    if len(keys) < 2:
        return dict(sorted(points.items())), []
    missing = [float(s) for s in std if keys[0] < s < keys[-1] and s not in points]
    if not missing:
        return dict(sorted(points.items())), []
    from .pchip import Pchip

    sp = Pchip(keys, [points[k] for k in keys])
    out = dict(points)
    out.update({s: float(sp(s)) for s in missing})
    return dict(sorted(out.items())), missing


def check_monotone(points: Mapping[float, float], label: str) -> list[str]:
    """Warnings for a converted curve whose temperature falls as percent rises.

    Parameters
    ----------
    points : mapping
        {percent [%]: temperature [°C]}.
    label : str
        Name of the curve in the message.

    Returns
    -------
    list of str
        One warning per falling pair; empty when the curve is monotone.

    Examples
    --------
    >>> check_monotone({0: 150.0, 10: 149.0, 50: 200.0}, "D86 -> TBP")  # doctest: +ELLIPSIS
    ['D86 -> TBP: temperature falls from 150.0 °C at 0 % to 149.0 °C at 10 %; ...']
    """
    keys = sorted(points)
    out = []
    for a, b in zip(keys, keys[1:]):
        if points[b] < points[a]:
            out.append(f"{label}: temperature falls from {points[a]:.1f} °C at {a:g} % to {points[b]:.1f} °C "
                       f"at {b:g} %; the point-by-point correlation gave a non-monotone curve")
    return out


def range_warnings(points: Mapping[float, float], frm: str, conversion: Conversion) -> list[str]:
    """Warnings for input points outside the temperature range of the data behind ``conversion``."""
    lo, hi = conversion.valid_c
    bad = {p: t for p, t in points.items() if not lo <= t <= hi}
    if not bad:
        return []
    pts = ", ".join(f"{t:.1f} °C at {p:g} %" for p, t in sorted(bad.items()))
    return [f"{frm} point(s) {pts} lie outside the {lo:g} to {hi:g} °C range of the data behind "
            f"{conversion.label}: the result is an extrapolation of the correlation"]


def below_start_warnings(points: Mapping[float, float], out: Mapping[float, float], frm: str,
                         to: str) -> list[str]:
    """Warnings for a simulated distillation converted to a TBP that starts below the sample's own start.

    A D2887 simulated distillation is wider than the TBP of the same sample (gas chromatography separates
    better than a 15-plate column; common practice, no source), so its TBP cannot boil below the D2887's first
    given point.  A converted TBP point below it means the segment differences lie beyond the data behind
    API TDB 3A3.1 (a wide-boiling sample, such as a whole crude): the front of the curve is not reliable.

    Parameters
    ----------
    points, out : mapping
        The input points and the converted points, {percent: temperature [°C]}.
    frm, to : str
        The methods (the check applies to D2887 -> TBP only).

    Returns
    -------
    list of str
        One warning naming the points below the start; empty when there are none.

    Examples
    --------
    >>> below_start_warnings({5: 108.0, 10: 150.0}, {5: -94.0, 10: 120.0}, "D2887", "TBP")[0][:61]
    "D2887 -> TBP: TBP -94.0 °C at 5 % lies below the sample's own"
    """
    if (frm, to) != ("D2887", "TBP") or not points:
        return []
    p0 = min(points)
    start = points[p0]
    low = {p: t for p, t in out.items() if t < start}
    if not low:
        return []
    pts = ", ".join(f"TBP {t:.1f} °C at {p:g} %" for p, t in sorted(low.items()))
    verb = "lies" if len(low) == 1 else "lie"
    return [f"{frm} -> {to}: {pts} {verb} below the sample's own first D2887 point ({start:.1f} °C at {p0:g} %): "
            f"the D2887 differences are beyond the data behind API TDB 3A3.1 (a wide-boiling sample), so the "
            f"front of the converted curve is not reliable; give the TBP or a light-ends analysis"]


def vacuum_warnings(pressure_mmhg: float) -> list[str]:
    """Warnings for a D1160 pressure: above 760 mmHg the method (a vacuum distillation) does not apply."""
    if pressure_mmhg > 760.0:
        return [f"D1160 is a vacuum method; {pressure_mmhg:g} mmHg is above atmospheric pressure and the "
                f"Maxwell-Bonnell conversion is extrapolated"]
    return []


def filled_inputs(points: Mapping[float, float], frm: str, to: str) -> dict[float, float]:
    """The input points :func:`convert` fills for a (``frm``, ``to``) conversion, {percent: °C}; empty if none."""
    std = STANDARD_POINTS.get((frm.upper(), to.upper()))
    if std is None:
        return {}
    pts, filled = fill_standard_points(normalise_points(points), std)
    return {p: pts[p] for p in filled}


def convert(points: Mapping[float, float], frm: str, to: str, method: str = "daubert-1994",
            pressure_mmhg: float | None = None,
            watson_k: float | None = None) -> tuple[dict[float, float], str, list[str]]:
    """Convert a curve between methods by name.

    Parameters
    ----------
    points : mapping
        {percent [%]: temperature [°C]}.
    frm : str
        'TBP', 'D86', 'D2887' or 'D1160'.
    to : str
        'TBP', 'D86' or 'AET'.
    method : str
        'daubert-1994' (default) or 'riazi-daubert-1986', for TBP <-> D86.
    pressure_mmhg : float, optional
        Distillation pressure for D1160. [mmHg]
    watson_k : float, optional
        Watson K of D1160 material for the Maxwell-Bonnell correction; None applies none. [-]

    Returns
    -------
    (dict, str, list of str)
        The converted points {percent: temperature [°C]}, the method actually used, and warnings.  Standard
        points missing between the given ones are filled first (:func:`fill_standard_points`) and named in a
        warning.

    Examples
    --------
    Riazi MNL50 (2005) Table 3.8, the kerosene's D86 50 % point 206.7 °C is TBP 210.6 °C by Daubert 1994
    (published, to 0.1 °C; the code gives 210.70):

    >>> out, used, warnings = convert({50: 206.7}, "D86", "TBP")
    >>> round(out[50], 2), used, warnings
    (210.7, 'daubert-1994', [])
    """
    frm, to = frm.upper(), to.upper()
    pts = normalise_points(points)
    warnings: list[str] = []
    if (frm, to) in STANDARD_POINTS:
        pts, filled = fill_standard_points(pts, STANDARD_POINTS[frm, to])
        if filled:
            warnings.append(f"{frm} point(s) {', '.join(f'{p:g} %' for p in filled)} were not given: filled by "
                            f"monotone interpolation between the given points so that every given point "
                            f"converts (the filled ones are estimates)")
    if frm == to or (frm == "TBP" and to == "AET"):
        return dict(sorted(pts.items())), "identity", warnings
    if frm == "D1160":
        if pressure_mmhg is None:
            raise ConversionError("D1160 data need the distillation pressure (--pressure-mmhg)")
        if to not in ("AET", "TBP"):
            raise ConversionError(f"D1160 converts to AET (the atmospheric-equivalent TBP basis), not {to}")
        keys = sorted(pts)
        vals = np.atleast_1d(vacuum_to_aet_maxwell_bonnell([pts[k] for k in keys], pressure_mmhg, watson_k))
        warnings += vacuum_warnings(pressure_mmhg)
        used = "maxwell-bonnell" + (f" (Watson K {watson_k:g})" if watson_k is not None else "")
        return dict(zip(keys, [float(v) for v in vals])), used, warnings
    if watson_k is not None:
        raise ConversionError("--watson-k applies to D1160 data only (the Maxwell-Bonnell correction)")
    if to == "AET":
        raise ConversionError(f"AET is the target of D1160 data only; cannot convert {frm} to AET")
    key = (frm, to, method if frm in ("TBP", "D86") else None)
    if key not in CONVERSIONS:
        raise ConversionError(f"no conversion from {frm} to {to}"
                              + (f" by {method}" if frm in ("TBP", "D86") else ""))
    conv = CONVERSIONS[key]
    warnings += range_warnings(pts, frm, conv)
    out = conv.func(pts)
    used = method if key[2] else conv.label
    warnings += check_monotone(out, f"{frm} -> {to}")
    warnings += below_start_warnings(pts, out, frm, to)
    dropped = sorted(set(pts) - set(out))
    if dropped:
        warnings.append(f"{frm} -> {to}: point(s) {', '.join(f'{p:g} %' for p in dropped)} could not be "
                        f"converted by {used} (not a standard point of the method, or a point between "
                        f"them and 50 % is missing)")
    return out, used, warnings
