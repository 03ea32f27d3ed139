"""File helpers shared by the readers and the report writers: files written whole or not at all (a
temporary file in the same folder, then renamed), and text escaped against spreadsheet formula injection."""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path

from .errors import InputError

_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")


def safe_text(value):
    """Text that a spreadsheet will show as text, never run as a formula.

    A string that starts with ``=``, ``+``, ``-``, ``@``, tab or carriage return is prefixed with a single
    quote (the OWASP CSV-injection advice).  A lone "-" (a dimensionless unit, or a missing value) cannot be
    a formula and stays as it is.  Non-strings are returned unchanged.

    Examples
    --------
    >>> safe_text('=HYPERLINK("http://example.invalid","x")')
    '\\'=HYPERLINK("http://example.invalid","x")'
    >>> safe_text("Selkie Light"), safe_text("-")
    ('Selkie Light', '-')
    """
    if isinstance(value, str) and value.startswith(_TRIGGERS) and value != "-":
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
    for src in inputs:
        with contextlib.suppress(OSError):
            if Path(src).exists() and target.exists() and os.path.samefile(src, target):
                raise InputError(f"refusing to write the report over the input file {src}", file=str(target))
        if Path(src).resolve() == target.resolve():
            raise InputError(f"refusing to write the report over the input file {src}", file=str(target))
    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=target.parent)
    os.close(fd)
    _PENDING.add(tmp)
    try:
        write(tmp)
        os.replace(tmp, target)
    finally:
        _PENDING.discard(tmp)
        with contextlib.suppress(OSError):
            if os.path.exists(tmp):
                os.unlink(tmp)
    return target
