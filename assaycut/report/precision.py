"""How many digits each shown number gets: one rule for the terminal, the sheets, the Markdown summary, the
report CSV and the explorer page, the way a laboratory reports.

The rule (common practice, no source; laboratory certificates and crude assays print these digits):

========================================  =====================
quantity                                   shown as
========================================  =====================
SG 60/60 °F, refractive index              4 decimals
API gravity                                1 decimal
density at 15 °C [kg/m³]                   1 decimal
temperatures (°C or °F, and differences)   1 decimal
yields, cumulative yields, shares [%]      2 decimals
sulfur [wt %]                              2 significant digits
viscosity [cSt]                            3 significant digits
Watson K, cetane index, octane, smoke      1 decimal
molecular weight [g/mol]                   0 decimals
rates [bbl/d, m³/d, t/d]                   0 decimals
nitrogen, mercaptan sulfur [wt ppm]        0 decimals
other ppm (metals)                         1 decimal
acid number, CCR, asphaltenes, wax         2 decimals
PNA [vol %]                                1 decimal
money per bbl or t                         2 decimals
anything else                              3 significant digits
========================================  =====================

A checked value beside its limit shows one decimal more than the limit's own number (kerosene sulfur
0.3217 against "<= 0.3" shows "0.32"), so that a value rounded onto its limit never reads as a
contradiction (:func:`limit_shown`).

Significant digits never print an exponent: 121662.76 cSt with 3 significant digits is "122000".
"""

from __future__ import annotations

import math
import re

_DP: list[tuple[re.Pattern, int]] = [(re.compile(p), n) for p, n in [
    (r"(^|_)(sg|refractive_index.*)$", 4),
    (r"(^|_)api$", 1),
    (r"density.*kg_m3$", 1),
    (r"^(vol_pct|wt_pct|cum_vol_pct|cum_wt_pct|sulfur_share_pct|share_pct|.*_vol_pct_share)$", 2),
    (r"^(paraffins|naphthenes|aromatics|olefins)_vol_pct$", 1),
    (r"(^|_)(vol|wt)_pct$", 2),
    (r"^(bbl|m3|t)_per_day$|_per_day$", 0),
    (r"(^|_)(watson_k|cetane_index.*|ron|mon|smoke_point_mm|bmci)$", 1),
    (r"^mw$", 0),
    (r"^(nitrogen|basic_nitrogen|mercaptan_sulfur)_wt_ppm$", 0),
    (r"_ppm$", 1),
    (r"^(acid_number_mg_koh_g|ccr_wt_pct|asphaltenes_wt_pct|wax_wt_pct|hydrogen_wt_pct)$", 2),
    (r"(worth|margin|price|cost)_per_(bbl|t)$", 2),
    (r"(_c|_f|_c_est|_f_est)$", 1),
    (r"^d86_(\d+)_(c|f)$", 1),
]]
_SIG: list[tuple[re.Pattern, int]] = [(re.compile(p), n) for p, n in [
    (r"(^|_)sulfur_wt_pct$", 2),
    (r"(^|_)viscosity_.*cst$", 3),
]]
DEFAULT_SIG = 3
"""Significant digits of a quantity without a rule of its own."""


def rule(col: str) -> tuple[str, int]:
    """The shown-digits rule of a column key: ``("dp", n)`` decimals or ``("sig", n)`` significant digits.

    Examples
    --------
    >>> rule("sg"), rule("sulfur_wt_pct"), rule("viscosity_100c_cst"), rule("end_f"), rule("colour")
    (('dp', 4), ('sig', 2), ('sig', 3), ('dp', 1), ('sig', 3))
    """
    for pat, n in _SIG:
        if pat.search(col):
            return "sig", n
    for pat, n in _DP:
        if pat.search(col):
            return "dp", n
    return "sig", DEFAULT_SIG


def decimals(col: str, value: float) -> int:
    """Decimals that show ``value`` of column ``col`` by its :func:`rule` (for significant digits, as many
    as the value's magnitude needs, never negative).

    Examples
    --------
    >>> decimals("sulfur_wt_pct", 1.59), decimals("sulfur_wt_pct", 0.0006), decimals("viscosity_40c_cst", 121662.76)
    (1, 5, 0)
    """
    kind, n = rule(col)
    if kind == "dp":
        return n
    x = abs(float(value))
    if x == 0.0 or not math.isfinite(x):
        return max(n - 1, 0)
    return max(n - 1 - math.floor(math.log10(x)), 0)


