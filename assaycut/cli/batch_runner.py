"""Running the yield job over many assay files: serially or in worker processes, with a progress bar, a bad
file reported and skipped, and a library summary.  Orchestration only: reading, the core and the report
writers do the work."""

from __future__ import annotations

import contextlib
import os
from dataclasses import dataclass
from pathlib import Path

from ..errors import AssaycutError
from .common import AT_STOP, ProgressBar, load, progress_bar

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
    plots: str = "main"  # the report's plots (a key of report.write.PLOT_SETS)
    claims: str = ""  # the run's claims folder for report folder names (see claim_folder); "" for one assay
    output: str = "result"  # what comes back of each assay: one of OUTPUTS
    scale_cuts: bool = False  # narrow cuts scaled to the whole crude instead of kept as measured


OUTPUTS = {
    "result": "the whole YieldResult (printed tables, reports, the JSON made from it by the caller)",
    "json": "the assay's JSON object and its warnings, made in the worker (LightResult)",
    "json-line": "the same object already encoded on one line (LightResult.json_text; big batches)",
    "summary": "the assay's library-summary row and long-table lines (SummaryResult); the job has no limits",
}
"""The output modes of a :class:`YieldJob`, chosen by the command line."""


@dataclass
class LightResult:
    """What a batch that prints JSON alone needs of an assay's result (cheap to send between processes)."""

    name: str
    warnings: list
    json_doc: dict | None
    json_text: str | None = None  # the same object encoded on one line (output "json-line"), json_doc then None


@dataclass
class SummaryResult:
    """What a batch that writes the library summary alone needs of an assay's result: its summary row
    (:func:`~assaycut.cutting.library_engine.summary_rows`) and its lines of the long table (CSV text, escaped)."""

    name: str
    warnings: list
    row: list
    long_text: str


FOLDER_NOTE = "report folder "
"""Start of the warning that an assay's report folder took a suffix (the CLI collects these)."""


def claim_folder(root: Path, base: str, claims: str) -> Path:
    """The report folder of one assay of a batch: ``root/base``, or ``base_2``, ``base_3``... when another
    assay of the same run already claimed it (two crudes whose names give the same folder name, e.g.
    "Crude A" and "Crude/A", or names sharing their first 60 characters).  A claim is a file created
    exclusively in the run's claims folder (``claims``, outside the reports), so worker processes never share
    a folder; folders of earlier runs are reused."""
    from ..files import prepare_folder

    for k in range(1, 100_000):
        name = base if k == 1 else f"{base}_{k}"
        try:
            fd = os.open(os.path.join(claims, name), os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o600)
        except FileExistsError:
            continue
        os.close(fd)
        folder = root / name
        prepare_folder(folder)
        return folder
    raise AssaycutError(f"{root}: too many assays named like {base!r}")


CLAIMS: dict[str, Path] = {}
"""Claims folders of running batches -> their report root (settled and removed at the end, and on a stop)."""
CLAIMS_PREFIX = "assaycut-claims-"
"""Start of a claims folder's name: ``assaycut-claims-<pid>-<random>`` in the temporary folder."""


def new_claims(root: Path) -> str:
    """A fresh claims folder for one batch run writing under ``root``; those left by killed runs are removed
    first (:func:`drop_stale_claims`)."""
    import tempfile

    drop_stale_claims()
    d = tempfile.mkdtemp(prefix=f"{CLAIMS_PREFIX}{os.getpid()}-")
    CLAIMS[d] = Path(root)
    return d


def drop_stale_claims() -> None:
    """Remove the claims folders of this user left in the temporary folder by runs that no longer run (a
    SIGKILL gives a run no chance to remove its own)."""
    import shutil
    import tempfile

    from ..files import owner_gone

    tmp = tempfile.gettempdir()
    with contextlib.suppress(OSError):
        for name in os.listdir(tmp):
            path = os.path.join(tmp, name)
            if owner_gone(name, CLAIMS_PREFIX) and os.lstat(path).st_uid == os.getuid():
                shutil.rmtree(path, ignore_errors=True)


def release_claims(claims: str = "") -> None:
    """Remove a batch run's claims folder (all of them when ``claims`` is empty)."""
    import shutil

    for d in [claims] if claims else list(CLAIMS):
        if d:
            shutil.rmtree(d, ignore_errors=True)
            CLAIMS.pop(d, None)


def settle_claimed() -> None:
    """On a stop, after the workers are killed: settle the report sets they were writing in the folders this
    run claimed (:func:`~assaycut.files.settle_stale_stages`: completed if wholly staged, else removed)."""
    from ..files import settle_stale_stages

    dead = frozenset(KILLED)
    for d, root in list(CLAIMS.items()):
        settle_stale_stages(root, dead)
        with contextlib.suppress(OSError):
            for name in os.listdir(d):
                settle_stale_stages(root / name, dead)


