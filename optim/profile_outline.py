"""The closed outline of one plate-fin extrusion profile, as exact lines and circular arcs.

The outline is the profile documented in :mod:`models.geometry` (base plate, ``N`` tapered
fins, root fillets in the gaps, tip corner rounds), drawn in the x-y plane with x across the
base from 0 to ``W`` and y up from the base bottom at 0. It runs counter-clockwise (material on
the left) and is a list of :class:`Line` and :class:`Arc` segments, each starting where the one
before it ends; the last ends where the first starts. The DXF writer turns it into one closed
polyline with bulges, the STEP writer into exact edges.

Lengths are in whatever unit the caller passes (the exports pass millimetres).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from models.contract import Design

Point = tuple[float, float]


@dataclass(frozen=True)
class Line:
    """A straight segment from ``start`` to ``end``."""

    start: Point
    end: Point

    @property
    def length(self) -> float:
        return math.dist(self.start, self.end)


@dataclass(frozen=True)
class Arc:
    """A circular arc from ``start`` to ``end`` about ``center``.

    ``sweep`` is the signed angle travelled in radians: positive counter-clockwise (a convex
    round of the outline), negative clockwise (a concave fillet).
    """

    start: Point
    end: Point
    center: Point
    radius: float
    sweep: float

    @property
    def start_angle_deg(self) -> float:
        """Direction of ``start`` seen from the centre, degrees in [0, 360)."""
        return math.degrees(
            math.atan2(self.start[1] - self.center[1], self.start[0] - self.center[0])
        ) % 360.0

    @property
    def end_angle_deg(self) -> float:
        """Direction of ``end`` seen from the centre, degrees in [0, 360)."""
        return math.degrees(
            math.atan2(self.end[1] - self.center[1], self.end[0] - self.center[0])
        ) % 360.0

    @property
    def mid(self) -> Point:
        """The point half-way along the arc."""
        a = math.atan2(self.start[1] - self.center[1], self.start[0] - self.center[0])
        a += 0.5 * self.sweep
        return (self.center[0] + self.radius * math.cos(a),
                self.center[1] + self.radius * math.sin(a))

    @property
    def bulge(self) -> float:
        """DXF bulge of the arc: tan(sweep/4), positive counter-clockwise."""
        return math.tan(0.25 * self.sweep)

    @property
    def length(self) -> float:
        return abs(self.sweep) * self.radius


Segment = Line | Arc


@dataclass(frozen=True)
class ProfileDims:
    """Sizes of one chosen design (SI units), as the CAD exports need them.

    ``root_fillet_m`` is the fillet radius where a fin face meets the base top inside a gap;
    ``tip_radius_m`` the corner round on both corners of each fin tip (half the tip thickness
    asks for a full round).
    """

    fin_count: int
    fin_thickness_root_m: float
    fin_thickness_tip_m: float
    fin_height_m: float
    base_thickness_m: float
    base_width_m: float
    flow_length_m: float
    root_fillet_m: float = 0.0
    tip_radius_m: float = 0.0

    @classmethod
    def from_design(cls, design: Design, index: int = 0) -> ProfileDims:
        """The sizes of design number ``index`` of a population :class:`models.Design`."""
        a = design.arrays()
        return cls(
            fin_count=int(a["fin_count"][index]),
            fin_thickness_root_m=float(a["fin_thickness_root_m"][index]),
            fin_thickness_tip_m=float(a["fin_thickness_tip_m"][index]),
            fin_height_m=float(a["fin_height_m"][index]),
            base_thickness_m=float(a["base_thickness_m"][index]),
            base_width_m=float(a["base_width_m"][index]),
            flow_length_m=float(a["flow_length_m"][index]),
            root_fillet_m=float(a["fin_root_fillet_m"][index]),
            tip_radius_m=float(a["fin_tip_radius_m"][index]),
        )

    @property
    def pitch_m(self) -> float:
        """Fin centre-line pitch p = (W - t_root)/(N - 1)."""
        return (self.base_width_m - self.fin_thickness_root_m) / (self.fin_count - 1)

    @property
    def overall_height_m(self) -> float:
        return self.base_thickness_m + self.fin_height_m

    def __post_init__(self) -> None:
        """Check that the profile can be drawn; the message names the field at fault."""
        if not (math.isfinite(self.flow_length_m) and self.flow_length_m > 0.0):
            raise _bad("flow_length_m", self.flow_length_m, "a finite length > 0")
        try:
            self.outline(scale=1.0)
        except (TypeError, ValueError) as exc:
            key, sep, rest = str(exc).partition(" = ")
            raise ValueError(f"{_FIELD.get(key, key)}{sep}{rest}") from None

    def outline(self, scale: float = 1e3) -> list[Segment]:
        """The profile outline with every length multiplied by ``scale`` (default: mm).

        Scaled lengths are rounded to 12 significant digits, so that 35 mm is not drawn as
        34.99999999999999.
        """

        def sized(value_m: float) -> float:
            return float(f"{float(value_m) * scale:.12g}")

        return profile_outline(
            self.fin_count,
            sized(self.fin_thickness_root_m),
            sized(self.fin_thickness_tip_m),
            sized(self.fin_height_m),
            sized(self.base_thickness_m),
            sized(self.base_width_m),
            sized(self.root_fillet_m),
            sized(self.tip_radius_m),
        )


# Argument names of profile_outline -> field names of ProfileDims (for error messages).
_FIELD = {
    "t_root": "fin_thickness_root_m",
    "t_tip": "fin_thickness_tip_m",
    "fin_height": "fin_height_m",
    "base_thickness": "base_thickness_m",
    "base_width": "base_width_m",
    "root_fillet": "root_fillet_m",
    "tip_radius": "tip_radius_m",
}


def _bad(key: str, value: object, expected: str) -> ValueError:
    if hasattr(value, "item"):  # numpy scalar: show it as a plain number
        value = value.item()
    return ValueError(f"{key} = {value!r}: expected {expected}")


def _unit(a: Point, b: Point) -> Point:
    d = math.dist(a, b)
    return ((b[0] - a[0]) / d, (b[1] - a[1]) / d)


def _sharp_polygon(
    N: int, t_root: float, t_tip: float, H: float, t_b: float, W: float, r_f: float, r_t: float
) -> list[tuple[Point, float]]:
    """Counter-clockwise corners of the unrounded profile, each with its round radius."""
    p = (W - t_root) / (N - 1)
    y_top = t_b + H
    corners: list[tuple[Point, float]] = [((0.0, 0.0), 0.0), ((W, 0.0), 0.0), ((W, t_b), 0.0)]
    for i in range(N - 1, -1, -1):
        x = 0.5 * t_root + i * p
        corners.append(((x + 0.5 * t_tip, y_top), r_t))
        if t_tip > 0.0:
            corners.append(((x - 0.5 * t_tip, y_top), r_t))
        if i > 0:
            corners.append(((x - 0.5 * t_root, t_b), r_f))
            corners.append(((x - p + 0.5 * t_root, t_b), r_f))
    corners.append(((0.0, t_b), 0.0))
    return corners


def profile_outline(
    fin_count: int,
    t_root: float,
    t_tip: float,
    fin_height: float,
    base_thickness: float,
    base_width: float,
    root_fillet: float = 0.0,
    tip_radius: float = 0.0,
) -> list[Segment]:
    """Return the closed, counter-clockwise outline of the plate-fin profile as lines and arcs.

    Construction: the base plate ``W x t_b``; fin ``i`` (0..N-1) has its centre line at
    ``x_i = t_root/2 + i p`` with ``p = (W - t_root)/(N - 1)``, faces running straight from
    ``x_i -/+ t_root/2`` at ``y = t_b`` to ``x_i -/+ t_tip/2`` at ``y = t_b + H``. Each face
    leans by ``alpha = atan((t_root - t_tip)/(2 H))`` (half the taper angle), so every fin
    root corner in a gap and every tip corner opens at ``90 deg + alpha``. A round of radius
    ``r`` in a corner whose edges turn by ``phi`` (= ``90 deg - alpha`` here) touches both
    edges at ``d = r tan(phi/2)`` from the sharp corner, its centre lies ``r`` from both
    edges, and the arc sweeps ``phi``. The outer faces of the two outer fins meet the base
    edges without a fillet.

    ``tip_radius = t_tip/2`` asks for a full round: the tip is drawn as one arc tangent to
    both faces and to the tip line, of radius ``t_tip/2 tan(45 deg + alpha/2)`` (exactly
    ``t_tip/2`` for straight fins; 1.7 % more for a 2 mm to 1 mm fin 30 mm high). Rounds
    with ``tip_radius < t_tip/2`` leave a flat of ``t_tip - 2 r tan(45 deg - alpha/2)``.

    Parameters (any one length unit, the same for all): ``fin_count`` N (>= 2), ``t_root``
    and ``t_tip`` fin thickness at root and tip (``0 <= t_tip <= t_root``), ``fin_height`` H
    above the base top, ``base_thickness`` t_b, ``base_width`` W, ``root_fillet`` r_f,
    ``tip_radius`` r_t (``<= t_tip/2``).

    Returns the outline as :class:`Line` and :class:`Arc` segments, starting at the origin
    along the base bottom; consecutive segments share end points; collinear lines are merged
    (a straight outer fin continues the base edge) and zero-length lines dropped (fillets
    that just fill a gap).

    Raises ``ValueError`` (one line naming the argument) for a profile that cannot be drawn:
    N < 2, a size <= 0 (t_tip < 0), a tip thicker than the root, a tip round above half the
    tip, fillets wider than the gap or rounds longer than the fin face.

    Source: plane geometry (tangent length of a circle inscribed in a corner) -- common
    practice, no source.

    Example: N=2, t=2, H=10, W=20, t_b=3, no rounds gives 8 lines enclosing
    20*3 + 2*10*2 = 100 (see :func:`outline_area`).
    """
    try:
        N = int(fin_count)
    except (TypeError, ValueError, OverflowError):
        N = 0
    if isinstance(fin_count, bool) or N != fin_count or N < 2:
        raise _bad("fin_count", fin_count, "an integer >= 2")
    named = dict(t_root=t_root, fin_height=fin_height, base_thickness=base_thickness,
                 base_width=base_width)
    for key, value in named.items():
        if not (math.isfinite(value) and value > 0.0):
            raise _bad(key, value, "a finite length > 0")
    for key, value in dict(t_tip=t_tip, root_fillet=root_fillet, tip_radius=tip_radius).items():
        if not (math.isfinite(value) and value >= 0.0):
            raise _bad(key, value, "a finite length >= 0")
    if t_tip > t_root:
        raise _bad("t_tip", t_tip, f"at most the root thickness, {t_root!r}")
    if tip_radius > 0.5 * t_tip * (1.0 + 1e-9):
        raise _bad("tip_radius", tip_radius, f"at most half the tip thickness, {0.5 * t_tip!r}")
    p = (base_width - t_root) / (N - 1)
    if p <= t_root:
        raise _bad("base_width", base_width,
                   f"wider than {N} fins of root thickness {t_root!r} side by side")

    alpha = math.atan2(0.5 * (t_root - t_tip), fin_height)
    r_t = tip_radius
    full_round = t_tip > 0.0 and tip_radius >= 0.5 * t_tip * (1.0 - 1e-9)
    if full_round:
        r_t = 0.5 * t_tip * math.tan(math.pi / 4.0 + 0.5 * alpha)
    corners = _sharp_polygon(N, t_root, t_tip, fin_height, base_thickness, base_width,
                             root_fillet, r_t)
    scale = max(base_width, base_thickness + fin_height)
    tol = 1e-9 * scale
    n = len(corners)

    # Tangent points, centre and sweep of every round.
    rounds: list[tuple[Point, Point, Point, float, float] | None] = []
    for k, (P, r) in enumerate(corners):
        if r <= 0.0:
            rounds.append(None)
            continue
        u_in = _unit(corners[k - 1][0], P)
        u_out = _unit(P, corners[(k + 1) % n][0])
        cross = u_in[0] * u_out[1] - u_in[1] * u_out[0]
        dot = u_in[0] * u_out[0] + u_in[1] * u_out[1]
        turn = math.atan2(abs(cross), dot)
        side = 1.0 if cross > 0.0 else -1.0
        d = r * math.tan(0.5 * turn)
        t1 = (P[0] - d * u_in[0], P[1] - d * u_in[1])
        t2 = (P[0] + d * u_out[0], P[1] + d * u_out[1])
        centre = (t1[0] - side * r * u_in[1], t1[1] + side * r * u_in[0])
        rounds.append((t1, t2, centre, r, side * turn))

    # Every edge must hold the tangent lengths of the rounds at both its ends.
    for k in range(n):
        P, Q = corners[k][0], corners[(k + 1) % n][0]
        at_p, at_q = rounds[k], rounds[(k + 1) % n]
        used = (0.0 if at_p is None else math.dist(P, at_p[1])) + (
            0.0 if at_q is None else math.dist(at_q[0], Q))
        if used > math.dist(P, Q) + tol:
            vertical = abs(P[1] - Q[1]) > tol
            if not vertical:
                raise _bad("root_fillet", root_fillet,
                           f"small enough for two fillets to fit the root gap of {p - t_root!r}")
            raise _bad("root_fillet", root_fillet,
                       "small enough for fillet and tip round to fit on a fin face")

    # Walk the corners: line to the next round's first tangent point, then the arc.
    segments: list[Segment] = []
    here = corners[0][0]
    for k in list(range(1, n)) + [0]:
        P = corners[k][0]
        rd = rounds[k]
        target = P if rd is None else rd[0]
        if math.dist(here, target) > tol:
            segments.append(Line(here, target))
        if rd is None:
            here = P
        else:
            t1, t2, centre, r, sweep = rd
            segments.append(Arc(target, t2, centre, r, sweep))
            here = t2
    return _merge(segments, tol)


def _merge(segments: list[Segment], tol: float) -> list[Segment]:
    """Join collinear consecutive lines and consecutive arcs on one circle."""
    out: list[Segment] = []
    for s in segments:
        prev = out[-1] if out else None
        if isinstance(s, Line) and isinstance(prev, Line):
            u, v = _unit(prev.start, prev.end), _unit(s.start, s.end)
            if abs(u[0] * v[1] - u[1] * v[0]) < 1e-12 and u[0] * v[0] + u[1] * v[1] > 0.0:
                out[-1] = Line(prev.start, s.end)
                continue
        if (isinstance(s, Arc) and isinstance(prev, Arc)
                and math.dist(s.center, prev.center) < tol and abs(s.radius - prev.radius) < tol):
            out[-1] = Arc(prev.start, s.end, prev.center, prev.radius, prev.sweep + s.sweep)
            continue
        out.append(s)
    return out


def outline_area(outline: list[Segment]) -> float:
    """Return the exact area enclosed by a closed outline (positive when counter-clockwise).

    Formula: shoelace over the segment end points, ``sum (x_s y_e - x_e y_s)/2``, plus for
    every arc the circular segment between chord and arc, ``r^2 (theta - sin theta)/2`` with
    the signed sweep ``theta`` (adds for a convex round, subtracts for a concave fillet).

    Parameter: ``outline`` as returned by :func:`profile_outline` (lengths in any unit).
    Returns the area in that unit squared.

    Source: shoelace formula and circular-segment area -- plane geometry, common practice,
    no source.

    Example: a 2 x 1 rectangle with one short side replaced by a half circle of radius 0.5
    bulging out encloses 2 + pi/8.
    """
    area = 0.0
    for s in outline:
        area += 0.5 * (s.start[0] * s.end[1] - s.end[0] * s.start[1])
        if isinstance(s, Arc):
            area += 0.5 * s.radius**2 * (s.sweep - math.sin(s.sweep))
    return area


def outline_bounds(outline: list[Segment]) -> tuple[float, float, float, float]:
    """Return (x_min, y_min, x_max, y_max) of the outline, arcs included exactly."""
    xs: list[float] = []
    ys: list[float] = []
    for s in outline:
        xs += [s.start[0], s.end[0]]
        ys += [s.start[1], s.end[1]]
        if isinstance(s, Arc):
            a0 = math.atan2(s.start[1] - s.center[1], s.start[0] - s.center[0])
            for q in range(-8, 9):  # axis directions the arc passes through
                a = q * math.pi / 2.0
                frac = (a - a0) / s.sweep
                if 0.0 < frac < 1.0:
                    xs.append(s.center[0] + s.radius * math.cos(a))
                    ys.append(s.center[1] + s.radius * math.sin(a))
    return min(xs), min(ys), max(xs), max(ys)
