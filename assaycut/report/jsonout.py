"""The JSON documents the command line prints: one function per document, field names part of the interface.

Everything returned here is made of plain Python values (NaN and infinities as None), ready for
``json.dumps``.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..cutting.ideal import LPG_COLUMNS

from .. import __version__
from ..units import sg_to_density15


def json_safe(v):
    """JSON-safe value: NaN/inf become None, numpy scalars become Python numbers (dicts and lists recursively).

    Examples
    --------
    >>> json_safe({"a": float("nan"), "b": np.float64(1.5), "c": np.bool_(True)})
    {'a': None, 'b': 1.5, 'c': True}
    """
    if type(v) is float:  # the common case first
        return v if math.isfinite(v) else None
    if v is None or type(v) is str or type(v) is int:
        return v
    if isinstance(v, dict):
        return {k: json_safe(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [json_safe(x) for x in v]
    if isinstance(v, (np.bool_, bool)):
        return bool(v)
    if isinstance(v, (np.integer,)):
        return int(v)
    if isinstance(v, (float, np.floating)):
        return None if not math.isfinite(float(v)) else float(v)
    return v


def records(table) -> list[dict]:
    """The rows of a :class:`~assaycut.cutting.cut_table.CutTable` as JSON-safe dicts."""
    return [{c: json_safe(v) for c, v in row.items()} for row in table.rows()]


def frame_records(df) -> list[dict]:
    """The rows of a study's DataFrame as JSON-safe dicts (through one object array: much faster than
    ``DataFrame.to_dict`` on small tables)."""
    cols = list(df.columns)
    return [{c: json_safe(v) for c, v in zip(cols, row)} for row in df.to_numpy(dtype=object).tolist()]


def cut_records(table) -> list[dict]:
    """The rows of a cut table as JSON-safe dicts, each cut's own TBP points gathered as ``tbp_c``
    {"5", "50", "95"} [°C] (from tbp_5_c, mid_vol_c, tbp_95_c; mid_vol_c is kept as well), and, with a
    light-ends analysis, its LPG split as ``lpg_split`` {"c3_vol_pct", "ic4_vol_pct", "nc4_vol_pct"} [vol % of
    the cut] (null for a cut without propane or butanes)."""
    out = records(table)
    for r in out:
        if "tbp_5_c" in r:
            r["tbp_c"] = {"5": r.pop("tbp_5_c"), "50": r.get("mid_vol_c"), "95": r.pop("tbp_95_c")}
        if LPG_COLUMNS[0][1] in r:
            split = {col[len("lpg_"):]: r.pop(col) for _, col in LPG_COLUMNS}
            r["lpg_split"] = split if any(v is not None for v in split.values()) else None
    return out


def assay_record(a, model) -> dict:
    """The ``assay`` object of the JSON outputs: name, source, sha256, API, SG, density at 15 °C [kg/m³], the
    given sulfur [wt %] and the closures of SG and sulfur."""
    return {"name": a.name, "source": a.source, "sha256": a.sha256, "api": json_safe(a.api),
            "sg": json_safe(a.sg), "density_15c_kg_m3": json_safe(sg_to_density15(a.sg)),
            "sulfur_wt_pct": json_safe(model.given_sulfur_wt_pct), "sg_closure": json_safe(model.sg_closure),
            "sulfur_closure_wt_pct": json_safe(model.sulfur_closure_wt_pct)}


def calibration_json(a, model, cal) -> dict:
    """``assaycut calibrate --json``: the assay (as in ``yields``), each boundary's fitted cut point and
    overlap with their standard deviations [°C], every residual (measured and fitted), the warnings, and the
    fit's basis, weights, weighted sum of squares and degrees of freedom."""
    from ..studies.calibration import SIGMAS

    return json_safe({"assay": assay_record(a, model), "cut_points": cal.cut_points, "residuals": cal.residuals,
                      "warnings": cal.warnings, "rate_basis": cal.basis, "sigmas": SIGMAS,
                      "chi_square": cal.chi_square, "dof": cal.dof,
                      "notes": ["one test run of one column: check against other runs before relying on it; "
                                "distillation points are compared as TBP (D86 and D2887 converted)"]})


def pseudo_json(assay, model, comps, method: str) -> dict:
    """``assaycut pseudo --json`` of one assay: the assay (as in ``yields``), the method, the components."""
    return json_safe({"assay": assay_record(assay, model), "method": method, "components": comps})


def yield_json(result) -> dict:
    """The JSON object of one assay's yields (``assaycut yields --json``); each limit row carries the ``unit``
    of its property ('°C', 'wt %'...)."""
    from .tables import unit_of

    doc = {
        "assay": assay_record(result.assay, result.model),
        "extension": extension_json(result.model),
        "cuts": cut_records(result.cuts),
        "limits": [{**row, "unit": unit_of(row["property"])} for row in records(result.limits)],
        "closure": {k: json_safe(v) for k, v in result.closure.items()},
        "warnings": list(result.warnings),
        "notes": list(result.notes),
        "methods": dict(result.methods),
        "version": __version__,
    }
    if result.bands is not None:
        b = result.bands
        doc["uncertainty"] = {"draws": b.attrs["draws"], "sigmas": b.attrs["sigmas"], "cuts": records(b)}
    return doc


