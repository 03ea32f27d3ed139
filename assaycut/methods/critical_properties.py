"""Critical properties, molar mass and acentric factor of a petroleum fraction from its normal boiling point and
specific gravity: the correlations a process simulator's pseudo-components take.

Every function works on numbers or numpy arrays (one fraction is an array of one).  Tb is the normal boiling
point, SG the specific gravity 60/60 °F.  Ranges are those the authors fitted; a value outside is computed and
flagged by the caller (:func:`in_range`).

Sources (the forms and constants as printed there; where a constant is recalled rather than read, it says so):

- Riazi & Daubert 1987, Ind. Eng. Chem. Res. 26, 755-759; the same constants in Riazi, *Characterization and
  Properties of Petroleum Fractions*, ASTM MNL50 (2005), Eq. 2.38 and Table 2.5.
- Kesler & Lee 1976, Hydrocarbon Processing 55(3), 153-158 (Tc, Pc, M, ω for Tbr > 0.8).
- Lee & Kesler 1975, AIChE J. 21, 510-527 (the vapour-pressure form of ω, for Tbr <= 0.8).
- Edmister 1958, Petroleum Refiner 37(4), 173-179 (ω).
- Twu 1984, Fluid Phase Equilibria 16, 137-150 (Tc, Pc, Vc, M by perturbation of the n-alkane reference).
- Pitzer et al. 1955, J. Am. Chem. Soc. 77, 3433 (Zc = 0.2905 - 0.085 ω, for the Vc of the methods that give
  none).
"""

from __future__ import annotations

import numpy as np

from .characterisation import mw_riazi_daubert_1987, watson_k

R_BAR_M3_KMOL_K = 0.0831446
"""Gas constant. [bar·m³/(kmol·K)]"""
PSIA_PER_BAR = 14.503774
"""psia in one bar."""
ATM_BAR = 1.01325
"""One standard atmosphere. [bar]"""
FT3_LBMOL_IN_M3_KMOL = 0.0624280
"""One ft³/lbmol in m³/kmol."""

RANGES = {
    "riazi-daubert-1987": ((300.0, 850.0), (0.6, 1.0)),
    "kesler-lee-1976": ((300.0, 950.0), (0.6, 1.1)),
    "twu-1984": ((300.0, 990.0), (0.6, 1.4)),
}
"""The Tb [K] and SG ranges of each method's data (Riazi MNL50 (2005) ch. 2, recalled from memory)."""


def in_range(method: str, tb_k, sg) -> np.ndarray:
    """Whether (Tb [K], SG) lie inside the fitted range of ``method`` (:data:`RANGES`)."""
    (t0, t1), (s0, s1) = RANGES[method]
    tb, s = np.asarray(tb_k, float), np.asarray(sg, float)
    return (tb >= t0) & (tb <= t1) & (s >= s0) & (s <= s1)


def _rd(a, b, c, d, e, f, tb, sg):
    return a * tb ** b * sg ** c * np.exp(d * tb + e * sg + f * tb * sg)


