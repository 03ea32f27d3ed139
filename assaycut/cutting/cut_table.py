"""The one result table of the core: named columns of equal length, numbers as numpy arrays.

Everything the core hands out as a table is a :class:`CutTable`: the cut table of a crude (one row per cut,
:data:`~assaycut.cutting.ideal.CUT_COLUMNS`), the real column's products, the uncertainty bands (one row per
cut) and the product-limit status (one row per limit, :data:`~assaycut.cutting.limits.LIMIT_COLUMNS`).  Inside
the core it is read by column (``table["vol_pct"]`` is a numpy array, ``table["name"]`` a list); the two other
shapes exist only at the edges, for the library API and the report writers: :meth:`CutTable.rows` (one dict of
plain Python values per row, the JSON's shape) and :meth:`CutTable.frame` (a pandas DataFrame, pandas imported
only then).
"""

from __future__ import annotations

import numpy as np

__all__ = ["CutTable"]


class CutTable:
    """Named columns of equal length (a cut table, the bands or the limit status), with ``attrs``.

    Parameters
    ----------
    columns : dict of str to numpy.ndarray or list
        The columns in display order: numbers as 1-D numpy arrays (float or bool), texts and other objects
        (a cut's D86 as a dict, its list of estimated values) as lists.
    attrs : dict, optional
        What the table carries besides its rows (the bands' draws, failed draws and sigmas).

    Examples
    --------
    >>> t = CutTable({"name": ["naphtha", "rest"], "vol_pct": np.array([40.0, 60.0])})
    >>> len(t), t["name"], float(t["vol_pct"].sum())
    (2, ['naphtha', 'rest'], 100.0)
    >>> t.rows()
    [{'name': 'naphtha', 'vol_pct': 40.0}, {'name': 'rest', 'vol_pct': 60.0}]
    """

    __slots__ = ("columns", "attrs")

    def __init__(self, columns: dict, attrs: dict | None = None):
        self.columns = {k: (v if isinstance(v, list) else np.asarray(v)) for k, v in columns.items()}
        self.attrs = dict(attrs or {})
        sizes = {len(v) for v in self.columns.values()}
        if len(sizes) > 1:
            raise ValueError(f"CutTable columns of unequal length: {sorted(sizes)}")

    @classmethod
    def from_rows(cls, rows: list[dict], keys: list[str], attrs: dict | None = None) -> "CutTable":
        """The table of rows (dicts with ``keys``): float columns as arrays, the others as lists."""
        cols = {}
        for k in keys:
            vals = [r[k] for r in rows]
            floats = bool(vals) and all(isinstance(v, float) for v in vals)
            cols[k] = np.array(vals, dtype=float) if floats else vals
        return cls(cols, attrs)

    def __len__(self) -> int:
        return len(next(iter(self.columns.values()))) if self.columns else 0

    def __getitem__(self, key: str):
        return self.columns[key]

    def __contains__(self, key: str) -> bool:
        return key in self.columns

    @property
    def keys(self) -> list[str]:
        """The column names, in display order."""
        return list(self.columns)

    def column(self, key: str) -> list:
        """A column as plain Python values (floats, bools, texts)."""
        v = self.columns[key]
        return v if isinstance(v, list) else v.tolist()

    def rows(self) -> list[dict]:
        """One dict per row, keys in column order, plain Python values (NaN stays a float NaN)."""
        lists = [(k, self.column(k)) for k in self.columns]
        return [{k: v[i] for k, v in lists} for i in range(len(self))]

    def frame(self):
        """The table as a pandas DataFrame (the same columns and values; ``attrs`` copied)."""
        import pandas as pd

        df = pd.DataFrame({k: v for k, v in self.columns.items()})
        df.attrs.update(self.attrs)
        return df

    def index(self, name: str, key: str = "name") -> int:
        """The row whose ``key`` column holds ``name``."""
        return self.columns[key].index(name)

    def with_columns(self, after: str, new: dict) -> "CutTable":
        """A copy with the ``new`` columns inserted after column ``after``."""
        out: dict = {}
        for k, v in self.columns.items():
            out[k] = v
            if k == after:
                out.update(new)
        return CutTable(out, self.attrs)
