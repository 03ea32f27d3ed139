"""The digits every shown number gets (assaycut.report.precision).

The rule is common practice, no source: laboratory certificates print SG to 4 decimals, API to 1, sulfur to
2 significant digits, viscosity to 3 significant digits, temperatures to 0.1 and yields to 0.01; a value
checked against a limit carries one decimal more than the limit, so that it can never round onto it.
"""

from __future__ import annotations

import pytest

from assaycut.report.precision import excel_format, limit_decimals, limit_shown, rounded, shown


@pytest.mark.parametrize("col,value,text", [
    ("sg", 0.875634, "0.8756"), ("api", 30.149, "30.1"), ("density_15c_kg_m3", 850.834, "850.8"),
    ("end_c", 350.04, "350.0"), ("end_f", 662.0, "662.0"), ("d86_95_c", 226.24, "226.2"),
    ("vol_pct", 8.8291, "8.83"), ("sulfur_wt_pct", 0.3217, "0.32"), ("sulfur_wt_pct", 0.0006, "0.00060"),
    ("sulfur_wt_pct", 1.590, "1.6"), ("viscosity_40c_cst", 121662.76, "122000"),
    ("viscosity_100c_cst", 0.72, "0.720"), ("bbl_per_day", 2549.9999999999995, "2550"), ("mw", 212.6, "213"),
    ("kerosene_sulfur_wt_pct", 0.0006, "0.00060"), ("watson_k", 11.77, "11.8"),
])
def test_each_quantity_shows_its_laboratory_digits(col, value, text):
    assert shown(col, value) == text


def test_no_negative_zero_and_a_sign_only_on_a_change_that_is_not_zero():
    assert shown("vol_pct", -0.001) == "0.00" and shown("vol_pct", -0.001, signed=True) == "0.00"
    assert shown("vol_pct", 1.5, signed=True) == "+1.50" and shown("vol_pct", -1.5, signed=True) == "-1.50"
    assert shown("sg", None) == "-" and shown("sg", float("nan")) == "-"


def test_a_value_beside_its_limit_never_rounds_onto_it():
    # Brannock kerosene sulfur 0.3217 against "<= 0.3" showed "0.3 ... FAIL"
    assert limit_decimals("<= 0.3") == 2 and limit_shown(0.3217, "<= 0.3") == "0.32"
    assert limit_shown(850.83, ">= 820 and <= 845") == "850.8"
    assert limit_shown(0.0584, "<= 0.05") == "0.058"


def test_sheets_and_csv_carry_the_same_digits():
    assert excel_format("sg") == "0.0000" and excel_format("sulfur_wt_pct", 0.0006) == "0.00000"
    assert excel_format("bbl_per_day", 2550.0) == "0"
    assert rounded("sg", 0.875634) == 0.8756 and rounded("bbl_per_day", 2549.9999999999995) == 2550.0
