"""Read a study file's YAML text: the data and the line of every key path.

The reading is YAML 1.2-like, not PyYAML's YAML 1.1: ``1e-3`` is a number, ``012`` is twelve
(not octal ten), ``no`` and ``yes`` are text (only true/false are booleans). A key given twice
in one section is an error (PyYAML would keep the last silently). Errors are
:class:`optim.units.StudyError` with a one-line message naming the line.
"""

from __future__ import annotations

import re
from typing import Any

import yaml

from optim.units import StudyError, show

__all__ = ["Loc", "parse_yaml"]

# A key path into the study file: section and key names, list indices; names that start with
# "<" are pydantic's union tags, never printed.
Loc = tuple[str | int, ...]


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
