"""Hidden characters in names: every Unicode bidirectional formatting control and the zero-width and separator
characters are caught; ordinary names in any script are not (Unicode Standard, UAX #9 section 2, through
Python's ``unicodedata``; the zero-width list is the Unicode Standard's chapter 23, from memory).  Names
below are invented."""

from __future__ import annotations

import sys
import unicodedata

import pytest

from assaycut.text import escape_hidden, has_hidden_characters, replace_hidden

EXPLICIT_BIDI = {"LRE", "RLE", "LRO", "RLO", "PDF", "LRI", "RLI", "FSI", "PDI"}


def test_every_bidi_control_and_separator_is_hidden():
    caught = [chr(c) for c in range(sys.maxunicode + 1)
              if unicodedata.bidirectional(chr(c)) in EXPLICIT_BIDI or unicodedata.category(chr(c)) in ("Zl", "Zp")]
    assert len(caught) == 11  # the nine explicit controls, U+2028 and U+2029
    assert all(has_hidden_characters(f"Selkie{ch}Light") for ch in caught)


@pytest.mark.parametrize("ch", ["\u200b", "\u200c", "\u200d", "\u200e", "\u200f", "\u061c", "\u2060", "\ufeff",
                                "\u202e", "\u2066", "\u2028", "\x1b", "\x07", "\r", "\n", "\t", "\x85"])
def test_zero_width_marks_and_controls_are_hidden(ch):
    assert unicodedata.category(ch) in ("Cf", "Cc", "Zl")
    assert has_hidden_characters(f"Tarn{ch}Heavy")
    assert ch not in replace_hidden(f"Tarn{ch}Heavy")


@pytest.mark.parametrize("name", ["Selkie Light", "Brannock Blend (30/70)", "Árabe Ligero", "Маркa-2",
                                  "大庆 原油", "Crude #4; 0.5% S", "Ölfeld-Süd"])
def test_ordinary_names_pass(name):
    assert not has_hidden_characters(name)
    assert escape_hidden(name) == name


def test_one_crude_cannot_display_as_another():
    # U+202E reverses what follows: "Tarn\u202eyvaeH" displays as "TarnHeavy" reversed into "Heavy"
    assert escape_hidden("Tarn\u202eyvaeH") == "Tarn\\u202eyvaeH"
    assert escape_hidden("a\u200bb") == "a\\u200bb"
    assert escape_hidden("line\nnext\tcol") == "line\nnext\tcol"  # tab and line feed stay in output text
