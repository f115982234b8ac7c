"""Many files at once: the same per-file work on local cores or on a Dask cluster.

``run(func, jobs)`` calls ``func(job)`` for every job and returns one ``Outcome`` per job,
in the order given, whatever order they finish in. A file that fails does not stop the
others: its outcome carries the error message instead of a value.

Executors:

- ``local`` (default): a ``concurrent.futures.ProcessPoolExecutor`` on this machine's
  cores (one job in this process when there is one job or one worker). Workers start
  with ``spawn``, so nothing the parent loaded (a spaCy pipeline, open files) is shared
  by accident; each worker loads the pipeline once and keeps it for its next files.
- ``dask``: the same calls submitted to an existing ``dask.distributed`` scheduler
  (``scheduler="tcp://host:8786"``) for archives larger than one machine. It needs the
  ``dask`` extra (``pip install 'minutes[dask]'``), and the workers must be able to read
  the input paths (shared storage) and import ``minutes``; results come back to this
  process, which writes every output, so outputs never depend on the workers' disks.

``func`` and every job must be picklable (a module-level function and plain data).
"""

from __future__ import annotations

import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .errors import MinutesError, UsageError, missing_extra

EXECUTORS = ("local", "dask")

# (done, total, name of the file just finished): the CLI prints it on stderr
BatchProgress = Callable[[int, int, str], None]


def _quiet(done: int, total: int, name: str) -> None:
    return None


@dataclass(frozen=True)
class Outcome:
    """What one job gave: its value, or the message of the error that stopped it."""

    index: int
    name: str
    value: Any = None
    error: str = ""

    @property
    def ok(self) -> bool:
        """Return whether the job finished without an error."""
        return not self.error


def call(func: Callable[[Any], Any], index: int, name: str, job: Any) -> Outcome:
    """Return the outcome of ``func(job)``: a library error becomes a message, not a crash."""
    try:
        return Outcome(index, name, func(job))
    except MinutesError as exc:
        return Outcome(index, name, error=str(exc))
    except Exception as exc:  # a bug in one file's work must not lose the other files
        return Outcome(index, name, error=f"internal error ({type(exc).__name__}: {exc})")


def _name(job: Any) -> str:
    path = getattr(job, "path", job)
    return Path(path).name if isinstance(path, (str, os.PathLike)) else str(path)


@dataclass(frozen=True)
class Plan:
    """Where the work runs."""

    executor: str = "local"
    workers: int | None = None  # local: processes (default: the machine's cores)
    scheduler: str | None = None  # dask: the scheduler's address


def workers_for(jobs: int, wanted: int | None) -> int:
    """Return how many local worker processes to start for ``jobs`` files."""
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    return max(1, min(jobs, wanted or cores or 1))


def run(func: Callable[[Any], Any], jobs: Sequence[Any], plan: Plan = Plan(),
        progress: BatchProgress = _quiet) -> list[Outcome]:
    """Return the outcome of ``func`` on every job, in the order of ``jobs``."""
    if plan.executor not in EXECUTORS:
        raise UsageError(f"unknown executor {plan.executor!r}; choose one of "
                         f"{', '.join(EXECUTORS)}")
    names = [_name(job) for job in jobs]
    if plan.executor == "dask":
        if not plan.scheduler:
            raise UsageError("--executor dask needs --scheduler ADDRESS (e.g. tcp://host:8786)")
        return _run_dask(func, jobs, names, plan.scheduler, progress)
    return _run_local(func, jobs, names, workers_for(len(jobs), plan.workers), progress)


def _run_local(func: Callable[[Any], Any], jobs: Sequence[Any], names: list[str], workers: int,
               progress: BatchProgress) -> list[Outcome]:
    total = len(jobs)
    results: list[Outcome | None] = [None] * total
    progress(0, total, "")
    if workers == 1 or total <= 1:
        for n, job in enumerate(jobs):
            results[n] = call(func, n, names[n], job)
            progress(n + 1, total, names[n])
        return results  # type: ignore[return-value]
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor, as_completed

    context = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(max_workers=workers, mp_context=context) as pool:
        futures = {pool.submit(call, func, n, names[n], job): n for n, job in enumerate(jobs)}
        for done, future in enumerate(as_completed(futures), 1):
            n = futures[future]
            try:
                results[n] = future.result()
            except Exception as exc:  # the worker process died (memory, a signal)
                results[n] = Outcome(n, names[n], error=f"worker failed ({type(exc).__name__}: "
                                                        f"{exc})")
            progress(done, total, names[n])
    return results  # type: ignore[return-value]


def _run_dask(func: Callable[[Any], Any], jobs: Sequence[Any], names: list[str], scheduler: str,
              progress: BatchProgress) -> list[Outcome]:
    try:
        from distributed import Client, as_completed
    except ImportError:
        raise missing_extra("dask.distributed", "dask") from None
    total = len(jobs)
    results: list[Outcome | None] = [None] * total
    progress(0, total, "")
    try:
        client = Client(scheduler, timeout=30)
    except (OSError, TimeoutError) as exc:
        raise UsageError(f"cannot reach the Dask scheduler at {scheduler} ({exc}); "
                         "check the address and that the scheduler is running") from exc
    try:
        futures = [client.submit(call, func, n, names[n], job, pure=False)
                   for n, job in enumerate(jobs)]
        where = {f.key: n for n, f in enumerate(futures)}
        for done, future in enumerate(as_completed(futures), 1):
            n = where[future.key]
            try:
                results[n] = future.result()
            except Exception as exc:  # the worker died or could not unpickle the job
                results[n] = Outcome(n, names[n], error=f"Dask worker failed "
                                                        f"({type(exc).__name__}: {exc})")
            progress(done, total, names[n])
    finally:
        client.close()
    return results  # type: ignore[return-value]


# --------------------------------------------------------------------------- drafting


@dataclass(frozen=True)
class DraftJob:
    """One input to draft: where it is, how, and which formats to render."""

    path: Path
    options: Any  # pipeline.DraftOptions
    formats: tuple[str, ...]


@dataclass(frozen=True)
class Drafted:
    """One draft's rendered outputs, ready for the parent to write."""

    outputs: dict[str, bytes]  # format -> bytes
    summary: str
    transcript_vtt: bytes | None = None  # for a recording: the transcript the minutes cite


def draft_job(job: DraftJob) -> Drafted:
    """Return the rendered minutes of one input (runs in a worker process)."""
    from .pipeline import draft
    from .render import render

    minutes = draft(job.path, job.options)
    vtt = None
    if job.path.suffix.lower() not in (".vtt", ".srt", ".txt", ".json"):
        from .asr.audio import is_recording

        if is_recording(job.path):
            from .asr import write_vtt
            from .model import Transcript

            vtt = write_vtt(Transcript(minutes.utterances, source=str(job.path))).encode("utf-8")
    ledger = minutes.ledger
    summary = (f"{len(minutes.segments)} sections, {len(ledger.decisions)} decisions, "
               f"{len(ledger.actions)} action items, {len(ledger.motions)} motions")
    return Drafted({fmt: render(minutes, fmt) for fmt in job.formats}, summary, vtt)
