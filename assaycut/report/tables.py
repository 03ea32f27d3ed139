"""Column labels with units, the terminal cut table and the Markdown summary."""

from __future__ import annotations

import math
import re

import numpy as np

from ..cutting.cut_table import CutTable
from ..cutting.ideal import FLAG_SETS
from ..cutting.limits import is_lower_bound
from ..files import safe_text
from ..methods.blending_indices import VISCOSITY
from ..methods.d86 import D86_STD
from ..text import replace_hidden
from ..units import c_to_f, pct_text, residual_text
from .precision import NUMBER, limit_shown, shown
from .textgrid import grid, wrap

LABELS = {
    "name": "Cut",
    "start_c": "Start TBP [°C]",
    "end_c": "End TBP [°C]",
    "vol_pct": "Yield [vol %]",
    "wt_pct": "Yield [wt %]",
    "cum_vol_pct": "Cumulative [vol %]",
    "cum_wt_pct": "Cumulative [wt %]",
    "tbp_5_c": "TBP 5 % [°C]",
    "mid_vol_c": "Mid-volume TBP [°C]",
    "tbp_95_c": "TBP 95 % [°C]",
    "overlap_c": "TBP 5-95 overlap with next cut [°C]",
    "vabp_c": "VABP [°C]",
    "meabp_c": "MeABP [°C]",
    "sg": "SG 60/60 °F [-]",
    "api": "API gravity [°API]",
    "density_15c_kg_m3": "Density 15 °C [kg/m3]",
    "watson_k": "Watson K [-]",
    "sulfur_wt_pct": "Sulfur [wt %]",
    "sulfur_share_pct": "Share of crude sulfur [%]",
    "mw": "Molecular weight [g/mol]",
    "cetane_index_d4737": "Cetane index D4737 [-]",
    "flash_c_est": "Flash point est. [°C]",
    "extrapolated": "Extrapolated",
    "vabp_d86_c": "VABP of D86 [°C]",
    "estimated": "Estimated values",
    "out_of_scope": "Outside the method's scope",
    "crude": "Crude",
    "bbl_per_day": "Rate [bbl/d]",
    "m3_per_day": "Rate [m³/d]",
    "t_per_day": "Rate [t/d]",
    "nitrogen_wt_ppm": "Nitrogen [wt ppm]",
    "basic_nitrogen_wt_ppm": "Basic nitrogen [wt ppm]",
    "mercaptan_sulfur_wt_ppm": "Mercaptan sulfur [wt ppm]",
    "nickel_wt_ppm": "Nickel [wt ppm]",
    "vanadium_wt_ppm": "Vanadium [wt ppm]",
    "ccr_wt_pct": "CCR [wt %]",
    "asphaltenes_wt_pct": "Asphaltenes [wt %]",
    "wax_wt_pct": "Wax [wt %]",
    "acid_number_mg_koh_g": "Acid number [mg KOH/g]",
    "paraffins_vol_pct": "Paraffins [vol %]",
    "naphthenes_vol_pct": "Naphthenes [vol %]",
    "aromatics_vol_pct": "Aromatics [vol %]",
    "pour_point_c": "Pour point [°C]",
    "cloud_point_c": "Cloud point [°C]",
    "freeze_point_c": "Freezing point [°C]",
    "flash_point_c": "Flash point, measured [°C]",
    "rvp_kpa": "RVP [kPa]",
    "ron": "RON [-]",
    "mon": "MON [-]",
    "smoke_point_mm": "Smoke point [mm]",
    "aniline_point_c": "Aniline point [°C]",
    "refractive_index_20c": "Refractive index 20 °C [-]",
    "bmci": "BMCI [-]",
    "hydrogen_wt_pct": "Hydrogen [wt %]",
    "n_plus_2a_vol_pct": "N+2A [vol %]",
    "lpg_c3_vol_pct": "Propane [vol % of cut]",
    "lpg_ic4_vol_pct": "Isobutane [vol % of cut]",
    "lpg_nc4_vol_pct": "n-Butane [vol % of cut]",
}
"""Report header of each cut-table column, with its unit."""
for _p in D86_STD:
    LABELS[f"d86_{_p}_c"] = f"D86 {_p} % [°C]"
    LABELS[f"d86_{_p}_f"] = f"D86 {_p} % [°F]"

