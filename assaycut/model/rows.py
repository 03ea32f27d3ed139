"""Rows of a model batch under construction: the crude models of R assays (a library chunk, the uncertainty draws
of one assay, or one assay as a batch of one) built stage by stage as arrays over the rows.

A :class:`Rows` holds *row fields*, each a numpy array whose first axis runs over the rows or a list with one
item per row (the rows' texts), and *shared* values that every row of the set has alike (the structure they
share: the number of points, which components are placed...).  A stage of the model builder takes one set,
works on all its rows at once, and splits it where rows take different branches (:meth:`Rows.split`), so that
inside a set every array has one shape.  A row that fails gets its error recorded (:meth:`Rows.fail`) and leaves
the set.  Each row's arithmetic is its own, so a row's result does not depend on the other rows.
"""

from __future__ import annotations

import numpy as np

from ..errors import AssaycutError
from ..methods.pchip import Pchip

__all__ = ["Rows", "interp_rows", "row_sum"]


class Rows:
    """R rows of a model batch (see the module docstring).

    Attributes
    ----------
    index : numpy.ndarray of int
        Each row's position in the batch (its assay or draw), (R,).
    errors : dict of int to AssaycutError
        The batch's failed rows, shared by every set split from it.
    fields : set of str
        Names of the row fields; any other attribute is shared.
    """

    def __init__(self, index, errors: dict | None = None):
        self.__dict__.update(index=np.asarray(index, dtype=int), errors={} if errors is None else errors,
                             fields=set())

    @property
    def n(self) -> int:
        """Number of rows."""
        return int(self.index.size)

    def put(self, **fields) -> "Rows":
        """Set row fields (arrays with R first, lists of R, or a :class:`~assaycut.methods.pchip.Pchip` of R rows);
        returns self."""
        for k, v in fields.items():
            count = v.rows if isinstance(v, Pchip) else len(v)
            if count != self.n:
                raise ValueError(f"row field {k!r} has {count} rows; the set has {self.n}")
            self.__dict__[k] = v
            self.fields.add(k)
        return self

    def take(self, sel) -> "Rows":
        """A new set of the rows ``sel`` (a boolean mask or positions), sharing the shared values and the
        error record."""
        sel = np.asarray(sel)
        pos = np.flatnonzero(sel) if sel.dtype == bool else sel.astype(int)
        out = Rows(self.index[pos], self.errors)
        for k, v in vars(self).items():
            if k in ("index", "errors", "fields"):
                continue
            if k in self.fields:
                out.__dict__[k] = (v[pos] if isinstance(v, np.ndarray) else v.take(pos) if isinstance(v, Pchip)
                                   else [v[i] for i in pos])
                out.fields.add(k)
            else:
                out.__dict__[k] = v
        return out

    def fail(self, mask, error) -> "Rows":
        """Record ``error(r)`` (an AssaycutError) for each row r where ``mask`` is true; the other rows."""
        mask = np.asarray(mask, dtype=bool)
        if not mask.any():
            return self
        for r in np.flatnonzero(mask):
            e = error(int(r))
            if not isinstance(e, AssaycutError):
                raise TypeError("a failed row needs an AssaycutError")
            self.errors[int(self.index[r])] = e
        return self.take(~mask)

    def split(self, key) -> list["Rows"]:
        """The rows grouped by ``key`` (one row of any shape per row: rows with equal keys together), in the
        order of each group's first row; one set when every row's key is alike (the common case, no copy)."""
        if self.n == 0:
            return []
        k = np.asarray(key).reshape(self.n, -1)
        if (k == k[:1]).all():
            return [self]
        _, first, inv = np.unique(k, axis=0, return_index=True, return_inverse=True)
        inv = inv.ravel()
        return [self.take(inv == g) for g in np.argsort(first, kind="stable")]


def each(sets: list[Rows], stage, *args) -> list[Rows]:
    """``stage(s, *args)`` of every set (a stage returns a list of sets), the empty ones dropped."""
    out = []
    for s in sets:
        if s.n:
            out += [t for t in stage(s, *args) if t.n]
    return out


def row_sum(x: np.ndarray) -> np.ndarray:
    """Sum over the last axis, added in order, so that a row's sum is the same whatever the other rows: numpy's
    ``sum`` adds one row pairwise but several rows column by column, which rounds differently."""
    x = np.asarray(x, dtype=float)
    return np.cumsum(x, axis=-1)[..., -1] if x.shape[-1] else np.zeros(x.shape[:-1])


def interp_rows(q: np.ndarray, xp: np.ndarray, fp: np.ndarray) -> np.ndarray:
    """``numpy.interp`` row by row: row r of ``q`` (R, ...) read linearly on the points ``xp[r]``, ``fp[r]`` (R, k),
    taken in ascending ``xp`` (held beyond the outermost)."""
    out = np.empty(np.shape(q))
    for r in range(out.shape[0]):
        o = np.argsort(xp[r], kind="stable")
        out[r] = np.interp(q[r], xp[r][o], fp[r][o])
    return out
