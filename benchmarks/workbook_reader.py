"""The workbook reader side by side: the per-workbook work of a library-summary batch (read, model, cut, the
summary row) with the lean reader and with openpyxl, alternating in one process so that both see the same
machine speed.

    python benchmarks/workbook_reader.py

Prints the milliseconds per workbook of each reader (4 rounds of 160 workbooks) and, as its last line, one
JSON object with ``lean_ms``, ``reference_ms`` (medians) and ``reference_vs_lean``.
"""

from __future__ import annotations

import json
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import assaycut.io.workbook as workbook  # noqa: E402
from assaycut.cli.batch import YieldJob, run_chunk  # noqa: E402
from assaycut.cutting.cutset import default_cut_set  # noqa: E402
from assaycut.io.tomlfiles import demo_assay_paths  # noqa: E402
from assaycut.studies.uncertainty import Sigmas  # noqa: E402


def main() -> None:
    demos = demo_assay_paths()
    job = YieldJob(default_cut_set(), [], "daubert-1994", (None,) * 4, None, frames=False, summary=True,
                   sigmas=Sigmas())
    paths = [demos[i % len(demos)] for i in range(16)]
    readers = {"lean": workbook.read_workbook, "reference": workbook.read_workbook_reference}
    times: dict[str, list[float]] = {k: [] for k in readers}
    run_chunk(paths, job)  # warm: imports, and the stylesheets remembered
    try:
        for _ in range(4):
            for name, fn in readers.items():
                workbook.read_workbook = fn
                t0 = time.perf_counter()
                for _ in range(10):
                    run_chunk(paths, job)
                times[name].append((time.perf_counter() - t0) / (10 * len(paths)) * 1e3)
    finally:
        workbook.read_workbook = readers["lean"]
    for name, ts in times.items():
        print(f"  {name:10s} " + " ".join(f"{t:6.2f}" for t in ts) + "  ms per workbook")
    lean, ref = statistics.median(times["lean"]), statistics.median(times["reference"])
    print(json.dumps({"lean_ms": round(lean, 3), "reference_ms": round(ref, 3), "reference_vs_lean": round(ref / lean, 3)}))


if __name__ == "__main__":
    main()