_UNITS = {"c": "°C", "f": "°F", "k": "K", "pct": "%", "wt_pct": "wt %", "vol_pct": "vol %", "cst": "cSt",
          "cp": "cP", "mg_koh_g": "mg KOH/g", "kg_m3": "kg/m³", "ppm": "ppm", "wt_ppm": "wt ppm", "mg_kg": "mg/kg",
          "kpa": "kPa", "psi": "psi", "mm": "mm"}


def label_for(col: str) -> str:
    """The report header of a column: :data:`LABELS`, a viscosity at its temperature, or the name with its
    unit suffix spelled out (e.g. 'colour_index' stays as it is, 'wax_content_wt_pct' -> 'Wax content [wt %]')."""
    if col in LABELS:
        return LABELS[col]
    if col.endswith("_f") or col.endswith("_f_est"):  # a °F display column: the °C one's label in °F
        c = col[:-2] + "_c" if col.endswith("_f") else col[:-6] + "_c_est"
        if c in LABELS:
            return LABELS[c].replace("°C", "°F")
    v = VISCOSITY.match(col)
    if v:
        return f"Viscosity {v.group(1)} °C [cSt]"
    for suffix in sorted(_UNITS, key=len, reverse=True):
        if col.endswith("_" + suffix):
            return f"{col[:-len(suffix) - 1].replace('_', ' ').capitalize()} [{_UNITS[suffix]}]"
    return col

LONG_COLUMNS = ["crude", "cut", "property", "unit", "value", "basis"]
"""Columns of the long table (one row per value)."""
_BASIS = {"vol_pct": "vol", "cum_vol_pct": "vol", "wt_pct": "wt", "cum_wt_pct": "wt", "bbl_per_day": "vol",
          "m3_per_day": "vol", "t_per_day": "wt"}


def basis_of(col: str) -> str:
    """'vol' or 'wt' for yields and rates, '' for a quality (its basis does not matter to an importer)."""
    return _BASIS.get(col, "")


def unit_of(col: str) -> str:
    """The unit of a column as the long table gives it: the bracketed part of its label ('vol %', '°C', '-')."""
    lab = label_for(col)
    return lab[lab.rindex("[") + 1:-1] if lab.endswith("]") and "[" in lab else "-"


def long_rows(cuts, crude: str, escaped: bool = False) -> list[list]:
    """The cut table in long form for planning models and BI tools: one row per (cut, property) value with
    its unit and, for yields and rates, the basis ('vol' or 'wt'); D86 points as d86_<p>_c; missing values
    left out (:data:`LONG_COLUMNS`).  With ``escaped`` the crude and cut names are escaped against formula
    injection here, once (the other texts are the project's own)."""
    if escaped:
        crude = safe_text(crude)
    rows = []
    units = {c: (unit_of(c), basis_of(c)) for c in cuts.keys}
    for rec in cuts.rows():
        if escaped:
            rec["name"] = safe_text(rec["name"])
        for col, v in rec.items():
            if col in ("name", "extrapolated") + FLAG_SETS:
                continue
            if col in ("d86_c", "d86_f"):
                for p, t in (v or {}).items():
                    rows.append([crude, rec["name"], f"d86_{p}_{col[-1]}", f"°{col[-1].upper()}", float(t), ""])
                continue
            if v is None or isinstance(v, (str, bool)) or not math.isfinite(float(v)):
                continue
            rows.append([crude, rec["name"], col, units[col][0], float(v), units[col][1]])
    return rows


DIFFERENCES = {"overlap_c"}
"""Temperature columns that are differences (°F = 1.8 × °C, no offset)."""


def is_temperature(col: str) -> bool:
    """Whether a column key holds a temperature in °C (its name ends in '_c' or '_c_est')."""
    return col.endswith("_c") or col.endswith("_c_est")


def _f_name(col: str) -> str:
    return col[:-2] + "_f" if col.endswith("_c") else col[:-6] + "_f_est"


