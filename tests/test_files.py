"""A report set is whole or absent: a stop at any file of the set (Ctrl-C, SIGTERM, SIGKILL, a full disk) leaves
the folder holding either its earlier set or the new one, never a mix, and the run's last line says which.

What is checked is a promise of the project's README ("Limits and safety"); the way it is kept (stage, record,
rename, roll forward) is common practice for atomic multi-file updates, no source.  The file contents below
are placeholders, never expected values of a property."""

from __future__ import annotations

import errno
import os
import shutil
import signal
import subprocess
import sys
from pathlib import Path

import pytest

from assaycut import files
from assaycut.errors import InputError
from tests.helpers import ctrl_c_as_at_a_terminal

OLD = {"c_yields.xlsx": b"old book", "c_cuts.csv": b"old cuts", "c_summary.md": b"old summary",
       "c_products.png": b"old products"}
NEW = {"c_yields.xlsx": b"new book", "c_cuts.csv": b"new cuts", "c_summary.md": b"new summary",
       "c_tbp.png": b"new curve"}
FAMILY = ("c_products.png", "c_tbp.png")
"""The earlier set has an optional plot the new one lacks (it must go), the new one a plot the old lacks."""

STOP_AT = r'''
import os, signal, sys
from pathlib import Path
from assaycut import files
from assaycut.cli import _on_sigterm
from assaycut.cli.common import guarded

folder, phase, at, sig = Path(sys.argv[1]), sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
signal.signal(signal.SIGTERM, _on_sigterm)
count = {"write": 0, "move": 0}
real_write, real_replace = files._write_new, os.replace


def write(path, data, mode):
    count["write"] += 1
    if phase == "write" and count["write"] == at:
        os.kill(os.getpid(), sig)
    real_write(path, data, mode)


def replace(src, dst):
    if files.STAGE_PREFIX in str(src) and not str(src).endswith(".part"):
        count["move"] += 1
        if phase == "move" and count["move"] == at:
            os.kill(os.getpid(), sig)
    real_replace(src, dst)


files._write_new, os.replace = write, replace
NEW = {"c_yields.xlsx": b"new book", "c_cuts.csv": b"new cuts", "c_summary.md": b"new summary",
       "c_tbp.png": b"new curve"}
guarded(files.place_set)(folder, NEW, (), ("c_products.png", "c_tbp.png"))
print("went on")
'''


def _visible(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in folder.iterdir() if not p.name.startswith(".")}


def _old_folder(tmp_path: Path) -> Path:
    folder = tmp_path / "report"
    folder.mkdir()
    for name, data in OLD.items():
        (folder / name).write_bytes(data)
    return folder


# the record counts as the fifth write; moves are the four renames into place
STOPS = [("write", k) for k in range(1, 6)] + [("move", k) for k in range(1, 5)]


@pytest.mark.parametrize("phase,at", STOPS)
@pytest.mark.parametrize("sig,code,word", [(signal.SIGINT, 130, "interrupted"), (signal.SIGTERM, 143, "terminated")])
def test_a_stop_at_each_file_leaves_one_whole_set(tmp_path, phase, at, sig, code, word):
    folder = _old_folder(tmp_path)
    r = subprocess.run([sys.executable, "-c", STOP_AT, str(folder), phase, str(at), str(int(sig))],
                       capture_output=True, text=True, timeout=60, preexec_fn=ctrl_c_as_at_a_terminal)
    assert r.returncode == code, r.stderr
    assert "went on" not in r.stdout and "Traceback" not in r.stderr
    seen = _visible(folder)
    assert seen in (OLD, NEW), sorted(seen.items())
    assert [p for p in folder.iterdir() if p.name.startswith(".")] == []  # no staging folder left
    if seen == OLD:  # the stop message is true either way
        assert r.stderr.strip() == f"assaycut: error: {word}; no partial report was left"
        assert phase == "write"
    else:
        assert f"{word} after the report in {folder} was complete" in r.stderr
        assert phase == "move" or at == 5


@pytest.mark.parametrize("phase,at", STOPS)
def test_sigkill_at_each_file_is_settled_by_the_next_run(tmp_path, phase, at):
    # SIGKILL gives the run no chance: the next run writing into the folder completes a wholly staged set
    # (it has its record) and removes any other before it writes.
    folder = _old_folder(tmp_path)
    r = subprocess.run([sys.executable, "-c", STOP_AT, str(folder), phase, str(at), str(int(signal.SIGKILL))],
                       capture_output=True, text=True, timeout=60)
    assert r.returncode == -signal.SIGKILL
    files.check_targets(folder, ["other.csv"])  # what every report write does first
    seen = _visible(folder)
    assert seen == (NEW if phase == "move" else OLD)
    assert [p for p in folder.iterdir() if p.name.startswith(".")] == []


