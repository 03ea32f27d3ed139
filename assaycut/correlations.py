"""Property correlations for petroleum fractions: average boiling points, Watson K, molecular weight,
density at constant Watson K, cetane indices and flash point estimates.

All functions accept numpy arrays (vectorised over cuts or assays).  Temperatures in °C unless a name
says otherwise; each docstring gives the unit the source works in.
"""

from __future__ import annotations

import numpy as np

from .units import c_to_f


def _scalar(x):
    return float(x) if np.ndim(x) == 0 else x


def watson_k(meabp_c, sg):
    """Watson (UOP) characterisation factor.

    .. math:: K_W = T_b^{1/3} / SG,\\quad T_b = \\text{MeABP in °R}

    Parameters
    ----------
    meabp_c : float or array_like
        Mean average boiling point. [°C]
    sg : float or array_like
        Specific gravity 60/60 °F. [-]

    Returns
    -------
    float or numpy.ndarray
        Watson K. [-]

    Notes
    -----
    Watson & Nelson, Ind. Eng. Chem. 25 (1933) 880; API TDB 2B5.1.

    Examples
    --------
    API TDB 2B5.1 example: 580 °F and 34.5 °API (SG 0.8524) give 11.8846.

    >>> round(watson_k((580 - 32) / 1.8, 141.5 / (34.5 + 131.5)), 4)
    11.8846
    """
    tr = c_to_f(meabp_c) + 459.67
    return _scalar(np.cbrt(tr) / np.asarray(sg, dtype=float))


def sg_from_watson_k(tb_c, kw):
    """Specific gravity of a fraction at constant Watson K.

    .. math:: SG = (1.8\\,T_b[K])^{1/3} / K_W

    Parameters
    ----------
    tb_c : float or array_like
        Boiling point (mid or mean average). [°C]
    kw : float
        Watson K. [-]

    Returns
    -------
    float or numpy.ndarray
        Specific gravity 60/60 °F. [-]

    Notes
    -----
    Common practice where a cut has no measured density, with no single source.

    Examples
    --------
    Inverse of the API TDB 2B5.1 example (580 °F, K 11.8846 -> SG 0.8524):

    >>> round(sg_from_watson_k((580 - 32) / 1.8, 11.8846), 4)
    0.8524
    """
    return _scalar(np.cbrt(1.8 * (np.asarray(tb_c, dtype=float) + 273.15)) / kw)


def average_boiling_points(d86_c):
    """Average boiling points of a fraction from its ASTM D86 curve (API TDB 2B1.1).

    .. math::
        VABP = (T_{10}+T_{30}+T_{50}+T_{70}+T_{90})/5,\\quad SL = (T_{90}-T_{10})/80

        MeABP = VABP - \\exp(-0.94402 - 0.00865 (VABP-32)^{0.6667} + 2.99791\\,SL^{0.333})

        MABP = VABP - \\exp(-0.56379 - 0.007981 (VABP-32)^{0.6667} + 3.04729\\,SL^{0.333})

        WABP = VABP + \\exp(-3.062123 - 0.01829 (VABP-32)^{0.6667} + 4.45818\\,SL^{0.25})

        CABP = VABP - \\exp(-0.23589 - 0.06906 (VABP-32)^{0.45} + 1.8858\\,SL^{0.45})

    all in °F.

    Parameters
    ----------
    d86_c : array_like
        D86 temperatures at 10, 30, 50, 70 and 90 vol %, last axis of length 5. [°C]

    Returns
    -------
    dict of str to float or numpy.ndarray
        'vabp', 'meabp', 'mabp', 'wabp', 'cabp' [°C] and 'slope' [°F/%].

    Notes
    -----
    For a very narrow fraction (slope 0) all averages equal the VABP.

    Examples
    --------
    API TDB 2B1.1 example (reference sheet §5): D86 129.2/170.6/214.7/267.8/339.8 °F gives VABP 224.42 °F,
    SL 2.6325 and MeABP about 206.1 °F.

    >>> r = average_boiling_points([(t - 32) / 1.8 for t in (129.2, 170.6, 214.7, 267.8, 339.8)])
    >>> round(r["vabp"] * 1.8 + 32, 2), round(r["slope"], 4), round(r["meabp"] * 1.8 + 32, 1)
    (224.42, 2.6325, 206.1)
    """
    t = c_to_f(np.asarray(d86_c, dtype=float))
    vabp = t.mean(axis=-1)
    sl = np.maximum((t[..., 4] - t[..., 0]) / 80.0, 0.0)
    x = np.maximum(vabp - 32.0, 0.0)
    me = vabp - np.exp(-0.94402 - 0.00865 * x ** 0.6667 + 2.99791 * sl ** 0.333)
    ma = vabp - np.exp(-0.56379 - 0.007981 * x ** 0.6667 + 3.04729 * sl ** 0.333)
    wa = vabp + np.exp(-3.062123 - 0.01829 * x ** 0.6667 + 4.45818 * sl ** 0.25)
    ca = vabp - np.exp(-0.23589 - 0.06906 * x ** 0.45 + 1.8858 * sl ** 0.45)
    narrow = sl <= 0.0
    to_c = lambda v: _scalar((np.where(narrow, vabp, v) - 32.0) / 1.8)  # noqa: E731
    return {"vabp": to_c(vabp), "meabp": to_c(me), "mabp": to_c(ma), "wabp": to_c(wa), "cabp": to_c(ca),
            "slope": _scalar(sl)}


