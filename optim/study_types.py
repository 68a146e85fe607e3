"""A loaded, validated study, in SI: what the search needs and nothing of YAML or units.

``optim.study.load_study`` builds a :class:`Study` from a study file (or dict); the search,
the run folder and the report read only this.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np

from models.contract import Conditions, Design

# Names of the decision variables a study may declare (free or fixed), SI units.
VARIABLE_NAMES = (
    "fin_count",  # int
    "fin_pitch_m",  # real; alternative to fin_count (engineers think in both)
    "fin_thickness_root_m",
    "fin_thickness_tip_m",  # or, instead,
    "fin_taper_ratio",  # tip / root thickness, 0 < r <= 1
    "fin_height_m",
    "base_thickness_m",
    "material",  # choice among Study.materials
    "fan",  # choice among Study.fan_names (fan mode only)
)


@dataclass(frozen=True)
class Variable:
    """One free decision variable. ``kind='choice'`` has ``choices``; others have bounds."""

    name: str
    kind: Literal["int", "real", "choice"]
    lower: float | None = None
    upper: float | None = None
    choices: tuple[str, ...] = ()


@dataclass(frozen=True)
class Objective:
    column: str  # a column of models.evaluate's table
    sense: Literal["min", "max"] = "min"


@dataclass(frozen=True)
class Constraint:
    """``column <= limit`` or ``column >= limit`` (limit in the column's SI unit).

    ``label`` says where it came from (e.g. 'constraints.mass', 'extruder.min_gap'), for the
    limiting-constraint column of the outputs.
    """

    column: str
    sense: Literal["<=", ">="]
    limit: float
    label: str


@dataclass(frozen=True)
class Budget:
    method: Literal["auto", "nsga2", "nsga3", "sweep", "random"] = "auto"
    population: int = 100
    generations: int | None = 100
    max_evaluations: int | None = None
    wall_time_s: float | None = None
    stagnation_generations: int | None = None  # stop when hypervolume gains < tol this long
    stagnation_tolerance: float = 1e-4
    checkpoint_every: int = 5  # generations
    sweep_points: int = 12  # points per real variable in an exhaustive sweep
    workers: int = 1  # local worker processes (1 = serial)
    dask_scheduler: str | None = None  # e.g. "tcp://127.0.0.1:8786"


@dataclass(frozen=True)
class Scenario:
    """One operating case. Every constraint must hold in every scenario; the objectives
    are taken from the first scenario (the nominal one)."""

    name: str
    conditions: Conditions


@dataclass(frozen=True)
class Material:
    name: str
    conductivity_W_per_mK: float
    density_kg_per_m3: float


@dataclass(frozen=True)
class Study:
    name: str
    seed: int
    variables: tuple[Variable, ...]  # the free ones
    fixed: Mapping[str, float | str]  # fixed design values (SI, or a choice's name)
    objectives: tuple[Objective, ...]
    constraints: tuple[Constraint, ...]  # user constraints + extruder + envelope limits
    budget: Budget
    scenarios: tuple[Scenario, ...]  # at least one; scenarios[0] is nominal
    materials: tuple[Material, ...]  # candidates (one if fixed)
    fan_names: tuple[str, ...]  # aligned with each scenario's supply.fans
    base_width_m: float
    flow_length_m: float
    max_height_m: float
    root_fillet_m: float
    tip_radius_m: float | None  # None: full round, t_tip / 2
    resolved: dict[str, Any] = field(default_factory=dict)  # frozen study, defaults resolved
    source_path: str | None = None

    def design_from(self, X: Mapping[str, np.ndarray]) -> Design:
        """Map arrays of decision values (free variables by name; choice variables as integer
        indices into ``materials`` / ``fan_names``) plus the fixed values to a model Design."""
        v = dict(self.fixed)
        v.update(X)
        n = max((np.size(x) for x in X.values()), default=1)

        def arr(name: str, default: float | None = None) -> np.ndarray:
            val = v.get(name, default)
            return np.broadcast_to(np.asarray(val, dtype=float), (n,))

        t_root = arr("fin_thickness_root_m")
        if "fin_thickness_tip_m" in v:
            t_tip = arr("fin_thickness_tip_m")
        else:
            t_tip = t_root * arr("fin_taper_ratio", 1.0)
        W = self.base_width_m
        if "fin_pitch_m" in v:
            count = np.rint((W - t_root) / arr("fin_pitch_m")) + 1.0
        else:
            count = np.rint(arr("fin_count"))
        mat_idx = self._choice_index("material", v, [m.name for m in self.materials], n)
        k = np.array([m.conductivity_W_per_mK for m in self.materials])[mat_idx]
        rho = np.array([m.density_kg_per_m3 for m in self.materials])[mat_idx]
        fan_idx = self._choice_index("fan", v, list(self.fan_names), n) if self.fan_names else 0
        tip_r = (
            t_tip / 2.0 if self.tip_radius_m is None else np.minimum(self.tip_radius_m, t_tip / 2.0)
        )
        return Design(
            fin_count=count.astype(np.int64),
            fin_thickness_root_m=t_root,
            fin_thickness_tip_m=t_tip,
            fin_height_m=arr("fin_height_m"),
            base_thickness_m=arr("base_thickness_m"),
            base_width_m=W,
            flow_length_m=self.flow_length_m,
            conductivity_W_per_mK=k,
            density_kg_per_m3=rho,
            fan_index=fan_idx,
            fin_root_fillet_m=self.root_fillet_m,
            fin_tip_radius_m=tip_r,
        )

    @staticmethod
    def _choice_index(name: str, v: Mapping[str, Any], names: list[str], n: int) -> np.ndarray:
        val = v.get(name, 0)
        if isinstance(val, str):
            return np.full(n, names.index(val), dtype=np.int64)
        return np.broadcast_to(np.rint(np.asarray(val)).astype(np.int64), (n,))
