"""File helpers shared by the readers and the report writers: files written whole or not at all (a
temporary file in the same folder, then renamed), and text escaped against spreadsheet formula injection."""

from __future__ import annotations

import contextlib
import functools
import glob
import os
import re
import secrets
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
"""Temporary files being written now; removed by :func:`cleanup_pending` on interruption."""


def cleanup_pending() -> None:
    """Remove temporary files of writes that did not finish (called on Ctrl-C or SIGTERM)."""
    for p in list(_PENDING):
        with contextlib.suppress(OSError):
            os.unlink(p)
        _PENDING.discard(p)


def atomic_write(path: str | os.PathLike, write, *, inputs: tuple[str, ...] = ()) -> Path:
    """Call ``write(tmp_path)`` and rename the result onto ``path``.

    Parameters
    ----------
    path : path-like
        Final file.
    write : callable
        Writes the whole file to the temporary path it is given.
    inputs : tuple of str
        Input files of the run; writing onto one of them is refused.

    Returns
    -------
    pathlib.Path
        The final path.
    """
    target = Path(path)
    clash = input_clash(target, inputs)
    if clash is not None:
        raise InputError(f"refusing to write the report over the input file {clash}", file=str(target))
    prepare_folder(target.parent)
    mode = _mode_for(target)
    # the temporary name is registered before the file exists, so that an interruption at any point leaves
    # nothing behind (cleanup_pending removes registered names that exist)
    tmp = str(target.parent / f".{target.name}.{secrets.token_hex(6)}{TEMP_SUFFIX}")
    _PENDING.add(tmp)
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    except OSError as exc:
        _PENDING.discard(tmp)
        raise InputError(f"cannot write into this folder ({exc.strerror})", file=str(target.parent)) from None
    os.close(fd)
    try:
        write(tmp)
        os.chmod(tmp, mode)
        os.replace(tmp, target)
    except OSError as exc:
        raise InputError(f"cannot write the report file ({exc.strerror or exc})", file=str(target)) from None
    finally:
        _PENDING.discard(tmp)
        with contextlib.suppress(OSError):
            if os.path.exists(tmp):
                os.unlink(tmp)
    return target


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
"""Suffix of the temporary file of a write in progress (``.<name>.<random>.part`` beside the target)."""


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
    by a folder or an input file; stale temporary files of these names from a killed run are removed."""
    prepare_folder(folder)
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
