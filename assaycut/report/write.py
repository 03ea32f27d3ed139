"""Write a yield report: every file is rendered in memory first, then placed atomically, so a report is
whole or absent."""

from __future__ import annotations

import csv
import io
import re
from pathlib import Path

from ..files import place_set, safe_text
from .precision import rounded
from .tables import (
    LONG_COLUMNS,
    display_cuts,
    flat_cut_rows,
    label_for,
    long_rows,
    markdown_summary,
    quality_names,
)


def slug(name: str) -> str:
    """A file-name-safe version of a crude name."""
    s = re.sub(r"[^A-Za-z0-9._-]+", "_", name.strip()).strip("._")
    return s[:60] or "assay"


def csv_text(headers: list[str], rows: list[list], escaped: bool = False) -> str:
    """CSV text with text cells escaped against formula injection; NaN written as empty.  With ``escaped``
    the caller guarantees that the rows' texts are already escaped and hold no NaN (the long tables), and the
    rows are written as they are."""
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow([safe_text(h) for h in headers])
    return buf.getvalue() + csv_body(rows, escaped)


def csv_body(rows: list[list], escaped: bool = False) -> str:
    """The rows of :func:`csv_text` without its header line (texts joined from several parts of a batch give
    the same file)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    if escaped:
        w.writerows(rows)
        return buf.getvalue()
    for r in rows:
        out = []
        for v in r:
            if isinstance(v, float) and v != v:
                out.append("")
            elif isinstance(v, str):
                out.append(safe_text(v))
            else:
                out.append(v)
        w.writerow(out)
    return buf.getvalue()


def png_bytes(plot, first, *rest, **kwargs) -> bytes:
    """PNG bytes of ``plot(first, target, *rest, **kwargs)``, a plot function that draws into ``target``."""
    buf = io.BytesIO()
    plot(first, buf, *rest, **kwargs)
    return buf.getvalue()


PLOT_SETS = {"none": (), "main": ("tbp", "yields", "properties", "products"),
             "all": ("tbp", "yields", "properties", "qualities", "products")}
"""The plots of a yield report by the ``--plots`` choice: 'main' (the default) leaves out the qualities figure,
which takes as long to draw as the others together; 'all' adds it; 'none' writes the tables only."""


def write_yield_report(result, outdir: str | Path, inputs: tuple[str, ...] = (), unit: str = "C",
                       plots: str = "main") -> list[Path]:
    """Write the full yield report of one assay into ``outdir``.

    Files: ``<crude>_yields.xlsx`` (summary, cuts, qualities, curve, curve wt basis, limits, notes),
    ``<crude>_cuts.csv``, ``<crude>_long.csv`` (one row per value), ``<crude>_summary.md``, and the plots of
    :data:`PLOT_SETS` [``plots``]: ``<crude>_tbp.png``, ``<crude>_yields.png``, ``<crude>_properties.png``,
    ``<crude>_qualities.png`` (when the cuts have qualities beyond gravity and sulfur), and with real-column
    overlaps ``<crude>_products.png``.  A plot the set does not draw is removed from ``outdir`` if an earlier run
    left it.  With ``unit`` 'F' the sheets, both CSVs and the Markdown summary give temperatures in °F; the
    plots stay in °C.

    Returns
    -------
    list of pathlib.Path
    """
    from . import plots as figures
    from .xlsx import yield_workbook

    if plots not in PLOT_SETS:
        raise ValueError(f"plots must be one of {', '.join(PLOT_SETS)}; got {plots!r}")
    outdir = Path(outdir)
    base = slug(result.assay.name)
    files: dict[str, bytes] = {}
    buf = io.BytesIO()
    yield_workbook(result, unit).save(buf)
    files[f"{base}_yields.xlsx"] = buf.getvalue()
    cuts = display_cuts(result.cuts, unit)
    names, rows = flat_cut_rows(cuts)
    rows = [[rounded(n, v) for n, v in zip(names, r)] for r in rows]  # as shown; the long CSV keeps every digit
    files[f"{base}_cuts.csv"] = csv_text([label_for(n) for n in names], rows).encode("utf-8")
    files[f"{base}_long.csv"] = csv_text(LONG_COLUMNS, long_rows(cuts, result.assay.name)).encode("utf-8")
    files[f"{base}_summary.md"] = markdown_summary(result, unit).encode("utf-8")
    wanted = PLOT_SETS[plots]
    drawn = {"tbp": figures.plot_tbp, "yields": figures.plot_yields, "properties": figures.plot_properties,
             "qualities": figures.plot_qualities, "products": figures.plot_products}
    for name, plot in drawn.items():
        if name not in wanted or (name == "qualities" and not quality_names(result.cuts)) \
                or (name == "products" and result.products is None):
            continue
        files[f"{base}_{name}.png"] = png_bytes(plot, result)
    return place_set(outdir, files, inputs, tuple(f"{base}_{name}.png" for name in drawn))


def write_library_summary(results, cs, folder: Path, inputs) -> list[Path]:
    """Library summary (xlsx and CSV), one row per assay."""
    from ..cutting.library_engine import summary_columns, summary_rows
    from .xlsx import fast_table_workbook

    columns = summary_columns(cs)
    if all(hasattr(r, "row") for r in results):  # summary results made in the workers
        rows = [r.row for r in results]
        long_text = "".join(r.long_text for r in results)
    else:
        rows = summary_rows([r.assay for r in results], [r.model for r in results], cs)
        long_text = csv_body([row for r in results for row in long_rows(r.cuts, r.assay.name, escaped=True)],
                             escaped=True)
    heads = [{"crude": "Crude", "source": "Source file", "sha256": "sha256", "api": "API gravity [°API]",
              "sulfur_wt_pct": "Sulfur [wt %]", "extrapolated_cuts": "Cuts using the extension"}.get(c, c)
             for c in columns]
    from ..cutting.library_engine import SUMMARY_QUALITIES

    keys = [None, None, None, "api", "sulfur_wt_pct"] + [k for _ in cs.reported()[0] for k, _ in SUMMARY_QUALITIES] \
        + [None]
    from ..yields import CAUTIONS

    notes = [["Caution", c] for c in CAUTIONS] + [["Cut set", cs.label], ["Assays", str(len(rows))]]
    book = fast_table_workbook([("library", heads, rows, keys, [22, 40, 20] + [12] * (len(columns) - 4) + [30]),
                                ("notes", ["Topic", "Text"], notes, None, [20, 120])], "Library summary")
    files = {"library_summary.xlsx": book,
             "library_summary.csv": csv_text(heads, rows).encode("utf-8"),
             "library_long.csv": (csv_text(LONG_COLUMNS, []) + long_text).encode("utf-8")}
    return place_set(folder, files, tuple(inputs))
