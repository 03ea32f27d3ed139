"""ASTM D86 <-> TBP: Daubert 1994 (the current API TDB 3A1.1) and Riazi-Daubert 1986 (its 1987 edition).

Each function takes and returns {percent [vol %]: temperature [°C]}; the Daubert 1994 TBP -> D86 step also
exists vectorised over many curves (:func:`tbp_to_d86_daubert_1994_array`), which the cutting code uses
for every cut's D86 estimate.  Units inside the correlations follow their sources: °F for Daubert 1994, K
for Riazi-Daubert 1986.

Contents
--------
- :func:`d86_to_tbp_daubert_1994`: ASTM D86 to TBP by Daubert 1994 [1]_ (API TDB 3A1.1, 1994 revision [2]_)
- :func:`tbp_to_d86_daubert_1994`: TBP to ASTM D86 by inverting Daubert 1994 [1]_ (API TDB 3A1.1, 1994 revision...
- :func:`tbp_to_d86_daubert_1994_array`: TBP to ASTM D86 by inverting Daubert 1994, vectorised over curves (the
  same...
- :func:`d86_to_tbp_riazi_daubert_1986`: ASTM D86 to TBP by Riazi-Daubert 1986 [3]_, point by point (API TDB
  3A1.1,...
- :func:`tbp_to_d86_riazi_daubert_1986`: TBP to ASTM D86 by inverting Riazi-Daubert 1986 [3]_ point by point: D86
  =...
- constants: ``D86_STD``, ``RD1986_K``, ``RD1986_R``, ``D94_SEGMENTS``, ``D94_50``

References
----------
.. [1] Daubert, T. E., "Petroleum fraction distillation interconversions", Hydrocarbon Processing 73(9)
   (1994) 75-78.
.. [2] American Petroleum Institute, *Technical Data Book - Petroleum Refining*, Procedure 3A1.1 (1994
   revision; 1987 edition for the 1986 method).
.. [3] Riazi, M. R., Daubert, T. E., "Analytical correlations interconvert distillation-curve types",
   Oil & Gas Journal 84 (25 Aug 1986) 50-57.
.. [4] Riazi, M. R., *Characterization and Properties of Petroleum Fractions*, ASTM MNL50, 1st ed. (2005),
   §3.2, Eqs. 3.20-3.22 (Daubert 1994), Example 3.3, Table 3.8.
"""

from __future__ import annotations

from typing import Mapping

import numpy as np

from ..errors import ConversionError
from ..units import c_to_f, f_to_c
from .segments import (
    chain_from_50,
    chain_mapping,
    inverse_power_step,
    normalise_points,
    power_step,
    require_points,
)

__all__ = ["d86_to_tbp_daubert_1994", "tbp_to_d86_daubert_1994", "tbp_to_d86_daubert_1994_array",
           "d86_to_tbp_riazi_daubert_1986", "tbp_to_d86_riazi_daubert_1986", "D86_STD", "RD1986_K", "RD1986_R",
           "D94_SEGMENTS", "D94_50"]

D86_STD = (0, 10, 30, 50, 70, 90, 95)
"""Standard ASTM D86 points of the TBP <-> D86 correlations. [vol %]"""

# -- Riazi-Daubert 1986 [3], [4] §3.2 ----------------------------------------------------------------------
RD1986_K = {0: (0.9177, 1.0019), 10: (0.5564, 1.0900), 30: (0.7617, 1.0425), 50: (0.9013, 1.0176),
            70: (0.8821, 1.0226), 90: (0.9552, 1.0110), 95: (0.8177, 1.0355)}
"""TBP = a * D86**b with both temperatures in K: {percent: (a_K, b)} ([4] §3.2)."""
RD1986_R = {0: (0.9167, 1.0019), 10: (0.5277, 1.0900), 30: (0.7429, 1.0425), 50: (0.8920, 1.0176),
            70: (0.8705, 1.0226), 90: (0.9490, 1.0110), 95: (0.8008, 1.0355)}
"""The same correlation with temperatures in °R: {percent: (a_R, b)}.  a_K = a_R * 1.8**(b - 1)."""

# -- Daubert 1994 [1], [2], [4] Eqs. 3.20-3.22, °F ---------------------------------------------------------
D94_SEGMENTS = {(90, 95): (0.11798, 1.6606), (70, 90): (3.0419, 0.75497), (50, 70): (2.5282, 0.82002),
                (30, 50): (3.0305, 0.80076), (10, 30): (4.9004, 0.71644), (0, 10): (7.4012, 0.60244)}
"""TBP difference Y = A * X**B, X the D86 difference over the same segment, both in °F: {(lo, hi): (A, B)}."""
D94_50 = (0.87180, 1.0258)
"""TBP50 = a * D86_50**b with the °F number itself raised to the power (not an absolute temperature)."""


def _d94_anchor_forward(t50_f, given_c):
    if not t50_f > 0:
        raise ConversionError(f"Daubert 1994 needs a D86 50 % point above 0 °F (-17.8 °C); got {given_c:.1f} °C")
    return D94_50[0] * t50_f ** D94_50[1]


