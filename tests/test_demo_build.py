"""The demo build is deterministic: two builds of the demo workbooks from their TOML sources are the same
bytes, and the same bytes as the workbooks shipped (so the demo's sha256 never moves between builds).  The
demo data are invented; this checks only that the build reproduces them."""

from __future__ import annotations

import importlib.util
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _build_module():
    spec = importlib.util.spec_from_file_location("demo_build", ROOT / "assays_demo" / "build.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def test_two_builds_are_the_same_bytes_as_the_shipped_demo(tmp_path):
    build = _build_module()
    (tmp_path / "a").mkdir()
    (tmp_path / "b").mkdir()
    build.main(tmp_path / "a", None)
    build.main(tmp_path / "b", None)
    for stem in build.ORDER:
        first = (tmp_path / "a" / f"{stem}.xlsx").read_bytes()
        assert first == (tmp_path / "b" / f"{stem}.xlsx").read_bytes(), stem
        assert first == (ROOT / "assays_demo" / f"{stem}.xlsx").read_bytes(), stem
        assert first == (ROOT / "assaycut" / "data" / f"{stem}.xlsx").read_bytes(), stem
