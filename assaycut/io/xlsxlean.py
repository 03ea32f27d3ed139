"""A lean reader of the cells of .xlsx workbooks as assaycut writes and spreadsheet programs save them.

It parses the few parts the assay reader needs (the package manifest, the workbook's sheet list and
relationships, the shared strings, the worksheets' ``sheetData``) with expat directly, and hands each sheet's
rows on exactly as openpyxl's read-only sheet parser yields them (``(row number, [{"column", "value"}])``),
so that every check on them (row order, size limits, cell values) stays in one place,
:func:`assaycut.io.workbook._rows`.  It reads a demo workbook in about 2.4 ms where openpyxl takes 6.4.

It reads only what it understands.  Anything else raises :class:`Unusual`, and the caller reads the file with
openpyxl instead (the reference reader, which then reads it or refuses it with its own message): any XML
document type declaration (so an entity declaration is never expanded here), damaged XML, a formula cell
(openpyxl reports it as a formula, which the assay reader refuses where it wants a value), a date-styled
number, a stylesheet not yet read by openpyxl in this process, defined names, a chartsheet, an element outside
the usual worksheet structure, an unexpected sheet name or relationship.
"""

from __future__ import annotations

import posixpath
import re
import zipfile
from xml.parsers import expat

MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
PKG_REL = "http://schemas.openxmlformats.org/package/2006/relationships"
CONTENT_TYPES = "http://schemas.openxmlformats.org/package/2006/content-types"
SHARED_STRINGS_TYPE = "application/vnd.openxmlformats-officedocument.spreadsheetml.sharedStrings+xml"
WORKSHEET_REL = REL + "/worksheet"

_SHEET_TITLE_BAD = re.compile(r"[\\*?:/\[\]]")  # the characters openpyxl refuses in a sheet title
_COORD = re.compile(r"^[$]?([A-Za-z]{1,3})[$]?(\d+)$")  # a cell reference as openpyxl matches it

_WORKBOOK_ELEMENTS = frozenset(MAIN + " " + t for t in (
    "workbook", "fileVersion", "workbookPr", "workbookProtection", "bookViews", "workbookView", "sheets", "sheet",
    "definedNames", "calcPr", "fileRecoveryPr"))
_SHEET_OUTSIDE_DATA = frozenset(MAIN + " " + t for t in (
    "worksheet", "sheetPr", "outlinePr", "pageSetUpPr", "tabColor", "dimension", "sheetViews", "sheetView",
    "selection", "pane", "sheetFormatPr", "cols", "col", "pageMargins", "pageSetup", "printOptions"))


class Unusual(Exception):
    """The lean reader does not read this file: read it with the reference reader."""


def _parser(start, end=None, chars=None):
    """An expat parser with namespaces ("uri name") that refuses any document type declaration."""
    p = expat.ParserCreate(namespace_separator=" ")
    p.SetParamEntityParsing(expat.XML_PARAM_ENTITY_PARSING_NEVER)

    def doctype(*_):
        raise Unusual("a document type declaration")

    p.StartDoctypeDeclHandler = doctype
    p.EntityDeclHandler = doctype
    p.StartElementHandler = start
    if end is not None:
        p.EndElementHandler = end
    if chars is not None:
        p.CharacterDataHandler = chars
    p.buffer_text = True
    return p


def _parse(p, src: bytes, final: bool = True) -> None:
    try:
        p.Parse(src, final)
    except expat.ExpatError as exc:
        raise Unusual(f"XML: {exc}") from None


def _read(z: zipfile.ZipFile, name: str) -> bytes:
    try:
        return z.read(name)
    except KeyError:
        raise Unusual(f"no part {name}") from None


def _well_formed(src: bytes) -> None:
    """Parse a part only to know that it is well-formed XML without a document type declaration (parts the
    reference reader parses and the assay reader never uses: document properties)."""
    _parse(_parser(lambda *_: None), src)


def _manifest(src: bytes) -> dict[str, str]:
    """The package manifest's overrides: part name (without the leading '/') -> content type."""
    out: dict[str, str] = {}

    def start(tag, attrs):
        if tag == CONTENT_TYPES + " Override":
            out[attrs.get("PartName", "").lstrip("/")] = attrs.get("ContentType", "")
        elif tag not in (CONTENT_TYPES + " Types", CONTENT_TYPES + " Default"):
            raise Unusual(f"manifest element {tag}")

    _parse(_parser(start), src)
    return out


def _sheet_list(src: bytes) -> list[tuple[str, str]]:
    """(sheet name, relationship id) of the workbook's sheets, in order."""
    out: list[tuple[str, str]] = []

    def start(tag, attrs):
        if tag not in _WORKBOOK_ELEMENTS:  # a defined name among them
            raise Unusual(f"workbook element {tag}")
        if tag == MAIN + " sheet":
            out.append((attrs.get("name", ""), attrs.get(REL + " id", "")))

    _parse(_parser(start), src)
    return out


