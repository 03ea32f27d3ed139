"""Assay quality findings: does the assay hang together?  Used by ``assaycut check``.

Each finding has a severity ('error', 'warning' or 'info'), where it was found, and a message.  The
thresholds are screening choices of ours (common practice, no source), stated beside each.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..cutting.cutset import default_cut_set
from ..cutting.ideal import closure, cut_table
from ..model.assay import Assay
from ..model.crude import CrudeModel
from ..model.distributions import narrow_cut_positions
from ..units import api_to_sg, density15_to_sg, pct_text, residual_text

GRAVITY_WARN_SG = 0.0010
"""API, SG and density given together may differ by this much SG before a warning. [-]"""
GRAVITY_ERROR_SG = 0.0100
NARROW_CUT_WARN_PCT = 1.0
"""A narrow cut's vol % may differ from the curve by this much before a warning. [vol %]"""
RECON_WARN_PCT = (2.0, 15.0)
"""Density and sulfur reconciliations above these sizes give a warning. [%]"""
RECON_ERROR_PCT = (5.0, 40.0)
"""... and above these, an error. [%]"""
BALANCE_WARN = (0.0075, 5.0)
"""The narrow cuts kept as measured and the whole crude may disagree by this much before a warning: SG [-] and
sulfur [% of the whole-crude sulfur] (our choice: the seven cuts of each of the 25 open assays of the
development set add up, by volume, to their crude's gravity within 0.0050 SG, and by weight to its sulfur
within 0.1 %)."""
CLOSURE_ERROR_PCT = 0.01
"""Yield closure residual above which the model is in error. [%]"""


@dataclass(frozen=True)
class Finding:
    """One quality finding: severity ('error', 'warning', 'info'), where, message."""

    severity: str
    where: str
    message: str


EXTRAPOLATED_WARN_PCT = 10.0
"""Share of the crude on the fitted extension above which ``check`` warns (common practice, no source). [vol %]"""
LUMPED_WARN_PCT = 3.0
"""Share lumped at the extension's capped end point above which ``check`` warns (our choice). [vol %]"""


def check_assay(assay: Assay, model: CrudeModel) -> list[Finding]:
    """Quality findings for an assay and its model: gravity figures, curve coverage, closure,
    reconciliations and narrow cuts, in that order.

    Parameters
    ----------
    assay : Assay
    model : CrudeModel

    Returns
    -------
    list of Finding
    """
    src = assay.source or assay.name
    crude_where = f"{src}, sheet 'crude'"
    curve_where = assay.curves[0].where or src
    return (_gravity_findings(assay, crude_where) + _curve_findings(model, curve_where, src)
            + _residue_findings(assay, model, curve_where)
            + _closure_findings(model) + _reconciliation_findings(assay, model, src, crude_where)
            + _narrow_cut_findings(assay, model, src))


def _gravity_findings(assay: Assay, crude_where: str) -> list[Finding]:
    """API, SG and density given together must agree."""
    out: list[Finding] = []
    g = assay.gravity_inputs
    sgs = {}
    if "api_gravity" in g:
        sgs["api_gravity"] = api_to_sg(g["api_gravity"])
    if "sg_60f" in g:
        sgs["sg_60f"] = g["sg_60f"]
    if "density_15c_kg_m3" in g:
        sgs["density_15c_kg_m3"] = density15_to_sg(g["density_15c_kg_m3"])
    if len(sgs) > 1:
        diff = max(sgs.values()) - min(sgs.values())
        txt = ", ".join(f"{k} gives SG {v:.4f}" for k, v in sgs.items())
        if diff > GRAVITY_ERROR_SG:
            out.append(Finding("error", crude_where, f"gravity figures disagree by {diff:.4f} SG: {txt}"))
        elif diff > GRAVITY_WARN_SG:
            out.append(Finding("warning", crude_where, f"gravity figures disagree by {diff:.4f} SG: {txt}; "
                                                       f"api_gravity is used"))
        else:
            out.append(Finding("info", crude_where, f"gravity figures agree within {diff:.4f} SG"))
    return out


