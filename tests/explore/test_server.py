"""``assaycut explore`` as a user runs it: the one printed line, loopback only, a fresh token, Ctrl-C."""

from __future__ import annotations

import json
import signal
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request

from tests.explore.serving import running_explorer


def get(url: str, token: str | None = None):
    req = urllib.request.Request(url, headers={"Authorization": f"Bearer {token}"} if token else {})
    try:
        with urllib.request.urlopen(req, timeout=10) as r:
            return r.status, r.read()
    except urllib.error.HTTPError as e:
        return e.code, e.read()


def listening_addresses(port: int) -> set[str]:
    """Local addresses listening on ``port``, from /proc/net/tcp (Linux): hex IPv4 in network order."""
    out = set()
    with open("/proc/net/tcp") as f:
        lines = f.read().splitlines()[1:]
    for line in lines:
        local, state = line.split()[1], line.split()[3]
        ip_hex, port_hex = local.split(":")
        if int(port_hex, 16) == port and state == "0A":  # 0A = LISTEN
            out.add(socket.inet_ntoa(bytes.fromhex(ip_hex)[::-1]))
    return out


def test_prints_one_address_serves_with_the_token_and_stops_on_ctrl_c():
    with running_explorer() as (url, port, token, proc):
        base = f"http://127.0.0.1:{port}"
        status, body = get(f"{base}/api/assays", token)
        assert status == 200 and [a["name"] for a in json.loads(body)["assays"]] == \
            ["Selkie Light", "Brannock Blend", "Tarn Heavy"]
        assert get(f"{base}/api/assays")[0] == 403
        assert get(url)[0] == 200  # the printed address opens the page
        assert listening_addresses(port) == {"127.0.0.1"}  # loopback only, never 0.0.0.0
        proc.send_signal(signal.SIGINT)
        t0 = time.monotonic()
        code = proc.wait(10)
        assert time.monotonic() - t0 < 10
        out, err = proc.stdout.read(), proc.stderr.read()
        assert code == 0 and out == "" and "stopped" in err and "Traceback" not in err


def test_each_run_has_its_own_token_and_port_option_is_kept():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        free = s.getsockname()[1]
    with running_explorer("--port", str(free)) as (_, port, token1, _p):
        assert port == free
        with running_explorer() as (_, port2, token2, _q):
            assert token2 != token1 and port2 != port
            assert get(f"http://127.0.0.1:{port2}/api/assays", token1)[0] == 403  # one run's token is not another's


def test_a_port_in_use_is_one_line_and_exit_2():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        s.listen(1)
        busy = s.getsockname()[1]
        r = subprocess.run([sys.executable, "-m", "assaycut", "explore", "--port", str(busy)], capture_output=True,
                           text=True, timeout=60)
    assert r.returncode == 2 and r.stdout == ""
    assert r.stderr.count("\n") == 1 and f"--port {busy}" in r.stderr and "Traceback" not in r.stderr


# -- an explorer that always stops and never stalls (common practice for servers, no source) -----------------
def _stalled_post(port: int, token: str) -> socket.socket:
    """A POST that promises 1000 bytes of body and sends 10."""
    s = socket.create_connection(("127.0.0.1", port), timeout=15)
    s.sendall(f"POST /api/cut HTTP/1.1\r\nHost: 127.0.0.1\r\nAuthorization: Bearer {token}\r\n"
              f"Content-Type: application/json\r\nContent-Length: 1000\r\n\r\n{{\"assay\":".encode())
    return s


