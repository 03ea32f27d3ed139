"""Start ``assaycut explore`` as a user does (a fresh process) and read the address it prints."""

from __future__ import annotations

import contextlib
import os
import re
import signal
import subprocess
import sys
import time

URL_LINE = re.compile(r"^http://127\.0\.0\.1:(\d+)/\?token=([A-Za-z0-9_-]{20,})$")


@contextlib.contextmanager
def running_explorer(*args: str, timeout: float = 30.0):
    """Yield (url, port, token, process) of a running explorer; stop it with SIGINT afterwards."""
    proc = subprocess.Popen([sys.executable, "-m", "assaycut", "explore", *args], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True, env={**os.environ, "PYTHONUNBUFFERED": "1"})
    try:
        t0 = time.monotonic()
        line = proc.stdout.readline().strip()
        m = URL_LINE.match(line)
        assert m, (line, proc.poll(), proc.stderr.read() if proc.poll() is not None else "")
        assert time.monotonic() - t0 < timeout
        yield line, int(m.group(1)), m.group(2), proc
    finally:
        if proc.poll() is None:
            proc.send_signal(signal.SIGINT)
            try:
                proc.wait(10)
            except subprocess.TimeoutExpired:
                proc.kill()
                proc.wait()
        proc.stdout.close()
        proc.stderr.close()
