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


MAX_RATE_BBL_PER_DAY = 1e7
"""Largest crude run a request may carry [bbl/d] (the largest refineries run about 1.2 million bbl/d; common
practice, no source)."""


@dataclass(frozen=True)
class CutRequest:
    """One request of the page: the crude, the cut points and the crude run."""

    assay: str | None
    """The loaded crude's name (None for the cut-set download)."""
    ends: dict
    """{cut name: TBP end [°C]} moved from the starting cut set."""
    rate_bbl_per_day: float | None = None
    """Crude run [bbl/d], or None: with it the cut table carries bbl/d, m³/d and t/d, the worth per day."""


def parse_cut_request(doc, names: list[str], need_assay: bool = True) -> CutRequest:
    """The crude, cut points and crude run of a request body
    ``{"assay": NAME, "ends": {CUT: TEMP_C, ...}, "rate_bbl_per_day": RATE}`` (the rate is optional).

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
    CutRequest

    Raises
    ------
    RequestError
        Naming the first thing wrong: not an object, an unknown key, an unknown crude (404), ends that are not
        an object of finite numbers, a rate that is not a positive number of at most
        :data:`MAX_RATE_BBL_PER_DAY`.
    """
    if not isinstance(doc, dict):
        raise RequestError('the body must be a JSON object: {"assay": NAME, "ends": {CUT: TEMP_C}}')
    allowed = {"assay", "ends", "rate_bbl_per_day"} if need_assay else {"ends"}
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
        if not _finite_number(t, MAX_REQUEST_TEMP_C):
            raise RequestError(f"ends[{cut[:80]!r}] must be a finite TBP in °C; found {_shown(t)!r}")
        out[cut] = float(t)
    rate = doc.get("rate_bbl_per_day")
    if rate is not None and not (_finite_number(rate, MAX_RATE_BBL_PER_DAY) and rate > 0):
        raise RequestError(f"'rate_bbl_per_day' must be a crude run above 0 and at most "
                           f"{MAX_RATE_BBL_PER_DAY:,.0f} bbl/d; found {_shown(rate)!r}")
    return CutRequest(name, out, None if rate is None else float(rate))


def _finite_number(v, largest: float) -> bool:
    """Whether ``v`` is a JSON number (not a boolean) of magnitude at most ``largest``; a huge integer is
    refused before any conversion to float could overflow."""
    return not isinstance(v, bool) and isinstance(v, (int, float)) and abs(v) <= largest and math.isfinite(v)


def _shown(v) -> str:
    """A refused value for a one-line message: at most 40 characters, a huge integer by its digit count."""
    return str(v)[:40] if not isinstance(v, int) or abs(v) < 10 ** 40 else f"a number of {len(str(v))} digits"


PAGE_COLUMNS = ("vol_pct", "wt_pct", "api", "sg", "sulfur_wt_pct", "watson_k", "end_c", "d86_10_c", "d86_90_c",
                "flash_c_est", "cetane_index_d4737", "freeze_point_c", "smoke_point_mm", "cloud_point_c",
                "viscosity_40c_cst", "hydrogen_wt_pct", "bmci", "worth_per_bbl", "margin_per_bbl", "worth_per_day", "margin_per_day",
                "bbl_per_day")
"""The columns the explorer page shows (their digits come from :func:`~assaycut.report.precision.rule`, their
units from :func:`~assaycut.report.tables.unit_of`)."""
WORTH_KEYS = ("worth_per_bbl", "worth_per_t", "crude_price_per_bbl", "crude_price_per_t", "margin_per_bbl",
              "margin_per_t", "worth_per_day", "margin_per_day")