def riazi_daubert_1987(tb_k, sg) -> dict[str, np.ndarray]:
    """Tc [K], Pc [bar] and M [g/mol] of a fraction by Riazi & Daubert 1987.

    .. math:: \\theta = a\\,T_b^{b}\\,SG^{c}\\exp(d\\,T_b + e\\,SG + f\\,T_b SG),\\quad T_b \\text{ in K}

    ===== ========== ======== ======== =========== ========= ==========
    θ      a          b        c        d           e         f
    ===== ========== ======== ======== =========== ========= ==========
    Tc     9.5233     0.81067  0.53691  -9.314e-4   -0.544442 6.4791e-4
    Pc     3.1958e5   -0.4844  4.0846   -8.505e-3   -4.8014   5.749e-3
    ===== ========== ======== ======== =========== ========= ==========

    M by the same form, :func:`~assaycut.methods.characterisation.mw_riazi_daubert_1987` (API TDB 2B2.1).

    Range: Tb about 300-850 K, SG 0.6-1.0 (M: 70-700 g/mol).  Source: Riazi MNL50 (2005) Eq. 2.38, Table 2.5
    for Tc and Pc, Eq. 2.50 (API TDB 2B2.1) for M (constants recalled from memory, checked by the
    pure-compound tests against ``chemicals``).

    Examples
    --------
    n-decane (Tb 447.3 K, SG 0.7342):

    >>> r = riazi_daubert_1987(447.3, 0.7342)
    >>> round(float(r["tc_k"]), 1), round(float(r["pc_bar"]), 2)
    (621.4, 20.39)
    """
    tb, s = np.asarray(tb_k, float), np.asarray(sg, float)
    return {"tc_k": _rd(9.5233, 0.81067, 0.53691, -9.314e-4, -0.544442, 6.4791e-4, tb, s),
            "pc_bar": _rd(3.1958e5, -0.4844, 4.0846, -8.505e-3, -4.8014, 5.749e-3, tb, s),
            "mw": np.asarray(mw_riazi_daubert_1987(tb - 273.15, s), float)}


def kesler_lee_1976(tb_k, sg) -> dict[str, np.ndarray]:
    """Tc [K], Pc [bar] and M [g/mol] of a fraction by Kesler & Lee 1976 (Tb in °R in the forms).

    .. math::
        T_c = 341.7 + 811\\,SG + (0.4244 + 0.1174\\,SG)\\,T_b + (0.4669 - 3.2623\\,SG)\\,10^5/T_b

        \\ln P_c = 8.3634 - 0.0566/SG - (0.24244 + 2.2898/SG + 0.11857/SG^2)\\,10^{-3} T_b
                  + (1.4685 + 3.648/SG + 0.47227/SG^2)\\,10^{-7} T_b^2
                  - (0.42019 + 1.6977/SG^2)\\,10^{-10} T_b^3

        M = -12272.6 + 9486.4\\,SG + (4.6523 - 3.3287\\,SG)\\,T_b
            + (1 - 0.77084\\,SG - 0.02058\\,SG^2)(1.3437 - 720.79/T_b)\\,10^7/T_b
            + (1 - 0.80882\\,SG + 0.02226\\,SG^2)(1.8828 - 181.98/T_b)\\,10^{12}/T_b^3

    with Tc in °R and Pc in psia.  Range: Tb up to about 1200 °F (M 60-650).  Source: Kesler & Lee 1976, as
    printed in Riazi MNL50 (2005) Eqs. 2.40 and 2.69-2.70 (recalled from memory; checked against ``chemicals``).

    Examples
    --------
    n-decane (Tb 447.3 K, SG 0.7342):

    >>> r = kesler_lee_1976(447.3, 0.7342)
    >>> round(float(r["tc_k"]), 1), round(float(r["pc_bar"]), 2)
    (616.0, 20.42)
    """
    tb = np.asarray(tb_k, float) * 1.8
    s = np.asarray(sg, float)
    tc_r = 341.7 + 811.0 * s + (0.4244 + 0.1174 * s) * tb + (0.4669 - 3.2623 * s) * 1e5 / tb
    ln_pc = (8.3634 - 0.0566 / s - (0.24244 + 2.2898 / s + 0.11857 / s ** 2) * 1e-3 * tb
             + (1.4685 + 3.648 / s + 0.47227 / s ** 2) * 1e-7 * tb ** 2
             - (0.42019 + 1.6977 / s ** 2) * 1e-10 * tb ** 3)
    mw = (-12272.6 + 9486.4 * s + (4.6523 - 3.3287 * s) * tb
          + (1 - 0.77084 * s - 0.02058 * s ** 2) * (1.3437 - 720.79 / tb) * 1e7 / tb
          + (1 - 0.80882 * s + 0.02226 * s ** 2) * (1.8828 - 181.98 / tb) * 1e12 / tb ** 3)
    return {"tc_k": tc_r / 1.8, "pc_bar": np.exp(ln_pc) / PSIA_PER_BAR, "mw": mw}


