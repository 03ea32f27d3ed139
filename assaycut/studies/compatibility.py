"""Crude compatibility in blends: the oil compatibility model of Wiehe & Kennedy.

Asphaltenes precipitate from a blend when its oils together cannot keep them in solution, and they then foul
the preheat train.  Wiehe & Kennedy's oil compatibility model (I. A. Wiehe and R. J. Kennedy, "The Oil
Compatibility Model and Crude Oil Incompatibility", Energy & Fuels 14 (2000) 56-59) gives each oil two numbers
measured by titration with toluene and n-heptane: the solubility blending number S_BN (how well the oil
dissolves asphaltenes) and the insolubility number I_N (how much solvency its own asphaltenes need).  For a
mixture of oils with volume fractions v_i:

.. math:: S_{BN,mix} = \\sum_i v_i S_{BN,i}

and the mixture is compatible when :math:`S_{BN,mix} > I_{N,max}`, the largest insolubility number among the
oils in it; at or below it, asphaltenes precipitate.

Because a blend passes through every intermediate composition as it is made, the order matters: an oil added
to a tank of another makes mixtures from the tank's own oil (with the new oil's I_N already present) to the
final blend.  Adding the oils in order of decreasing S_BN keeps every intermediate mixture's S_BN at or above
the final blend's, so every step is stable whenever the final blend is (Wiehe & Kennedy 2000, from memory).

The words: ``incompatible`` when S_BN,mix ≤ I_N,max; ``marginal`` when it exceeds I_N,max by less than the
ratio :data:`MARGIN_RATIO`; ``compatible`` above; ``not assessed`` when any oil lacks either number (never a
silent pass).  The numbers are measured properties: a blend near the boundary needs a laboratory test of the
actual blend.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

SBN_KEY = "solubility_blending_number"
"""The crude sheet's row, and the JSON key, of the solubility blending number S_BN. [-]"""
IN_KEY = "insolubility_number"
"""The crude sheet's row, and the JSON key, of the insolubility number I_N. [-]"""
NUMBER_RANGE = (0.0, 500.0)
"""Accepted values of either number (measured values lie from 0 to about 200). [-]"""
MARGIN_RATIO = 1.3
"""A blend whose S_BN,mix is below this multiple of I_N,max is called ``marginal``: the numbers' own scatter
and an intermediate composition in a tank can reach the boundary.  Our choice, a rule of thumb from memory (no
source at hand); the blend optimiser keeps its answer at or above it."""
WORDS = ("compatible", "marginal", "incompatible", "not assessed")
"""What the outputs say of a blend."""


@dataclass
class Compatibility:
    """A blend's compatibility: ``word`` (one of :data:`WORDS`), S_BN of the mixture and I_N,max [-], their
    difference ``margin`` and ``ratio`` (S_BN,mix / I_N,max, None when I_N,max is 0), the crude whose I_N is the
    largest, ``order`` (an order of adding the crudes that keeps every intermediate mixture compatible, or
    None where none exists), ``given_order_unstable`` (the first crude whose addition, in the order given,
    passes through an incompatible mixture, or None), and the crudes ``missing`` either number."""

    word: str
    sbn_mix: float | None = None
    in_max: float | None = None
    margin: float | None = None
    ratio: float | None = None
    limiting: str | None = None
    order: list[str] | None = None
    given_order_unstable: str | None = None
    missing: list[str] = field(default_factory=list)
    crudes: dict = field(default_factory=dict)
    """Each crude's own numbers: {name: {SBN_KEY: S_BN, IN_KEY: I_N} or None}."""

    def record(self) -> dict:
        """The JSON object of the assessment: ``word``, the blend's ``solubility_blending_number`` and the
        ``insolubility_number`` it must exceed (I_N max), ``margin``, ``ratio``, ``limiting_crude``,
        ``blending_order``, ``given_order_unstable_at``, ``missing`` and each crude's numbers."""
        return {"word": self.word, SBN_KEY: self.sbn_mix, IN_KEY: self.in_max, "margin": self.margin,
                "ratio": self.ratio, "marginal_below_ratio": MARGIN_RATIO, "limiting_crude": self.limiting,
                "blending_order": self.order, "given_order_unstable_at": self.given_order_unstable,
                "missing": self.missing, "crudes": self.crudes}

    def text(self) -> str:
        """One line for a report."""
        if self.word == "not assessed":
            return (f"compatibility not assessed: {', '.join(self.missing)} lack(s) {SBN_KEY} and/or {IN_KEY} "
                    f"(measured by titration)")
        head = (f"compatibility: {self.word} (S_BN of the blend {self.sbn_mix:.1f} against I_N max "
                f"{self.in_max:.1f} of {self.limiting}, margin {self.margin:+.1f})")
        if self.order is not None and len(self.order) > 1:
            head += "; blend in the order " + " -> ".join(self.order)
        if self.given_order_unstable is not None:
            head += f"; in the order given, adding {self.given_order_unstable} passes through an incompatible mixture"
        if self.word in ("incompatible", "marginal"):
            head += (". CAUTION: asphaltenes may precipitate and foul the preheat train; test the actual blend in "
                     "the laboratory before running it")
        return head


