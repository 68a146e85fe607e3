"""Load a study file (YAML) into a validated :class:`optim.study_types.Study` in SI units.

``load_study(path_or_dict)`` reads the YAML (a YAML 1.2-like reading: ``1e-3`` is a number,
``012`` is twelve, ``no`` is text; a key given twice is an error), validates every section
against :mod:`optim.study_schema`, converts quantities to SI once, checks what needs several
sections at once, and returns the :class:`Study`. Anything wrong raises :class:`StudyError`
whose message is one line: the key path, the bad value, what was expected, and the line of the
file where it is known, e.g.::

    air.fans[1].curve[2].flow: "35 mm" is a length; expected a volumetric flow such as
    "35 CFM" (line 31)

(printed on one line).

``Study.resolved`` is the study as a plain dict with every default filled in; loading it again
gives the same Study.
"""

from __future__ import annotations

import math
import re
from dataclasses import replace
from pathlib import Path
from typing import Any

import yaml
from pydantic import BaseModel, ValidationError

from models.air import pressure_at_altitude
from models.columns import COLUMNS, PER_SOURCE
from models.contract import AirSupply, Conditions, FanCurve, HeatSource
from models.materials import EMISSIVITY, MATERIALS
from optim.study_schema import (
    Air,
    BudgetSection,
    CustomMaterial,
    Span,
    StudyFile,
    did_you_mean,
)
from optim.study_types import (
    Budget,
    Constraint,
    Material,
    Objective,
    Scenario,
    Study,
    Variable,
)
from optim.units import BadValueError, StudyError, format_quantity, parse_quantity, show

__all__ = [
    "StudyError",
    "column_kind",
    "known_materials",
    "load_study",
    "numeric_columns",
]

Loc = tuple[str | int, ...]

# ---------------------------------------------------------------- materials


def known_materials() -> dict[str, Material]:
    """The materials a study may name, from ``models.materials.MATERIALS`` (SI values)."""
    return {
        name: Material(name, m.conductivity_W_per_mK, m.density_kg_per_m3)
        for name, m in MATERIALS.items()
    }


# ---------------------------------------------------------------- columns


def numeric_columns(source_names: list[str] | tuple[str, ...] = ()) -> list[str]:
    """Columns of ``models.evaluate``'s table a study may optimise or limit (not bool/text)."""
    cols = [c for c, d in COLUMNS.items() if not d.endswith(("(bool)", "(text)"))]
    for s in source_names:
        cols += [pattern.format(s=s) for pattern in PER_SOURCE]
    return cols


_ABSOLUTE_T = re.compile(r"^(outlet|base|junction)_temperature(_.+)?_K$")
_SUFFIX_KINDS = (
    ("_K_per_W", "thermal_resistance"),
    ("_W_per_m2K", "htc"),
    ("_m3_per_s", "flow"),
    ("_m_per_s", "velocity"),
    ("_m2", "area"),
    ("_kg", "mass"),
    ("_Pa", "pressure"),
    ("_W", "power"),
    ("_m", "length"),
    ("_K", "temperature_difference"),
)


def column_kind(column: str) -> str:
    """The kind of quantity (:data:`optim.units.KINDS`) of a column, from its unit suffix.

    Absolute temperatures (junction, base, outlet) are ``temperature``; other ``_K`` columns
    (margins, rises, fin tip above the base) are ``temperature_difference``.
    """
    if _ABSOLUTE_T.match(column):
        return "temperature"
    for suffix, kind in _SUFFIX_KINDS:
        if column.endswith(suffix):
            return kind
    return "number"


# ---------------------------------------------------------------- YAML


class _DuplicateKeyError(Exception):
    def __init__(self, key: Any, line: int):
        super().__init__(key, line)
        self.key, self.line = key, line


class _Loader(yaml.SafeLoader):
    """SafeLoader reading numbers and booleans the YAML 1.2 way, refusing duplicate keys."""

    def construct_mapping(self, node: yaml.MappingNode, deep: bool = False) -> dict:
        seen: set = set()
        for key_node, _ in node.value:
            if isinstance(key_node, yaml.ScalarNode):
                key = self.construct_object(key_node, deep=deep)
                try:
                    if key in seen:
                        raise _DuplicateKeyError(key, key_node.start_mark.line + 1)
                    seen.add(key)
                except TypeError:
                    pass
        return super().construct_mapping(node, deep=deep)


_DROP = {"tag:yaml.org,2002:bool", "tag:yaml.org,2002:int", "tag:yaml.org,2002:float"}
_Loader.yaml_implicit_resolvers = {
    ch: [(tag, rx) for tag, rx in lst if tag not in _DROP]
    for ch, lst in yaml.SafeLoader.yaml_implicit_resolvers.items()
}
_Loader.add_implicit_resolver(
    "tag:yaml.org,2002:bool", re.compile(r"^(?:true|True|TRUE|false|False|FALSE)$"), list("tTfF")
)
_Loader.add_implicit_resolver(
    "tag:yaml.org,2002:int", re.compile(r"^[-+]?[0-9]+$"), list("-+0123456789")
)
_Loader.add_implicit_resolver(
    "tag:yaml.org,2002:float",
    re.compile(
        r"^(?:[-+]?(?:\.[0-9]+|[0-9]+(?:\.[0-9]*)?)(?:[eE][-+]?[0-9]+)?"
        r"|[-+]?\.(?:inf|Inf|INF)|\.(?:nan|NaN|NAN))$"
    ),
    list("-+0123456789."),
)
_Loader.add_constructor(
    "tag:yaml.org,2002:int", lambda loader, node: int(loader.construct_scalar(node), 10)
)


