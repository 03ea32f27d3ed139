"""What the command line prints: each command's result rendered as plain text lines for the terminal."""

from __future__ import annotations

import math

from ..cutting.limits import is_lower_bound, limit_title
from .studyreports import compare_wide
from .precision import fixed, limit_decimals, limit_shown, shown
from .tables import (deg, display_cuts, is_temperature, limit_line_in_unit, limits_in_unit, quality_text_table,
                     temp_in_unit, text_in_unit, text_table, unit_key, unit_of)
from .textgrid import grid, wrap

FLASH_FOOTNOTE = ("* Flash points are correlation estimates: measure them (ASTM D93). All results are screening "
                  "estimates; see the notes sheet of the report for methods and cautions.")


def yield_text(result, unit: str = "C") -> list[str]:
    """One assay's heading, cut table (temperatures in ``unit``, 'C' or 'F') and failed limits."""
    a = result.assay
    cuts = display_cuts(result.cuts, unit)
    s = result.model.given_sulfur_wt_pct
    rate = result.cuts.attrs.get("rate_bbl_per_day")
    lines = [f"\n{a.name}  ({a.origin or 'origin not given'})", f"{shown('api', a.api)} °API, SG {shown('sg', a.sg)}, "
             f"sulfur {shown('sulfur_wt_pct', s) + ' wt %' if s is not None else 'not given'}"
             + (f"; crude run {shown('bbl_per_day', rate)} bbl/d" if rate else ""),
             text_table(cuts)]
    q = quality_text_table(cuts)
    if q:
        lines += ["", q]
    lines += lpg_lines(cuts)
    if result.bands is not None:
        lines += ["", *bands_text(result.bands)]
    fails = [x for x in limits_in_unit(result.limits.rows(), unit) if x["status"] == "fail"]
    if fails:
        lines.append("Limits failed:")
        for x in fails:
            u = "" if x["unit"] == "-" else " " + x["unit"]
            lines += wrap(f"  {limit_title(x['cut'], x['label'] or x['property'])}: {_limit_value(x)}{u}, needs "
                          f"{x['limit']}{u}", indent="    ")
    return lines


def lpg_lines(cuts) -> list[str]:
    """One line per cut holding propane or butanes: its LPG split [vol % of the cut]."""
    if "lpg_c3_vol_pct" not in cuts:
        return []
    out = []
    for r in cuts.rows():
        vals = [r.get(k) for k in ("lpg_c3_vol_pct", "lpg_ic4_vol_pct", "lpg_nc4_vol_pct")]
        if all(v is not None and v == v for v in vals):
            out += wrap(f"LPG split of {r['name']}: propane {vals[0]:.1f}, isobutane {vals[1]:.1f}, n-butane "
                        f"{vals[2]:.1f} vol % of the cut (from the light-ends analysis)", indent="  ")
    return [""] + out if out else []


def bands_text(bands) -> list[str]:
    """P10/P50/P90 of each cut's volume and weight yield under the measurement uncertainty, and the
    assumptions behind them."""
    head = ["Cut", "vol % P10", "P50", "P90", "wt % P10", "P50", "P90"]
    body = [[r["name"]] + [shown(q, r[f"{q}_p{p}"]) for q in ("vol_pct", "wt_pct") for p in (10, 50, 90)]
            for r in bands.rows()]
    lines = [f"Yield bands under the measurement uncertainty ({bands.attrs['draws']} draws, "
             f"{bands.attrs['failed']} failed):"]
    lines += grid(head, body, rule=False)
    lines.append(f"  {bands.attrs['sigmas']}")
    return lines


def _limit_value(x: dict) -> str:
    """A checked limit's value as printed: '≥ 95' for a recovery past the D86 estimate, else one decimal more
    than the limit (:func:`~.precision.limit_shown`)."""
    return "≥ 95" if is_lower_bound(x["property"], x["value"]) else limit_shown(x["value"], x["limit"])


WARNING_WIDTH = 150
"""Longest printed warning [characters]; the full text is in the report's notes sheet and the JSON."""


