"""The in-memory assay: the only input of the computational core.

Readers build an :class:`Assay` with units already normalised: temperatures in °C, density as SG 60/60 °F,
sulfur in wt %, percents in % (0-100).  The core never reads files.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..units import sg_to_api


@dataclass
class CurveData:
    """A measured distillation curve as the laboratory reported it (units normalised).

    Attributes
    ----------
    method : str
        'TBP', 'D86', 'D2887' or 'D1160'.
    basis : str
        'vol' or 'wt'.
    percent : numpy.ndarray
        Cumulative percent distilled. [%]
    temp_c : numpy.ndarray
        Temperature at each percent (vapour temperature at ``pressure_mmhg`` for D1160). [°C]
    pressure_mmhg : float or None
        Distillation pressure for D1160. [mmHg]
    watson_k : float or None
        Watson K of the distilled material for the Maxwell-Bonnell correction of D1160 data; None applies
        none (Kw = 12). [-]
    where : str
        Where the curve came from, for messages (e.g. "assay.xlsx, sheet 'distillation'").
    warnings : list of str
        What the reader accepted with a warning (fractions read as percent, flat steps...).
    """

    method: str
    basis: str
    percent: np.ndarray
    temp_c: np.ndarray
    pressure_mmhg: float | None = None
    where: str = ""
    warnings: list[str] = field(default_factory=list)
    watson_k: float | None = None


@dataclass
class NarrowCuts:
    """Laboratory narrow-cut table.

    Attributes
    ----------
    start_c, end_c : numpy.ndarray
        TBP start and end temperature; NaN start means IBP, NaN end means end of crude (residue). [°C]
    vol_pct, wt_pct : numpy.ndarray
        Yield on the crude, NaN where not given. [%]
    sg : numpy.ndarray
        Specific gravity 60/60 °F, NaN where not given. [-]
    sulfur_wt_pct : numpy.ndarray
        Sulfur, NaN where not given. [wt %]
    extras : dict of str to numpy.ndarray
        Further numeric columns, carried along under their own (unit-bearing) names.
    rows : list of int
        Source row of each cut, for messages.
    """

    start_c: np.ndarray
    end_c: np.ndarray
    vol_pct: np.ndarray
    wt_pct: np.ndarray
    sg: np.ndarray
    sulfur_wt_pct: np.ndarray
    extras: dict[str, np.ndarray] = field(default_factory=dict)
    rows: list[int] = field(default_factory=list)

    def __len__(self) -> int:
        return int(self.start_c.size)


@dataclass
class LightEnds:
    """Light-ends analysis: {component key: percent of whole crude} on ``basis`` ('wt' or 'vol')."""

    amounts: dict[str, float]
    basis: str


@dataclass
class Assay:
    """A crude oil assay, units normalised.

    Attributes
    ----------
    name : str
        Crude name.
    origin : str
        Field or region of origin.
    sg : float
        Whole-crude specific gravity 60/60 °F. [-]
    sulfur_wt_pct : float or None
        Whole-crude sulfur. [wt %]
    curves : list of CurveData
        Distillation data; the first is the main (atmospheric) curve, later ones (vacuum) extend it.
    narrow_cuts : NarrowCuts or None
    light_ends : LightEnds or None
    extras : dict
        Further whole-crude data (pour point, viscosity, acid number...), under unit-bearing keys.
    source : str
        Path of the file it was read from.
    sha256 : str
        sha256 of that file.
    notes : list of str
        Free notes (e.g. a blend's parents).
    gravity_inputs : dict
        The gravity figures as given (api, sg, density_15c_kg_m3), for consistency checks.
    """

    name: str
    sg: float
    curves: list[CurveData]
    origin: str = ""
    sulfur_wt_pct: float | None = None
    narrow_cuts: NarrowCuts | None = None
    light_ends: LightEnds | None = None
    extras: dict[str, float | str] = field(default_factory=dict)
    source: str = ""
    sha256: str = ""
    notes: list[str] = field(default_factory=list)
    gravity_inputs: dict[str, float] = field(default_factory=dict)

    @property
    def api(self) -> float:
        """Whole-crude API gravity. [°API]"""
        return sg_to_api(self.sg)


CURVE_METHODS = ("TBP", "D86", "D2887", "D1160")
"""Distillation methods a curve may be given in."""
SG_RANGE = (0.5, 1.3)
"""Whole-crude specific gravities accepted from the library API (0.5 is about 150 °API; the readers'
0-100 °API is inside). [-]"""


def validate_assay(assay) -> None:
    """Check an :class:`Assay` built by code (the library API) as the readers check files: whole-crude
    gravity and sulfur in range, at least one curve, each curve's arrays finite, of equal length, percents
    within 0-100 and temperatures above absolute zero, a D1160 curve with its pressure, narrow-cut columns
    of equal length.

    Raises
    ------
    InputError
        Naming the assay's source (when it has one) and what was expected.
    """
    import math

    from ..errors import InputError

    src = getattr(assay, "source", "") or None

    def bad(msg, whole_crude=True):
        raise InputError(msg, file=src if whole_crude else None)

    if not isinstance(assay, Assay):
        raise InputError(f"expected an Assay; got {type(assay).__name__}")
    if not isinstance(assay.name, str) or not assay.name.strip():
        bad("the assay has no name")
    lo, hi = SG_RANGE
    if isinstance(assay.sg, bool) or not isinstance(assay.sg, (int, float, np.floating)):
        bad(f"whole-crude SG {assay.sg!r} is outside {lo:g}-{hi:g}")
    s = assay.sulfur_wt_pct
    if s is not None and (isinstance(s, bool) or not isinstance(s, (int, float, np.floating))):
        bad(f"whole-crude sulfur {s!r} wt % is outside 0-15 wt %")
    if not isinstance(assay.curves, (list, tuple)) or not assay.curves:
        bad("the assay has no distillation curve")
    arrays, whats = [], []
    for k, c in enumerate(assay.curves, start=1):
        where = c.where if isinstance(c, CurveData) else ""
        what = where or f"curve {k}"
        if not isinstance(c, CurveData):
            bad(f"{what}: expected a CurveData; got {type(c).__name__}", not where)
        if c.method not in CURVE_METHODS:
            bad(f"{what}: method {c.method!r} is not one of {', '.join(CURVE_METHODS)}", not where)
        if c.basis not in ("vol", "wt"):
            bad(f"{what}: basis {c.basis!r}; expected 'vol' or 'wt'", not where)
        try:
            p = np.asarray(c.percent, dtype=float)
            t = np.asarray(c.temp_c, dtype=float)
        except (TypeError, ValueError):
            bad(f"{what}: percent and temp_c must be arrays of numbers", not where)
        if p.ndim != 1 or t.ndim != 1 or p.size != t.size:
            bad(f"{what}: {p.size} percents against {t.size} temperatures; give one temperature per percent", not where)
        if p.size < 2:
            bad(f"{what}: {p.size} point(s); a curve needs at least two", not where)
        if c.method == "D1160":
            from ..methods.d1160 import PRESSURE_RANGE_MMHG

            pr = c.pressure_mmhg
            a, b = PRESSURE_RANGE_MMHG
            if pr is None or isinstance(pr, bool) or not isinstance(pr, (int, float)) or not a <= pr <= b:
                bad(f"{what}: a D1160 curve needs its pressure in mmHg ({a:g}-{b:g}); got {pr!r}", not where)
        if c.watson_k is not None and not (isinstance(c.watson_k, (int, float)) and math.isfinite(c.watson_k)
                                           and 8.0 <= c.watson_k <= 14.0):
            bad(f"{what}: Watson K {c.watson_k!r} is outside 8-14", not where)
        arrays.append((p[None, :], t[None, :]))
        whats.append((what, not where))
    fault = value_faults(np.array([float(assay.sg)]), np.array([np.nan if s is None else float(s)]),
                         np.array([s is not None]), arrays, whats)[0]
    if fault is not None:
        bad(*fault)
    nc = assay.narrow_cuts
    if nc is not None:
        cols = [nc.start_c, nc.end_c, nc.vol_pct, nc.wt_pct, nc.sg, nc.sulfur_wt_pct, *nc.extras.values()]
        sizes = {np.asarray(x).size for x in cols}
        if len(sizes) != 1:
            bad("narrow cuts: the columns differ in length")


def value_faults(sg, sulfur, sulfur_given, curves, whats) -> list:
    """The first measured value :func:`validate_assay` refuses in each of R rows (assays, or draws of one), or None.

    Parameters
    ----------
    sg : numpy.ndarray
        Whole-crude SG 60/60 °F, (R,). [-]
    sulfur, sulfur_given : numpy.ndarray
        Whole-crude sulfur [wt %] and whether it is given, (R,).
    curves : list of (numpy.ndarray, numpy.ndarray)
        Per curve, percent [%] and temperature [°C], (R, n) each.
    whats : list of (str, bool)
        Per curve, its name in messages and whether its messages name the assay's file.

    Returns
    -------
    list of (str, bool) or None
        Per row, the message and whether it names the file: SG outside :data:`SG_RANGE`, sulfur outside
        0-15 wt %, then per curve a value not finite, a percent outside 0-100 %, a temperature at or below
        absolute zero or above 1500 °C.
    """
    lo, hi = SG_RANGE
    checks = [(~((sg >= lo) & (sg <= hi)), lambda r: (f"whole-crude SG {float(sg[r])!r} is outside {lo:g}-{hi:g}",
                                                       True)),
              (sulfur_given & ~((sulfur >= 0.0) & (sulfur <= 15.0)),
               lambda r: (f"whole-crude sulfur {float(sulfur[r])!r} wt % is outside 0-15 wt %", True))]
    for (p, t), (what, whole) in zip(curves, whats):
        finite = np.isfinite(p).all(axis=1) & np.isfinite(t).all(axis=1)
        with np.errstate(invalid="ignore"):
            checks += [(~finite, lambda r, w=what, f=whole: (f"{w}: percents and temperatures must be finite numbers", f)),
                       ((p.min(axis=1) < 0) | (p.max(axis=1) > 100),  # finite and two or more: min and max say it
                        lambda r, w=what, f=whole: (f"{w}: percents must lie within 0-100 %", f)),
                       ((t.min(axis=1) <= -273.15) | (t.max(axis=1) > 1500.0),
                        lambda r, w=what, f=whole: (f"{w}: temperatures must lie above absolute zero and at most "
                                                    f"1500 °C", f))]
    out: list = [None] * sg.shape[0]
    for mask, message in checks:
        for r in np.flatnonzero(mask):
            if out[r] is None:
                out[r] = message(int(r))
    return out