def test_a_stalled_body_gets_408_and_never_keeps_the_explorer_from_stopping():
    from assaycut.explore.server import BODY_TIMEOUT_S, SHUTDOWN_TIMEOUT_S

    with running_explorer() as (_, port, token, proc):
        s = _stalled_post(port, token)
        t0 = time.monotonic()
        answer = s.recv(4096).decode("latin-1")
        assert answer.startswith("HTTP/1.1 408"), answer
        assert BODY_TIMEOUT_S - 0.5 < time.monotonic() - t0 < BODY_TIMEOUT_S + 3
        s.close()
        held = _stalled_post(port, token)  # before: still running 40 s after SIGINT
        time.sleep(0.3)
        proc.send_signal(signal.SIGINT)
        t0 = time.monotonic()
        code = proc.wait(15)
        assert time.monotonic() - t0 < SHUTDOWN_TIMEOUT_S + 2
        held.close()
        err = proc.stderr.read()
        assert code == 0 and "Traceback" not in err and err.strip().endswith("assaycut explorer stopped"), err


def test_a_second_ctrl_c_stops_at_once_and_quietly():
    with running_explorer() as (_, port, token, proc):
        held = _stalled_post(port, token)  # keeps the first stop waiting
        time.sleep(0.3)
        proc.send_signal(signal.SIGINT)
        time.sleep(0.3)
        proc.send_signal(signal.SIGINT)
        t0 = time.monotonic()
        code = proc.wait(15)
        assert time.monotonic() - t0 < 1.0
        held.close()
        err = proc.stderr.read()
        assert code == 130 and "Traceback" not in err and "Error" not in err, err
        assert err.strip().splitlines()[-1] == "assaycut explorer stopped"


def test_unfinished_headers_cannot_lock_the_explorer_out():
    # 70 connections that never finish their headers, and no token: more than the server takes at once.  They
    # are closed after the header deadline, a legitimate request is then served, and nothing is logged.
    from assaycut.explore.server import HEADER_TIMEOUT_S, MAX_CONNECTIONS

    with running_explorer() as (_, port, token, proc):
        idle = []
        for _ in range(MAX_CONNECTIONS + 6):
            c = socket.create_connection(("127.0.0.1", port), timeout=15)
            c.sendall(b"GET /api/assays HTTP/1.1\r\nHost: 127.0.0.1\r\nX-Slow: ")
            idle.append(c)
        time.sleep(HEADER_TIMEOUT_S + 1.0)
        assert all(c.recv(100) == b"" for c in idle)  # the server closed every one of them
        status, _ = get(f"http://127.0.0.1:{port}/api/assays", token)
        assert status == 200
        for c in idle:
            c.close()
        proc.send_signal(signal.SIGINT)
        proc.wait(15)
        err = proc.stderr.read()
        assert "WARNING" not in err and "Exceeded" not in err and "Traceback" not in err, err


NO_STARLETTE = r'''
import sys
sys.modules["starlette"] = None  # as on a machine where it is missing: importing it raises ImportError
from assaycut import cli
sys.argv = ["assaycut", "explore"]
cli.main()
'''


def test_a_missing_web_server_is_said_before_any_address():
    # Before: the page's address was printed, then the run died with exit 3 "unexpected ModuleNotFoundError".
    r = subprocess.run([sys.executable, "-c", NO_STARLETTE], capture_output=True, text=True, timeout=60)
    assert r.returncode == 2 and r.stdout == ""
    assert r.stderr.strip().splitlines() == [
        "assaycut: error: the explorer needs its web server (starlette is not installed): reinstall assaycut "
        "(pip install .), which installs starlette and uvicorn"]


def test_the_base_install_carries_the_web_server():
    # `pip install .` (the README's first command) must give a working explorer: the server packages are base
    # dependencies, each with one version floor in the whole file.
    import tomllib
    from pathlib import Path

    meta = tomllib.loads((Path(__file__).parents[2] / "pyproject.toml").read_text())["project"]
    base = {d.split(">")[0].split("=")[0].strip().lower(): d for d in meta["dependencies"]}
    assert "starlette" in base and "uvicorn" in base
    extras = [d for group in meta.get("optional-dependencies", {}).values() for d in group]
    assert not [d for d in extras if d.lower().startswith(("starlette", "uvicorn"))]
