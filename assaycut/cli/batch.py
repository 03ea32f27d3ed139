"""Running the yield job over many assay files: serially or in worker processes, with a progress bar, a bad
file reported and skipped, and a library summary.  Orchestration only: reading, the core and the report
writers do the work."""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from ..errors import AssaycutError
from .common import ProgressBar, progress_bar

PARALLEL_MIN = 50
"""Batches of at least this many assays use worker processes (when the machine has more than one core)."""
PROGRESS_MIN = 5
"""Batches of more than this many assays show a progress bar (only when stderr is a terminal)."""


@dataclass(frozen=True)
class YieldJob:
    """What to do with each assay file of a batch."""

    cut_set: object
    limits: list
    method: str = "daubert-1994"
    gravity: tuple = (None, None, None, None)  # api, sg, density, sulfur for curve CSVs
    report_root: Path | None = None  # None: no per-assay reports
    single_folder: bool = False  # write into report_root itself (one assay with --out)
    inputs: tuple = ()
    uncertainty_draws: int = 0
    sigmas: object = None
    rate_bbl_per_day: float | None = None
    unit: str = "C"  # display unit of the report's temperatures ('C' or 'F')


def run_one(path: str, job: YieldJob, progress=None):
    """Load, model, cut and (optionally) report one assay (``progress(done, total)`` follows the uncertainty
    draws).

    Returns
    -------
    (YieldResult or None, list of written paths, error message or None)
    """
    from ..io import load_assay
    from ..yields import run_yields

    try:
        api, sg, density, sulfur = job.gravity
        assay = load_assay(path, api=api, sg=sg, density=density, sulfur=sulfur)
        result = run_yields(assay, job.cut_set, job.limits, method=job.method,
                            uncertainty_draws=job.uncertainty_draws, sigmas=job.sigmas,
                            rate_bbl_per_day=job.rate_bbl_per_day, progress=progress)
        written = []
        if job.report_root is not None:
            from ..report.write import slug, write_yield_report

            folder = job.report_root if job.single_folder else job.report_root / slug(assay.name)
            written = write_yield_report(result, folder, job.inputs, job.unit)
        return result, written, None
    except AssaycutError as exc:
        return None, [], str(exc)
    except MemoryError:
        return None, [], f"{path}: out of memory; the input is too large"
    except Exception as exc:  # a batch goes on; the failure is reported with its path
        return None, [], f"{path}: unexpected {type(exc).__name__}: {exc} (please report this with the file)"


def _worker(args):
    path, job = args
    return run_one(path, job)


def run_batch(paths: list[str], job: YieldJob, *, parallel: bool | None = None, progress: bool | None = None):
    """Run :func:`run_one` over ``paths``; results come back in input order.

    Parameters
    ----------
    paths : list of str
    job : YieldJob
    parallel : bool, optional
        Force worker processes on or off; by default on for :data:`PARALLEL_MIN` or more assays on a
        multi-core machine.
    progress : bool, optional
        Force the progress bar on or off; by default shown on a terminal for more than :data:`PROGRESS_MIN`.

    Returns
    -------
    (list of YieldResult, list of written paths, list of (path, message) failures)
    """
    import sys

    cores = os.cpu_count() or 1
    if parallel is None:
        parallel = len(paths) >= PARALLEL_MIN and cores > 1
    if progress is None:
        progress = len(paths) > PROGRESS_MIN and sys.stderr.isatty()
    outcomes: list = [None] * len(paths)
    bar = ProgressBar("cutting assays", len(paths)) if progress else None
    try:
        if parallel:
            from concurrent.futures import ProcessPoolExecutor, as_completed

            with ProcessPoolExecutor(max_workers=min(cores, len(paths))) as pool:
                futs = {pool.submit(_worker, (p, job)): i for i, p in enumerate(paths)}
                for f in as_completed(futs):
                    outcomes[futs[f]] = f.result()
                    if bar:
                        bar.advance()
        elif len(paths) == 1 and job.uncertainty_draws:
            with progress_bar("uncertainty draws", job.uncertainty_draws) as draws:
                outcomes[0] = run_one(paths[0], job, progress=draws)
        else:
            for i, p in enumerate(paths):
                outcomes[i] = run_one(p, job)
                if bar:
                    bar.advance()
    finally:
        if bar:
            bar.close()
    results, written, failures = [], [], []
    for p, (res, w, err) in zip(paths, outcomes):
        if err is not None:
            failures.append((p, err))
        else:
            results.append(res)
            written += w
    return results, written, failures
