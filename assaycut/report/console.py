"""What the command line prints: each command's result rendered as plain text lines for the terminal."""

from __future__ import annotations

import math

from ..cutting.limits import is_lower_bound, limit_title
from .studyreports import compare_wide
from .tables import display_cuts, num, quality_text_table, text_table, unit_of

FLASH_FOOTNOTE = ("\n* Flash points are correlation estimates: measure them (ASTM D93). All results are screening "
                  "estimates; see the notes sheet of the report for methods and cautions.")


def yield_text(result, unit: str = "C") -> list[str]:
    """One assay's heading, cut table (temperatures in ``unit``, 'C' or 'F') and failed limits."""
    a = result.assay
    cuts = display_cuts(result.cuts, unit)
    lines = [f"\n{a.name}  ({a.origin or 'origin not given'})  {a.api:.1f} °API, SG {a.sg:.4f}, sulfur "
             + (f"{result.model.given_sulfur_wt_pct:.3f} wt %" if result.model.given_sulfur_wt_pct is not None else "n/a"),
             text_table(cuts)]
    q = quality_text_table(cuts)
    if q:
        lines += ["", q]
    if result.bands is not None:
        lines += ["", *bands_text(result.bands)]
    fails = [x for x in result.limits.rows() if x["status"] == "fail"]
    if fails:
        lines.append("Limits failed: " + "; ".join(f"{limit_title(x['cut'], x['label'] or x['property'])} "
                                                   f"({_limit_value(x)}, "
                                                   f"needs {x['limit']})"
                                                   for x in fails))
    return lines


def bands_text(bands) -> list[str]:
    """P10/P50/P90 of each cut's volume and weight yield under the measurement uncertainty, and the
    assumptions behind them."""
    head = ["Cut", "vol % P10", "P50", "P90", "wt % P10", "P50", "P90"]
    body = [[r["name"]] + [num(r[f"{q}_p{p}"], 2) for q in ("vol_pct", "wt_pct") for p in (10, 50, 90)]
            for r in bands.rows()]
    widths = [max(len(str(x)) for x in col) for col in zip(head, *body)]
    fmt = [str.ljust] + [str.rjust] * 6
    lines = [f"Yield bands under the measurement uncertainty ({bands.attrs['draws']} draws, "
             f"{bands.attrs['failed']} failed):"]
    lines += ["  ".join(f(str(x), w) for f, x, w in zip(fmt, row, widths)).rstrip() for row in [head] + body]
    lines.append(f"  {bands.attrs['sigmas']}")
    return lines


def _limit_value(x: dict) -> str:
    """A checked limit's value as printed: '≥ 95' for a recovery past the D86 estimate, else 2 decimals."""
    return "≥ 95" if is_lower_bound(x["property"], x["value"]) else num(x["value"], 2)


def written_text(written, what: str = "Report") -> str:
    """'Report written to FOLDER (N files).', naming at most three folders."""
    folders = sorted({str(p.parent) for p in written})
    shown = ", ".join(folders[:3]) + (f" and {len(folders) - 3} more folders" if len(folders) > 3 else "")
    return f"{what} written to {shown} ({len(written)} file{'' if len(written) == 1 else 's'})."


def check_text(name: str, findings, ok: bool) -> list[str]:
    """The assay check: a verdict line, then one line per finding."""
    return [f"{name}: {'OK' if ok else 'ERRORS FOUND'}"] + [f"  {f.severity.upper():8s} {f.where}: {f.message}"
                                                           for f in findings]


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