def short_warning(text: str, width: int = WARNING_WIDTH) -> str:
    """A warning as the terminal prints it: parenthesised detail removed, then cut at a word boundary to
    ``width`` characters with '…' (the full text stays in the notes sheet and the JSON).

    Examples
    --------
    >>> short_warning("cut(s) vacuum residue depend on the fitted extension (they reach above 78 vol %)")
    'cut(s) vacuum residue depend on the fitted extension'
    """
    out, depth = [], 0
    for k, ch in enumerate(text):
        if ch == "(" and (depth or k == 0 or not text[k - 1].isalnum()):  # "cut(s)" keeps its "(s)"
            depth += 1
        elif ch == ")" and depth:
            depth -= 1
        elif not depth:
            out.append(ch)
    t = " ".join("".join(out).split()).replace(" ,", ",").replace(" :", ":").replace(" ;", ";").rstrip(" ,;:")
    if not t:
        t = " ".join(text.split())
    if len(t) > width:
        t = t[:width - 1].rsplit(" ", 1)[0].rstrip(" ,;:") + "…"
    return t


def warning_lines(results, unit: str = "C") -> list[str]:
    """Each distinct warning of a run once, shortened (:func:`short_warning`), its temperatures in ``unit``
    ('C' or 'F'), naming the crudes it concerns ("all 3 crudes" when every crude of a run of several has
    it), wrapped to the terminal; a last line says where the full texts are when any was shortened."""
    groups: dict[str, list[str]] = {}
    cut = False
    for r in results:
        name = r.assay.name if hasattr(r, "assay") else r.name
        for w in r.warnings:
            s = short_warning(w)
            if unit == "F":
                s = text_in_unit(s, unit)
            cut = cut or s != " ".join(w.split())
            crudes = groups.setdefault(s, [])
            if name not in crudes:
                crudes.append(name)
    n = len(results)
    lines = []
    for text, crudes in groups.items():
        who = f"all {n} crudes" if n > 1 and len(crudes) == n else ", ".join(crudes)
        lines += wrap(f"warning: {who}: {text}", indent="  ")
    if cut:
        lines += wrap("(warnings shortened: the full texts are in each report's notes sheet and in --json)")
    return lines


def written_text(written, what: str = "Report") -> str:
    """'Report written to FOLDER (N files).', naming at most three folders."""
    folders = sorted({str(p.parent) for p in written})
    shown = ", ".join(folders[:3]) + (f" and {len(folders) - 3} more folders" if len(folders) > 3 else "")
    return f"{what} written to {shown} ({len(written)} file{'' if len(written) == 1 else 's'})."


SEVERITY_ORDER = ("error", "warning", "info")
"""The order findings are printed in."""


def check_text(name: str, findings, ok: bool) -> list[str]:
    """The assay check: a headline counting errors and warnings, then the findings, errors first, each once,
    wrapped to the terminal."""
    seen, rows = set(), []
    for f in sorted(findings, key=lambda f: SEVERITY_ORDER.index(f.severity)):
        if (f.severity, f.where, f.message) not in seen:
            seen.add((f.severity, f.where, f.message))
            rows.append(f)
    count = {s: sum(f.severity == s for f in rows) for s in SEVERITY_ORDER}

    def n(k, word):
        return f"{k} {word}{'' if k == 1 else 's'}"

    head = (f"{name}: {'no errors' if ok else n(count['error'], 'ERROR')}, {n(count['warning'], 'warning')}, "
            f"{n(count['info'], 'note')}")
    lines = [head]
    for f in rows:
        lines += wrap(f"  {f.severity.upper():8s} {f.where}: {f.message}", indent=" " * 11)
    return lines


def convert_text(frm: str, to: str, used: str, src: dict, out: dict, unit: str, c_to_unit,
                 filled_src: dict | None = None) -> list[str]:
    """A converted curve: input and output temperature per percent, in ``unit`` ('°C' or '°F'); inputs
    interpolated between the given points (``filled_src``) are marked '*'."""
    lines = [f"{frm} -> {to} by {used}", f"{'percent':>8}  {frm + ' ' + unit:>12}  {to + ' ' + unit:>12}"]
    filled = False
    for p, t in out.items():
        s = src.get(p)
        if s is None and filled_src and p in filled_src:
            s_txt, filled = f"{c_to_unit(filled_src[p]):.1f}*", True
        else:
            s_txt = "" if s is None else f"{c_to_unit(s):.1f}"
        lines.append(f"{p:8g}  {s_txt:>12}  {c_to_unit(t):12.1f}")
    if filled:
        lines.append(f"* not given: interpolated (monotone) between the given {frm} points; an estimate")
    return lines


