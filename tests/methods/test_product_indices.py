"""BMCI and hydrogen content against definitions and formulas outside the code.

BMCI: 0 for an n-paraffin and 100 for benzene by the index's definition (Smith 1940).  Hydrogen: the weight
fraction of hydrogen in a pure hydrocarbon's formula (arithmetic from the atomic masses 12.011 and 1.008):
n-paraffins within 6 %, the correlation's few-percent scatter (common practice, no source); aromatics, where a
correlation fitted on petroleum fractions errs most, within 10 % (a regression bound over the present 9 % of
toluene).  The correlation's accuracy on fractions is tested on the open assays (tests/model)."""

from __future__ import annotations

import pytest

from assaycut.methods.fraction_properties import bmci, hydrogen_riazi_ch


def test_bmci_is_zero_for_n_hexane_and_hundred_for_benzene():
    assert float(bmci(341.9 - 273.15, 0.6640)) == pytest.approx(0.0, abs=0.5)
    assert float(bmci(353.2 - 273.15, 0.8845)) == pytest.approx(100.0, abs=0.5)


@pytest.mark.parametrize("tb_k,sg,c,h,rel", [(341.9, 0.6640, 6, 14, 0.06), (447.3, 0.7342, 10, 22, 0.06),
                                             (616.9, 0.7920, 20, 42, 0.06), (383.8, 0.8718, 7, 8, 0.10)])
def test_hydrogen_of_pure_hydrocarbons(tb_k, sg, c, h, rel):
    mw = 12.011 * c + 1.008 * h
    expected = 100.0 * 1.008 * h / mw
    assert float(hydrogen_riazi_ch(tb_k - 273.15, sg, mw)) == pytest.approx(expected, rel=rel)


def test_the_cut_table_carries_bmci_hydrogen_and_n_plus_2a():
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import demo_assay_paths
    from assaycut.yields import run_yields

    r = run_yields(load_assay(demo_assay_paths()[1]), default_cut_set())
    rows = {x["name"]: x for x in r.cuts.rows()}
    assert 0 < rows["kerosene"]["bmci"] < 60 and 12 < rows["kerosene"]["hydrogen_wt_pct"] < 15
    assert "hydrogen_wt_pct" in rows["kerosene"]["estimated"]
    assert "n_plus_2a_vol_pct" not in r.cuts.keys  # Brannock's narrow cuts give aromatics but no naphthenes
    import numpy as np

    from assaycut.cutting.cut_qualities import add_indices

    cols = {"naphthenes_vol_pct": np.array([30.0]), "aromatics_vol_pct": np.array([10.0]),
            "estimated": {"aromatics_vol_pct": np.array([True])}}
    add_indices(cols)
    assert cols["n_plus_2a_vol_pct"].tolist() == [50.0] and cols["estimated"]["n_plus_2a_vol_pct"].tolist() == [True]
