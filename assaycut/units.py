"""Unit conversions for temperature, gravity and density.

Formulas
--------
* API gravity: API = 141.5/SG - 131.5 (API MPMS Ch. 11; ASTM D287 / D1298), SG at 60/60 °F.
* Density of water at 60 °F: 999.016 kg/m3 (API MPMS Ch. 11.1).
* 60 °F to 15 °C for crude oil: rho_T = rho_60 * exp(-a60*dT*(1 + 0.8*a60*dT)), a60 = K0/rho_60**2,
  dT in °F, K0 = 341.0957 for crude oils (API MPMS 11.1 / ASTM D1250; K0 recalled from memory).
"""

from __future__ import annotations

import numpy as np

WATER_60F_KG_M3 = 999.016
"""Density of pure water at 60 °F [kg/m3] (API MPMS Ch. 11.1)."""

K0_CRUDE = 341.0957
"""Thermal-expansion constant K0 for crude oils [kg2/m6/°F] (API MPMS 11.1; value from memory)."""


def as_scalar(x):
    """A Python float for a 0-d result, the array otherwise (functions here take scalars and arrays alike)."""
    return float(x) if np.ndim(x) == 0 else x


def c_to_f(t):
    """°C to °F. [°C] -> [°F]"""
    return np.asarray(t, dtype=float) * 1.8 + 32.0 if not np.isscalar(t) else t * 1.8 + 32.0


def f_to_c(t):
    """°F to °C. [°F] -> [°C]"""
    return (np.asarray(t, dtype=float) - 32.0) / 1.8 if not np.isscalar(t) else (t - 32.0) / 1.8


def c_to_rankine(t):
    """°C to degrees Rankine (absolute °F): T[°R] = T[°F] + 459.67. [°C] -> [°R]

    Examples
    --------
    >>> round(c_to_rankine(-273.15), 9)
    0.0
    """
    return c_to_f(t) + 459.67


def to_celsius(values, unit: str):
    """Convert temperatures from ``unit`` ('C', 'F' or 'K') to °C.

    Parameters
    ----------
    values : array_like
        Temperatures. [unit]
    unit : str
        One of 'C', 'F', 'K' (case-insensitive).

    Returns
    -------
    numpy.ndarray
        Temperatures. [°C]
    """
    u = unit.strip().upper().replace("°", "").replace("DEG", "")
    arr = np.asarray(values, dtype=float)
    if u == "C":
        return arr.copy()
    if u == "F":
        return f_to_c(arr)
    if u == "K":
        return arr - 273.15
    raise ValueError(f"unknown temperature unit {unit!r}; expected C, F or K")


def api_to_sg(api):
    """API gravity to specific gravity 60/60 °F.

    .. math:: SG = 141.5 / (API + 131.5)

    Parameters
    ----------
    api : float or array_like
        API gravity. [°API]

    Returns
    -------
    float or numpy.ndarray
        Specific gravity 60/60 °F. [-]

    Examples
    --------
    Water is 10 °API by definition (API MPMS Ch. 11):

    >>> api_to_sg(10.0)
    1.0
    """
    if np.isscalar(api):
        return 141.5 / (api + 131.5)
    return 141.5 / (np.asarray(api, dtype=float) + 131.5)


def sg_to_api(sg):
    """Specific gravity 60/60 °F to API gravity.

    .. math:: API = 141.5 / SG - 131.5

    Parameters
    ----------
    sg : float or array_like
        Specific gravity 60/60 °F. [-]

    Returns
    -------
    float or numpy.ndarray
        API gravity. [°API]

    Examples
    --------
    Same value as ``chemicals.utils.SG_to_API(0.7365)``:

    >>> round(sg_to_api(0.7365), 8)
    60.62491514
    """
    if np.isscalar(sg):
        if not sg > 0:
            from .errors import ConversionError

            raise ConversionError(f"specific gravity must be positive; got {sg!r}")
        return 141.5 / sg - 131.5
    with np.errstate(divide="ignore", invalid="ignore"):  # array rows: SG <= 0 gives NaN, not inf
        arr = np.asarray(sg, dtype=float)
        return np.where(arr > 0, 141.5 / np.where(arr > 0, arr, 1.0) - 131.5, np.nan)


