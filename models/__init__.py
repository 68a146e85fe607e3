"""finfront physics: pure, vectorized models of fan-cooled plate-fin heat sinks (SI units).

The entry point is :func:`models.evaluate` (one row per design); the inputs are
:class:`Design` and :class:`Conditions` (``models.contract``); the output columns are listed
in ``models.columns``.
"""

from models.contract import AirSupply, Conditions, Design, FanCurve, HeatSource
from models.evaluate import evaluate

__all__ = ["AirSupply", "Conditions", "Design", "FanCurve", "HeatSource", "evaluate"]
