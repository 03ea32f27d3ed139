"""File helpers shared by the readers and the report writers: report sets written whole or not at all (staged
in a folder beside the targets, then renamed into place with a roll-forward record), and text escaped against
spreadsheet formula injection."""

from __future__ import annotations

import contextlib
import functools
import glob
import json
import os
import re
import secrets
import shutil
from pathlib import Path

from .errors import InputError

_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")
_ILLEGAL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f]")


def safe_text(value):
    """Text that a spreadsheet will show as text, never run as a formula.

    A string that starts with ``=``, ``+``, ``-``, ``@``, tab or carriage return is prefixed with a single
    quote (the OWASP CSV-injection advice).  A lone "-" (a dimensionless unit, or a missing value) cannot be
    a formula and stays as it is.  Control characters a spreadsheet cannot hold become '?'.  Non-strings
    are returned unchanged.

    Examples
    --------
    >>> safe_text('=HYPERLINK("http://example.invalid","x")')
    '\\'=HYPERLINK("http://example.invalid","x")'
    >>> safe_text("Selkie Light"), safe_text("-")
    ('Selkie Light', '-')
    """
    if isinstance(value, str):
        value = _ILLEGAL.sub("?", value)  # characters a spreadsheet cannot hold (XML 1.0) shown as '?'
        if value.startswith(_TRIGGERS) and value != "-":
            return "'" + value
    return value


_PENDING: set[str] = set()
"""Staging folders of report sets being written now; settled by :func:`cleanup_pending` on interruption."""

STAGE_PREFIX = ".assaycut-stage-"
"""Start of a staging folder's name: ``.assaycut-stage-<pid>-<random>`` in the report folder, where ``pid`` is
the process writing it."""
_RECORD = "placing.json"
"""The roll-forward record of a staging folder: written (atomically) once every file of the set is staged;
it lists the files to move into place and the files of an earlier set to remove."""


def cleanup_pending() -> list[str]:
    """Settle the report sets of this process that were being written when it was stopped (Ctrl-C, SIGTERM):
    a set whose files were all staged is completed, any other is removed and the folder keeps its earlier
    report.

    Returns
    -------
    list of str
        The folders where a report set was completed.
    """
    done = []
    for stage in list(_PENDING):
        if settle_stage(Path(stage)):
            done.append(str(Path(stage).parent))
        _PENDING.discard(stage)
    return done


def settle_stage(stage: Path) -> bool:
    """Finish or undo one staging folder (idempotent): with its roll-forward record, move its remaining files
    into place and remove the earlier set's extra files (True); without, remove it (False)."""
    folder = stage.parent
    completed = False
    with contextlib.suppress(OSError, ValueError, KeyError, TypeError):
        record = json.loads((stage / _RECORD).read_text("utf-8"))
        for name in record["place"]:
            with contextlib.suppress(FileNotFoundError):  # moved already (by the writer, or an earlier settle)
                os.replace(stage / name, folder / name)
        for name in record["drop"]:
            with contextlib.suppress(FileNotFoundError):
                os.unlink(folder / name)
        completed = True
    shutil.rmtree(stage, ignore_errors=True)
    return completed


def pid_alive(pid: int) -> bool:
    """Whether process ``pid`` runs.  On Linux from /proc: a zombie (killed, not yet reaped) does not run;
    elsewhere, whether the process exists (one of another user counts)."""
    if os.path.isdir("/proc/self"):
        try:
            with open(f"/proc/{pid}/stat", "rb") as fh:
                return fh.read().rsplit(b")", 1)[1].split()[0] not in (b"Z", b"X")
        except (OSError, IndexError):
            return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OverflowError):
        return True
    return True


def owner_gone(name: str, prefix: str, dead: frozenset[int] = frozenset()) -> bool:
    """Whether ``name`` is ``<prefix><pid>-<random>`` of a process that no longer runs (or is in ``dead``:
    processes just killed): the temporary folders of assaycut runs carry their writer's pid so."""
    m = re.fullmatch(re.escape(prefix) + r"(\d+)-\w+", name)
    return m is not None and (int(m.group(1)) in dead or not pid_alive(int(m.group(1))))


def settle_stale_stages(folder: Path, dead: frozenset[int] = frozenset()) -> None:
    """Settle the staging folders in ``folder`` left by writers that no longer run (a killed run, or the pids
    in ``dead``: worker processes just killed); those of a live writer are left alone."""
    with contextlib.suppress(OSError):
        for stage in Path(folder).glob(f"{glob.escape(STAGE_PREFIX)}*"):
            if stage.is_dir() and owner_gone(stage.name, STAGE_PREFIX, dead):
                settle_stage(stage)


