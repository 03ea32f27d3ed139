"""Shared fixtures: small assay workbooks built on the fly (good ones, and ones broken on purpose), and the
demo assays.  The numbers in these fixtures are invented test inputs, never expected values of a correctness
check.
"""

from __future__ import annotations

from pathlib import Path

import os

import pytest
from hypothesis import settings

from tests.helpers import base_sheets, write_book

# Property tests are deterministic: the same examples on every run and machine (a random failure blocks CI),
# and no example database is written into the clone.  ASSAYCUT_HYPOTHESIS=explore draws fresh examples when
# hunting for new failures by hand.
settings.register_profile("fixed", derandomize=True, database=None, print_blob=True)
settings.register_profile("explore", database=None)
settings.load_profile("explore" if os.environ.get("ASSAYCUT_HYPOTHESIS") == "explore" else "fixed")


ROOT = Path(__file__).resolve().parent.parent
"""The checkout (tests name its files by absolute paths: each test runs in a folder of its own)."""


@pytest.fixture(autouse=True)
def _run_in_a_folder_of_its_own(tmp_path_factory, monkeypatch):
    """Every test runs with a fresh temporary folder as its working folder, so that a command run without
    --out writes its report there (``reports/``), never into the checkout.  Subprocesses started by a test
    find the ``tests`` package through PYTHONPATH."""
    monkeypatch.chdir(tmp_path_factory.mktemp("cwd"))
    monkeypatch.setenv("PYTHONPATH", os.pathsep.join(filter(None, [str(ROOT), os.environ.get("PYTHONPATH")])))


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
