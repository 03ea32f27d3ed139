"""The quick-curve CSV: two columns, ``vol_pct`` or ``wt_pct`` and ``temp_c``, ``temp_f`` or ``temp_k``.

Whole-crude data come from the command line (``--api``, ``--sg``, ``--density``, ``--sulfur``).  A UTF-8
byte-order mark is accepted; a file whose header uses semicolons is read with ``;`` as the separator and
a decimal comma accepted in its numbers.  The method is TBP.
"""

from __future__ import annotations

import csv
import hashlib
import io
import os

from ..errors import InputError
from ..model.assay import Assay
from ..text import replace_hidden
from .cells import SourceLocation, gravity_from_inputs, parse_curve_rows, read_bytes
from .layout import MAX_CELLS, MAX_COLUMNS, MAX_NAME_CHARS, MAX_ROWS

MAX_FIELD_CHARS = 1000
"""Longest CSV field read (a number or a header needs a few characters)."""
_too_wide = f"more than {MAX_COLUMNS} columns; a curve CSV has two (vol_pct or wt_pct, and temp_c, temp_f or temp_k)"


def _columns_bounded(lines: list[str], delim: str, path: str) -> None:
    """Refuse a line of more than :data:`~assaycut.io.layout.MAX_COLUMNS` fields before the CSV reader builds
    it (a 20 MB line of commas would be 20 million fields): exactly for a line without quotes, by its length
    (at most MAX_COLUMNS fields of MAX_FIELD_CHARS) for one with quotes."""
    longest = MAX_COLUMNS * (MAX_FIELD_CHARS + 3)
    for i, line in enumerate(lines, start=1):
        if len(line) > longest or (line.count(delim) >= MAX_COLUMNS and '"' not in line):
            raise InputError(_too_wide, file=path, row=i)


def read_curve_csv(path: str, *, api: float | None = None, sg: float | None = None,
                   density: float | None = None, sulfur: float | None = None, data: bytes | None = None,
                   name: str | None = None) -> Assay:
    """Read a quick-curve CSV into an :class:`Assay` (TBP, whole-crude data from the arguments).

    Parameters
    ----------
    path : str
        CSV path (for messages; read if ``data`` is None).
    api : float, optional
        Whole-crude API gravity. [°API]
    sg : float, optional
        Whole-crude SG 60/60 °F. [-]
    density : float, optional
        Whole-crude density at 15 °C. [kg/m3]
    sulfur : float, optional
        Whole-crude sulfur. [wt %]
    data : bytes, optional
        The file's bytes, already read.
    name : str, optional
        Crude name; defaults to the file's stem.

    Returns
    -------
    Assay
    """
    data = read_bytes(path) if data is None else data
    loc = SourceLocation(path)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError("not a UTF-8 text file; expected a CSV with columns vol_pct/wt_pct and "
                         "temp_c/temp_f/temp_k", file=path) from None
    if "\x00" in text:
        raise InputError("contains binary data; expected a CSV text file", file=path)
    text = text.replace("\r\n", "\n").replace("\r", "\n")  # CR-only and mixed line endings are accepted
    lines = text.splitlines()
    if not any(line.strip() for line in lines):
        raise InputError("the file has no rows", file=path)
    if len(lines) > MAX_ROWS + 1:
        raise InputError(f"more than {MAX_ROWS} rows; assaycut reads at most {MAX_ROWS} curve points", file=path)
    first = next(line for line in lines if line.strip())
    delim = ";" if first.count(";") > first.count(",") else ","
    _columns_bounded(lines, delim, path)
    del lines
    rows = []
    cells = 0
    reader = csv.reader(io.StringIO(text), delimiter=delim)
    try:
        for raw in reader:
            if len(raw) > MAX_COLUMNS:
                raise InputError(_too_wide, file=path, row=reader.line_num)
            cells += len(raw)
            if cells > MAX_CELLS:
                raise InputError(f"more than {MAX_CELLS:,} values; a curve CSV holds two columns", file=path,
                                 row=reader.line_num)
            if any(len(c) > MAX_FIELD_CHARS for c in raw):
                raise InputError(f"a field longer than {MAX_FIELD_CHARS} characters; expected numbers",
                                 file=path, row=reader.line_num)
            row = [c.strip() for c in raw]
            if delim == ";":
                row = [c.replace(",", ".") if c.replace(",", "").replace(".", "").lstrip("+-").isdigit() else c
                       for c in row]
            rows.append(row)
    except csv.Error as exc:
        raise InputError(f"not a readable CSV ({exc}); expected two columns of numbers", file=path,
                         row=reader.line_num) from None
    h = next((i for i, r in enumerate(rows) if any(c for c in r)), None)
    if h is None:
        raise InputError("the file has no values; expected a header vol_pct/wt_pct, temp_c/temp_f/temp_k and points",
                         file=path)
    curve = parse_curve_rows(rows, loc, header_index=h, method="TBP", pressure=None, where=path)
    grav = {k: v for k, v in (("api_gravity", api), ("sg_60f", sg), ("density_15c_kg_m3", density))
            if v is not None}
    if len(grav) > 1:
        raise InputError("give one of --api, --sg or --density, not several", file=path)
    if not grav:
        raise InputError("missing gravity: a curve CSV needs the whole-crude gravity from --api, --sg or "
                         "--density (kg/m3 at 15 °C)", file=path)
    sgv = gravity_from_inputs(grav, loc)
    if sulfur is not None and not 0.0 <= sulfur <= 15.0:
        raise InputError(f"--sulfur {sulfur:g} is outside 0-15 wt %", file=path)
    stem = os.path.splitext(os.path.basename(path))[0]
    stem = replace_hidden(stem)[:MAX_NAME_CHARS] or "curve"  # a file name is not a name: hidden characters go
    return Assay(name=name or stem, sg=sgv, sulfur_wt_pct=sulfur, curves=[curve], source=path,
                 sha256=hashlib.sha256(data).hexdigest(), gravity_inputs=grav)
