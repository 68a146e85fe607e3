"""The study file's schema: one pydantic model per section, unknown keys forbidden.

Quantities are converted to SI here, field by field (:mod:`optim.units`); each field's
``description`` is the expectation printed when the key is missing or its value is of the
wrong type. Checks that need several sections at once (sources on the base, bounds the extruder
can meet, column names) live in the ``optim.study_*`` modules that :mod:`optim.study` calls.
``docs/study-file.md`` documents every key.
"""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Discriminator,
    Field,
    PlainValidator,
    Tag,
    ValidationInfo,
    field_validator,
    model_validator,
)

from models.fan import validate_fan_curve
from models.materials import EMISSIVITY
from optim.units import BadValueError, parse_quantity, show

SENSES = {"minimise": "min", "minimize": "min", "maximise": "max", "maximize": "max"}


def did_you_mean(word: str, options: list[str] | tuple[str, ...]) -> str:
    """``'; did you mean "x"?'`` for the closest option, or ``''``."""
    lowered = {o.lower(): o for o in options}
    close = difflib.get_close_matches(str(word).lower(), list(lowered), n=1, cutoff=0.6)
    return f'; did you mean "{lowered[close[0]]}"?' if close else ""


@dataclass(frozen=True)
class Span:
    """A design-space entry in SI: bounds ``[lower, upper]``; ``fixed`` when lower == upper."""

    lower: float
    upper: float

    @property
    def fixed(self) -> bool:
        return self.lower == self.upper


# ---------------------------------------------------------------- field validators


def _quantity(
    kind: str | tuple[str, ...],
    *,
    positive: bool = False,
    nonnegative: bool = False,
    optional: bool = False,
    lo: float | None = None,
    hi: float | None = None,
    what: str = "",
) -> PlainValidator:
    def check(v: Any) -> float | None:
        if v is None and optional:
            return None
        x, _ = parse_quantity(v, kind, positive=positive, nonnegative=nonnegative)
        if (lo is not None and x < lo) or (hi is not None and x > hi):
            raise BadValueError(f"{show(v)} is out of range; expected {what}")
        return x

    return PlainValidator(check)


def _with_kind(kinds: tuple[str, ...], *, nonnegative: bool = True) -> PlainValidator:
    """A quantity that may be one of several kinds: returns ``(SI value, kind)``."""

    def check(v: Any) -> tuple[float, str]:
        return parse_quantity(v, kinds, nonnegative=nonnegative)

    return PlainValidator(check)


def _pair(
    kind: str,
    *,
    positive: bool = False,
    nonnegative: bool = False,
    optional: bool = False,
    what: str = "",
) -> PlainValidator:
    def check(v: Any) -> tuple[float, float] | None:
        if v is None and optional:
            return None
        if not isinstance(v, (list, tuple)) or len(v) != 2:
            raise BadValueError(f"{show(v)} is not a list of two quantities; expected {what}")
        out = []
        for i, item in enumerate(v):
            try:
                out.append(
                    parse_quantity(item, kind, positive=positive, nonnegative=nonnegative)[0]
                )
            except BadValueError as e:
                raise BadValueError(e.text, loc=(i,)) from None
        return (out[0], out[1])

    return PlainValidator(check)


def _span(
    kind: str,
    *,
    integer: bool = False,
    at_least: float | None = None,
    at_most: float | None = None,
    what: str = "",
) -> PlainValidator:
    """``[min, max]`` or one fixed value, each a positive quantity (or whole number)."""

    def one(v: Any, loc: tuple[int, ...]) -> float:
        try:
            if integer:
                if isinstance(v, bool) or not isinstance(v, (int, float)) or v != int(v):
                    raise BadValueError(f"{show(v)} is not a whole number; expected {what}")
                x = float(int(v))
            else:
                x = parse_quantity(v, kind, positive=True)[0]
            if (at_least is not None and x < at_least) or (at_most is not None and x > at_most):
                raise BadValueError(f"{show(v)} is out of range; expected {what}")
            return x
        except BadValueError as e:
            raise BadValueError(e.text, loc=loc) from None

    def check(v: Any) -> Span | None:
        if v is None:
            return None
        if isinstance(v, (list, tuple)):
            if len(v) != 2:
                raise BadValueError(
                    f"{show(v)} has {len(v)} items; expected [min, max] or one fixed value: {what}"
                )
            lower, upper = one(v[0], (0,)), one(v[1], (1,))
            if lower > upper:
                raise BadValueError(
                    f"{show(v)} has its bounds inverted; expected [min, max] with min <= max"
                )
            return Span(lower, upper)
        x = one(v, ())
        return Span(x, x)

    return PlainValidator(check)


