"""Cut-point shift and sweep: deltas that close, limit flips, sweep end points equal to single runs."""

from __future__ import annotations

import json

import numpy as np
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
    d = shift_delta(base, new).frame()
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
        single = run_yields(a, cs.with_ends({"kerosene": t}), model=m).cuts.frame().set_index("name")
        assert row["lower_vol_pct"] == pytest.approx(single.loc["kerosene", "vol_pct"], abs=1e-12)
        assert row["upper_wt_pct"] == pytest.approx(single.loc["diesel", "wt_pct"], abs=1e-12)
        assert row["upper_d86_10_c"] == pytest.approx(single.loc["diesel", "d86_c"]["10"], abs=1e-9)


def test_sweep_errors(demos):
    a, m = demos[0]
    with pytest.raises(StudyError, match=r"must stay strictly between the neighbouring cut points \(176.7 and 343.3 °C\)"):
        sweep(m, default_cut_set(), "kerosene", 150.0, 250.0, 5.0)
    with pytest.raises(StudyError, match="no cut named 'jet'"):
        sweep(m, default_cut_set(), "jet", 200.0, 250.0, 5.0)


def test_sweep_cli_writes_csv_and_png(tmp_path):
    r = runner.invoke(cli_app(), ["sweep", "--end", "diesel", "--from", "330", "--to", "370", "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    assert sorted(p.suffix for p in tmp_path.iterdir()) == [".csv", ".png"]


@pytest.mark.parametrize("cut_point", ["kerosene", "diesel"])
def test_four_times_the_per_degree_vector_matches_a_4c_shift(demos, cut_point):
    # Linearisation check against the exact model: 4 x the per-°C vector equals a 4 °C shift up to the curve's
    # curvature over 4 °C (second order: 2 % of the move here, plus 1e-4 for rounding); and the per-°C yield
    # changes sum to zero on each basis (mass balance, identity).
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.studies.cutpoints import cut_point_vectors, shift_delta
    from assaycut.yields import run_yields

    cs = default_cut_set()
    end = {c.name: c.end_c for c in cs.cuts}[cut_point]
    for assay, model in demos:
        _, vec = cut_point_vectors(model, cs)
        d = vec[cut_point].frame().set_index("name")
        moved = shift_delta(run_yields(assay, cs, model=model),
                            run_yields(assay, cs.with_ends({cut_point: end + 4.0}), model=model)).frame().set_index("name")
        for q in ("vol_pct", "wt_pct", "sg", "sulfur_wt_pct"):
            ok = np.isfinite(moved[q]) & np.isfinite(d[q])
            assert np.all(np.abs(4.0 * d[q][ok] - moved[q][ok]) <= 0.02 * np.abs(moved[q][ok]) + 1e-4), (assay.name, q)
        assert abs(d["vol_pct"].sum()) < 1e-9 and abs(d["wt_pct"].sum()) < 1e-9


def test_vectors_json_shape(demo_paths):
    # The JSON layout the issue fixes for planning-model importers.
    import json

    from typer.testing import CliRunner

    from assaycut.cli import app

    r = CliRunner().invoke(app, ["vectors", demo_paths[0], "--json"])
    assert r.exit_code == 0, r.stderr
    d = json.loads(r.stdout)
    a = d["assays"][0]
    assert a["assay"] == "Selkie Light" and len(a["base"]) == 7 and d["step_c"] == 0.5
    assert [x["cut_point"] for x in a["deltas"]] == ["light ends", "light naphtha", "heavy naphtha", "kerosene",
                                                     "diesel", "vacuum gas oil"]
    row = a["deltas"][3]["per_c"][3]
    assert row["name"] == "kerosene" and row["vol_pct"] > 0 and "wt_pct" in row


def test_shift_shows_new_values_beside_the_changes(demo_paths, tmp_path):
    # The new absolute value and its change sit side by side: new = base + change (identity), printed and
    # written to <crude>_shift.csv.
    from typer.testing import CliRunner

    from assaycut.cli import app

    r = CliRunner().invoke(app, ["shift", demo_paths[0], "--end", "kerosene=240", "--json"])
    d = json.loads(r.stdout)
    base = {c["name"]: c for c in d["base"]["cuts"]}
    for row in d["delta"]:
        assert row["new_vol_pct"] == pytest.approx(base[row["name"]]["vol_pct"] + row["vol_pct"], abs=1e-9)
    r = CliRunner().invoke(app, ["shift", demo_paths[0], "--end", "kerosene=240", "--out", str(tmp_path)])
    assert r.exit_code == 0, r.stderr
    assert "Δ vol %" in r.stdout and "vol %" in r.stdout
    head = (tmp_path / "Selkie_Light_shift.csv").read_text(encoding="utf-8").splitlines()[0]
    assert "New Yield [vol %]" in head and "Change in Yield [vol %]" in head
