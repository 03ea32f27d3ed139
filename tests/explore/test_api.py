"""The explorer's HTTP API through Starlette's test client: the token, the answers against the command line's
own output, and the refusal of bad requests.

The reference for every answer is outside the server: the CLI's ``yields --end ... --json`` and
``compare --prices --json`` output, the price file's crude price, the readers (the saved cut set read back by
``--cuts``) and openpyxl (the workbook).  Mass balance (yields summing to 100 %) is an identity.
"""

from __future__ import annotations

from pathlib import Path

import io
import json

import pytest
from starlette.testclient import TestClient
from typer.testing import CliRunner

from assaycut.cli import app as cli_app
from assaycut.cutting.cutset import default_cut_set
from assaycut.explore.server import CSP, MAX_BODY_BYTES, SCRIPTS, make_app
from assaycut.explore.session import Explorer
from assaycut.io import load_assay
from assaycut.io.tomlfiles import demo_assay_paths, read_cut_set, read_limits, read_prices

TOKEN = "test-token-0123456789abcdef"
PRICES = str(Path(__file__).parents[2] / "assays_demo" / "prices_demo.toml")


@pytest.fixture(scope="module")
def explorer():
    paths = demo_assay_paths()
    return Explorer([(p, load_assay(p)) for p in paths], default_cut_set(), read_limits(None), read_prices(PRICES))


@pytest.fixture(scope="module")
def client(explorer):
    return TestClient(make_app(explorer, TOKEN), base_url="http://127.0.0.1")


def auth():
    return {"Authorization": f"Bearer {TOKEN}"}


def cli_json(args: list[str]) -> dict:
    r = CliRunner().invoke(cli_app, args)
    assert r.exit_code == 0, r.stderr
    return json.loads(r.stdout)


# -- the token ----------------------------------------------------------------------------------------------
@pytest.mark.parametrize("method,path", [("get", "/"), ("get", "/static/explorer.js"), ("get", "/api/assays"),
                                         ("post", "/api/cut"), ("post", "/api/report"), ("get", "/nowhere")])
def test_every_address_needs_the_token(client, method, path):
    for headers, query in [({}, ""), ({"Authorization": "Bearer wrong"}, ""), ({}, "?token=wrong"),
                           ({"Authorization": TOKEN}, "")]:  # a token without the Bearer scheme is not one
        r = getattr(client, method)(path + query, headers=headers)
        assert r.status_code == 403, (path, headers, query)
        assert "token" in r.json()["error"]


def test_token_by_query_or_bearer_header(client):
    assert client.get(f"/api/assays?token={TOKEN}").status_code == 200
    assert client.get("/api/assays", headers=auth()).status_code == 200
    assert client.get("/api/assays", headers={"Authorization": f"bearer {TOKEN}"}).status_code == 200


def test_other_host_names_are_refused(client):
    # DNS rebinding: a page on another name that resolves to 127.0.0.1 must not be answered
    r = client.get("/api/assays", headers={**auth(), "Host": "evil.example:8000"})
    assert r.status_code == 403 and "host" in r.json()["error"]


def test_security_headers_on_every_answer(client):
    for r in (client.get("/"), client.get(f"/?token={TOKEN}"), client.get("/api/nothing", headers=auth()),
              client.post("/api/cut", headers=auth(), content=b"{")):
        assert r.headers["content-security-policy"] == CSP
        assert r.headers["x-content-type-options"] == "nosniff"
        assert r.headers["referrer-policy"] == "no-referrer"
    assert "script-src 'self'" in CSP and "unsafe" not in CSP and "frame-ancestors 'none'" in CSP


def test_the_page_loads_only_its_own_scripts(client):
    page = client.get(f"/?token={TOKEN}").text
    import re

    srcs = re.findall(r'<script[^>]*src="([^"]+)"', page)
    assert srcs == [f"/static/{name}?token={TOKEN}" for name in SCRIPTS]
    assert "<script>" not in page and "onclick" not in page and "style=" not in page  # nothing inline under the CSP
    for src in srcs:
        assert client.get(src).headers["content-type"].startswith("text/javascript")


# -- the answers --------------------------------------------------------------------------------------------
def test_assays_lists_the_loaded_crudes(client):
    d = client.get("/api/assays", headers=auth()).json()
    assert [a["name"] for a in d["assays"]] == ["Selkie Light", "Brannock Blend", "Tarn Heavy"]
    assert [c["name"] for c in d["cut_set"]["cuts"]] == default_cut_set().names
    assert d["prices"] is True and d["currency"] == "USD"
    assert any("ASTM D93" in n for n in d["notes"]) and any("H2S" in n for n in d["notes"])
    for a in d["assays"]:
        t = a["curve"]["temp_c"]
        assert all(b >= x for x, b in zip(t, t[1:]))  # a TBP curve never falls (common practice, no source)
        assert a["curve"]["vol_pct"][0] == 0.0 and a["curve"]["vol_pct"][-1] == 100.0