def run_one(path: str, job: YieldJob, progress=None, map_fn=map):
    """Load, model, cut and (optionally) report one assay (``progress(done, total)`` follows the uncertainty
    draws).

    Returns
    -------
    (YieldResult or None, list of written paths, error message or None)
    """
    from ..yields import run_yields

    try:
        assay = _load(path, job)
        result = run_yields(assay, job.cut_set, job.limits, method=job.method,
                            uncertainty_draws=job.uncertainty_draws, sigmas=job.sigmas,
                            rate_bbl_per_day=job.rate_bbl_per_day, progress=progress, map_fn=map_fn,
                            scale_cuts=job.scale_cuts)
        return _deliver(result, job)
    except Exception as exc:  # a batch goes on; the failure is reported with its path
        return None, [], _failure(path, exc)


def _load(path: str, job: YieldJob):
    return load(path, *job.gravity)


def _failure(path: str, exc: Exception) -> str:
    """The one-line message of an assay that failed, naming its file."""
    if isinstance(exc, AssaycutError):
        msg = str(exc)  # errors from the core (a curve that cannot be modelled) name the file here
        return msg if msg.startswith(str(path)) else f"{path}: {msg}"
    if isinstance(exc, MemoryError):
        return f"{path}: out of memory; the input is too large"
    return f"{path}: unexpected {type(exc).__name__}: {exc} (please report this with the file)"


def _deliver(result, job: YieldJob):
    """Write the assay's report (when asked) and make its JSON object (when asked), or its library-summary
    parts (summary jobs): the outcome of one assay."""
    written = []
    assay = result.assay
    if job.output == "summary":
        from ..cutting.library_engine import summary_row, summary_rows
        from ..report.tables import long_rows
        from ..report.write import csv_body

        if job.cut_set.overlaps or job.rate_bbl_per_day is not None:  # the summary reads the ideal cuts alone
            row = summary_rows([assay], [result.model], job.cut_set)[0]
        else:
            row = summary_row(assay, result.model, result.cuts.rows())
        text = csv_body(long_rows(result.cuts, assay.name, escaped=True), escaped=True)
        return SummaryResult(assay.name, list(result.warnings), row, text), written, None
    if job.report_root is not None:
        from ..report.write import slug, write_yield_report

        if job.single_folder or not job.claims:
            folder = job.report_root if job.single_folder else job.report_root / slug(assay.name)
        else:
            folder = claim_folder(job.report_root, slug(assay.name), job.claims)
            if folder.name != slug(assay.name):
                result.warnings.append(f"{FOLDER_NOTE}{folder.name!r}: {slug(assay.name)!r} is taken by "
                                       f"another assay of this run with a similar name")
        written = write_yield_report(result, folder, job.inputs, job.unit, job.plots)
    if job.output in ("json", "json-line"):
        from ..report.jsonout import yield_json

        doc = yield_json(result)
        if job.output == "json-line":
            from .common import json_text

            return LightResult(assay.name, list(result.warnings), None, json_text(doc, compact=True)), written, None
        return LightResult(assay.name, list(result.warnings), doc), written, None
    return result, written, None


def together(job: YieldJob) -> bool:
    """Whether a job's assays can be cut together by the library engine (:func:`run_chunk`): no per-assay
    report, ideal cuts, no rates, no uncertainty draws (the results equal one cut per assay to 1e-9)."""
    return (job.report_root is None and not job.cut_set.overlaps
            and job.rate_bbl_per_day is None and not job.uncertainty_draws)


def run_chunk(paths: list[str], job: YieldJob) -> list:
    """The outcomes of :func:`run_one` for several assays, cut together by the library engine when the job
    allows (:func:`together`; :func:`assaycut.yields.run_yields_many`, equal to one cut per assay to 1e-9),
    else one by one.  A file that fails to load or model is reported and the others go on."""
    if not together(job) or len(paths) < 2:
        return [run_one(p, job) for p in paths]
    from ..yields import build_model, build_models, run_yields_many  # the core's own model builders

    outcomes: list = [None] * len(paths)
    loaded = []
    for i, p in enumerate(paths):
        try:
            loaded.append((i, _load(p, job)))
        except Exception as exc:
            outcomes[i] = (None, [], _failure(p, exc))
    try:  # the models of the chunk built together (each the model build_model gives)
        built = build_models([a for _, a in loaded], job.method, reconcile=job.scale_cuts)
    except Exception:  # a programming error: build them one by one, so that it names its own file
        built = []
        for i, a in loaded:
            try:
                built.append(build_model(a, job.method, reconcile=job.scale_cuts))
            except Exception as exc:
                built.append(exc)
    good = []
    for (i, assay), m in zip(loaded, built):
        if isinstance(m, Exception):
            outcomes[i] = (None, [], _failure(paths[i], m))
        else:
            good.append((i, assay, m))
    try:
        results = run_yields_many([a for _, a, _ in good], [m for _, _, m in good], job.cut_set, job.limits)
    except Exception:  # cut them one by one instead, so that each failure names its own file
        for i, _, _ in good:
            outcomes[i] = run_one(paths[i], job)
        return outcomes
    for (i, _, _), res in zip(good, results):
        try:
            outcomes[i] = _deliver(res, job)
        except Exception as exc:
            outcomes[i] = (None, [], _failure(paths[i], exc))
    return outcomes


