"""Aligned text tables for the terminal that fit its width: text left, numbers right, no trailing blanks; a
table wider than the terminal is split into column groups, each repeating the key column(s)."""

from __future__ import annotations

import os
import shutil

GAP = "  "
"""Space between two columns."""
FALLBACK_COLUMNS = 100
"""Width used when neither the terminal nor ``COLUMNS`` gives one (output piped to a file)."""
MIN_COLUMNS = 40
"""Narrowest width tables are fitted to (a narrower COLUMNS is taken as this)."""


def terminal_width() -> int:
    """The width to fit: ``COLUMNS`` when set to a number, else the terminal's, else
    :data:`FALLBACK_COLUMNS`; never below :data:`MIN_COLUMNS`."""
    env = os.environ.get("COLUMNS", "")
    if env.strip().isdigit():
        return max(int(env), MIN_COLUMNS)
    return max(shutil.get_terminal_size((FALLBACK_COLUMNS, 24)).columns, MIN_COLUMNS)


def _line(cells: list[str], widths: list[int], align: str) -> str:
    return GAP.join(c.ljust(w) if a == "l" else c.rjust(w) for c, w, a in zip(cells, widths, align)).rstrip()


def grid(head: list[str], rows: list[list[str]], align: str | None = None, width: int | None = None,
         keep: int = 1, rule: bool = True) -> list[str]:
    """Lines of an aligned table.

    Parameters
    ----------
    head : list of str
        Column headers.
    rows : list of list of str
        Cell texts (already formatted).
    align : str, optional
        One letter per column, 'l' (text) or 'r' (numbers). Default: the first ``keep`` columns left, the
        rest right.
    width : int, optional
        Width to fit [characters]. Default :func:`terminal_width`.
    keep : int
        Leading key columns repeated in every column group when the table is split.
    rule : bool
        A line of dashes under the header.

    Returns
    -------
    list of str
        The table; column groups separated by an empty line. A single column wider than ``width`` is
        kept whole (it cannot be split).
    """
    width = terminal_width() if width is None else width
    n = len(head)
    align = align or ("l" * keep + "r" * (n - keep))
    widths = [max([len(head[j])] + [len(r[j]) for r in rows]) for j in range(n)]
    key = list(range(min(keep, n)))
    groups, cur = [], []
    used = sum(widths[j] for j in key) + len(GAP) * max(len(key) - 1, 0)
    for j in range(len(key), n):
        need = len(GAP) + widths[j]
        if cur and used + need > width:
            groups.append(cur)
            cur = []
            used = sum(widths[i] for i in key) + len(GAP) * max(len(key) - 1, 0)
        cur.append(j)
        used += need
    groups.append(cur)
    out: list[str] = []
    for g in groups:
        cols = key + g
        w = [widths[j] for j in cols]
        a = "".join(align[j] for j in cols)
        if out:
            out.append("")
        out.append(_line([head[j] for j in cols], w, a))
        if rule:
            out.append(GAP.join("-" * x for x in w))
        out += [_line([r[j] for j in cols], w, a) for r in rows]
    return out


def wrap(text: str, width: int | None = None, indent: str = "") -> list[str]:
    """A prose line wrapped to the terminal width (:func:`terminal_width`), continuation lines indented by
    ``indent``."""
    import textwrap

    return textwrap.wrap(text, width=terminal_width() if width is None else width, subsequent_indent=indent,
                         break_on_hyphens=False) or [""]
