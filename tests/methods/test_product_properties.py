"""Product properties: cetane index (ASTM D4737) and flash point estimates."""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.methods.product_properties import (
    cetane_index_d4737,
    flash_point_api_2b7_1,
)


def test_cci_reference_point():
    # ASTM D4737 Procedure A formula: at T10 215, T50 260, T90 310 °C and 0.850 g/mL every term but the
    # constant vanishes, giving exactly 45.2.
    assert cetane_index_d4737(215.0, 260.0, 310.0, 0.850) == pytest.approx(45.2, abs=1e-12)


def test_cci_formula_terms():
    # ASTM D4737 Procedure A, each term written out from the standard's equation.
    t10, t50, t90, d = 230.0, 285.0, 340.0, 0.842
    b = np.exp(-3.5 * (d - 0.85)) - 1
    expect = (45.2 + 0.0892 * (t10 - 215) + (0.131 + 0.901 * b) * (t50 - 260) + (0.0523 - 0.420 * b) * (t90 - 310)
              + 0.00049 * ((t10 - 215) ** 2 - (t90 - 310) ** 2) + 107 * b + 60 * b ** 2)
    assert cetane_index_d4737(t10, t50, t90, d) == pytest.approx(expect, rel=1e-12)


def test_flash_api_2b7_1_formula():
    # API TDB 2B7.1: TF = 0.69 T10 - 118.2 in °F.
    t10_f = 400.0
    assert flash_point_api_2b7_1((t10_f - 32) / 1.8) * 1.8 + 32 == pytest.approx(0.69 * t10_f - 118.2)