def compare_text(table, worth, currency: str | None, caveat: str, inside, uncertainty: bool, whole=None,
                 rate: float | None = None, unit: str = "C") -> list[str]:
    """Crudes side by side (one column per crude, fitted to the terminal), the worth ranking (per day with a
    crude run ``rate`` [bbl/d]), and the yield differences inside the uncertainty bands.  ``whole``: the
    whole-crude rows (:func:`~.studyreports.whole_crude_rows`); ``unit``: 'C' or 'F' for the cuts' TBP ranges."""
    crudes, rows = compare_wide(table, whole, unit)
    body = [[r[0], r[1]] + [shown(r[2], v) if isinstance(v, float) else (v or "-") for v in r[3:]] for r in rows]
    lines = grid(["Cut", "Quality"] + crudes, body, keep=2)
    if any(r[2] == "extrapolated" and "yes" in r[3:] for r in rows):
        lines += wrap("Extrapolated yes: the cut rests partly on the curve's fitted extension")
    if worth is not None:
        basis = worth.attrs.get("ranked_by", "worth_per_bbl")
        why = ("ranked by margin per bbl: every crude has a price" if basis == "margin_per_bbl" else
               "ranked by worth per bbl: not every crude has a price, so margins cannot all be compared")
        lines += ["", f"Gross product worth and margin [{currency}], {why}"]
        day = rate is not None and "worth_per_day" in worth
        head = ["#", "Crude", "worth/bbl", "worth/t", "margin/bbl", "margin/t"] + (["worth/d", "margin/d"] if day
                                                                                 else [])
        body = []
        for r in worth.to_dict("records"):
            keys = ["worth_per_bbl", "worth_per_t", "margin_per_bbl", "margin_per_t"]
            keys += ["worth_per_day", "margin_per_day"] if day else []
            body.append([str(r["rank"]), r["crude"]] + [shown(k, r[k], signed=k.startswith("margin")) for k in keys])
        lines += grid(head, body, align="rl" + "r" * (len(head) - 2), keep=2)
        if day:
            lines.append(f"per day at a crude run of {shown('bbl_per_day', rate)} bbl/d")
        if worth["margin_per_bbl"].isna().any():
            lines.append("margin '-': no crude price given")
        lines += wrap(caveat)
    if uncertainty:
        lines.append("\nYield differences inside the P10-P90 bands (not significant under the assumed measurement "
                     "uncertainty):")
        lines += [f"  {c}: {a} ~ {b}" for c, a, b in inside] or ["  none"]
    return lines


def blend_plan_text(plan) -> list[str]:
    """The blend optimiser's plan, fitted to the terminal: shares (with the bounds a share sits on), blend
    qualities and yields, each target's slack and marginal value, and the shortfalls."""
    head = "Optimal blend" if plan.feasible else "The targets cannot all be met; the closest blend"
    lines = [f"{head} ({plan.objective} {fixed(plan.value, 2)}):"]
    body = []
    for b in plan.share_bounds or [{"crude": k, "share_pct": x, "min_pct": 0.0, "max_pct": 100.0, "at": None,
                                     "marginal_per_pct": None} for k, x in plan.shares_pct.items()]:
        on = ""
        if b["at"]:
            on = f"at its {'minimum' if b['at'] == 'min' else 'maximum'}"
            if b["marginal_per_pct"] is not None:
                on += f", {fixed(b['marginal_per_pct'], 3, signed=True)} per vol %"
        body.append([b["crude"], shown("share_pct", b["share_pct"]),
                     f"{b['min_pct']:g}-{b['max_pct']:g}", on])
    lines += grid(["Crude", "share vol %", "bounds %", ""], body, align="lrrl")
    s = plan.sulfur_wt_pct
    lines += wrap(f"Blend API {shown('api', plan.api)} °API, sulfur "
                  + (f"{shown('sulfur_wt_pct', s)} wt %" if s == s else "not given") + "; yields "
                  + ", ".join(f"{k} {shown('vol_pct', v)}" for k, v in plan.yields.items()) + " vol %", indent="  ")
    if plan.compatibility is not None:
        lines += wrap(plan.compatibility.text(), indent="  ")
    if plan.binding:
        lines += wrap("Binding targets: " + "; ".join(plan.binding), indent="  ")
    for t in plan.targets:
        marg = "" if t["marginal_per_unit"] is None else \
            f", marginal value {fixed(t['marginal_per_unit'], 3, signed=True)} per {t['unit']}"
        lines += wrap(f"{t['target']}: achieved {fixed(t['achieved'], 2)}, slack {fixed(t['slack'], 2)} "
                      f"{t['unit']}{marg}", indent="  ")
    for lab, amount in plan.shortfalls.items():
        unit = "°API" if "API" in lab else ("wt %" if "sulfur" in lab else "vol %")
        how = "exceeded by" if "<=" in lab else "short by"
        lines += wrap(f"target not met: {lab}, {how} {fixed(amount, 2)} {unit}", indent="  ")
    lines += wrap("Marginal values: change of the objective per unit of a target or per vol % of a share bound "
                  "(linear programme duals). Linear blending rules (no shrinkage); worth ignores operating costs "
                  "and unit limits.")
    return lines