def _curve_findings(model: CrudeModel, curve_where: str, src: str) -> list[Finding]:
    """How far the measured curve reaches, the extension fit, and the model's warnings."""
    out: list[Finding] = []
    c = model.curve
    t_hi = float(c.temp_at(c.measured_hi))
    sev = "warning" if c.measured_hi < 50.0 else "info"
    out.append(Finding(sev, curve_where, f"measured curve reaches {pct_text(c.measured_hi)} vol % at {t_hi:.0f} °C TBP"
                       + ("" if c.measured_hi >= 100 else "; beyond it the fitted extension is used")))
    if c.fit is not None:
        out.append(Finding("info", curve_where, f"extension: Riazi distribution, RMS deviation {c.fit.rms_c:.1f} °C "
                                                f"over {c.fit.npoints} points"))
        big = c.extrapolated_pct > EXTRAPOLATED_WARN_PCT
        out.append(Finding("warning" if big else "info", curve_where,
                           f"{c.extrapolated_pct:.1f} vol % of the crude rests on the fitted extension"
                           + (f" (more than {EXTRAPOLATED_WARN_PCT:g} vol %): the residue's yield and qualities "
                              f"are largely extrapolated; a high-temperature simulated distillation (ASTM D7169) would "
                              f"extend the measured curve"
                              if big else "")))
        if c.lumped_pct > 0:
            lumped = c.lumped_pct > LUMPED_WARN_PCT
            out.append(Finding("warning" if lumped else "info", curve_where,
                               f"{c.lumped_pct:.1f} vol % of the crude is lumped up to the {c.fbp_c:.0f} °C end "
                               f"point of the extension"
                               + (f" (more than {LUMPED_WARN_PCT:g} vol %): the residue's boiling range, MeABP "
                                  f"and Watson K depend on that cap" if lumped else "")))
    for w in model.warnings:
        if c.lumped_pct > 0 and "lumped up to" in w:  # said once, by the lumped finding above
            continue
        out.append(Finding("warning", *_where_and_message(w, curve_where)))
    return out


def _where_and_message(warning: str, default_where: str) -> tuple[str, str]:
    """A warning that starts with its own location ('file, sheet ...: message') split into the two, so the
    location is not printed twice; other warnings get ``default_where``."""
    head, sep, rest = warning.partition(": ")
    if sep and ", sheet " in head:
        return head, rest
    return default_where, warning


RESIDUE_SG_MAX = 1.10
"""The heaviest residue a crude's gravity balance may ask for: vacuum residues and asphalts lie below about
1.10 SG (common practice, no source). [-]"""
WATSON_K_RANGE = (10.5, 13.0)
"""Watson K of whole crudes (common practice, no source): a constant Watson K fitted outside it says the curve
and the gravity do not belong together. [-]"""


