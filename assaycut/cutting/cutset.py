"""Cut sets: the ordered cuts of a refinery's column, each starting where the one before it ends."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import CutSetError
from . import SHIPPED_CUT_ENDS
from ..text import escape_hidden, has_hidden_characters


@dataclass(frozen=True)
class Cut:
    """One cut of a cut set: its name, its TBP end [°C] (None for the last cut) and swing flag."""

    name: str
    end_c: float | None
    swing: bool = False


@dataclass
class CutSet:
    """An ordered list of cuts; each starts where the one before it ends.

    Parameters
    ----------
    cuts : list of Cut
    label : str
        Where the cut set came from (file or 'default'), for messages.
    """

    cuts: list[Cut]
    label: str = "cut set"
    overlaps: dict[str, float] = field(default_factory=dict)
    """TBP 5-95 overlap [°C] at the end of named cuts, for a real column's products (empty: ideal cuts)."""

    def __post_init__(self):
        validate_cut_set(self.cuts, self.label)

    @property
    def names(self) -> list[str]:
        return [c.name for c in self.cuts]

    def reported(self) -> tuple[list[str], np.ndarray]:
        """Names and cut points as reported: each swing cut split at its mid temperature into a light and a
        heavy half, so that a planner can allocate either half to the product below or above. [°C]"""
        names: list[str] = []
        ends: list[float] = []
        start = None
        for c in self.cuts:
            if c.swing:
                mid = 0.5 * (start + c.end_c)
                names += [f"{c.name} (light half)", f"{c.name} (heavy half)"]
                ends += [mid, c.end_c]
            else:
                names.append(c.name)
                ends.append(c.end_c)
            start = c.end_c
        return names, np.array(ends[:-1], dtype=float)

    @property
    def ends_c(self) -> np.ndarray:
        """Cut points (ends of all but the last cut). [°C]"""
        return np.array([c.end_c for c in self.cuts[:-1]], dtype=float)

    def with_ends(self, changes: dict[str, float], label: str | None = None) -> "CutSet":
        """A copy with some cuts' ends changed: {cut name: new end [°C]}."""
        unknown = [n for n in changes if n not in self.names]
        if unknown:
            raise CutSetError(f"{self.label}: no cut named {unknown[0]!r}; the cuts are "
                              f"{', '.join(repr(n) for n in self.names)}")
        if self.cuts and self.cuts[-1].name in changes:
            raise CutSetError(f"{self.label}: the last cut {self.cuts[-1].name!r} runs to the end of the curve "
                              f"and has no end to change")
        cuts = [Cut(c.name, float(changes[c.name]) if c.name in changes else c.end_c, c.swing)
                for c in self.cuts]
        return CutSet(cuts, label or self.label, dict(self.overlaps))

    def with_end_changes(self, changes: dict[str, float]) -> "CutSet":
        """The cut set with some cut points moved ({cut name: TBP end [°C]}), labelled as --end changes; this
        same cut set when there are none.  ``yields --end`` and the explorer's handles both go through it, so
        that their answers agree."""
        return self.with_ends(changes, self.label + " with --end changes") if changes else self


MAX_CUTS = 100
"""Most cuts in a cut set (a column makes a handful of products; a fine grid of narrow cuts a few dozen)."""
MAX_NAME_CHARS = 200
"""Longest cut name accepted. [characters]"""


def normal_name(name: str) -> str:
    """A cut name as matched against limits and options: Unicode NFKC, surrounding whitespace removed.

    Examples
    --------
    >>> normal_name(" ﬁrst naphtha ")
    'first naphtha'
    """
    import unicodedata

    return unicodedata.normalize("NFKC", name).strip()


def validate_cut_set(cuts: list[Cut], label: str) -> None:
    """Refuse empty or oversized sets, long or duplicate names, missing ends and cut points that do not
    increase."""
    if not cuts:
        raise CutSetError(f"{label}: no cuts; give at least one [[cut]] with a name")
    if len(cuts) > MAX_CUTS:
        raise CutSetError(f"{label}: {len(cuts)} cuts; a cut set holds at most {MAX_CUTS}")
    seen = set()
    for i, c in enumerate(cuts):
        if not isinstance(c.name, str) or not c.name.strip():
            raise CutSetError(f"{label}: cut {i + 1} has an empty name")
        if len(c.name) > MAX_NAME_CHARS:
            raise CutSetError(f"{label}: cut {i + 1}'s name is {len(c.name)} characters long; at most "
                              f"{MAX_NAME_CHARS} are accepted")
        if has_hidden_characters(c.name):
            raise CutSetError(f"{label}: cut {i + 1}'s name holds a control character or an invisible one ("
                              f"{escape_hidden(c.name)[:60]!r}: line break, escape, bidi control, zero-width "
                              f"space...); use plain text")
        if c.end_c is not None and (isinstance(c.end_c, bool) or not isinstance(c.end_c, (int, float, np.floating))
                                    or not np.isfinite(c.end_c)):
            raise CutSetError(f"{label}: cut {c.name!r} ends at {c.end_c!r}; expected a finite TBP in °C")
        if c.name in seen:
            raise CutSetError(f"{label}: duplicate cut name {c.name!r}; each cut needs its own name")
        seen.add(c.name)
        last = i == len(cuts) - 1
        if not last and c.end_c is None:
            raise CutSetError(f"{label}: cut {c.name!r} has no end; only the last cut runs to the end of the curve")
        if last and c.end_c is not None:
            raise CutSetError(f"{label}: the last cut {c.name!r} has an end ({c.end_c:g} °C); the last cut must "
                              f"have none, as it runs to the end of the curve")
        if c.swing and (i == 0 or last):
            raise CutSetError(f"{label}: cut {c.name!r} is marked swing but is the {'first' if i == 0 else 'last'} "
                              f"cut; a swing cut lies between two cut points")
        if c.end_c is not None and not (-273.15 < c.end_c < 1500.0):
            raise CutSetError(f"{label}: cut {c.name!r} ends at {c.end_c:g} °C; expected a TBP between "
                              f"-273.15 and 1500 °C")
    ends = [c.end_c for c in cuts[:-1]]
    for a, b, ca, cb in zip(ends, ends[1:], cuts, cuts[1:]):
        if not b > a:
            raise CutSetError(f"{label}: cut points must increase: {cb.name!r} ends at {b:g} °C, not above "
                              f"{ca.name!r} at {a:g} °C")


DEFAULT_CUTS = [Cut(name, end) for name, end in SHIPPED_CUT_ENDS]
"""The shipped default cut set (:data:`~assaycut.cutting.SHIPPED_CUT_ENDS`)."""


def default_cut_set() -> CutSet:
    """The shipped default cut set (see :data:`DEFAULT_CUTS`)."""
    return CutSet(list(DEFAULT_CUTS), "default cut set")