def _twu_mw_reference(tb_r):
    """M of the n-alkane of normal boiling point Tb [°R] (Twu 1984, solved by Newton's method on ln M)."""
    theta = np.log(np.maximum(tb_r / (10.44 - 0.0052 * tb_r), 20.0))  # Twu's own starting value
    for _ in range(50):
        f = np.exp(5.71419 + 2.71579 * theta - 0.286590 * theta ** 2 - 39.8544 / theta - 0.122488 / theta ** 2) \
            - 24.7522 * theta + 35.3155 * theta ** 2 - tb_r
        df = (np.exp(5.71419 + 2.71579 * theta - 0.286590 * theta ** 2 - 39.8544 / theta - 0.122488 / theta ** 2)
              * (2.71579 - 2 * 0.286590 * theta + 39.8544 / theta ** 2 + 2 * 0.122488 / theta ** 3)
              - 24.7522 + 2 * 35.3155 * theta)
        step = f / df
        theta = theta - step
        if np.all(np.abs(step) < 1e-12):
            break
    return np.exp(theta)


def twu_1984(tb_k, sg) -> dict[str, np.ndarray]:
    """Tc [K], Pc [bar], Vc [m³/kmol] and M [g/mol] of a fraction by Twu 1984: the n-alkane of the same Tb as
    reference (its Tc°, Pc°, Vc°, SG° and M° from Tb alone), perturbed by the fraction's SG.

    Reference (Tb in °R, α = 1 − Tb/Tc°):

    .. math::
        T_c^\\circ = T_b\\,(0.533272 + 0.191017\\,10^{-3} T_b + 0.779681\\,10^{-7} T_b^2
                    - 0.284376\\,10^{-10} T_b^3 + 0.959468\\,10^{28}/T_b^{13})^{-1}

        P_c^\\circ = (3.83354 + 1.19629\\,\\alpha^{1/2} + 34.8888\\,\\alpha + 36.1952\\,\\alpha^2
                    + 104.193\\,\\alpha^4)^2 \\;[psia]

        V_c^\\circ = [1 - (0.419869 - 0.505839\\,\\alpha - 1.56436\\,\\alpha^3 - 9481.70\\,\\alpha^{14})]^{-8}
                    \\;[ft^3/lbmol]

        SG^\\circ = 0.843593 - 0.128624\\,\\alpha - 3.36159\\,\\alpha^3 - 13749.5\\,\\alpha^{12}

    and M° from :math:`T_b = \\exp(5.71419 + 2.71579\\,\\theta - 0.286590\\,\\theta^2 - 39.8544/\\theta
    - 0.122488/\\theta^2) - 24.7522\\,\\theta + 35.3155\\,\\theta^2`, θ = ln M°.  Perturbation: each property
    takes the factor ((1 + 2f)/(1 − 2f))² with f from ΔSG = exp(k (SG° − SG)) − 1 (k = 5 for Tc and M, 0.5
    for Pc; ΔSG_V = exp(4 (SG°² − SG²)) − 1 for Vc).  Range: Tb up to about 1340 °F.  Source: Twu 1984, the
    forms as reprinted in Riazi MNL50 (2005) Eqs. 2.80-2.89 (recalled from memory; checked against
    ``chemicals``).

    Examples
    --------
    >>> r = twu_1984(447.3, 0.7342)  # n-decane
    >>> round(float(r["tc_k"]), 0), round(float(r["mw"]), 0)
    (619.0, 142.0)
    """
    tb = np.asarray(tb_k, float) * 1.8
    s = np.asarray(sg, float)
    tc0 = tb / (0.533272 + 0.191017e-3 * tb + 0.779681e-7 * tb ** 2 - 0.284376e-10 * tb ** 3
                + 0.959468e28 / tb ** 13)
    a = np.maximum(1.0 - tb / tc0, 0.0)  # the reference fails above its range (flagged by in_range)
    pc0 = (3.83354 + 1.19629 * a ** 0.5 + 34.8888 * a + 36.1952 * a ** 2 + 104.193 * a ** 4) ** 2
    vc0 = (1.0 - (0.419869 - 0.505839 * a - 1.56436 * a ** 3 - 9481.70 * a ** 14)) ** -8
    sg0 = 0.843593 - 0.128624 * a - 3.36159 * a ** 3 - 13749.5 * a ** 12
    m0 = _twu_mw_reference(tb)
    rt = tb ** 0.5

    def factor(f):
        return ((1 + 2 * f) / (1 - 2 * f)) ** 2

    dt = np.exp(5.0 * (sg0 - s)) - 1.0
    tc = tc0 * factor(dt * (-0.362456 / rt + (0.0398285 - 0.948125 / rt) * dt))
    dv = np.exp(4.0 * (sg0 ** 2 - s ** 2)) - 1.0
    vc = vc0 * factor(dv * (0.466590 / rt + (-0.182421 + 3.01721 / rt) * dv))
    dp = np.exp(0.5 * (sg0 - s)) - 1.0
    fp = dp * ((2.53262 - 46.1955 / rt - 0.00127885 * tb) + (-11.4277 + 252.140 / rt + 0.00230535 * tb) * dp)
    pc = pc0 * (tc / tc0) * (vc0 / vc) * factor(fp)
    dm = np.exp(5.0 * (sg0 - s)) - 1.0
    x = np.abs(0.0123420 - 0.244541 / rt)
    mw = np.exp(np.log(m0) * factor(dm * (x + (-0.0175691 + 0.143979 / rt) * dm)))
    return {"tc_k": tc / 1.8, "pc_bar": pc / PSIA_PER_BAR, "vc_m3_kmol": vc * FT3_LBMOL_IN_M3_KMOL, "mw": mw}


