"""The inputs of ``models.evaluate``: a population of designs and the conditions they run in.

Everything is SI. Every field of :class:`Design` is an array (or a scalar that broadcasts
against the others); one element per design. :class:`Conditions` holds what is common to the
whole population (ambient, air supply, heat sources); a per-design choice among candidate fans
is made with ``Design.fan_index``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class Design:
    """A population of straight plate-fin heat sinks (one element per design, SI units).

    Fins are straight, longitudinal, of trapezoidal section (root thickness at the base, tip
    thickness at the free end), evenly spaced over the base width with the two outer fins flush
    with the base edges. Air flows along ``flow_length_m``, between the fins.
    """

    fin_count: ArrayLike
    fin_thickness_root_m: ArrayLike
    fin_thickness_tip_m: ArrayLike
    fin_height_m: ArrayLike
    base_thickness_m: ArrayLike
    base_width_m: ArrayLike
    flow_length_m: ArrayLike
    conductivity_W_per_mK: ArrayLike
    density_kg_per_m3: ArrayLike
    fan_index: ArrayLike = 0
    fin_root_fillet_m: ArrayLike = 0.0  # fillet radius where each fin meets the base (in gaps)
    fin_tip_radius_m: ArrayLike = 0.0  # corner round at each fin tip (<= tip thickness / 2)

    def arrays(self) -> dict[str, np.ndarray]:
        """All fields broadcast to one common 1-D shape (a copy; inputs are never mutated)."""
        names = [f for f in self.__dataclass_fields__]
        values = np.broadcast_arrays(*[np.atleast_1d(np.asarray(getattr(self, n))) for n in names])
        out = {n: np.array(v, dtype=float).ravel() for n, v in zip(names, values, strict=True)}
        out["fin_count"] = np.rint(out["fin_count"]).astype(np.int64)
        out["fan_index"] = np.rint(out["fan_index"]).astype(np.int64)
        return out


@dataclass(frozen=True)
class FanCurve:
    """One fan model's static-pressure curve at its rated air density.

    ``flow_m3_per_s`` strictly increasing from zero (or near it) to free delivery;
    ``pressure_Pa`` strictly decreasing to (near) zero. ``count`` identical fans work in
    ``arrangement`` ('parallel' multiplies flow, 'series' multiplies pressure).
    """

    flow_m3_per_s: tuple[float, ...]
    pressure_Pa: tuple[float, ...]
    name: str = "fan"
    count: int = 1
    arrangement: Literal["parallel", "series"] = "parallel"
    rated_density_kg_per_m3: float = 1.2
    power_W: float | None = None  # electrical input power at the rated point, if known


@dataclass(frozen=True)
class HeatSource:
    """A rectangular heat source on the base (device footprint), SI units.

    ``x_m`` is the position of the footprint centre along the flow measured from the inlet
    edge of the base; ``y_m`` across the flow from the base's left edge. ``None`` centres it.
    """

    power_W: float
    length_m: float  # footprint size along the flow
    width_m: float  # footprint size across the flow
    x_m: float | None = None
    y_m: float | None = None
    interface_resistance_K_m2_per_W: float = 0.0
    junction_to_case_K_per_W: float = 0.0
    max_junction_temperature_K: float = 398.15
    name: str = "source"


@dataclass(frozen=True)
class AirSupply:
    """How air is driven through the sink: by fan curve(s), a fixed flow, or a fixed velocity.

    ``mode='fan'``: ``fans`` lists candidate fan set-ups; each design picks one with
    ``Design.fan_index``. ``mode='flow'``: the volumetric flow at the inlet is fixed.
    ``mode='velocity'``: the approach (frontal) velocity upstream of the fins is fixed.
    ``mode='stopped'``: no forced flow (fan failure): natural convection and radiation only.
    """

    mode: Literal["fan", "flow", "velocity", "stopped"] = "fan"
    fans: tuple[FanCurve, ...] = ()
    flow_m3_per_s: float | None = None
    velocity_m_per_s: float | None = None


@dataclass(frozen=True)
class Conditions:
    """What the whole population runs in (SI)."""

    ambient_temperature_K: float
    ambient_pressure_Pa: float
    supply: AirSupply
    sources: tuple[HeatSource, ...]
    system_impedance_Pa_s2_per_m6: float = 0.0  # extra loss k*Q^2 in series with the sink
    fin_tip: Literal["shrouded", "convective"] = "shrouded"  # shroud on the tips, or open tips
    clearance_top_m: float = 0.0  # bypass gap above the fin tips (0 = ducted)
    clearance_side_m: float = 0.0  # bypass gap beside each outer fin (0 = ducted)
    surface_emissivity: float = 0.0  # for radiation in the fan-stopped scenario
    extras: dict = field(default_factory=dict)
