"""The pseudo-component correlations on pure compounds given as one-component "slices": their Tc, Pc and
acentric factor against the critical-constant databases of `chemicals` (Caleb Bell et al., the Chemical
Engineering Design Library), from each compound's Tb (`chemicals`) and SG at 60 °F.

The SG is the liquid density at 60 °F (288.706 K) of the DIPPR-105 fits to measured densities in Perry's
Handbook, 8th ed. (as tabulated in `chemicals.volume`), divided by water's 999.016 kg/m³ (API MPMS 11.1).
trans-Decalin has no such fit there: its SG is the COSTALD estimate from `chemicals`' own constants.

The bounds are the average absolute errors the correlations are known for on pure hydrocarbons, as recalled
from Riazi, *Characterization and Properties of Petroleum Fractions*, ASTM MNL50 (2005), ch. 2 (from memory,
not read from the book; rounded up to one digit): Tc 1 %, Pc 5 %, acentric factor 15 % (Edmister's and
Kesler-Lee's forms on these compounds) or 10 % (Lee-Kesler on Twu's constants), molar mass 3 % (Riazi-Daubert,
Twu) or 8 % (Kesler-Lee), Vc 5 %.  The measured errors are in the README's pseudo-components section.
"""

from __future__ import annotations

import numpy as np
import pytest

chemicals = pytest.importorskip("chemicals")
from chemicals import CAS_from_any, MW, Pc, Tb, Tc, Vc, omega  # noqa: E402
import chemicals.volume as volume  # noqa: E402

from assaycut.methods.critical_properties import characterise, omega_lee_kesler  # noqa: E402

COMPOUNDS = ["n-hexane", "n-heptane", "n-octane", "n-nonane", "n-decane", "n-undecane", "n-dodecane",
             "n-tridecane", "n-tetradecane", "n-pentadecane", "n-hexadecane", "n-heptadecane", "n-octadecane",
             "n-nonadecane", "n-eicosane", "benzene", "toluene", "cyclohexane", "trans-decalin"]
T_60F = 288.70556  # K


def _sg60(cas: str) -> float:
    if cas in volume.rho_data_Perry_8E_105_l.index:
        r = volume.rho_data_Perry_8E_105_l.loc[cas]
        rho = r.C1 / r.C2 ** (1 + (1 - T_60F / r.C3) ** r.C4)  # mol/m³ (DIPPR 105)
        return rho * MW(cas) / 1000.0 / 999.016
    vm = volume.COSTALD(T_60F, Tc(cas), Vc(cas), omega(cas))  # m³/mol
    return MW(cas) / 1000.0 / vm / 999.016


@pytest.fixture(scope="module")
def data():
    rows = []
    for n in COMPOUNDS:
        c = CAS_from_any(n)
        rows.append((n, Tb(c), _sg60(c), Tc(c), Pc(c) / 1e5, omega(c), MW(c), Vc(c) * 1000.0))
    return rows


BOUNDS = {"riazi-daubert-1987": {"tc_k": 1.0, "pc_bar": 5.0, "omega": 15.0, "mw": 3.0, "vc_m3_kmol": 5.0},
          "kesler-lee-1976": {"tc_k": 1.0, "pc_bar": 5.0, "omega": 15.0, "mw": 8.0, "vc_m3_kmol": 5.0},
          "twu-1984": {"tc_k": 1.0, "pc_bar": 5.0, "omega": 10.0, "mw": 3.0, "vc_m3_kmol": 5.0}}


def errors(data, method):
    ref = {"tc_k": 3, "pc_bar": 4, "omega": 5, "mw": 6, "vc_m3_kmol": 7}
    out = {k: [] for k in ref}
    for row in data:
        got = characterise(row[1], row[2], method)
        for k, i in ref.items():
            out[k].append(abs(float(got[k]) / row[i] - 1.0) * 100.0)
    return {k: float(np.mean(v)) for k, v in out.items()}


@pytest.mark.parametrize("method", sorted(BOUNDS))
def test_each_method_stays_within_its_published_average_error_on_pure_compounds(data, method):
    aad = errors(data, method)
    for k, bound in BOUNDS[method].items():
        assert aad[k] <= bound, (method, k, round(aad[k], 2))


def test_the_lee_kesler_acentric_factor_is_the_form_chemicals_implements(data):
    from chemicals.acentric import LK_omega

    for _, tb, _, tc, pc, *_ in data:
        assert float(omega_lee_kesler(tb, tc, pc)) == pytest.approx(LK_omega(tb, tc, pc * 1e5), rel=1e-9)


def test_the_light_end_table_holds_the_constants_of_chemicals():
    from assaycut.model.lightends import COMPONENTS

    for c in COMPONENTS:
        assert c.tc_k == pytest.approx(Tc(c.cas), abs=0.01)
        assert c.pc_bar == pytest.approx(Pc(c.cas) / 1e5, abs=0.001)
        assert c.omega == pytest.approx(omega(c.cas), abs=1e-4)
        assert c.vc_m3_kmol == pytest.approx(Vc(c.cas) * 1000.0, abs=1e-5)