def blend_text(new) -> list[str]:
    """A blend written as a new assay: its gravity and sulfur, and its notes."""
    s = new.sulfur_wt_pct
    return ([f"Blend {new.name}: {shown('api', new.api)} °API, SG {shown('sg', new.sg)}, sulfur "
             + (f"{shown('sulfur_wt_pct', s)} wt %" if s is not None else "not given")]
            + [x for n in new.notes for x in wrap("  " + n, indent="    ")])


SWEEP_COLUMNS = [("vol_pct", "vol %"), ("wt_pct", "wt %"), ("sg", "SG"), ("sulfur_wt_pct", "S wt %"),
                 ("d86_10_c", "D86 10 °C"), ("d86_95_c", "D86 95 °C"), ("cetane_index_d4737", "CCI"),
                 ("flash_c_est", "Flash °C*"), ("freeze_point_c", "Freeze °C"), ("smoke_point_mm", "Smoke mm"),
                 ("cloud_point_c", "Cloud °C"), ("pour_point_c", "Pour °C")]
"""The qualities a printed sweep shows for each of the two cuts (those the sweep has)."""


def sweep_text(crude: str, df, unit: str = "C") -> list[str]:
    """A cut-point sweep as a table fitted to the terminal: for the cut below and the cut above the moving
    point, yields on both bases, SG, sulfur, D86 10 % and 95 %, cetane index, the flash estimate, and the
    freeze, smoke, cloud and pour points where the crude has them.  ``df`` as
    :func:`~assaycut.report.tables.frame_in_unit` shows it in ``unit`` ('C' or 'F'); a quality estimated by
    a correlation rather than measured carries '~' in its header."""
    lo, up = df.attrs["lower"], df.attrs["upper"]
    u = deg(unit)
    est = set(df.attrs.get("estimated", ()))
    cols = [(side, q, h) for side in ("lower", "upper") for q, h in SWEEP_COLUMNS
            if f"{side}_{unit_key(q, unit)}" in df]
    head = [f"Cut {u}"] + [f"{'lo' if side == 'lower' else 'up'} {h.replace('°C', u)}"
                           + ("~" if f"{side}_{q}" in est else "") for side, q, h in cols]
    body = [[shown("cut_point_c", r[unit_key("cut_point_c", unit)])]
            + [shown(q, r[f"{side}_{unit_key(q, unit)}"]) for side, q, _ in cols] for r in df.to_dict("records")]
    notes = ["* flash estimates must be measured (ASTM D93)."]
    if est:
        notes += wrap("~ estimated by a correlation over some or all of the sweep, not measured on narrow cuts")
    return [f"{crude}: cut point between {lo!r} (lo) and {up!r} (up)"] + grid(head, body) + notes


