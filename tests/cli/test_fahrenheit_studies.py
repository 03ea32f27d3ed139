"""`--unit F` on the studies a planner reads in °F (shift, sweep, optimize, compare), the sweep's cold-flow
and smoke columns, the study plots' resolution and their colour bar's round ticks.

Expected values come from arithmetic (°F = 1.8 °C + 32; a difference 1.8 × °C), from the trade's round cut
points in °F that the shipped cut set is stored at (350/450/650 °F: common practice, no source), and from the
same command's JSON output, which stays in °C by the documented rule.
"""

from __future__ import annotations

import csv
import json
import re

import numpy as np
import pytest
from PIL import Image
from typer.testing import CliRunner

from assaycut.cli import app

runner = CliRunner()
NARROW = {"COLUMNS": "80"}
C_TEMPERATURE = re.compile(r"-?\d+(\.\d+)? ?°C")  # a number in °C; 'density at 15 °C' is a name, allowed below


def _run(args, codes=(0,)):
    r = runner.invoke(app, args, env=NARROW)
    assert r.exit_code in codes, r.output
    return r


def _no_celsius(text: str) -> None:
    for line in text.splitlines():
        assert not C_TEMPERATURE.search(line.replace("at 15 °C", "")), line


def _f(c: float) -> float:
    return c * 1.8 + 32.0


def _table(lines: list[str], head: str) -> tuple[list[str], list[list[str]]]:
    """The first printed table whose header line starts with ``head``: its header cells and its body rows."""
    k = next(i for i, x in enumerate(lines) if x.startswith(head))
    cols = [m.start() for m in re.finditer(r"-+", lines[k + 1])]
    ends = [m.end() for m in re.finditer(r"-+", lines[k + 1])]

    def cells(x):
        return [x[a:b].strip() if j else x[:b].strip() for j, (a, b) in enumerate(zip(cols, ends))]

    body = []
    for x in lines[k + 2:]:
        if not x.strip() or set(x.strip()) == {"-"}:
            break
        body.append(cells(x))
    return [lines[k][a - (2 if j else 0):b + 2].strip() for j, (a, b) in enumerate(zip(cols, ends))], body