@pytest.mark.parametrize("assay_index,ends", [(0, {"kerosene": 240.0, "diesel": 350.0}), (2, {"heavy naphtha": 160.5}),
                                              (1, {})])
def test_cut_equals_the_command_line(client, demo_paths, assay_index, ends):
    path = demo_paths[assay_index]
    name = load_assay(path).name
    args = ["yields", path, "--json"] + [f"--end={k}={v!r}" for k, v in ends.items()]
    expected = cli_json(args)
    got = client.post("/api/cut", headers=auth(), json={"assay": name, "ends": ends}).json()
    assert got == expected
    # mass balance on both bases (identity)
    assert sum(c["vol_pct"] for c in got["cuts"]) == pytest.approx(100.0, abs=1e-9)
    assert sum(c["wt_pct"] for c in got["cuts"]) == pytest.approx(100.0, abs=1e-9)


def test_moving_a_cut_point_moves_volume_between_neighbours(client):
    # Raising the kerosene end by 10 °C takes from diesel exactly what kerosene gains; the rest stays (identity).
    a = client.post("/api/cut", headers=auth(), json={"assay": "Selkie Light", "ends": {}}).json()["cuts"]
    b = client.post("/api/cut", headers=auth(),
                    json={"assay": "Selkie Light", "ends": {"kerosene": 242}}).json()["cuts"]
    dv = {x["name"]: y["vol_pct"] - x["vol_pct"] for x, y in zip(a, b)}
    assert dv["kerosene"] > 1.0 and dv["diesel"] == pytest.approx(-dv["kerosene"], abs=1e-9)
    assert all(abs(v) < 1e-9 for k, v in dv.items() if k not in ("kerosene", "diesel"))


def test_worth_equals_compare_and_margin_is_worth_less_the_crude_price(client, demo_paths):
    expected = cli_json(["compare", *demo_paths, "--prices", PRICES, "--json"])["worth"]
    for row in expected:
        got = client.post("/api/worth", headers=auth(), json={"assay": row["crude"], "ends": {}}).json()
        assert got["worth_per_bbl"] == pytest.approx(row["worth_per_bbl"], rel=1e-12)
        assert got["margin_per_bbl"] == pytest.approx(row["margin_per_bbl"], rel=1e-12)
    # the demo price file gives Selkie Light 84.0 USD/bbl
    got = client.post("/api/worth", headers=auth(), json={"assay": "Selkie Light", "ends": {"diesel": 360}}).json()
    assert got["margin_per_bbl"] == pytest.approx(got["worth_per_bbl"] - 84.0, abs=1e-9)
    assert sum(p["worth_per_bbl"] for p in got["products"]) == pytest.approx(got["worth_per_bbl"], rel=1e-12)


def test_saved_cut_set_reads_back_and_cuts_the_same(client, tmp_path, demo_paths):
    ends = {"kerosene": 236.5, "vacuum gas oil": 540.0}
    r = client.post("/api/cutset", headers=auth(), json={"ends": ends})
    assert r.status_code == 200 and "attachment" in r.headers["content-disposition"]
    f = tmp_path / "explored.toml"
    f.write_bytes(r.content)
    cs = read_cut_set(str(f))
    want = dict(zip(default_cut_set().names, default_cut_set().ends_c))
    want.update(ends)
    assert dict(zip(cs.names, cs.ends_c)) == want
    by_file = cli_json(["yields", demo_paths[0], "--cuts", str(f), "--json"])["cuts"]
    by_api = client.post("/api/cut", headers=auth(), json={"assay": "Selkie Light", "ends": ends}).json()["cuts"]
    assert by_file == by_api


def test_report_workbook_holds_the_cut_points_asked_for(client):
    import openpyxl

    r = client.post("/api/report", headers=auth(), json={"assay": "Tarn Heavy", "ends": {"diesel": 355.0}})
    assert r.status_code == 200 and r.headers["content-type"].startswith("application/vnd.openxmlformats")
    wb = openpyxl.load_workbook(io.BytesIO(r.content), read_only=True)
    rows = list(wb["cuts"].iter_rows(values_only=True))
    head = rows[0]
    diesel = next(x for x in rows if x[head.index("Cut")] == "diesel")
    assert diesel[head.index("End TBP [°C]")] == 355.0


