"""TOML files of assaycut: cut sets (``[[cut]]``), product limits (``[[limit]]``) and price files."""

from __future__ import annotations

import math
import re
import tomllib
from importlib import resources
from pathlib import Path

from ..cutting.cutset import Cut, CutSet, normal_name
from ..cutting.limits import LIMIT_KEYS, SCALAR_PROPERTIES, Limit, validate_property
from ..errors import AssaycutError, InputError
from ..studies.compare import Price, PriceSet
from ..units import f_to_c
from .cells import read_bytes


TOML_MAX_BYTES = 1_000_000
"""Largest cut, limit or price file [bytes]: such files are a few kB by nature."""
TOML_MAX_KEY_PARTS = 16
"""Most parts of one dotted key (``a.b.c`` has 3).  Python's TOML reader takes time and memory growing with
the square of a key's parts (8,000 parts: 0.5 s; measured), so a long one is refused before parsing."""
TOML_MAX_DEPTH = 32
"""Deepest nesting of arrays and inline tables."""
TOML_MAX_NUMBER = 1e15
"""Largest magnitude of any number in these files (each key has its own narrower range checked after)."""
TOML_MAX_ENTRIES = 1000
"""Most [[limit]] tables in a limits file, and most prices in each table of a price file."""

_SPECIAL = re.compile(r"[\"'#]")
_BASIC_REST = re.compile(r'(?:[^"\\\n]|\\.)*+"')
"""The rest of a one-line basic string after its opening quote (possessive: never backtracks)."""
_DOTTED = re.compile(r"(?<![\w-])(?:[\w-]++[ \t]*+\.[ \t]*+){%d}[\w-]" % TOML_MAX_KEY_PARTS)
"""More than TOML_MAX_KEY_PARTS dot-joined parts (strings already replaced by one letter).  Tried only at the
start of a part, possessive and bounded, so a search is linear in the text and needs no large stack."""


def _bare(text: str) -> str:
    """The TOML text with each string replaced by the letter s and comments dropped, in one linear pass.  The
    scan stops at an unterminated string: the reader refuses the text there, before anything after it."""
    out, pos, n = [], 0, len(text)
    while pos < n:
        m = _SPECIAL.search(text, pos)
        if m is None:
            out.append(text[pos:])
            break
        out.append(text[pos:m.start()])
        i, ch = m.start(), m.group(0)
        if ch == "#":
            end = text.find("\n", i)
        elif text.startswith(ch * 3, i):
            end = text.find(ch * 3, i + 3)
            end = -1 if end < 0 else end + 3
            if end > 0 and text.startswith(ch, end):  # up to two quotes may end a multi-line string's content
                end += 2 if text.startswith(ch, end + 1) else 1
        elif ch == '"':
            rest = _BASIC_REST.match(text, i + 1)
            end = rest.end() if rest else -1
        else:
            close = text.find("'", i + 1)
            end = close + 1 if close >= 0 and "\n" not in text[i + 1:close] else -1
        if end < 0:
            break
        if ch != "#":
            out.append("s")
        pos = end
    return "".join(out)


def _bounded(text: str, path: str) -> None:
    """Refuse, before parsing, a TOML text with a dotted key of more than :data:`TOML_MAX_KEY_PARTS` parts or
    nesting deeper than :data:`TOML_MAX_DEPTH`; linear in the text.  Strings are replaced by one letter first
    (:func:`_bare`), so that a quoted key part counts and a dot or bracket inside a string does not."""
    bare = _bare(text)
    if _DOTTED.search(bare):
        raise InputError(f"a dotted key of more than {TOML_MAX_KEY_PARTS} parts; a cut, limits or price file has "
                         f"short keys", file=path)
    depth = deepest = 0
    for ch in re.findall(r"[\[\]{}]", bare):
        depth += 1 if ch in "[{" else -1
        deepest = max(deepest, depth)
        if deepest > TOML_MAX_DEPTH:
            raise InputError(f"TOML nested more than {TOML_MAX_DEPTH} deep; a cut, limits or price file is flat "
                             f"tables of numbers and texts", file=path)