"""The figures of ``POST /api/worth``, as :func:`~assaycut.studies.compare.worth_table` gives them (the per-day
ones only for a crude run)."""
MAX_CUT_FILE_CHARS = 12_000
"""Largest cut-set text the page may upload [characters] (within the server's body limit; a cut set of 100
cuts with long names is about 8 kB)."""


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
    unit : str
        'C' or 'F': the temperature unit the page starts in (``GET /api/assays`` ``unit``).
    """

    def __init__(self, crudes, cut_set, limits, prices=None, method: str = "daubert-1994", unit: str = "C"):
        from ..model.crude import build_model

        self.unit = unit
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

    def result(self, name: str, ends: dict[str, float], rate_bbl_per_day: float | None = None):
        """The YieldResult of crude ``name`` at cut points ``ends`` [°C], with daily rates for a crude run of
        ``rate_bbl_per_day`` [bbl/d] when given (reused when just asked for)."""
        from ..yields import run_yields

        key = (name, tuple(sorted(ends.items())), rate_bbl_per_day)
        hit = self._cache.get(key)
        if hit is not None:
            self._cache.move_to_end(key)
            return hit
        c = self.crudes[name]
        res = run_yields(c.assay, self.cut_set_for(ends), self.limits, method=self.method, model=c.model,
                         rate_bbl_per_day=rate_bbl_per_day)
        self._cache[key] = res
        while len(self._cache) > MAX_CACHED:
            self._cache.popitem(last=False)
        return res

    def cut_json(self, name: str, ends: dict[str, float], rate_bbl_per_day: float | None = None) -> dict:
        """``POST /api/cut``: the ``yields --end ... [--rate R] --json`` object of crude ``name`` at cut points
        ``ends`` [°C] and crude run ``rate_bbl_per_day`` [bbl/d]."""
        from ..report.jsonout import yield_json

        return yield_json(self.result(name, ends, rate_bbl_per_day))

    def worth_json(self, name: str, ends: dict[str, float], rate_bbl_per_day: float | None = None) -> dict:
        """``POST /api/worth``: gross product worth and margin of crude ``name`` at cut points ``ends`` (and,
        with a crude run, per day).

        Returns
        -------
        dict
            ``currency``; ``worth_per_bbl``, ``worth_per_t``, ``crude_price_per_bbl``, ``crude_price_per_t``,
            ``margin_per_bbl``, ``margin_per_t`` [currency per bbl or t of crude; None without a crude price];
            with a crude run ``worth_per_day`` and ``margin_per_day`` [currency/d];
            ``products``: each cut's price and worth (:func:`~assaycut.studies.compare.worth_by_product`);
            ``notes``: the worth caveat.
        """
        from ..report.jsonout import frame_records, json_safe
        from ..studies.compare import WORTH_CAVEAT, worth_by_product, worth_table

        if self.prices is None:
            raise RequestError("no price file was given: start the explorer with --prices FILE", status=404)
        res = self.result(name, ends, rate_bbl_per_day)
        row = worth_table([res], self.prices).iloc[0]
        doc = {k: json_safe(float(row[k])) for k in WORTH_KEYS if k in row.index}  # per day: with a run only
        return {"assay": name, "currency": self.prices.currency, **doc,
                "products": frame_records(worth_by_product(res, self.prices)), "notes": [WORTH_CAVEAT]}

    def assays_json(self) -> dict:
        """``GET /api/assays``: the loaded crudes (name, file, gravity, sulfur, the TBP curve to draw and where it
        is measured), the starting cut set, whether prices are loaded, the cautions, ``precision``: the
        shown-digits rule (:func:`~assaycut.report.precision.rule`, ``[kind, n]``) of each column the page
        shows, so that the page shows every number as the reports do, and ``units``: each column's unit ('°C'
        marks the temperatures the page gives in °F on request), and the largest crude run a request may carry."""
        from ..report.jsonout import json_safe
        from ..report.precision import rule
        from ..report.tables import unit_of
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
                "method": self.method, "notes": list(CAUTIONS), "unit": self.unit,
                "max_rate_bbl_per_day": MAX_RATE_BBL_PER_DAY,
                "precision": {k: list(rule(k)) for k in PAGE_COLUMNS},
                "units": {k: unit_of(k) for k in PAGE_COLUMNS}}

    def read_cut_set(self, doc) -> dict:
        """``POST /api/cutset/read`` ``{"file": NAME, "toml": TEXT}``: the cut points of an uploaded cut-set file,
        for the page's handles.

        The file is read by the same reader as ``--cuts`` (:func:`~assaycut.io.tomlfiles.cut_set_from_text`).
        Its cuts must be the page's products, in the same order: the limits and prices are the products'.

        Returns
        -------
        dict
            ``label`` (the file's name), ``ends`` {cut: TBP end [°C]} and ``notes`` (what the page does not use:
            overlaps, swing flags that differ).

        Raises
        ------
        RequestError
            A body that is not ``{"file", "toml"}``, a file the reader refuses (its one-line message), or cuts
            that are not the page's.
        """
        from ..io.tomlfiles import cut_set_from_text

        if not isinstance(doc, dict) or set(doc) != {"file", "toml"} or not all(
                isinstance(v, str) for v in doc.values()):
            raise RequestError('the body must be {"file": NAME, "toml": TEXT}')
        if len(doc["toml"]) > MAX_CUT_FILE_CHARS:
            raise RequestError(f"{doc['file'][:80]}: {len(doc['toml']):,} characters; a cut set uploaded here holds "
                               f"at most {MAX_CUT_FILE_CHARS:,}")
        where = doc["file"][:80] or "the cut-set file"
        cs = cut_set_from_text(doc["toml"], where)
        mine = self.cut_set.names
        if cs.names != mine:
            raise RequestError(f"{where}: its cuts ({', '.join(cs.names)[:300]}) are not this page's products "
                               f"({', '.join(mine)[:300]}); start the explorer with --cuts {where} to work on them")
        notes = []
        if cs.overlaps:
            notes.append(f"{where}: the page cuts at ideal TBP cut points; its overlap_c values "
                         f"({', '.join(cs.overlaps)}) are not used here (yields --cuts uses them)")
        swings = [c.name for c, k in zip(cs.cuts, self.cut_set.cuts) if c.swing != k.swing]
        if swings:
            notes.append(f"{where}: swing flags differ from the starting cut set ({', '.join(swings)}); the page "
                         f"keeps its own")
        return {"label": where, "ends": {c.name: c.end_c for c in cs.cuts if c.end_c is not None}, "notes": notes}

    def cut_set_toml(self, ends: dict[str, float]) -> str:
        """The cut set at the page's cut points as a cut-set TOML file (``--cuts`` reads it back)."""
        from ..io.tomlfiles import cut_set_toml

        cs = self.cut_set_for(ends)
        return cut_set_toml(cs, f"Cut set saved from the assaycut explorer (started from {self.cut_set.label}).\n"
                                "TBP cut points in °C; read it back with --cuts FILE.")

    def workbook_bytes(self, name: str, ends: dict[str, float], rate_bbl_per_day: float | None = None) -> bytes:
        """The yield-report workbook (.xlsx) of crude ``name`` at cut points ``ends`` (and crude run), as bytes."""
        import io

        from ..report.xlsx import yield_workbook

        buf = io.BytesIO()
        yield_workbook(self.result(name, ends, rate_bbl_per_day)).save(buf)
        return buf.getvalue()
