"""A quick-curve CSV works with every command that takes an assay: each takes the whole-crude figures
(--api/--sg/--density/--sulfur) and gives the same cut as ``yields`` on the same CSV.

Source of the curve: the Balder Blend assay of the open assays (US Government, CC0; tests/data/open_assays.json,
extracted by tests/data/extract_open_assays.py): its TBP points and whole-crude density and sulfur.
"""

from __future__ import annotations

import json
import urllib.request
from pathlib import Path

import pytest
from typer.testing import CliRunner

from assaycut.cli import app

from ..explore.serving import running_explorer

runner = CliRunner()
DATA = Path(__file__).parents[1] / "data" / "open_assays.json"
WATER_60F_G_CM3 = 0.999016  # API MPMS Ch. 11.1: density of water at 60 °F


@pytest.fixture(scope="module")
def balder(tmp_path_factory):
    """(csv path, SG 60/60 °F, sulfur wt %) of the Balder Blend TBP curve."""
    a = next(x for x in json.loads(DATA.read_text()) if x["name"] == "Balder Blend")
    p = tmp_path_factory.mktemp("csv") / "balder.csv"
    p.write_text("vol_pct,temp_c\n" + "".join(f"{v},{t}\n" for v, t in a["tbp"]))
    # density at 15.6 °C (60 °F) over water's at 60 °F is SG 60/60 °F (definition)
    return str(p), a["density_g_cm3_15_6c"] / WATER_60F_G_CM3, a["sulfur_wt_pct"]


def _ok(args, codes=(0,)):
    r = runner.invoke(app, args)
    assert r.exit_code in codes, (args, r.stdout, r.stderr)
    return r


def _vol(cuts):
    return {c["name"]: c["vol_pct"] for c in cuts}


def test_every_study_command_takes_the_whole_crude_figures_of_a_curve_csv(balder, tmp_path, demo_paths):
    path, sg, s = balder
    whole = ["--sg", f"{sg!r}", "--sulfur", f"{s!r}"]
    base = json.loads(_ok(["yields", path, *whole, "--json"]).stdout)
    assert base["assay"]["sg"] == pytest.approx(sg, abs=5e-5)  # the given gravity is the crude's
    assert base["assay"]["sulfur_wt_pct"] == pytest.approx(s, rel=1e-9)
    cmp = json.loads(_ok(["compare", path, demo_paths[0], *whole, "--json"]).stdout)
    got = next(x for x in cmp["assays"] if x["assay"]["name"] == base["assay"]["name"])
    assert _vol(got["cuts"]) == pytest.approx(_vol(base["cuts"]), abs=1e-9)
    sh = json.loads(_ok(["shift", path, "--end", "diesel=360", *whole, "--json"]).stdout)
    assert _vol(sh["base"]["cuts"]) == pytest.approx(_vol(base["cuts"]), abs=1e-9)
    sw = json.loads(_ok(["sweep", path, "--from", "230", "--to", "240", *whole, "--json"]).stdout)
    assert sw["assay"] == "balder" and len(sw["points"]) == 3
    vec = json.loads(_ok(["vectors", path, *whole, "--json"]).stdout)
    assert vec["assays"][0]["assay"] == "balder"
    # the shipped limits cannot all be met on this crude (exit 1, "no feasible answer"): it ran on the CSV
    opt = json.loads(_ok(["optimize", path, "--maximize", "diesel", *whole, "--json"], codes=(0, 1)).stdout)
    assert opt["assay"] == "balder" and opt["start"]["value"] == pytest.approx(_vol(base["cuts"])["diesel"], abs=1e-9)
    _ok(["check", path, *whole])
    _ok(["blend", f"{path}=50", f"{demo_paths[0]}=50", *whole, "--out", str(tmp_path / "b.xlsx")])
    prices = str(Path(__file__).parents[2] / "assays_demo" / "prices_demo.toml")
    _ok(["blend", path, demo_paths[0], "--optimize", "--api-min", "30", "--prices", prices, *whole,
         "--out", str(tmp_path / "o.xlsx")])


def test_the_explorer_takes_a_curve_csv(balder):
    path, sg, s = balder
    with running_explorer(path, "--sg", f"{sg!r}", "--sulfur", f"{s!r}") as (url, port, token, proc):
        req = urllib.request.Request(f"http://127.0.0.1:{port}/api/assays",
                                     headers={"Authorization": f"Bearer {token}"})
        with urllib.request.urlopen(req, timeout=10) as resp:
            d = json.loads(resp.read())
    assert [a["name"] for a in d["assays"]] == ["balder"]


@pytest.mark.parametrize("command", [["compare"], ["shift", "--end", "diesel=360"], ["sweep"], ["vectors"],
                                     ["optimize", "--maximize", "diesel"], ["check"]])
def test_whole_crude_figures_for_a_workbook_are_one_line_naming_it(command, demo_paths):
    r = runner.invoke(app, [command[0], demo_paths[0], *command[1:], "--api", "30"])
    assert r.exit_code == 2 and "--api applies to a curve CSV" in r.stderr and demo_paths[0] in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1