def _name_list(v: Any) -> Any:
    return [v] if isinstance(v, (str, dict)) else v


def _material_tag(v: Any) -> str | None:
    if isinstance(v, str):
        return "<name>"
    if isinstance(v, (dict, CustomMaterial)):
        return "<custom>"
    return None


# ---------------------------------------------------------------- sections


class Section(BaseModel):
    """Base of every section: unknown keys are errors (a misspelt key is never ignored)."""

    model_config = ConfigDict(extra="forbid", arbitrary_types_allowed=True)


class Stagnation(Section):
    generations: int = Field(gt=0, description="a whole number of generations, such as 20")
    tolerance: float = Field(1e-4, gt=0, description="a relative hypervolume gain, such as 0.0001")


class BudgetSection(Section):
    method: Literal["auto", "nsga2", "nsga3", "sweep", "random"] = Field(
        "auto", description="one of auto, nsga2, nsga3, sweep, random"
    )
    population: int = Field(100, gt=0, description="a whole number of designs, such as 60")
    generations: int | None = Field(
        None, gt=0, description="a whole number of generations, such as 30 (or null)"
    )
    evaluations: int | None = Field(
        None, gt=0, description="a whole number of evaluated designs, such as 100000 (or null)"
    )
    wall_time: Annotated[float | None, _quantity("time", positive=True, optional=True)] = Field(
        None, description='a duration such as "8 h"'
    )
    stagnation: Stagnation | None = Field(
        None, description="{generations: 20, tolerance: 0.0001} (or null)"
    )
    checkpoint_every: int = Field(5, gt=0, description="a whole number of generations")
    sweep_points: int = Field(12, ge=2, description="points per real variable, 2 or more")
    workers: int = Field(1, gt=0, description="a whole number of local worker processes")
    dask_scheduler: str | None = Field(
        None,
        pattern=r"^[a-z]+://\S+$",
        description='a scheduler address such as "tcp://127.0.0.1:8786" (or null)',
    )


class ObjectiveItem(Section):
    sense: Literal["min", "max"]
    column: str

    @model_validator(mode="before")
    @classmethod
    def _from_file(cls, v: Any) -> Any:
        example = "{minimise: mass_kg}"
        if isinstance(v, str):
            raise BadValueError(
                f"{show(v)} has no sense; expected {{minimise: {v}}} or {{maximise: {v}}}"
            )
        if not isinstance(v, dict) or len(v) != 1:
            raise BadValueError(
                f"{show(v)} is not one key and a column; expected one key, "
                f"minimise or maximise, naming a column, such as {example}"
            )
        ((key, column),) = v.items()
        if key not in SENSES:
            hint = did_you_mean(str(key), list(SENSES))
            raise BadValueError(
                f'"{key}" is neither minimise nor maximise{hint}; expected '
                f"{example} or {{maximise: <column>}}",
                loc=(str(key),),
            )
        if not isinstance(column, str):
            raise BadValueError(
                f"{show(column)} is not a column name; expected a column such as mass_kg",
                loc=(str(key),),
            )
        return {"sense": SENSES[key], "column": column}


class StudySection(Section):
    name: str = Field(min_length=1, description='a name for the study, such as "inverter_sink"')
    seed: int = Field(0, ge=0, description="a whole number, 0 or more")
    objectives: list[ObjectiveItem] = Field(
        min_length=1,
        description="a list such as [{minimise: junction_temperature_K}, {minimise: mass_kg}]",
    )
    budget: BudgetSection = Field(
        default_factory=BudgetSection, description="the section with the search budget"
    )