def place_set(folder: Path, files: dict[str, bytes], inputs: tuple[str, ...] = (),
              family: tuple[str, ...] = ()) -> list[Path]:
    """Write a report set into ``folder`` whole or not at all.

    Every file is first written into a staging folder beside the targets (``.assaycut-stage-<pid>-<random>``);
    a full disk or any other failure there removes it and leaves the folder's earlier report as it was.  Once
    all files are staged, a roll-forward record is written and the files are renamed into place, and the files
    of ``family`` that the new set does not have (an earlier run's optional plot) are removed.  A stop in that
    last step is completed by :func:`cleanup_pending` (Ctrl-C, SIGTERM) or, after SIGKILL, by the next run
    that writes into the folder (:func:`settle_stale_stages`), so a reader is never left with a mix of sets.

    Parameters
    ----------
    folder : pathlib.Path
        Report folder (created if missing).
    files : dict of str to bytes
        File name -> content of the whole set.
    inputs : tuple of str
        Input files of the run; writing onto one of them is refused.
    family : tuple of str
        Names that belong to this kind of report and go when the new set lacks them.

    Returns
    -------
    list of pathlib.Path
        The written files, in the order of ``files``.
    """
    folder = Path(folder)
    check_targets(folder, list(files), inputs)
    stage = folder / f"{STAGE_PREFIX}{os.getpid()}-{secrets.token_hex(6)}"
    _PENDING.add(str(stage))  # registered before it exists: an interruption at any point leaves nothing behind
    try:
        os.mkdir(stage, 0o700)
        for name, data in files.items():
            _write_new(stage / name, data, _mode_for(folder / name))
        record = json.dumps({"place": list(files), "drop": [n for n in family if n not in files]})
        _write_new(stage / (_RECORD + TEMP_SUFFIX), record.encode("utf-8"), 0o600)
        os.replace(stage / (_RECORD + TEMP_SUFFIX), stage / _RECORD)
    except OSError as exc:
        _PENDING.discard(str(stage))
        shutil.rmtree(stage, ignore_errors=True)
        raise InputError(f"cannot write the report ({exc.strerror or exc}); the folder's earlier report is "
                         f"unchanged", file=str(folder)) from None
    # an interruption from here on leaves the stage registered: cleanup_pending completes it
    placed = settle_stage(stage)
    _PENDING.discard(str(stage))
    if not placed:
        raise InputError("the staged report could not be moved into place", file=str(folder))
    return [folder / name for name in files]


def _write_new(path: Path, data: bytes, mode: int) -> None:
    """Write ``data`` into a new file ``path`` with permission bits ``mode`` (OSError on a full disk)."""
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    try:
        view = memoryview(data)
        while view:
            view = view[os.write(fd, view):]
        os.fchmod(fd, mode)
    finally:
        os.close(fd)


def input_clash(target: Path, inputs: tuple[str, ...]) -> str | None:
    """The input file that ``target`` is (the same resolved path, or the same file by another name: a hard or
    symbolic link), or None.  The inputs are resolved and stat-ed once per run (:func:`_input_identities`)."""
    if not inputs:
        return None
    paths, files = _input_identities(tuple(inputs))
    try:
        hit = paths.get(str(target.resolve()))
    except OSError:
        hit = None
    if hit is None:
        with contextlib.suppress(OSError):
            st = target.stat()
            hit = files.get((st.st_dev, st.st_ino))
    return hit


@functools.lru_cache(maxsize=8)
def _input_identities(inputs: tuple[str, ...]) -> tuple[dict, dict]:
    """{resolved path: input} and {(device, inode): input} of a run's input files (those that exist)."""
    paths, files = {}, {}
    for src in inputs:
        with contextlib.suppress(OSError):
            paths.setdefault(str(Path(src).resolve()), src)
            st = os.stat(src)
            files.setdefault((st.st_dev, st.st_ino), src)
    return paths, files


TEMP_SUFFIX = ".part"
"""Suffix of a temporary file (the roll-forward record being written; ``.<name>.<random>.part`` beside a
target was an earlier version's temporary report file, still removed when found)."""


def _mode_for(target: Path) -> int:
    """The permission bits a written file gets: an existing file's own, else 0666 less the umask (as any
    program creating a file gets; the temporary file alone would be 0600)."""
    try:
        return target.stat().st_mode & 0o7777
    except OSError:
        mask = os.umask(0)
        os.umask(mask)
        return 0o666 & ~mask


def prepare_folder(folder: Path) -> None:
    """Create a report folder (and its parents), or refuse one that cannot be: a file in its place, no
    permission."""
    if folder.exists() and not folder.is_dir():
        raise InputError("is not a folder; give a folder for the report", file=str(folder))
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(f"cannot create the report folder ({exc.strerror or exc})", file=str(folder)) from None


def check_targets(folder: Path, names, inputs: tuple[str, ...] = ()) -> None:
    """Before a set of report files is written: the folder can be written, and no target name is taken
    by a folder or an input file.  What a killed run left there is settled first: its staging folders
    (:func:`settle_stale_stages`) and stale temporary files of these names."""
    prepare_folder(folder)
    settle_stale_stages(folder)
    if not os.access(folder, os.W_OK | os.X_OK):
        raise InputError("the report folder is read-only; give another --out", file=str(folder))
    for name in names:
        target = folder / name
        if target.is_dir():
            raise InputError(f"a folder named {name!r} is in the way of a report file; nothing was written",
                             file=str(folder))
        clash = input_clash(target, inputs)
        if clash is not None:
            raise InputError(f"refusing to write the report over the input file {clash}", file=str(target))
        for stale in folder.glob(f".{glob.escape(name)}.*{TEMP_SUFFIX}"):
            with contextlib.suppress(OSError):
                stale.unlink()
