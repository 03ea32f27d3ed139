"""Crude comparison and worth: worth by hand, the compare command, price files."""

from __future__ import annotations

import json

import pytest
from typer.testing import CliRunner

from assaycut.cutting.cutset import default_cut_set
from assaycut.errors import StudyError
from assaycut.studies.compare import Price, PriceSet, worth_table
from assaycut.yields import run_yields
from tests.helpers import DEMO_PRICES, cli_app, cli_error

runner = CliRunner()


def test_worth_by_hand(demos):
    # Identity: worth = Σ yield x price, written out by hand for a tiny price file (all cuts at one price per
    # barrel, so worth per barrel equals that price; per tonne it follows each cut's density).
    a, m = demos[0]
    res = run_yields(a, default_cut_set(), model=m)
    names = list(res.cuts["name"])
    ps = PriceSet({n: Price(50.0, "bbl") for n in names}, {a.name: Price(40.0, "bbl")}, "USD", "tiny")
    w = worth_table([res], ps).iloc[0]
    assert w["worth_per_bbl"] == pytest.approx(50.0, rel=1e-12)
    assert w["margin_per_bbl"] == pytest.approx(10.0, rel=1e-12)
    by_hand = sum(c["wt_pct"] / 100 * 50.0 / (c["density_15c_kg_m3"] * 0.158987294928 / 1000)
                  for c in res.cuts.to_dict("records"))
    assert w["worth_per_t"] == pytest.approx(by_hand, rel=1e-12)
    ps2 = PriceSet({names[0]: Price(50.0, "bbl")}, {}, "USD", "short.toml")
    with pytest.raises(StudyError, match=r"short.toml: no price for cut 'light naphtha'"):
        worth_table([res], ps2)


def test_compare_cli_json_and_report(tmp_path, demo_paths):
    prices = tmp_path / "p.toml"
    names = default_cut_set().names
    prices.write_text('currency = "USD"\n[products]\n' + "".join(f'"{n}" = {{ per_bbl = 70.0 }}\n' for n in names)
                      + '[crudes]\n"Tarn Heavy" = { per_bbl = 60.0 }\n"Selkie Light" = { per_bbl = 75.0 }\n'
                      + '"Brannock Blend" = { per_bbl = 75.0 }\n')
    r = runner.invoke(cli_app(), ["compare", *demo_paths, "--prices", str(prices), "--json", "--out", str(tmp_path / "o")])
    assert r.exit_code == 0, r.stderr
    d = json.loads(r.stdout)
    assert len(d["assays"]) == 3 and len(d["worth"]) == 3
    # one flat product price: every worth is 70/bbl, so the cheapest crude has the best margin (identity)
    assert d["worth"][0]["crude"] == "Tarn Heavy" and d["worth"][0]["margin_per_bbl"] == pytest.approx(10.0)
    assert sorted(p.name for p in (tmp_path / "o").iterdir()) == ["comparison.xlsx", "comparison_yields.png"]


def test_price_file_errors(tmp_path, demo_paths):
    p = tmp_path / "p.toml"
    p.write_text('[products]\n"diesel" = { per_bbl = -5.0 }\n')
    cli_error(["compare", *demo_paths[:2], "--prices", str(p)], r"p.toml: \[products\] 'diesel': the price -5 must be positive")
    p.write_text('[products]\n"diesel" = { per_bbl = 90.0 }\n')
    cli_error(["compare", *demo_paths[:2], "--prices", str(p)], r"p.toml: no price for cut 'light ends'")
    p.write_text('[products]\n"diesel" = 90.0\n')
    cli_error(["compare", *demo_paths[:2], "--prices", str(p)], r"give the unit")
    cli_error(["compare", demo_paths[0]], r"compare needs at least two assays")


def test_compare_workbook_cells_are_numbers(tmp_path, demo_paths):
    import openpyxl

    from assaycut.cli import app

    r = runner.invoke(app, ["compare", *demo_paths, "--prices", str(DEMO_PRICES), "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    ws = openpyxl.load_workbook(tmp_path / "comparison.xlsx")["worth"]
    assert [ws.cell(row=i, column=1).value for i in (2, 3, 4)] == [1, 2, 3]
    assert all(isinstance(ws.cell(row=i, column=3).value, float) for i in (2, 3, 4))
