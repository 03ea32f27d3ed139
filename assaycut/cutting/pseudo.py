"""The crude as a process simulator takes it: pure light-end components and pseudo-components.

The crude model is cut into narrow TBP slices (:data:`DEFAULT_STEPS`, or a number of equal slices, or given
boundaries), each a pseudo-component characterised by its own mean boiling point on the curve (the slice's
volume-average TBP), its SG (mass over volume of the slice, from the model's density distribution), and the
molar mass, critical constants and acentric factor of one named method of
:mod:`assaycut.methods.critical_properties`.  Light ends measured by a light-ends analysis and placed on the
curve as pure components (C1-C5) come out as those components with their own constants
(:mod:`assaycut.model.lightends`).  The material the model lumps at its end point (:data:`END_CAP_C`) is a
component of its own.

By construction the components recombine to the crude: their volumes tile 0-100 % of the curve (each
boundary's cumulative volume is the curve's at that TBP) and volume, mass and moles add up to 100 %.  The
masses are the density distribution's, except that a pure component weighs its own liquid SG: the
volume-average SG is then the model's crude SG to the light-end components' difference from the
distribution (of the order of 1e-5), and the model's SG is the whole crude's less the closure the model
reports (narrow cuts kept as measured).
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import CutSetError
from ..methods.characterisation import watson_k
from ..methods.critical_properties import R_BAR_M3_KMOL_K, characterise
from ..methods.fraction_properties import hydrogen_riazi_ch
from ..methods.heat_capacity import C_G_MOL, H_G_MOL, T_RANGE_K, cp_polynomial, similarity_variable
from ..model.crude import CrudeModel
from ..model.lightends import find_component
from ..model.tbp_curve import STEP_C
from ..units import sg_to_api
from .cutset import CutSet

DEFAULT_STEPS = ((400.0, 15.0), (650.0, 25.0), (math.inf, 50.0))
"""The default breakdown: slices of 15 °C up to 400 °C, 25 °C up to 650 °C and 50 °C above (finer where a
column's separations need them; common practice, no source). [°C]"""
MAX_COMPONENTS = 500
"""Most pseudo-components asked for."""
MIN_SLICE_PCT = 1e-6
"""A slice thinner than this is merged into its neighbour. [vol %]"""


def default_boundaries(t_start: float, t_end: float) -> np.ndarray:
    """The default slice boundaries strictly between ``t_start`` and ``t_end`` [°C]: multiples of 15 °C up to
    400 °C, of 25 °C up to 650 °C, of 50 °C above (:data:`DEFAULT_STEPS`).

    Examples
    --------
    >>> default_boundaries(370.0, 480.0).tolist()
    [375.0, 390.0, 400.0, 425.0, 450.0, 475.0]
    """
    out, lo = [], -math.inf
    for top, step in DEFAULT_STEPS:
        # from the segment's own start (400 or 650 °C, a boundary itself), or the next multiple above t_start
        t = lo if lo > t_start else math.floor(t_start / step) * step + step
        while t < min(top, t_end) + 1e-9:
            if t > t_start + 1e-9 and t < t_end - 1e-9:
                out.append(t)
            t += step
        lo = top
    return np.array(sorted(set(round(x, 9) for x in out)))


def _pure_light_ends(model: CrudeModel, assay) -> list[tuple]:
    """(component, va, vb) of each light-end component placed on the curve as a pure-component step."""
    le = assay.light_ends
    curve = model.curve
    if le is None or not le.amounts:
        return []
    comps = sorted({c.key: c for c in (find_component(k) for k in le.amounts) if c is not None}.values(),
                   key=lambda c: c.nbp_c)
    out = []
    for c in comps:
        if not c.nbp_c < curve.first_measured_c:
            continue
        va, vb = float(curve.pct_at(c.nbp_c - STEP_C)), float(curve.pct_at(c.nbp_c))
        if vb - va > MIN_SLICE_PCT:
            out.append((c, va, vb))
    return out


def pseudo_components(model: CrudeModel, assay, method: str = "riazi-daubert-1987", scheme=None,
                      cut_set: CutSet | None = None) -> list[dict]:
    """The crude as components: pure light ends, then pseudo-components in boiling order.

    Parameters
    ----------
    model : CrudeModel
    assay : Assay
        For its light-ends analysis.
    method : str
        'riazi-daubert-1987', 'kesler-lee-1976' or 'twu-1984' (:func:`~assaycut.methods.critical_properties.characterise`).
    scheme : None, int or sequence of float
        None: :func:`default_boundaries`; an integer N: N slices of equal TBP width over the curve above the
        light ends (the end lump besides); a sequence: the slice boundaries [°C].
    cut_set : CutSet, optional
        A column's products: their cut points are added as boundaries, and each component names its product
        with its share of that product.

    Returns
    -------
    list of dict
        Each component: name, pure, product (with ``cut_set``), nbp_c, sg, api, watson_k, mw, tc_c, pc_bar,
        omega, vc_m3_kmol, zc, vol_pct, wt_pct, mol_pct (of the crude), product_vol_pct, product_wt_pct,
        product_mol_pct (of its product, with ``cut_set``), start_c, end_c (the slice's TBP bounds),
        cum_vol_pct (the curve's cumulative volume at end_c), in_range (inside the method's data) and
        extrapolated (the slice rests on the fitted extension).
    """
    curve = model.curve
    pure = _pure_light_ends(model, assay)
    v_start = pure[-1][2] if pure else 0.0
    t_start = float(curve.temp_at(v_start)) if pure else float(curve.temp_at(0.0))
    v_lump = 100.0 - float(curve.lumped_pct)
    t_top = float(curve.temp_at(v_lump)) if curve.lumped_pct > 0 else float(curve.fbp_c)
    if scheme is None:
        bounds = default_boundaries(t_start, t_top)
    elif isinstance(scheme, (int, np.integer)):
        if not 1 <= scheme <= MAX_COMPONENTS:
            raise CutSetError(f"the number of pseudo-components must be 1 to {MAX_COMPONENTS}; got {scheme}")
        bounds = np.linspace(t_start, t_top, int(scheme) + 1)[1:-1]
    else:
        bounds = np.asarray(sorted(float(x) for x in scheme), float)
        if len(bounds) > MAX_COMPONENTS:
            raise CutSetError(f"{len(bounds)} boundaries; at most {MAX_COMPONENTS}")
    if cut_set is not None:
        bounds = np.union1d(bounds, cut_set.ends_c)
    bounds = bounds[(bounds > t_start) & (bounds < t_top)]
    edges_v = [v_start] + [float(x) for x in np.asarray(curve.pct_at(bounds), float)] + [v_lump]
    if curve.lumped_pct > 0:
        edges_v.append(100.0)
    slices = [(a, b) for a, b in zip(edges_v[:-1], edges_v[1:]) if b - a > MIN_SLICE_PCT]
    rows = []
    for c, va, vb in pure:
        rows.append({"name": c.key, "pure": True, "va": va, "vb": vb, "nbp_c": c.nbp_c, "mw": c.mw, "sg": c.sg,
                     "tc_k": c.tc_k, "pc_bar": c.pc_bar, "omega": c.omega, "vc_m3_kmol": c.vc_m3_kmol,
                     "in_range": True})
    va = np.array([a for a, _ in slices])
    vb = np.array([b for _, b in slices])
    if len(va):
        nbp = np.asarray(curve.mean_temp(va, vb), float)
        mass = np.asarray(model.sg_dist.integral(va, vb), float)
        props = characterise(nbp + 273.15, mass / (vb - va), method)
        for k in range(len(va)):
            rows.append({"name": "", "pure": False, "va": float(va[k]), "vb": float(vb[k]), "nbp_c": float(nbp[k]),
                         **{key: float(props[key][k]) for key in ("mw", "tc_k", "pc_bar", "omega", "vc_m3_kmol")},
                         "in_range": bool(props["in_range"][k])})
    return _finish(rows, model, cut_set)


CP_FORM = (f"Cp° [J/(mol·K)] = a + b·T + c·T² + d·T³, T in K, fitted over {T_RANGE_K[0]:.0f}-{T_RANGE_K[1]:.0f} K "
           f"to Lastovka & Shaw (2013) at the component's hydrogen content")
"""What the ``cp_ideal_gas`` coefficients of a component mean."""


def hydrogen_of(row: dict) -> tuple[float, bool]:
    """A component's hydrogen content [wt %] for its heat capacity, and whether it is inside the correlation's
    range: a pure light end's from its formula (the C1-C5 paraffins, CnH2n+2); a pseudo-component's by Riazi's
    CH form (:func:`~assaycut.methods.fraction_properties.hydrogen_riazi_ch`), extrapolated outside M
    70-700."""
    if row["pure"]:
        n = int(row["name"][-1])
        h = (2 * n + 2) * H_G_MOL
        return 100.0 * h / (n * C_G_MOL + h), True
    mw = row["mw"]
    h = float(hydrogen_riazi_ch(row["nbp_c"], row["sg"], min(max(mw, 70.0), 700.0)))
    return h, 70.0 <= mw <= 700.0


def _finish(rows: list[dict], model: CrudeModel, cut_set: CutSet | None) -> list[dict]:
    """Fractions of the crude (and of each product), names and the derived columns."""
    curve = model.curve
    va = np.array([r["va"] for r in rows])
    vb = np.array([r["vb"] for r in rows])
    vol = vb - va
    # a pure component weighs its own SG (GPA 2145) x its volume; a pseudo-component, the density distribution
    mass = np.where([r["pure"] for r in rows], vol * np.array([r.get("sg", np.nan) for r in rows]),
                    np.asarray(model.sg_dist.integral(va, vb), float))
    moles = mass / np.array([r["mw"] for r in rows])
    ends = [] if cut_set is None else list(cut_set.ends_c)
    names = [] if cut_set is None else cut_set.names
    out = []
    for k, r in enumerate(rows):
        sg = float(mass[k] / vol[k])
        t_lo, t_hi = float(curve.temp_at(va[k])), float(curve.temp_at(vb[k]))
        row = {"name": r["name"] or f"NBP {r['nbp_c']:.0f}", "pure": r["pure"], "nbp_c": r["nbp_c"], "sg": sg,
               "api": float(sg_to_api(sg)), "watson_k": float(watson_k(r["nbp_c"], sg)),
               "mw": r["mw"], "tc_c": r["tc_k"] - 273.15, "pc_bar": r["pc_bar"], "omega": r["omega"],
               "vc_m3_kmol": r["vc_m3_kmol"], "zc": r["pc_bar"] * r["vc_m3_kmol"] / (R_BAR_M3_KMOL_K * r["tc_k"]),
               "vol_pct": float(vol[k]), "wt_pct": float(100.0 * mass[k] / mass.sum()),
               "mol_pct": float(100.0 * moles[k] / moles.sum()), "start_c": t_lo, "end_c": t_hi,
               "cum_vol_pct": float(vb[k]), "in_range": r["in_range"],
               "extrapolated": bool(curve.is_extrapolated(va[k], vb[k]))}
        h, h_ok = hydrogen_of(row)
        coef, dev = cp_polynomial(similarity_variable(h), row["mw"])
        row["hydrogen_wt_pct"] = h
        row["cp_ideal_gas"] = {"a": float(coef[0]), "b": float(coef[1]), "c": float(coef[2]), "d": float(coef[3]),
                               "fit_max_dev_pct": 100.0 * dev, "hydrogen_in_range": h_ok}
        if cut_set is not None:
            j = int(np.searchsorted(np.asarray(ends), r["nbp_c"]))
            row["product"] = names[min(j, len(names) - 1)]
        out.append(row)
    seen: dict[str, int] = {}
    for row in out:  # names unique: two slices of the same rounded NBP get a suffix
        n = row["name"]
        seen[n] = seen.get(n, 0) + 1
        if seen[n] > 1:
            row["name"] = f"{n} ({seen[n]})"
    if cut_set is not None:
        for p in cut_set.names:
            members = [row for row in out if row["product"] == p]
            for key in ("vol_pct", "wt_pct", "mol_pct"):
                total = sum(m[key] for m in members)
                for m in members:
                    m["product_" + key] = 100.0 * m[key] / total if total > 0 else math.nan
    return out
