"""Behaviour snapshot: the JSON and CSV outputs of the demo crudes, for comparing two versions of assaycut.

    python benchmarks/snapshot.py DIR            # write the snapshot into DIR
    python benchmarks/snapshot.py DIR --compare OTHER_DIR [--rtol 1e-9]

It runs the CLI (`yields`, `compare --prices`, `shift`, `sweep`, `check`, `convert`, `optimize`, `blend`)
on every demo crude, keeps stdout of the `--json` runs and the CSV files of the reports, and removes what
legitimately changes between versions (the version string, file sha256 values and temporary paths).  With
`--compare`, it lists every file that differs and exits 1 when any does.  A refactoring that changes no
behaviour leaves the snapshot identical.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "assays_demo"
CRUDES = ["selkie_light", "brannock_blend", "tarn_heavy"]
PRICES = DEMO / "prices_demo.toml"


def _scrub(text: str, tmp: str) -> str:
    """Remove what changes between versions or runs: version strings, sha256 values, temporary paths and the
    checkout's own path."""
    text = text.replace(tmp, "<tmp>").replace(str(ROOT), "<root>")
    text = re.sub(r'("version"\s*:\s*)"[^"]*"', r'\1"<version>"', text)
    text = re.sub(r"\b[0-9a-f]{64}\b", "<sha256>", text)
    return text


def _run(args: list[str], cwd: str) -> tuple[int, str]:
    env = dict(os.environ, PYTHONHASHSEED="0")
    p = subprocess.run([sys.executable, "-m", "assaycut", *args], cwd=cwd, capture_output=True, text=True,
                       env=env)
    return p.returncode, p.stdout + ("\n--- stderr ---\n" + p.stderr if p.stderr else "")


def cases() -> list[tuple[str, list[str]]]:
    """(snapshot name, CLI arguments) for every case; `{out}` stands for a fresh report folder."""
    out: list[tuple[str, list[str]]] = []
    for c in CRUDES:
        a = str(DEMO / f"{c}.xlsx")
        out += [
            (f"yields_{c}", ["yields", a, "--json"]),
            (f"yields_files_{c}", ["yields", a, "--out", "{out}"]),
            (f"yields_end_{c}", ["yields", a, "--json", "--end", "diesel=350", "--end", "kerosene=240"]),
            (f"yields_overlap_{c}", ["yields", a, "--json", "--overlap", "kerosene=25", "--overlap", "diesel=30"]),
            (f"yields_uncertainty_{c}", ["yields", a, "--json", "--uncertainty", "50"]),
            (f"shift_{c}", ["shift", a, "--end", "diesel=360", "--json"]),
            (f"shift_text_{c}", ["shift", a, "--end", "diesel=360", "--end", "kerosene=220"]),
            (f"sweep_{c}", ["sweep", a, "--end", "kerosene", "--from", "200", "--to", "260", "--step", "10",
                            "--json"]),
            (f"sweep_files_{c}", ["sweep", a, "--end", "diesel", "--from", "320", "--to", "370", "--out", "{out}"]),
            (f"check_{c}", ["check", a, "--json"]),
            (f"optimize_max_{c}", ["optimize", a, "--maximize", "diesel", "--json"]),
        ]
    allc = [str(DEMO / f"{c}.xlsx") for c in CRUDES]
    out += [
        ("compare_prices", ["compare", *allc, "--prices", str(PRICES), "--json"]),
        ("compare_prices_files", ["compare", *allc, "--prices", str(PRICES), "--out", "{out}"]),
        ("compare_plain", ["compare", *allc, "--json"]),
        ("yields_library", ["yields", *allc, "--out", "{out}", "--summary-only"]),
        ("yields_library_json", ["yields", *allc, "--json"]),
        ("optimize_prices", ["optimize", allc[0], "--prices", str(PRICES), "--json"]),
        ("blend_optimize", ["blend", "--optimize", *allc, "--prices", str(PRICES), "--api-min", "30",
                            "--sulfur-max", "1.5", "--out", "{out}/blend.xlsx"]),
        ("blend_vol", ["blend", f"{allc[0]}=60", f"{allc[2]}=40", "--basis", "vol", "--out", "{out}/b.xlsx"]),
        ("convert_d86", ["convert", "0=150", "10=176.7", "30=190", "50=206.7", "70=225", "90=250", "95=262",
                         "--json"]),
        ("convert_d86_riazi", ["convert", "10=176.7", "30=190", "50=206.7", "70=225", "90=250",
                               "--method", "riazi-daubert-1986", "--json"]),
        ("convert_d2887", ["convert", "10=150", "30=200", "50=250", "70=300", "90=350", "--from", "D2887",
                           "--to", "D86", "--json"]),
        ("convert_d1160", ["convert", "10=200", "50=300", "90=400", "--from", "D1160", "--to", "AET",
                           "--pressure-mmhg", "10", "--json"]),
    ]
    return out