def _relationships(src: bytes, part: str) -> dict[str, tuple[str, str]]:
    """Relationship id -> (type, target part) as openpyxl resolves targets (absolute, or relative to the folder
    above the relationships part's own)."""
    parent = posixpath.split(posixpath.dirname(part))[0]
    out: dict[str, tuple[str, str]] = {}

    def start(tag, attrs):
        if tag == PKG_REL + " Relationship":
            target = attrs.get("Target", "")
            if attrs.get("TargetMode") == "External":
                raise Unusual("an external relationship")
            target = target[1:] if target.startswith("/") else posixpath.normpath(posixpath.join(parent, target))
            out[attrs.get("Id", "")] = (attrs.get("Type", ""), target)
        elif tag != PKG_REL + " Relationships":
            raise Unusual(f"relationship element {tag}")

    _parse(_parser(start), src)
    return out


class _TextCollector:
    """Text of an ``<si>`` or ``<is>`` element as openpyxl's ``Text.content``: its own ``<t>`` and the ``<t>`` of
    its runs ``<r>``, not the phonetic runs ``<rPh>``."""

    T, R, RPH = MAIN + " t", MAIN + " r", MAIN + " rPh"

    def __init__(self):
        self.parts: list[str] = []
        self.path: list[str] = []
        self.taking = False
        self.plain = False

    def start(self, tag):
        self.path.append(tag)  # below the <si> or <is> element
        if self.path == [self.T]:
            if self.plain:
                raise Unusual("two plain texts in one string")
            self.plain = True
        self.taking = self.path == [self.T] or self.path == [self.R, self.T]

    def end(self):
        self.path.pop()
        self.taking = False

    def text(self) -> str | None:
        return "".join(self.parts) if self.parts else None


def _shared_strings(src: bytes) -> list[str]:
    out: list[str] = []
    state: dict = {"col": None}

    def start(tag, attrs):
        col = state["col"]
        if tag == MAIN + " si":
            state["col"] = _TextCollector()
        elif col is not None:
            col.start(tag)
        elif tag != MAIN + " sst":
            raise Unusual(f"shared-string element {tag}")

    def end(tag):
        col = state["col"]
        if col is None:
            return
        if tag == MAIN + " si" and not col.path:
            out.append((col.text() or "").replace("x005F_", ""))
            state["col"] = None
        else:
            col.end()

    def chars(data):
        col = state["col"]
        if col is not None and col.taking:
            col.parts.append(data)

    _parse(_parser(start, end, chars), src)
    return out


class LeanSheet:
    """One worksheet: its rows as openpyxl's sheet parser yields them (:meth:`rows`)."""

    def __init__(self, book: "LeanBook", title: str, part: str):
        self.parent, self.title, self.part = book, title, part

    def rows(self):
        """The sheet's ``<row>`` elements in document order (an iterator): ``(row number, cells)``, each cell a
        dict with ``column`` (1-based) and ``value`` (int, float, bool, str or None) as openpyxl gives them."""
        return _sheet_rows(_read(self.parent.zip, self.part), self.parent.shared_strings, self.parent.date_styles)


def _column(letters: str, cache: dict = {}) -> int:  # noqa: B006 - a cache of column letters shared by calls
    n = cache.get(letters)
    if n is None:
        n = 0
        for ch in letters.upper():
            n = n * 26 + ord(ch) - 64
        cache[letters] = n
    return n


def _cast_number(text: str):
    """openpyxl's reading of a numeric cell's text: a float if it has '.', 'E' or 'e', else an int."""
    return float(text) if ("." in text or "E" in text or "e" in text) else int(text)


