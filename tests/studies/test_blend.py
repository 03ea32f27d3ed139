"""Blends of crudes: identities (a crude blended with itself), the gravity rule, Refutas and shrinkage."""

from __future__ import annotations

import json

import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from assaycut.errors import StudyError
from assaycut.io import load_assay
from assaycut.methods.blending_rules import (
    shrinkage_api_mpms_12_3,
    vbn_refutas,
    viscosity_from_vbn_refutas,
)
from assaycut.studies.blend import blend
from tests.helpers import cli_app, cli_error, cuts_of, sha256

runner = CliRunner()


@pytest.mark.parametrize("basis", ["vol", "wt"])
def test_blend_of_crude_with_itself_is_that_crude(demos, basis):
    # Identity: a 50/50 blend of a crude with itself is that crude, on both bases.
    a, m = demos[0]
    b = blend([(a, m, 50.0), (a, m, 50.0)], basis=basis)
    assert b.sg == pytest.approx(a.sg, rel=1e-12)
    assert b.sulfur_wt_pct == pytest.approx(a.sulfur_wt_pct, rel=1e-12)
    ca, cb = cuts_of(a), cuts_of(b)
    assert_allclose(cb["vol_pct"], ca["vol_pct"], atol=0.05)
    assert_allclose(cb["wt_pct"], ca["wt_pct"], atol=0.05)
    assert_allclose(cb["sg"], ca["sg"], atol=0.002)


def test_volume_blend_cut_volumes_are_weighted_sums(demos):
    # Identity (no shrinkage): cut volumes of a volume blend are the weighted sums of the parents' cut volumes,
    # for cut points inside the range every parent measured; the blend SG is the volume-weighted SG.
    (a1, m1), (a2, m2) = demos[0], demos[2]
    b = blend([(a1, m1, 30.0), (a2, m2, 70.0)], basis="vol")
    assert b.sg == pytest.approx(0.3 * a1.sg + 0.7 * a2.sg, rel=1e-12)  # API MPMS Ch. 11: SG blends by volume
    c1, c2, cb = cuts_of(a1), cuts_of(a2), cuts_of(b)
    inside = ["light ends", "light naphtha", "heavy naphtha", "kerosene", "diesel"]
    assert_allclose(cb.loc[inside, "vol_pct"], 0.3 * c1.loc[inside, "vol_pct"] + 0.7 * c2.loc[inside, "vol_pct"],
                    atol=0.01)
    w1 = 0.3 * a1.sg / b.sg
    assert b.sulfur_wt_pct == pytest.approx(w1 * a1.sulfur_wt_pct + (1 - w1) * a2.sulfur_wt_pct, rel=1e-12)


def test_blend_carries_the_narrow_cut_qualities_by_their_rules(demos):
    # Mass balance (identity): the blend's nitrogen (mass-additive) over the whole crude is the parents'
    # weight-weighted nitrogen; a blend of a crude with itself keeps its cuts' nitrogen (within the blend's
    # 0.05 vol % resampling of the curve, as the yields above).
    (a1, m1), (a2, m2) = demos[0], demos[2]
    b = blend([(a1, m1, 30.0), (a2, m2, 70.0)], basis="vol")
    assert "nitrogen_wt_ppm" in b.narrow_cuts.extras
    n_parents = [(cuts_of(a)["wt_pct"] * cuts_of(a)["nitrogen_wt_ppm"]).sum() / 100.0 for a in (a1, a2)]
    w1 = 0.3 * a1.sg / b.sg
    cb = cuts_of(b)
    assert (cb["wt_pct"] * cb["nitrogen_wt_ppm"]).sum() / 100.0 == pytest.approx(
        w1 * n_parents[0] + (1 - w1) * n_parents[1], rel=0.01)
    same = cuts_of(blend([(a1, m1, 50.0), (a1, m1, 50.0)], basis="vol"))
    assert_allclose(same.loc["diesel", "nitrogen_wt_ppm"], cuts_of(a1).loc["diesel", "nitrogen_wt_ppm"], rtol=0.01)


def test_weight_blend_gravity_rule(demos):
    # API MPMS Ch. 11 volume rule on a mass basis: 1/SG = Σ w_i / SG_i (never an average of API numbers).
    (a1, m1), (a2, m2) = demos[0], demos[1]
    b = blend([(a1, m1, 40.0), (a2, m2, 60.0)], basis="wt")
    assert 1.0 / b.sg == pytest.approx(0.4 / a1.sg + 0.6 / a2.sg, rel=1e-12)


def test_blend_shares_must_add_to_100(demos):
    (a1, m1), (a2, m2) = demos[0], demos[1]
    with pytest.raises(StudyError, match=r"the shares add up to 90 %, not 100 %: Selkie Light 40 \+ Brannock Blend 50"):
        blend([(a1, m1, 40.0), (a2, m2, 50.0)])


def test_blend_cli_writes_readable_assay_with_parents(tmp_path, demo_paths):
    out = tmp_path / "mix.xlsx"
    r = runner.invoke(cli_app(), ["blend", f"{demo_paths[0]}=60", f"{demo_paths[1]}=40", "--out", str(out)])
    assert r.exit_code == 0, r.stderr
    a = load_assay(str(out))
    assert any(sha256(demo_paths[0]) in n and sha256(demo_paths[1]) in n for n in a.notes)
    r = runner.invoke(cli_app(), ["check", str(out), "--json"])
    assert json.loads(r.stdout)["ok"] is True
    cli_error(["blend", f"{demo_paths[0]}=60", f"{demo_paths[1]}=30", "--out", str(tmp_path / "x.xlsx")],
              r"the shares add up to 90 %, not 100 %")
    cli_error(["blend", f"{demo_paths[0]}=60", "--out", str(tmp_path / "x.csv")], r"path ending in .xlsx")



def test_refutas_and_shrinkage():
    # Maples (2000) Refutas: blending two oils of the same viscosity returns that viscosity (identity).
    assert viscosity_from_vbn_refutas(0.3 * vbn_refutas(12.0) + 0.7 * vbn_refutas(12.0)) == pytest.approx(12.0, rel=1e-12)
    # API MPMS 12.3 form (coefficients from memory): no gravity difference, no shrinkage; it grows with it.
    assert shrinkage_api_mpms_12_3(40.0, 0.0) == 0.0
    assert 0 < shrinkage_api_mpms_12_3(40.0, 10.0) < shrinkage_api_mpms_12_3(40.0, 20.0) < 2.0
