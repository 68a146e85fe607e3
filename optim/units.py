"""Quantities with units in study files: parse ``"35 CFM"`` to SI, check its kind, format back.

finfront keeps its own pint registry (never the application-wide one) with the units a thermal
engineer writes that pint lacks or misreads:

- flow: ``CFM`` (= ``cfm``) is ft^3/min, exactly 4.719474432e-4 m^3/s by the definition of the
  foot (0.3048 m). Without this definition pint reads ``cfm`` as a centi-fermi, a length.
  ``l/s``, ``L/s``, ``m^3/h`` (or ``m3/h``) and ``ft^3/min`` work as well.
- velocity: ``LFM`` (= ``lfm``), linear feet per minute, 0.00508 m/s.
- pressure: ``inH2O`` is the *conventional* inch of water, 1000 kg/m^3 x 9.80665 m/s^2 x
  0.0254 m = 249.08891 Pa (NIST SP 811, 2008, Appendix B.8, "inch of water, conventional":
  2.490 889 E+02 Pa; pint defines it the same way). ``inH2O_4C`` (alias ``inH2O_39F``, water at
  its densest, 999.972 kg/m^3) gives 249.0819 Pa and ``inH2O_60F`` 248.840 Pa; the three differ
  by at most 0.1 %, well inside the scatter of any fan curve. ``inWG`` and ``inWC`` are aliases
  of the conventional unit; ``mmH2O``, ``Pa``, ``kPa``, ``mbar`` come with pint.
- temperature: ``"45 degC"`` is split into number and unit and built as an absolute temperature
  (parsing it as one expression raises pint's offset error). In every other quantity ``degC``
  and ``degF`` are read as temperature *differences*: ``"0.5 degC/W"`` is 0.5 K/W, never
  273.65 K/W (the registry never auto-converts offset units).

Every parsed value is rounded to 15 significant digits, which removes the binary noise of unit
factors (``1 l/s`` -> 0.001 m^3/s exactly rather than 0.0010000000000000002) and makes
:func:`format_quantity` / :func:`parse_quantity` an exact round trip.
"""

from __future__ import annotations

import json
import math
import re
from dataclasses import dataclass
from typing import Any

import pint

__all__ = [
    "BadValueError",
    "KINDS",
    "Kind",
    "StudyError",
    "format_quantity",
    "parse_quantity",
    "show",
    "to_si",
    "ureg",
]


class StudyError(Exception):
    """A study file that cannot be used. The message is one line: key path, value, expectation.

    Defined here (the lowest module of the study loader) and re-exported by ``optim.study``.
    """


class BadValueError(ValueError):
    """A bad value found inside a validator (the key path is added by whoever catches it).

    ``loc`` extends the key path below the field being validated (list indices, sub-keys), for
    the line lookup; ``label`` is how that extension is printed (defaults to ``loc``).
    """

    def __init__(self, text: str, loc: tuple[str | int, ...] = (), label: str | None = None):
        super().__init__(text)
        self.text = text
        self.loc = loc
        self.label = (
            label
            if label is not None
            else "".join(f"[{p}]" if isinstance(p, int) else f".{p}" for p in loc)
        )


ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=False, cache_folder=None)
ureg.define("cubic_foot_per_minute = foot ** 3 / minute = CFM = cfm")
ureg.define("linear_foot_per_minute = foot / minute = LFM = lfm")
ureg.define("@alias inch_H2O = inWG = inWC")
ureg.define("@alias inch_H2O_4C = inH2O_39F")

_ABSOLUTE_TEMPERATURE_UNITS = {"kelvin", "degree_Celsius", "degree_Fahrenheit", "degree_Rankine"}


@dataclass(frozen=True)
class Kind:
    """A kind of quantity: what it is called, an example, its SI unit and display unit."""

    name: str
    what: str  # "a volumetric flow"
    example: str  # "35 CFM"
    si: str  # pint unit of the SI value
    display: str  # unit used when writing the resolved study file

    @property
    def example_unit(self) -> str:
        return self.example.split(" ", 1)[1] if " " in self.example else ""


