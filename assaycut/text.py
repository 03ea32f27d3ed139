"""Characters that hide or disguise text: refused in names, escaped on a terminal.

A crude or cut name is shown in tables, reports and the terminal, and matched against limits and prices; a
character that moves the cursor, rings the bell, reverses the text that follows (Unicode bidirectional
controls) or takes no space at all (zero-width characters) lets one name display as another.  Such
characters are refused in names read from files, replaced in names made from file names, and shown escaped
(``\\x1b``, ``\\u202e``) wherever the terminal prints text.
"""

from __future__ import annotations

import re

HIDDEN = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u00ad\u061c\u180e\u200b-\u200f\u2028-\u202e\u2060-\u2064"
                    "\u2066-\u206f\ufeff\ufff9-\ufffb\U000e0001\U000e0020-\U000e007f]")
"""C0 and C1 control characters except tab and line feed, and the invisible Unicode format characters:
soft hyphen, Arabic letter mark, Mongolian vowel separator, zero-width space, non-joiner and joiner, left-to-
right and right-to-left marks, line and paragraph separators, bidirectional embeddings, overrides and
isolates, word joiner and invisible operators, byte-order mark, interlinear annotation and tag characters
(Unicode Standard, Table 23-1 and UAX #9, section 2; category Cf, Zl, Zp)."""


def has_hidden_characters(text: str) -> bool:
    """True when ``text`` holds a control character (tab and line feed included) or an invisible format one
    (:data:`HIDDEN`).

    Examples
    --------
    >>> has_hidden_characters("naphtha"), has_hidden_characters("naph\\x1btha")
    (False, True)
    >>> has_hidden_characters("Selkie\\u202eLight"), has_hidden_characters("a\\tb")
    (True, True)
    """
    return bool(HIDDEN.search(text)) or "\t" in text or "\n" in text


def escape_hidden(text: str) -> str:
    """``text`` with each hidden character (:data:`HIDDEN`) shown as an escape: ``\\xNN`` below U+0100,
    ``\\uNNNN`` or ``\\UNNNNNNNN`` above; tab and line feed are kept.

    Examples
    --------
    >>> escape_hidden("crude\\x1b]0;x\\x07.xlsx")
    'crude\\\\x1b]0;x\\\\x07.xlsx'
    >>> escape_hidden("Tarn\\u202eyvaeH")
    'Tarn\\\\u202eyvaeH'
    """
    return HIDDEN.sub(lambda m: m.group(0).encode("unicode_escape").decode("ascii"), text)


def replace_hidden(text: str, by: str = "_") -> str:
    """``text`` with every hidden character, tab and line feed replaced by ``by`` (names made from file names).

    Examples
    --------
    >>> replace_hidden("crude\\u200bA")
    'crude_A'
    """
    return HIDDEN.sub(by, text).replace("\t", by).replace("\n", by)
