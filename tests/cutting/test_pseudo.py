"""Pseudo-components recombine to the crude: volume, mass and moles add up to 100 %, the volume-average SG is
the crude's, and the cumulative volume at every boundary is on the TBP curve (identities of the breakdown,
the issue's tolerances 1e-4 and 1e-6 vol %).  The breakdown is the stated default (15/25/50 °C slices: common
practice, no source), a count, or given boundaries; the products of a cut set each add up to 100 %."""

from __future__ import annotations

import json

import numpy as np
import pytest
from typer.testing import CliRunner

from assaycut.cli import app
from assaycut.cutting.cutset import default_cut_set
from assaycut.cutting.pseudo import pseudo_components
from assaycut.io import load_assay
from assaycut.io.tomlfiles import demo_assay_paths
from assaycut.model.crude import build_model

runner = CliRunner()
KEYS = {"name", "pure", "nbp_c", "sg", "api", "watson_k", "mw", "tc_c", "pc_bar", "omega", "vc_m3_kmol", "vol_pct",
        "wt_pct", "mol_pct", "cp_ideal_gas"}


@pytest.mark.parametrize("path", demo_assay_paths())
@pytest.mark.parametrize("method", ["riazi-daubert-1987", "kesler-lee-1976", "twu-1984"])
def test_the_components_recombine_to_the_crude(path, method):
    a = load_assay(path)
    m = build_model(a, reconcile=True)  # narrow cuts scaled to the whole crude: the model's SG is the crude's
    comps = pseudo_components(m, a, method)
    for key in ("vol_pct", "wt_pct", "mol_pct"):
        assert sum(c[key] for c in comps) == pytest.approx(100.0, abs=1e-9)
    assert sum(c["vol_pct"] * c["sg"] for c in comps) / 100.0 == pytest.approx(a.sg, abs=1e-4)
    for c in comps:
        assert float(m.curve.pct_at(c["end_c"])) == pytest.approx(c["cum_vol_pct"], abs=1e-6)
        assert set(c) >= KEYS and c["start_c"] <= c["nbp_c"] <= c["end_c"] + 1e-9


def test_the_default_breakdown_and_the_pure_light_ends():
    a = load_assay(demo_assay_paths()[0])
    m = build_model(a)
    comps = pseudo_components(m, a)
    pure = [c for c in comps if c["pure"]]
    assert [c["name"] for c in pure] == ["C2", "C3", "iC4", "nC4"]  # Selkie Light's light-ends analysis
    assert pure[1]["nbp_c"] == pytest.approx(-42.11) and pure[1]["mw"] == pytest.approx(44.096)
    inner = [c for c in comps if not c["pure"]][1:-2]  # the first and the last slices are partial
    for c in inner:  # boundaries on the grid, slices no wider than its step (390-400 °C is 10 °C wide)
        width = c["end_c"] - c["start_c"]
        step = 15.0 if c["end_c"] <= 400.0 + 1e-6 else 25.0 if c["end_c"] <= 650.0 + 1e-6 else 50.0
        assert round(c["end_c"], 6) % step == 0 or round(c["end_c"], 6) == 400.0, c["end_c"]
        assert 0 < width <= step + 1e-6 and (width == pytest.approx(step) or c["end_c"] == pytest.approx(400.0))
    assert m.curve.lumped_pct > 0 and comps[-1]["vol_pct"] == pytest.approx(m.curve.lumped_pct, abs=1e-9)


def test_the_heat_capacity_coefficients_of_the_components():
    # Source: propane's ideal-gas Cp in `chemicals` (TRC_gas_data fit) at 300-1000 K; bound 3 % on average
    # over those temperatures, the average accuracy Lastovka & Shaw state for hydrocarbons (from memory: "a few
    # percent"; the largest single deviation, at 300 K, is 4 %).
    from chemicals.heat_capacity import TRC_gas_data, TRCCp

    a = load_assay(demo_assay_paths()[0])
    comps = pseudo_components(build_model(a), a)
    c3 = next(c for c in comps if c["name"] == "C3")
    r = TRC_gas_data.loc["74-98-6"]
    dev = [sum(c3["cp_ideal_gas"][k] * t ** i for i, k in enumerate("abcd")) / TRCCp(t, *[r[f"a{i}"] for i in range(8)])
           - 1.0 for t in np.arange(300.0, 1001.0, 100.0)]
    assert float(np.mean(np.abs(dev))) <= 0.03
    for c in comps:  # every cubic follows its correlation within about 1 %; heavier components hold more heat
        assert c["cp_ideal_gas"]["fit_max_dev_pct"] <= 1.5
    pseudo = [c for c in comps if not c["pure"]]
    cp500 = [sum(c["cp_ideal_gas"][k] * 500.0 ** i for i, k in enumerate("abcd")) for c in pseudo]
    assert all(b > a for a, b in zip(cp500, cp500[1:]))


def test_a_count_and_given_boundaries_and_a_cut_set():
    a = load_assay(demo_assay_paths()[1])
    m = build_model(a)
    n_pure = sum(c["pure"] for c in pseudo_components(m, a))
    assert len(pseudo_components(m, a, scheme=10)) == n_pure + 10 + (1 if m.curve.lumped_pct > 0 else 0)
    given = pseudo_components(m, a, scheme=[100.0, 200.0, 300.0])
    assert [round(c["end_c"], 6) for c in given if not c["pure"]][:3] == [100.0, 200.0, 300.0]
    cs = default_cut_set()
    comps = pseudo_components(m, a, cut_set=cs)
    for p in cs.names:
        members = [c for c in comps if c["product"] == p]
        assert members and sum(c["product_vol_pct"] for c in members) == pytest.approx(100.0, abs=1e-9)
    ends = dict(zip(cs.names, list(cs.ends_c) + [np.inf]))
    for c in comps:
        assert c["end_c"] <= ends[c["product"]] + 1e-6


def test_the_command_prints_fits_80_columns_and_writes_the_neutral_table(tmp_path):
    d = json.loads(runner.invoke(app, ["pseudo", "--json", "--method", "twu-1984"]).stdout)
    assert d["method"] == "twu-1984" and set(d["assay"]) >= {"name", "sg", "api"}
    assert set(d["components"][0]) >= KEYS
    several = json.loads(runner.invoke(app, ["pseudo", *demo_assay_paths()[:2], "--json"]).stdout)
    assert set(several) == {"assays", "errors"} and len(several["assays"]) == 2
    r = runner.invoke(app, ["pseudo", "--out", str(tmp_path)], env={"COLUMNS": "80"})
    assert r.exit_code == 0, r.output
    for line in r.stdout.splitlines():
        assert len(line) <= 80 or line.startswith("Pseudo-components written"), line
    head = next(tmp_path.glob("*_pseudo.csv")).read_text(encoding="utf-8").splitlines()[0]
    assert head.startswith("Component,") and "Tc [°C]" in head and "Pc [bar]" in head and head.endswith("Method")
    bad = runner.invoke(app, ["pseudo", "--scheme", "many"])
    assert bad.exit_code == 2 and "--scheme" in bad.stderr
