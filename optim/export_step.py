"""STEP solid of one design: the profile outline extruded along z by the flow length (mm).

Needs the optional ``cad`` extra (build123d on the OpenCascade kernel), imported only when a
STEP file is asked for.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from optim.profile_outline import Arc, ProfileDims, Segment

CAD_EXTRA_HINT = 'STEP export needs build123d: pip install "finfront[cad]"'


class MissingCadExtraError(ImportError):
    """The optional CAD kernel (build123d) is not installed."""


def _build123d() -> Any:
    try:
        import build123d
    except ImportError as exc:
        raise MissingCadExtraError(CAD_EXTRA_HINT) from exc
    return build123d


def profile_solid(dims: ProfileDims, name: str = "plate-fin heat sink") -> Any:
    """Return the extruded profile as a build123d ``Solid`` in millimetres.

    The outline lies in the x-y plane (x across the base, y up from the base bottom) and is
    extruded along +z by the flow length; lines become exact line edges and arcs exact circle
    edges (through their start, mid and end points).
    """
    bd = _build123d()
    edges = [_edge(bd, s) for s in dims.outline(scale=1e3)]
    face = bd.Face(bd.Wire(edges))
    solid = bd.extrude(face, amount=dims.flow_length_m * 1e3)
    solid.label = name  # the product name in the STEP file
    if not solid.is_valid:
        raise RuntimeError("the extruded profile is not a valid solid (please report this)")
    return solid


def _edge(bd: Any, s: Segment) -> Any:
    if isinstance(s, Arc):
        return bd.Edge.make_three_point_arc(
            bd.Vector(*s.start, 0.0), bd.Vector(*s.mid, 0.0), bd.Vector(*s.end, 0.0)
        )
    return bd.Edge.make_line(bd.Vector(*s.start, 0.0), bd.Vector(*s.end, 0.0))


def write_step(path: str | Path, dims: ProfileDims, name: str = "plate-fin heat sink") -> Path:
    """Write the extruded profile of one design to ``path`` as a STEP file (ISO 10303-21, mm).

    ``name`` becomes the product name inside the file. Raises :class:`MissingCadExtraError`
    (an ``ImportError``) naming the ``cad`` extra when build123d is not installed.
    """
    bd = _build123d()
    solid = profile_solid(dims, name)
    path = Path(path)
    if not bd.export_step(solid, str(path), unit=bd.Unit.MM):
        raise RuntimeError(f"{path}: the CAD kernel could not write the STEP file")
    return path