def test_shift_in_fahrenheit_prints_converted_ends_and_differences(demo_paths, tmp_path):
    r = _run(["shift", demo_paths[1], "--end", "kerosene=240", "--unit", "F", "--out", str(tmp_path)])
    _no_celsius(r.stdout)
    assert "kerosene -> 464 °F" in r.stdout  # 240 °C = 464 °F
    lines = r.stdout.splitlines()
    head, body = _table(lines, "Cut ")
    assert head[1:3] == ["End °F", "new End °F"]
    kero = next(b for b in body if b[0].endswith("kerosene"))
    assert kero[1:3] == ["450.0", "464.0"]  # the shipped kerosene end, 450 °F; the new end 240 °C
    d = json.loads(_run(["shift", demo_paths[1], "--end", "kerosene=240", "--json"]).stdout)
    flash = next(x for x in d["delta"] if x["name"] == "kerosene")["flash_c_est"]
    _, fbody = _table(lines, "Cut               Flash")
    shown = next(b for b in fbody if b[0].endswith("kerosene"))
    assert float(shown[2]) == pytest.approx(1.8 * flash, abs=0.051)  # a change of temperature: 1.8 x °C
    with open(next(tmp_path.glob("*_shift.csv")), newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    assert "End TBP after [°F]" in rows[0] and not any("°C]" in h for h in rows[0] if "15 °C" not in h)
    k = next(r for r in rows[1:] if r[0] == "kerosene")
    assert float(k[rows[0].index("End TBP after [°F]")]) == pytest.approx(464.0)


def test_sweep_in_fahrenheit_matches_its_json_converted(demo_paths, tmp_path):
    args = ["sweep", demo_paths[1], "--from", "200", "--to", "220", "--step", "10"]
    r = _run(args + ["--unit", "F", "--out", str(tmp_path)])
    _no_celsius(r.stdout)
    points = json.loads(_run(args + ["--json"]).stdout)["points"]
    head, body = _table(r.stdout.splitlines(), "Cut °F")
    assert [float(b[0]) for b in body] == [392.0, 410.0, 428.0]  # 200, 210, 220 °C
    j = head.index("lo D86 95 °F")
    for b, p in zip(body, points):
        assert float(b[j]) == pytest.approx(_f(p["lower_d86_95_c"]), abs=0.051)
    with open(next(tmp_path.glob("*_sweep_kerosene.csv")), newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    assert rows[0][0] == "Cut point [°F TBP]" and float(rows[1][0]) == pytest.approx(392.0)


def test_sweep_shows_freeze_smoke_cloud_and_pour_as_yields_gives_them(demo_paths, tmp_path):
    # the sweep's kerosene at 240 °C is the kerosene of `yields --end kerosene=240`: the same cut, one model
    r = _run(["sweep", demo_paths[1], "--from", "240", "--to", "245", "--step", "10", "--out", str(tmp_path)])
    head, body = _table(r.stdout.splitlines(), "Cut °C  lo Flash")
    y = json.loads(_run(["yields", demo_paths[1], "--end", "kerosene=240", "--json"]).stdout)
    kero = next(c for c in y["cuts"] if c["name"] == "kerosene")
    for q, h in (("freeze_point_c", "lo Freeze °C"), ("smoke_point_mm", "lo Smoke mm"),
                 ("cloud_point_c", "lo Cloud °C"), ("pour_point_c", "lo Pour °C")):
        est = q in kero["estimated"]
        col = next(i for i, x in enumerate(head) if x.rstrip("~") == h)
        assert head[col].endswith("~") == est, (head[col], est)
        assert float(body[-1][col]) == pytest.approx(kero[q], abs=0.051)
    assert "~ estimated by a correlation" in r.stdout


def test_optimize_in_fahrenheit_prints_its_json_ends_converted(demo_paths, tmp_path):
    args = ["optimize", demo_paths[1], "--maximize", "kerosene"]
    d = json.loads(_run(args + ["--json"]).stdout)
    r = _run(args + ["--unit", "F", "--out", str(tmp_path)])
    _no_celsius(r.stdout.replace("measure by ASTM D93", ""))
    head, body = _table(r.stdout.splitlines(), "Cut ")
    assert head[1:3] == ["start end °F", "optimum end °F"]
    for b in body:
        if b[0] in d["optimum"]["cut_points_c"]:
            assert float(b[2]) == pytest.approx(_f(d["optimum"]["cut_points_c"][b[0]]), abs=0.051)
    assert "flash point (estimate; measure by ASTM D93) >= 100 °F" in " ".join(r.stdout.split())  # 38 °C


def test_compare_in_fahrenheit_gives_each_cut_its_tbp_range(demo_paths, tmp_path):
    r = _run(["compare", *demo_paths, "--unit", "F", "--out", str(tmp_path)])
    _no_celsius(r.stdout)
    rows = [x for x in r.stdout.splitlines() if "TBP cut [°F]" in x]  # at 80 columns the crudes come in groups

    def cells(cut):
        return [v for x in rows if x.startswith(cut) for v in x.split("[°F]")[1].split()]

    assert cells("kerosene") == ["350.0–450.0"] * 3
    assert cells("vacuum residue") == ["1050.0–end"] * 3
    c = _run(["compare", *demo_paths, "--out", str(tmp_path / "c")]).stdout
    assert next(x for x in c.splitlines() if x.startswith("kerosene") and "TBP" in x).split()[-1] == "176.7–232.2"


@pytest.mark.parametrize("args,name", [(["sweep", "{1}"], "*_sweep_kerosene.png"),
                                       (["optimize", "{1}", "--maximize", "kerosene"], "*_optimum.png"),
                                       (["compare", "{0}", "{1}"], "comparison_yields.png")])
def test_study_plots_are_drawn_at_150_dpi(args, name, demo_paths, tmp_path):
    _run([a.format(*demo_paths) for a in args] + ["--out", str(tmp_path)])
    with Image.open(next(tmp_path.glob(name))) as im:
        assert im.info["dpi"] == pytest.approx((150, 150), abs=0.5)


@pytest.mark.parametrize("lo,hi", [(11.73, 12.41), (0.0, 1.0), (-3.2, 140.7), (2.2e-3, 9.7e-3), (5.0, 5.0),
                                   (38123.0, 38991.0)])
def test_colour_bar_levels_are_round_numbers_covering_the_range(lo, hi):
    # round steps: 1, 2, 2.5 or 5 times a power of ten (common practice, no source)
    from assaycut.report.studyreports import round_levels

    lev = round_levels(lo, hi)
    assert lev[0] <= lo and lev[-1] >= hi and 2 <= len(lev) <= 21
    step = float(np.diff(lev).mean())
    mant = step / 10 ** np.floor(np.log10(step))
    assert min(abs(mant - m) for m in (1, 2, 2.5, 5, 10)) < 1e-9
    assert np.allclose(lev / step, np.round(lev / step), atol=1e-6)
