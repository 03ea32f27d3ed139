"""Vacuum distillation (ASTM D1160) temperatures to the atmospheric equivalent temperature, Maxwell-Bonnell.

Contents
--------
- :func:`maxwell_bonnell_q`: Maxwell-Bonnell Q of a pressure, anchored so that 760 mmHg is the identity
- :func:`watson_k_factor`: The factor f of the Maxwell-Bonnell Watson K correction, from the Kw = 12...
- :func:`vacuum_to_aet_maxwell_bonnell`: Vacuum distillation temperature to atmospheric equivalent temperature
  (AET),...
- constants: ``Q_IDENTITY``, ``C_OFFSET``, ``PRESSURE_RANGE_MMHG``

References
----------
.. [1] Maxwell, J. B., Bonnell, L. S., "Derivation and Precision of a New Vapor Pressure Correlation for
   Petroleum Hydrocarbons", Ind. Eng. Chem. 49(7) (1957) 1187-1196.
.. [2] American Petroleum Institute, *Technical Data Book - Petroleum Refining*, Procedure 5A1.19.
.. [3] Riazi, M. R., *Characterization and Properties of Petroleum Fractions*, ASTM MNL50, 1st ed. (2005),
   Eqs. 7.22-7.26.
.. [4] ASTM D1160, *Standard Test Method for Distillation of Petroleum Products at Reduced Pressure*, annex
   on the conversion of observed vapour temperatures to atmospheric equivalent temperatures.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import ConversionError
from ..units import as_scalar, c_to_f

__all__ = ["maxwell_bonnell_q", "watson_k_factor", "vacuum_to_aet_maxwell_bonnell", "Q_IDENTITY", "C_OFFSET",
           "PRESSURE_RANGE_MMHG"]

Q_IDENTITY = 1.0 / 748.1
"""The Q at which T' = T for every T: the value the pressure fit should take at 760 mmHg. [-]"""

C_OFFSET = 0.3861 / 748.1
"""The constant term of the T' equation, published as 0.00051606; taken as 0.3861/748.1 = 0.000516107 so that
Q = 1/748.1 gives T' = T exactly.  The two differ by 5e-8 K^-1, within the rounding of the 4-figure 748.1;
it moves a 10 mmHg AET by about 0.01 °C. [1/K]"""

_LOG2, _LOG760 = math.log10(2.0), math.log10(760.0)


def _q_published(lp: float) -> float:
    """Maxwell-Bonnell Q for log10(P [mmHg]) = ``lp`` from the three published pressure ranges [2]_."""
    if lp < _LOG2:
        return (6.761560 - 0.987672 * lp) / (3000.538 - 43.0 * lp)
    if lp < _LOG760:
        return (5.994296 - 0.972546 * lp) / (2663.129 - 95.76 * lp)
    return (6.412631 - 0.989679 * lp) / (2770.085 - 36.0 * lp)


def maxwell_bonnell_q(pressure_mmhg: float) -> float:
    """Maxwell-Bonnell Q of a pressure, anchored so that 760 mmHg is the identity.

    The published ranges [2]_ give Q(760) = 0.00133734 (2-760 mmHg form) and 0.00133573 (>= 760 form), not
    the identity value 1/748.1 = 0.00133672: rounding of the published constants, worth -0.3 and +0.2 °C at
    300 °C.  We correct the 2-760 mmHg form by a term linear in log10 P that is zero at 2 mmHg and meets the
    identity at 760 mmHg, and shift the >= 760 form by a constant to meet it there too (our adjustment, not
    part of the published method; it moves a 10 mmHg AET by under 0.1 °C).  The result is continuous at 760.

    Parameters
    ----------
    pressure_mmhg : float
        Absolute pressure. [mmHg]

    Returns
    -------
    float
        Q. [-]
    """
    lp = math.log10(pressure_mmhg)
    q = _q_published(lp)
    if lp < _LOG2:
        return q
    if lp < _LOG760:
        miss = Q_IDENTITY - (5.994296 - 0.972546 * _LOG760) / (2663.129 - 95.76 * _LOG760)
        return q + miss * (lp - _LOG2) / (_LOG760 - _LOG2)
    return q + Q_IDENTITY - (6.412631 - 0.989679 * _LOG760) / (2770.085 - 36.0 * _LOG760)


