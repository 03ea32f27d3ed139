"""The benchmark script runs end to end in smoke size and prints its JSON figures last.  Never judged on speed."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


@pytest.mark.benchmark_smoke
def test_benchmark_smoke_runs():
    out = subprocess.run([sys.executable, str(ROOT / "benchmarks" / "run.py"), "--smoke"], capture_output=True,
                         text=True, timeout=600)
    assert out.returncode == 0, out.stderr
    figures = json.loads(out.stdout.strip().splitlines()[-1])
    assert set(figures) >= {"batched_vs_alone", "library_vs_naive", "sweep_ms", "help_vs_bare", "scaling_10k_vs_1k",
                            "peak_mb", "explore_update_ms", "json_startup_s", "json_per_assay_ms"}
    assert all(isinstance(figures[k], (int, float)) for k in figures if k != "raw")