def _thermal_factor_60f_to_15c(rho60):
    """Factor rho_15C / rho_60F for crude oil (API MPMS 11.1 form, K0 from memory)."""
    a60 = K0_CRUDE / np.square(rho60)
    dt = 59.0 - 60.0  # 15 °C = 59 °F  [°F]
    return np.exp(-a60 * dt * (1.0 + 0.8 * a60 * dt))


def sg_to_density15(sg):
    """Specific gravity 60/60 °F to density at 15 °C.

    .. math:: \\rho_{60} = SG \\cdot 999.016;\\quad
              \\rho_{15} = \\rho_{60} \\exp[-\\alpha_{60}\\Delta T(1+0.8\\alpha_{60}\\Delta T)],\\;
              \\alpha_{60} = K_0/\\rho_{60}^2,\\; \\Delta T = -1\\,°F

    Parameters
    ----------
    sg : float or array_like
        Specific gravity 60/60 °F. [-]

    Returns
    -------
    float or numpy.ndarray
        Density at 15 °C. [kg/m3]

    Notes
    -----
    The crude-oil form of the volume correction with K0 = 341.0957 (recalled from memory, not read from the
    standard); the 15 °C and 60 °F densities differ by about 0.05 %.  Valid range of the standard's crude-oil
    tables: densities of about 610-1075 kg/m3 (recalled from memory).

    References
    ----------
    .. [1] API *Manual of Petroleum Measurement Standards*, Ch. 11.1, *Temperature and Pressure Volume
       Correction Factors for Generalized Crude Oils, Refined Products and Lubricating Oils* (ASTM D1250).

    Examples
    --------
    >>> round(float(sg_to_density15(0.85)), 1)
    849.6
    """
    rho60 = np.asarray(sg, dtype=float) * WATER_60F_KG_M3
    out = rho60 * _thermal_factor_60f_to_15c(rho60)
    return as_scalar(out)


def density15_to_sg(rho15):
    """Density at 15 °C to specific gravity 60/60 °F (inverse of :func:`sg_to_density15`).

    Parameters
    ----------
    rho15 : float or array_like
        Density at 15 °C. [kg/m3]

    Returns
    -------
    float or numpy.ndarray
        Specific gravity 60/60 °F. [-]
    """
    rho15 = np.asarray(rho15, dtype=float)
    rho60 = rho15.copy()
    for _ in range(6):  # fixed point; the factor is within 0.1 % of 1
        rho60 = rho15 / _thermal_factor_60f_to_15c(rho60)
    out = rho60 / WATER_60F_KG_M3
    return as_scalar(out)


BBL_M3 = 0.158987294928
"""One US oil barrel (42 US gallons, exact), the volume of a barrel at 60 °F. [m³]"""


def barrel_mass_t(sg):
    """Mass of one barrel at 60 °F of a liquid of specific gravity ``sg`` (60/60 °F): the trade's barrel is a
    volume at 60 °F, so its mass is SG x 999.016 kg/m³ (water at 60 °F, API MPMS Ch. 11.1) x 0.158987 m³.

    .. math:: m = SG \\cdot 999.016 \\cdot 0.158987294928 / 1000 \\quad [t/bbl]

    Parameters
    ----------
    sg : float or array_like
        Specific gravity 60/60 °F. [-]

    Returns
    -------
    float or numpy.ndarray
        Mass per barrel. [t/bbl]

    Examples
    --------
    Water (SG 1) weighs 158.83 kg per barrel at 60 °F, the 6.2898 barrels per m³ at 999.016 kg/m³:

    >>> round(barrel_mass_t(1.0) * 1000, 2)
    158.83
    """
    return as_scalar(np.asarray(sg, dtype=float) * WATER_60F_KG_M3 * BBL_M3 / 1000.0)


def pct_text(x) -> str:
    """A percentage as message text: at most 2 decimals, no trailing zeros (73.4347 -> '73.43', 88.5 -> '88.5')."""
    v = round(float(x), 2)
    return f"{v + 0.0:g}"


def residual_text(r) -> str:
    """A closure residual [%] as text, float rounding shown as zero: '+0.000000' below 5e-7, else 6 decimals."""
    x = float(r)
    return "+0.000000" if abs(x) < 5e-7 else f"{x:+.6f}"