KINDS: dict[str, Kind] = {
    k.name: k
    for k in (
        Kind("length", "a length", "1.2 mm", "m", "mm"),
        Kind("area", "an area", "12 cm^2", "m^2", "m^2"),
        Kind("mass", "a mass", "0.8 kg", "kg", "kg"),
        Kind("time", "a duration", "8 h", "s", "s"),
        Kind("temperature", "a temperature", "45 degC", "K", "degC"),
        Kind("temperature_difference", "a temperature difference", "5 K", "K", "K"),
        Kind("pressure", "a pressure", "250 Pa", "Pa", "Pa"),
        Kind("power", "a power", "150 W", "W", "W"),
        Kind("flow", "a volumetric flow", "35 CFM", "m^3/s", "m^3/s"),
        Kind("velocity", "a velocity", "2 m/s", "m/s", "m/s"),
        Kind("density", "a density", "2700 kg/m^3", "kg/m^3", "kg/m^3"),
        Kind("conductivity", "a thermal conductivity", "200 W/m/K", "W/m/K", "W/m/K"),
        Kind("thermal_resistance", "a thermal resistance", "0.2 K/W", "K/W", "K/W"),
        Kind(
            "area_resistance",
            "an area-specific thermal resistance",
            "0.3 K*cm^2/W",
            "K*m^2/W",
            "K*cm^2/W",
        ),
        Kind("htc", "a heat transfer coefficient", "50 W/m^2/K", "W/m^2/K", "W/m^2/K"),
        Kind(
            "impedance",
            "a flow impedance (pressure per flow squared)",
            "5e5 Pa/(m^3/s)^2",
            "Pa/(m^3/s)^2",
            "Pa/(m^3/s)^2",
        ),
        Kind("number", "a plain number", "1", "", ""),
    )
}

_DIMS = {name: ureg.parse_units(k.si).dimensionality for name, k in KINDS.items() if k.si}

