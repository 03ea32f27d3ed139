"""Ideal-gas heat capacity of the pseudo-components (Lastovka & Shaw 2013, as a cubic in T) against the TRC
ideal-gas heat-capacity data of `chemicals` (Caleb Bell et al.; `chemicals.heat_capacity.TRC_gas_data`, the
TRC fits to measured and spectroscopic values), at 300-1000 K every 100 K, for the pure compounds of
test_critical_properties (Tb from `chemicals`, SG at 60 °F from Perry's DIPPR-105 fits).

Bounds:
- with each compound's hydrogen from its formula (the correlation as the pseudo-components use it), the
  n-alkanes and aromatics within 3 % on average: "a few percent", the accuracy Lastovka & Shaw state for
  hydrocarbons (from memory, not read from the paper); the measured mean is 0.9 %;
- through the pipeline (hydrogen estimated from Tb and SG by Riazi's CH form, M by Riazi-Daubert 1987), all
  19 compounds within 4 % on average: a regression bound over the measured 2.8 % (aromatics and naphthenes,
  for which the authors give a separate cyclic-aliphatic form we do not use on fractions, err most: 6-11 %).
"""

from __future__ import annotations

import numpy as np
import pytest

chemicals = pytest.importorskip("chemicals")
from chemicals import CAS_from_any, MW, Tb  # noqa: E402
from chemicals.elements import simple_formula_parser  # noqa: E402
from chemicals.heat_capacity import TRC_gas_data, TRCCp  # noqa: E402
from chemicals.identifiers import search_chemical  # noqa: E402

from assaycut.cutting.pseudo import hydrogen_of  # noqa: E402
from assaycut.methods.characterisation import mw_riazi_daubert_1987  # noqa: E402
from assaycut.methods.heat_capacity import cp_polynomial, similarity_variable  # noqa: E402
from tests.methods.test_critical_properties import COMPOUNDS, _sg60  # noqa: E402

T = np.arange(300.0, 1001.0, 100.0)


def _trc(cas: str) -> np.ndarray:
    r = TRC_gas_data.loc[cas]
    return np.array([TRCCp(t, *[r[f"a{i}"] for i in range(8)]) for t in T])


def _err(h, mw, ref) -> float:
    coef, _ = cp_polynomial(similarity_variable(h), mw)
    return float(np.mean(np.abs(np.polyval(coef[::-1], T) / ref - 1.0)) * 100.0)


def test_the_correlation_at_the_formula_hydrogen_is_within_a_few_percent():
    errs = []
    for name in COMPOUNDS:
        if name in ("cyclohexane", "trans-decalin"):
            continue
        cas = CAS_from_any(name)
        h = 100.0 * simple_formula_parser(search_chemical(name).formula)["H"] * 1.00794 / MW(cas)
        errs.append(_err(h, MW(cas), _trc(cas)))
    assert len(errs) == 17
    assert float(np.mean(errs)) <= 3.0, errs


def test_the_pipeline_from_tb_and_sg_stays_near_the_data():
    errs = []
    for name in COMPOUNDS:
        cas = CAS_from_any(name)
        tb, sg = Tb(cas) - 273.15, _sg60(cas)
        mw = float(mw_riazi_daubert_1987(tb, sg))
        h, _ = hydrogen_of({"pure": False, "mw": mw, "nbp_c": tb, "sg": sg})
        errs.append(_err(h, mw, _trc(cas)))
    assert float(np.mean(errs)) <= 4.0, errs


@pytest.mark.parametrize("name", ["C3", "iC4", "nC4", "nC5"])
def test_pure_light_ends_take_their_formula(name):
    from assaycut.model.lightends import find_component

    c = find_component(name)
    h, ok = hydrogen_of({"pure": True, "name": name})
    assert ok
    ref = _trc(c.cas)
    assert _err(h, c.mw, ref) <= 3.0
