"""Blending indices of narrow-cut properties: each property blends linearly in its index, on its own basis.

A cut made of narrow cuts has the property value ``from_index(Σ x_i · to_index(value_i))``, x the weight or
volume fractions the rule names.  The canonical property names (the narrow-cut column names) and their rules:

* mass-additive on the weight basis (the index is the value): sulfur, mercaptan sulfur, nitrogen, basic
  nitrogen, nickel, vanadium, CCR, asphaltenes, wax, acid number;
* volume-additive (index = value): paraffins, naphthenes, aromatics;
* ``viscosity_<T>c_cst``: the Refutas blending number on weight (Maples 2000);
* ``pour_point_c``, ``cloud_point_c``: Hu-Burns power indices T^(1/0.08), T^(1/0.05) in K on volume (Hu & Burns
  1970); ``freeze_point_c``: no published index was found, the cloud-point index is used (our assumption);
* ``flash_point_c``: Wickey-Chittenden, log10 BI = -6.1188 + 2414/(T - 42.6), T in K, on volume (1963);
* ``rvp_kpa``: RVP^1.25 on volume (Chevron; Gary & Handwerk);
* ``ron``, ``mon``: linear by volume (common practice);
* ``smoke_point_mm``: 1/SP linear by volume (empirical: it reproduces the ASTM D1322 toluene/iso-octane
  reference blends within about 1 mm, where linear SP errs by up to 7 mm; Jones & Pujadó, Handbook of
  Petroleum Processing, Table 16.16, quoted second-hand);
* any other numeric column: linear by weight, and the report says so.

Contents
--------
- :class:`BlendRule`: How one property blends: its basis ('wt' or 'vol'), index and inverse, and...
- :func:`wickey_chittenden_index`: Flash-point blending index, Wickey & Chittenden (1963) [2]_: log10 BI =...
- :func:`flash_from_wickey_chittenden_index`: Inverse of :func:`wickey_chittenden_index`: flash point [°C] of a
  blending index
- :func:`rule_for`: The blending rule of a narrow-cut property column
- :func:`blend`: Blend one property over components by its rule
- constants: ``K0``, ``MASS_ADDITIVE``, ``VOLUME_ADDITIVE``, ``VISCOSITY``, ``RULES``

References
----------
.. [1] Hu, J., Burns, A., "Index predicts cloud, pour and flash points of distillate fuel blends", Oil Gas J.
   68(45) (1970) 66.
.. [2] Wickey, R. O., Chittenden, D. H., "Flash points of blends correlated", Hydrocarbon Processing 42(6)
   (1963) 157.
.. [3] Maples, R. E., *Petroleum Refinery Process Economics*, 2nd ed., PennWell (2000).
.. [4] Gary, J. H., Handwerk, G. E., *Petroleum Refining*, Marcel Dekker (RVP index, recalled from memory).
"""

from __future__ import annotations

import re
from functools import partial
from typing import Callable, NamedTuple

import numpy as np

from .blending_rules import vbn_refutas, viscosity_from_vbn_refutas

__all__ = ["BlendRule", "wickey_chittenden_index", "flash_from_wickey_chittenden_index", "rule_for", "blend", "K0",
           "MASS_ADDITIVE", "VOLUME_ADDITIVE", "VISCOSITY", "RULES"]

K0 = 273.15
"""°C to K. [K]"""


class BlendRule(NamedTuple):
    """How one property blends: its basis ('wt' or 'vol'), index and inverse, and where the rule comes from."""

    basis: str
    to_index: Callable
    from_index: Callable
    label: str
    known: bool = True
    """False for a column without a rule of its own (blended linearly by weight, with a warning)."""


def _ident(x):
    return np.asarray(x, dtype=float)


def _hu_burns(t_c, exponent):
    return (np.asarray(t_c, dtype=float) + K0) ** (1.0 / exponent)


def _hu_burns_inverse(bi, exponent):
    with np.errstate(invalid="ignore"):
        return np.asarray(bi, dtype=float) ** exponent - K0


def _power_index(exponent: float) -> tuple[Callable, Callable]:
    """Hu-Burns index T[K]^(1/e) and its inverse, temperatures in °C outside (picklable partials)."""
    return partial(_hu_burns, exponent=exponent), partial(_hu_burns_inverse, exponent=exponent)


def _power(x, p):
    return np.asarray(x, dtype=float) ** p


def wickey_chittenden_index(flash_c):
    """Flash-point blending index, Wickey & Chittenden (1963) [2]_: log10 BI = -6.1188 + 2414/(T - 42.6), T in K.

    Examples
    --------
    The printed index table of [2]_, quoted second-hand (20 °C -> 3281, 50 °C -> 306):

    >>> [round(float(x)) for x in wickey_chittenden_index([20.0, 50.0])]
    [3281, 306]
    """
    t = np.asarray(flash_c, dtype=float) + K0
    return 10.0 ** (-6.1188 + 2414.0 / (t - 42.6))