def in_fahrenheit(cuts):
    """A cut table for display in °F: every temperature column converted and renamed (start_c -> start_f,
    flash_c_est -> flash_f_est, d86_c -> d86_f with its points converted; the flag lists follow).
    Temperatures inside a name (viscosity_40c_cst) stay as they are.  JSON output stays in °C."""
    ren = {c: _f_name(c) for c in cuts.keys if is_temperature(c) and c != "d86_c"}
    out = {}
    for c, v in cuts.columns.items():
        if c in ren:
            v = np.asarray(v, dtype=float)
            out[ren[c]] = v * 1.8 if c in DIFFERENCES else c_to_f(v)
        elif c == "d86_c":
            out["d86_f"] = [None if d is None else {k: float(c_to_f(x)) for k, x in d.items()} for d in v]
        elif c in FLAG_SETS:
            names = {**ren, "d86_c": "d86_f"}
            out[c] = [[names.get(x, x) for x in e] for e in v]
        else:
            out[c] = v
    return CutTable(out, cuts.attrs)


def _numbers_in_f(text: str) -> str:
    """Every number of a limit's bounds text read as °C and written in °F with the same decimals."""
    return NUMBER.sub(lambda m: f"{c_to_f(float(m.group(0))):.{len(m.group(1) or '')}f}", text)


def limits_in_unit(rows: list[dict], unit: str = "C") -> list[dict]:
    """Checked limits (:func:`~assaycut.cutting.limits.check_limits` rows) for display, each with its ``unit``
    ('°C', 'wt %', 'kg/m³'...); with ``unit`` 'F', a temperature limit's value and bounds in °F (a bound
    keeps its decimals; the label keeps its own wording).

    Examples
    --------
    >>> limits_in_unit([{"property": "flash_c_est", "limit": ">= 55", "value": 60.0}], "F")[0]
    {'property': 'flash_c_est', 'limit': '>= 131', 'value': 140.0, 'unit': '°F'}
    """
    out = []
    for r in rows:
        r = dict(r)
        prop = r["property"]
        temp = is_temperature(prop) and not prop.startswith("recovered_at_")
        r["unit"] = unit_of(prop)
        if temp and unit == "F":
            r["limit"] = _numbers_in_f(r["limit"])
            r["value"] = None if r["value"] is None else float(c_to_f(float(r["value"])))
            r["unit"] = "°F"
        out.append(r)
    return out


def deg(unit: str = "C") -> str:
    """The symbol of a display unit: '°C' or '°F'."""
    return "°F" if unit == "F" else "°C"


def temp_in_unit(v, unit: str = "C", difference: bool = False):
    """A temperature [°C] (or a temperature ``difference`` [°C]) in the display unit: °F = 1.8 °C + 32, a
    difference 1.8 × its °C value; None and NaN pass through."""
    if unit != "F" or v is None:
        return v
    return float(v) * 1.8 if difference else float(c_to_f(float(v)))


_TEMP_IN_TEXT = re.compile(r"(±|\+|--span |by )?(-?\d+(\.\d+)?) ?°C")


def text_in_unit(text: str, unit: str = "C") -> str:
    """A sentence's temperatures in the display unit: each "<number> °C" becomes °F with the same decimals;
    one written as a difference ("±2 °C", "+60 °C", "--span 60 °C", "by 5 °C") takes the factor 1.8 only.

    Examples
    --------
    >>> text_in_unit("end at 343.3 °C, within --span 60 °C, ±2 °C", "F")
    'end at 649.9 °F, within --span 108 °F, ±3.6 °F'
    """
    if unit != "F":
        return text

    def f(m):
        diff = m.group(1) is not None and m.group(1) != ""
        nd = len(m.group(3) or ".") - 1
        v = float(m.group(2))
        v = v * 1.8 if diff else float(c_to_f(v))
        nd = max(nd, 1) if diff and v != round(v, nd) else nd
        return f"{m.group(1) or ''}{v:.{nd}f} °F"

    return _TEMP_IN_TEXT.sub(f, text)


_BOUNDS_AT_END = re.compile(r"[<>]=? ?[-+]?\d+(?:\.\d+)?(?: and [<>]=? ?[-+]?\d+(?:\.\d+)?)?$")