def _numbers_in_range(value, where: str, path: str) -> None:
    """Refuse any number of magnitude above :data:`TOML_MAX_NUMBER` in a parsed document (``where``: the key
    path, named in the message)."""
    if isinstance(value, dict):
        for k, v in value.items():
            _numbers_in_range(v, f"{where}.{k}" if where else str(k), path)
    elif isinstance(value, list):
        for i, v in enumerate(value, start=1):
            _numbers_in_range(v, f"{where}[{i}]", path)
    elif isinstance(value, int) and not isinstance(value, bool) and abs(value) > TOML_MAX_NUMBER:
        raise InputError(f"{where}: a number of {len(str(abs(value)))} digits is out of range; numbers here lie "
                         f"within ±{TOML_MAX_NUMBER:g}", file=path)
    elif isinstance(value, float) and math.isfinite(value) and abs(value) > TOML_MAX_NUMBER:
        raise InputError(f"{where}: {value:g} is out of range; numbers here lie within ±{TOML_MAX_NUMBER:g}",
                         file=path)


def load_toml(path: str) -> dict:
    """Parse a cut, limit, price or plant file: UTF-8 TOML of at most :data:`TOML_MAX_BYTES`, keys and nesting
    bounded before parsing (:func:`_bounded`), every number range-checked after (:func:`_numbers_in_range`)."""
    data = read_bytes(path, TOML_MAX_BYTES, "cut, limit and price files")
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError("not a UTF-8 text file; expected TOML", file=path) from None
    return _parse(text, path)


def _parse(text: str, path: str) -> dict:
    """Parse the text of a cut, limit or price file (``path`` names it in errors): keys and nesting bounded
    before parsing, every number range-checked after.  The text's size is bounded by the caller (a file by
    :func:`read_bytes`, the explorer's upload by its own limit)."""
    _bounded(text, path)
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"not valid TOML: {exc}", file=path) from None
    except RecursionError:
        raise InputError("TOML nested too deeply; a cut, limits or price file is flat tables of numbers and "
                         "texts", file=path) from None
    except ValueError:  # an integer of more digits than Python converts (4,300)
        raise InputError(f"a number of more than 4,300 digits; numbers here lie within ±{TOML_MAX_NUMBER:g}",
                         file=path) from None
    _numbers_in_range(doc, "", path)
    return doc


def _temp(v, key: str, i: int, path: str) -> float:
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
        raise InputError(f"[[cut]] {i}: '{key}' must be a number; found {v!r}", file=path)
    return float(v) if key == "end_c" else f_to_c(float(v))


def cut_set_from_dict(doc: dict, path: str) -> CutSet:
    """A CutSet from a parsed cut-set TOML document (``[[cut]]`` tables: name, end_c or end_f, swing)."""
    items = doc.get("cut")
    unknown_top = set(doc) - {"cut"}
    if unknown_top:
        raise InputError(f"unknown table or key {sorted(unknown_top)[0]!r}; a cut set has only [[cut]] tables",
                         file=path)
    if not isinstance(items, list) or not items:
        raise InputError("no cuts; expected [[cut]] tables with name and end_c", file=path)
    cuts = []
    overlaps: dict[str, float] = {}
    for i, it in enumerate(items, start=1):
        if not isinstance(it, dict):
            raise InputError(f"[[cut]] {i} is not a table", file=path)
        unknown = set(it) - {"name", "end_c", "end_f", "swing", "overlap_c"}
        if unknown:
            raise InputError(f"[[cut]] {i}: unknown key {sorted(unknown)[0]!r}; expected name, end_c or end_f, "
                             f"swing, overlap_c", file=path)
        name = it.get("name")
        if not isinstance(name, str) or not name.strip():
            raise InputError(f"[[cut]] {i}: 'name' must be a non-empty text", file=path)
        if "end_c" in it and "end_f" in it:
            raise InputError(f"[[cut]] {i} ({name!r}): give end_c or end_f, not both", file=path)
        end = None
        for key in ("end_c", "end_f"):
            if key in it:
                end = _temp(it[key], key, i, path)
        swing = it.get("swing", False)
        if not isinstance(swing, bool):
            raise InputError(f"[[cut]] {i} ({name!r}): 'swing' must be true or false", file=path)
        if "overlap_c" in it:
            w = it["overlap_c"]
            if isinstance(w, bool) or not isinstance(w, (int, float)) or not -200.0 <= w <= 200.0:
                raise InputError(f"[[cut]] {i} ({name!r}): 'overlap_c' must be a TBP 5-95 overlap of -200 to 200 °C "
                                 f"(negative: a gap); found {w!r}", file=path)
            overlaps[normal_name(name)] = float(w)
        cuts.append(Cut(normal_name(name), end, swing))
    try:
        return CutSet(cuts, path, overlaps)
    except AssaycutError as exc:
        raise InputError(str(exc).removeprefix(f"{path}: "), file=path) from None


