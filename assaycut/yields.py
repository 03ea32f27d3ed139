"""The main job in one call: model an assay, cut it, check product limits, and gather warnings and notes.

Pure computation: takes an :class:`~assaycut.model.assay.Assay`, a :class:`~assaycut.cutting.cutset.CutSet`
and limits, returns a :class:`YieldResult`.  Readers, report writers and the CLI sit around it; the JSON
form of a result is written by :mod:`assaycut.report.jsonout`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from .cutting.cutset import CutSet
from .cutting.cut_table import CutTable
from .cutting.ideal import add_rates, closure, cut_table
from .cutting.limits import Limit, check_limits, limit_rows, limit_table, nearest_cut, unmatched_cuts
from .cutting.cut_qualities import ESTIMATED, NOT_ESTIMATED
from .methods.product_properties import describe_ranges
from .model.assay import Assay
from .model.crude import CrudeModel, build_model, build_models  # noqa: F401 (build_models: for batches)
from .units import pct_text, residual_text

CAUTIONS = [
    "Estimates for screening and planning, not measured properties: confirm against laboratory data before "
    "commercial or operating decisions.",
    "Flash point is a safety property: the values here are correlation estimates and must be measured "
    "(ASTM D93) before any product is stored, shipped or sold.",
    "Crude oil and its light ends can carry hydrogen sulfide (H2S), which is toxic, and are flammable: "
    "sample and handle them under your site's gas-testing and hot-oil procedures.",
    "Follow local codes, measured data and licensed practice; these results do not replace them.",
]
"""Cautions carried by every report and every JSON ``notes`` list."""


@dataclass
class YieldResult:
    """Everything a yield report shows for one assay.

    Attributes
    ----------
    assay : Assay
    model : CrudeModel
    cut_set : CutSet
    cuts : CutTable
        The cut table (see :data:`assaycut.cutting.ideal.CUT_COLUMNS`); ``.rows()`` or ``.frame()`` for dicts
        or a DataFrame.
    limits : CutTable
        Product-limit status (see :func:`assaycut.cutting.limits.check_limits`).
    closure : dict
        Σ vol % - 100 and Σ wt % - 100. [%]
    warnings, notes : list of str
    methods : dict of str to str
    """

    assay: Assay
    model: CrudeModel
    cut_set: CutSet
    cuts: CutTable
    limits: CutTable
    closure: dict[str, float]
    warnings: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    methods: dict[str, str] = field(default_factory=dict)
    products: dict | None = None
    """Product curves of a real column (see :func:`assaycut.cutting.real_column.fractionate`); None for ideal cuts."""
    bands: CutTable | None = None
    """P10/P50/P90 per cut under the measurement uncertainty (see :mod:`assaycut.studies.uncertainty`), or None."""
    json_doc: dict | None = None
    """The ``yields --json`` object, when a batch worker made it (else made from the fields on demand)."""


METHOD_NOTES = {
    "cut points": "TBP cut points; each cut starts where the one before ends",
    "d86": "cut D86 at 0/10/30/50/70/90/95 % from the cut's own TBP slice by Daubert 1994 (API TDB 3A1.1); "
           "none for cuts ending at or below 40 °C (gases) or for the open last cut",
    "vabp": "vabp_c: volume average of the cut's TBP curve; vabp_d86_c: D86 volume average (T10+T30+T50+T70+T90)/5 "
            "of API TDB 2B1.1",
    "meabp": "MeABP of the cut's own TBP curve taken as pseudo-components (CABP from volume fractions, MABP from "
             "mole fractions with Riazi-Daubert 1987 MW, MeABP = (CABP + MABP)/2; 16 Gauss-Legendre nodes per "
             "cut), the same for every cut",
    "watson_k": "Watson K = MeABP[°R]^(1/3) / SG for every cut; the residue's rests on the fitted extension and "
                "its lumped end point (flagged extrapolated)",
    "mw": "molecular weight by Riazi-Daubert 1987 (API TDB 2B2.1) at (MeABP, SG), only inside its range",
    "cetane_index_d4737": "ASTM D4737 Procedure A from the cut's D86 and density; outside the method's scope ("
                          + describe_ranges()["cetane_index_d4737"] + ") given and flagged out_of_scope",
    "flash_c_est": "closed-cup flash estimate from D86 10 % by API TDB 2B7.1; outside its range ("
                   + describe_ranges()["flash_c_est"] + ") given and flagged out_of_scope",
    "hydrocarbon types": "paraffins, naphthenes and aromatics of a cut, each blended by volume, are scaled together "
                         "to add up to what their narrow cuts add up to (a cut of whole narrow cuts keeps its "
                         "measured values)",
    "density_15c": "SG 60/60 °F to 15 °C by the API MPMS 11.1 crude-oil form (K0 from memory)",
}


def run_yields(assay: Assay, cut_set: CutSet, limits: list[Limit] | None = None,
               method: str = "daubert-1994", model: CrudeModel | None = None, uncertainty_draws: int = 0,
               sigmas=None, rate_bbl_per_day: float | None = None, progress=None, map_fn=map,
               scale_cuts: bool = False) -> YieldResult:
    """Model, cut and check one assay.

    Parameters
    ----------
    assay : Assay
    cut_set : CutSet
    limits : list of Limit, optional
    method : str
        TBP <-> D86 method for D86 input curves.
    model : CrudeModel, optional
        A model already built for this assay (saves rebuilding it in studies).
    uncertainty_draws : int
        Monte Carlo draws for P10/P50/P90 bands (0: none).
    sigmas : Sigmas, optional
        Measurement standard deviations for the bands (assumed defaults when None).
    rate_bbl_per_day : float, optional
        Crude run; adds each cut's bbl_per_day, m3_per_day and t_per_day
        (:func:`~assaycut.cutting.ideal.add_rates`). [bbl/d]
    progress : callable, optional
        ``progress(done, total)`` during the uncertainty draws.
    map_fn : callable
        Map-like callable sharing the uncertainty draws out (see :func:`~assaycut.studies.uncertainty.monte_carlo`).
    scale_cuts : bool
        Scale the narrow cuts to the whole crude instead of keeping them as measured (``reconcile`` of
        :func:`~assaycut.model.crude.build_model`), for the model and the uncertainty draws.

    Returns
    -------
    YieldResult
    """
    model = model or build_model(assay, method, reconcile=scale_cuts)
    products = None
    if cut_set.overlaps:
        from .cutting.real_column import fractionate

        cuts, products = fractionate(model, cut_set, cut_set.overlaps)
    else:
        cuts = cut_table(model, cut_set)
    if rate_bbl_per_day is not None:
        cuts = add_rates(cuts, rate_bbl_per_day, float(assay.sg))
    lim = check_limits(cuts, limits or [])
    names = cuts["name"]
    res = _assemble(assay, model, cut_set, limits, cuts, lim, names, products)
    if uncertainty_draws:
        from .studies.uncertainty import Sigmas, monte_carlo

        res.bands = monte_carlo(assay, cut_set, sigmas or Sigmas(), uncertainty_draws, method=method,
                                scale_cuts=scale_cuts,
                                progress=progress, map_fn=map_fn)
        res.methods["uncertainty"] = (f"Monte Carlo over the curve model, {res.bands.attrs['draws']} draws "
                                      f"({res.bands.attrs['failed']} failed); ideal cuts; "
                                      f"{res.bands.attrs['sigmas']}")
    return res


def run_yields_many(assays: list[Assay], models: list[CrudeModel], cut_set: CutSet,
                    limits: list[Limit] | None = None) -> list[YieldResult]:
    """:func:`run_yields` for many assays at once: their models are cut together by the
    library engine (:func:`~assaycut.cutting.library_engine.cut_library`, row-wise arrays over the assays), then each
    result is assembled as :func:`run_yields` does.  Ideal cuts only (no overlaps); the same results as one
    :func:`run_yields` per assay to 1e-9 (tested), not bit for bit (the row-wise arithmetic differs).

    Parameters
    ----------
    assays : list of Assay
    models : list of CrudeModel
        Their models, in the same order.
    cut_set : CutSet
    limits : list of Limit, optional

    Returns
    -------
    list of YieldResult
    """
    from .cutting.ideal import columns_table, first_row, take_rows, with_table_d86
    from .cutting.library_engine import cut_library

    if cut_set.overlaps:
        raise ValueError("run_yields_many cuts ideal cuts only; use run_yields for real-column products")
    if not assays:
        return []
    names, cols = cut_library(models, cut_set)
    cols = with_table_d86(cols)
    out = []
    for r, (assay, model) in enumerate(zip(assays, models)):
        row = take_rows(cols, slice(r, r + 1))
        cuts = columns_table(names, first_row(row))
        lim = limit_table(limit_rows(names, row, limits or []))
        out.append(_assemble(assay, model, cut_set, limits, cuts, lim, names, None))
    return out


def _assemble(assay: Assay, model: CrudeModel, cut_set: CutSet, limits, cuts, lim, names: list[str],
              products) -> YieldResult:
    """The YieldResult of a cut: closure, warnings (the model's, the cuts', unmatched limits), methods, notes."""
    clo = closure(cuts)
    warnings = list(model.warnings) + _cut_warnings(cuts, model)
    missing = unmatched_cuts(limits or [], names)
    for c in missing:
        near = nearest_cut(c, names)
        which = "; ".join(lim.describe() for lim in (limits or []) if lim.cut == c)
        warnings.append(f"limits on cut {c!r} are not checked ({which}): the cut set ({cut_set.label}) has no cut "
                        f"of that name" + (f"; nearest is {near!r}" if near else "") + "; rename the cut or the limit")
    methods = dict(model.methods)
    methods.update(METHOD_NOTES)
    methods["estimated qualities"] = "; ".join(f"{k}: {v}" for k, v in ESTIMATED.items()) + ". " + NOT_ESTIMATED
    if products is not None:
        methods["fractionation"] = (
            "real-column products: at the named boundaries the products' own TBP 5-95 overlap (lighter TBP 95 % "
            "minus heavier TBP 5 %) is "
            + ", ".join(f"{n} {w:g} °C" for n, w in cut_set.overlaps.items())
            + " (a normal split solved to give it; common practice, no source); other boundaries ideal, and "
              "products touching no split are the ideal cuts; product D86 from each product's own TBP curve "
              "(0 % taken at 0.5 % on a split side)")
    notes = _notes(assay, model, clo)
    return YieldResult(assay, model, cut_set, cuts, lim, clo, warnings, notes, methods, products)


def _cut_warnings(cuts: CutTable, model: CrudeModel) -> list[str]:
    """Warnings about the cuts: reaching into the extension, D86 estimates above 400 °C, empty cuts, estimates
    outside their method's scope."""
    warnings = []
    column = cuts.column
    names = column("name")
    d86 = column("d86_c")
    ext = [n for n, x in zip(names, column("extrapolated")) if x]
    c = model.curve
    if model.all_on_extension:
        warnings.append(f"every cut is flagged extrapolated: {model.all_on_extension}")
    elif ext:
        where = f"above {pct_text(c.safe_hi)} vol %"
        if c.safe_lo > 0:
            where += f" or below {pct_text(c.safe_lo)} vol %"
        warnings.append(f"cut(s) {', '.join(ext)} depend on the fitted extension (they reach {where}, where the "
                        f"curve is fitted or shaped by the fit; measured to {pct_text(c.measured_hi)} vol %)")
    hot = [n for n, d in zip(names, d86) if d and max(d.values()) > 400.0]
    if hot:
        warnings.append(f"the D86 estimate of {', '.join(hot)} goes above 400 °C, beyond the data behind "
                        f"Daubert 1994 (and a D86 is not run on such material): treat it as indicative only")
    empty = [n for n, v in zip(names, column("vol_pct")) if v <= 1e-9]
    if empty:
        warnings.append(f"cut(s) {', '.join(empty)} have no yield: their qualities are left empty")
    ranges = describe_ranges()
    for col, what in (("cetane_index_d4737", "cetane index"), ("flash_c_est", "flash estimate")):
        out = [n for n, flags in zip(names, column("out_of_scope")) if col in flags]
        if out:
            warnings.append(f"{what} of {', '.join(out)} is outside the method's scope ({ranges[col]}): given "
                            f"and flagged out_of_scope, indicative only")
    return warnings


def _notes(assay: Assay, model: CrudeModel, clo: dict[str, float]) -> list[str]:
    """The cautions, the reconciliations, the closure residual and the assay's own notes."""
    notes = list(CAUTIONS)
    notes += model.balance_notes()
    notes.append(f"closure residual: vol {residual_text(clo['vol_pct'])} %, wt {residual_text(clo['wt_pct'])} %")
    notes += [f"assay note: {n}" for n in assay.notes]
    return notes
