"""Converting a distillation curve between methods."""

from __future__ import annotations

import enum
import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import AssaycutError
from .common import JsonOpt, TdMethod, TUnit, echo_json, echo_lines, guarded, say

app = typer.Typer()


class FromMethod(str, enum.Enum):
    TBP = "TBP"
    D86 = "D86"
    D2887 = "D2887"
    D1160 = "D1160"


class ToMethod(str, enum.Enum):
    TBP = "TBP"
    D86 = "D86"
    AET = "AET"


@app.command()
@guarded
def convert(
    points: Annotated[Optional[list[str]], typer.Argument(help="PERCENT=TEMP pairs, e.g. 10=176.7 30=193.3 "
                                                               "50=206.7 70=222.8 90=242.8",
                                                          metavar="PERCENT=TEMP")] = None,
    frm: Annotated[FromMethod, typer.Option("--from", help="Method of the input curve.",
                                            metavar="TBP|D86|D2887|D1160")] = FromMethod.D86,
    to: Annotated[ToMethod, typer.Option("--to", help="Method to convert to (AET for D1160 data).",
                                         metavar="TBP|D86|AET")] = ToMethod.TBP,
    method: Annotated[TdMethod, typer.Option("--method", help="Correlation for TBP <-> D86.",
                                             metavar="daubert-1994|riazi-daubert-1986")] = TdMethod.daubert_1994,
    pressure_mmhg: Annotated[Optional[float], typer.Option("--pressure-mmhg", help="Pressure of D1160 data "
                                                           "[mmHg], 0.01-1520.", metavar="MMHG")] = None,
    watson_k: Annotated[Optional[float], typer.Option("--watson-k", help="Watson K of D1160 material for the "
                                                      "Maxwell-Bonnell correction (default 12: none).",
                                                      min=8.0, max=14.0, metavar="KW")] = None,
    unit: Annotated[TUnit, typer.Option("--unit", metavar="C|F", help="Temperature unit of input and printed output "
                                        "(JSON temp_c is always °C).")] = TUnit.C,
    file: Annotated[Optional[Path], typer.Option("--file", help="CSV with vol_pct/wt_pct and temp_c/temp_f/temp_k "
                                                 "columns instead of PERCENT=TEMP pairs.", dir_okay=False,
                                                 metavar="FILE")] = None,
    json_out: JsonOpt = False,
) -> None:
    """Convert a distillation curve between methods by published correlations.

    TBP <-> D86 by Daubert 1994 (API TDB 3A1.1, default) or Riazi-Daubert 1986; D2887 -> TBP (API TDB
    3A3.1, points 5-100 %) and D2887 -> D86 (3A3.2); D1160 at --pressure-mmhg -> AET (Maxwell-Bonnell,
    API TDB 5A1.19, with its Watson K correction when --watson-k is given).
    Conversions carry errors of a few °C, largest at the initial point.
    """
    from ..methods.distillation import convert as do_convert
    from ..methods.distillation import filled_inputs
    from ..units import c_to_f

    if file is not None and points:
        raise AssaycutError("give PERCENT=TEMP pairs or --file, not both")
    pts = _points_from_csv(str(file)) if file is not None else _points_from_args(points, unit == TUnit.F)
    if not pts:
        raise AssaycutError("no points: give PERCENT=TEMP pairs (e.g. 10=176.7 50=206.7) or --file CSV")
    for p, t in pts.items():
        if t < -273.15:
            raise AssaycutError(f"{p:g} %: {t:.2f} °C is below absolute zero")
    out, used, warnings = do_convert(pts, frm.value, to.value, method=method.value, pressure_mmhg=pressure_mmhg,
                                     watson_k=watson_k)
    if json_out:
        from ..report.jsonout import convert_json

        echo_json(convert_json(frm.value, to.value, used, out, warnings, given=set(pts)))
    else:
        from ..report.console import convert_text

        fahrenheit = unit == TUnit.F
        echo_lines(convert_text(frm.value, to.value, used, pts, out, "°F" if fahrenheit else "°C",
                                c_to_f if fahrenheit else (lambda x: x), filled_inputs(pts, frm.value, to.value)))
    for w in warnings:
        say(f"warning: {w}", err=True)


def _points_from_args(points: list[str] | None, fahrenheit: bool) -> dict[float, float]:
    """{percent: temperature [°C]} from PERCENT=TEMP texts, each checked."""
    from ..units import f_to_c

    pts: dict[float, float] = {}
    for it in points or []:
        p, sep, t = it.partition("=")
        try:
            pv, tv = float(p), float(t)
        except ValueError:
            raise AssaycutError(f"{it!r}: expected PERCENT=TEMP with numbers, e.g. 50=206.7") from None
        if not (math.isfinite(pv) and math.isfinite(tv)):
            raise AssaycutError(f"{it!r}: expected PERCENT=TEMP with finite numbers")
        if not (-273.15 < (f_to_c(tv) if fahrenheit else tv) <= 1500.0):
            raise AssaycutError(f"{it!r}: the temperature must lie between absolute zero and 1500 °C")
        if not sep or not (0.0 <= pv <= 100.0):
            raise AssaycutError(f"{it!r}: expected PERCENT=TEMP with a percent between 0 and 100")
        if pv in pts:
            raise AssaycutError(f"{it!r}: the {pv:g} % point is given twice")
        pts[pv] = f_to_c(tv) if fahrenheit else tv
    return pts


def _points_from_csv(path: str) -> dict[float, float]:
    from ..io.csvcurve import read_curve_csv

    a = read_curve_csv(path, sg=0.85)  # gravity is not used by a conversion
    c = a.curves[0]
    return {float(p): float(t) for p, t in zip(c.percent, c.temp_c)}