def _d94_anchor_inverse(t50_f, given_c):
    if not t50_f > 0:
        raise ConversionError(f"Daubert 1994 needs a TBP 50 % point above 0 °F (-17.8 °C); got {given_c:.1f} °C")
    return (t50_f / D94_50[0]) ** (1.0 / D94_50[1])


def d86_to_tbp_daubert_1994(d86: Mapping[float, float]) -> dict[float, float]:
    """ASTM D86 to TBP by Daubert 1994 [1]_ (API TDB 3A1.1, 1994 revision [2]_).

    .. math::
        TBP_{50} = 0.87180\\,(D86_{50})^{1.0258}\\quad[°F,\\ \\text{not absolute}]

        \\Delta TBP_i = A_i\\,(\\Delta D86_i)^{B_i}\\quad[°F]

    The 50 % point is converted first, then each segment's TBP difference is added upward (70, 90, 95) or
    subtracted downward (30, 10, 0).  Points beyond a missing one cannot be built.

    Parameters
    ----------
    d86 : mapping
        {percent [vol %]: D86 temperature [°C]}; needs 50 and any contiguous run of 0/10/30/70/90/95.

    Returns
    -------
    dict
        {percent [vol %]: TBP temperature [°C]}.

    Raises
    ------
    ConversionError
        No 50 % point, a 50 % point at or below 0 °F, or a curve falling across a segment.

    Notes
    -----
    Valid range: petroleum fractions with D86 temperatures of roughly -18 to 400 °C (0-750 °F) [4]_;
    average error about 3-4 °C, larger at the 0 % point.

    References
    ----------
    .. [1] Daubert, Hydrocarbon Processing 73(9) (1994) 75-78.
    .. [2] API Technical Data Book, Procedure 3A1.1 (1994 revision).
    .. [4] Riazi, ASTM MNL50 (2005), Eqs. 3.20-3.22.

    Examples
    --------
    Riazi MNL50 (2005) Table 3.8, a kerosene: published TBP 133.1/158.1/189.2/210.6/232.9/258.1 °C.

    >>> t = d86_to_tbp_daubert_1994({0: 165.6, 10: 176.7, 30: 193.3, 50: 206.7, 70: 222.8, 90: 242.8})
    >>> [round(t[p], 2) for p in (0, 10, 30, 50, 70, 90)]
    [133.14, 158.11, 189.16, 210.7, 232.9, 258.19]
    """
    d = normalise_points(d86)
    require_points(d, [50], "Daubert 1994 D86 -> TBP")
    return chain_mapping(d, D86_STD, D94_SEGMENTS, power_step, lambda f50: _d94_anchor_forward(f50, d[50]))


def tbp_to_d86_daubert_1994(tbp: Mapping[float, float]) -> dict[float, float]:
    """TBP to ASTM D86 by inverting Daubert 1994 [1]_ (API TDB 3A1.1, 1994 revision [2]_).

    .. math::
        D86_{50} = (TBP_{50}/0.87180)^{1/1.0258}, \\qquad \\Delta D86_i = (\\Delta TBP_i / A_i)^{1/B_i}\\quad[°F]

    Parameters
    ----------
    tbp : mapping
        {percent [vol %]: TBP temperature [°C]}; needs 50 and any contiguous run of 0/10/30/70/90/95.

    Returns
    -------
    dict
        {percent [vol %]: D86 temperature [°C]}.

    Notes
    -----
    Valid range: TBP temperatures of roughly -18 to 430 °C, the TBP image of the D86 data range [4]_.

    References
    ----------
    .. [1] Daubert, Hydrocarbon Processing 73(9) (1994) 75-78.
    .. [2] API Technical Data Book, Procedure 3A1.1 (1994 revision).
    .. [4] Riazi, ASTM MNL50 (2005), Eqs. 3.20-3.22.

    Examples
    --------
    The published TBP of the Riazi MNL50 Table 3.8 kerosene gives back its published D86
    165.6/176.7/193.3/206.7/222.8/242.8 °C within the 0.1 °C the table prints:

    >>> d = tbp_to_d86_daubert_1994({0: 133.1, 10: 158.1, 30: 189.2, 50: 210.6, 70: 232.9, 90: 258.1})
    >>> [round(d[p]) for p in (0, 10, 30, 50, 70, 90)]
    [166, 177, 193, 207, 223, 243]
    """
    t = normalise_points(tbp)
    require_points(t, [50], "Daubert 1994 TBP -> D86")
    return chain_mapping(t, D86_STD, D94_SEGMENTS, inverse_power_step, lambda f50: _d94_anchor_inverse(f50, t[50]))