def limit_line_in_unit(text: str, prop: str, unit: str = "C") -> str:
    """A limit as one line ('kerosene: jet fuel freezing point <= -47') in the display unit: in 'F', the bounds
    at the end of a temperature limit converted with their decimals and ' °F' added; other text unchanged.

    Examples
    --------
    >>> limit_line_in_unit("kerosene: freezing point <= -47", "freeze_point_c", "F")
    'kerosene: freezing point <= -53 °F'
    """
    if unit != "F" or not is_temperature(prop) or prop.startswith("recovered_at_"):
        return text
    return _BOUNDS_AT_END.sub(lambda m: _numbers_in_f(m.group(0)) + " °F", text)


def unit_key(col: str, unit: str = "C") -> str:
    """The key of a column in a table shown in ``unit``: a temperature column's °F name in 'F' (end_c ->
    end_f, flash_c_est -> flash_f_est), else the key itself."""
    return _f_name(col) if unit == "F" and is_temperature(col) else col


def frame_in_unit(df, unit: str = "C"):
    """A DataFrame of a study (sweep) for display: in °F, every temperature column converted and renamed as
    :func:`in_fahrenheit` names it (cut_point_c -> cut_point_f, lower_flash_c_est -> lower_flash_f_est); the
    frame's attrs kept.  In °C the frame itself."""
    if unit != "F":
        return df
    ren = {c: _f_name(c) for c in df.columns if is_temperature(c)}
    out = df.rename(columns=ren)
    for c in ren.values():
        out[c] = c_to_f(out[c].to_numpy(dtype=float))
    out.attrs = dict(df.attrs)
    return out


def display_cuts(cuts, unit: str = "C"):
    """The cut table in the display unit ('C' as is, 'F' by :func:`in_fahrenheit`)."""
    return in_fahrenheit(cuts) if unit == "F" else cuts


def quality_names(cuts) -> list[str]:
    """The quality columns of a cut table beyond the standard ones (narrow-cut qualities and estimates)."""
    from ..cutting.ideal import CUT_COLUMNS

    standard = set(CUT_COLUMNS) | {_f_name(c) for c in CUT_COLUMNS if is_temperature(c)} | {"d86_f"}
    return [c for c in cuts.keys if c not in standard and c not in FLAG_SETS + ("bbl_per_day", "m3_per_day",
                                                                                 "t_per_day")]


def flat_cut_rows(cuts) -> tuple[list[str], list[list]]:
    """Cut table as flat rows (D86 expanded into one column per point), with machine column names."""
    d86 = "d86_f" if "d86_f" in cuts else "d86_c"
    u = d86[-1]
    cols = [c for c in cuts.keys if c != d86]
    cols.insert(cols.index("cetane_index_d4737"), "__d86__")
    names = []
    for c in cols:
        names += [f"d86_{p}_{u}" for p in D86_STD] if c == "__d86__" else [c]
    rows = []
    for rec in cuts.rows():
        row = []
        for c in cols:
            if c == "__d86__":
                d = rec[d86] or {}
                row += [d.get(str(p)) for p in D86_STD]
            else:
                row.append(rec[c])
        rows.append(["; ".join(v) if isinstance(v, (list, tuple)) else v for v in row])
    return names, rows


TERMINAL_COLUMNS = [("name", "Cut"), ("start_c", "Start °C"), ("end_c", "End °C"), ("vol_pct", "vol %"),
                    ("wt_pct", "wt %"), ("bbl_per_day", "bbl/d"), ("t_per_day", "t/d"), ("api", "API"),
                    ("sg", "SG"), ("sulfur_wt_pct", "S wt %"), ("watson_k", "Kw"), ("tbp_5_c", "T5 °C"),
                    ("mid_vol_c", "T50 °C"), ("tbp_95_c", "T95 °C"), ("overlap_c", "Overlap °C"),
                    ("cetane_index_d4737", "CCI"), ("flash_c_est", "Flash °C*"), ("extrapolated", "Ext.")]
"""The cut-table columns the terminal shows (key, header), when present; digits by :mod:`.precision`."""


