"""Slow studies show a progress bar on a terminal, and nothing when stderr is piped (common practice for
command-line tools, no source)."""

from __future__ import annotations

import os
import pty
import select
import subprocess
import sys

import pytest

ARGS = [sys.executable, "-m", "assaycut", "optimize", "--maximize", "diesel", "--json"]


def _env():
    return dict(os.environ, TERM="xterm", COLUMNS="100")


def _read_all(fd) -> bytes:
    out = b""
    while True:
        r, _, _ = select.select([fd], [], [], 0.2)
        if not r:
            return out
        try:
            chunk = os.read(fd, 65536)
        except OSError:  # the other end closed
            return out
        if not chunk:
            return out
        out += chunk


@pytest.mark.parametrize("args,label", [(ARGS, b"searching cut points"),
                                        ([sys.executable, "-m", "assaycut", "yields", "--uncertainty", "100",
                                          "--json"], b"uncertainty draws")])
def test_progress_bar_on_a_terminal(args, label):
    master, slave = pty.openpty()
    proc = subprocess.Popen(args, stdout=subprocess.DEVNULL, stderr=slave, env=_env())
    os.close(slave)
    seen = b""
    while proc.poll() is None:
        seen += _read_all(master)
    seen += _read_all(master)
    os.close(master)
    assert proc.returncode == 0
    assert label in seen


def test_no_progress_bar_when_piped():
    r = subprocess.run(ARGS, capture_output=True, env=_env(), timeout=300)
    assert r.returncode == 0
    assert r.stderr == b""