def _residue_findings(assay: Assay, model: CrudeModel, curve_where: str) -> list[Finding]:
    """The residue's yield against what the whole-crude gravity allows.

    The heavy part of the crude that no narrow-cut density covers (above the last narrow cut with one) takes
    the gravity the rest leaves, closed by difference.  Denser than :data:`RESIDUE_SG_MAX`, that part is too
    small for the gravity (the curve ends too high: its last points may level off from cracking, or the
    gravity or the cut densities are off); lighter than the measured cut below it, too large.  Without
    narrow-cut densities, a Watson K fitted to the gravity outside :data:`WATSON_K_RANGE` says the same.
    """
    out: list[Finding] = []
    if model.watson_k_fit is not None:
        lo, hi = WATSON_K_RANGE
        kw = model.watson_k_fit
        if not lo <= kw <= hi:
            out.append(Finding("warning", curve_where,
                               f"the curve and the crude gravity need a Watson K of {kw:.2f}, outside crude oils' "
                               f"{lo:g}-{hi:g}: the residue looks too {'small' if kw < lo else 'large'} for the "
                               f"gravity (or the curve's basis, its last points or the gravity are off)"))
        return out
    nc = assay.narrow_cuts
    if nc is None or not np.isfinite(nc.sg).any():
        return out
    va, vb = (np.asarray(x, float) for x in narrow_cut_positions(assay, model.curve))
    has = np.isfinite(nc.sg)
    top = float(vb[has].max())
    if top >= 100.0 - 1e-6:
        return out
    heavy = float(model.mean_sg(top, 100.0))
    last = int(np.flatnonzero(has)[np.argmax(vb[has])])
    below = float(nc.sg[last])
    t_top = float(model.curve.temp_at(top))
    share = (f"the {pct_text(100.0 - top)} vol % above the narrow cuts (from {t_top:.0f} °C TBP, no density "
             f"measured)")
    if heavy > RESIDUE_SG_MAX:
        out.append(Finding("warning", curve_where,
                           f"{share} would need SG {heavy:.3f} to meet the crude gravity, above any residue "
                           f"({RESIDUE_SG_MAX:g}): the residue yield looks too small for the gravity (the curve's "
                           f"last points may level off from cracking, or the gravity or cut densities are off)"))
    elif heavy < below - 0.005:
        out.append(Finding("warning", curve_where,
                           f"{share} gets SG {heavy:.3f} from the crude gravity, lighter than the narrow cut "
                           f"below it ({below:.3f}): the residue yield looks too large for the gravity"))
    else:
        out.append(Finding("info", curve_where, f"{share} gets SG {heavy:.3f} from the crude gravity, between the "
                                                f"narrow cut below it ({below:.3f}) and {RESIDUE_SG_MAX:g}"))
    return out


def _closure_findings(model: CrudeModel) -> list[Finding]:
    """The default cuts close to 100 % on each basis."""
    out: list[Finding] = []
    cuts = cut_table(model, default_cut_set())
    clo = closure(cuts)
    for basis in ("vol_pct", "wt_pct"):
        r = clo[basis]
        out.append(Finding("error" if abs(r) > CLOSURE_ERROR_PCT else "info", "model",
                           f"default cuts close to 100 % on the {basis[:-4]} basis with residual {residual_text(r)} %"))
    return out


def _reconciliation_findings(assay: Assay, model: CrudeModel, src: str, crude_where: str) -> list[Finding]:
    """How the narrow cuts and the whole crude balance: what the cuts kept as measured leave open (the
    closure, with the share of the crude the balance was closed on), or how much they were scaled."""
    out: list[Finding] = []
    where = f"{src}, sheet 'narrow cuts'" if assay.narrow_cuts is not None else crude_where
    for label, unit, digits, clo, gap, given, rel in (
            ("SG", "SG", 4, model.sg_closure, model.sg_gap_pct, model.given_sg, False),
            ("sulfur", "wt %", 3, model.sulfur_closure_wt_pct, model.sulfur_gap_wt_pct, model.given_sulfur_wt_pct,
             True)):
        if not np.isfinite(gap) or given is None:
            continue
        size = abs(clo) / given * 100.0 if rel and given > 0 else abs(clo)
        big = size > BALANCE_WARN[1 if rel else 0]
        out.append(Finding("warning" if big else "info", where,
                           f"{label} balance: the narrow cuts, kept as measured, add up to "
                           f"{given - clo:.{digits}f} {unit} against the whole crude's {given:.{digits}f} {unit} "
                           f"({clo:+.{digits}f} {unit} left open)"
                           + (f"; the {gap:.2f} % of the crude no cut covers took the rest of the balance"
                              if gap > 1e-6 else "")
                           + (f"; above {BALANCE_WARN[1 if rel else 0]:g}{' %' if rel else ' SG'}: check the cuts or "
                              f"the whole-crude figure" if big else "")))
    for label, size, k in (("density", model.density_reconciliation_pct, 0),
                           ("sulfur", model.sulfur_reconciliation_pct, 1)):
        if size is None:
            continue
        sev = "error" if abs(size) > RECON_ERROR_PCT[k] else "warning" if abs(size) > RECON_WARN_PCT[k] else "info"
        out.append(Finding(sev, where, f"{label} distribution scaled by {size:+.2f} % to reproduce the whole crude"
                           + (" (the cuts and the whole-crude figure disagree)" if sev != "info" else "")))
    return out