def _sheet_rows(src: bytes, strings: list[str], date_styles: frozenset):
    C, V, F, IS, ROW, DATA = (MAIN + " " + t for t in ("c", "v", "f", "is", "row", "sheetData"))
    rows: list = []
    st = {"where": 0, "row": 0, "col": 0, "cells": None, "cell": None, "v": None, "text": None, "depth": 0}
    # where: 0 outside sheetData, 1 in it, 2 in a row, 3 in a cell, 4 in a cell's <v>, 5 in its <is>

    def start(tag, attrs):
        w = st["where"]
        if w == 0:
            if tag == DATA:
                st["where"] = 1
            elif tag not in _SHEET_OUTSIDE_DATA:
                raise Unusual(f"worksheet element {tag}")
        elif w == 1:
            if tag != ROW:
                raise Unusual(f"{tag} in sheetData")
            r = attrs.get("r")
            if r is None:
                st["row"] += 1
            else:
                try:
                    st["row"] = int(r)
                except ValueError:
                    raise Unusual(f"row number {r!r}") from None
            st["col"], st["cells"], st["where"] = 0, [], 2
        elif w == 2:
            if tag != C:
                raise Unusual(f"{tag} in a row")
            ref = attrs.get("r")
            if ref:
                m = _COORD.match(ref)
                if m is None:
                    raise Unusual(f"cell reference {ref!r}")
                st["col"] = _column(m.group(1))
            else:
                st["col"] += 1
            s = attrs.get("s")
            try:
                st["cell"] = (attrs.get("t", "n"), int(s) if s else 0)
            except ValueError:
                raise Unusual(f"style {s!r}") from None
            st["v"], st["text"], st["where"] = None, None, 3
        elif w == 3:
            if tag == V:
                if st["v"] is not None:
                    raise Unusual("two values in a cell")
                st["v"], st["where"] = [], 4
            elif tag == F:
                raise Unusual("a formula cell")
            elif tag == IS:
                if st["text"] is not None:
                    raise Unusual("two inline strings in a cell")
                st["text"], st["where"], st["depth"] = _TextCollector(), 5, 0
            else:  # openpyxl ignores other children of a cell (extLst)
                st["where"], st["depth"] = 6, 1
        elif w == 4:
            raise Unusual(f"{tag} in a cell value")
        elif w == 5:
            if tag == F:
                raise Unusual("a formula cell")
            st["text"].start(tag)
            st["depth"] += 1
        else:
            if tag == F:
                raise Unusual("a formula cell")
            st["depth"] += 1

    def end(tag):
        w = st["where"]
        if w == 4:
            st["where"] = 3
        elif w == 5:
            if st["depth"] == 0:
                st["where"] = 3
            else:
                st["text"].end()
                st["depth"] -= 1
        elif w == 6:
            st["depth"] -= 1
            if st["depth"] == 0:
                st["where"] = 3
        elif w == 3:
            st["cells"].append({"column": st["col"], "value": _value(st)})
            st["where"] = 2
        elif w == 2:
            rows.append((st["row"], st["cells"]))
            st["where"] = 1
        elif w == 1:
            st["where"] = 0

    def chars(data):
        w = st["where"]
        if w == 4:
            st["v"].append(data)
        elif w == 5 and st["text"].taking:
            st["text"].parts.append(data)

    def _value(s):
        kind, style = s["cell"]
        if kind == "inlineStr":
            col = s["text"]
            return None if col is None else (col.text() or "")
        v = "".join(s["v"]) if s["v"] is not None else None
        if not v:
            return None
        if kind == "n":
            if style in date_styles:
                raise Unusual("a date-styled number")
            try:
                return _cast_number(v)
            except ValueError:
                raise Unusual(f"number {v!r}") from None
        if kind == "s":
            try:
                return strings[int(v)]
            except (ValueError, IndexError):
                raise Unusual(f"shared string {v!r}") from None
        if kind == "b":
            try:
                return bool(int(v))
            except ValueError:
                raise Unusual(f"boolean {v!r}") from None
        if kind == "d":
            raise Unusual("a date cell")
        return v  # 'str', 'e' and any other type: the text as openpyxl keeps it

    p = _parser(start, end, chars)
    for k in range(0, max(len(src), 1), _CHUNK):  # rows handed on as they are parsed: the caller's limits on
        _parse(p, src[k:k + _CHUNK], k + _CHUNK >= len(src))  # rows and cells stop a huge sheet early
        yield from rows
        rows.clear()


_CHUNK = 1 << 16
"""Bytes of sheet XML parsed between hand-ons of rows."""


class LeanBook:
    """A workbook's sheet list and shared strings, its sheets read on demand (:class:`LeanSheet`)."""

    def __init__(self, z: zipfile.ZipFile, date_styles: frozenset):
        self.zip, self.date_styles = z, date_styles
        names = set(z.namelist())
        manifest = _manifest(_read(z, "[Content_Types].xml"))
        sheets = _sheet_list(_read(z, "xl/workbook.xml"))
        rels = _relationships(_read(z, "xl/_rels/workbook.xml.rels"), "xl/_rels/workbook.xml.rels")
        for part in ("docProps/core.xml", "docProps/custom.xml"):
            if part in names:
                _well_formed(z.read(part))
        strings = [p for p, t in manifest.items() if t == SHARED_STRINGS_TYPE]
        if len(strings) > 1:
            raise Unusual("two shared-string tables")
        self.shared_strings = _shared_strings(_read(z, strings[0])) if strings else []
        self._sheets: dict[str, LeanSheet] = {}
        for title, rid in sheets:
            if not title or len(title) > 31 or _SHEET_TITLE_BAD.search(title) or title in self._sheets:
                raise Unusual(f"sheet name {title!r}")
            kind, part = rels.get(rid, ("", ""))
            if kind != WORKSHEET_REL or part not in names:
                raise Unusual(f"sheet {title!r}: relationship {rid!r}")
            self._sheets[title] = LeanSheet(self, title, part)
        self.sheetnames = list(self._sheets)

    def __getitem__(self, name: str) -> LeanSheet:
        return self._sheets[name]

    def close(self) -> None:
        self.zip.close()