def omega_lee_kesler(tb_k, tc_k, pc_bar) -> np.ndarray:
    """Acentric factor by the Lee–Kesler vapour-pressure form (Lee & Kesler 1975), Tbr = Tb/Tc, Pc in atm:

    .. math:: \\omega = \\frac{-\\ln P_c - 5.92714 + 6.09648/T_{br} + 1.28862 \\ln T_{br} - 0.169347\\,T_{br}^6}
              {15.2518 - 15.6875/T_{br} - 13.4721 \\ln T_{br} + 0.43577\\,T_{br}^6}

    For Tbr <= 0.8 (Kesler & Lee 1976 use :func:`omega_kesler_lee` above).  The same form as
    ``chemicals.acentric.LK_omega``, which the tests compare.
    """
    tbr = np.asarray(tb_k, float) / np.asarray(tc_k, float)
    pc = np.asarray(pc_bar, float) / ATM_BAR
    return ((-np.log(pc) - 5.92714 + 6.09648 / tbr + 1.28862 * np.log(tbr) - 0.169347 * tbr ** 6)
            / (15.2518 - 15.6875 / tbr - 13.4721 * np.log(tbr) + 0.43577 * tbr ** 6))


def omega_kesler_lee(tb_k, tc_k, sg) -> np.ndarray:
    """Acentric factor of a heavy fraction (Tbr > 0.8) by Kesler & Lee 1976, Kw the Watson K:

    .. math:: \\omega = -7.904 + 0.1352\\,K_w - 0.007465\\,K_w^2 + 8.359\\,T_{br} + (1.408 - 0.01063\\,K_w)/T_{br}
    """
    tbr = np.asarray(tb_k, float) / np.asarray(tc_k, float)
    kw = np.asarray(watson_k(np.asarray(tb_k, float) - 273.15, sg), float)
    return -7.904 + 0.1352 * kw - 0.007465 * kw ** 2 + 8.359 * tbr + (1.408 - 0.01063 * kw) / tbr


