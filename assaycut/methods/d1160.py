"""Vacuum distillation (ASTM D1160) temperatures to the atmospheric equivalent temperature, Maxwell-Bonnell.

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
from ..units import as_scalar


def vacuum_to_aet_maxwell_bonnell(temp_c, pressure_mmhg: float, watson_k: float | None = None):
    """Vacuum distillation temperature to atmospheric equivalent temperature (AET), Maxwell-Bonnell [1]_.

    .. math::
        T' = \\frac{748.1\\,Q}{1/T + 0.3861\\,Q - 0.00051606}\\quad[K]

    with Q from the pressure P [mmHg] [2]_:
    P < 2: Q = (6.761560 - 0.987672 log P)/(3000.538 - 43 log P);
    2 <= P < 760: Q = (5.994296 - 0.972546 log P)/(2663.129 - 95.76 log P);
    P >= 760: Q = (6.412631 - 0.989679 log P)/(2770.085 - 36 log P).

    Parameters
    ----------
    temp_c : float or array_like
        Observed vapour temperature at pressure P. [°C]
    pressure_mmhg : float
        Absolute pressure of the distillation. [mmHg]
    watson_k : float, optional
        Watson K of the material; None (default, and what the yield reports use) applies no correction,
        which is the ASTM D1160 form [4]_. [-]

    Returns
    -------
    float or numpy.ndarray
        Atmospheric equivalent temperature. [°C]

    Notes
    -----
    Valid range: petroleum fractions distilled at about 0.1-760 mmHg [2]_.  With ``watson_k`` this function
    applies Tb = T' - 1.3889 f (Kw - 12) log10(P/760) in °R (f = 0 below Tb 200 °F, 1 above 400 °F, linear
    between).  That term is under review: API TDB 5A1.19 [2]_ gives it with the opposite sign, in K; do not
    rely on the correction until it is settled.

    References
    ----------
    .. [1] Maxwell & Bonnell, Ind. Eng. Chem. 49 (1957) 1187.
    .. [2] API Technical Data Book, Procedure 5A1.19.
    .. [4] ASTM D1160, annex.

    Examples
    --------
    No printed example is at hand; computed from the equations by hand: 200 °C observed at 10 mmHg is
    348.8 °C AET.

    >>> round(float(vacuum_to_aet_maxwell_bonnell(200.0, 10.0)), 1)
    348.8
    """
    if not (pressure_mmhg > 0 and math.isfinite(pressure_mmhg)):
        raise ConversionError(f"pressure must be a positive number of mmHg; got {pressure_mmhg}")
    lp = math.log10(pressure_mmhg)
    if pressure_mmhg < 2:
        q = (6.761560 - 0.987672 * lp) / (3000.538 - 43.0 * lp)
    elif pressure_mmhg < 760:
        q = (5.994296 - 0.972546 * lp) / (2663.129 - 95.76 * lp)
    else:
        q = (6.412631 - 0.989679 * lp) / (2770.085 - 36.0 * lp)
    t = np.asarray(temp_c, dtype=float) + 273.15
    if np.any(t <= 0):
        raise ConversionError("a vacuum distillation temperature is below absolute zero")
    aet = 748.1 * q / (1.0 / t + 0.3861 * q - 0.00051606)
    if watson_k is not None and watson_k != 12.0:
        tr = aet * 1.8
        f = np.clip((tr - 659.7) / 200.0, 0.0, 1.0)
        tr = tr - 1.3889 * f * (watson_k - 12.0) * math.log10(pressure_mmhg / 760.0)
        aet = tr / 1.8
    out = aet - 273.15
    return as_scalar(out)