# -- bad requests ---------------------------------------------------------------------------------------------
@pytest.mark.parametrize("body,status,words", [
    (b"{", 400, "not valid JSON"),
    (b"[1, 2]", 400, "JSON object"),
    (b'{"assay": "Selkie Light", "ends": {"kerosene": NaN}}', 400, "finite"),
    (b'{"assay": "Selkie Light", "ends": {"kerosene": true}}', 400, "finite"),
    (b'{"assay": "Selkie Light", "ends": {"kerosene": "hot"}}', 400, "finite"),
    (b'{"assay": "Selkie Light", "ends": [240]}', 400, "'ends' must be an object"),
    (b'{"assay": "Selkie Light", "ends": {"jet": 240}}', 400, "no cut named 'jet'"),
    (b'{"assay": "Selkie Light", "ends": {"kerosene": 400}}', 400, "cut points must increase"),
    (b'{"assay": "Selkie Light", "ends": {"vacuum residue": 700}}', 400, "no end to change"),
    (b'{"assay": "Selkie Light", "ends": {}, "path": "/etc/passwd"}', 400, "unknown key 'path'"),
    (b'{"assay": "../../etc/passwd", "ends": {}}', 404, "no crude named"),
    (b'{"assay": 3, "ends": {}}', 400, "name of a loaded crude"),
    (b'{"ends": {}}', 400, "name of a loaded crude"),
    ("{\"assay\": \"Selkie Light\", \"ends\": {\"kerosene\": 240}}".encode("utf-16"), 400, "not valid JSON"),
    (b'{"assay": "Selkie Light", "ends": ' + b"[" * 5000 + b"]" * 5000 + b"}", 400, "nested too deeply"),
    (b'{"assay": "Selkie Light", "ends": {"kerosene": 1' + b"0" * 399 + b"}}", 400, "a number of 400 digits"),
    (b'{"assay": "Selkie Light", "ends": {"kerosene": 1' + b"0" * 5000 + b"}}", 400, "not valid JSON"),
    (b'{"assay": "Selkie Light", "ends": {}, "rate_bbl_per_day": 0}', 400, "crude run above 0"),
    (b'{"assay": "Selkie Light", "ends": {}, "rate_bbl_per_day": "100000"}', 400, "crude run above 0"),
    (b'{"assay": "Selkie Light", "ends": {}, "rate_bbl_per_day": 1e12}', 400, "at most 10,000,000 bbl/d"),
])
def test_bad_bodies_get_a_one_line_4xx(client, body, status, words):
    r = client.post("/api/cut", headers={**auth(), "Content-Type": "application/json"}, content=body)
    assert r.status_code == status, r.text
    msg = r.json()["error"]
    assert words in msg and "\n" not in msg and "Traceback" not in msg


def test_wrong_content_type_oversize_body_and_wrong_method(client):
    r = client.post("/api/cut", headers={**auth(), "Content-Type": "text/plain"}, content=b"{}")
    assert r.status_code == 415
    big = json.dumps({"assay": "Selkie Light", "ends": {f"c{i}": i for i in range(3000)}}).encode()
    assert len(big) > MAX_BODY_BYTES
    r = client.post("/api/cut", headers={**auth(), "Content-Type": "application/json"}, content=big)
    assert r.status_code == 413 and "larger than" in r.json()["error"]
    assert client.get("/api/cut", headers=auth()).status_code == 405
    assert client.get("/static/..%2F..%2Fpyproject.toml", headers=auth()).status_code == 404
    assert client.get("/static/session.py", headers=auth()).status_code == 404


def test_worth_without_prices_is_a_404(demo_paths):
    ex = Explorer([(demo_paths[0], load_assay(demo_paths[0]))], default_cut_set(), read_limits(None))
    c = TestClient(make_app(ex, TOKEN), base_url="http://127.0.0.1")
    r = c.post("/api/worth", headers=auth(), json={"assay": "Selkie Light", "ends": {}})
    assert r.status_code == 404 and "--prices" in r.json()["error"]
    assert c.get("/api/assays", headers=auth()).json()["prices"] is False


def test_the_same_crude_twice_is_refused(demo_paths, tmp_path):
    import shutil

    from assaycut.errors import AssaycutError

    twin = tmp_path / "twin.xlsx"
    shutil.copy(demo_paths[0], twin)
    with pytest.raises(AssaycutError, match="also in"):
        Explorer([(p, load_assay(p)) for p in (demo_paths[0], str(twin))], default_cut_set(), [])