def _line_map(node: yaml.Node | None, loc: Loc = (), out: dict | None = None) -> dict:
    out = {} if out is None else out
    if isinstance(node, yaml.MappingNode):
        for k, v in node.value:
            sub = loc + (k.value,) if isinstance(k, yaml.ScalarNode) else loc
            out.setdefault(sub, k.start_mark.line + 1)
            _line_map(v, sub, out)
    elif isinstance(node, yaml.SequenceNode):
        for i, v in enumerate(node.value):
            out.setdefault(loc + (i,), v.start_mark.line + 1)
            _line_map(v, loc + (i,), out)
    return out


def parse_yaml(text: str) -> tuple[Any, dict[Loc, int]]:
    """Return (data, line of each key path) of a study file's text; raise StudyError."""
    loader = _Loader(text)
    try:
        node = loader.get_single_node()
        data = loader.construct_document(node) if node is not None else None
    except _DuplicateKeyError as e:
        raise StudyError(
            f"line {e.line}: key {show(e.key)} appears twice in the same section; "
            "expected each key once"
        ) from None
    except yaml.YAMLError as e:
        mark = getattr(e, "problem_mark", None)
        where = f"line {mark.line + 1}, column {mark.column + 1}: " if mark else ""
        problem = getattr(e, "problem", None) or str(e).splitlines()[0]
        raise StudyError(
            f"{where}not valid YAML ({problem}); expected YAML: check the "
            "indentation (spaces, no tabs) and quote values that contain "
            '": " or start with a special character'
        ) from None
    finally:
        loader.dispose()
    return data, _line_map(node)


# ---------------------------------------------------------------- error messages


def _path(loc: Loc) -> str:
    out = ""
    for p in loc:
        if isinstance(p, int):
            out += f"[{p}]"
        elif not str(p).startswith("<"):
            out += ("." if out else "") + str(p)
    return out or "study file"


class _Ctx:
    """Key-path errors with the line of the file where the key is (when read from a file)."""

    def __init__(self, lines: dict[Loc, int]):
        self.lines = lines

    def line(self, loc: Loc) -> str:
        loc = tuple(p for p in loc if not (isinstance(p, str) and p.startswith("<")))
        for n in range(len(loc), 0, -1):
            if loc[:n] in self.lines:
                return f" (line {self.lines[loc[:n]]})"
        return ""

    def fail(self, loc: Loc, text: str, label: str = "") -> StudyError:
        return StudyError(f"{_path(loc)}{label}: {text}{self.line(loc)}")


def _inner_model(annotation: Any) -> type[BaseModel] | None:
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return annotation
    for arg in getattr(annotation, "__args__", ()) or ():
        found = _inner_model(arg)
        if found is not None:
            return found
    origin = getattr(annotation, "__origin__", None)
    if origin is not None and origin is not annotation:
        return _inner_model(origin)
    return None


def _walk(loc: Loc) -> tuple[type[BaseModel] | None, Any]:
    """The schema model at ``loc`` and the FieldInfo of its last key."""
    model: type[BaseModel] | None = StudyFile
    info = None
    for p in loc:
        if isinstance(p, int) or str(p).startswith("<"):
            continue
        if model is None or p not in model.model_fields:
            return None, None
        info = model.model_fields[p]
        model = _inner_model(info.annotation)
    return model, info


def _expectation(loc: Loc) -> str:
    _, info = _walk(loc)
    return info.description if info is not None and info.description else "a valid value"


_TYPE_WORDS = {
    "int_type": "is not a whole number",
    "int_parsing": "is not a whole number",
    "int_from_float": "is not a whole number",
    "float_type": "is not a number",
    "float_parsing": "is not a number",
    "bool_type": "is not true or false",
    "bool_parsing": "is not true or false",
    "string_type": "is not text",
    "list_type": "is not a list",
    "tuple_type": "is not a list",
    "model_type": "is not a section of keys",
    "model_attributes_type": "is not a section of keys",
    "dict_type": "is not a section of keys",
    "string_too_short": "is empty",
    "string_pattern_mismatch": "is not allowed here",
    "too_short": "has too few items",
    "too_long": "has too many items",
    "union_tag_invalid": "is neither a name nor a section",
    "union_tag_not_found": "is neither a name nor a section",
}


def _message(err: dict, ctx: _Ctx) -> str:
    loc: Loc = tuple(err["loc"])
    kind = err["type"]
    value = err.get("input")
    if kind == "value_error" and isinstance(err.get("ctx", {}).get("error"), BadValueError):
        e: BadValueError = err["ctx"]["error"]
        return f"{_path(loc)}{e.label}: {e.text}{ctx.line(loc + e.loc)}"
    if kind == "missing":
        return f"{_path(loc)}: missing; expected {_expectation(loc)}{ctx.line(loc)}"
    if kind == "extra_forbidden":
        parent, _ = _walk(loc[:-1])
        keys = list(parent.model_fields) if parent is not None else []
        hint = did_you_mean(str(loc[-1]), keys)
        expected = f"; expected one of: {', '.join(keys)}"
        return f"{_path(loc)}: unknown key{hint}{expected}{ctx.line(loc)}"
    if kind == "literal_error":
        allowed = re.findall(r"'([^']*)'", err["ctx"]["expected"])
        hint = did_you_mean(str(value), allowed)
        return (
            f"{_path(loc)}: {show(value)} is not allowed{hint}; expected one of: "
            f"{', '.join(allowed)}{ctx.line(loc)}"
        )
    if kind in ("greater_than", "greater_than_equal", "less_than", "less_than_equal"):
        return (
            f"{_path(loc)}: {show(value)} is out of range; expected {_expectation(loc)}"
            f"{ctx.line(loc)}"
        )
    words = _TYPE_WORDS.get(kind)
    if words:
        return f"{_path(loc)}: {show(value)} {words}; expected {_expectation(loc)}{ctx.line(loc)}"
    text = str(err.get("msg", kind)).removeprefix("Value error, ")
    return f"{_path(loc)}: {show(value)}: {text}{ctx.line(loc)}"


