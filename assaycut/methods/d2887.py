"""ASTM D2887 simulated distillation to TBP (API TDB 3A3.1) and to ASTM D86 (API TDB 3A3.2).

Both are Daubert-type constructions in °F: the 50 % point is converted first, then each segment's
difference (:mod:`assaycut.methods.segments`).  D2887 percents are weight percents; the TBP of API TDB
3A3.1 is on the same weight basis.

Contents
--------
- :func:`d2887_to_tbp_api_3a3_1`: ASTM D2887 simulated distillation to TBP, API TDB 3A3.1 [2]_ (Daubert 1994 [1]_)
- :func:`d2887_to_d86_api_3a3_2`: ASTM D2887 simulated distillation to ASTM D86, API TDB 3A3.2 [2]_
- constants: ``SD_STD``, ``SD_TBP_SEGMENTS``, ``SD_D86_SEGMENTS``, ``SD_D86_POINTS``, ``SD_D86_50``

References
----------
.. [1] Daubert, T. E., "Petroleum fraction distillation interconversions", Hydrocarbon Processing 73(9)
   (1994) 75-78.
.. [2] American Petroleum Institute, *Technical Data Book - Petroleum Refining*, Procedures 3A3.1 and 3A3.2
   (1994 revision).
.. [3] Riazi, M. R., *Characterization and Properties of Petroleum Fractions*, ASTM MNL50, 1st ed. (2005),
   §3.2.
"""

from __future__ import annotations

from typing import Mapping

from ..errors import ConversionError
from .segments import chain_mapping, normalise_points, power_step, require_points

__all__ = ["d2887_to_tbp_api_3a3_1", "d2887_to_d86_api_3a3_2", "SD_STD", "SD_TBP_SEGMENTS", "SD_D86_SEGMENTS",
           "SD_D86_POINTS", "SD_D86_50"]

SD_STD = (5, 10, 30, 50, 70, 90, 95, 100)
"""Standard ASTM D2887 points of API TDB 3A3.1: its lowest segment is 5-10 % (the worked example converts a
5 % point with the 0.15779/1.4296 pair), so the initial point is not converted. [wt %]"""

SD_TBP_SEGMENTS = {(95, 100): (0.02172, 1.9733), (90, 95): (0.97476, 0.8723), (70, 90): (0.31531, 1.2938),
                   (50, 70): (0.19861, 1.3975), (30, 50): (0.05342, 1.6988), (10, 30): (0.011903, 2.0253),
                   (5, 10): (0.15779, 1.4296)}
"""TBP difference W = C * V**D, V the D2887 difference over the segment [°F] ([2] 3A3.1).  The 10-30 constant
C = 0.011903 reproduces the API TDB 3A3.1 worked example (see :func:`d2887_to_tbp_api_3a3_1`)."""

SD_D86_SEGMENTS = {(90, 100): (2.6029, 0.65962), (70, 90): (0.30785, 1.2341), (50, 70): (0.14862, 1.4287),
                   (30, 50): (0.07978, 1.5386), (10, 30): (0.06069, 1.5176), (0, 10): (0.30470, 1.1259)}
"""D86 difference U = E * T**F, T the D2887 difference over the segment [°F] ([2] 3A3.2)."""
SD_D86_POINTS = (0, 10, 30, 50, 70, 90, 100)
"""Points of API TDB 3A3.2. [%]"""
SD_D86_50 = (0.77601, 1.0395)
"""D86_50 = a * SD50**b with the °F number itself raised to the power."""


def d2887_to_tbp_api_3a3_1(d2887: Mapping[float, float]) -> dict[float, float]:
    """ASTM D2887 simulated distillation to TBP, API TDB 3A3.1 [2]_ (Daubert 1994 [1]_).

    .. math:: TBP_{50} = SD_{50};\\qquad \\Delta TBP_i = C_i\\,(\\Delta SD_i)^{D_i}\\quad[°F]

    Parameters
    ----------
    d2887 : mapping
        {percent [wt %]: D2887 temperature [°C]}; needs 50 and a contiguous run of 5/10/30/70/90/95/100.

    Returns
    -------
    dict
        {percent [wt %]: TBP temperature [°C]} (the TBP on the same weight basis).

    Notes
    -----
    Valid range: fractions with end points below about 540 °C (1000 °F); average error about 3 °C [3]_.

    References
    ----------
    .. [1] Daubert, Hydrocarbon Processing 73(9) (1994) 75-78.
    .. [2] API Technical Data Book, Procedure 3A3.1 (1994 revision), with its worked example.
    .. [3] Riazi, ASTM MNL50 (2005), §3.2.

    Examples
    --------
    The API TDB 3A3.1 worked example (known to us second-hand, not from the printed page): SD
    293/305/324/336/344/359/369 °F at 5/10/30/50/70/90/95 % gives TBP 322.2/327.7/332.4/336.0/339.6/350.1/357.4
    °F (to 0.1 °F):

    >>> sd = {p: (f - 32) / 1.8 for p, f in zip((5, 10, 30, 50, 70, 90, 95), (293, 305, 324, 336, 344, 359, 369))}
    >>> t = d2887_to_tbp_api_3a3_1(sd)
    >>> [round(t[p] * 1.8 + 32, 1) for p in (5, 10, 30, 50, 70, 90, 95)]
    [322.2, 327.7, 332.4, 336.0, 339.6, 350.1, 357.4]
    """
    s = normalise_points(d2887)
    require_points(s, [50], "API TDB 3A3.1 D2887 -> TBP")
    return chain_mapping(s, SD_STD, SD_TBP_SEGMENTS, power_step, lambda f50: f50)


def d2887_to_d86_api_3a3_2(d2887: Mapping[float, float]) -> dict[float, float]:
    """ASTM D2887 simulated distillation to ASTM D86, API TDB 3A3.2 [2]_.

    .. math:: D86_{50} = 0.77601\\,SD_{50}^{1.0395}\\ [°F,\\ \\text{not absolute}];\\quad
              \\Delta D86_i = E_i\\,(\\Delta SD_i)^{F_i}

    Parameters
    ----------
    d2887 : mapping
        {percent [wt %]: D2887 temperature [°C]}; needs 50 and a contiguous run of 0/10/30/70/90/100.

    Returns
    -------
    dict
        {percent [vol %]: D86 temperature [°C]}.

    Notes
    -----
    Valid range: fractions with D2887 end points below about 540 °C; average error about 3-6 °C [3]_.

    References
    ----------
    .. [2] API Technical Data Book, Procedure 3A3.2 (1994 revision).
    .. [3] Riazi, ASTM MNL50 (2005), §3.2.

    Examples
    --------
    No worked example of 3A3.2 is at hand; the 50 % relation evaluated by hand: 300 °C = 572 °F, and
    0.77601 * 572**1.0395 = 570.4 °F = 299.1 °C.

    >>> round(d2887_to_d86_api_3a3_2({50: 300.0})[50], 1)
    299.1
    """
    s = normalise_points(d2887)
    require_points(s, [50], "API TDB 3A3.2 D2887 -> D86")

    def anchor(f50):
        if not f50 > 0:
            raise ConversionError(f"API TDB 3A3.2 needs a D2887 50 % point above 0 °F; got {s[50]:.1f} °C")
        return SD_D86_50[0] * f50 ** SD_D86_50[1]

    return chain_mapping(s, SD_D86_POINTS, SD_D86_SEGMENTS, power_step, anchor)