_PARENT = {"pid": None}
ACTIVE_POOLS: list = []
"""Worker pools running now (killed by the SIGTERM handler of :func:`assaycut.cli.main`)."""


def _worker_init(parent_pid: int) -> None:
    """Worker start: leave Ctrl-C to the parent (it cancels the batch), and die with the parent: on Linux the
    kernel sends SIGKILL when the parent dies (prctl PR_SET_PDEATHSIG); elsewhere each task checks the
    parent first."""
    import signal
    import warnings

    warnings.simplefilter("ignore")  # library warnings are not our output (as in cli.common.guarded)
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    _PARENT["pid"] = parent_pid
    try:
        import ctypes

        libc = ctypes.CDLL("libc.so.6", use_errno=True)
        libc.prctl(1, signal.SIGKILL, 0, 0, 0)  # PR_SET_PDEATHSIG = 1
    except (OSError, AttributeError):
        pass
    if os.getppid() != parent_pid:  # the parent died before the line above
        os._exit(1)


TASK_SIZE = 16
"""Assays per task sent to a worker (fewer round trips between processes; a chunk cut together by the library
engine when the job allows)."""


def _worker(args):
    chunk, job = args
    if _PARENT["pid"] is not None and os.getppid() != _PARENT["pid"]:
        os._exit(1)  # orphaned: never write for a dead parent
    if together(job):
        return run_chunk(chunk, job)  # no files are written: one check per chunk is enough
    out = []
    for path in chunk:
        if _PARENT["pid"] is not None and os.getppid() != _PARENT["pid"]:
            os._exit(1)  # orphaned: never write for a dead parent
        out.append(run_one(path, job))
    return out


@contextlib.contextmanager
def worker_pool(workers: int):
    """A process pool whose workers ignore Ctrl-C and die with the parent (:func:`_worker_init`); on an error
    or an interrupt, pending work is cancelled and the workers are killed at once."""
    from concurrent.futures import ProcessPoolExecutor

    pool = ProcessPoolExecutor(max_workers=workers, initializer=_worker_init, initargs=(os.getpid(),))
    ACTIVE_POOLS.append(pool)
    try:
        yield pool
    except BaseException:
        kill_pools()
        pool.shutdown(wait=False, cancel_futures=True)
        raise
    else:
        pool.shutdown(wait=True)
    finally:
        ACTIVE_POOLS.remove(pool)


@contextlib.contextmanager
def draw_pool(job: YieldJob):
    """A map over worker processes for the uncertainty draws of one assay (builtin ``map`` on one core or for
    few draws)."""
    from ..studies.uncertainty import DRAW_CHUNK

    cores = os.cpu_count() or 1
    if cores < 2 or job.uncertainty_draws < 2 * DRAW_CHUNK:
        yield map
        return
    from ..studies import uncertainty  # noqa: F401  (imported before the fork, so workers inherit it)

    with worker_pool(cores) as pool:
        yield pool.map


KILLED: set[int] = set()
"""Worker processes killed by :func:`kill_pools`."""


def kill_pools() -> None:
    """Kill the worker processes of every running pool at once (Ctrl-C, SIGTERM), and wait (up to a second)
    until they are gone, so that nothing of theirs is written after the stop."""
    import time

    procs = []
    for pool in list(ACTIVE_POOLS):
        for proc in list(getattr(pool, "_processes", {}).values()):
            with contextlib.suppress(Exception):
                proc.kill()
                KILLED.add(proc.pid)
                procs.append(proc.pid)
    from ..files import pid_alive

    t_end = time.monotonic() + 1.0
    while procs and time.monotonic() < t_end:
        procs = [p for p in procs if pid_alive(p)]
        time.sleep(0.01)


AT_STOP.extend([kill_pools, settle_claimed, release_claims])  # Ctrl-C, SIGTERM: kill the workers, settle, drop


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
            from concurrent.futures import as_completed

            # the first chunk in the parent first (the forked workers inherit its imports), the others in the
            # workers: the same chunks as a serial run, so the same results to the last bit
            outcomes[:TASK_SIZE] = run_chunk(paths[:TASK_SIZE], job)
            if bar:
                bar.advance(len(paths[:TASK_SIZE]))

            with worker_pool(min(cores, len(paths))) as pool:
                starts = range(TASK_SIZE, len(paths), TASK_SIZE)
                futs = {pool.submit(_worker, (paths[k:k + TASK_SIZE], job)): k for k in starts}
                for f in as_completed(futs):
                    for j, outcome in enumerate(f.result()):
                        outcomes[futs[f] + j] = outcome
                        if bar:
                            bar.advance()
        elif len(paths) == 1 and job.uncertainty_draws:
            with progress_bar("uncertainty draws", job.uncertainty_draws) as draws, draw_pool(job) as map_fn:
                outcomes[0] = run_one(paths[0], job, progress=draws, map_fn=map_fn)
        elif len(paths) > 1:
            for k in range(0, len(paths), TASK_SIZE):
                outcomes[k:k + TASK_SIZE] = run_chunk(paths[k:k + TASK_SIZE], job)
                if bar:
                    bar.advance(len(paths[k:k + TASK_SIZE]))
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
