"""One-line study-file errors: the key path, the bad value, the expectation and the line.

:class:`ErrorContext` knows the line of each key path (when the study came from YAML) and makes
the :class:`optim.units.StudyError` of a check; :func:`translate` turns pydantic's validation
errors into the same one-line form, with the field's ``description`` in
:mod:`optim.study_schema` as the expectation and a did-you-mean for a misspelt key or choice.
"""

from __future__ import annotations

import re
from typing import Any

from pydantic import BaseModel, ValidationError

from optim.study_schema import StudyFile, did_you_mean
from optim.study_yaml import Loc
from optim.units import BadValueError, StudyError, show

__all__ = ["ErrorContext", "mm", "mm2", "translate"]


def _path(loc: Loc) -> str:
    out = ""
    for p in loc:
        if isinstance(p, int):
            out += f"[{p}]"
        elif not str(p).startswith("<"):
            out += ("." if out else "") + str(p)
    return out or "study file"


class ErrorContext:
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


def _message(err: dict, ctx: ErrorContext) -> str:
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


def translate(exc: ValidationError, ctx: ErrorContext) -> StudyError:
    """The one-line :class:`StudyError` of a pydantic validation error of the study file."""
    errors = exc.errors()
    # A misspelt key also makes its right spelling "missing": report the misspelling first.
    errors.sort(key=lambda e: e["type"] != "extra_forbidden")
    return StudyError(_message(errors[0], ctx))


# ---------------------------------------------------------------- lengths in messages


def mm(x: float) -> str:
    """A length in metres written for a message in millimetres, 3 significant digits."""
    return f"{x * 1000:.3g} mm"


def mm2(pair: tuple[float, float]) -> str:
    """A pair of lengths in metres written for a message, such as ``[30 mm, 40 mm]``."""
    return f"[{mm(pair[0])}, {mm(pair[1])}]"