def optimum_text(crude: str, what: str, unit: str, res, cut_set, before=None, after=None,
                 temp_unit: str = "C", limits=()) -> list[str]:
    """The optimiser's answer: each cut's start and optimum end point (and yields), the objective, how the
    search went, the active limits; when infeasible, what cannot be met and by how much.  ``unit``: the
    objective's unit; ``temp_unit``: 'C' or 'F' for the temperatures (``limits``: the limits the search used,
    whose temperature bounds are then shown in °F)."""
    props = {lim.describe(): lim.property for lim in limits}

    def lim_line(text):
        return limit_line_in_unit(text, props.get(text, ""), temp_unit)

    lines = [f"{crude}: maximise {what}"]
    moved = set(res.var_index)
    yields = before is not None and after is not None
    u = deg(temp_unit)
    head = ["Cut", f"start end {u}"] + ([f"optimum end {u}"] if res.feasible else [])
    head += (["start vol %"] + (["optimum vol %"] if res.feasible else [])) if yields else []
    head.append("")
    body = []
    for k, c in enumerate(cut_set.cuts):
        ends = k < len(res.ends_c)
        row = [c.name, shown("end_c", temp_in_unit(res.start_ends_c[k], temp_unit)) if ends else "end"]
        if res.feasible:
            row.append(shown("end_c", temp_in_unit(res.ends_c[k], temp_unit)) if ends else "end")
        if yields:
            row.append(shown("vol_pct", before["vol_pct"][k]))
            if res.feasible:
                row.append(shown("vol_pct", after["vol_pct"][k]))
        moved_here = ends and res.feasible and abs(res.ends_c[k] - res.start_ends_c[k]) > 1e-9
        row.append("held" if ends and k not in moved else ("*" if moved_here else ""))
        body.append(row)
    lines += grid(head, body, align="l" + "r" * (len(head) - 2) + "l")
    lines.append("* moved by the optimiser; held: not a moving cut point")
    prose = []
    state = "converged" if res.converged else ("NOT converged: the answer is the best found, not a proven optimum")
    prose.append(f"Search: {res.method}; {len(res.var_index)} moving cut point(s), {res.generations} generations, "
                 f"{res.evaluations} candidates; {state}.")
    if res.feasible:
        prose.append(f"{what}: {fixed(res.start_objective, 2)} at the start -> {fixed(res.objective, 2)} {unit} at "
                     f"the optimum" + (f" (brute-force grid best {fixed(res.grid_best, 2)})"
                                   if res.grid_best == res.grid_best else ""))
        if res.active:
            prose.append("Active limits: " + "; ".join(lim_line(x) for x in res.active))
        prose += [f"Note: {text_in_unit(n, temp_unit)}" for n in res.bound_notes]
    else:
        prose.append("NO FEASIBLE ANSWER: no cut points within the span meet every limit. What cannot be met, at "
                     "the least-violating cut points found:")
        for f in res.shortfalls:
            temp = temp_unit == "F" and is_temperature(f["property"])
            u = "°F" if temp else unit_of(f["property"])
            u = "" if u == "-" else " " + u
            alone = "" if f["alone_possible"] else " (cannot be met on its own within the span)"
            nd = limit_decimals(f["limit"])
            value = temp_in_unit(f["value"], temp_unit) if temp else f["value"]
            short = temp_in_unit(f["short_by"], temp_unit, difference=True) if temp else f["short_by"]
            prose.append(f"  {limit_line_in_unit(f['limit'], f['property'], temp_unit)}: {fixed(value, nd)}{u}, "
                         f"short by {fixed(short, nd)}{u}{alone}")
    if res.violated_at_start:
        prose.append("Limits broken at the start: " + "; ".join(res.violated_at_start))
    if res.not_evaluated:
        prose.append("Not evaluated (n/a, not constraining): " + "; ".join(res.not_evaluated))
    guard = [f"{n} {v:g}" for n, v in res.min_yields.items() if v > 0]
    if guard:
        prose.append("Minimum yields kept [vol %] (--min-yield): " + ", ".join(guard))
    prose.append("Qualities are estimates; flash points must be measured (ASTM D93).")
    for p in prose:
        lines += wrap(p, indent="  ")
    return lines


SHIFT_COLUMNS = [("vol_pct", "vol %"), ("wt_pct", "wt %"), ("sg", "SG"), ("sulfur_wt_pct", "S wt %"),
                 ("d86_95_c", "D86 95 °C"), ("cetane_index_d4737", "CCI"), ("flash_c_est", "Flash °C")]
"""The qualities a printed shift shows, each as its new value and its change."""