def tbp_to_d86_daubert_1994_array(tbp_c) -> np.ndarray:
    """TBP to ASTM D86 by inverting Daubert 1994, vectorised over curves (the same construction as
    :func:`tbp_to_d86_daubert_1994`).

    Parameters
    ----------
    tbp_c : array_like
        TBP temperatures at 0/10/30/50/70/90/95 % on the last axis (length 7). [°C]

    Returns
    -------
    numpy.ndarray
        D86 temperatures, same shape; NaN for a curve whose TBP 50 % point is at or below 0 °F. [°C]

    Raises
    ------
    ConversionError
        A curve falling across a segment (by more than rounding noise).

    Notes
    -----
    Valid range: that of :func:`tbp_to_d86_daubert_1994`, TBP temperatures of roughly -18 to 430 °C.

    Examples
    --------
    Two curves at once, the first the Riazi MNL50 Table 3.8 kerosene TBP by Daubert 1994 (its published D86
    50 % point is 206.7 °C):

    >>> tbp = [[133.1, 158.1, 189.2, 210.6, 232.9, 258.1, 265.0], [-40, -35, -30, -25, -20, -15, -10]]
    >>> d = tbp_to_d86_daubert_1994_array(tbp)
    >>> round(float(d[0, 3]), 1), bool(np.isnan(d[1, 3]))
    (206.6, True)
    """
    f = c_to_f(np.asarray(tbp_c, dtype=float))
    with np.errstate(invalid="ignore"):
        anchor = np.where(f[..., 3] > 0, (f[..., 3] / D94_50[0]) ** (1.0 / D94_50[1]), np.nan)
        out = chain_from_50(f, D86_STD, anchor, D94_SEGMENTS, inverse_power_step)
    return f_to_c(out)


def _rd1986(points: Mapping[float, float], forward: bool) -> dict[float, float]:
    d = normalise_points(points)
    unknown = [p for p in d if p not in RD1986_K]
    if unknown or not d:
        raise ConversionError("Riazi-Daubert 1986 works at 0/10/30/50/70/90/95 %; got "
                              + (", ".join(f"{p:g} %" for p in unknown) or "no points"))
    out = {}
    for p, v in sorted(d.items()):
        a, b = RD1986_K[p]
        tk = v + 273.15
        if tk <= 0:
            raise ConversionError(f"temperature {v} °C at {p:g} % is below absolute zero")
        out[p] = (a * tk ** b if forward else (tk / a) ** (1.0 / b)) - 273.15
    return out


def d86_to_tbp_riazi_daubert_1986(d86: Mapping[float, float]) -> dict[float, float]:
    """ASTM D86 to TBP by Riazi-Daubert 1986 [3]_, point by point (API TDB 3A1.1, 1987 edition [2]_).

    .. math:: TBP = a\\,(D86)^{b}\\quad[K]

    Parameters
    ----------
    d86 : mapping
        {percent [vol %]: D86 temperature [°C]} at any of 0/10/30/50/70/90/95.

    Returns
    -------
    dict
        {percent [vol %]: TBP temperature [°C]}.

    Notes
    -----
    Valid range: D86 temperatures of roughly 0-400 °C [4]_.  Average error about 5 °C, largest at the 0 %
    point.  Being point by point it can return a non-monotone curve: see
    :func:`assaycut.methods.distillation.check_monotone`.

    References
    ----------
    .. [3] Riazi & Daubert, Oil & Gas J. 84 (25 Aug 1986) 50-57.
    .. [2] API Technical Data Book, Procedure 3A1.1 (1987 edition).
    .. [4] Riazi, ASTM MNL50 (2005), §3.2.

    Examples
    --------
    Riazi MNL50 (2005) Example 3.3 / Table 3.8, a kerosene: published TBP 134.1/160.6/188.2/208.9/230.2/254.7 °C.

    >>> t = d86_to_tbp_riazi_daubert_1986({0: 165.6, 10: 176.7, 30: 193.3, 50: 206.7, 70: 222.8, 90: 242.8})
    >>> [round(t[p], 2) for p in (0, 10, 30, 50, 70, 90)]
    [134.17, 160.59, 188.18, 208.98, 230.2, 254.74]
    """
    return _rd1986(d86, forward=True)


def tbp_to_d86_riazi_daubert_1986(tbp: Mapping[float, float]) -> dict[float, float]:
    """TBP to ASTM D86 by inverting Riazi-Daubert 1986 [3]_ point by point: D86 = (TBP/a)^(1/b), in K.

    Parameters
    ----------
    tbp : mapping
        {percent [vol %]: TBP temperature [°C]} at any of 0/10/30/50/70/90/95.

    Returns
    -------
    dict
        {percent [vol %]: D86 temperature [°C]}.

    Notes
    -----
    Valid range: TBP temperatures of roughly 0-430 °C, the TBP image of the D86 data range [4]_.

    References
    ----------
    .. [3] Riazi & Daubert, Oil & Gas J. 84 (25 Aug 1986) 50-57.
    .. [4] Riazi, ASTM MNL50 (2005), §3.2.

    Examples
    --------
    Riazi MNL50 Table 3.8: the kerosene's published TBP 50 % point 208.9 °C goes back to its D86 206.7 °C:

    >>> d = tbp_to_d86_riazi_daubert_1986({50: 208.9})
    >>> round(d[50], 2)
    206.62
    """
    return _rd1986(tbp, forward=False)