# Names of other dimensions a user may hit by mistake, to say what was given.
_OTHER_DIMS = {
    ureg.parse_units("m^3").dimensionality: "a volume",
    ureg.parse_units("C").dimensionality: "an electric charge",
    ureg.parse_units("Hz").dimensionality: "a frequency",
    ureg.parse_units("J").dimensionality: "an energy",
    ureg.parse_units("N").dimensionality: "a force",
    ureg.parse_units("W/K").dimensionality: "a thermal conductance",
    ureg.parse_units("W/m^2").dimensionality: "a heat flux",
    ureg.parse_units("V").dimensionality: "a voltage",
    ureg.parse_units("A").dimensionality: "a current",
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_DEG_TOKEN = re.compile(
    r"(?<![A-Za-z_])(degC|degF|celsius|fahrenheit|degree_Celsius|degree_Fahrenheit)"
    r"(?![A-Za-z0-9_])"
)
_BARE_POWER = re.compile(r"(?<=[A-Za-z])([23])(?![A-Za-z0-9_])")  # m3 -> m^3, not inH2O


def show(value: Any) -> str:
    """The value as the user wrote it, for messages: strings quoted, lists in brackets."""
    try:
        return json.dumps(value, ensure_ascii=False)
    except (TypeError, ValueError):
        return repr(value)


def _round15(x: float) -> float:
    return float(f"{x:.15g}")


def _described(dims: Any) -> str:
    for name, d in _DIMS.items():
        if d == dims:
            return "a temperature" if name in ("temperature",) else KINDS[name].what
    return _OTHER_DIMS.get(dims, f"of dimension {dims}")


def _expected(kinds: tuple[str, ...], number: str | None = None) -> str:
    parts = []
    for name in kinds:
        k = KINDS[name]
        if name == "number":
            parts.append("a plain number")
            continue
        ex = f"{number} {k.example_unit}" if number is not None else k.example
        parts.append(f'{k.what} such as "{ex}"')
    return "expected " + " or ".join(parts)


def _normalise_unit(text: str, absolute_temperature: bool) -> str:
    text = (
        text.replace("·", "*")
        .replace("⋅", "*")
        .replace("²", "^2")
        .replace("³", "^3")
        .replace("°C", "degC")
        .replace("°F", "degF")
        .replace("µ", "u")
        .replace("μ", "u")
    )
    text = _BARE_POWER.sub(r"^\1", text)
    if not absolute_temperature:
        text = _DEG_TOKEN.sub(
            lambda m: "delta_degF" if "F" in m.group(1) or "f" in m.group(1) else "delta_degC",
            text,
        )
    return text


def parse_quantity(
    value: Any,
    kind: str | tuple[str, ...],
    *,
    positive: bool = False,
    nonnegative: bool = False,
) -> tuple[float, str]:
    """Return ``(SI value, kind)`` of a quantity such as ``"35 CFM"``; raise :class:`BadValueError`.

    ``kind`` is a name in :data:`KINDS` or a tuple of accepted names (the first that matches
    the unit's dimension wins). ``"number"`` accepts a plain number or a dimensionless
    quantity (``"80 %"`` -> 0.8). Temperatures (kind ``"temperature"``) are absolute and must be
    above 0 K; every other kind reads ``degC``/``degF`` as differences. ``positive`` rejects
    values <= 0, ``nonnegative`` values < 0.
    """
    kinds = (kind,) if isinstance(kind, str) else tuple(kind)
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        raise BadValueError(f"{show(value)} is not a quantity; {_expected(kinds)}")
    if isinstance(value, (int, float)):
        if "number" in kinds:
            return _checked(float(value), value, "number", kinds, positive, nonnegative), "number"
        raise BadValueError(f"{show(value)} has no unit; {_expected(kinds, show(value))}")
    m = _NUMBER.match(value)
    if not m:
        raise BadValueError(f"{show(value)} does not start with a number; {_expected(kinds)}")
    number_text, unit_text = m.group(1), m.group(2)
    number = float(number_text)
    if not unit_text:
        if "number" in kinds:
            return _checked(number, value, "number", kinds, positive, nonnegative), "number"
        raise BadValueError(f"{show(value)} has no unit; {_expected(kinds, number_text)}")
    absolute = "temperature" in kinds
    try:
        units = ureg.parse_units(_normalise_unit(unit_text, absolute))
    except Exception:  # pint raises several kinds of parse errors
        hint = ' (write "W/m/K": "mK" reads as millikelvin)' if "mK" in unit_text else ""
        raise BadValueError(
            f'{show(value)} has a unit finfront does not know ("{unit_text}"){hint}; '
            f"{_expected(kinds, number_text)}"
        ) from None
    dims = units.dimensionality
    for name in kinds:
        if name == "number":
            if dims == ureg.dimensionless.dimensionality:
                si = ureg.Quantity(number, units).to("dimensionless").magnitude
                return _checked(si, value, name, kinds, positive, nonnegative), name
            continue
        if dims != _DIMS[name]:
            continue
        if name == "temperature" and str(units) not in _ABSOLUTE_TEMPERATURE_UNITS:
            raise BadValueError(
                f"{show(value)} is a temperature difference; {_expected(kinds, number_text)}"
            )
        si = ureg.Quantity(number, units).to(KINDS[name].si).magnitude
        return _checked(si, value, name, kinds, positive, nonnegative), name
    given = _described(dims)
    hint = ' ("mK" reads as millikelvin: write "W/m/K")' if "mK" in unit_text else ""
    raise BadValueError(f"{show(value)} is {given}{hint}; {_expected(kinds, number_text)}")


def _checked(
    si: float, raw: Any, name: str, kinds: tuple[str, ...], positive: bool, nonnegative: bool
) -> float:
    si = _round15(float(si))
    what = KINDS[name].what if name != "number" else "a number"
    if not math.isfinite(si):
        raise BadValueError(f"{show(raw)} is not finite; {_expected(kinds)}")
    if name == "temperature" and si <= 0.0:
        raise BadValueError(f"{show(raw)} is at or below absolute zero; {_expected(kinds)}")
    if positive and si <= 0.0:
        ex = KINDS[name].example if name != "number" else "1"
        raise BadValueError(
            f"{show(raw)} is not greater than zero; expected {what} greater than zero such "
            f'as "{ex}"'
        )
    if nonnegative and si < 0.0:
        ex = KINDS[name].example if name != "number" else "0"
        raise BadValueError(
            f'{show(raw)} is negative; expected {what} of zero or more such as "{ex}"'
        )
    return si


def to_si(text: Any, dimension: str | tuple[str, ...], key: str, **limits: bool) -> float:
    """Return the SI value of ``text`` (e.g. ``"35 CFM"``) of kind ``dimension``.

    Raises :class:`StudyError` whose one-line message names ``key``, the value and the expected
    kind of quantity, e.g. ``air.fans[1].curve[2].flow: "35 mm" is a length; expected a
    volumetric flow such as "35 CFM"``. ``limits``: ``positive=True`` or ``nonnegative=True``.
    """
    try:
        return parse_quantity(text, dimension, **limits)[0]
    except BadValueError as e:
        raise StudyError(f"{key}: {e.text}") from None


def format_quantity(si: float, kind: str, unit: str | None = None) -> str | float:
    """Return the SI value ``si`` written in ``unit`` (default: the kind's display unit).

    The text reads back exactly: ``parse_quantity(format_quantity(x, k), k)[0] == x`` for every
    x that came out of :func:`parse_quantity` (15 significant digits); where the display unit
    cannot give that, the SI unit is used. A ``"number"`` comes back as the float itself.
    """
    if kind == "number":
        return si
    k = KINDS[kind]
    display = unit or k.display
    if kind == "temperature":
        mag = ureg.Quantity(si, "K").to(display).magnitude
    else:
        mag = ureg.Quantity(si, k.si).to(display).magnitude
    for digits in (12, 15, 17):
        text = f"{mag:.{digits}g} {display}"
        if parse_quantity(text, kind)[0] == si:
            return text
    return f"{si!r} {k.si}"
