"""Runners that evaluate a population over local worker processes or a Dask cluster.

A runner is called as ``runner(design, [conditions, ...])`` and returns one table per
scenario, exactly as the serial path (``[models.evaluate.evaluate(design, c) for c in ...]``).
The population is cut into a few large contiguous chunks (about two per worker), each chunk
is one task that evaluates every scenario, and the chunks' tables are put back in order.
One task per design would cost more in transport than a vectorized model needs to evaluate
it (see docs/running.md), so small populations are sent as a single chunk.

``models.evaluate`` is row-independent (each design's row depends on that design only), so
the chunked result equals the serial one to the last bit.
"""

from __future__ import annotations

import multiprocessing
import signal
from collections.abc import Sequence
from concurrent.futures import ProcessPoolExecutor
from typing import Any

import numpy as np
import pandas as pd

from models.contract import Conditions, Design

MIN_CHUNK = 64  # designs; smaller chunks cost more to ship than to evaluate


def split_design(design: Design, n_chunks: int) -> list[Design]:
    """Cut a population into at most ``n_chunks`` contiguous parts (in order)."""
    arrays = design.arrays()
    n = next(iter(arrays.values())).size
    n_chunks = int(max(1, min(n_chunks, n // MIN_CHUNK if n >= MIN_CHUNK else 1)))
    bounds = np.linspace(0, n, n_chunks + 1).astype(int)
    return [
        Design(**{k: v[a:b] for k, v in arrays.items()})
        for a, b in zip(bounds[:-1], bounds[1:], strict=True)
        if b > a
    ]


def evaluate_chunk(design: Design, conditions: Sequence[Conditions]) -> list[pd.DataFrame]:
    """One task: every scenario's table for one chunk (runs in a worker)."""
    from models.evaluate import evaluate

    return [evaluate(design, c) for c in conditions]


def _join(parts: list[list[pd.DataFrame]], n_scenarios: int) -> list[pd.DataFrame]:
    return [
        pd.concat([p[s] for p in parts], ignore_index=True) for s in range(n_scenarios)
    ]


def _ignore_sigint() -> None:
    # Ctrl-C is for the main process, which checkpoints and stops the workers itself.
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    from optim.runtime import tune_allocator

    tune_allocator()


class ProcessRunner:
    """Evaluate chunks in ``workers`` local processes (spawned, so safe with threads)."""

    def __init__(self, workers: int) -> None:
        if workers < 2:
            raise ValueError(f"workers: got {workers}; expected 2 or more for a process pool")
        self.workers = int(workers)
        self._pool = ProcessPoolExecutor(
            max_workers=self.workers,
            mp_context=multiprocessing.get_context("spawn"),
            initializer=_ignore_sigint,
        )

    def __call__(self, design: Design, conditions: Sequence[Conditions]) -> list[pd.DataFrame]:
        chunks = split_design(design, 2 * self.workers)
        conditions = list(conditions)
        if len(chunks) == 1:
            parts = [self._pool.submit(evaluate_chunk, chunks[0], conditions).result()]
        else:
            futures = [self._pool.submit(evaluate_chunk, c, conditions) for c in chunks]
            parts = [f.result() for f in futures]
        return _join(parts, len(conditions))

    def describe(self) -> str:
        return f"{self.workers} local worker processes"

    def close(self) -> None:
        self._pool.shutdown(wait=True, cancel_futures=True)


class DaskRunner:
    """Evaluate chunks on a Dask cluster (``distributed.Client`` at ``address``, or a client).

    The workers must be able to import ``models`` and ``optim`` (install finfront there).
    """

    def __init__(self, address: Any, timeout_s: float = 20.0) -> None:
        from distributed import Client

        if isinstance(address, Client):
            self.client, self._own = address, False
        else:
            try:
                self.client = Client(address, timeout=f"{timeout_s}s")
            except (OSError, TimeoutError) as exc:
                raise ConnectionError(
                    f"dask: cannot reach a scheduler at '{address}' ({exc.__class__.__name__})"
                ) from None
            self._own = True
        self.address = self.client.scheduler.address

    def _n_workers(self) -> int:
        info = self.client.scheduler_info()
        threads = sum(w.get("nthreads", 1) for w in info.get("workers", {}).values())
        return max(1, threads)

    def __call__(self, design: Design, conditions: Sequence[Conditions]) -> list[pd.DataFrame]:
        conditions = list(conditions)
        chunks = split_design(design, 2 * self._n_workers())
        futures = self.client.map(evaluate_chunk, chunks, conditions=conditions, pure=False)
        parts = self.client.gather(futures)
        return _join(parts, len(conditions))

    def describe(self) -> str:
        return f"Dask scheduler {self.address} ({self._n_workers()} worker threads)"

    def close(self) -> None:
        if self._own:
            self.client.close()


def make_runner(workers: int = 1,
                dask_address: str | None = None) -> ProcessRunner | DaskRunner | None:
    """The runner for a study's settings: None (serial), a ProcessRunner or a DaskRunner."""
    if dask_address:
        return DaskRunner(dask_address)
    if workers and workers > 1:
        return ProcessRunner(workers)
    return None
