"""Readers and file formats around the computational core: assay workbooks, curve CSVs, TOML files."""

from __future__ import annotations

import math
import os

from ..errors import InputError
from ..model.assay import Assay
from .cells import read_bytes


def load_assay(path: str | os.PathLike, *, api: float | None = None, sg: float | None = None, density: float | None = None,
               sulfur: float | None = None) -> Assay:
    """Read an assay from an .xlsx workbook or a quick-curve .csv, chosen by content and extension.

    Parameters
    ----------
    path : str or path-like
        Assay file.
    api, sg, density, sulfur : float, optional
        Whole-crude data for a curve CSV ([°API], [-], [kg/m3 at 15 °C], [wt %]); refused for a workbook,
        which carries its own.

    Returns
    -------
    Assay
    """
    from .csvcurve import read_curve_csv
    from .workbook import read_workbook

    if not isinstance(path, (str, os.PathLike)):
        raise InputError(f"expected a file path; got {type(path).__name__}")
    path = os.fspath(path)
    if not isinstance(path, str):
        path = os.fsdecode(path)
    for v, what in ((api, "api"), (sg, "sg"), (density, "density"), (sulfur, "sulfur")):
        if v is not None and (isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v)):
            raise InputError(f"{what} must be a finite number; got {v!r}", file=path)
    ext = path.lower().rsplit(".", 1)[-1] if "." in path else ""
    if ext not in WORKBOOK_EXTENSIONS + CURVE_EXTENSIONS:
        raise InputError(f"unknown assay file type {'.' + ext if ext else '(no extension)'}; expected .xlsx "
                         f"(assay workbook) or .csv (quick curve)", file=path)
    data = read_bytes(path)
    path = shown_path(path)  # what the messages and the reports call the file
    if ext in WORKBOOK_EXTENSIONS:
        if any(v is not None for v in (api, sg, density, sulfur)):
            raise InputError("--api/--sg/--density/--sulfur apply to a curve CSV; a workbook carries its own "
                             "whole-crude data", file=path)
        return read_workbook(path, data)
    return read_curve_csv(path, api=api, sg=sg, density=density, sulfur=sulfur, data=data)


WORKBOOK_EXTENSIONS = ("xlsx", "xlsm")
"""File extensions read as an assay workbook."""
CURVE_EXTENSIONS = ("csv", "txt")
"""File extensions read as a quick-curve CSV (whole-crude data from the caller)."""


def is_curve_csv(path) -> bool:
    """True for a path :func:`load_assay` reads as a quick-curve CSV (by its extension).

    Examples
    --------
    >>> is_curve_csv("balder.CSV"), is_curve_csv("selkie_light.xlsx")
    (True, False)
    """
    return str(path).lower().rsplit(".", 1)[-1] in CURVE_EXTENSIONS


def shown_path(path: str) -> str:
    """The name a file goes by in messages and reports: a shipped demo assay by its file name alone (where
    the package is installed is nobody's business), any other file as the user gave it.

    Examples
    --------
    >>> from assaycut.io.tomlfiles import demo_assay_paths
    >>> shown_path(demo_assay_paths()[0]), shown_path("assays/selkie_light.xlsx")
    ('selkie_light.xlsx', 'assays/selkie_light.xlsx')
    """
    from importlib import resources

    try:
        here = os.path.realpath(os.path.dirname(path))
        data = os.path.realpath(str(resources.files("assaycut.data")))
    except (OSError, ValueError, TypeError):
        return path
    return os.path.basename(path) if here == data else path