def _translate(exc: ValidationError, ctx: _Ctx) -> StudyError:
    errors = exc.errors()
    # A misspelt key also makes its right spelling "missing": report the misspelling first.
    errors.sort(key=lambda e: e["type"] != "extra_forbidden")
    return StudyError(_message(errors[0], ctx))


# ---------------------------------------------------------------- loading


def load_study(source: str | Path | dict) -> Study:
    """Return the validated :class:`Study` (SI) of a study file, YAML text or dict.

    ``source``: a path (``str`` without a newline, or ``Path``) to a YAML file; YAML text (a
    ``str`` with a newline); or the already-parsed dict. Raises :class:`StudyError` with a
    one-line message (key path, bad value, expectation, and the line when read from YAML).
    """
    path: str | None = None
    if isinstance(source, dict):
        data, lines = source, {}
    else:
        if isinstance(source, Path) or "\n" not in source:
            p = Path(source)
            try:
                text = p.read_text(encoding="utf-8")
            except FileNotFoundError:
                raise StudyError(f"{p}: no such file; expected a study file (YAML)") from None
            except (OSError, UnicodeDecodeError) as e:
                raise StudyError(
                    f"{p}: cannot be read ({e}); expected a study file (YAML)"
                ) from None
            path = str(p)
        else:
            text = source
        data, lines = parse_yaml(text)
    ctx = _Ctx(lines)
    if not isinstance(data, dict):
        raise StudyError(
            f"study file: {show(data) if data is not None else 'empty'}; expected "
            "a mapping with the sections study, envelope, design_space, air, "
            "sources (and optionally material, extruder, surface, constraints, "
            "scenarios)"
        )
    try:
        sf = StudyFile.model_validate(data)
    except ValidationError as e:
        raise _translate(e, ctx) from None
    study = _Builder(sf, data, ctx).build()
    return replace(study, source_path=path)