Length = Annotated[float, _quantity("length", positive=True)]


class Envelope(Section):
    base_width: Length = Field(description='the base width across the flow, such as "120 mm"')
    flow_length: Length = Field(description='the base length along the flow, such as "150 mm"')
    max_height: Length = Field(
        description='the largest base thickness + fin height, such as "60 mm"'
    )


class CustomMaterial(Section):
    name: str = Field(min_length=1, description='a name such as "my_alloy"')
    conductivity: Annotated[float, _quantity("conductivity", positive=True)] = Field(
        description='a thermal conductivity such as "200 W/m/K"'
    )
    density: Annotated[float, _quantity("density", positive=True)] = Field(
        description='a density such as "2700 kg/m^3"'
    )


MaterialEntry = Annotated[
    Annotated[str, Tag("<name>")] | Annotated[CustomMaterial, Tag("<custom>")],
    Discriminator(_material_tag),
]

_LEN_SPAN = 'a length greater than zero such as "1.2 mm", or [min, max] such as ["1 mm", "3 mm"]'


class DesignSpace(Section):
    fin_count: Annotated[
        Span | None,
        _span(
            "number",
            integer=True,
            at_least=2,
            what="a whole number of fins, 2 or more, or [min, max] such as [10, 40]",
        ),
    ] = Field(None, description="a fin count such as 24, or [min, max] such as [10, 40]")
    fin_pitch: Annotated[Span | None, _span("length", what=_LEN_SPAN)] = Field(
        None, description='a fin pitch such as "5 mm", or ["3 mm", "8 mm"]'
    )
    fin_thickness_root: Annotated[Span | None, _span("length", what=_LEN_SPAN)] = Field(
        description='the fin thickness at the base, such as "2 mm" or ["1.2 mm", "3 mm"]'
    )
    fin_thickness_tip: Annotated[Span | None, _span("length", what=_LEN_SPAN)] = Field(
        None, description='the fin thickness at the tip, such as "1.2 mm" or ["1 mm", "2 mm"]'
    )
    fin_taper_ratio: Annotated[
        Span | None,
        _span(
            "number",
            at_most=1.0,
            what="a ratio tip/root thickness in (0, 1], or [min, max] such as [0.5, 1]",
        ),
    ] = Field(None, description="tip / root fin thickness, such as 0.6 or [0.4, 1]")
    fin_height: Annotated[Span | None, _span("length", what=_LEN_SPAN)] = Field(
        description='the fin height above the base, such as "30 mm" or ["20 mm", "50 mm"]'
    )
    base_thickness: Annotated[Span | None, _span("length", what=_LEN_SPAN)] = Field(
        description='the base plate thickness, such as "6 mm" or ["4 mm", "12 mm"]'
    )

    @model_validator(mode="after")
    def _one_of(self) -> DesignSpace:
        if (self.fin_count is None) == (self.fin_pitch is None):
            given = "both" if self.fin_count is not None else "neither"
            raise BadValueError(
                f"{given} of fin_count and fin_pitch given; expected exactly one "
                "(the fin spacing as a count or as a pitch)"
            )
        if self.fin_thickness_tip is not None and self.fin_taper_ratio is not None:
            raise BadValueError(
                "both fin_thickness_tip and fin_taper_ratio given; expected at "
                "most one (the tip as a thickness or as a ratio of the root)",
                loc=("fin_taper_ratio",),
            )
        return self


