"""Characterisation of petroleum fractions: average boiling points, Watson K, density at constant Watson K,
molecular weight.

All functions accept numpy arrays (vectorised over cuts or assays).  Temperatures in °C unless a name
says otherwise; each docstring gives the unit the source works in.

Contents
--------
- :func:`watson_k`: Watson (UOP) characterisation factor
- :func:`sg_from_watson_k`: Specific gravity of a fraction at constant Watson K
- :func:`watson_k_numerator`: Cube root of the absolute boiling point in °R, (1.8 T_b[K])^(1/3): the...
- :func:`average_boiling_points_api_2b1_1`: Average boiling points of a fraction from its ASTM D86 curve (API TDB
  2B1.1)
- :func:`mw_riazi_daubert_1987`: Molecular weight by Riazi-Daubert 1987 (API TDB 2B2.1)
- :func:`mw_in_range`: True where (Tb, SG) lie inside the Riazi-Daubert 1987 range (Tb 90-1050 °F,...
- :func:`meabp_pseudo_components`: Mean average boiling point of a fraction from its own TBP curve, taken as...
- constants: ``MW_RANGE_TB_C``, ``MW_RANGE_API``

References
----------
.. [1] Watson, K. M., Nelson, E. F., "Improved Methods for Approximating Critical and Thermal Properties of
   Petroleum Fractions", Ind. Eng. Chem. 25 (1933) 880-887.
.. [2] American Petroleum Institute, *Technical Data Book - Petroleum Refining*, Procedures 2B1.1 (average
   boiling points), 2B2.1 (molecular weight) and 2B5.1 (characterisation factor).
.. [3] Riazi, M. R., Daubert, T. E., "Characterization Parameters for Petroleum Fractions", Ind. Eng. Chem.
   Res. 26 (1987) 755-759.
.. [4] Riazi, M. R., *Characterization and Properties of Petroleum Fractions*, ASTM MNL50, 1st ed. (2005),
   §2.4 and §3.3.
"""

from __future__ import annotations

import numpy as np

from ..units import as_scalar, c_to_f, c_to_rankine, f_to_c, sg_to_api

__all__ = ["watson_k", "sg_from_watson_k", "watson_k_numerator", "average_boiling_points_api_2b1_1",
           "mw_riazi_daubert_1987", "mw_in_range", "meabp_pseudo_components", "MW_RANGE_TB_C", "MW_RANGE_API"]


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
    Valid for petroleum fractions and crudes; paraffinic material has Kw about 12.5-13, aromatic about
    10-11 [4]_.

    References
    ----------
    .. [1] Watson & Nelson, Ind. Eng. Chem. 25 (1933) 880.
    .. [2] API Technical Data Book, Procedure 2B5.1, with its worked example.

    Examples
    --------
    API TDB 2B5.1 worked example: 580 °F and 34.5 °API (SG 0.8524) give 11.8846.

    >>> round(watson_k((580 - 32) / 1.8, 141.5 / (34.5 + 131.5)), 4)
    11.8846
    """
    return as_scalar(np.cbrt(c_to_rankine(meabp_c)) / np.asarray(sg, dtype=float))


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
    The definition of Watson K [1]_ solved for SG: common practice where a cut has no measured density, with
    no single source for its use.  Valid where Watson K is (the whole crude's boiling range).

    References
    ----------
    .. [1] Watson & Nelson, Ind. Eng. Chem. 25 (1933) 880.

    Examples
    --------
    API TDB 2B5.1 worked example backwards (580 °F, K 11.8846 -> SG 0.8524, i.e. 34.5 °API):

    >>> round(sg_from_watson_k((580 - 32) / 1.8, 11.8846), 4)
    0.8524
    """
    return as_scalar(watson_k_numerator(tb_c) / kw)


def watson_k_numerator(tb_c):
    """Cube root of the absolute boiling point in °R, (1.8 T_b[K])^(1/3): the numerator of Watson K [1]_.

    Parameters
    ----------
    tb_c : float or array_like
        Boiling point. [°C]

    Returns
    -------
    numpy.ndarray
        [°R^(1/3)]

    References
    ----------
    .. [1] Watson & Nelson, Ind. Eng. Chem. 25 (1933) 880.

    Examples
    --------
    The API TDB 2B5.1 worked example, 580 °F (1039.67 °R): 1039.67**(1/3) = 10.1305.

    >>> round(float(watson_k_numerator((580 - 32) / 1.8)), 4)
    10.1305
    """
    return np.cbrt(1.8 * (np.asarray(tb_c, dtype=float) + 273.15))