def _narrow_cut_findings(assay: Assay, model: CrudeModel, src: str) -> list[Finding]:
    """Narrow cuts against the curve, their weight and volume, density order and sulfur balance."""
    out: list[Finding] = []
    c = model.curve
    nc = assay.narrow_cuts
    if nc is not None and len(nc):
        ncw = f"{src}, sheet 'narrow cuts'"
        va, vb = narrow_cut_positions(assay, c)
        for i in range(len(nc)):
            row = nc.rows[i] if nc.rows else i + 1
            if np.isfinite(nc.vol_pct[i]):
                d = nc.vol_pct[i] - (vb[i] - va[i])
                if abs(d) > NARROW_CUT_WARN_PCT:
                    out.append(Finding("warning", f"{ncw}, row {row}",
                                       f"the cut's {pct_text(nc.vol_pct[i])} vol % differs from the curve's "
                                       f"{vb[i] - va[i]:.2f} vol % by {d:+.2f}"))
            if np.isfinite(nc.vol_pct[i]) and np.isfinite(nc.wt_pct[i]) and np.isfinite(nc.sg[i]) \
                    and nc.vol_pct[i] > 0:
                expect = nc.vol_pct[i] * nc.sg[i] / assay.sg
                if abs(nc.wt_pct[i] - expect) > max(0.1, 0.03 * expect):
                    out.append(Finding("warning", f"{ncw}, row {row}",
                                       f"wt_pct {nc.wt_pct[i]:g} disagrees with vol_pct x SG / crude SG = "
                                       f"{expect:.2f}"))
        order = np.argsort(np.nan_to_num(nc.start_c, nan=-1e9))
        sg_sorted = nc.sg[order]
        ok = np.isfinite(sg_sorted)
        if ok.sum() > 2 and np.any(np.diff(sg_sorted[ok]) < -0.005):
            out.append(Finding("info", ncw, "narrow-cut density falls somewhere as boiling point rises; usual "
                                            "crudes get denser with boiling point: check the table"))
        tot = np.nansum(nc.vol_pct)
        if np.isfinite(nc.vol_pct).any():
            out.append(Finding("info", ncw, f"narrow cuts add up to {tot:.2f} vol % of crude"))
        if model.sulfur_wt_pct is not None and np.isfinite(nc.sulfur_wt_pct).any() and np.isfinite(nc.wt_pct).any():
            ok = np.isfinite(nc.sulfur_wt_pct) & np.isfinite(nc.wt_pct)
            wsum = nc.wt_pct[ok].sum()
            if abs(wsum - 100.0) < 1.0 and assay.sulfur_wt_pct is not None:
                bal = float((nc.wt_pct[ok] * nc.sulfur_wt_pct[ok]).sum() / wsum)
                rel = (bal / assay.sulfur_wt_pct - 1.0) * 100.0 if assay.sulfur_wt_pct > 0 else 0.0
                sev = "warning" if abs(rel) > RECON_WARN_PCT[1] else "info"
                out.append(Finding(sev, ncw, f"sulfur on the narrow cuts' own wt % yields: {bal:.3f} wt %, the "
                                             f"whole crude {assay.sulfur_wt_pct:.3f} wt % ({rel:+.1f} %)"))
    elif nc is None:
        sulfur = ("cut sulfur estimated from the whole crude's" if model.sulfur_dist is not None
                  else "no cut sulfur")
        out.append(Finding("info", src, f"no narrow cuts: densities at constant Watson K, {sulfur}"))
    return out