def compare_text(table, worth, currency: str | None, caveat: str, inside, uncertainty: bool) -> list[str]:
    """Crudes side by side, the worth ranking, and the yield differences inside the uncertainty bands."""
    crudes, rows = compare_wide(table)
    w = max(len(c) for c in crudes) + 2
    lines = [f"{'Cut':<16}{'Quality':<22}" + "".join(f"{c:>{w}}" for c in crudes)]
    for r in rows:
        vals = "".join(f"{(num(v, 3) if isinstance(v, float) else (v or '-')):>{w}}" for v in r[2:])
        lines.append(f"{r[0]:<16}{r[1]:<22}{vals}")
    if worth is not None:
        basis = worth.attrs.get("ranked_by", "worth_per_bbl")
        why = ("ranked by margin per bbl: every crude has a price" if basis == "margin_per_bbl" else
               "ranked by worth per bbl: not every crude has a price, so margins cannot all be compared")
        lines.append(f"\nGross product worth and margin [{currency}], {why} -- {caveat}")
        for r in worth.to_dict("records"):
            m = r["margin_per_bbl"]
            lines.append(f"  {r['rank']}. {r['crude']:<24} worth {num(r['worth_per_bbl'], 2):>8}/bbl "
                         f"{num(r['worth_per_t'], 2):>8}/t"
                         + (f"   margin {num(m, 2, signed=True):>7}/bbl {num(r['margin_per_t'], 2, signed=True):>7}/t"
                            if m == m else "   margin -  (no crude price)"))
    if uncertainty:
        lines.append("\nYield differences inside the P10-P90 bands (not significant under the assumed measurement "
                     "uncertainty):")
        lines += [f"  {c}: {a} ~ {b}" for c, a, b in inside] or ["  none"]
    return lines


def blend_plan_text(plan) -> list[str]:
    """The blend optimiser's plan: shares, blend qualities, binding targets and shortfalls."""
    head = "Optimal blend" if plan.feasible else "The targets cannot all be met; the closest blend"
    lines = [f"{head} ({plan.objective} {plan.value:.2f}):"]
    lines += [f"  {nm:<28}{x:7.2f} %" for nm, x in plan.shares_pct.items()]
    lines.append(f"  blend API {plan.api:.2f} °API, sulfur {plan.sulfur_wt_pct:.3f} wt %; yields "
                 + ", ".join(f"{k} {v:.1f}" for k, v in plan.yields.items()) + " vol %")
    if plan.binding:
        lines.append("  binding targets: " + "; ".join(plan.binding))
    for t in plan.targets:
        marg = "" if t["marginal_per_unit"] is None else \
            f", marginal value {num(t['marginal_per_unit'], 4, signed=True)} per {t['unit']}"
        lines.append(f"  {t['target']}: achieved {num(t['achieved'], 3)}, slack {num(t['slack'], 3)} {t['unit']}{marg}")
    for lab, amount in plan.shortfalls.items():
        unit = "°API" if "API" in lab else ("wt %" if "sulfur" in lab else "vol %")
        how = "exceeded by" if "<=" in lab else "short by"
        lines.append(f"  target not met: {lab}, {how} {num(amount, 3)} {unit}")
    lines.append("  Linear blending rules (no shrinkage); worth ignores operating costs and unit limits.")
    return lines


def blend_text(new) -> list[str]:
    """A blend written as a new assay: its gravity and sulfur, and its notes."""
    return ([f"Blend {new.name}: {new.api:.1f} °API, SG {new.sg:.4f}, sulfur "
             + (f"{new.sulfur_wt_pct:.3f} wt %" if new.sulfur_wt_pct is not None else "n/a")]
            + [f"  {n}" for n in new.notes])


def sweep_text(crude: str, df) -> list[str]:
    """A cut-point sweep as a table: yields, SG, D86 at the boundary and the flash estimate per step."""
    lines = [f"{crude}: cut point between {df.attrs['lower']!r} and {df.attrs['upper']!r}",
             f"{'cut °C':>7} {'lower vol%':>10} {'upper vol%':>10} {'lower SG':>9} {'upper SG':>9} "
             f"{'lower D86 95':>12} {'upper D86 10':>12} {'upper flash*':>12}"]
    for r in df.to_dict("records"):
        lines.append(f"{num(r['cut_point_c']):>7} {num(r['lower_vol_pct'], 2):>10} {num(r['upper_vol_pct'], 2):>10} "
                     f"{num(r['lower_sg'], 4):>9} {num(r['upper_sg'], 4):>9} {num(r['lower_d86_95_c']):>12} "
                     f"{num(r['upper_d86_10_c']):>12} {num(r['upper_flash_c_est']):>12}")
    lines.append("* flash estimates must be measured (ASTM D93).")
    return lines