class Extruder(Section):
    max_height_to_gap: Annotated[float, _quantity("number", positive=True)] = Field(
        10.0, description="the largest fin height / root gap ratio, such as 10"
    )
    min_fin_thickness: Length = Field(0.001, description='a length such as "1 mm"')
    min_gap: Length = Field(0.002, description='a length such as "2 mm"')
    min_base_thickness: Length = Field(0.003, description='a length such as "3 mm"')
    root_fillet: Annotated[float, _quantity("length", nonnegative=True)] = Field(
        0.0005, description='a fillet radius such as "0.5 mm" (or "0 mm")'
    )
    tip_round: Annotated[float | None, PlainValidator(lambda v: _tip_round(v))] = Field(
        None, description='"full" (a half-round tip) or a corner radius such as "0.3 mm"'
    )


def _tip_round(v: Any) -> float | None:
    if v is None or v == "full":
        return None
    try:
        return parse_quantity(v, "length", nonnegative=True)[0]
    except BadValueError as e:
        raise BadValueError(e.text.replace("; expected", '; expected "full" or')) from None


class FanSection(Section):
    name: str = Field(min_length=1, description='a fan name such as "axial_92"')
    curve_units: tuple[str, str] | None = Field(
        None, description='[flow unit, pressure unit], such as ["CFM", "inH2O"]'
    )
    curve: tuple[tuple[float, float], ...] = Field(
        description='points [[flow, pressure], ...], such as [["0 CFM", "0.5 inH2O"], ...]'
    )
    count: int = Field(1, gt=0, description="a whole number of identical fans, such as 2")
    arrangement: Literal["parallel", "series"] = Field("parallel", description="parallel or series")
    rated_density: Annotated[float, _quantity("density", positive=True)] = Field(
        1.2, description='the air density the curve was measured at, such as "1.2 kg/m^3"'
    )
    power: Annotated[float | None, _quantity("power", nonnegative=True, optional=True)] = Field(
        None, description='the electrical input power of one fan, such as "6 W"'
    )

    @field_validator("curve_units", mode="plain")
    @classmethod
    def _units(cls, v: Any) -> tuple[str, str] | None:
        if v is None:
            return None
        if not isinstance(v, (list, tuple)) or len(v) != 2:
            raise BadValueError(
                f"{show(v)} is not two units; expected [flow unit, pressure unit] "
                'such as ["CFM", "inH2O"]'
            )
        for i, (unit, kind) in enumerate(zip(v, ("flow", "pressure"), strict=True)):
            if not isinstance(unit, str):
                raise BadValueError(f"{show(unit)} is not a unit; expected a {kind} unit", loc=(i,))
            try:
                parse_quantity(f"1 {unit}", kind)
            except BadValueError as e:
                raise BadValueError(e.text.replace('"1 ', '"', 1), loc=(i,)) from None
        return (v[0], v[1])

    @field_validator("curve", mode="plain")
    @classmethod
    def _curve(cls, v: Any, info: ValidationInfo) -> tuple[tuple[float, float], ...]:
        units = info.data.get("curve_units")
        if not isinstance(v, (list, tuple)) or len(v) < 3:
            raise BadValueError(
                f"{show(v)} is not a list of points; expected at least three "
                'points [flow, pressure], such as [["0 CFM", "0.5 inH2O"], '
                '["20 CFM", "0.3 inH2O"], ["40 CFM", "0 inH2O"]]'
            )
        points = []
        for i, p in enumerate(v):
            if not isinstance(p, (list, tuple)) or len(p) != 2:
                raise BadValueError(
                    f"{show(p)} is not a point; expected [flow, pressure]", loc=(i,)
                )
            pair = []
            for j, (item, kind) in enumerate(zip(p, ("flow", "pressure"), strict=True)):
                if (
                    units is not None
                    and isinstance(item, (int, float))
                    and not isinstance(item, bool)
                ):
                    item = f"{item!r} {units[j]}"
                try:
                    pair.append(parse_quantity(item, kind, nonnegative=True)[0])
                except BadValueError as e:
                    raise BadValueError(e.text, loc=(i, j), label=f"[{i}].{kind}") from None
            points.append((pair[0], pair[1]))
        for i in range(1, len(points)):
            (q0, p0), (q1, p1) = points[i - 1], points[i]
            if q1 <= q0:
                raise BadValueError(
                    f"{show(v[i])}: the flow does not rise above the previous "
                    f"point's; expected flow strictly increasing along the curve",
                    loc=(i,),
                )
            if p1 >= p0:
                raise BadValueError(
                    f"{show(v[i])}: the pressure does not fall below the previous "
                    "point's; expected pressure strictly falling as flow rises "
                    "(leave out the stall region of the curve)",
                    loc=(i,),
                )
        try:  # the model's own rules for a usable curve, whatever they become
            validate_fan_curve([q for q, _ in points], [p for _, p in points])
        except ValueError as e:
            raise BadValueError(f"{show(v)} is not a usable fan curve ({e})") from None
        return tuple(points)


