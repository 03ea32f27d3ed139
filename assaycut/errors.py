"""Error types.  Every error assaycut raises on purpose is an :class:`AssaycutError`.

Each subclass also inherits the matching built-in (``ValueError``), so callers may catch either.
Messages state the rule, echo the value found, and name where it came from.
"""

from __future__ import annotations


class AssaycutError(ValueError):
    """Base class of every error assaycut raises on purpose."""


class InputError(AssaycutError):
    """An input file (assay, curve CSV, cut set, limits, prices) is unusable.

    Parameters
    ----------
    message : str
        What was found and what was expected.
    file : str, optional
        The file's path as the user gave it.
    sheet : str, optional
        Workbook sheet.
    row : int, optional
        1-based row number as a spreadsheet or text editor shows it.
    column : str, optional
        Column name or letter.
    """

    def __init__(self, message: str, *, file: str | None = None, sheet: str | None = None,
                 row: int | None = None, column: str | None = None):
        self.file, self.sheet, self.row, self.column = file, sheet, row, column
        where = [p for p in (
            file,
            f"sheet '{sheet}'" if sheet else None,
            f"row {row}" if row is not None else None,
            f"column '{column}'" if column else None,
        ) if p]
        text = (", ".join(where) + ": " + message) if where else message
        super().__init__(" ".join(text.split()))


class CurveError(AssaycutError):
    """A distillation curve cannot be modelled (too few points, falling temperatures...)."""


class ConversionError(AssaycutError):
    """A distillation-method conversion lacks the points it needs or is outside its domain."""


class CutSetError(AssaycutError):
    """A cut set is invalid (cut points not increasing, duplicate names, unknown cut...)."""


class StudyError(AssaycutError):
    """A study (blend, comparison, shift, sweep) was asked for something it cannot do."""
