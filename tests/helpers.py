"""Helpers shared by the tests: small assay workbooks built on the fly, the CLI error check, file digests.

The numbers in these workbooks are invented test inputs, never expected values of a correctness check.
"""

from __future__ import annotations

import hashlib
import re
import signal
from pathlib import Path

from typer.testing import CliRunner

DEMO_PRICES = Path(__file__).resolve().parent.parent / "assays_demo" / "prices_demo.toml"
"""The invented demo price file."""

CRUDE_ROWS = [["Whole-crude data (test)"], ["field", "value"], ["name", "Test Crude"],
              ["origin", "Test field (fictional)"], ["api_gravity", 33.0], ["sulfur_wt_pct", 1.1]]
CURVE_ROWS = [["Main curve (test)"], ["method", "TBP"], ["pressure_mmhg", None], [], ["vol_pct", "temp_c"],
              [2.0, 15.0], [8.0, 70.0], [20.0, 150.0], [35.0, 230.0], [55.0, 340.0], [75.0, 470.0], [82.0, 540.0]]
CUT_ROWS = [["Narrow cuts (test)"], ["start_c", "end_c", "vol_pct", "wt_pct", "sg_60f", "sulfur_wt_pct"],
            [None, 15.0, 2.0, 1.3, 0.56, 0.0], [15.0, 70.0, 6.0, 4.9, 0.70, 0.02], [70.0, 150.0, 12.0, 10.6, 0.76, 0.08],
            [150.0, 230.0, 15.0, 14.0, 0.80, 0.3], [230.0, 340.0, 20.0, 19.6, 0.845, 0.9],
            [340.0, 470.0, 20.0, 20.9, 0.90, 1.6], [470.0, None, 25.0, 28.7, 0.98, 2.6]]
LIGHT_ROWS = [["Light ends (test)"], ["component", "wt_pct"], ["C3", 0.3], ["iC4", 0.25], ["nC4", 0.7]]


def ctrl_c_as_at_a_terminal() -> None:
    """``preexec_fn`` of a child run that a test interrupts with SIGINT: Ctrl-C handled as at a terminal.

    A command started in the background by a shell (``pytest ... &``, a CI runner's job) inherits SIGINT
    ignored (POSIX shell, asynchronous lists), and Python turns SIGINT into KeyboardInterrupt only when its
    parent left the signal alone (Python documentation, ``signal`` module: "SIGINT is translated into a
    KeyboardInterrupt exception if the parent process has not changed it"); such a child rightly goes on
    after SIGINT, so a test of Ctrl-C restores the default first."""
    signal.signal(signal.SIGINT, signal.SIG_DFL)


def write_book(path: Path, sheets: dict[str, list[list]]) -> Path:
    """Write a workbook with the given sheets (rows as lists); returns the path."""
    import openpyxl

    wb = openpyxl.Workbook()
    wb.remove(wb.active)
    for name, rows in sheets.items():
        ws = wb.create_sheet(name)
        for r in rows:
            ws.append(r)
    wb.save(path)
    return path


def base_sheets() -> dict[str, list[list]]:
    """The sheets of a valid test assay (deep-copied, free to mutate)."""
    import copy

    return copy.deepcopy({"crude": CRUDE_ROWS, "distillation": CURVE_ROWS, "narrow cuts": CUT_ROWS,
                          "light ends": LIGHT_ROWS})


def sha256(path) -> str:
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()


def cli_app():
    """The CLI's Typer app (imported when a test needs it)."""
    from assaycut.cli import app

    return app


def cli_error(args, match):
    """Run the CLI; assert exit code 2, one error line on stderr matching ``match``, no traceback."""
    r = CliRunner().invoke(cli_app(), args)
    assert r.exit_code == 2, (r.exit_code, r.stdout, r.stderr)
    lines = [x for x in r.stderr.splitlines() if x.strip()]
    assert len(lines) == 1, r.stderr
    assert "Traceback" not in r.stderr + r.stdout
    assert re.search(match, lines[0]), lines[0]
    return lines[0]


def cuts_of(assay):
    """The cut table of an assay at the default cut points, indexed by cut name."""
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.yields import run_yields

    return run_yields(assay, default_cut_set()).cuts.frame().set_index("name")


def reference_inverse(s, yq):
    """The reference inverse of one spline: hermite_solve (bisection-guarded Newton) on the segment found by a
    search of the node values, left end of flat steps; what the fast inverse is held to."""
    import numpy as np

    from assaycut.methods.pchip import hermite_solve

    raw = np.asarray(yq, dtype=float)
    x, y, d = s.x, s.y, s.d
    q = np.clip(np.nan_to_num(raw, nan=y[0]), y[0], y[-1])
    i = np.clip(np.searchsorted(y, q, side="left") - 1, 0, x.size - 2)
    h = x[i + 1] - x[i]
    t = hermite_solve(y[i], y[i + 1], h * d[i], h * d[i + 1], q)
    out = np.where(q == y[i + 1], x[i + 1], x[i] + t * h)
    return np.where(np.isnan(raw), np.nan, np.where(q == y[i], x[i], out))
