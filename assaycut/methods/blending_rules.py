"""Blending rules for crude and product properties: the Refutas viscosity blending number and the volume
shrinkage of light hydrocarbons blended into crude.

Gravity (by volume on SG) and mass-based contents (by weight) blend linearly and need no function of
their own; see :mod:`assaycut.studies.blend`.

Contents
--------
- :func:`vbn_refutas`: Refutas viscosity blending number
- :func:`viscosity_from_vbn_refutas`: Kinematic viscosity from a Refutas blending number (the inverse of...
- :func:`shrinkage_api_mpms_12_3`: Volume shrinkage of a light/heavy hydrocarbon blend, API MPMS Ch
"""

from __future__ import annotations

import numpy as np

from ..units import as_scalar

__all__ = ["vbn_refutas", "viscosity_from_vbn_refutas", "shrinkage_api_mpms_12_3"]


def vbn_refutas(nu_cst):
    """Refutas viscosity blending number.

    .. math:: VBN = 14.534 \\ln(\\ln(\\nu + 0.8)) + 10.975

    Parameters
    ----------
    nu_cst : float or array_like
        Kinematic viscosity. [cSt]

    Returns
    -------
    float or numpy.ndarray
        Viscosity blending number. [-]

    Notes
    -----
    Blend by mass fraction, all viscosities at one temperature.  Valid for kinematic viscosities above
    about 0.2 cSt (ln(ln(ν + 0.8)) must exist) [1]_.

    References
    ----------
    .. [1] Maples, R. E., *Petroleum Refinery Process Economics*, 2nd ed., PennWell (2000), ch. 2.

    Examples
    --------
    No printed worked example is at hand; the index of 10 cSt by hand: ln(ln(10.8)) = 0.86688, so
    VBN = 14.534 x 0.86688 + 10.975 = 23.57, and the inverse recovers the viscosity:

    >>> round(float(vbn_refutas(10.0)), 2), round(viscosity_from_vbn_refutas(vbn_refutas(10.0)), 9)
    (23.57, 10.0)
    """
    with np.errstate(invalid="ignore"):
        return 14.534 * np.log(np.log(np.asarray(nu_cst, dtype=float) + 0.8)) + 10.975


def viscosity_from_vbn_refutas(vbn):
    """Kinematic viscosity from a Refutas blending number (the inverse of :func:`vbn_refutas`, Maples 2000).

    .. math:: \\nu = \\exp(\\exp((VBN - 10.975)/14.534)) - 0.8

    Parameters
    ----------
    vbn : float or array_like
        Viscosity blending number. [-]

    Returns
    -------
    float or numpy.ndarray
        Kinematic viscosity. [cSt]
    """
    return as_scalar(np.exp(np.exp((np.asarray(vbn, dtype=float) - 10.975) / 14.534)) - 0.8)


def shrinkage_api_mpms_12_3(light_vol_pct: float, api_diff: float) -> float:
    """Volume shrinkage of a light/heavy hydrocarbon blend, API MPMS Ch. 12.3 (coefficients from memory).

    .. math:: S = 4.86\\times10^{-8}\\,C\\,(100 - C)^{0.819}\\,G^{2.28}

    Parameters
    ----------
    light_vol_pct : float
        Volume percent of the lighter component. [%]
    api_diff : float
        API gravity difference between the components. [°API]

    Returns
    -------
    float
        Shrinkage as percent of the total (ideal) volume. [%]

    Notes
    -----
    Coefficients recalled from memory, not read from the standard.  Valid range in the standard: blends of
    crude oil with lighter hydrocarbons, gravity differences up to about 60 °API (recalled from memory).

    References
    ----------
    .. [1] API *Manual of Petroleum Measurement Standards*, Ch. 12.3, *Calculation of Volumetric Shrinkage
       Resulting from Blending Light Hydrocarbons with Crude Oil*.

    Examples
    --------
    No printed worked example is at hand; by hand, 20 % of a liquid 40 °API lighter: 4.86e-8 x 20 x
    80**0.819 x 40**2.28 = 4.86e-8 x 20 x 36.19 x 4494.7 = 0.158 %.

    >>> round(shrinkage_api_mpms_12_3(20.0, 40.0), 3)
    0.158
    """
    c = float(light_vol_pct)
    return 4.86e-8 * c * (100.0 - c) ** 0.819 * abs(api_diff) ** 2.28