def watson_k_factor(t_ref_c):
    """The factor f of the Maxwell-Bonnell Watson K correction, from the Kw = 12 AET T' [2]_:
    f = 0 below 200 °F, 1 above 400 °F, (T'[°F] - 200)/200 between. [-]"""
    return np.clip((c_to_f(np.asarray(t_ref_c, dtype=float)) - 200.0) / 200.0, 0.0, 1.0)


PRESSURE_RANGE_MMHG = (0.01, 1520.0)
"""Pressures accepted for the Maxwell-Bonnell conversion: about 0.01 mmHg to 2 atm, the span of the published
charts behind API TDB 5A1.19 (recalled from memory; check the current edition). [mmHg]"""


def vacuum_to_aet_maxwell_bonnell(temp_c, pressure_mmhg: float, watson_k: float | None = None):
    """Vacuum distillation temperature to atmospheric equivalent temperature (AET), Maxwell-Bonnell [1]_.

    .. math::
        T' = \\frac{748.1\\,Q}{1/T + 0.3861\\,Q - 0.00051606}\\quad[K]

    (with 0.00051606 taken as 0.3861/748.1, :data:`C_OFFSET`)

    .. math::
        T_b = T' + 1.3889\\,f\\,(K_w - 12)\\,\\log_{10}(P/760)\\quad[K]

    with Q from the pressure P [mmHg] (:func:`maxwell_bonnell_q`: the three published ranges [2]_, anchored
    so that 760 mmHg is the identity) and f from T' (:func:`watson_k_factor`).  Below atmospheric pressure
    log10(P/760) < 0, so a paraffinic fraction (Kw > 12) comes out lower and an aromatic one higher [2]_ [3]_.

    Parameters
    ----------
    temp_c : float or array_like
        Observed vapour temperature at pressure P. [°C]
    pressure_mmhg : float
        Absolute pressure of the distillation. [mmHg]
    watson_k : float, optional
        Watson K of the material [-]; None (default) or 12 applies no correction, which is the ASTM D1160
        annex form [4]_.

    Returns
    -------
    float or numpy.ndarray
        Atmospheric equivalent temperature. [°C]

    Notes
    -----
    Valid range: petroleum fractions distilled at :data:`PRESSURE_RANGE_MMHG` (outside it a ConversionError);
    D1160 is a vacuum method, and callers warn above 760 mmHg.

    References
    ----------
    .. [1] Maxwell & Bonnell, Ind. Eng. Chem. 49 (1957) 1187.
    .. [2] API Technical Data Book, Procedure 5A1.19.
    .. [3] Riazi, ASTM MNL50 (2005), Eqs. 7.22-7.26.
    .. [4] ASTM D1160, annex.

    Examples
    --------
    No printed example is at hand; computed from the equations of [1] and [2] (not a printed example): 200 °C
    observed at 10 mmHg is about 348.8 °C AET; 365 °F at 10 mmHg with Kw 12.5 is 625.5 °F.

    >>> round(float(vacuum_to_aet_maxwell_bonnell(200.0, 10.0)), 2)
    348.8
    >>> round(float(vacuum_to_aet_maxwell_bonnell((365 - 32) / 1.8, 10.0, watson_k=12.5)) * 1.8 + 32, 1)
    625.5
    """
    lo, hi = PRESSURE_RANGE_MMHG
    if not (isinstance(pressure_mmhg, (int, float, np.floating)) and lo <= pressure_mmhg <= hi):
        raise ConversionError(f"pressure {pressure_mmhg!r} mmHg is outside {lo:g}-{hi:g} mmHg, the range of the "
                              f"Maxwell-Bonnell correlation (ASTM D1160 itself runs at about 1-50 mmHg)")
    if watson_k is not None and not (math.isfinite(watson_k) and 8.0 <= watson_k <= 14.0):
        raise ConversionError(f"Watson K must be a number between 8 and 14; got {watson_k}")
    q = maxwell_bonnell_q(pressure_mmhg)
    t = np.asarray(temp_c, dtype=float) + 273.15
    if np.any(t <= 0):
        raise ConversionError("a vacuum distillation temperature is below absolute zero")
    aet = 748.1 * q / (1.0 / t + 0.3861 * q - C_OFFSET) - 273.15
    if watson_k is not None and watson_k != 12.0:
        aet = aet + 1.3889 * watson_k_factor(aet) * (watson_k - 12.0) * math.log10(pressure_mmhg / 760.0)
    return as_scalar(aet)
