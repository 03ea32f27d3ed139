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
