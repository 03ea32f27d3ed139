"""Build the demo assay workbooks from their plain-text TOML sources.

    python assays_demo/build.py

Writes ``assays_demo/<name>.xlsx`` (for people to open) and the same workbook into the package
(``assaycut/data/``), so that the demo is found after a plain ``pip install .`` from any folder.
The crudes, fields and refinery of the demo are invented: Kestrel Bay refinery on the Varrow coast is
offered three crudes of clearly different character.
"""

from __future__ import annotations

import shutil
import sys
import tomllib
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from assaycut.io.assaywriter import write_assay_workbook  # noqa: E402
from assaycut.model.assay import Assay, CurveData, LightEnds, NarrowCuts  # noqa: E402
from assaycut.units import api_to_sg  # noqa: E402

ORDER = ["selkie_light", "brannock_blend", "tarn_heavy"]
"""Demo assays in order; the first is the default of every command."""


def assay_from_toml(path: Path) -> Assay:
    """An Assay from a demo TOML source (temperatures in °C, percents of whole crude)."""
    src = tomllib.loads(path.read_text(encoding="utf-8"))
    crude = src["crude"]
    curves = []
    for key in ("distillation", "vacuum_distillation"):
        if key in src:
            d = src[key]
            pts = np.array(d["points"], dtype=float)
            curves.append(CurveData(d["method"], d.get("basis", "vol"), pts[:, 0], pts[:, 1],
                                    d.get("pressure_mmhg"), f"{path.name} [{key}]"))
    cuts = src.get("narrow_cut", [])
    col = lambda k: np.array([c.get(k, np.nan) for c in cuts], dtype=float)  # noqa: E731
    standard = ("start_c", "end_c", "vol_pct", "wt_pct", "sg_60f", "sulfur_wt_pct")
    extra_names = list(dict.fromkeys(k for c in cuts for k in c if k not in standard))
    narrow = NarrowCuts(col("start_c"), col("end_c"), col("vol_pct"), col("wt_pct"), col("sg_60f"),
                        col("sulfur_wt_pct"), {k: col(k) for k in extra_names})
    le = dict(src.get("light_ends", {}))
    basis = le.pop("basis", "wt")
    extras = {k: v for k, v in crude.items() if k not in ("name", "origin", "api_gravity", "sulfur_wt_pct", "notes")}
    return Assay(name=crude["name"], origin=crude["origin"], sg=api_to_sg(crude["api_gravity"]),
                 sulfur_wt_pct=crude["sulfur_wt_pct"], curves=curves, narrow_cuts=narrow,
                 light_ends=LightEnds(le, basis), extras=extras, notes=[crude["notes"]])


FIXED_TIME = "2026-01-01T00:00:00Z"
"""The creation and modification time written into every demo workbook, so that a build is byte for byte
the same on every run and machine (and the demo's sha256 with it)."""


def deterministic(path: Path) -> None:
    """Rewrite a workbook with fixed document times and zip entry times (1980-01-01, the zip format's
    earliest), keeping its parts and their order."""
    import re
    import zipfile

    with zipfile.ZipFile(path) as z:
        parts = [(i.filename, z.read(i.filename)) for i in z.infolist()]
    stamp = re.compile(rb"(<dcterms:(created|modified)[^>]*>)[^<]*(</dcterms:\2>)")
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for name, data in parts:
            if name == "docProps/core.xml":
                data = stamp.sub(lambda m: m.group(1) + FIXED_TIME.encode() + m.group(3), data)
            z.writestr(zipfile.ZipInfo(name, date_time=(1980, 1, 1, 0, 0, 0)), data,
                       compress_type=zipfile.ZIP_DEFLATED)


def main(out: Path = HERE, package: Path | None = HERE.parent / "assaycut" / "data") -> None:
    """Build the demo workbooks into ``out`` (and copy them into ``package``, unless None)."""
    for stem in ORDER:
        assay = assay_from_toml(HERE / f"{stem}.toml")
        book = Path(out) / f"{stem}.xlsx"
        write_assay_workbook(assay, str(book))
        deterministic(book)
        if package is not None:
            shutil.copyfile(book, package / book.name)
        print(f"wrote {book}" + (f" and {package / book.name}" if package is not None else ""))


if __name__ == "__main__":
    main()
