"""Pure-component data for the light ends (C1-C5) of a crude.

Normal boiling points and molar masses are the values of the ``chemicals`` package (Caleb Bell et al.,
the Chemical Engineering Design Library), looked up by CAS number and rounded to 0.01 °C / 0.001 g/mol;
the tests compare this table with that library.  Liquid specific gravities at 60 °F are the values of
GPA Standard 2145, *Table of Physical Properties for Hydrocarbons and Other Compounds of Interest to the
Natural Gas Industry* (propane to n-pentane recalled from memory, not read from the table; methane and ethane
are the customary hypothetical-liquid values, also from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class Component:
    """One light-ends component.

    Attributes
    ----------
    key : str
        Short name used in the assay workbook (e.g. 'nC4').
    name : str
        Chemical name.
    cas : str
        CAS registry number.
    nbp_c : float
        Normal boiling point. [°C]
    sg : float
        Liquid specific gravity 60/60 °F. [-]
    mw : float
        Molar mass. [g/mol]
    tc_k, pc_bar, omega, vc_m3_kmol : float
        Critical temperature [K], critical pressure [bar], acentric factor [-] and critical volume [m³/kmol]:
        the values of ``chemicals`` (rounded), for the pure components of ``assaycut pseudo``.
    """

    key: str
    name: str
    cas: str
    nbp_c: float
    sg: float
    mw: float
    tc_k: float = math.nan
    pc_bar: float = math.nan
    omega: float = math.nan
    vc_m3_kmol: float = math.nan


COMPONENTS: tuple[Component, ...] = (
    Component("C1", "methane", "74-82-8", -161.48, 0.3000, 16.043, 190.56, 45.992, 0.0114, 0.09863),
    Component("C2", "ethane", "74-84-0", -88.58, 0.3562, 30.069, 305.32, 48.722, 0.0995, 0.14584),
    Component("C3", "propane", "74-98-6", -42.11, 0.5070, 44.096, 369.89, 42.512, 0.1521, 0.2),
    Component("iC4", "isobutane", "75-28-5", -11.75, 0.5629, 58.122, 407.81, 36.29, 0.184, 0.25775),
    Component("nC4", "n-butane", "106-97-8", -0.49, 0.5840, 58.122, 425.12, 37.96, 0.201, 0.25492),
    Component("iC5", "isopentane", "78-78-4", 27.83, 0.6247, 72.149, 460.35, 33.78, 0.2274, 0.30572),
    Component("nC5", "n-pentane", "109-66-0", 36.06, 0.6311, 72.149, 469.7, 33.675, 0.251, 0.31153),
)
"""Light-ends components in order of boiling point."""

_ALIASES = {}
for _c in COMPONENTS:
    for _a in (_c.key, _c.name, _c.name.replace("n-", "n"), _c.name.replace("-", " "), _c.cas):
        _ALIASES[_a.lower()] = _c
_ALIASES.update({"i-butane": COMPONENTS[3], "normal butane": COMPONENTS[4], "butane": COMPONENTS[4],
                 "i-pentane": COMPONENTS[5], "pentane": COMPONENTS[6], "ic4": COMPONENTS[3],
                 "nc4": COMPONENTS[4], "ic5": COMPONENTS[5], "nc5": COMPONENTS[6]})


def find_component(label: str) -> Component | None:
    """The component named by ``label`` (key, name or CAS number, case-insensitive), or None."""
    return _ALIASES.get(str(label).strip().lower())


def convert_basis(amount_pct: float, frm: str, to: str, component_sg: float, crude_sg: float) -> float:
    """A light-ends component's share of the whole crude on another basis.

    .. math:: x_{vol} = x_{wt} \\cdot SG_{crude} / SG_{component}, \\qquad
              x_{wt} = x_{vol} \\cdot SG_{component} / SG_{crude}

    Parameters
    ----------
    amount_pct : float
        Share of the whole crude on basis ``frm``. [%]
    frm, to : str
        'wt' or 'vol'.
    component_sg, crude_sg : float
        Liquid SG 60/60 °F of the component and of the whole crude. [-]

    Returns
    -------
    float
        Share on basis ``to``. [%]

    Examples
    --------
    1 wt % of n-butane (SG 0.5840) in a crude of SG 0.8760 is 1.5 vol % (mass balance):

    >>> round(convert_basis(1.0, "wt", "vol", 0.5840, 0.8760), 6)
    1.5
    """
    if frm == to:
        return amount_pct
    if frm == "wt":
        return amount_pct * crude_sg / component_sg
    return amount_pct * component_sg / crude_sg


def known_labels() -> str:
    """Comma-separated list of the keys accepted in a light-ends table."""
    return ", ".join(c.key for c in COMPONENTS)


GAS_RANGE_MAX_C = COMPONENTS[-1].nbp_c
"""Top of the gas range for curves without a light-ends analysis: the boiling point of n-pentane. [°C]"""


def gas_range_sg(temp_c):
    """Assumed SG 60/60 °F of crude boiling in the gas range when no light-ends analysis is given.

    The material boiling at T (below n-pentane's 36.06 °C) is taken as the C2-C5 paraffins of the same
    boiling point: SG linear in boiling point between the pure components of :data:`COMPONENTS` (GPA 2145
    values), held at ethane's below it.  Our assumption (common practice, no source): a crude's light ends are
    mostly these paraffins.

    Parameters
    ----------
    temp_c : array_like
        TBP. [°C]

    Returns
    -------
    numpy.ndarray
        SG [-]; NaN at and above :data:`GAS_RANGE_MAX_C`.

    Examples
    --------
    >>> [round(float(x), 4) for x in gas_range_sg([-0.5, 36.0])]
    [0.584, 0.6311]
    """
    import numpy as np

    comps = [c for c in COMPONENTS if c.key != "C1"]
    t = np.asarray(temp_c, dtype=float)
    sg = np.interp(t, [c.nbp_c for c in comps], [c.sg for c in comps])
    return np.where(t < GAS_RANGE_MAX_C, sg, np.nan)
