"""Interrupting a parallel batch: Ctrl-C (SIGINT) or SIGTERM to the parent alone stops the whole run within a
few seconds; no worker process is left and no report file appears afterwards (common practice for
command-line tools, no source)."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tests.helpers import ctrl_c_as_at_a_terminal

pytestmark = pytest.mark.skipif(not Path("/proc").exists() or (os.cpu_count() or 1) < 2,
                                reason="needs Linux /proc and two cores for a parallel batch")


def _children(pid: int) -> set[int]:
    """Processes whose parent is ``pid`` (from /proc)."""
    out = set()
    for d in Path("/proc").iterdir():
        if d.name.isdigit():
            try:
                stat = (d / "stat").read_text()
            except OSError:
                continue
            if int(stat.rsplit(")", 1)[1].split()[1]) == pid:
                out.add(int(d.name))
    return out


def _alive(pid: int) -> bool:
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return False
    return stat.rsplit(")", 1)[1].split()[0] != "Z"


def _files(folder: Path) -> set[str]:
    return {str(p) for p in folder.rglob("*") if p.is_file()}


@pytest.mark.parametrize("sig,code,group", [(signal.SIGINT, 130, True), (signal.SIGINT, 130, False),
                                            (signal.SIGTERM, 143, False)])
def test_interrupt_stops_a_parallel_batch(tmp_path, sig, code, group):
    # group: Ctrl-C at a terminal signals the whole process group; otherwise the parent alone is signalled,
    # as a supervisor or `kill` does.
    src = tmp_path / "curves"
    src.mkdir()
    for i in range(80):  # invented curves, inputs only
        (src / f"crude_{i:03d}.csv").write_text("vol_pct,temp_c\n2,20\n10,90\n30,180\n50,270\n70,380\n90,520\n")
    out = tmp_path / "out"
    proc = subprocess.Popen([sys.executable, "-m", "assaycut", "yields", str(src), "--api", "33", "--out",
                             str(out)], stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, start_new_session=True,
                            preexec_fn=ctrl_c_as_at_a_terminal)
    t0 = time.monotonic()
    workers: set[int] = set()
    while time.monotonic() - t0 < 60:  # wait until the workers run and write
        workers |= _children(proc.pid)
        if len(_files(out)) >= 10 and workers:
            break
        time.sleep(0.05)
    assert workers, "the batch did not start worker processes"
    workers |= _children(proc.pid)
    if group:
        os.killpg(proc.pid, sig)
    else:
        os.kill(proc.pid, sig)
    t_sig = time.monotonic()
    try:
        proc.wait(timeout=10)
    finally:
        if proc.poll() is None:
            proc.kill()
    stopped_in = time.monotonic() - t_sig
    err = proc.stderr.read().decode()
    proc.stderr.close()
    assert proc.returncode == code, err
    assert stopped_in < 5.0
    before = _files(out)
    time.sleep(0.3)
    left = {w for w in workers if _alive(w)}
    assert not left, f"worker processes left: {left}"
    time.sleep(1.5)
    assert _files(out) == before, "files appeared after the run stopped"
    assert len([p for p in before if p.endswith("_yields.xlsx")]) < 80  # it really stopped early
