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
app = cli_app()


def test_worth_by_hand(demos):
    # Identity: worth = Σ yield x price, written out by hand for a tiny price file (all cuts at one price per
    # barrel, so worth per barrel equals that price; per tonne it follows each cut's density).
    a, m = demos[0]
    res = run_yields(a, default_cut_set(), model=m)
    names = list(res.cuts.frame()["name"])
    ps = PriceSet({n: Price(50.0, "bbl") for n in names}, {a.name: Price(40.0, "bbl")}, "USD", "tiny")
    w = worth_table([res], ps).iloc[0]
    assert w["worth_per_bbl"] == pytest.approx(50.0, rel=1e-12)
    assert w["margin_per_bbl"] == pytest.approx(10.0, rel=1e-12)
    # per tonne: each cut's barrel is a volume at 60 °F, weighing SG x 999.016 kg/m³ (water at 60 °F, API MPMS
    # Ch. 11.1) x 0.158987294928 m³ (42 US gallons, exact)
    by_hand = sum(c["wt_pct"] / 100 * 50.0 / (c["sg"] * 999.016 * 0.158987294928 / 1000)
                  for c in res.cuts.frame().to_dict("records"))
    assert w["worth_per_t"] == pytest.approx(by_hand, rel=1e-12)
    # mass balance: one price per barrel for every cut is that price per the 60 °F barrel mass of the crude the
    # cuts add up to (Σ wt % / SG_cut = 100 / SG, SG = Σ vol % x SG_cut / 100); to the closure of wt % (1e-9)
    sg = sum(c["vol_pct"] * c["sg"] for c in res.cuts.rows()) / 100.0
    assert w["worth_per_t"] == pytest.approx(50.0 / (sg * 999.016 * 0.158987294928 / 1000), rel=1e-9)
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


def test_compare_workbook_cells_are_numbers(tmp_path, demo_paths):
    import openpyxl

    from assaycut.cli import app

    r = runner.invoke(app, ["compare", *demo_paths, "--prices", str(DEMO_PRICES), "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    ws = openpyxl.load_workbook(tmp_path / "comparison.xlsx")["worth"]
    assert [ws.cell(row=i, column=1).value for i in (2, 3, 4)] == [1, 2, 3]
    assert all(isinstance(ws.cell(row=i, column=3).value, float) for i in (2, 3, 4))


def test_quality_adjustment_arithmetic_by_hand(demos, tmp_path):
    # Arithmetic worked by hand: a residue at 390 USD/t with -24 per wt % of sulfur above 1.0 and +3 per °API
    # above 10, bounded below at 250: price = max(250, 390 - 24 (S - 1) + 3 (API - 10)).
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.io.tomlfiles import read_prices
    from assaycut.studies.compare import worth_by_product
    from assaycut.yields import run_yields

    p = tmp_path / "p.toml"
    p.write_text('[products]\n"light ends" = { per_t = 430.0 }\n"light naphtha" = { per_bbl = 68.0 }\n'
                 '"heavy naphtha" = { per_bbl = 74.0 }\n"kerosene" = { per_bbl = 98.0 }\n"diesel" = { per_bbl = 96.0 }\n'
                 '"vacuum gas oil" = { per_bbl = 80.0 }\n"vacuum residue" = { per_t = 390.0, min = 250.0, adjust = [ '
                 '{ property = "sulfur_wt_pct", base = 1.0, per_unit = -24.0 }, '
                 '{ property = "api", base = 10.0, per_unit = 3.0 } ] }\n')
    prices = read_prices(str(p))
    for assay, _ in demos:
        res = run_yields(assay, default_cut_set())
        vr = res.cuts.frame().set_index("name").loc["vacuum residue"]
        row = worth_by_product(res, prices).set_index("cut").loc["vacuum residue"]
        by_hand = max(250.0, 390.0 - 24.0 * (vr["sulfur_wt_pct"] - 1.0) + 3.0 * (vr["api"] - 10.0))
        assert row["price"] == pytest.approx(by_hand, rel=1e-12)
        assert row["adjustment"] == pytest.approx(by_hand - 390.0, rel=1e-12)
        assert row["worth_per_t"] == pytest.approx(vr["wt_pct"] / 100.0 * by_hand, rel=1e-12)


def test_unknown_adjustment_property_is_refused_naming_the_line(tmp_path):
    p = tmp_path / "p.toml"
    p.write_text('[products]\n"diesel" = { per_bbl = 96.0, adjust = [ { property = "colour", base = 1, per_unit = 1 } ] }\n')
    cli_error(["compare", "x.xlsx", "--prices", str(p)], r"p.toml: \[products\] 'diesel': adjust 1: unknown property 'colour'")


def test_ranked_by_in_both_price_cases(demo_paths, tmp_path):
    # compare says what it ranks by: margin when every crude has a price, else worth (never silently).
    r = runner.invoke(app, ["compare", *demo_paths, "--prices", str(DEMO_PRICES), "--json"])
    d = json.loads(r.stdout)
    assert d["ranked_by"] == "margin_per_bbl"
    margins = [w["margin_per_bbl"] for w in d["worth"]]
    assert margins == sorted(margins, reverse=True)
    p = tmp_path / "p.toml"
    text = DEMO_PRICES.read_text(encoding="utf-8")
    p.write_text(text[:text.index("[crudes]")] + '[crudes]\n"Selkie Light" = { per_bbl = 84.0 }\n', encoding="utf-8")
    r = runner.invoke(app, ["compare", *demo_paths, "--prices", str(p), "--json"])
    d = json.loads(r.stdout)
    assert d["ranked_by"] == "worth_per_bbl"
    worths = [w["worth_per_bbl"] for w in d["worth"]]
    assert worths == sorted(worths, reverse=True)
    printed = runner.invoke(app, ["compare", *demo_paths, "--prices", str(p)]).stdout
    assert "ranked by worth per bbl: not every crude has a price" in printed and "nan" not in printed


def test_one_crude_alone_can_be_priced(demo_paths):
    r = runner.invoke(app, ["compare", demo_paths[2], "--prices", str(DEMO_PRICES), "--json"])
    assert r.exit_code == 0, r.stderr
    d = json.loads(r.stdout)
    assert [w["crude"] for w in d["worth"]] == ["Tarn Heavy"] and d["ranked_by"] == "margin_per_bbl"


def test_the_heavy_cuts_show_bmci_and_hydrogen(demos):
    # Source: BMCI's definition (Smith 1940): 48640 / VABP[K] + 473.7 SG - 456.8 from each cut's own VABP and
    # SG in the yields table; the rows appear for the cuts from 300 °C only (common practice, no source).
    from assaycut.report.studyreports import compare_wide
    from assaycut.studies.compare import comparison_table

    results = [run_yields(a, default_cut_set(), model=m) for a, m in demos]
    crudes, rows = compare_wide(comparison_table(results))
    shown = {(r[0], r[2]): dict(zip(crudes, r[3:])) for r in rows}
    for res in results:
        cuts = res.cuts
        for j, cut in enumerate(cuts["name"]):
            heavy = cuts["start_c"][j] >= 300.0
            assert ((cut, "bmci") in shown) == heavy, cut
            if heavy:
                want = 48640.0 / (cuts["vabp_c"][j] + 273.15) + 473.7 * cuts["sg"][j] - 456.8
                assert shown[(cut, "bmci")][res.assay.name] == pytest.approx(want, abs=1e-6)
    assert ("vacuum gas oil", "hydrogen_wt_pct") in shown
