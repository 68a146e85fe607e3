"""The array NSGA-II loop reproduces pymoo 0.6's NSGA2 object bit for bit.

optim.search.ArrayNSGA2 runs pymoo's own operators on plain arrays to save the framework's
per-individual bookkeeping; the reference is pymoo's NSGA2 (a general-purpose library).
"""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_search import STUDY, identity_check  # noqa: E402

from optim.study import load_study  # noqa: E402


def test_array_nsga2_equals_pymoo_nsga2_generation_by_generation():
    generations = identity_check(load_study(STUDY), cases=((30, 8), (7, 8)), seeds=(0, 3))
    assert generations >= 30
