"""Crude compatibility in blends by the oil compatibility model (Wiehe & Kennedy, Energy & Fuels 14 (2000)
56-59): S_BN of a mixture is the volume average of its oils' S_BN, and the mixture is compatible when it
exceeds the largest I_N of the oils in it.

Every expected value below is worked by hand from those two equations (named beside each check); the oils'
numbers are inputs made up for the cases.  No published worked example is at hand (none from memory either).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from typer.testing import CliRunner

from assaycut.cli import app
from assaycut.cutting.cutset import default_cut_set
from assaycut.io import load_assay
from assaycut.io.tomlfiles import demo_assay_paths, read_prices
from assaycut.model.crude import build_model
from assaycut.studies.blend import blend
from assaycut.studies.blend_optimizer import BlendTargets, optimize_blend
from assaycut.studies.compatibility import IN_KEY, MARGIN_RATIO, SBN_KEY, assess, classify
from assaycut.yields import run_yields
from tests.helpers import DEMO_PRICES

runner = CliRunner()
HEAVY = (80.0, 40.0)  # S_BN, I_N of an asphaltenic heavy oil
LIGHT = (20.0, 0.0)  # a paraffinic light oil without asphaltenes


def test_a_mixture_exactly_at_the_boundary_is_incompatible():
    # S_mix = 80 (1 - x) + 20 x = 40 = I_N max at x = 2/3 of the light oil (by hand); compatible needs S_mix > I_N
    c = assess(["heavy", "light"], [HEAVY, LIGHT], [1 / 3, 2 / 3])
    assert c.sbn_mix == pytest.approx(40.0) and c.in_max == 40.0 and c.word == "incompatible"
    assert c.margin == pytest.approx(0.0, abs=1e-12) and c.order is None
    just_inside = assess(["heavy", "light"], [HEAVY, LIGHT], [0.34, 0.66])  # S_mix = 40.4 > 40
    assert just_inside.word == "marginal" and just_inside.sbn_mix == pytest.approx(40.4)
    assert assess(["heavy", "light"], [HEAVY, LIGHT], [0.8, 0.2]).word == "compatible"  # S_mix = 68 >= 1.3 x 40
    assert classify(40.0, 40.0) == "incompatible"


def test_the_order_of_blending_matters_and_decreasing_s_bn_keeps_every_step_stable():
    # Half and half: S_mix = 50 > 40, compatible at the end.  Pouring the heavy oil into a tank of the light one
    # passes through mixtures with S_BN near 20 while the heavy oil's I_N 40 is present: incompatible on the
    # way.  Pouring the light oil into the heavy one goes from S_BN 80 down to 50: every step above 40 (by hand).
    light_first = assess(["light", "heavy"], [LIGHT, HEAVY], [0.5, 0.5])
    assert light_first.given_order_unstable == "heavy" and light_first.order == ["heavy", "light"]
    heavy_first = assess(["heavy", "light"], [HEAVY, LIGHT], [0.5, 0.5])
    assert heavy_first.given_order_unstable is None


def test_three_oils_are_ordered_by_decreasing_s_bn_and_a_crude_without_numbers_is_not_assessed():
    mid = (50.0, 30.0)
    c = assess(["light", "mid", "heavy"], [LIGHT, mid, HEAVY], [0.2, 0.3, 0.5])
    # S_mix = 0.2 x 20 + 0.3 x 50 + 0.5 x 80 = 59; I_N max 40 (by hand); 59 >= 52 = 1.3 x 40
    assert c.sbn_mix == pytest.approx(59.0) and c.word == "compatible" and c.order == ["heavy", "mid", "light"]
    none = assess(["light", "x"], [LIGHT, None], [0.5, 0.5])
    assert none.word == "not assessed" and none.missing == ["x"] and "not assessed" in none.text()
    unused = assess(["light", "x"], [LIGHT, None], [1.0, 0.0])  # a crude with no share takes no part
    assert unused.word == "compatible"


def _with_numbers(path, numbers):
    a = load_assay(path)
    return dataclasses.replace(a, extras={**a.extras, SBN_KEY: numbers[0], IN_KEY: numbers[1]})


def test_a_blend_carries_s_bn_by_volume_and_the_largest_i_n_into_the_new_assay():
    selkie, _, tarn = demo_assay_paths()
    parents = [(a, build_model(a), p) for a, p in ((_with_numbers(selkie, (25.0, 0.0)), 60.0),
                                                  (_with_numbers(tarn, (70.0, 45.0)), 40.0))]
    new = blend(parents, basis="vol")
    assert new.extras[SBN_KEY] == pytest.approx(0.6 * 25.0 + 0.4 * 70.0)  # 43.0, by volume (by hand)
    assert new.extras[IN_KEY] == 45.0
    assert any(n.startswith("compatibility: incompatible") and "CAUTION" in n for n in new.notes)  # 43 <= 45


def test_the_blend_optimiser_keeps_the_blend_compatible_and_says_when_that_binds():
    selkie, _, tarn = demo_assay_paths()
    s_light, s_heavy = (25.0, 0.0), (70.0, 45.0)
    assays = [_with_numbers(selkie, s_light), _with_numbers(tarn, s_heavy)]
    results = [run_yields(a, default_cut_set()) for a in assays]
    prices = read_prices(str(DEMO_PRICES))
    targets = BlendTargets(api_max=30.0)
    plan = optimize_blend(results, {}, targets, prices)
    assert plan.feasible and plan.compatibility is not None
    x = plan.shares_pct["Tarn Heavy"] / 100.0
    # Tarn present: S_mix = 25 + 45 x >= 1.3 x 45 = 58.5, so x >= 0.7444 (by hand)
    assert 25.0 + 45.0 * x >= MARGIN_RATIO * 45.0 - 1e-6
    assert plan.compatibility.word == "compatible"
    # the same problem by hand: the Tarn share must make API <= 30 (SG >= 141.5 / 161.5, linear in the share
    # by volume) and, Tarn being present, 25 + 45 x >= 58.5; the worth rises with the lighter crude, so the
    # answer is the larger of the two least shares
    free = optimize_blend([run_yields(a, default_cut_set()) for a in (load_assay(selkie), load_assay(tarn))], {},
                          targets, prices)
    sg = np.array([a.sg for a in assays])
    x_api = (141.5 / 161.5 - sg[0]) / (sg[1] - sg[0])
    x_expected = max(x_api, (MARGIN_RATIO * 45.0 - 25.0) / 45.0)
    assert x == pytest.approx(x_expected, abs=1e-6)
    fixed = optimize_blend(results, {"Selkie Light": (100 * (1 - x_expected), 100 * (1 - x_expected))},
                           BlendTargets(), prices)
    assert plan.value == pytest.approx(fixed.value, abs=1e-6)
    bound = next(t for t in plan.targets if t["target"].startswith("compatibility"))
    binds = free.shares_pct["Tarn Heavy"] / 100.0 < 0.7444
    assert bound["binding"] == binds and (plan.value < free.value - 1e-9) == binds
    assert "compatibility: compatible" in " ".join(plan.compatibility.text().split())


def test_a_crude_without_the_numbers_gives_not_assessed_in_the_plan():
    selkie, _, tarn = demo_assay_paths()
    results = [run_yields(_with_numbers(selkie, (25.0, 0.0)), default_cut_set()),
               run_yields(load_assay(tarn), default_cut_set())]
    plan = optimize_blend(results, {}, BlendTargets(api_max=30.0), read_prices(str(DEMO_PRICES)))
    assert plan.compatibility.word == "not assessed" and plan.compatibility.missing == ["Tarn Heavy"]
    assert not any(t["target"].startswith("compatibility") for t in plan.targets)


def test_the_crude_sheet_takes_the_numbers_and_refuses_one_out_of_range(tmp_path):
    from assaycut.io.assaywriter import write_assay_workbook

    selkie = demo_assay_paths()[0]
    good = tmp_path / "good.xlsx"
    write_assay_workbook(_with_numbers(selkie, (31.5, 12.0)), str(good))
    a = load_assay(str(good))
    assert a.extras[SBN_KEY] == 31.5 and a.extras[IN_KEY] == 12.0
    bad = tmp_path / "bad.xlsx"
    write_assay_workbook(_with_numbers(selkie, (31.5, 900.0)), str(bad))
    r = runner.invoke(app, ["yields", str(bad), "--json"])
    assert r.exit_code == 2 and len(r.stderr.strip().splitlines()) == 1
    assert "bad.xlsx" in r.stderr and "crude" in r.stderr and IN_KEY in r.stderr
