"""Shared fixtures: small assay workbooks and CSVs built on the fly (good ones, and ones broken on purpose).

The numbers in these fixtures are invented test inputs, never expected values of a correctness check.
"""

from __future__ import annotations

import hashlib
from pathlib import Path

import pytest

CRUDE_ROWS = [["Whole-crude data (test)"], ["field", "value"], ["name", "Test Crude"],
              ["origin", "Test field (fictional)"], ["api_gravity", 33.0], ["sulfur_wt_pct", 1.1]]
CURVE_ROWS = [["Main curve (test)"], ["method", "TBP"], ["pressure_mmhg", None], [], ["vol_pct", "temp_c"],
              [2.0, 15.0], [8.0, 70.0], [20.0, 150.0], [35.0, 230.0], [55.0, 340.0], [75.0, 470.0], [82.0, 540.0]]
CUT_ROWS = [["Narrow cuts (test)"], ["start_c", "end_c", "vol_pct", "wt_pct", "sg_60f", "sulfur_wt_pct"],
            [None, 15.0, 2.0, 1.3, 0.56, 0.0], [15.0, 70.0, 6.0, 4.9, 0.70, 0.02], [70.0, 150.0, 12.0, 10.6, 0.76, 0.08],
            [150.0, 230.0, 15.0, 14.0, 0.80, 0.3], [230.0, 340.0, 20.0, 19.6, 0.845, 0.9],
            [340.0, 470.0, 20.0, 20.9, 0.90, 1.6], [470.0, None, 25.0, 28.7, 0.98, 2.6]]
LIGHT_ROWS = [["Light ends (test)"], ["component", "wt_pct"], ["C3", 0.3], ["iC4", 0.25], ["nC4", 0.7]]


def write_book(path: Path, sheets: dict[str, list[list]]) -> Path:
    """Write a workbook with the given sheets (rows as lists); returns the path."""
    import openpyxl

    wb = openpyxl.Workbook()
    wb.remove(wb.active)
    for name, rows in sheets.items():
        ws = wb.create_sheet(name)
        for r in rows:
            ws.append(r)
    wb.save(path)
    return path


def base_sheets() -> dict[str, list[list]]:
    """The sheets of a valid test assay (deep-copied, free to mutate)."""
    import copy

    return copy.deepcopy({"crude": CRUDE_ROWS, "distillation": CURVE_ROWS, "narrow cuts": CUT_ROWS,
                          "light ends": LIGHT_ROWS})


@pytest.fixture
def good_book(tmp_path) -> Path:
    return write_book(tmp_path / "good.xlsx", base_sheets())


@pytest.fixture
def book(tmp_path):
    """Factory: book(mutator) writes base sheets changed by ``mutator(sheets)``."""
    counter = {"n": 0}

    def make(mutate=None, name=None):
        sheets = base_sheets()
        if mutate:
            mutate(sheets)
        counter["n"] += 1
        return write_book(tmp_path / (name or f"case{counter['n']}.xlsx"), sheets)

    return make


@pytest.fixture
def demo_paths():
    from assaycut.io.tomlfiles import demo_assay_paths

    return demo_assay_paths()


def sha256(path) -> str:
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()