class Bypass(Section):
    top: Annotated[float, _quantity("length", nonnegative=True)] = Field(
        0.0, description='the clearance above the fin tips, such as "5 mm" (0 = ducted)'
    )
    side: Annotated[float, _quantity("length", nonnegative=True)] = Field(
        0.0, description='the clearance beside each outer fin, such as "3 mm" (0 = ducted)'
    )


_ALTITUDE = 'an altitude from "-500 m" to "11000 m", such as "2000 m"'


class Air(Section):
    ambient: Annotated[float, _quantity("temperature")] = Field(
        description='the ambient (inlet) air temperature, such as "40 degC"'
    )
    altitude: Annotated[
        float | None,
        _quantity("length", optional=True, lo=-500.0, hi=11000.0, what=_ALTITUDE),
    ] = Field(None, description=_ALTITUDE)
    pressure: Annotated[float | None, _quantity("pressure", positive=True, optional=True)] = Field(
        None, description='the ambient pressure, such as "101.325 kPa"'
    )
    fans: list[FanSection] | None = Field(
        None, description="a list of fans, each {name, curve, count, arrangement, ...}"
    )
    candidates: list[str] | None = Field(
        None, description="a list of names from air.fans, such as [axial_92, blower_60]"
    )
    flow: Annotated[float | None, _quantity("flow", positive=True, optional=True)] = Field(
        None, description='a fixed air flow such as "30 CFM"'
    )
    approach_velocity: Annotated[
        float | None, _quantity("velocity", positive=True, optional=True)
    ] = Field(None, description='a fixed approach velocity such as "2.5 m/s"')
    system_impedance: Annotated[float, PlainValidator(lambda v: _impedance(v))] = Field(
        0.0, description='a k such as "5e5 Pa/(m^3/s)^2", or a point such as "25 Pa at 30 CFM"'
    )
    bypass_clearance: Bypass = Field(
        default_factory=Bypass, description="{top: length, side: length}"
    )
    fin_tips: Literal["shrouded", "open"] | None = Field(None, description="shrouded or open")

    @model_validator(mode="after")
    def _cross(self) -> Air:
        given = [k for k in ("fans", "flow", "approach_velocity") if getattr(self, k) is not None]
        if len(given) != 1:
            which = ", ".join(given) if given else "none"
            raise BadValueError(
                f"gives {which}; expected exactly one of fans, flow or "
                "approach_velocity (how the air is driven)"
            )
        if self.altitude is not None and self.pressure is not None:
            raise BadValueError(
                "gives both altitude and pressure; expected one of them", loc=("pressure",)
            )
        if self.candidates is not None and self.fans is None:
            raise BadValueError(
                "candidates given without fans; expected candidates only with air.fans",
                loc=("candidates",),
            )
        if self.fans is not None:
            names = [f.name for f in self.fans]
            for i, n in enumerate(names):
                if n in names[:i]:
                    raise BadValueError(
                        f'"{n}" names two fans; expected each fan name once',
                        loc=("fans", i, "name"),
                    )
            for i, c in enumerate(self.candidates or []):
                if c not in names:
                    raise BadValueError(
                        f'"{c}" is not a fan in air.fans{did_you_mean(c, names)}; '
                        f"expected one of: {', '.join(names)}",
                        loc=("candidates", i),
                    )
            if self.candidates is not None and not self.candidates:
                raise BadValueError("is empty; expected at least one fan name", loc=("candidates",))
        if self.fin_tips == "shrouded" and self.bypass_clearance.top > 0:
            raise BadValueError(
                "is shrouded while air.bypass_clearance.top is above zero; "
                "expected open (a shroud on the tips leaves no clearance above "
                "them) or a top clearance of 0 mm",
                loc=("fin_tips",),
            )
        return self