def omega_kesler_lee_1976(tb_k, tc_k, pc_bar, sg) -> np.ndarray:
    """The Kesler–Lee acentric factor: :func:`omega_lee_kesler` where Tbr <= 0.8, else
    :func:`omega_kesler_lee`."""
    tbr = np.asarray(tb_k, float) / np.asarray(tc_k, float)
    return np.where(tbr <= 0.8, omega_lee_kesler(tb_k, tc_k, pc_bar), omega_kesler_lee(tb_k, tc_k, sg))


def omega_edmister(tb_k, tc_k, pc_bar) -> np.ndarray:
    """Acentric factor by Edmister 1958:

    .. math:: \\omega = \\frac{3}{7}\\,\\frac{\\log_{10}(P_c/1\\,atm)}{T_c/T_b - 1} - 1

    Examples
    --------
    >>> round(float(omega_edmister(447.3, 617.7, 21.03)), 3)  # n-decane, chemicals' Tc and Pc
    0.482
    """
    return 3.0 / 7.0 * np.log10(np.asarray(pc_bar, float) / ATM_BAR) / (np.asarray(tc_k, float)
                                                                       / np.asarray(tb_k, float) - 1.0) - 1.0


def zc_pitzer(omega) -> np.ndarray:
    """Critical compressibility from the acentric factor, Zc = 0.2905 − 0.085 ω (Pitzer et al. 1955)."""
    return 0.2905 - 0.085 * np.asarray(omega, float)


def vc_from_zc(zc, tc_k, pc_bar) -> np.ndarray:
    """Critical molar volume Vc = Zc R Tc / Pc. [m³/kmol]"""
    return np.asarray(zc, float) * R_BAR_M3_KMOL_K * np.asarray(tc_k, float) / np.asarray(pc_bar, float)


METHODS = ("riazi-daubert-1987", "kesler-lee-1976", "twu-1984")
"""The names ``pseudo --method`` takes."""


def characterise(tb_k, sg, method: str = "riazi-daubert-1987") -> dict[str, np.ndarray]:
    """Every simulator constant of fractions of normal boiling point ``tb_k`` [K] and specific gravity ``sg``
    by one named method: tc_k [K], pc_bar [bar], mw [g/mol], omega [-], vc_m3_kmol [m³/kmol], zc [-],
    watson_k [-] and in_range (inside the method's data).

    - 'riazi-daubert-1987': Tc, Pc, M by Riazi–Daubert 1987; ω by Edmister 1958; Vc from Zc (Pitzer).
    - 'kesler-lee-1976': Tc, Pc, M and ω by Kesler–Lee 1976 (Lee–Kesler vapour-pressure ω for Tbr <= 0.8);
      Vc from Zc (Pitzer).
    - 'twu-1984': Tc, Pc, Vc and M by Twu 1984; ω by Lee–Kesler (vapour-pressure form).
    """
    tb, s = np.asarray(tb_k, float), np.asarray(sg, float)
    if method == "riazi-daubert-1987":
        out = riazi_daubert_1987(tb, s)
        out["omega"] = omega_edmister(tb, out["tc_k"], out["pc_bar"])
    elif method == "kesler-lee-1976":
        out = kesler_lee_1976(tb, s)
        out["omega"] = omega_kesler_lee_1976(tb, out["tc_k"], out["pc_bar"], s)
    elif method == "twu-1984":
        out = twu_1984(tb, s)
        out["omega"] = omega_lee_kesler(tb, out["tc_k"], out["pc_bar"])
    else:
        raise ValueError(f"unknown method {method!r}; expected one of {', '.join(METHODS)}")
    if "vc_m3_kmol" in out:
        out["zc"] = out["pc_bar"] * out["vc_m3_kmol"] / (R_BAR_M3_KMOL_K * out["tc_k"])
    else:
        out["zc"] = zc_pitzer(out["omega"])
        out["vc_m3_kmol"] = vc_from_zc(out["zc"], out["tc_k"], out["pc_bar"])
    out["watson_k"] = np.asarray(watson_k(tb - 273.15, s), float)
    out["in_range"] = in_range(method, tb, s)
    return out