def optimum_text(crude: str, what: str, unit: str, res, cut_set, before=None, after=None) -> list[str]:
    """The optimiser's answer: each cut's start and optimum end point (and yields), the objective, how the
    search went, the active limits; when infeasible, what cannot be met and by how much."""
    lines = [f"{crude}: maximise {what}"]
    moved = set(res.var_index)
    yields = before is not None and after is not None
    head = f"{'cut':<18}{'start end point °C':>20}"
    head += f"{'optimum end point °C':>22}" if res.feasible else ""
    head += (f"{'start vol %':>13}" + (f"{'optimum vol %':>15}" if res.feasible else "")) if yields else ""
    lines.append(head)
    for k, c in enumerate(cut_set.cuts):
        ends = k < len(res.ends_c)
        row = f"{c.name:<18}" + (f"{res.start_ends_c[k]:20.1f}" if ends else f"{'end of curve':>20}")
        if res.feasible:
            row += f"{res.ends_c[k]:22.1f}" if ends else f"{'end of curve':>22}"
        if yields:
            row += f"{num(before['vol_pct'][k], 2):>13}"
            row += f"{num(after['vol_pct'][k], 2):>15}" if res.feasible else ""
        if ends and k not in moved:
            row += "  (held)"
        elif ends and res.feasible and abs(res.ends_c[k] - res.start_ends_c[k]) > 1e-9:
            row += "  *"
        lines.append(row)
    state = "converged" if res.converged else ("NOT converged: the answer is the best found, not a proven optimum")
    lines.append(f"Search: {res.method}; {len(res.var_index)} moving cut point(s), {res.generations} generations, "
                 f"{res.evaluations} candidates; {state}.")
    if res.feasible:
        lines.append(f"{what}: {num(res.start_objective, 2)} at the start -> {num(res.objective, 2)} {unit} at the "
                     f"optimum" + (f" (brute-force grid best {num(res.grid_best, 2)})"
                                   if res.grid_best == res.grid_best else ""))
        if res.active:
            lines.append("Active limits: " + "; ".join(res.active))
    else:
        lines.append("NO FEASIBLE ANSWER: no cut points within the span meet every limit. What cannot be met, at "
                     "the least-violating cut points found:")
        for f in res.shortfalls:
            u = "" if unit_of(f["property"]) == "-" else " " + unit_of(f["property"])
            alone = "" if f["alone_possible"] else " (cannot be met on its own within the span)"
            lines.append(f"  {f['limit']}: {num(f['value'], 3)}{u}, short by {num(f['short_by'], 3)}{u}{alone}")
    if res.violated_at_start:
        lines.append("Limits broken at the start: " + "; ".join(res.violated_at_start))
    if res.not_evaluated:
        lines.append("Not evaluated (n/a, not constraining): " + "; ".join(res.not_evaluated))
    guard = [f"{n} {v:g}" for n, v in res.min_yields.items() if v > 0]
    if guard:
        lines.append("Minimum yields kept [vol %] (--min-yield): " + ", ".join(guard))
    lines.append("Qualities are estimates; flash points must be measured (ASTM D93).")
    return lines


def shift_text(delta) -> str:
    """The shift as aligned text: each quality's new value and its change beside it, changed cuts marked '*'."""
    head = ["", "Cut", "End °C", "-> End °C", "vol %", "Δ vol %", "wt %", "Δ wt %", "SG", "Δ SG", "S wt %",
            "Δ S wt %", "D86 95 °C", "Δ", "CCI", "Δ", "Flash °C", "Δ", "Limit flips"]

    def f(v, nd):
        return num(v, nd, signed=True)

    def e(v):
        return "end" if v is None or (isinstance(v, float) and math.isnan(v)) else f"{v:g}"

    body = [["*" if r["changed"] else "", r["name"], e(r["end_c_base"]), e(r["end_c_new"]),
             num(r["new_vol_pct"], 2), f(r["vol_pct"], 2), num(r["new_wt_pct"], 2), f(r["wt_pct"], 2),
             num(r["new_sg"], 4), f(r["sg"], 4), num(r["new_sulfur_wt_pct"], 3), f(r["sulfur_wt_pct"], 3),
             num(r["new_d86_95_c"], 1), f(r["d86_95_c"], 1), num(r["new_cetane_index_d4737"], 1),
             f(r["cetane_index_d4737"], 1), num(r["new_flash_c_est"], 1), f(r["flash_c_est"], 1), r["limit_flips"]]
            for r in delta.rows()]
    widths = [max(len(str(x)) for x in col) for col in zip(head, *body)]
    lines = ["  ".join(str(h).ljust(w) for h, w in zip(head, widths)).rstrip()]
    lines += ["  ".join(str(x).ljust(w) for x, w in zip(row, widths)).rstrip() for row in body]
    return "\n".join(lines)