def cut_set_toml(cs: CutSet, title: str = "") -> str:
    """A cut set as cut-set TOML text that :func:`read_cut_set` reads back to the same cuts, ends [°C], swing
    flags and overlaps [°C] (``title`` becomes the opening comment lines).

    Names are TOML basic strings: JSON's string escapes are valid TOML ones, and a cut name holds no control
    character (:func:`~assaycut.cutting.cutset.validate_cut_set`).

    Examples
    --------
    >>> from assaycut.cutting.cutset import Cut, CutSet
    >>> print(cut_set_toml(CutSet([Cut("naphtha", 177.5), Cut('gas "oil"', None)])))
    [[cut]]
    name = "naphtha"
    end_c = 177.5
    <BLANKLINE>
    [[cut]]
    name = "gas \\"oil\\""
    <BLANKLINE>
    """
    import json

    lines = [f"# {t}" for t in title.splitlines()] + ([""] if title else [])
    for c in cs.cuts:
        lines += ["[[cut]]", f"name = {json.dumps(c.name, ensure_ascii=False)}"]
        if c.end_c is not None:
            lines.append(f"end_c = {float(c.end_c)!r}")
        if c.swing:
            lines.append("swing = true")
        if c.name in cs.overlaps:
            lines.append(f"overlap_c = {float(cs.overlaps[c.name])!r}")
        lines.append("")
    return "\n".join(lines)


def read_cut_set(path: str) -> CutSet:
    """Read a cut-set TOML file.

    Parameters
    ----------
    path : str

    Returns
    -------
    CutSet
    """
    return cut_set_from_dict(load_toml(path), path)


def cut_set_from_text(text: str, where: str) -> CutSet:
    """A cut set from the text of a cut-set TOML file (the explorer's upload), checked as :func:`read_cut_set`
    checks a file; ``where`` names it in errors."""
    return cut_set_from_dict(_parse(text.removeprefix("\ufeff"), where), where)


def limits_from_dicts(items: list[dict], where: str) -> list[Limit]:
    """Limits from parsed TOML tables (at most :data:`TOML_MAX_ENTRIES`), each checked; errors name the file
    and the limit's index."""
    if len(items) > TOML_MAX_ENTRIES:
        raise InputError(f"{len(items)} limits; a limits file holds at most {TOML_MAX_ENTRIES}", file=where)
    out = []
    for i, it in enumerate(items, start=1):
        if not isinstance(it, dict):
            raise InputError(f"[[limit]] {i} is not a table", file=where)
        unknown = set(it) - set(LIMIT_KEYS)
        if unknown:
            raise InputError(f"[[limit]] {i}: unknown key {sorted(unknown)[0]!r}; expected cut, property, min, max, "
                             f"strict, label, source", file=where)
        for k in ("cut", "property"):
            if not isinstance(it.get(k), str) or not it[k].strip():
                raise InputError(f"[[limit]] {i}: '{k}' must be a non-empty text", file=where)
        if not validate_property(it["property"]):
            raise InputError(f"[[limit]] {i}: unknown property {it['property']!r}; expected a cut-table column "
                             f"({', '.join(SCALAR_PROPERTIES)}), a quality (e.g. freeze_point_c, viscosity_40c_cst, "
                             f"nitrogen_wt_ppm), d86_<p>_c or recovered_at_<T>c_pct", file=where)
        lo, hi = it.get("min"), it.get("max")
        for k, v in (("min", lo), ("max", hi)):
            if v is not None and (isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v)):
                raise InputError(f"[[limit]] {i}: '{k}' must be a number; found {v!r}", file=where)
        if lo is None and hi is None:
            raise InputError(f"[[limit]] {i}: give 'min', 'max' or both", file=where)
        if lo is not None and hi is not None and lo > hi:
            raise InputError(f"[[limit]] {i}: min {lo:g} is above max {hi:g}", file=where)
        out.append(Limit(normal_name(it["cut"]), it["property"], None if lo is None else float(lo),
                         None if hi is None else float(hi), bool(it.get("strict", False)),
                         str(it.get("label", "")), str(it.get("source", ""))))
    return out


