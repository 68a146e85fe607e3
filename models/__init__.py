"""finfront physics: pure, vectorized models of fan-cooled plate-fin heat sinks (SI units)."""

from models.contract import AirSupply, Conditions, Design, FanCurve, HeatSource

__all__ = ["AirSupply", "Conditions", "Design", "FanCurve", "HeatSource"]
