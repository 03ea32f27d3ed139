"""Cut-point shift and sweep: deltas that close, limit flips, sweep end points equal to single runs."""

from __future__ import annotations

import json

import pytest
from typer.testing import CliRunner

from assaycut.cutting.cutset import default_cut_set
from assaycut.errors import StudyError
from assaycut.io.tomlfiles import read_limits
from assaycut.studies.cutpoints import shift_delta, sweep
from assaycut.yields import run_yields
from tests.helpers import cli_app, cli_error

runner = CliRunner()


def test_shift_deltas_sum_to_zero_and_touch_only_neighbours(demos):
    # Identity: moving one cut point only moves volume between its two neighbours; deltas sum to zero.
    a, m = demos[1]
    cs = default_cut_set()
    base = run_yields(a, cs, read_limits(), model=m)
    new = run_yields(a, cs.with_ends({"diesel": 360.0}), read_limits(), model=m)
    d = shift_delta(base, new)
    assert d["vol_pct"].sum() == pytest.approx(0.0, abs=1e-9)
    assert d["wt_pct"].sum() == pytest.approx(0.0, abs=1e-9)
    assert d.loc[d["changed"], "name"].tolist() == ["diesel", "vacuum gas oil"]


def test_shift_json_shape():
    r = runner.invoke(cli_app(), ["shift", "--end", "kerosene=250", "--json"])
    assert r.exit_code == 0, r.stderr
    d = json.loads(r.stdout)
    assert set(d) == {"base", "new", "delta"}
    assert {"name", "vol_pct", "wt_pct", "sg", "sulfur_wt_pct", "cetane_index_d4737", "flash_c_est", "d86_95_c",
            "changed", "limit_flips"} <= set(d["delta"][0])
    cli_error(["shift"], r"give at least one --end")


def test_shift_reports_limit_flip():
    # Raising the kerosene end point far enough makes the jet D86 10 % limit (ASTM D1655, 205 °C max, from
    # memory) fail: the shift must report the flip.
    r = runner.invoke(cli_app(), ["shift", "--end", "heavy naphtha=215", "--end", "kerosene=300", "--json"])
    d = json.loads(r.stdout)
    kero = next(x for x in d["delta"] if x["name"] == "kerosene")
    assert "pass -> fail" in kero["limit_flips"]


def test_sweep_endpoints_equal_single_runs(demos):
    # Identity: the sweep's end points equal two single yields runs at those cut points.
    a, m = demos[0]
    cs = default_cut_set()
    df = sweep(m, cs, "kerosene", 210.0, 250.0, 2.0)
    assert len(df) == 21
    for t, row in ((210.0, df.iloc[0]), (250.0, df.iloc[-1])):
        single = run_yields(a, cs.with_ends({"kerosene": t}), model=m).cuts.set_index("name")
        assert row["lower_vol_pct"] == pytest.approx(single.loc["kerosene", "vol_pct"], abs=1e-12)
        assert row["upper_wt_pct"] == pytest.approx(single.loc["diesel", "wt_pct"], abs=1e-12)
        assert row["upper_d86_10_c"] == pytest.approx(single.loc["diesel", "d86_c"]["10"], abs=1e-9)


def test_sweep_errors(demos):
    a, m = demos[0]
    with pytest.raises(StudyError, match=r"must stay strictly between the neighbouring cut points \(177 and 343 °C\)"):
        sweep(m, default_cut_set(), "kerosene", 150.0, 250.0, 5.0)
    with pytest.raises(StudyError, match="no cut named 'jet'"):
        sweep(m, default_cut_set(), "jet", 200.0, 250.0, 5.0)


def test_sweep_cli_writes_csv_and_png(tmp_path):
    r = runner.invoke(cli_app(), ["sweep", "--end", "diesel", "--from", "330", "--to", "370", "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    assert sorted(p.suffix for p in tmp_path.iterdir()) == [".csv", ".png"]
