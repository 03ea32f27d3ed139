"""The cut-point explorer's state and answers, without HTTP: the loaded crudes with their models built once,
the cut set, limits and prices, and the documents the page asks for.

Every answer is made by the same functions as the command line's: a cut is :func:`assaycut.yields.run_yields`
on the crude's model with the cut points moved by
:meth:`~assaycut.cutting.cutset.CutSet.with_end_changes`, and its JSON is
:func:`assaycut.report.jsonout.yield_json`, so ``POST /api/cut`` equals ``assaycut yields --end ... --json``.
"""

from __future__ import annotations

import math
from collections import OrderedDict
from dataclasses import dataclass

import numpy as np

from ..errors import AssaycutError

MAX_CACHED = 64
"""Cut results kept for reuse (the worth and the workbook of the cut points just shown). [results]"""
CURVE_STEP_PCT = 0.5
"""Spacing of the TBP curve points sent to the page for drawing. [vol %]"""


class RequestError(AssaycutError):
    """A request the explorer cannot answer (a bad body, an unknown crude or cut); the server answers 4xx."""

    def __init__(self, message: str, status: int = 400):
        super().__init__(message)
        self.status = status


@dataclass
class LoadedCrude:
    """One crude of the explorer: where it came from, the assay and its model (built once)."""

    name: str
    path: str
    assay: object
    model: object


MAX_REQUEST_TEMP_C = 1e6
"""Largest cut point a request may carry [°C] (the cut set's own range check follows); a huge integer is
refused here, before any conversion to float could overflow."""


def parse_cut_request(doc, names: list[str], need_assay: bool = True) -> tuple[str | None, dict[str, float]]:
    """The crude name and the cut points of a request body ``{"assay": NAME, "ends": {CUT: TEMP_C, ...}}``.

    Parameters
    ----------
    doc : object
        The parsed JSON body.
    names : list of str
        The loaded crudes' names.
    need_assay : bool
        Whether ``assay`` is required (the cut-set download has none).

    Returns
    -------
    (str or None, dict of str to float)
        The crude's name and {cut name: TBP end [°C]}.

    Raises
    ------
    RequestError
        Naming the first thing wrong: not an object, an unknown key, an unknown crude (404), ends that are not
        an object of finite numbers.
    """
    if not isinstance(doc, dict):
        raise RequestError('the body must be a JSON object: {"assay": NAME, "ends": {CUT: TEMP_C}}')
    allowed = {"assay", "ends"} if need_assay else {"ends"}
    unknown = sorted(set(doc) - allowed)
    if unknown:
        raise RequestError(f"unknown key {unknown[0]!r}; expected {', '.join(sorted(allowed))}")
    name = None
    if need_assay:
        name = doc.get("assay")
        if not isinstance(name, str):
            raise RequestError("'assay' must be the name of a loaded crude (see GET /api/assays)")
        if name not in names:
            raise RequestError(f"no crude named {name[:80]!r} is loaded; see GET /api/assays", status=404)
    ends = doc.get("ends", {})
    if not isinstance(ends, dict):
        raise RequestError("'ends' must be an object {CUT: TEMP_C}")
    out: dict[str, float] = {}
    for cut, t in ends.items():
        if isinstance(t, bool) or not isinstance(t, (int, float)) or abs(t) > MAX_REQUEST_TEMP_C \
                or not math.isfinite(t):
            shown = str(t)[:40] if not isinstance(t, int) or abs(t) < 10 ** 40 else f"a number of {len(str(t))} digits"
            raise RequestError(f"ends[{cut[:80]!r}] must be a finite TBP in °C; found {shown!r}")
        out[cut] = float(t)
    return name, out


PAGE_COLUMNS = ("vol_pct", "wt_pct", "api", "sg", "sulfur_wt_pct", "watson_k", "end_c", "d86_10_c", "d86_90_c",
                "flash_c_est", "cetane_index_d4737", "freeze_point_c", "smoke_point_mm", "cloud_point_c",
                "viscosity_40c_cst", "worth_per_bbl", "bbl_per_day")
"""The columns the explorer page shows (their digits come from :func:`~assaycut.report.precision.rule`)."""