TERMINAL_QUALITIES = [("freeze_point_c", "Freeze °C"), ("smoke_point_mm", "Smoke mm"),
                      ("cloud_point_c", "Cloud °C"), ("pour_point_c", "Pour °C"),
                      ("viscosity_40c_cst", "ν40 cSt"), ("viscosity_100c_cst", "ν100 cSt"),
                      ("viscosity_135c_cst", "ν135 cSt"), ("nitrogen_wt_ppm", "N ppm"), ("ccr_wt_pct", "CCR wt %"),
                      ("nickel_wt_ppm", "Ni ppm"), ("vanadium_wt_ppm", "V ppm"), ("hydrogen_wt_pct", "H wt %"),
                      ("bmci", "BMCI"), ("n_plus_2a_vol_pct", "N+2A vol %")]
"""The qualities the terminal shows, when present (all of them are in the report files and JSON)."""

TERMINAL_LEGEND = {
    "overlap_c": "Overlap: T95 of the cut less T5 of the next; negative: a gap (ideal cut)",
    "extrapolated": "Ext.: the cut rests partly on the curve's fitted extension",
}
"""Legend lines under the terminal cut table, for the columns whose header needs one."""


def _shown(spec, cuts):
    """Terminal columns present in ``cuts``, a °C column taken in °F where the table is in °F."""
    out = []
    for c, h in spec:
        if c in cuts:
            out.append((c, h))
        elif is_temperature(c) and _f_name(c) in cuts:
            out.append((_f_name(c), h.replace("°C", "°F")))
    return out


def quality_text_table(cuts, width: int | None = None) -> str:
    """The key qualities per cut as aligned text fitted to ``width`` (:func:`~.textgrid.grid`); estimated
    values end in '~'; '' when there are none."""
    cols = _shown(TERMINAL_QUALITIES, cuts)
    if not cols:
        return ""
    head = ["Cut"] + [h for _, h in cols]
    body = [[str(r["name"])] + [_marked(r, c) for c, _ in cols] for r in cuts.rows()]
    lines = grid(head, body, width=width)
    lines += wrap("~ estimated in whole or part (a correlation, or the nearest measured cut where no narrow cut "
                  "measured it)", width, "  ")
    return "\n".join(lines)


def text_table(cuts, width: int | None = None) -> str:
    """The cut table as aligned plain text for the terminal, fitted to ``width`` (column groups repeating the
    cut name); digits by :mod:`.precision`; estimated values end in '~', out-of-scope ones in '?'."""
    cols = _shown(TERMINAL_COLUMNS, cuts)
    rows = cuts.rows()
    if not any(r.get("extrapolated") for r in rows):
        cols = [(c, h) for c, h in cols if c != "extrapolated"]
    body = [[str(r[c]) if c == "name" else _marked(r, c) for c, _ in cols] for r in rows]
    lines = grid([h for _, h in cols], body, width=width)
    for c, _ in cols:
        if c in TERMINAL_LEGEND:
            lines += wrap(TERMINAL_LEGEND[c], width, "  ")
    if any(r.get("out_of_scope") for r in rows):
        lines += wrap(OUT_OF_SCOPE_MARK + " " + OUT_OF_SCOPE_LEGEND, width, "  ")
    return "\n".join(lines)


OUT_OF_SCOPE_MARK = "?"
"""Printed after a value whose correlation is used outside its published scope."""
OUT_OF_SCOPE_LEGEND = "outside the correlation's published scope: indicative only"


def _marked(rec: dict, col: str) -> str:
    """A printed value with its flags: '~' estimated, '?' out of the correlation's scope; '-' when missing;
    'yes' for a true flag."""
    v = rec[col]
    if isinstance(v, bool):
        return "yes" if v else ""
    text = shown(col, v)
    if text == "-":
        return text
    return (text + ("~" if col in rec.get("estimated", ()) else "")
            + (OUT_OF_SCOPE_MARK if col in rec.get("out_of_scope", ()) else ""))


def md(text) -> str:
    """Text for a Markdown line or table cell: line breaks and control characters become spaces, HTML and
    Markdown markup characters are escaped, '|' becomes '/'.

    Examples
    --------
    >>> md("Crude <b>A</b>\\n# owned | *x*")
    'Crude &lt;b&gt;A&lt;/b&gt; \\\\# owned / \\\\*x\\\\*'
    """
    import html

    t = replace_hidden(str(text), " ")
    t = html.escape(t, quote=False).replace("|", "/")
    return re.sub(r"([\\`*_\[\]#!~])", r"\\\1", t)