SHIPPED_LIMITS = {"blendstock": "limits_default.toml", "finished": "limits_finished.toml"}
"""The shipped limit sets by name: straight-run blendstock targets (the default) and finished-fuel specs."""


def read_limits(path: str | None = None) -> list[Limit]:
    """Read a product-limits TOML file (``[[limit]]`` tables); None reads the shipped default (blendstock
    targets), and a shipped set's name (:data:`SHIPPED_LIMITS`) that set, unless a file of that name exists."""
    if path is None or (path in SHIPPED_LIMITS and not Path(path).exists()):
        name = SHIPPED_LIMITS.get(path or "blendstock")
        ref = resources.files("assaycut.data").joinpath(name)
        return limits_from_dicts(tomllib.loads(ref.read_text(encoding="utf-8")).get("limit", []), name)
    if not Path(path).exists():
        raise InputError(f"file not found; give a limits file, or a shipped set: "
                         f"{', '.join(repr(k) for k in SHIPPED_LIMITS)}", file=path)
    doc = load_toml(path)
    unknown = set(doc) - {"limit"}
    if unknown:
        raise InputError(f"unknown table or key {sorted(unknown)[0]!r}; a limits file has only [[limit]] tables",
                         file=path)
    items = doc.get("limit")
    if not isinstance(items, list) or not items:
        raise InputError("no limits; expected [[limit]] tables with cut, property and min and/or max", file=path)
    return limits_from_dicts(items, path)


def default_cut_set_path():
    """Path-like of the shipped default cut set (cuts_default.toml)."""
    return resources.files("assaycut.data").joinpath("cuts_default.toml")


def demo_assay_paths() -> list[str]:
    """Paths of the shipped demo assays, the default one first."""
    base = resources.files("assaycut.data")
    return [str(base.joinpath(n)) for n in ("selkie_light.xlsx", "brannock_blend.xlsx", "tarn_heavy.xlsx")]


CRUDE_PRICE_PROPERTIES = ("api", "sg", "density_15c_kg_m3", "sulfur_wt_pct")
"""Whole-crude properties a crude price may be adjusted on (besides the crude sheet's extras)."""


MAX_PRICE_NUMBER = 1e9
"""Largest magnitude of a number in a price file (prices, bounds, adjustments): far above any oil price, far
below where the worth arithmetic would overflow."""


def _number(v, what: str, path: str) -> float:
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
        raise InputError(f"{what} must be a number; found {v!r}", file=path)
    if abs(v) > MAX_PRICE_NUMBER:
        raise InputError(f"{what} {v:g} is out of range; a price file's numbers lie within ±{MAX_PRICE_NUMBER:g}",
                         file=path)
    return float(v)


def _adjustments(items, line: str, key: str, path: str) -> tuple:
    """The ``adjust`` list of a price line, each entry checked (property known, base and per_unit numbers)."""
    from ..cutting.limits import SCALAR_PROPERTIES, is_quality
    from ..studies.compare import Adjustment

    if not isinstance(items, list):
        raise InputError(f"{line}: 'adjust' must be a list of {{ property, base, per_unit }} tables", file=path)
    out = []
    for i, it in enumerate(items, start=1):
        if not isinstance(it, dict) or set(it) != {"property", "base", "per_unit"}:
            raise InputError(f"{line}: adjust {i} needs exactly property, base and per_unit", file=path)
        prop = it["property"]
        known = (prop in SCALAR_PROPERTIES or is_quality(prop)) if key == "products" else \
            (prop in CRUDE_PRICE_PROPERTIES or is_quality(prop))
        if not isinstance(prop, str) or not known:
            allowed = "a cut-table column or quality (api, sulfur_wt_pct, viscosity_50c_cst, cetane_index_d4737...)" \
                if key == "products" else f"a whole-crude property ({', '.join(CRUDE_PRICE_PROPERTIES)}, or a quality)"
            raise InputError(f"{line}: adjust {i}: unknown property {prop!r}; expected {allowed}", file=path)
        out.append(Adjustment(prop, _number(it["base"], f"{line}: adjust {i} base", path),
                              _number(it["per_unit"], f"{line}: adjust {i} per_unit", path)))
    return tuple(out)


