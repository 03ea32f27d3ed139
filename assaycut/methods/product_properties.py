"""Product-quality estimates of petroleum fractions from their distillation and density: the calculated
cetane index and the flash point.

Every value is an estimate for screening.  Flash point is a safety property: an estimate never replaces a
measurement by ASTM D93.

Contents
--------
- :func:`cetane_index_d4737`: Calculated cetane index by four-variable equation, ASTM D4737 Procedure A...
- :func:`flash_point_api_2b7_1`: Closed-cup flash point estimated from the D86 10 % point, API TDB 2B7.1
- :func:`cci_in_range`: Whether D86 10/50/90 % [°C] and density at 15 °C [kg/m³] lie inside...
- :func:`flash_in_range`: Whether a D86 10 % point [°C] lies inside :data:`FLASH_T10_RANGE_C` (bool array)
- :func:`describe_ranges`: The validity ranges above as text, for method notes and warnings, by output...
- constants: ``CCI_RANGE``, ``FLASH_T10_RANGE_C``

References
----------
.. [1] ASTM D4737, *Standard Test Method for Calculated Cetane Index by Four Variable Equation*,
   Procedure A (equivalent to ISO 4264).
.. [2] American Petroleum Institute, *Technical Data Book - Petroleum Refining*, Procedure 2B7.1 (flash
   point of petroleum fractions).
"""

from __future__ import annotations

import numpy as np

from ..units import as_scalar, c_to_f, f_to_c

__all__ = ["cetane_index_d4737", "flash_point_api_2b7_1", "cci_in_range", "flash_in_range", "describe_ranges",
           "CCI_RANGE", "FLASH_T10_RANGE_C"]


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
    Valid range: :data:`CCI_RANGE` (the scope the standard states for each variable [1]_, recalled from
    memory); :func:`cci_in_range` tests it.

    References
    ----------
    .. [1] ASTM D4737, Procedure A.

    Examples
    --------
    At the reference point of the formula (215, 260, 310 °C, 0.850 g/mL) the index is exactly 45.2, which
    follows from the ASTM D4737 equation (no printed worked example is at hand):

    >>> round(cetane_index_d4737(215.0, 260.0, 310.0, 0.850), 6)
    45.2
    """
    d = np.asarray(density15_g_ml, dtype=float)
    b = np.exp(-3.5 * (d - 0.85)) - 1.0
    t10 = np.asarray(t10_c, dtype=float) - 215.0
    t50 = np.asarray(t50_c, dtype=float) - 260.0
    t90 = np.asarray(t90_c, dtype=float) - 310.0
    return as_scalar(45.2 + 0.0892 * t10 + (0.131 + 0.901 * b) * t50 + (0.0523 - 0.420 * b) * t90
                   + 0.00049 * (t10 ** 2 - t90 ** 2) + 107.0 * b + 60.0 * b ** 2)


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
    An estimate only: flash point is a safety property and must be measured (ASTM D93).  Valid range:
    petroleum fractions with D86 10 % points of roughly 150-850 °F [2]_ (recalled from memory).  Kept over the
    Riazi-Daubert 1987 reciprocal form, 1/TF = -0.024209 + 2.84947/T10 + 3.4254e-3 ln T10 [K] (from memory of
    [3]_): on the measured flash points of 18 pure hydrocarbons of the `chemicals` library (D86 10 % = Tb) this
    form errs 2.6 °C on average, the reciprocal one 4.2 °C (tests/methods/test_product_properties.py).

    References
    ----------
    .. [2] API Technical Data Book, Procedure 2B7.1.
    .. [3] Riazi, M. R., *Characterization and Properties of Petroleum Fractions*, ASTM MNL50 (2005), §3.6.

    Examples
    --------
    No worked example is at hand; by hand: T10 = 200 °C = 392 °F gives 0.69 * 392 - 118.2 = 152.28 °F
    = 66.8 °C.

    >>> round(flash_point_api_2b7_1(200.0), 1)
    66.8
    """
    return as_scalar(f_to_c(0.69 * c_to_f(t10_c) - 118.2))


CCI_RANGE = {"D86 10 %": (171.0, 259.0), "D86 50 %": (212.0, 308.0), "D86 90 %": (251.0, 363.0),
             "density at 15 °C": (805.0, 895.0)}
"""Scope of the four-variable cetane index as ISO 4264 states it (D86 recoveries [°C], density [kg/m³]); recalled
from memory, not read from the current edition: confirm it."""

FLASH_T10_RANGE_C = (f_to_c(150.0), f_to_c(850.0))
"""D86 10 % range of API TDB 2B7.1, 150-850 °F (recalled from memory). [°C]"""


def cci_in_range(t10_c, t50_c, t90_c, density15_kg_m3):
    """Whether D86 10/50/90 % [°C] and density at 15 °C [kg/m³] lie inside :data:`CCI_RANGE` (bool array)."""
    ok = np.ones(np.broadcast(np.asarray(t10_c), np.asarray(density15_kg_m3)).shape, dtype=bool)
    for x, (lo, hi) in zip((t10_c, t50_c, t90_c, density15_kg_m3), CCI_RANGE.values()):
        ok &= (np.asarray(x) >= lo) & (np.asarray(x) <= hi)
    return ok


def flash_in_range(t10_c):
    """Whether a D86 10 % point [°C] lies inside :data:`FLASH_T10_RANGE_C` (bool array)."""
    t = np.asarray(t10_c, dtype=float)
    return (t >= FLASH_T10_RANGE_C[0]) & (t <= FLASH_T10_RANGE_C[1])


def describe_ranges() -> dict[str, str]:
    """The validity ranges above as text, for method notes and warnings, by output column."""
    cci = ", ".join(f"{k} {lo:g}-{hi:g} {'kg/m³' if 'density' in k else '°C'}" for k, (lo, hi) in CCI_RANGE.items())
    lo, hi = FLASH_T10_RANGE_C
    return {"cetane_index_d4737": f"ISO 4264 scope, recalled from memory: {cci}",
            "flash_c_est": f"API TDB 2B7.1, D86 10 % {lo:.0f}-{hi:.0f} °C (150-850 °F, recalled from memory)"}