def flash_from_wickey_chittenden_index(bi):
    """Inverse of :func:`wickey_chittenden_index`: flash point [°C] of a blending index."""
    with np.errstate(invalid="ignore", divide="ignore"):
        return 2414.0 / (np.log10(np.asarray(bi, dtype=float)) + 6.1188) + 42.6 - K0


def _reciprocal(x):
    with np.errstate(divide="ignore"):
        return 1.0 / np.asarray(x, dtype=float)


MASS_ADDITIVE = ("sulfur_wt_pct", "mercaptan_sulfur_wt_ppm", "nitrogen_wt_ppm", "basic_nitrogen_wt_ppm",
                 "nickel_wt_ppm", "vanadium_wt_ppm", "ccr_wt_pct", "asphaltenes_wt_pct", "wax_wt_pct",
                 "acid_number_mg_koh_g", "hydrogen_wt_pct")
"""Properties that blend linearly by weight."""
VOLUME_ADDITIVE = ("paraffins_vol_pct", "naphthenes_vol_pct", "aromatics_vol_pct")
"""Properties that blend linearly by volume."""
VISCOSITY = re.compile(r"^viscosity_(\d+(?:\.\d+)?)c_cst$")
"""A kinematic viscosity column and its temperature [°C]."""

_POUR = _power_index(0.08)
_CLOUD = _power_index(0.05)
RULES: dict[str, BlendRule] = {
    **{k: BlendRule("wt", _ident, _ident, "linear by weight") for k in MASS_ADDITIVE},
    **{k: BlendRule("vol", _ident, _ident, "linear by volume") for k in VOLUME_ADDITIVE},
    "pour_point_c": BlendRule("vol", *_POUR, "Hu-Burns index T[K]^12.5 by volume (Hu & Burns 1970)"),
    "cloud_point_c": BlendRule("vol", *_CLOUD, "Hu-Burns index T[K]^20 by volume (Hu & Burns 1970)"),
    "freeze_point_c": BlendRule("vol", *_CLOUD, "ASSUMPTION: no published freeze-point index was found; the "
                                                "Hu-Burns cloud-point index T[K]^20 by volume is used"),
    "flash_point_c": BlendRule("vol", wickey_chittenden_index, flash_from_wickey_chittenden_index,
                               "Wickey-Chittenden index by volume (1963)"),
    "rvp_kpa": BlendRule("vol", partial(_power, p=1.25), partial(_power, p=0.8), "RVP^1.25 by volume (Chevron index)"),
    "ron": BlendRule("vol", _ident, _ident, "linear by volume (common practice)"),
    "mon": BlendRule("vol", _ident, _ident, "linear by volume (common practice)"),
    "smoke_point_mm": BlendRule("vol", _reciprocal, _reciprocal,
                                "1/smoke point linear by volume (empirical choice; reproduces the ASTM D1322 "
                                "reference blends)"),
}
"""The blending rule of each canonical property name (viscosities are matched by :data:`VISCOSITY`)."""


def rule_for(name: str) -> BlendRule:
    """The blending rule of a narrow-cut property column.

    Parameters
    ----------
    name : str
        Column name, e.g. 'nitrogen_wt_ppm', 'viscosity_50c_cst', 'freeze_point_c'.

    Returns
    -------
    BlendRule
        The property's rule; for a name without one, linear by weight with ``known`` False.

    Examples
    --------
    >>> rule_for("viscosity_50c_cst").basis, rule_for("cloud_point_c").basis, rule_for("colour_astm").known
    ('wt', 'vol', False)
    """
    if name in RULES:
        return RULES[name]
    if VISCOSITY.match(name):
        return BlendRule("wt", vbn_refutas, viscosity_from_vbn_refutas,
                         "Refutas blending number by weight (Maples 2000)")
    return BlendRule("wt", _ident, _ident, "no rule of its own: linear by weight", known=False)


def blend(name: str, values, fractions):
    """Blend one property over components by its rule.

    Parameters
    ----------
    name : str
        Property name (:func:`rule_for`).
    values : array_like
        The components' values, in the property's unit.
    fractions : array_like
        The components' fractions on the rule's basis (weight or volume), any scale.

    Returns
    -------
    float
        The blend's value.

    Examples
    --------
    Computed from the index forms above (not printed examples): 50/50 of -15 and +15 °C pour points gives
    +4.4 °C, of cloud points +6.7 °C; 50/50 vol of 40 and 70 °C flash points gives 47.8 °C:

    >>> [round(float(blend(n, v, [1, 1])), 1) for n, v in (("pour_point_c", [-15, 15]),
    ...  ("cloud_point_c", [-15, 15]), ("flash_point_c", [40, 70]))]
    [4.4, 6.7, 47.8]
    """
    rule = rule_for(name)
    x = np.asarray(fractions, dtype=float)
    return rule.from_index(np.sum(x * rule.to_index(values)) / np.sum(x))