class _Builder:
    """Cross-section checks and the construction of the Study and its resolved dict."""

    def __init__(self, sf: StudyFile, raw: dict, ctx: _Ctx):
        self.sf, self.raw, self.ctx = sf, raw, ctx

    def fail(self, loc: Loc, text: str, label: str = "") -> StudyError:
        return self.ctx.fail(loc, text, label)

    def build(self) -> Study:
        sf = self.sf
        materials = self._materials()
        sources = self._sources()
        fans, fan_names = self._fans()
        scenarios, scenario_rows = self._scenarios(sources, fans)
        spans = self._design_space()
        variables, fixed = self._variables(spans, materials, fan_names)
        objectives = self._objectives([s.name for s in sources])
        constraints = self._constraints(spans, [s.name for s in sources])
        budget = self._budget()
        study = Study(
            name=sf.study.name,
            seed=sf.study.seed,
            variables=variables,
            fixed=fixed,
            objectives=objectives,
            constraints=constraints,
            budget=budget,
            scenarios=scenarios,
            materials=tuple(materials),
            fan_names=fan_names,
            base_width_m=sf.envelope.base_width,
            flow_length_m=sf.envelope.flow_length,
            max_height_m=sf.envelope.max_height,
            root_fillet_m=sf.extruder.root_fillet,
            tip_radius_m=sf.extruder.tip_round,
        )
        resolved = self._resolved(materials, sources, spans, scenario_rows, budget)
        return replace(study, resolved=resolved)

    # ------------------------------------------------------------ materials

    def _materials(self) -> list[Material]:
        known = known_materials()
        as_list = isinstance(self.raw.get("material"), list)
        out: list[Material] = []
        for i, entry in enumerate(self.sf.material):
            loc: Loc = ("material", i) if as_list else ("material",)
            if isinstance(entry, CustomMaterial):
                m = Material(entry.name, entry.conductivity, entry.density)
            elif entry in known:
                m = known[entry]
            else:
                names = sorted(known)
                raise self.fail(
                    loc,
                    f"{show(entry)} is not a material finfront knows"
                    f"{did_you_mean(entry, names)}; expected one of: "
                    f"{', '.join(names)}, or a custom "
                    "{name, conductivity, density}",
                )
            if any(o.name == m.name for o in out):
                raise self.fail(loc, f"{show(m.name)} is listed twice; expected each material once")
            out.append(m)
        return out

    # ------------------------------------------------------------ sources

    def _sources(self) -> list[HeatSource]:
        W, L = self.sf.envelope.base_width, self.sf.envelope.flow_length
        out: list[HeatSource] = []
        for i, s in enumerate(self.sf.sources):
            name = s.name or f"source_{i + 1}"
            if any(o.name == name for o in out):
                raise self.fail(
                    ("sources", i, "name"),
                    f"{show(name)} names two sources; expected each source name once",
                )
            length, width = s.footprint
            if length > L + 1e-12 or width > W + 1e-12:
                raise self.fail(
                    ("sources", i, "footprint"),
                    f"{_mm2(s.footprint)} is larger than the base "
                    f"({_mm(L)} along the flow x {_mm(W)} across); expected a "
                    "footprint that fits on the base",
                )
            x, y = s.position if s.position is not None else (L / 2.0, W / 2.0)
            if (
                x - length / 2 < -1e-12
                or x + length / 2 > L + 1e-12
                or y - width / 2 < -1e-12
                or y + width / 2 > W + 1e-12
            ):
                raise self.fail(
                    ("sources", i, "position"),
                    f"{_mm2((x, y))} puts the {_mm2(s.footprint)} footprint off "
                    f"the {_mm(L)} x {_mm(W)} base; expected a centre from "
                    f"{_mm(length / 2)} to {_mm(L - length / 2)} along the flow "
                    f"and from {_mm(width / 2)} to {_mm(W - width / 2)} across",
                )
            r_value, r_kind = s.interface_resistance
            r_area = r_value if r_kind == "area_resistance" else r_value * length * width
            src = HeatSource(
                power_W=s.power,
                length_m=length,
                width_m=width,
                x_m=_r15(x),
                y_m=_r15(y),
                interface_resistance_K_m2_per_W=_r15(r_area),
                junction_to_case_K_per_W=s.junction_to_case,
                max_junction_temperature_K=s.max_junction,
                name=name,
            )
            for j, o in enumerate(out):
                ox = min(src.x_m + length / 2, o.x_m + o.length_m / 2) - max(
                    src.x_m - length / 2, o.x_m - o.length_m / 2
                )
                oy = min(src.y_m + width / 2, o.y_m + o.width_m / 2) - max(
                    src.y_m - width / 2, o.y_m - o.width_m / 2
                )
                if ox > 1e-9 and oy > 1e-9:
                    raise self.fail(
                        ("sources", i, "position"),
                        f"{_mm2((src.x_m, src.y_m))} makes {show(name)} overlap "
                        f"sources[{j}] ({show(o.name)}) by {_mm(ox)} x {_mm(oy)}; "
                        "expected footprints that do not overlap",
                    )
            out.append(src)
        return out

    # ------------------------------------------------------------ air and scenarios

    def _fans(self) -> tuple[tuple[FanCurve, ...], tuple[str, ...]]:
        air = self.sf.air
        if air.fans is None:
            return (), ()
        wanted = air.candidates if air.candidates is not None else [f.name for f in air.fans]
        fans = []
        for f in air.fans:
            if f.name in wanted:
                fans.append(
                    FanCurve(
                        flow_m3_per_s=tuple(q for q, _ in f.curve),
                        pressure_Pa=tuple(p for _, p in f.curve),
                        name=f.name,
                        count=f.count,
                        arrangement=f.arrangement,
                        rated_density_kg_per_m3=f.rated_density,
                        power_W=f.power,
                    )
                )
        fans.sort(key=lambda c: wanted.index(c.name))
        return tuple(fans), tuple(c.name for c in fans)

    def _scenarios(
        self, sources: list[HeatSource], fans: tuple[FanCurve, ...]
    ) -> tuple[tuple[Scenario, ...], list[dict]]:
        air = self.sf.air
        rows = self.sf.scenarios
        if rows is None:
            entries = [
                dict(
                    name="nominal",
                    ambient=None,
                    altitude=None,
                    pressure=None,
                    power_scale=1.0,
                    fan_speed=1.0,
                    fan_stopped=False,
                )
            ]
        else:
            entries = [r.model_dump() for r in rows]
        out, resolved = [], []
        for i, e in enumerate(entries):
            loc: Loc = ("scenarios", i)
            if any(o.name == e["name"] for o in out):
                raise self.fail(
                    loc + ("name",),
                    f"{show(e['name'])} names two scenarios; expected each scenario name once",
                )
            if i == 0 and e["fan_stopped"]:
                raise self.fail(
                    loc + ("fan_stopped",),
                    "true in the first scenario; expected "
                    "the nominal scenario first (the objectives are taken from it) "
                    "and the fan-stopped check after it",
                )
            if e["fan_speed"] != 1.0 and air.fans is None:
                raise self.fail(
                    loc + ("fan_speed",),
                    f"{e['fan_speed']!r} without fans; "
                    "expected fan_speed only when air.fans is given",
                )
            ambient = e["ambient"] if e["ambient"] is not None else air.ambient
            altitude, pressure = e["altitude"], e["pressure"]
            if altitude is None and pressure is None:
                altitude, pressure = air.altitude, air.pressure
                if altitude is None and pressure is None:
                    altitude = 0.0
            if pressure is None:
                pressure_used = _r15(float(pressure_at_altitude(altitude)))
            else:
                pressure_used = pressure
            for j, s in enumerate(sources):
                if s.max_junction_temperature_K <= ambient:
                    raise self.fail(
                        ("sources", j, "max_junction"),
                        f"{show(format_quantity(s.max_junction_temperature_K, 'temperature'))} is "
                        f"not above the ambient of scenario {show(e['name'])} "
                        f"({format_quantity(ambient, 'temperature')}); expected a limit above "
                        "every ambient",
                    )
            scale, speed = e["power_scale"], e["fan_speed"]
            scaled = tuple(replace(s, power_W=_r15(s.power_W * scale)) for s in sources)
            if e["fan_stopped"]:
                supply = AirSupply(mode="stopped", fans=fans)
            elif air.fans is not None:
                supply = AirSupply(mode="fan", fans=tuple(_fan_law(f, speed) for f in fans))
            elif air.flow is not None:
                supply = AirSupply(mode="flow", flow_m3_per_s=air.flow)
            else:
                supply = AirSupply(mode="velocity", velocity_m_per_s=air.approach_velocity)
            conditions = Conditions(
                ambient_temperature_K=ambient,
                ambient_pressure_Pa=pressure_used,
                supply=supply,
                sources=scaled,
                system_impedance_Pa_s2_per_m6=air.system_impedance,
                fin_tip="convective" if _fin_tips(air) == "open" else "shrouded",
                clearance_top_m=air.bypass_clearance.top,
                clearance_side_m=air.bypass_clearance.side,
                surface_emissivity=_emissivity(self.sf),
                extras={"altitude_m": altitude, "power_scale": scale, "fan_speed": speed},
            )
            out.append(Scenario(name=e["name"], conditions=conditions))
            row: dict[str, Any] = {
                "name": e["name"],
                "ambient": format_quantity(ambient, "temperature"),
            }
            if altitude is not None:
                row["altitude"] = format_quantity(altitude, "length", "m")
            else:
                row["pressure"] = format_quantity(pressure, "pressure")
            row.update(power_scale=scale, fan_speed=speed, fan_stopped=e["fan_stopped"])
            resolved.append(row)
        return tuple(out), resolved

    # ------------------------------------------------------------ design space

    def _design_space(self) -> dict[str, Span]:
        ds, ex = self.sf.design_space, self.sf.extruder
        spans: dict[str, Span] = {}
        for key in (
            "fin_count",
            "fin_pitch",
            "fin_thickness_root",
            "fin_thickness_tip",
            "fin_taper_ratio",
            "fin_height",
            "base_thickness",
        ):
            span = getattr(ds, key)
            if span is not None:
                spans[key] = span
        for key, minimum, label in (
            ("fin_thickness_root", ex.min_fin_thickness, "extruder.min_fin_thickness"),
            ("fin_thickness_tip", ex.min_fin_thickness, "extruder.min_fin_thickness"),
            ("base_thickness", ex.min_base_thickness, "extruder.min_base_thickness"),
        ):
            if key in spans:
                spans[key] = self._tighten(key, spans[key], minimum, label)
        if "fin_taper_ratio" in spans:
            r, t = spans["fin_taper_ratio"], spans["fin_thickness_root"]
            if r.upper * t.upper < ex.min_fin_thickness * (1 - 1e-12):
                raise self.fail(
                    ("design_space", "fin_taper_ratio"),
                    f"{_span_text(r, 'number')} cannot be met: even the thickest "
                    f"root ({_mm(t.upper)}) at ratio {r.upper:g} gives a "
                    f"{_mm(r.upper * t.upper)} tip, below extruder.min_fin_thickness"
                    f" = {_mm(ex.min_fin_thickness)}; expected a ratio of at least "
                    f"{ex.min_fin_thickness / t.upper:.3g}",
                )
        if "fin_thickness_tip" in spans:
            tip, root = spans["fin_thickness_tip"], spans["fin_thickness_root"]
            if tip.upper > root.upper:
                raise self.fail(
                    ("design_space", "fin_thickness_tip"),
                    f"{_span_text(tip, 'length')} cannot be met: a tip of "
                    f"{_mm(tip.upper)} is thicker than the thickest root "
                    f"({_mm(root.upper)}); expected tips at most "
                    f"{_mm(root.upper)}",
                )
        self._reachable(spans)
        return spans

    def _tighten(self, key: str, span: Span, minimum: float, label: str) -> Span:
        loc: Loc = ("design_space", key)
        if span.upper < minimum:
            what = "is" if span.fixed else "lies wholly"
            raise self.fail(
                loc,
                f"{_span_text(span, 'length')} {what} below {label} = "
                f"{_mm(minimum)}; expected at least {_mm(minimum)}",
            )
        if span.lower < minimum:
            return Span(minimum, span.upper)
        return span

    def _reachable(self, spans: dict[str, Span]) -> None:
        """Refuse bounds no design can reach under the extruder's and envelope's limits."""
        ex, env = self.sf.extruder, self.sf.envelope
        W, R, g_min, r_f = env.base_width, ex.max_height_to_gap, ex.min_gap, ex.root_fillet
        t, H, tb = spans["fin_thickness_root"], spans["fin_height"], spans["base_thickness"]
        Hmax = env.max_height
        if H.lower + tb.lower > Hmax * (1 + 1e-12):
            raise self.fail(
                ("envelope", "max_height"),
                f"{_mm(Hmax)} is below the lowest fin height plus the thinnest base "
                f"({_mm(H.lower)} + {_mm(tb.lower)}); expected at least "
                f"{_mm(H.lower + tb.lower)} or lower bounds that fit",
            )
        if H.upper + tb.lower > Hmax * (1 + 1e-12):
            raise self.fail(
                ("design_space", "fin_height"),
                f"upper bound {_mm(H.upper)} cannot be met: with the thinnest base "
                f"({_mm(tb.lower)}) it exceeds envelope.max_height = {_mm(Hmax)}; "
                f"expected at most {_mm(Hmax - tb.lower)}",
            )
        if tb.upper + H.lower > Hmax * (1 + 1e-12):
            raise self.fail(
                ("design_space", "base_thickness"),
                f"upper bound {_mm(tb.upper)} cannot be met: with the lowest fins "
                f"({_mm(H.lower)}) it exceeds envelope.max_height = {_mm(Hmax)}; "
                f"expected at most {_mm(Hmax - H.lower)}",
            )

        def need(height: float) -> tuple[float, str]:
            """The smallest root gap allowed for fins of ``height``, and the limit that sets it."""
            options = [
                (g_min, f"extruder.min_gap = {_mm(g_min)}"),
                (
                    height / R,
                    f"extruder.max_height_to_gap = {R:g} at a fin height of {_mm(height)}",
                ),
                (2 * r_f, f"two root fillets of extruder.root_fillet = {_mm(r_f)}"),
            ]
            return max(options, key=lambda o: o[0])

        if "fin_count" in spans:
            N = spans["fin_count"]

            def gap(n: float, th: float) -> float:
                return (W - th) / (n - 1) - th

            widest = gap(N.lower, t.lower)
            where = f"{N.lower:g} fins with {_mm(t.lower)} roots on a {_mm(W)} base"
        else:
            p = spans["fin_pitch"]
            if p.upper >= W - t.lower:
                raise self.fail(
                    ("design_space", "fin_pitch"),
                    f"upper bound {_mm(p.upper)} leaves fewer than two fins on the "
                    f"{_mm(W)} base; expected a pitch below {_mm(W - t.lower)}",
                )

            def gap(n: float, th: float) -> float:
                return n - th

            widest = gap(p.upper, t.lower)
            where = f"a {_mm(p.upper)} pitch with {_mm(t.lower)} roots"
        g_need, why = need(H.lower)
        if widest < g_need * (1 - 1e-9):
            key = "fin_count" if "fin_count" in spans else "fin_pitch"
            raise self.fail(
                ("design_space", key),
                f"no design in the bounds can be made: the widest root gap ({where})"
                f" is {_mm(widest)}, below the {_mm(g_need)} set by {why}; "
                "expected fewer fins, thinner fins or lower fins",
            )
        g_hi, why_hi = need(H.upper)
        if widest < g_hi * (1 - 1e-9):
            raise self.fail(
                ("design_space", "fin_height"),
                f"upper bound {_mm(H.upper)} cannot be met: {why_hi} needs a root "
                f"gap of {_mm(g_hi)}, but the widest gap in the bounds ({where}) is "
                f"{_mm(widest)}; expected at most {_mm(widest * R)}",
            )
        if "fin_count" in spans:
            N = spans["fin_count"]
            if gap(N.upper, t.lower) < g_need * (1 - 1e-9):
                n_max = math.floor((W - t.lower) / (g_need + t.lower) + 1e-9) + 1
                raise self.fail(
                    ("design_space", "fin_count"),
                    f"upper bound {N.upper:g} cannot be met: {N.upper:g} fins with "
                    f"the thinnest roots ({_mm(t.lower)}) on a {_mm(W)} base leave a"
                    f" {_mm(gap(N.upper, t.lower))} root gap, below the "
                    f"{_mm(g_need)} set by {why}; expected at most {n_max}",
                )
            if gap(N.lower, t.upper) < g_need * (1 - 1e-9):
                t_max = (W - g_need * (N.lower - 1)) / N.lower
                raise self.fail(
                    ("design_space", "fin_thickness_root"),
                    f"upper bound {_mm(t.upper)} cannot be met: even the fewest fins"
                    f" ({N.lower:g}) with roots this thick leave a "
                    f"{_mm(gap(N.lower, t.upper))} root gap, below the "
                    f"{_mm(g_need)} set by {why}; expected at most "
                    f"{_mm(t_max)}",
                )
        else:
            p = spans["fin_pitch"]
            if p.lower - t.lower < g_need * (1 - 1e-9):
                raise self.fail(
                    ("design_space", "fin_pitch"),
                    f"lower bound {_mm(p.lower)} cannot be met: with the thinnest "
                    f"roots ({_mm(t.lower)}) it leaves a {_mm(p.lower - t.lower)} "
                    f"root gap, below the {_mm(g_need)} set by {why}; expected "
                    f"at least {_mm(g_need + t.lower)}",
                )
            if p.upper - t.upper < g_need * (1 - 1e-9):
                raise self.fail(
                    ("design_space", "fin_thickness_root"),
                    f"upper bound {_mm(t.upper)} cannot be met: even the widest "
                    f"pitch ({_mm(p.upper)}) leaves a {_mm(p.upper - t.upper)} root "
                    f"gap, below the {_mm(g_need)} set by {why}; expected at "
                    f"most {_mm(p.upper - g_need)}",
                )

    def _variables(
        self, spans: dict[str, Span], materials: list[Material], fan_names: tuple[str, ...]
    ) -> tuple[tuple[Variable, ...], dict]:
        names = {
            "fin_count": "fin_count",
            "fin_pitch": "fin_pitch_m",
            "fin_thickness_root": "fin_thickness_root_m",
            "fin_thickness_tip": "fin_thickness_tip_m",
            "fin_taper_ratio": "fin_taper_ratio",
            "fin_height": "fin_height_m",
            "base_thickness": "base_thickness_m",
        }
        if "fin_thickness_tip" not in spans and "fin_taper_ratio" not in spans:
            spans["fin_taper_ratio"] = Span(1.0, 1.0)
        variables: dict[str, Variable] = {}
        fixed: dict[str, float | str] = {}
        for key, span in spans.items():
            var = names[key]
            if span.fixed:
                fixed[var] = int(span.lower) if key == "fin_count" else span.lower
            elif key == "fin_count":
                variables[var] = Variable(var, "int", int(span.lower), int(span.upper))
            else:
                variables[var] = Variable(var, "real", span.lower, span.upper)
        if len(materials) == 1:
            fixed["material"] = materials[0].name
        else:
            variables["material"] = Variable(
                "material", "choice", choices=tuple(m.name for m in materials)
            )
        if len(fan_names) == 1:
            fixed["fan"] = fan_names[0]
        elif len(fan_names) > 1:
            variables["fan"] = Variable("fan", "choice", choices=fan_names)
        from optim.study_types import VARIABLE_NAMES

        order = {n: i for i, n in enumerate(VARIABLE_NAMES)}
        var_tuple = tuple(sorted(variables.values(), key=lambda v: order[v.name]))
        fixed_sorted = dict(sorted(fixed.items(), key=lambda kv: order[kv[0]]))
        return var_tuple, fixed_sorted

    # ------------------------------------------------------------ objectives and constraints

    def _column(self, loc: Loc, column: str, sources: list[str]) -> str:
        cols = numeric_columns(sources)
        if column not in cols:
            flags = [c for c, d in COLUMNS.items() if d.endswith(("(bool)", "(text)"))]
            why = " (a flag or text, not a number)" if column in flags else " of the results"
            raise self.fail(
                loc,
                f"{show(column)} names no numeric column{why}"
                f"{did_you_mean(column, cols)}; expected a column such as "
                "junction_temperature_K, mass_kg or pressure_drop_Pa (see "
                "docs/study-file.md)",
            )
        return column

    def _objectives(self, sources: list[str]) -> tuple[Objective, ...]:
        out = []
        for i, o in enumerate(self.sf.study.objectives):
            key = "minimise" if o.sense == "min" else "maximise"
            raw = self.raw["study"]["objectives"][i]
            if isinstance(raw, dict) and len(raw) == 1:
                key = next(iter(raw))
            col = self._column(("study", "objectives", i, key), o.column, sources)
            if any(p.column == col for p in out):
                raise self.fail(
                    ("study", "objectives", i, key),
                    f"{show(col)} is already an objective; expected each column once",
                )
            out.append(Objective(col, o.sense))
        return tuple(out)

    def _constraints(self, spans: dict[str, Span], sources: list[str]) -> tuple[Constraint, ...]:
        c, ex, env = self.sf.constraints, self.sf.extruder, self.sf.envelope
        out = [
            Constraint(
                "junction_margin_K", ">=", c.min_junction_margin, "constraints.min_junction_margin"
            )
        ]
        if c.max_mass is not None:
            out.append(Constraint("mass_kg", "<=", c.max_mass, "constraints.max_mass"))
        if c.max_pressure_drop is not None:
            out.append(
                Constraint(
                    "pressure_drop_Pa", "<=", c.max_pressure_drop, "constraints.max_pressure_drop"
                )
            )
        if c.max_outlet_temperature is not None:
            out.append(
                Constraint(
                    "outlet_temperature_K",
                    "<=",
                    c.max_outlet_temperature,
                    "constraints.max_outlet_temperature",
                )
            )
        self._limits = []
        for i, lim in enumerate(c.limits):
            loc: Loc = ("constraints", "limits", i)
            col = self._column(loc + ("column",), lim.column, sources)
            kind = column_kind(col)
            row: dict[str, Any] = {"column": col}
            for key, sense in (("at_most", "<="), ("at_least", ">=")):
                value = getattr(lim, key)
                if value is None:
                    continue
                try:
                    si = parse_quantity(value, kind)[0]
                except BadValueError as e:
                    raise self.fail(loc + (key,), e.text) from None
                out.append(Constraint(col, sense, si, f"constraints.limits[{i}]"))
                row[key] = format_quantity(si, kind)
            if lim.at_most is not None and lim.at_least is not None:
                lo, hi = out[-1].limit, out[-2].limit
                if lo > hi:
                    raise self.fail(
                        loc,
                        f"at_least {row['at_least']!r} is above at_most "
                        f"{row['at_most']!r}; expected at_least <= at_most",
                    )
            self._limits.append(row)
        out.append(Constraint("gap_root_m", ">=", ex.min_gap, "extruder.min_gap"))
        out.append(
            Constraint(
                "fin_height_to_gap_ratio", "<=", ex.max_height_to_gap, "extruder.max_height_to_gap"
            )
        )
        out.append(Constraint("overall_height_m", "<=", env.max_height, "envelope.max_height"))
        if "fin_taper_ratio" in spans:
            r, t = spans["fin_taper_ratio"], spans["fin_thickness_root"]
            if r.lower * t.lower < ex.min_fin_thickness * (1 - 1e-12):
                out.append(
                    Constraint(
                        "fin_thickness_tip_m",
                        ">=",
                        ex.min_fin_thickness,
                        "extruder.min_fin_thickness",
                    )
                )
        return tuple(out)

    def _budget(self) -> Budget:
        b: BudgetSection = self.sf.study.budget
        stops = {"generations", "evaluations", "wall_time", "stagnation"} & b.model_fields_set
        generations = b.generations if stops else 100
        if (
            generations is None
            and b.evaluations is None
            and b.wall_time is None
            and (b.stagnation is None)
        ):
            raise self.fail(
                ("study", "budget"),
                "has no stopping rule; expected at least one "
                "of generations, evaluations, wall_time or stagnation",
            )
        return Budget(
            method=b.method,
            population=b.population,
            generations=generations,
            max_evaluations=b.evaluations,
            wall_time_s=b.wall_time,
            stagnation_generations=b.stagnation.generations if b.stagnation else None,
            stagnation_tolerance=b.stagnation.tolerance if b.stagnation else 1e-4,
            checkpoint_every=b.checkpoint_every,
            sweep_points=b.sweep_points,
            workers=b.workers,
            dask_scheduler=b.dask_scheduler,
        )

    # ------------------------------------------------------------ resolved study

    def _resolved(
        self,
        materials: list[Material],
        sources: list[HeatSource],
        spans: dict[str, Span],
        scenario_rows: list[dict],
        budget: Budget,
    ) -> dict:
        sf = self.sf
        air, ex, env, c = sf.air, sf.extruder, sf.envelope, sf.constraints
        known = known_materials()
        mats: list[Any] = [
            m.name
            if m.name in known and known[m.name] == m
            else {
                "name": m.name,
                "conductivity": format_quantity(m.conductivity_W_per_mK, "conductivity"),
                "density": format_quantity(m.density_kg_per_m3, "density"),
            }
            for m in materials
        ]
        design = {
            key: _span_value(
                span,
                "number" if key in ("fin_count", "fin_taper_ratio") else "length",
                integer=key == "fin_count",
            )
            for key, span in spans.items()
        }
        air_out: dict[str, Any] = {"ambient": format_quantity(air.ambient, "temperature")}
        if air.pressure is not None:
            air_out["pressure"] = format_quantity(air.pressure, "pressure")
        else:
            air_out["altitude"] = format_quantity(air.altitude or 0.0, "length", "m")
        if air.fans is not None:
            air_out["fans"] = [_fan_row(f) for f in air.fans]
            air_out["candidates"] = list(air.candidates or [f.name for f in air.fans])
        elif air.flow is not None:
            air_out["flow"] = format_quantity(air.flow, "flow")
        else:
            air_out["approach_velocity"] = format_quantity(air.approach_velocity, "velocity")
        air_out["system_impedance"] = format_quantity(air.system_impedance, "impedance")
        air_out["bypass_clearance"] = {
            "top": format_quantity(air.bypass_clearance.top, "length"),
            "side": format_quantity(air.bypass_clearance.side, "length"),
        }
        air_out["fin_tips"] = _fin_tips(air)
        cons: dict[str, Any] = {}
        for key, kind in (
            ("max_mass", "mass"),
            ("max_pressure_drop", "pressure"),
            ("max_outlet_temperature", "temperature"),
        ):
            if getattr(c, key) is not None:
                cons[key] = format_quantity(getattr(c, key), kind)
        cons["min_junction_margin"] = format_quantity(
            c.min_junction_margin, "temperature_difference"
        )
        cons["limits"] = self._limits
        return {
            "study": {
                "name": sf.study.name,
                "seed": sf.study.seed,
                "objectives": [
                    {("minimise" if o.sense == "min" else "maximise"): o.column}
                    for o in sf.study.objectives
                ],
                "budget": {
                    "method": budget.method,
                    "population": budget.population,
                    "generations": budget.generations,
                    "evaluations": budget.max_evaluations,
                    "wall_time": (
                        format_quantity(budget.wall_time_s, "time")
                        if budget.wall_time_s is not None
                        else None
                    ),
                    "stagnation": (
                        {
                            "generations": budget.stagnation_generations,
                            "tolerance": budget.stagnation_tolerance,
                        }
                        if budget.stagnation_generations is not None
                        else None
                    ),
                    "checkpoint_every": budget.checkpoint_every,
                    "sweep_points": budget.sweep_points,
                    "workers": budget.workers,
                    "dask_scheduler": budget.dask_scheduler,
                },
            },
            "envelope": {
                k: format_quantity(getattr(env, k), "length")
                for k in ("base_width", "flow_length", "max_height")
            },
            "material": mats,
            "design_space": design,
            "extruder": {
                "max_height_to_gap": ex.max_height_to_gap,
                "min_fin_thickness": format_quantity(ex.min_fin_thickness, "length"),
                "min_gap": format_quantity(ex.min_gap, "length"),
                "min_base_thickness": format_quantity(ex.min_base_thickness, "length"),
                "root_fillet": format_quantity(ex.root_fillet, "length"),
                "tip_round": (
                    "full" if ex.tip_round is None else format_quantity(ex.tip_round, "length")
                ),
            },
            "air": air_out,
            "surface": {"finish": sf.surface.finish, "emissivity": _emissivity(sf)},
            "sources": [
                {
                    "name": s.name,
                    "power": format_quantity(s.power_W, "power"),
                    "footprint": [
                        format_quantity(s.length_m, "length"),
                        format_quantity(s.width_m, "length"),
                    ],
                    "position": [
                        format_quantity(s.x_m, "length"),
                        format_quantity(s.y_m, "length"),
                    ],
                    "interface_resistance": format_quantity(
                        s.interface_resistance_K_m2_per_W, "area_resistance"
                    ),
                    "junction_to_case": format_quantity(
                        s.junction_to_case_K_per_W, "thermal_resistance"
                    ),
                    "max_junction": format_quantity(s.max_junction_temperature_K, "temperature"),
                }
                for s in sources
            ],
            "constraints": cons,
            "scenarios": scenario_rows,
        }


