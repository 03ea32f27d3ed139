"""Fixtures of the study tests: the demo crudes, read and modelled once per module."""

from __future__ import annotations

import pytest


@pytest.fixture(scope="module")
def demos():
    """(Assay, CrudeModel) of each demo crude (invented data: inputs, never expected values)."""
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import demo_assay_paths
    from assaycut.model.crude import build_model

    out = []
    for p in demo_assay_paths():
        a = load_assay(p)
        out.append((a, build_model(a)))
    return out