def write_snapshot(target: Path) -> None:
    target.mkdir(parents=True, exist_ok=True)
    for name, args in cases():
        with tempfile.TemporaryDirectory() as tmp:
            outdir = os.path.join(tmp, "out")
            args = [x.replace("{out}", outdir) for x in args]
            rc, text = _run(args, tmp)
            (target / f"{name}.txt").write_text(f"exit {rc}\n" + _scrub(text, tmp), encoding="utf-8")
            if os.path.isdir(outdir):
                for f in sorted(Path(outdir).rglob("*")):
                    if f.suffix in (".csv", ".md", ".json"):
                        rel = f.relative_to(outdir).as_posix().replace("/", "__")
                        (target / f"{name}__{rel}").write_text(_scrub(f.read_text(encoding="utf-8"), tmp),
                                                             encoding="utf-8")
                    elif f.suffix == ".xlsx":
                        rel = f.relative_to(outdir).as_posix().replace("/", "__")
                        (target / f"{name}__{rel}.cells.txt").write_text(_scrub(_xlsx_cells(f), tmp),
                                                                         encoding="utf-8")


def _xlsx_cells(path: Path) -> str:
    """Every sheet's cell values as text, for comparing workbooks whose zip bytes differ run to run."""
    import openpyxl

    wb = openpyxl.load_workbook(path, read_only=True)
    lines = []
    for ws in wb.worksheets:
        lines.append(f"## {ws.title}")
        for row in ws.iter_rows(values_only=True):
            lines.append(json.dumps([None if v is None else str(v) for v in row], ensure_ascii=False))
    wb.close()
    return "\n".join(lines) + "\n"


_NUMBER = re.compile(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?")


def _same(x: str, y: str, rtol: float) -> tuple[bool, float]:
    """Whether two snapshot texts agree: the same text between numbers and every number within ``rtol``
    relative (exactly equal when rtol is 0); and the largest relative difference of a number."""
    if x == y:
        return True, 0.0
    nx, ny = _NUMBER.findall(x), _NUMBER.findall(y)
    if rtol == 0.0 or _NUMBER.sub("#", x) != _NUMBER.sub("#", y) or len(nx) != len(ny):
        return False, float("inf")
    worst = 0.0
    for u, v in zip(nx, ny):
        if u != v:
            fu, fv = float(u), float(v)
            worst = max(worst, abs(fu - fv) / max(abs(fu), abs(fv), 1e-300))
    return worst <= rtol, worst


def compare(a: Path, b: Path, rtol: float = 0.0) -> int:
    names = sorted({p.name for p in a.iterdir()} | {p.name for p in b.iterdir()})
    bad, near = [], []
    for n in names:
        if not (a / n).exists() or not (b / n).exists():
            bad.append((n, float("inf")))
            continue
        ok, worst = _same((a / n).read_text(encoding="utf-8"), (b / n).read_text(encoding="utf-8"), rtol)
        (near if ok and worst > 0 else bad if not ok else []).append((n, worst))
    for n, w in bad:
        print(f"differs: {n}" + (f" (largest relative difference {w:.3g})" if w != float("inf") else ""))
    for n, w in near:
        print(f"within {rtol:g}: {n} (largest relative difference {w:.3g})")
    print(f"{len(names) - len(bad) - len(near)} of {len(names)} snapshot files identical, {len(near)} within "
          f"the tolerance")
    return 1 if bad else 0


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("dir", type=Path)
    ap.add_argument("--compare", type=Path, metavar="OTHER_DIR", help="compare DIR with a snapshot in OTHER_DIR")
    ap.add_argument("--rtol", type=float, default=0.0,
                    help="with --compare: numbers may differ by this much, relative (default 0: identical)")
    ns = ap.parse_args()
    if ns.compare is None:
        if ns.dir.exists():
            shutil.rmtree(ns.dir)
        write_snapshot(ns.dir)
        print(f"snapshot written to {ns.dir}")
        return 0
    return compare(ns.dir, ns.compare, ns.rtol)


if __name__ == "__main__":
    sys.exit(main())