class Explorer:
    """The crudes, cut set, limits and prices of one explorer run.

    Parameters
    ----------
    crudes : list of (str, Assay)
        Each crude's file and its assay; names must differ.
    cut_set : CutSet
        The starting cut points (the handles' first positions).
    limits : list of Limit
    prices : PriceSet or None
        With prices, :meth:`worth_json` gives worth and margin.
    method : str
        TBP <-> D86 method for D86 input curves.
    """

    def __init__(self, crudes, cut_set, limits, prices=None, method: str = "daubert-1994"):
        from ..model.crude import build_model

        self.cut_set = cut_set
        self.limits = limits
        self.prices = prices
        self.method = method
        self.crudes: dict[str, LoadedCrude] = {}
        for path, assay in crudes:
            if assay.name in self.crudes:
                raise AssaycutError(f"{path}: crude {assay.name!r} is also in {self.crudes[assay.name].path}; "
                                    f"give each crude once (the page names crudes by name)")
            try:
                model = build_model(assay, method)
            except AssaycutError as exc:
                msg = str(exc)
                raise AssaycutError(msg if msg.startswith(str(path)) else f"{path}: {msg}") from None
            self.crudes[assay.name] = LoadedCrude(assay.name, str(path), assay, model)
        self._cache: OrderedDict = OrderedDict()
        if prices is not None:
            for name in self.crudes:  # a price file missing a cut is refused now, not at the first drag
                self.worth_json(name, {})

    @property
    def names(self) -> list[str]:
        return list(self.crudes)

    def cut_set_for(self, ends: dict[str, float]):
        """The cut set with the page's cut points [°C]; CutSetError names a bad one."""
        return self.cut_set.with_end_changes(ends)

    def result(self, name: str, ends: dict[str, float]):
        """The YieldResult of crude ``name`` at cut points ``ends`` [°C] (reused when just asked for)."""
        from ..yields import run_yields

        key = (name, tuple(sorted(ends.items())))
        hit = self._cache.get(key)
        if hit is not None:
            self._cache.move_to_end(key)
            return hit
        c = self.crudes[name]
        res = run_yields(c.assay, self.cut_set_for(ends), self.limits, method=self.method, model=c.model)
        self._cache[key] = res
        while len(self._cache) > MAX_CACHED:
            self._cache.popitem(last=False)
        return res

    def cut_json(self, name: str, ends: dict[str, float]) -> dict:
        """``POST /api/cut``: the ``yields --json`` object of crude ``name`` at cut points ``ends`` [°C]."""
        from ..report.jsonout import yield_json

        return yield_json(self.result(name, ends))

    def worth_json(self, name: str, ends: dict[str, float]) -> dict:
        """``POST /api/worth``: gross product worth and margin of crude ``name`` at cut points ``ends``.

        Returns
        -------
        dict
            ``currency``; ``worth_per_bbl``, ``worth_per_t``, ``crude_price_per_bbl``, ``crude_price_per_t``,
            ``margin_per_bbl``, ``margin_per_t`` [currency per bbl or t of crude; None without a crude price];
            ``products``: each cut's price and worth (:func:`~assaycut.studies.compare.worth_by_product`);
            ``notes``: the worth caveat.
        """
        from ..report.jsonout import frame_records, json_safe
        from ..studies.compare import WORTH_CAVEAT, worth_by_product, worth_table

        if self.prices is None:
            raise RequestError("no price file was given: start the explorer with --prices FILE", status=404)
        res = self.result(name, ends)
        row = worth_table([res], self.prices).iloc[0]
        doc = {k: json_safe(float(row[k])) for k in ("worth_per_bbl", "worth_per_t", "crude_price_per_bbl",
                                                     "crude_price_per_t", "margin_per_bbl", "margin_per_t")}
        return {"assay": name, "currency": self.prices.currency, **doc,
                "products": frame_records(worth_by_product(res, self.prices)), "notes": [WORTH_CAVEAT]}

    def assays_json(self) -> dict:
        """``GET /api/assays``: the loaded crudes (name, file, gravity, sulfur, the TBP curve to draw and where it
        is measured), the starting cut set, whether prices are loaded, the cautions, and ``precision``: the
        shown-digits rule (:func:`~assaycut.report.precision.rule`, ``[kind, n]``) of each column the page
        shows, so that the page shows every number as the reports do."""
        from ..report.jsonout import json_safe
        from ..report.precision import rule
        from ..yields import CAUTIONS

        grid = np.arange(0.0, 100.0 + CURVE_STEP_PCT / 2, CURVE_STEP_PCT)
        crudes = []
        for c in self.crudes.values():
            curve = c.model.curve
            crudes.append({
                "name": c.name, "source": c.assay.source, "origin": c.assay.origin,
                "api": json_safe(c.assay.api), "sg": json_safe(c.assay.sg),
                "sulfur_wt_pct": json_safe(c.model.given_sulfur_wt_pct),
                "curve": {"vol_pct": grid.tolist(), "temp_c": [round(float(t), 3) for t in curve.temp_at(grid)]},
                "measured_vol_pct": [json_safe(curve.measured_lo), json_safe(curve.measured_hi)],
            })
        return {"assays": crudes,
                "cut_set": {"label": self.cut_set.label,
                            "cuts": [{"name": k.name, "end_c": k.end_c, "swing": k.swing} for k in self.cut_set.cuts]},
                "limits": len(self.limits), "prices": self.prices is not None,
                "currency": self.prices.currency if self.prices is not None else None,
                "method": self.method, "notes": list(CAUTIONS),
                "precision": {k: list(rule(k)) for k in PAGE_COLUMNS}}

    def cut_set_toml(self, ends: dict[str, float]) -> str:
        """The cut set at the page's cut points as a cut-set TOML file (``--cuts`` reads it back)."""
        from ..io.tomlfiles import cut_set_toml

        cs = self.cut_set_for(ends)
        return cut_set_toml(cs, f"Cut set saved from the assaycut explorer (started from {self.cut_set.label}).\n"
                                "TBP cut points in °C; read it back with --cuts FILE.")

    def workbook_bytes(self, name: str, ends: dict[str, float]) -> bytes:
        """The yield-report workbook (.xlsx) of crude ``name`` at cut points ``ends``, as bytes."""
        import io

        from ..report.xlsx import yield_workbook

        buf = io.BytesIO()
        yield_workbook(self.result(name, ends)).save(buf)
        return buf.getvalue()