def test_a_live_writers_staging_folder_is_left_alone(tmp_path):
    folder = _old_folder(tmp_path)
    mine = folder / f"{files.STAGE_PREFIX}{os.getpid()}-abc123"
    mine.mkdir()
    files.settle_stale_stages(folder)
    assert mine.is_dir()


def test_a_full_disk_leaves_the_earlier_set(tmp_path, monkeypatch):
    # An injected ENOSPC at the third file (as a full disk gives on write); the tiny-filesystem test below
    # does it for real where the machine allows a private tmpfs.
    folder = _old_folder(tmp_path)
    real, count = files._write_new, [0]

    def write(path, data, mode):
        count[0] += 1
        if count[0] == 3:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        real(path, data, mode)

    monkeypatch.setattr(files, "_write_new", write)
    with pytest.raises(InputError, match="No space left on device.*earlier report is unchanged"):
        files.place_set(folder, NEW, (), FAMILY)
    assert _visible(folder) == OLD
    assert [p for p in folder.iterdir() if p.name.startswith(".")] == []


TINY_DISK = r'''
set -e
mkdir -p "$1"
mount -t tmpfs -o size=500k tmpfs "$1"
cd "$2"
"$3" -m assaycut yields assaycut/data/selkie_light.xlsx --out "$1/r" > /dev/null 2>&1
sha256sum "$1"/r/* > "$1/../before.txt"
set +e
"$3" -m assaycut yields assaycut/data/selkie_light.xlsx --end diesel=300 --out "$1/r" > /dev/null 2> "$1/../err.txt"
echo "exit $?" >> "$1/../err.txt"
sha256sum "$1"/r/* > "$1/../after.txt"
ls -A "$1/r" > "$1/../list.txt"
'''


def _private_tmpfs() -> bool:
    if not shutil.which("unshare"):
        return False
    r = subprocess.run(["unshare", "-rm", "sh", "-c", "mount -t tmpfs -o size=64k tmpfs /mnt 2>/dev/null || "
                        "mount -t tmpfs -o size=64k tmpfs \"$(mktemp -d)\""], capture_output=True, timeout=30)
    return r.returncode == 0


@pytest.mark.skipif(not _private_tmpfs(), reason="no private tmpfs (unshare -rm) on this machine")
def test_a_tiny_filesystem_keeps_the_earlier_report(tmp_path):
    # A real full disk: a 500 KB tmpfs holds one yield report of the demo crude (about 330 KB) but not a
    # second staged beside it.  The second run fails with a one-line error and the first report stays.
    root = Path(__file__).resolve().parent.parent
    mnt = tmp_path / "mnt"
    env = dict(os.environ, PYTHONPATH=str(root))
    r = subprocess.run(["unshare", "-rm", "sh", "-c", TINY_DISK, "sh", str(mnt), str(root), sys.executable],
                       capture_output=True, text=True, timeout=300, env=env)
    assert r.returncode == 0, r.stderr
    err = (tmp_path / "err.txt").read_text()
    assert err.splitlines()[-1] == "exit 2", err
    assert (tmp_path / "after.txt").read_text() == (tmp_path / "before.txt").read_text()
    assert "No space left on device" in err and "earlier report is unchanged" in err
    assert len([x for x in err.splitlines() if x.startswith("assaycut: error")]) == 1
    assert not any(x.startswith(".") for x in (tmp_path / "list.txt").read_text().split())


def test_a_killed_runs_claims_folder_is_removed_by_the_next_batch(tmp_path, monkeypatch):
    import tempfile

    from assaycut.cli import batch_runner

    monkeypatch.setattr(tempfile, "tempdir", str(tmp_path))
    gone = subprocess.Popen([sys.executable, "-c", "pass"])
    gone.wait()  # a process that no longer runs
    stale = tmp_path / f"{batch_runner.CLAIMS_PREFIX}{gone.pid}-x1y2"
    live = tmp_path / f"{batch_runner.CLAIMS_PREFIX}{os.getppid()}-a1b2"
    for d in (stale, live):
        d.mkdir()
        (d / "Crude_A").write_text("")
    fresh = batch_runner.new_claims(tmp_path / "reports")
    try:
        assert not stale.exists()
        assert live.is_dir()
        assert Path(fresh).name.startswith(f"{batch_runner.CLAIMS_PREFIX}{os.getpid()}-")
    finally:
        batch_runner.release_claims(fresh)