# ---------------------------------------------------------------- helpers


def _r15(x: float) -> float:
    return float(f"{x:.15g}")


def _mm(x: float) -> str:
    return f"{x * 1000:.3g} mm"


def _mm2(pair: tuple[float, float]) -> str:
    return f"[{_mm(pair[0])}, {_mm(pair[1])}]"


def _span_value(span: Span, kind: str, integer: bool = False) -> Any:
    def one(x: float) -> Any:
        return int(x) if integer else format_quantity(x, kind)

    return one(span.lower) if span.fixed else [one(span.lower), one(span.upper)]


def _span_text(span: Span, kind: str) -> str:
    return show(_span_value(span, kind))


def _fin_tips(air: Air) -> str:
    if air.fin_tips is not None:
        return air.fin_tips
    return "open" if air.bypass_clearance.top > 0 else "shrouded"


def _emissivity(sf: StudyFile) -> float:
    e = sf.surface.emissivity
    return EMISSIVITY[sf.surface.finish] if e is None else e


def _fan_law(fan: FanCurve, speed: float) -> FanCurve:
    """The fan at ``speed`` x its rated speed: flow ~ speed, pressure ~ speed^2, power ~ speed^3.

    Source: the fan affinity laws (e.g. ASHRAE Handbook -- HVAC Systems and Equipment, ch. Fans)
    -- common practice.
    """
    if speed == 1.0:
        return fan
    return replace(
        fan,
        flow_m3_per_s=tuple(_r15(q * speed) for q in fan.flow_m3_per_s),
        pressure_Pa=tuple(_r15(p * speed * speed) for p in fan.pressure_Pa),
        power_W=None if fan.power_W is None else _r15(fan.power_W * speed**3),
    )


def _fan_row(f: Any) -> dict:
    return {
        "name": f.name,
        "curve_units": ["m^3/s", "Pa"],
        "curve": [[q, p] for q, p in f.curve],
        "count": f.count,
        "arrangement": f.arrangement,
        "rated_density": format_quantity(f.rated_density, "density"),
        "power": None if f.power is None else format_quantity(f.power, "power"),
    }