# -- the crude run, units, a cut set the user loads -----------------------------------------------------------
def test_a_crude_run_gives_the_command_lines_rates_and_worth_per_day(client, demo_paths):
    # /api/cut with a run is `yields --end ... --rate R --json`; worth per day is worth per bbl x run (definition).
    expected = cli_json(["yields", demo_paths[1], "--json", "--rate", "85000", "--end", "kerosene=240"])
    body = {"assay": "Brannock Blend", "ends": {"kerosene": 240}, "rate_bbl_per_day": 85000}
    got = client.post("/api/cut", headers=auth(), json=body).json()
    assert got == expected and got["cuts"][3]["bbl_per_day"] == pytest.approx(85000 * got["cuts"][3]["vol_pct"] / 100)
    w = client.post("/api/worth", headers=auth(), json=body).json()
    assert w["worth_per_day"] == pytest.approx(85000 * w["worth_per_bbl"], rel=1e-12)
    assert w["margin_per_day"] == pytest.approx(85000 * w["margin_per_bbl"], rel=1e-12)
    assert "worth_per_day" not in client.post("/api/worth", headers=auth(), json={"assay": "Brannock Blend"}).json()


def test_limits_and_page_columns_name_their_units(client):
    # The page shows temperatures in °F by these units: every *_c limit and column is °C (the project's naming
    # rule, common practice, no source), yields are vol % / wt %.
    doc = client.post("/api/cut", headers=auth(), json={"assay": "Selkie Light", "ends": {}}).json()
    for lim in doc["limits"]:
        assert (lim["unit"] == "°C") == (lim["property"].endswith(("_c", "_c_est"))), lim
    d = client.get("/api/assays", headers=auth()).json()
    assert d["units"]["d86_90_c"] == "°C" and d["units"]["flash_c_est"] == "°C" and d["units"]["vol_pct"] == "vol %"
    assert d["unit"] == "C"


def read_cuts(client, text: str, name: str = "plant.toml"):
    return client.post("/api/cutset/read", headers=auth(), json={"file": name, "toml": text})


def test_a_loaded_cut_set_gives_its_cut_points_in_celsius(client):
    # A cut set in °F: 450 °F = 232.22 °C and 680 °F = 360 °C (°C = (°F - 32) / 1.8, the definition).
    names = default_cut_set().names
    text = "".join(f'[[cut]]\nname = "{n}"\n' + ({"kerosene": "end_f = 450\n", "diesel": "end_f = 680\n"}.get(n) or
                   (f"end_c = {float(e)!r}\n" if e is not None else ""))
                   for n, e in zip(names, [*default_cut_set().ends_c, None]))
    r = read_cuts(client, text)
    assert r.status_code == 200, r.text
    doc = r.json()
    assert doc["ends"]["kerosene"] == pytest.approx(232.2222222, abs=1e-6)
    assert doc["ends"]["diesel"] == pytest.approx(360.0, abs=1e-9)
    assert doc["label"] == "plant.toml" and doc["notes"] == []
    # the same file with an overlap: the page cuts ideally and says so
    r = read_cuts(client, text.replace("end_f = 680\n", "end_f = 680\noverlap_c = 20\n"))
    assert any("overlap_c" in n and "diesel" in n for n in r.json()["notes"])


@pytest.mark.parametrize("text,words", [
    ('[[cut]]\nname = "naphtha"\nend_c = 180\n[[cut]]\nname = "residue"\n', "not this page's products"),
    ('[[cut]]\nname = "naphtha"\nend_c = "hot"\n', "'end_c' must be a number"),
    ("[[cut]\n", "not valid TOML"),
    ("x" * 13_000, "at most 12,000"),
])
def test_a_cut_set_the_page_cannot_use_is_one_line_naming_the_file(client, text, words):
    r = read_cuts(client, text, "mine.toml")
    assert r.status_code == 400 and words in r.json()["error"] and "mine.toml" in r.json()["error"]
    assert "\n" not in r.json()["error"]
    r = client.post("/api/cutset/read", headers=auth(), json={"toml": "[[cut]]"})
    assert r.status_code == 400 and '{"file": NAME, "toml": TEXT}' in r.json()["error"]


def test_explore_unit_option_starts_the_page_in_fahrenheit(demo_paths):
    ex = Explorer([(demo_paths[0], load_assay(demo_paths[0]))], default_cut_set(), [], unit="F")
    c = TestClient(make_app(ex, TOKEN), base_url="http://127.0.0.1")
    assert c.get("/api/assays", headers=auth()).json()["unit"] == "F"