def fixed(value, nd: int, signed: bool = False, missing: str = "-") -> str:
    """``value`` with ``nd`` decimals; ``missing`` for None, NaN or an infinity; never a negative zero
    ("-0.0" for -0.04 becomes "0.0"); a sign when ``signed`` (zero as "0.0", not "+0.0").

    Examples
    --------
    >>> fixed(-0.04, 1), fixed(float("nan"), 1), fixed(-0.04, 1, signed=True), fixed(2.345, 2, signed=True)
    ('0.0', '-', '0.0', '+2.35')
    """
    if value is None or isinstance(value, (str, bool)):
        return missing if value is None else str(value)
    x = float(value)
    if not math.isfinite(x):
        return missing
    txt = f"{x:.{nd}f}"
    if float(txt) == 0.0:
        return f"{0.0:.{nd}f}"
    return ("+" + txt) if signed and x > 0 else txt


def round_sig(x: float, n: int) -> float:
    """``x`` rounded to ``n`` significant digits (121662.76, 3 -> 122000.0)."""
    if x == 0.0 or not math.isfinite(x):
        return x
    return round(x, n - 1 - math.floor(math.log10(abs(x))))


def shown(col: str, value, signed: bool = False, missing: str = "-") -> str:
    """``value`` of column ``col`` as shown everywhere (:func:`rule`); ``missing`` when absent.

    Examples
    --------
    >>> shown("sg", 0.87564), shown("sulfur_wt_pct", 0.0006), shown("viscosity_40c_cst", 121662.76)
    ('0.8756', '0.00060', '122000')
    >>> shown("bbl_per_day", 2549.9999999999995), shown("vol_pct", -0.001, signed=True)
    ('2550', '0.00')
    """
    if value is None or isinstance(value, (str, bool)):
        return missing if value is None else str(value)
    x = float(value)
    if not math.isfinite(x):
        return missing
    kind, n = rule(col)
    if kind == "sig":
        x = round_sig(x, n)
    return fixed(x, decimals(col, x), signed=signed, missing=missing)


def rounded(col: str, value):
    """``value`` of column ``col`` rounded as :func:`shown` shows it, as a number (for a CSV a spreadsheet
    reads as numbers); anything not a finite number is returned as it is.

    Examples
    --------
    >>> rounded("sg", 0.875634), rounded("viscosity_40c_cst", 121662.76), rounded("name", "kerosene")
    (0.8756, 122000.0, 'kerosene')
    """
    if value is None or isinstance(value, (str, bool)):
        return value
    x = float(value)
    if not math.isfinite(x):
        return value
    if rule(col)[0] == "sig":
        x = round_sig(x, rule(col)[1])
    return round(x, decimals(col, x)) + 0.0


NUMBER = re.compile(r"[-+]?\d+(?:\.(\d+))?")
"""A number in a limit's text (its decimals in group 1)."""


def limit_decimals(limit_text: str) -> int:
    """Decimals of a limit's value as shown beside it: one more than the most its own numbers carry
    ("<= 0.3" -> 2, ">= 820 and <= 845" -> 1).

    Examples
    --------
    >>> limit_decimals("<= 0.3"), limit_decimals(">= 820 and <= 845"), limit_decimals("<= 0.0010")
    (2, 1, 5)
    """
    nds = [len(m.group(1) or "") for m in NUMBER.finditer(str(limit_text))]
    return (max(nds) if nds else 1) + 1


def limit_shown(value, limit_text: str, missing: str = "n/a") -> str:
    """A checked value beside its limit, with :func:`limit_decimals` decimals.

    Examples
    --------
    >>> limit_shown(0.3217, "<= 0.3"), limit_shown(850.83, ">= 820 and <= 845"), limit_shown(None, "<= 1")
    ('0.32', '850.8', 'n/a')
    """
    return fixed(value, limit_decimals(limit_text), missing=missing)


def excel_format(col: str, value=None) -> str:
    """The spreadsheet number format that shows ``value`` of ``col`` by the same rule ("0.0000" for SG,
    "0.00060"-style decimals for a small sulfur, "0" for a rate).

    Examples
    --------
    >>> excel_format("sg"), excel_format("sulfur_wt_pct", 0.0006), excel_format("bbl_per_day", 2550.0)
    ('0.0000', '0.00000', '0')
    """
    nd = decimals(col, 1.0 if value is None or isinstance(value, (str, bool)) else value)
    return "0" if nd == 0 else "0." + "0" * nd
