"""The assay-library engine: many crude models cut with one cut set as arrays over assays.

The models of a chunk are one :class:`~assaycut.cutting.model_rows.BatchModel` (their splines stacked as the
rows of one :class:`~assaycut.methods.pchip.Pchip`), cut by the same :func:`~assaycut.cutting.ideal.cut_columns`
that cuts one crude (a batch of one); each row's answers are its own.
"""

from __future__ import annotations

import math

import numpy as np

from ..model.crude import CrudeModel
from .cutset import CutSet
from .ideal import FLAG_SETS, cut_columns
from .model_rows import BatchModel

CHUNK = 1024
"""Crudes cut together in one pass; a library is cut chunk by chunk."""


def cut_library(models: list[CrudeModel], cut_set: CutSet, only=None) -> tuple[list[str], dict[str, np.ndarray]]:
    """Cut many crude models with one cut set, as arrays over crudes.

    Parameters
    ----------
    models : list of CrudeModel
    cut_set : CutSet
    only : set of str, optional
        Measured narrow-cut qualities to compute (default all; an empty set for none).

    Returns
    -------
    (names, columns)
        The reported cut names and :func:`~assaycut.cutting.ideal.cut_columns` arrays of shape (crudes, cuts)
        ('d86': (crudes, cuts, 7)).
    """
    names, ends = cut_set.reported()
    parts = []
    for i in range(0, len(models), CHUNK):  # fixed-size chunks: time linear in the library, memory bounded
        chunk = models[i:i + CHUNK]
        parts.append(cut_columns(BatchModel(chunk), np.repeat(ends[None, :], len(chunk), axis=0), only=only))
    if len(parts) == 1:
        return names, parts[0]
    out = {k: np.concatenate([p[k] for p in parts], axis=0) for k in parts[0] if k not in FLAG_SETS}
    for key in FLAG_SETS:
        out[key] = {n: np.concatenate([p[key][n] for p in parts], axis=0) for n in parts[0][key]}
    return names, out


SUMMARY_QUALITIES = [("vol_pct", "vol %"), ("wt_pct", "wt %"), ("api", "API"), ("sulfur_wt_pct", "S wt %"),
                     ("watson_k", "Kw"), ("cetane_index_d4737", "CCI"), ("flash_c_est", "flash est. °C")]
"""Per-cut columns of the library summary, with their short unit-bearing labels."""


def summary_columns(cut_set: CutSet) -> list[str]:
    """The columns of :func:`library_summary` for a cut set."""
    names, _ = cut_set.reported()
    return (["crude", "source", "sha256", "api", "sulfur_wt_pct"]
            + [f"{cut} {label}" for cut in names for _, label in SUMMARY_QUALITIES] + ["extrapolated_cuts"])


def summary_rows(assays, models: list[CrudeModel], cut_set: CutSet) -> list[list]:
    """The rows of :func:`library_summary` as lists of plain values (no pandas), in :func:`summary_columns`
    order; a missing value is NaN."""
    names, cols = cut_library(models, cut_set, only=set())  # the summary reads no narrow-cut quality
    per_cut = np.stack([cols[key][:, j] for j in range(len(names)) for key, _ in SUMMARY_QUALITIES], axis=1)
    return [_summary_line(a, m, values, [n for n, e in zip(names, flags) if e])
            for a, m, values, flags in zip(assays, models, per_cut.tolist(), cols["extrapolated"])]


def summary_row(assay, model: CrudeModel, cuts: list[dict]) -> list:
    """An assay's :func:`summary_rows` row from its ideal cut table already made as row dicts (the library
    engine's values for that assay: the same numbers; None where a value is missing)."""
    return _summary_line(assay, model, [c[key] for c in cuts for key, _ in SUMMARY_QUALITIES],
                         [c["name"] for c in cuts if c["extrapolated"]])


def _summary_line(assay, model: CrudeModel, values: list, flagged: list[str]) -> list:
    """One row in :func:`summary_columns` order: the crude's own columns, the per-cut ``values``, then the
    names of the cuts that use the extension."""
    sulfur = model.sulfur_wt_pct if model.sulfur_wt_pct is not None else math.nan
    return [assay.name, assay.source, assay.sha256, assay.api, sulfur, *values, ", ".join(flagged)]


def library_summary(assays, models: list[CrudeModel], cut_set: CutSet):
    """One row per crude with its yields and key qualities per cut.

    Parameters
    ----------
    assays : list of Assay
    models : list of CrudeModel
    cut_set : CutSet

    Returns
    -------
    pandas.DataFrame
        Columns: crude, source, sha256, api, sulfur_wt_pct, then '<cut> <label>' for each cut and quality of
        :data:`SUMMARY_QUALITIES`, then extrapolated_cuts (:func:`summary_rows` in a DataFrame).
    """
    import pandas as pd

    return pd.DataFrame(summary_rows(assays, models, cut_set), columns=summary_columns(cut_set))
