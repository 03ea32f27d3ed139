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