def extension_json(model) -> dict:
    """How much of the crude rests on the curve's fitted extension: ``measured_to_vol_pct``,
    ``extrapolated_vol_pct`` (fitted, front and back), ``lumped_vol_pct`` (lumped up to the capped end point),
    ``end_point_c``, ``fit_rms_c`` (None without a fit) and ``all_cuts_flagged`` (the reason, or "")."""
    c = model.curve
    return {"measured_to_vol_pct": json_safe(c.measured_hi), "extrapolated_vol_pct": json_safe(c.extrapolated_pct),
            "lumped_vol_pct": json_safe(c.lumped_pct), "end_point_c": json_safe(c.fbp_c),
            "fit_rms_c": json_safe(c.fit.rms_c) if c.fit is not None else None,
            "all_cuts_flagged": model.all_on_extension}


def yields_document(results, n_paths: int, failures: list[tuple[str, str]]) -> dict:
    """``assaycut yields --json``: one assay's object, or ``{"assays": [...], "errors": [...]}`` for several."""
    objs = [r.json_doc or yield_json(r) for r in results]  # made in a worker, or now
    return objs[0] if n_paths == 1 else {"assays": objs, "errors": [m for _, m in failures]}


def check_json(findings, ok: bool) -> dict:
    """``assaycut check --json``."""
    return {"ok": ok, "findings": [dataclasses.asdict(f) for f in findings]}


def convert_json(frm: str, to: str, used: str, out: dict, warnings: list[str], given=None) -> dict:
    """``assaycut convert --json``: temperatures rounded to 1e-4 °C; ``filled`` marks a point whose input was
    interpolated between the given ones (``given``: the percents given; None = all)."""
    return {"from": frm, "to": to, "method": used,
            "points": [{"percent": p, "temp_c": round(t, 4), "filled": given is not None and p not in given}
                       for p, t in out.items()], "warnings": warnings}


def compare_json(results, worth, inside, caveat: str, products=None) -> dict:
    """``assaycut compare --json``: with prices, ``ranked_by`` ('margin_per_bbl' when every crude has a
    price, else 'worth_per_bbl') and ``worth_products`` (each product's price, adjustment and contribution)."""
    doc = {"assays": [yield_json(r) for r in results],
           "worth": frame_records(worth) if worth is not None else [],
           "inside_bands": [{"cut": c, "crudes": [a, b]} for c, a, b in inside],
           "notes": [caveat] if worth is not None else []}
    if worth is not None:
        doc["ranked_by"] = worth.attrs.get("ranked_by", "worth_per_bbl")
        doc["worth_products"] = frame_records(products) if products is not None else []
    return doc


def vectors_json(entries, step_c: float) -> dict:
    """``assaycut vectors --json``: ``{"assays": [{"assay": NAME, "base": [cut rows], "deltas": [{"cut_point":
    NAME, "per_c": [{"name": CUT, "vol_pct": .., ...}]}]}], "step_c": h}``; ``entries`` is a list of (assay name,
    base cut table, {cut point: per-°C table})."""
    return {"assays": [{"assay": name, "base": records(base),
                        "deltas": [{"cut_point": cp, "per_c": records(d)} for cp, d in deltas.items()]}
                       for name, base, deltas in entries],
            "step_c": step_c,
            "method": f"central difference of the exact model, cut point ± {step_c:g} °C, the others held"}


def blend_plan_json(plan) -> dict:
    """The blend optimiser's plan: feasible, objective and its value, shares [%], blend API and sulfur,
    yields [vol %], each target with its slack and marginal value, the binding targets, each crude's share
    against its bounds (with the bound's marginal value where the share sits on it) and any shortfalls."""
    return json_safe({"feasible": plan.feasible, "objective": plan.objective, "value": plan.value,
                      "shares_pct": plan.shares_pct, "api": plan.api, "sulfur_wt_pct": plan.sulfur_wt_pct,
                      "yields_vol_pct": plan.yields, "targets": plan.targets, "binding": plan.binding,
                      "share_bounds": plan.share_bounds,
                      "compatibility": None if plan.compatibility is None else plan.compatibility.record(),
                      "shortfalls": plan.shortfalls,
                      "notes": ["linear blending rules, no shrinkage; worth ignores operating costs and unit "
                                "limits; marginal_per_unit is the change of the objective's value per unit of "
                                "target (linprog duals)"]})


def shift_json(base, new, delta) -> dict:
    """``assaycut shift --json``."""
    return {"base": yield_json(base), "new": yield_json(new), "delta": records(delta)}


def sweep_json(crude: str, df) -> dict:
    """``assaycut sweep --json``."""
    return {"assay": crude, "lower": df.attrs["lower"], "upper": df.attrs["upper"], "points": frame_records(df)}


def optimum_json(crude: str, what: str, unit: str, res, names: list[str], after) -> dict:
    """``assaycut optimize --json``."""
    return {
        "assay": crude, "objective": what, "unit": unit, "feasible": res.feasible,
        "start": {"cut_points_c": dict(zip(names, map(float, res.start_ends_c))), "value": res.start_objective},
        "optimum": {"cut_points_c": dict(zip(names, map(float, res.ends_c))), "value": res.objective},
        "converged": res.converged, "method": res.method, "generations": res.generations,
        "evaluations": res.evaluations, "moving_cut_points": [names[i] for i in res.var_index],
        "min_yields_vol_pct": res.min_yields,
        "shortfalls": [json_safe(f) for f in res.shortfalls],
        "grid_best": json_safe(res.grid_best), "active_limits": res.active, "bound_notes": res.bound_notes,
        "limits_broken_at_start": res.violated_at_start, "limits_not_evaluated": res.not_evaluated,
        "cuts": cut_records(after.cuts)}