def average_boiling_points_api_2b1_1(d86_c):
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
    For a very narrow fraction (slope 0) all averages equal the VABP.  Valid for fractions with D86 slopes
    up to about 5 °F/% and VABP up to about 600 °F (the charts of [2]_; recalled from memory).

    References
    ----------
    .. [2] API Technical Data Book, Procedure 2B1.1, with its worked example.
    .. [4] Riazi, ASTM MNL50 (2005), §3.3.

    Examples
    --------
    API TDB 2B1.1 worked example: D86 129.2/170.6/214.7/267.8/339.8 °F gives VABP 224.42 °F, SL 2.6325
    and MeABP about 206.1 °F.

    >>> r = average_boiling_points_api_2b1_1([(t - 32) / 1.8 for t in (129.2, 170.6, 214.7, 267.8, 339.8)])
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
    to_c = lambda v: as_scalar(f_to_c(np.where(narrow, vabp, v)))  # noqa: E731
    return {"vabp": to_c(vabp), "meabp": to_c(me), "mabp": to_c(ma), "wabp": to_c(wa), "cabp": to_c(ca),
            "slope": as_scalar(sl)}


MW_RANGE_TB_C = (f_to_c(90.0), f_to_c(1050.0))
"""Riazi-Daubert molecular weight range of boiling point, 90-1050 °F. [°C]"""
MW_RANGE_API = (14.0, 93.0)
"""Riazi-Daubert molecular weight range of API gravity. [°API]"""


def mw_riazi_daubert_1987(tb_c, sg):
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
    Valid range: M 70-700 g/mol, Tb 90-1050 °F, API 14-93 [3]_; outside it a cut reports no molecular
    weight (see :func:`mw_in_range`).

    References
    ----------
    .. [3] Riazi & Daubert, Ind. Eng. Chem. Res. 26 (1987) 755.
    .. [2] API Technical Data Book, Procedure 2B2.1.

    Examples
    --------
    No worked example is at hand; the formula evaluated at Tb 500 K, SG 0.85 (a kerosene-range fraction
    of about 170 g/mol is typical, common practice):

    >>> round(mw_riazi_daubert_1987(500 - 273.15, 0.85), 1)
    173.0
    """
    tb = np.asarray(tb_c, dtype=float) + 273.15
    s = np.asarray(sg, dtype=float)
    return as_scalar(42.965 * np.exp(2.097e-4 * tb - 7.78712 * s + 2.08476e-3 * tb * s)
                   * tb ** 1.26007 * s ** 4.98308)


def mw_in_range(tb_c, sg):
    """True where (Tb, SG) lie inside the Riazi-Daubert 1987 range (Tb 90-1050 °F, API 14-93)."""
    tb = np.asarray(tb_c, dtype=float)
    api = sg_to_api(np.asarray(sg, dtype=float))
    return ((tb >= MW_RANGE_TB_C[0]) & (tb <= MW_RANGE_TB_C[1])
            & (api >= MW_RANGE_API[0]) & (api <= MW_RANGE_API[1]))


def meabp_pseudo_components(tb_c, sg, vol_weights):
    """Mean average boiling point of a fraction from its own TBP curve, taken as pseudo-components.

    Each pseudo-component i (a narrow slice of the TBP curve) has a boiling point Tb_i, a gravity SG_i and a
    volume weight v_i.  With the definitions of the average boiling points (API TDB 2B1.1 [1]_, Riazi MNL50
    §2.1 [4]_), temperatures absolute (°R):

    .. math::
        CABP = \\Big(\\sum x_{v,i}\\,T_{b,i}^{1/3}\\Big)^3,\\qquad MABP = \\sum x_{m,i}\\,T_{b,i},\\qquad
        MeABP = (MABP + CABP)/2

    with x_v the volume fractions and x_m the mole fractions, x_m ∝ v_i SG_i / M_i, M_i by Riazi-Daubert
    1987 (:func:`mw_riazi_daubert_1987`, used here as a weight also outside its range).

    Parameters
    ----------
    tb_c, sg, vol_weights : array_like
        Boiling point [°C], SG 60/60 °F [-] and volume weight [any unit] of each pseudo-component, along the
        last axis (broadcast against each other).

    Returns
    -------
    numpy.ndarray
        MeABP [°C]; NaN where the weights sum to zero.

    Notes
    -----
    One characterising boiling point for every cut, light ends to residue alike, continuous in the cut
    points: a single narrow slice gives MeABP = Tb.  It differs from the API TDB 2B1.1 estimate from D86,
    which is a regression of the same definitions on D86 data.

    Examples
    --------
    A single pseudo-component: its own boiling point.

    >>> round(float(meabp_pseudo_components([250.0], [0.82], [1.0])), 9)
    250.0
    """
    tb = c_to_rankine(np.asarray(tb_c, dtype=float))
    sg = np.asarray(sg, dtype=float)
    w = np.asarray(vol_weights, dtype=float)
    tb, sg, w = np.broadcast_arrays(tb, sg, w)
    with np.errstate(invalid="ignore", divide="ignore"):
        xv = w / w.sum(axis=-1, keepdims=True)
        moles = w * sg / mw_riazi_daubert_1987(f_to_c(tb - 459.67), np.maximum(sg, 0.3))
        xm = moles / moles.sum(axis=-1, keepdims=True)
        cabp = (xv * np.cbrt(tb)).sum(axis=-1) ** 3
        mabp = (xm * tb).sum(axis=-1)
    return f_to_c(0.5 * (cabp + mabp) - 459.67)