def numbers_of(extras: dict) -> tuple[float, float] | None:
    """(S_BN, I_N) of a crude from its whole-crude data, or None when either is missing."""
    s, i = extras.get(SBN_KEY), extras.get(IN_KEY)
    if s is None or i is None:
        return None
    return float(s), float(i)


def classify(sbn_mix: float, in_max: float) -> str:
    """The word for a mixture: 'incompatible' when S_BN,mix ≤ I_N,max, 'marginal' when S_BN,mix < MARGIN_RATIO ×
    I_N,max, else 'compatible' (Wiehe & Kennedy 2000; the margin is our choice).

    Examples
    --------
    The boundary itself is incompatible; an oil without asphaltenes (I_N 0) is compatible with anything:

    >>> classify(40.0, 40.0), classify(45.0, 40.0), classify(60.0, 40.0), classify(10.0, 0.0)
    ('incompatible', 'marginal', 'compatible', 'compatible')
    """
    if sbn_mix <= in_max:
        return "incompatible"
    if sbn_mix < MARGIN_RATIO * in_max:
        return "marginal"
    return "compatible"


def _stable_addition(base_sbn: float, new_sbn: float, in_max: float) -> bool:
    """Whether adding an oil to a tank keeps every intermediate mixture compatible: the mixture's S_BN moves
    linearly from the tank's (with the new oil's I_N already present) to the new mixture's, so its least value
    is at one end."""
    return min(base_sbn, new_sbn) > in_max


def assess(names: list[str], numbers: list[tuple[float, float] | None], vol_fractions) -> Compatibility:
    """The compatibility of a blend of oils by the oil compatibility model.

    Parameters
    ----------
    names : list of str
        The crudes, in the order given (the order they would be added in).
    numbers : list of (S_BN, I_N) or None
        Each crude's measured numbers (:func:`numbers_of`); None where missing.
    vol_fractions : sequence of float
        Each crude's share of the blend by volume (adding up to 1).  A crude with share 0 takes no part.

    Returns
    -------
    Compatibility
        With the word, the mixture's numbers, the margin, and an order of addition that keeps every
        intermediate mixture compatible (decreasing S_BN) where one exists.

    Examples
    --------
    A heavy asphaltenic crude (S_BN 80, I_N 40) with a paraffinic light one (S_BN 20, I_N 0), half and half:
    S_BN,mix = 50 > 40, compatible by the equations but within the margin; the light crude must go into the
    heavy one, not the reverse:

    >>> c = assess(["light", "heavy"], [(20.0, 0.0), (80.0, 40.0)], [0.5, 0.5])
    >>> c.word, c.sbn_mix, c.in_max, c.order, c.given_order_unstable
    ('marginal', 50.0, 40.0, ['heavy', 'light'], 'heavy')
    """
    v = np.asarray(vol_fractions, dtype=float)
    used = [k for k in range(len(names)) if v[k] > 1e-12]
    crudes = {names[k]: None if numbers[k] is None else {SBN_KEY: numbers[k][0], IN_KEY: numbers[k][1]}
              for k in used}
    missing = [names[k] for k in used if numbers[k] is None]
    if missing:
        return Compatibility("not assessed", missing=missing, crudes=crudes)
    s = np.array([numbers[k][0] for k in used])
    i = np.array([numbers[k][1] for k in used])
    f = v[used] / v[used].sum()
    sbn_mix = float(f @ s)
    k_max = int(np.argmax(i))
    in_max = float(i[k_max])
    word = classify(sbn_mix, in_max)
    order = None
    if word != "incompatible":
        order = [names[used[k]] for k in np.argsort(-s, kind="stable")]
    unstable = None
    tank_v, tank_s, tank_i = 0.0, 0.0, 0.0
    for k in range(len(used)):  # the order given: each crude poured into the tank of those before it
        new_v = tank_v + f[k]
        new_s = (tank_v * tank_s + f[k] * s[k]) / new_v
        new_i = max(tank_i, i[k])
        start_s = tank_s if tank_v > 0 else s[k]
        if not _stable_addition(start_s, new_s, new_i):
            unstable = names[used[k]]
            break
        tank_v, tank_s, tank_i = new_v, new_s, new_i
    return Compatibility(word, sbn_mix, in_max, sbn_mix - in_max, sbn_mix / in_max if in_max > 0 else None,
                         names[used[k_max]], order, unstable, [], crudes)
