"""The segment-by-segment construction shared by the Daubert-type distillation conversions.

Daubert 1994 (API TDB 3A1.1) and API TDB 3A3.1 / 3A3.2 convert the 50 % point first and then each segment's
temperature difference, building the curve out from 50 % upward and downward.  This module holds that
construction once, vectorised over curves, in °F as the methods are published; the method modules supply
the 50 % anchor and the segment constants.

Contents
--------
- :func:`rising`: Segment differences checked to rise: a fall beyond :data:`FALL_TOL_F` is an...
- :func:`power_step`: Forward segment step Y = A · X^B
- :func:`inverse_power_step`: Inverse segment step X = (Y / A)^(1/B)
- :func:`chain_from_50`: Build converted curves out from their 50 % points, segment by segment,...
- :func:`normalise_points`: {percent: temperature} with float values and whole-number percents as int keys
- :func:`require_points`: Refuse a curve that lacks a point the method needs, naming what it has
- :func:`chain_mapping`: Run :func:`chain_from_50` on one curve given as {percent: temperature [°C]}
- constants: ``FALL_TOL_F``
"""

from __future__ import annotations

from typing import Callable, Mapping

import numpy as np

from ..errors import ConversionError
from ..units import c_to_f, f_to_c

__all__ = ["rising", "power_step", "inverse_power_step", "chain_from_50", "normalise_points", "require_points",
           "chain_mapping", "FALL_TOL_F"]

FALL_TOL_F = 1e-6
"""A segment may fall by this much (rounding noise of a monotone curve) and count as flat. [°F]"""


def rising(diff_f):
    """Segment differences checked to rise: a fall beyond :data:`FALL_TOL_F` is an error, noise is zero.

    Parameters
    ----------
    diff_f : numpy.ndarray
        Temperature differences across a segment. [°F]

    Returns
    -------
    numpy.ndarray
        The differences, never negative (NaN kept). [°F]

    Raises
    ------
    ConversionError
        Where the curve falls across the segment.
    """
    x = np.asarray(diff_f, dtype=float)
    if np.any(x < -FALL_TOL_F):
        raise ConversionError(f"the input curve falls by {-float(np.nanmin(x)):.2f} °F across a segment; a "
                              f"distillation curve must not fall as percent rises")
    return np.maximum(x, 0.0)


def power_step(coef, diff_f):
    """Forward segment step Y = A · X^B. [°F]"""
    a, b = coef
    return a * rising(diff_f) ** b


def inverse_power_step(coef, diff_f):
    """Inverse segment step X = (Y / A)^(1/B). [°F]"""
    a, b = coef
    return (rising(diff_f) / a) ** (1.0 / b)


def chain_from_50(values_f, points, anchor_f, segments, step: Callable) -> np.ndarray:
    """Build converted curves out from their 50 % points, segment by segment, vectorised over curves.

    .. math:: T'_{hi} = T'_{lo} + s(T_{hi} - T_{lo})\\ \\text{upward},\\qquad
              T'_{lo} = T'_{hi} - s(T_{hi} - T_{lo})\\ \\text{downward}

    Parameters
    ----------
    values_f : numpy.ndarray
        Input temperatures at ``points`` on the last axis, NaN where a point is missing. [°F]
    points : sequence of int
        The method's standard percents, including 50. [%]
    anchor_f : numpy.ndarray
        Converted 50 % temperature of each curve. [°F]
    segments : mapping of (lo, hi) to coefficients
        The method's segments.
    step : callable
        step(coefficients, input difference [°F]) -> converted difference [°F].

    Returns
    -------
    numpy.ndarray
        Converted temperatures, same shape as ``values_f``; NaN where a point, or one between it and
        50 %, is missing. [°F]
    """
    f = np.asarray(values_f, dtype=float)
    idx = {p: i for i, p in enumerate(points)}
    out = np.full(f.shape, np.nan)
    out[..., idx[50]] = anchor_f
    for lo, hi in sorted((s for s in segments if s[0] >= 50), key=lambda s: s[0]):
        out[..., idx[hi]] = out[..., idx[lo]] + step(segments[(lo, hi)], f[..., idx[hi]] - f[..., idx[lo]])
    for lo, hi in sorted((s for s in segments if s[1] <= 50), key=lambda s: -s[1]):
        out[..., idx[lo]] = out[..., idx[hi]] - step(segments[(lo, hi)], f[..., idx[hi]] - f[..., idx[lo]])
    return out


def normalise_points(points: Mapping) -> dict:
    """{percent: temperature} with float values and whole-number percents as int keys."""
    out = {}
    for k, v in points.items():
        k = float(k)
        out[int(k) if k.is_integer() else k] = float(v)
    return out


def require_points(points: Mapping, needed, what: str) -> None:
    """Refuse a curve that lacks a point the method needs, naming what it has."""
    missing = [p for p in needed if p not in points]
    if missing:
        have = ", ".join(f"{p:g}" for p in sorted(points)) or "none"
        raise ConversionError(f"{what} needs the {', '.join(f'{p:g} %' for p in missing)} point(s); "
                              f"the curve has {have}")


def chain_mapping(points_c: Mapping, std_points, segments, step: Callable, anchor: Callable) -> dict:
    """Run :func:`chain_from_50` on one curve given as {percent: temperature [°C]}.

    ``anchor(t50_f)`` converts the 50 % point [°F].  Returns {percent: converted temperature [°C]} for the
    points that could be built, in order of percent.
    """
    row = np.array([c_to_f(points_c[p]) if p in points_c else np.nan for p in std_points])
    out = chain_from_50(row, std_points, anchor(row[list(std_points).index(50)]), segments, step)
    return {p: float(f_to_c(v)) for p, v in zip(std_points, out) if np.isfinite(v)}
