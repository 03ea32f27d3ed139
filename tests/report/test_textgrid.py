"""Terminal tables fit the width they are given (assaycut.report.textgrid)."""

from __future__ import annotations

from assaycut.report.textgrid import grid


def test_a_wide_table_splits_into_groups_that_repeat_the_key_column_and_fit():
    head = ["Cut"] + [f"quality {k}" for k in range(12)]
    rows = [["vacuum gas oil"] + [f"{k * 1.5:.2f}" for k in range(12)], ["kerosene"] + ["-"] * 12]
    lines = grid(head, rows, width=80)
    assert max(len(x) for x in lines) <= 80
    assert all(x == x.rstrip() for x in lines)  # no trailing blanks
    groups = [x for x in lines if x.startswith("Cut")]
    assert len(groups) >= 2 and sum(x.count("quality") for x in groups) == 12  # every column, once
    assert sum(x.startswith("vacuum gas oil") for x in lines) == len(groups)  # the key column in every group


def test_numbers_are_right_aligned_and_text_left():
    lines = grid(["Cut", "vol %"], [["kerosene", "8.83"], ["diesel", "17.79"]], width=80)
    assert lines[2] == "kerosene   8.83" and lines[3] == "diesel    17.79"
