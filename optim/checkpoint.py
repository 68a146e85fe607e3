"""Checkpoints: the whole search state pickled atomically, and loaded back for ``resume``.

A checkpoint holds the problem (with the study) and the :class:`~optim.search.SearchState`
(the algorithm -- :class:`~optim.search.ArrayNSGA2` or a pymoo algorithm -- with its random
generator, archive, convergence history, counters) in one pickle, so shared references
survive. What a pickle cannot hold is dropped on save and re-attached on load: the problem's
runner (process pool or Dask client; see ``HeatSinkProblem.__getstate__``) and the records
not yet written (drained before every save).

The file is written to a temporary name in the same folder and then renamed over the old one
(``os.replace``), so a crash while saving leaves the previous checkpoint intact.
"""

from __future__ import annotations

import pickle
from pathlib import Path
from typing import Any

from optim.atomic import atomic_write_bytes

FORMAT = 2  # 2: NSGA-II as optim.search.ArrayNSGA2, records as column arrays
FILENAME = "checkpoint.pkl"


class CheckpointError(RuntimeError):
    """A checkpoint that is missing, unreadable or from an incompatible version."""




def save_checkpoint(folder: Path, problem: Any, state: Any,
                    extra: dict[str, Any] | None = None) -> Path:
    """Pickle ``problem`` and ``state`` into ``folder/checkpoint.pkl`` atomically."""
    if problem.pending:
        raise CheckpointError("records were not written before the checkpoint")
    payload = {
        "format": FORMAT,
        "version": (extra or {}).get("version", "unknown"),
        "problem": problem,
        "state": state,
        "extra": dict(extra or {}),
    }
    path = Path(folder) / FILENAME
    atomic_write_bytes(path, pickle.dumps(payload, protocol=pickle.HIGHEST_PROTOCOL))
    return path


def load_checkpoint(folder: Path) -> dict[str, Any]:
    """The checkpoint's payload: ``problem`` (without runner), ``state``, ``extra``, ``version``."""
    path = Path(folder) / FILENAME
    if not path.is_file():
        raise CheckpointError(f"{folder}: no {FILENAME} here; expected a finfront run folder")
    try:
        with open(path, "rb") as fh:
            payload = pickle.load(fh)
    except Exception as exc:  # a truncated or foreign file
        raise CheckpointError(f"{path}: cannot read the checkpoint ({exc})") from None
    if not isinstance(payload, dict) or "format" not in payload:
        raise CheckpointError(f"{path}: not a finfront checkpoint of format {FORMAT}")
    if payload["format"] != FORMAT:
        raise CheckpointError(
            f"{path}: checkpoint format {payload['format']} (finfront "
            f"{payload.get('version', 'unknown')}); this finfront reads format {FORMAT} only: "
            "finish the run with the finfront that started it, or start it again")
    payload["problem"].attach_runner(None)
    return payload
