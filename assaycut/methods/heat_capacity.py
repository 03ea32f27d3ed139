"""Ideal-gas heat capacity of pure hydrocarbons and petroleum fractions, and the polynomial a simulator takes.

Lastovka & Shaw (2013) correlate the ideal-gas heat capacity of hydrocarbons with one similarity variable, the
number of atoms per unit mass, α = Σ ν_i / M [mol/g]; for a fraction of known hydrogen content (carbon the
rest; sulfur, nitrogen and oxygen neglected) that is α = (w_H / 1.00794 + w_C / 12.0107) / 100.  The
correlation is evaluated by the ``chemicals`` package (Bell et al., :func:`chemicals.heat_capacity.Lastovka_Shaw`,
its constants as published) and fitted, over :data:`T_RANGE_K`, by a cubic in T, the form simulators accept.

References
----------
Lastovka, V., Shaw, J. M., "Predictive correlations for ideal gas heat capacities of pure hydrocarbons and
petroleum fractions", Fluid Phase Equilibria 356 (2013) 338-370.

Contents
--------
- :func:`similarity_variable`: Atoms per gram of a hydrocarbon of given hydrogen content
- :func:`cp_ideal_gas`: Ideal-gas heat capacity by Lastovka-Shaw (2013)
- :func:`cp_polynomial`: Cubic coefficients of the ideal-gas heat capacity over a temperature range
- constants: ``T_RANGE_K``, ``H_G_MOL``, ``C_G_MOL``
"""

from __future__ import annotations

import numpy as np

__all__ = ["similarity_variable", "cp_ideal_gas", "cp_polynomial", "T_RANGE_K", "H_G_MOL", "C_G_MOL"]

T_RANGE_K = (300.0, 1000.0)
"""Temperature range of the fitted polynomial: ambient to furnace outlet and cracking temperatures, inside the
200-1500 K of the ideal-gas data the correlation was fitted on (our choice). [K]"""
H_G_MOL, C_G_MOL = 1.00794, 12.0107
"""Atomic masses of hydrogen and carbon (IUPAC). [g/mol]"""


def similarity_variable(hydrogen_wt_pct):
    """Atoms per gram of a hydrocarbon of hydrogen content ``hydrogen_wt_pct`` [wt %], carbon the rest:

    .. math:: \\alpha = (w_H / 1.00794 + (100 - w_H) / 12.0107) / 100 \\quad [mol/g]

    Examples
    --------
    n-Decane, C10H22 (15.59 wt % hydrogen): 32 atoms in 142.28 g/mol, 0.22491 mol/g.

    >>> round(float(similarity_variable(100 * 22 * 1.00794 / (10 * 12.0107 + 22 * 1.00794))), 5)
    0.22491
    """
    w = np.asarray(hydrogen_wt_pct, dtype=float)
    return (w / H_G_MOL + (100.0 - w) / C_G_MOL) / 100.0


def cp_ideal_gas(t_k, alpha, mw):
    """Ideal-gas heat capacity Cp° [J/(mol·K)] by Lastovka & Shaw (2013), the form for hydrocarbons other than
    cyclic aliphatics (the one for fractions), through ``chemicals``:

    .. math::
        C_p^0/M = A_2 + \\frac{A_1 - A_2}{1 + e^{(\\alpha - A_3)/A_4}}
            + \\sum_{i=1}^{2} (B_{i1} + B_{i2}\\alpha) \\left(\\frac{C_{i1} + C_{i2}\\alpha}{T}\\right)^2
            \\frac{e^{-(C_{i1} + C_{i2}\\alpha)/T}}{(1 - e^{-(C_{i1} + C_{i2}\\alpha)/T})^2}

    Parameters
    ----------
    t_k : array_like
        Temperature. [K]
    alpha : float
        Similarity variable (:func:`similarity_variable`). [mol/g]
    mw : float
        Molar mass. [g/mol]

    Notes
    -----
    The authors' data span about 200-1500 K and α 0.14-0.23 mol/g (from memory); their stated deviation for
    fractions is a few percent.  Against the TRC ideal-gas data in ``chemicals`` for n-alkanes and aromatics,
    with the hydrogen content estimated from Tb and SG, it errs by the figures in the README (tested).

    Examples
    --------
    n-Decane at 1000 K (the ``chemicals`` docstring example):

    >>> round(float(cp_ideal_gas(1000.0, 0.22491, 142.28)), 1)
    530.7
    """
    from chemicals.heat_capacity import Lastovka_Shaw

    t = np.atleast_1d(np.asarray(t_k, dtype=float))
    out = np.array([Lastovka_Shaw(float(x), float(alpha), False, float(mw)) for x in t])
    return out if np.ndim(t_k) else float(out[0])


def cp_polynomial(alpha, mw, t_range_k=T_RANGE_K, points: int = 30):
    """Coefficients (a, b, c, d) of Cp° = a + b T + c T² + d T³ [J/(mol·K), T in K], fitted by least squares on
    the relative deviation to :func:`cp_ideal_gas` at ``points`` temperatures spread evenly over ``t_range_k``,
    and the fit's largest relative deviation there (under 1 % over 300-1000 K for α 0.15-0.23 and M 44-400,
    checked).

    Returns
    -------
    (numpy.ndarray, float)
        The four coefficients, and the largest |fit / correlation - 1| at the fitted points. [-]

    Examples
    --------
    n-Decane: the cubic reproduces the correlation over 300-1000 K within 1 % (530.7 J/(mol·K) at 1000 K).

    >>> coef, dev = cp_polynomial(0.22491, 142.28)
    >>> bool(dev < 0.01), abs(float(np.polyval(coef[::-1], 1000.0)) / 530.744 - 1) < 0.01
    (True, True)
    """
    t = np.linspace(t_range_k[0], t_range_k[1], points)
    cp = cp_ideal_gas(t, alpha, mw)
    x = t / 1000.0  # scaled for conditioning; coefficients rescaled below
    c = np.polyfit(x, cp, 3, w=1.0 / cp)[::-1]
    coef = c / np.array([1.0, 1e3, 1e6, 1e9])
    fit = np.polyval(coef[::-1], t)
    return coef, float(np.max(np.abs(fit / cp - 1.0)))
