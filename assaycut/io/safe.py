"""Escaping of text written to CSV and xlsx reports against spreadsheet formula injection."""

from __future__ import annotations

_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")


def safe_text(value):
    """Text that a spreadsheet will show as text, never run as a formula.

    A string that starts with ``=``, ``+``, ``-``, ``@``, tab or carriage return is prefixed with a single
    quote (the OWASP CSV-injection advice).  Non-strings are returned unchanged.

    Examples
    --------
    >>> safe_text('=HYPERLINK("http://example.invalid","x")')
    '\\'=HYPERLINK("http://example.invalid","x")'
    >>> safe_text("Selkie Light")
    'Selkie Light'
    """
    if isinstance(value, str) and value.startswith(_TRIGGERS):
        return "'" + value
    return value