def markdown_summary(result, unit: str = "C") -> str:
    """A short Markdown summary of one yield result (names and texts escaped by :func:`md`), temperatures in
    ``unit`` ('C' or 'F'), digits by :mod:`.precision`, daily rates when the run has a crude rate."""
    a = result.assay
    m = result.model
    u = "°F" if unit == "F" else "°C"

    def t(x):
        return float(c_to_f(x)) if unit == "F" else x

    s = m.given_sulfur_wt_pct
    rate = result.cuts.attrs.get("rate_bbl_per_day")
    out = [f"# Yield report: {md(a.name)}", "",
           "*Estimates for screening and planning, not measured properties.*", "",
           f"- Source: `{md(a.source).replace('`', '')}` (sha256 `{a.sha256[:16]}...`)",
           f"- Origin: {md(a.origin) if a.origin else '-'}",
           f"- Whole crude: {shown('api', a.api)} °API, SG {shown('sg', a.sg)}, sulfur "
           + (f"{shown('sulfur_wt_pct', s)} wt %" if s is not None else "not given"),
           *([f"- Crude run: {shown('bbl_per_day', rate)} bbl/d"] if rate else []),
           f"- Curve measured to {pct_text(m.curve.measured_hi)} vol % "
           f"({shown('end_c', t(float(m.curve.temp_at(m.curve.measured_hi))))} {u} TBP); "
           f"{shown('vol_pct', m.curve.extrapolated_pct)} vol % of the crude rests on the fitted extension, "
           f"{shown('vol_pct', m.curve.lumped_pct)} vol % of it lumped at the {shown('end_c', t(m.curve.fbp_c))} {u} "
           f"end point",
           *[f"- Whole crude: {label_for(k)} {shown(k, v) if isinstance(v, float) else v}"
             for k, v in a.extras.items()],
           f"- Closure: vol {residual_text(result.closure['vol_pct'])} %, wt "
           f"{residual_text(result.closure['wt_pct'])} %", ""]
    day = rate is not None
    out += [f"| Cut | TBP range {u} | vol % | wt % | " + ("bbl/d | t/d | " if day else "")
            + f"API | S wt % | Watson K | CCI | Flash est. {u} |",
            "|---|---|---:|---:|" + ("---:|---:|" if day else "") + "---:|---:|---:|---:|---:|"]
    for r in result.cuts.rows():
        rng = f"{shown('end_c', t(r['start_c'])) if r['start_c'] == r['start_c'] else 'IBP'}-" \
              f"{shown('end_c', t(r['end_c'])) if r['end_c'] == r['end_c'] else 'end'}"
        name = md(safe_text(r["name"])) + (" (extrap.)" if r["extrapolated"] else "")
        rates = f"{shown('bbl_per_day', r['bbl_per_day'])} | {shown('t_per_day', r['t_per_day'])} | " if day else ""
        flash = r["flash_c_est"]
        out.append(f"| {name} | {rng} | {shown('vol_pct', r['vol_pct'])} | {shown('wt_pct', r['wt_pct'])} | {rates}"
                   f"{shown('api', r['api'])} | {shown('sulfur_wt_pct', r['sulfur_wt_pct'])} | "
                   f"{shown('watson_k', r['watson_k'])} | {shown('cetane_index_d4737', r['cetane_index_d4737'])} | "
                   f"{shown('flash_c_est', None if flash is None or flash != flash else t(flash))} |")
    if len(result.limits):
        out += ["", "## Product limits", "", "| Cut | Limit | Required | Value | Unit | Status |",
                "|---|---|---|---:|---|---|"]
        for r in limits_in_unit(result.limits.rows(), unit):
            val = "≥ 95" if is_lower_bound(r["property"], r["value"]) else limit_shown(r["value"], r["limit"])
            out.append(f"| {md(r['cut'])} | {md(r['label'] or r['property'])} | {r['limit']} | {val} | {r['unit']} | "
                       f"{r['status'].upper()} |")
    if result.warnings:
        out += ["", "## Warnings", ""] + [f"- {md(w)}" for w in result.warnings]
    out += ["", "## Cautions", ""] + [f"- {md(n)}" for n in result.notes]
    return "\n".join(out) + "\n"