MW_RANGE_TB_C = ((90 - 32) / 1.8, (1050 - 32) / 1.8)
"""Riazi-Daubert molecular weight range of boiling point, 90-1050 °F. [°C]"""
MW_RANGE_API = (14.0, 93.0)
"""Riazi-Daubert molecular weight range of API gravity. [°API]"""


def riazi_daubert_1980_mw(tb_c, sg):
    """Molecular weight by Riazi-Daubert 1980.

    .. math:: M = 1.6607\\times10^{-4}\\,T_b^{2.1962}\\,SG^{-1.0164},\\quad T_b\\ [K]

    Parameters
    ----------
    tb_c : float or array_like
        Mean average boiling point. [°C]
    sg : float or array_like
        Specific gravity 60/60 °F. [-]

    Returns
    -------
    float or numpy.ndarray
        Molecular weight. [g/mol]

    Notes
    -----
    Riazi & Daubert, Hydrocarbon Processing 59(3) (1980) 115; valid M 70-300 (Tb 35-295 °C).

    Examples
    --------
    The formula evaluated by hand (no published example on our reference sheet): Tb 400 K, SG 0.8 gives
    1.6607e-4 * 400**2.1962 = 86.09, divided by 0.8**1.0164 = 0.7971, is 108.0.

    >>> round(riazi_daubert_1980_mw(400 - 273.15, 0.8), 1)
    108.0
    """
    tb = np.asarray(tb_c, dtype=float) + 273.15
    return _scalar(1.6607e-4 * tb ** 2.1962 * np.asarray(sg, dtype=float) ** -1.0164)


def riazi_daubert_1987_mw(tb_c, sg):
    """Molecular weight by Riazi-Daubert 1987 (API TDB 2B2.1).

    .. math:: M = 42.965\\,\\exp(2.097\\times10^{-4} T_b - 7.78712\\,SG + 2.08476\\times10^{-3} T_b SG)
              \\,T_b^{1.26007}\\,SG^{4.98308},\\quad T_b\\ [K]

    Parameters
    ----------
    tb_c : float or array_like
        Mean average boiling point. [°C]
    sg : float or array_like
        Specific gravity 60/60 °F. [-]

    Returns
    -------
    float or numpy.ndarray
        Molecular weight. [g/mol]

    Notes
    -----
    Riazi & Daubert, Ind. Eng. Chem. Res. 26 (1987) 755; API TDB 2B2.1.  Range M 70-700, Tb 90-1050 °F,
    API 14-93; outside it the cut reports no molecular weight.

    Examples
    --------
    The formula evaluated at Tb 500 K, SG 0.85 (no published example on our reference sheet; a
    kerosene-range fraction of about 170 g/mol is typical, common practice):

    >>> round(riazi_daubert_1987_mw(500 - 273.15, 0.85), 1)
    173.0
    """
    tb = np.asarray(tb_c, dtype=float) + 273.15
    s = np.asarray(sg, dtype=float)
    return _scalar(42.965 * np.exp(2.097e-4 * tb - 7.78712 * s + 2.08476e-3 * tb * s)
                   * tb ** 1.26007 * s ** 4.98308)


def mw_in_range(tb_c, sg):
    """True where (Tb, SG) lie inside the Riazi-Daubert 1987 range (Tb 90-1050 °F, API 14-93)."""
    tb = np.asarray(tb_c, dtype=float)
    api = 141.5 / np.asarray(sg, dtype=float) - 131.5
    return ((tb >= MW_RANGE_TB_C[0]) & (tb <= MW_RANGE_TB_C[1])
            & (api >= MW_RANGE_API[0]) & (api <= MW_RANGE_API[1]))