def read_prices(path: str):
    """Read a price file (TOML).

    Layout::

        currency = "USD"
        [products]                      # one entry per cut of the cut set
        "light ends" = { per_t = 420.0 }
        "diesel" = { per_bbl = 96.0 }
        "vacuum residue" = { per_t = 390.0, adjust = [ { property = "sulfur_wt_pct", base = 1.0, per_unit = -12.0 } ] }
        [crudes]                        # optional: crude prices, by crude name
        "Selkie Light" = { per_bbl = 82.0, adjust = [ { property = "api", base = 35.0, per_unit = 0.1 } ] }

    Prices must be positive numbers, each given per_bbl or per_t (not both).  ``adjust`` moves the price, in
    its own unit, by per_unit x (value - base) of the named property; optional ``min``/``max`` bound the
    adjusted price.
    """
    doc = load_toml(path)
    unknown = set(doc) - {"currency", "products", "crudes"}
    if unknown:
        raise InputError(f"unknown key {sorted(unknown)[0]!r}; a price file has currency, [products] and [crudes]",
                         file=path)
    cur = doc.get("currency", "USD")
    if not isinstance(cur, str) or not cur.strip():
        raise InputError("'currency' must be a text such as \"USD\"", file=path)

    def table(key: str, required: bool) -> dict:
        t = doc.get(key, {})
        if not isinstance(t, dict):
            raise InputError(f"[{key}] must be a table", file=path)
        if required and not t:
            raise InputError(f"no [{key}] prices; give one per cut, e.g. \"diesel\" = {{ per_bbl = 95.0 }}", file=path)
        if len(t) > TOML_MAX_ENTRIES:
            raise InputError(f"{len(t)} prices in [{key}]; a price file holds at most {TOML_MAX_ENTRIES} per table",
                             file=path)
        out = {}
        for name, spec in t.items():
            line = f"[{key}] {name!r}"
            if isinstance(spec, (int, float)) and not isinstance(spec, bool):
                raise InputError(f"{line}: give the unit, e.g. {{ per_bbl = {spec} }} or {{ per_t = {spec} }}",
                                 file=path)
            units = [k for k in ("per_bbl", "per_t") if isinstance(spec, dict) and k in spec]
            if not isinstance(spec, dict) or len(units) != 1:
                raise InputError(f"{line}: expected {{ per_bbl = PRICE }} or {{ per_t = PRICE }}", file=path)
            extra = set(spec) - {units[0], "adjust", "min", "max"}
            if extra:
                raise InputError(f"{line}: unknown key {sorted(extra)[0]!r}; a price has per_bbl or per_t, and "
                                 f"optionally adjust, min, max", file=path)
            val = _number(spec[units[0]], f"{line}: the price", path)
            if val <= 0:
                raise InputError(f"{line}: the price {val:g} must be positive", file=path)
            lo = _number(spec["min"], f"{line}: min", path) if "min" in spec else None
            hi = _number(spec["max"], f"{line}: max", path) if "max" in spec else None
            if lo is not None and hi is not None and lo > hi:
                raise InputError(f"{line}: min {lo:g} is above max {hi:g}", file=path)
            adjust = _adjustments(spec.get("adjust", []), line, key, path)
            out[name] = Price(val, "bbl" if units[0] == "per_bbl" else "t", adjust, lo, hi, line)
        return out

    return PriceSet(table("products", True), table("crudes", False), cur.strip(), path)