def shift_text(delta, width: int | None = None, unit: str = "C") -> str:
    """The shift as a table fitted to the terminal: each quality's new value and its change (Δ) beside it,
    numbers right-aligned, changed cuts marked '*', the limits that flip listed under the table; temperatures
    in ``unit`` ('C' or 'F'; a change of temperature as a difference)."""

    def e(v):
        return "end" if v is None or (isinstance(v, float) and math.isnan(v)) else shown("end_c", temp_in_unit(v, unit))

    def q_new(q, v):
        return shown(q, temp_in_unit(v, unit) if is_temperature(q) else v)

    def q_delta(q, v):
        return shown(q, temp_in_unit(v, unit, difference=True) if is_temperature(q) else v, signed=True)

    u = deg(unit)
    head = ["Cut", f"End {u}", f"new End {u}"] + [x for _, h in SHIFT_COLUMNS for x in (h.replace("°C", u),
                                                                                        "Δ " + h.replace("°C", u))]
    body, flips = [], []
    for r in delta.rows():
        body.append([("* " if r["changed"] else "  ") + r["name"], e(r["end_c_base"]), e(r["end_c_new"])]
                    + [x for q, _ in SHIFT_COLUMNS for x in (q_new(q, r[f"new_{q}"]), q_delta(q, r[q]))])
        if r["limit_flips"]:
            flips.append(f"  {r['name']}: {text_in_unit(r['limit_flips'], unit)}")
    lines = grid(head, body, width=width)
    lines.append("* the cut's yield changed; Δ = new less base")
    lines += (["Limits that flip:"] + flips) if flips else ["No limit flips."]
    return "\n".join(lines)


def calibration_text(crude: str, cal) -> list[str]:
    """The calibration as printed: per boundary the fitted cut point and overlap with their standard
    deviations, then every measurement beside its fitted value, the warnings and the caution."""
    def pm(v, sd):
        return "-" if v is None else fixed(v, 1) + ("" if sd is None else f" ± {fixed(sd, 1)}")

    lines = wrap(f"{crude}: the column fitted to a test run ({cal.basis} % rates; weighted least squares)")
    body = [[c["name"], pm(c["end_c"], c["end_c_sd"]), pm(c["overlap_c"], c["overlap_c_sd"]), c["fitted"]]
            for c in cal.cut_points]
    lines += grid(["End of", "cut point °C TBP", "overlap °C TBP 5-95", "fitted"], body, align="lrrl")
    lines.append("")
    body = [[r["product"], r["what"], fixed(r["measured"], 4 if "SG" in r["what"] else 2),
             fixed(r["fitted"], 4 if "SG" in r["what"] else 2),
             fixed((r["fitted"] - r["measured"]) / r["sigma"], 1, signed=True)] for r in cal.residuals]
    lines += grid(["Product", "measured", "value", "fitted", "resid/σ"], body, align="llrrr", keep=2)
    lines += wrap(f"Weighted sum of squares {fixed(cal.chi_square, 2)} on {cal.dof} degrees of freedom.")
    lines += [w for x in cal.warnings for w in wrap(f"warning: {x}", indent="  ")]
    lines += wrap("One test run of one column, at that day's rates, feed and operation: check the fitted cut "
                  "points against other runs before relying on them.")
    return lines


def pseudo_text(assay, model, comps, method: str) -> list[str]:
    """The components as printed: one row per component (NBP, SG, MW, Tc, Pc, ω, shares of the crude), then
    the notes (method, recombination, range, caution)."""
    from .studyreports import pseudo_notes

    prod = "product" in comps[0]
    head = ["Component"] + (["Product"] if prod else []) + ["NBP °C", "SG", "MW", "Tc °C", "Pc bar", "ω", "vol %",
                                                            "wt %", "mol %"]
    body = []
    for c in comps:
        body.append([c["name"] + ("" if c["in_range"] else "†")] + ([c["product"]] if prod else [])
                    + [fixed(c["nbp_c"], 1), fixed(c["sg"], 4), fixed(c["mw"], 1), fixed(c["tc_c"], 1),
                       fixed(c["pc_bar"], 2), fixed(c["omega"], 3), fixed(c["vol_pct"], 3), fixed(c["wt_pct"], 3),
                       fixed(c["mol_pct"], 3)])
    lines = [""] + wrap(f"{assay.name}: {len(comps)} components ({sum(c['pure'] for c in comps)} pure), method "
                        f"{method}")
    lines += grid(head, body, align="l" * (2 if prod else 1) + "r" * 9, keep=2 if prod else 1)
    if any(not c["in_range"] for c in comps):
        lines += wrap("† outside the method's fitted range: indicative only")
    for topic, text in pseudo_notes(assay, model, comps, method)[2:]:
        if topic != "Outside the method's range":
            lines += wrap(f"{topic}: {text}", indent="  ")
    return lines