def _impedance(v: Any) -> float:
    """k in Pa/(m^3/s)^2, or a point "X Pa at Y CFM" turned into k = X / Y^2."""
    if isinstance(v, str) and " at " in v:
        dp_text, q_text = v.split(" at ", 1)
        try:
            dp = parse_quantity(dp_text.strip(), "pressure", nonnegative=True)[0]
            q = parse_quantity(q_text.strip(), "flow", positive=True)[0]
        except BadValueError as e:
            raise BadValueError(f"{show(v)}: {e.text}") from None
        return float(f"{dp / (q * q):.15g}")
    return parse_quantity(v, "impedance", nonnegative=True)[0]


Finish = Literal[tuple(EMISSIVITY)]  # type: ignore[valid-type]


class Surface(Section):
    finish: Finish = Field(  # type: ignore[valid-type]
        "bare_aluminium", description="one of " + ", ".join(EMISSIVITY)
    )
    emissivity: Annotated[
        float | None,
        _quantity("number", optional=True, lo=0.0, hi=1.0, what="a number from 0 to 1"),
    ] = Field(None, description="a number from 0 to 1 (overrides the finish's typical value)")


_NAME = r"^[A-Za-z][A-Za-z0-9_]*$"


class Source(Section):
    name: str | None = Field(
        None,
        pattern=_NAME,
        description="a name of letters, digits and _ starting with a letter, such as igbt_1",
    )
    power: Annotated[float, _quantity("power", positive=True)] = Field(
        description='the heat it dissipates, such as "150 W"'
    )
    footprint: Annotated[
        tuple[float, float],
        _pair(
            "length",
            positive=True,
            what='[length along the flow, width across it], such as ["40 mm", "30 mm"]',
        ),
    ] = Field(description='[length along the flow, width across it], such as ["40 mm", "30 mm"]')
    position: Annotated[
        tuple[float, float] | None,
        _pair(
            "length",
            nonnegative=True,
            optional=True,
            what="[centre from the inlet edge, centre from the left edge], such as "
            '["50 mm", "60 mm"]',
        ),
    ] = Field(None, description="[centre from the inlet edge, centre from the left edge]")
    interface_resistance: Annotated[
        tuple[float, str], _with_kind(("area_resistance", "thermal_resistance"))
    ] = Field(
        (0.0, "area_resistance"),
        description='"0.3 K*cm^2/W" (per area) or "0.05 K/W" (for the footprint)',
    )
    junction_to_case: Annotated[float, _quantity("thermal_resistance", nonnegative=True)] = Field(
        0.0, description='a thermal resistance such as "0.12 K/W"'
    )
    max_junction: Annotated[float, _quantity("temperature")] = Field(
        description='the highest allowed junction temperature, such as "150 degC"'
    )


class Limit(Section):
    column: str = Field(description="a column of the results, such as fin_tip_temperature_K")
    at_most: Any = Field(None, description='a limit in the column\'s unit, such as "60 Pa"')
    at_least: Any = Field(None, description='a limit in the column\'s unit, such as "5 K"')

    @model_validator(mode="before")
    @classmethod
    def _from_text(cls, v: Any) -> Any:
        if isinstance(v, str):
            m = re.match(r"^\s*([A-Za-z_][A-Za-z0-9_]*)\s*(<=|>=|≤|≥)\s*(.+?)\s*$", v)
            if not m:
                raise BadValueError(
                    f'{show(v)} is not a limit; expected "<column> <= <value>" or '
                    '"<column> >= <value>", such as "pressure_drop_Pa <= 60 Pa"'
                )
            key = "at_most" if m.group(2) in ("<=", "≤") else "at_least"
            value: Any = m.group(3)
            try:
                value = float(value)
            except ValueError:
                pass
            return {"column": m.group(1), key: value}
        return v

    @model_validator(mode="after")
    def _some(self) -> Limit:
        if self.at_most is None and self.at_least is None:
            raise BadValueError("has no limit; expected at_most, at_least or both")
        return self