def cetane_index_d4737(t10_c, t50_c, t90_c, density15_g_ml):
    """Calculated cetane index by four-variable equation, ASTM D4737 Procedure A (ISO 4264).

    .. math::
        CCI = 45.2 + 0.0892\\,T_{10N} + (0.131 + 0.901B)\\,T_{50N} + (0.0523 - 0.420B)\\,T_{90N}
              + 0.00049\\,(T_{10N}^2 - T_{90N}^2) + 107B + 60B^2

    with B = exp(-3.5 (D - 0.85)) - 1, T10N = T10 - 215, T50N = T50 - 260, T90N = T90 - 310.

    Parameters
    ----------
    t10_c, t50_c, t90_c : float or array_like
        ASTM D86 recovery temperatures at 10, 50 and 90 vol %. [°C]
    density15_g_ml : float or array_like
        Density at 15 °C. [g/mL]

    Returns
    -------
    float or numpy.ndarray
        Calculated cetane index. [-]

    Notes
    -----
    Procedure A applies to diesel fuels of D86 T90 roughly 282-380 °C (the standard gives the ranges).

    Examples
    --------
    At the reference point of the formula (215, 260, 310 °C, 0.850 g/mL) the index is exactly 45.2
    (ASTM D4737 formula):

    >>> round(cetane_index_d4737(215.0, 260.0, 310.0, 0.850), 6)
    45.2
    """
    d = np.asarray(density15_g_ml, dtype=float)
    b = np.exp(-3.5 * (d - 0.85)) - 1.0
    t10 = np.asarray(t10_c, dtype=float) - 215.0
    t50 = np.asarray(t50_c, dtype=float) - 260.0
    t90 = np.asarray(t90_c, dtype=float) - 310.0
    return _scalar(45.2 + 0.0892 * t10 + (0.131 + 0.901 * b) * t50 + (0.0523 - 0.420 * b) * t90
                   + 0.00049 * (t10 ** 2 - t90 ** 2) + 107.0 * b + 60.0 * b ** 2)


def cetane_index_d976(t50_c, density15_g_ml):
    """Cetane index by two-variable equation, ASTM D976 (SI form).

    .. math:: CI = 454.74 - 1641.416 D + 774.74 D^2 - 0.554 T_{50} + 97.803 (\\log_{10} T_{50})^2

    Parameters
    ----------
    t50_c : float or array_like
        ASTM D86 50 % recovery temperature. [°C]
    density15_g_ml : float or array_like
        Density at 15 °C. [g/mL]

    Returns
    -------
    float or numpy.ndarray
        Cetane index. [-]

    Examples
    --------
    The formula evaluated by hand at T50 = 260 °C, D = 0.85 g/mL (454.74 - 1395.20 + 559.75 - 144.04
    + 570.39; no published example on our reference sheet):

    >>> round(cetane_index_d976(260.0, 0.85), 2)
    45.64
    """
    d = np.asarray(density15_g_ml, dtype=float)
    t = np.asarray(t50_c, dtype=float)
    return _scalar(454.74 - 1641.416 * d + 774.74 * d ** 2 - 0.554 * t + 97.803 * np.log10(t) ** 2)


def flash_point_api_2b7_1(t10_c):
    """Closed-cup flash point estimated from the D86 10 % point, API TDB 2B7.1.

    .. math:: T_F = 0.69\\,T_{10} - 118.2\\quad[°F]

    Parameters
    ----------
    t10_c : float or array_like
        ASTM D86 10 % recovery temperature. [°C]

    Returns
    -------
    float or numpy.ndarray
        Estimated closed-cup flash point. [°C]

    Notes
    -----
    An estimate only: flash point is a safety property and must be measured (ASTM D93).

    Examples
    --------
    Hand calculation: T10 = 200 °C = 392 °F gives 0.69 * 392 - 118.2 = 152.28 °F = 66.8 °C.

    >>> round(flash_point_api_2b7_1(200.0), 1)
    66.8
    """
    tf = 0.69 * c_to_f(t10_c) - 118.2
    return _scalar((tf - 32.0) / 1.8)


def flash_point_riazi_daubert_1987(t10_c):
    """Flash point estimated from the D86 10 % point, Riazi-Daubert 1987.

    .. math:: 1/T_F = -0.024209 + 2.84947/T_{10} + 3.4254\\times10^{-3} \\ln T_{10}\\quad[K]

    Parameters
    ----------
    t10_c : float or array_like
        ASTM D86 10 % recovery temperature. [°C]

    Returns
    -------
    float or numpy.ndarray
        Estimated flash point. [°C]

    Notes
    -----
    Coefficients recalled from memory (reference sheet §7).  An estimate only: measure by ASTM D93.
    """
    t = np.asarray(t10_c, dtype=float) + 273.15
    return _scalar(1.0 / (-0.024209 + 2.84947 / t + 3.4254e-3 * np.log(t)) - 273.15)