class Constraints(Section):
    max_mass: Annotated[float | None, _quantity("mass", positive=True, optional=True)] = Field(
        None, description='a mass such as "1.2 kg"'
    )
    max_pressure_drop: Annotated[
        float | None, _quantity("pressure", positive=True, optional=True)
    ] = Field(None, description='a pressure such as "60 Pa"')
    max_outlet_temperature: Annotated[float | None, _quantity("temperature", optional=True)] = (
        Field(None, description='a temperature such as "70 degC"')
    )
    min_junction_margin: Annotated[float, _quantity("temperature_difference")] = Field(
        0.0, description='a temperature difference such as "5 K"'
    )
    limits: list[Limit] = Field(
        default_factory=list,
        description='a list such as ["fin_tip_temperature_K <= 20 K", '
        "{column: reynolds_number, at_most: 2300}]",
    )


class ScenarioSection(Section):
    name: str = Field(min_length=1, description='a scenario name such as "hot_altitude"')
    ambient: Annotated[float | None, _quantity("temperature", optional=True)] = Field(
        None, description='the ambient temperature, such as "55 degC"'
    )
    altitude: Annotated[
        float | None,
        _quantity("length", optional=True, lo=-500.0, hi=11000.0, what=_ALTITUDE),
    ] = Field(None, description=_ALTITUDE)
    pressure: Annotated[float | None, _quantity("pressure", positive=True, optional=True)] = Field(
        None, description='the ambient pressure, such as "80 kPa"'
    )
    power_scale: Annotated[float, _quantity("number", positive=True)] = Field(
        1.0, description='a factor on every source power, such as 1.2 or "120 %"'
    )
    fan_speed: Annotated[float, _quantity("number", positive=True)] = Field(
        1.0, description='fan speed / rated speed, such as 0.8 or "80 %"'
    )
    fan_stopped: bool = Field(False, description="true or false")

    @model_validator(mode="after")
    def _cross(self) -> ScenarioSection:
        if self.altitude is not None and self.pressure is not None:
            raise BadValueError(
                "gives both altitude and pressure; expected one of them", loc=("pressure",)
            )
        if self.fan_stopped and self.fan_speed != 1.0:
            raise BadValueError(
                "gives a fan_speed with the fan stopped; expected one of them", loc=("fan_speed",)
            )
        return self


class StudyFile(Section):
    """The whole study file."""

    study: StudySection = Field(description="the section with name, seed, objectives, budget")
    envelope: Envelope = Field(description="the section with base_width, flow_length, max_height")
    material: Annotated[list[MaterialEntry], BeforeValidator(_name_list)] = Field(
        default_factory=lambda: ["6063-T5"],
        min_length=1,
        description='a material name such as "6063-T5", a list of names, or '
        "{name, conductivity, density}",
    )
    design_space: DesignSpace = Field(
        description="the section with fin_count or fin_pitch, fin_thickness_root, fin_height, "
        "base_thickness"
    )
    extruder: Extruder = Field(
        default_factory=Extruder, description="the section with the extruder's limits"
    )
    air: Air = Field(description="the section with ambient and fans, flow or approach_velocity")
    surface: Surface = Field(default_factory=Surface, description="{finish, emissivity}")
    sources: list[Source] = Field(
        min_length=1,
        description="a list of heat sources, each {name, power, footprint, max_junction, ...}",
    )
    constraints: Constraints = Field(
        default_factory=Constraints, description="the section with limits on the results"
    )
    scenarios: list[ScenarioSection] | None = Field(
        None, min_length=1, description="a list of scenarios, each {name, ambient, ...}"
    )
