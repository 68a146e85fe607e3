"""Fan curves: monotone interpolation, fan sets, fan-law density correction, operating point.

A fan curve (static pressure against volumetric flow, at the fan's rated air density) becomes a
:class:`FanModel` once, at set-up: the curve of the whole fan set (``count`` identical fans in
parallel or in series) at the study's air density, held as the coefficients of a monotone
piecewise-cubic Hermite interpolant (PCHIP). Evaluating it is a sorted search plus one cubic,
vectorized over any array of flows. Several candidate fans are stacked into a
:class:`FanTable` so that every design can pick its own fan by an integer index without a
Python loop over designs. :func:`operating_point` then finds, for a whole population at
once, the flow where the fan set's pressure equals the system's pressure drop.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from models.contract import FanCurve
from models.roots import bracketed_root

FloatArray = NDArray[np.float64]


def validate_fan_curve(
    flow_m3_per_s: Sequence[float], pressure_Pa: Sequence[float], name: str = "fan"
) -> None:
    """Return None if the points form a usable static-pressure curve; raise ValueError if not.

    Requirements: at least 3 points, as many pressures as flows, all values finite and >= 0,
    flow strictly increasing, static pressure strictly decreasing (a fan's static-pressure
    curve falls from shut-off to free delivery; a curve with a stall dip or flat part must be
    trimmed to its falling branch).

    Parameters
    ----------
    flow_m3_per_s : volumetric flow at each curve point, m^3/s.
    pressure_Pa : static pressure at each curve point, Pa.
    name : the fan's name, used in the message.

    Returns
    -------
    None. Raises ValueError with one line naming the fan, the offending point and value and
    what was expected (this is set-up validation, outside the hot path).

    Validity: any input; nothing is clipped or repaired.

    Source: common practice, no source (a static-pressure curve is read on its falling branch).

    Example: ``validate_fan_curve((0, 0.01, 0.02), (50, 40, 0), name="A")`` passes;
    ``validate_fan_curve((0, 0.01, 0.02), (50, 55, 0), name="A")`` raises
    "fan 'A': pressure_Pa[1] = 55 is not below pressure_Pa[0] = 50; expected ...".
    """
    q = [float(v) for v in flow_m3_per_s]
    p = [float(v) for v in pressure_Pa]
    who = f"fan {name!r}"
    if len(q) != len(p):
        raise ValueError(
            f"{who}: {len(q)} flow values but {len(p)} pressure values; expected one pressure "
            "per flow"
        )
    if len(q) < 3:
        raise ValueError(f"{who}: {len(q)} curve points; expected at least 3 (flow, pressure)")
    for key, vals in (("flow_m3_per_s", q), ("pressure_Pa", p)):
        for i, v in enumerate(vals):
            if not math.isfinite(v):
                raise ValueError(f"{who}: {key}[{i}] = {v}; expected a finite number")
            if v < 0:
                raise ValueError(f"{who}: {key}[{i}] = {v:g} is negative; expected >= 0")
    for i in range(1, len(q)):
        if not q[i] > q[i - 1]:
            raise ValueError(
                f"{who}: flow_m3_per_s[{i}] = {q[i]:g} is not above flow_m3_per_s[{i - 1}] = "
                f"{q[i - 1]:g}; expected strictly increasing flow"
            )
        if not p[i] < p[i - 1]:
            raise ValueError(
                f"{who}: pressure_Pa[{i}] = {p[i]:g} is not below pressure_Pa[{i - 1}] = "
                f"{p[i - 1]:g}; expected static pressure strictly falling with flow"
            )


def _pchip_slopes(x: FloatArray, y: FloatArray) -> FloatArray:
    """Knot slopes of the monotone piecewise-cubic Hermite interpolant (>= 3 points).

    Interior: weighted harmonic mean of the neighbouring secants (Fritsch & Butland 1984),
    zero where the secants change sign or one is zero. Ends: the shape-preserving
    three-point formula (Moler 2004, sec. 3.6).
    """
    h = np.diff(x)
    m = np.diff(y) / h
    d = np.zeros_like(y)
    w1 = 2.0 * h[1:] + h[:-1]
    w2 = h[1:] + 2.0 * h[:-1]
    flat = (np.sign(m[1:]) != np.sign(m[:-1])) | (m[1:] == 0.0) | (m[:-1] == 0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        hm = (w1 + w2) / (w1 / m[:-1] + w2 / m[1:])
    d[1:-1] = np.where(flat, 0.0, hm)

    def end(h0: float, h1: float, m0: float, m1: float) -> float:
        s = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1)
        if np.sign(s) != np.sign(m0):
            return 0.0
        if np.sign(m0) != np.sign(m1) and abs(s) > 3.0 * abs(m0):
            return 3.0 * m0
        return s

    d[0] = end(h[0], h[1], m[0], m[1])
    d[-1] = end(h[-1], h[-2], m[-1], m[-2])
    return d


def _frozen(a: ArrayLike) -> FloatArray:
    out = np.array(a, dtype=float)
    out.flags.writeable = False
    return out


@dataclass(frozen=True, eq=False)
class FanModel:
    """The static-pressure curve of a fan set at the study's air density, ready to evaluate.

    Built by :func:`fan_model`. Rows of ``coefficients`` are ``(c0, c1, c2, c3)`` of
    ``p = c0 + c1 t + c2 t^2 + c3 t^3`` with ``t = Q - anchors[row]`` (Pa, Q in m^3/s); row
    ``searchsorted(knots, Q, 'right')``: row 0 is the linear extension below the first point,
    rows 1..n-1 the cubic segments, row n the linear extension beyond the last point.
    """

    name: str
    count: int
    arrangement: str
    density_ratio: float  # study air density / rated air density
    knots_m3_per_s: FloatArray  # (n,) flows of the curve points for the set
    anchors_m3_per_s: FloatArray  # (n+1,) start of each row's local variable t
    coefficients: FloatArray  # (n+1, 4)
    shutoff_pressure_Pa: float  # pressure of the set at zero flow
    free_delivery_m3_per_s: float  # flow of the set at zero static pressure
    electrical_power_W: float  # input power of the set at this density; NaN if not given

    @property
    def flow_data_range_m3_per_s(self) -> tuple[float, float]:
        """Flow range of the set covered by the curve's data points, m^3/s."""
        return float(self.knots_m3_per_s[0]), float(self.knots_m3_per_s[-1])


def fan_model(curve: FanCurve, density_kg_per_m3: float) -> FanModel:
    """Return the monotone-interpolated curve of ``curve.count`` fans at the given air density.

    Fan laws at fixed speed: volumetric flow unchanged, pressure and power proportional to
    density, ``p(Q) = p_rated(Q) * rho / rho_rated``. ``n`` identical fans in parallel deliver
    ``n`` times the flow at the same pressure, ``p_set(Q) = p_one(Q / n)``; in series they add
    their pressures at the same flow, ``p_set(Q) = n * p_one(Q)``. The set's points
    ``(Q_i, p_i)`` are joined by the monotone cubic Hermite interpolant (PCHIP): knot slopes by
    the weighted harmonic mean of the neighbouring secants, ends by the shape-preserving
    three-point formula; on each segment ``p = c0 + c1 t + c2 t^2 + c3 t^3`` with
    ``c0 = p_k, c1 = d_k, c2 = (3 s - 2 d_k - d_k+1)/h, c3 = (d_k + d_k+1 - 2 s)/h^2``
    (``s`` the segment's secant, ``h`` its width). Scaling Q or p by a constant commutes with
    the interpolant, so scaling the points first is the same as scaling the curve.

    Parameters
    ----------
    curve : FanCurve with flows in m^3/s, static pressures in Pa at
        ``curve.rated_density_kg_per_m3`` (kg/m^3), ``count`` >= 1, ``arrangement``
        'parallel' or 'series', optional ``power_W`` (electrical input of one fan, W).
    density_kg_per_m3 : air density at the fan inlet in the study, kg/m^3 (> 0).

    Returns
    -------
    FanModel with the set's shut-off pressure (Pa, at Q = 0), free-delivery flow (m^3/s, at
    p = 0) and electrical power (W, ``count * power_W * rho/rho_rated``; NaN if unknown).

    Validity: the curve must pass :func:`validate_fan_curve`; ``count``, ``arrangement``,
    densities and power are checked too. Bad input raises ValueError with one line (set-up
    time, not the hot path). Outside the data points the curve is extended linearly: below
    the first flow with the first knot slope; beyond the last flow with the last knot slope
    (or the last secant if that slope is zero), so pressure goes negative past free delivery.
    Fans in series are assumed to see the same volumetric flow (incompressible air); fans in
    parallel are assumed to share the flow evenly (no recirculation through a stalled fan).

    Source: monotone interpolation: F. N. Fritsch & R. E. Carlson, SIAM J. Numer. Anal. 17(2)
    238-246 (1980); slopes: F. N. Fritsch & J. Butland, SIAM J. Sci. Stat. Comput. 5(2)
    300-304 (1984); end slopes: C. Moler, Numerical Computing with MATLAB (2004), sec. 3.6.
    Fan laws and fans in series/parallel: ASHRAE Handbook -- HVAC Systems and Equipment,
    chapter "Fans" (recalled from memory; common practice).

    Example: a curve (0, 0.01, 0.02 m^3/s; 60, 40, 0 Pa) at 1.2 kg/m^3, two in series, used at
    1.0 kg/m^3: shut-off pressure 2 * 60 * 1.0/1.2 = 100 Pa, free delivery 0.02 m^3/s.
    """
    validate_fan_curve(curve.flow_m3_per_s, curve.pressure_Pa, curve.name)
    who = f"fan {curve.name!r}"
    if (
        isinstance(curve.count, bool)
        or not isinstance(curve.count, (int, np.integer))
        or (curve.count < 1)
    ):
        raise ValueError(f"{who}: count = {curve.count!r}; expected a whole number >= 1")
    if curve.arrangement not in ("parallel", "series"):
        raise ValueError(
            f"{who}: arrangement = {curve.arrangement!r}; expected 'parallel' or 'series'"
        )
    for key, v in (
        ("rated_density_kg_per_m3", curve.rated_density_kg_per_m3),
        ("density_kg_per_m3", density_kg_per_m3),
    ):
        if not (isinstance(v, (int, float, np.floating)) and math.isfinite(v) and v > 0):
            raise ValueError(f"{who}: {key} = {v!r}; expected a finite density > 0 in kg/m^3")
    if curve.power_W is not None and not (math.isfinite(curve.power_W) and curve.power_W >= 0):
        raise ValueError(f"{who}: power_W = {curve.power_W!r}; expected a finite power >= 0 W")

    n = int(curve.count)
    ratio = float(density_kg_per_m3) / float(curve.rated_density_kg_per_m3)
    x = np.asarray(curve.flow_m3_per_s, dtype=float) * (n if curve.arrangement == "parallel" else 1)
    y = (
        np.asarray(curve.pressure_Pa, dtype=float)
        * ratio
        * (n if curve.arrangement == "series" else 1)
    )
    d = _pchip_slopes(x, y)
    h = np.diff(x)
    s = np.diff(y) / h
    seg = np.column_stack(
        (y[:-1], d[:-1], (3.0 * s - 2.0 * d[:-1] - d[1:]) / h, (d[:-1] + d[1:] - 2.0 * s) / h**2)
    )
    end_slope = d[-1] if d[-1] < 0.0 else s[-1]
    coef = np.vstack(([y[0], d[0], 0.0, 0.0], seg, [y[-1], end_slope, 0.0, 0.0]))
    anchors = np.concatenate(([x[0]], x))
    shutoff = float(y[0] - d[0] * x[0])
    free = float(x[-1] - y[-1] / end_slope)
    power = math.nan if curve.power_W is None else n * float(curve.power_W) * ratio
    return FanModel(
        name=curve.name,
        count=n,
        arrangement=curve.arrangement,
        density_ratio=ratio,
        knots_m3_per_s=_frozen(x),
        anchors_m3_per_s=_frozen(anchors),
        coefficients=_frozen(coef),
        shutoff_pressure_Pa=shutoff,
        free_delivery_m3_per_s=free,
        electrical_power_W=power,
    )


def fan_pressure(model: FanModel, flow_m3_per_s: ArrayLike) -> FloatArray:
    """Return the static pressure of the fan set at each flow, Pa.

    ``p(Q) = c0 + c1 t + c2 t^2 + c3 t^3`` with ``t = Q - anchor`` on the row of
    ``model.coefficients`` that holds Q (see :func:`fan_model`).

    Parameters
    ----------
    model : FanModel from :func:`fan_model`.
    flow_m3_per_s : volumetric flow through the set, m^3/s, any shape (one per design).

    Returns
    -------
    Static pressure, Pa, same shape as the flow: from the shut-off pressure at Q = 0 down to
    0 at free delivery, monotone non-increasing in Q.

    Validity: Q between the first and last data flow is interpolated. Q below the first data
    flow (when the data do not start at 0) and Q beyond the last data flow are extrapolated
    linearly (pressure negative past free delivery). Q < 0 is clipped to 0 (the shut-off
    pressure). NaN flow gives NaN.

    Source: PCHIP (Fritsch & Carlson 1980; Fritsch & Butland 1984), see :func:`fan_model`.

    Example: at a data point the curve passes exactly through the data: for the curve
    (0, 0.01, 0.02 m^3/s; 60, 40, 0 Pa) one fan at rated density, p(0.01) = 40 Pa.
    """
    q = np.maximum(np.asarray(flow_m3_per_s, dtype=float), 0.0)
    row = np.searchsorted(model.knots_m3_per_s, q, side="right")
    c = model.coefficients[row]
    t = q - model.anchors_m3_per_s[row]
    return c[..., 0] + t * (c[..., 1] + t * (c[..., 2] + t * c[..., 3]))


@dataclass(frozen=True, eq=False)
class FanTable:
    """Candidate fan sets stacked for per-design selection (built by :func:`fan_table`).

    All fans share one breakpoint grid (the union of their data flows); row
    ``index * (len(grid) + 1) + searchsorted(grid, Q, 'right')`` of the flat tables holds the
    anchor and the cubic's coefficients of fan ``index`` on that grid interval. The search is
    done with uniform bins (``bin = min(floor(Q * bins_per_m3_per_s), B - 1)``, at most one
    grid point per bin): ``searchsorted = below[bin] + (Q >= split[bin])``, exact, and several
    times faster than ``np.searchsorted`` on unsorted flows.
    """

    models: tuple[FanModel, ...]
    grid_m3_per_s: FloatArray  # (G,)
    bins_per_m3_per_s: float  # uniform-bin scale for the grid search
    bin_below: NDArray[np.intp]  # (B,) grid points in bins before this one
    bin_split_m3_per_s: FloatArray  # (B,) the grid point inside this bin, +inf if none
    anchors_m3_per_s: FloatArray  # (F*(G+1),)
    c0: FloatArray
    c1: FloatArray
    c2: FloatArray
    c3: FloatArray
    shutoff_pressure_Pa: FloatArray  # (F,)
    free_delivery_m3_per_s: FloatArray  # (F,)
    flow_data_min_m3_per_s: FloatArray  # (F,)
    flow_data_max_m3_per_s: FloatArray  # (F,)
    electrical_power_W: FloatArray  # (F,), NaN where unknown


def fan_table(models: Sequence[FanModel]) -> FanTable:
    """Return the candidate fan sets stacked on one common breakpoint grid for fast selection.

    Each fan's rows are re-indexed onto the union of all fans' data flows; a grid interval lies
    inside one segment of every fan, so the same anchor and coefficients are used as by
    :func:`fan_pressure` (results agree to the last bit).

    Parameters
    ----------
    models : one or more FanModel (from :func:`fan_model`).

    Returns
    -------
    FanTable (flat coefficient tables plus per-fan shut-off pressure in Pa, free delivery in
    m^3/s, data flow range in m^3/s and electrical power in W).

    Validity: raises ValueError for an empty sequence (set-up time).

    Source: common practice, no source (table look-up of a piecewise polynomial).

    Example: ``fan_table([a, b]).free_delivery_m3_per_s`` is
    ``[a.free_delivery_m3_per_s, b.free_delivery_m3_per_s]``.
    """
    models = tuple(models)
    if not models:
        raise ValueError("fans: an empty list of fan models; expected at least one fan")
    grid = np.unique(np.concatenate([m.knots_m3_per_s for m in models]))
    # One point inside each grid interval (and one below / beyond the grid).
    probe = np.concatenate(([grid[0] - 1.0], 0.5 * (grid[:-1] + grid[1:]), [grid[-1] + 1.0]))
    anchors, coef = [], []
    for m in models:
        row = np.searchsorted(m.knots_m3_per_s, probe, side="right")
        anchors.append(m.anchors_m3_per_s[row])
        coef.append(m.coefficients[row])
    a = np.concatenate(anchors)
    c = np.concatenate(coef)
    scale, below, split = _uniform_bins(grid)
    return FanTable(
        models=models,
        grid_m3_per_s=_frozen(grid),
        bins_per_m3_per_s=scale,
        bin_below=below,
        bin_split_m3_per_s=split,
        anchors_m3_per_s=_frozen(a),
        c0=_frozen(c[:, 0]),
        c1=_frozen(c[:, 1]),
        c2=_frozen(c[:, 2]),
        c3=_frozen(c[:, 3]),
        shutoff_pressure_Pa=_frozen([m.shutoff_pressure_Pa for m in models]),
        free_delivery_m3_per_s=_frozen([m.free_delivery_m3_per_s for m in models]),
        flow_data_min_m3_per_s=_frozen([m.knots_m3_per_s[0] for m in models]),
        flow_data_max_m3_per_s=_frozen([m.knots_m3_per_s[-1] for m in models]),
        electrical_power_W=_frozen([m.electrical_power_W for m in models]),
    )


def _bin_of(q: FloatArray, scale: float, nbins: int) -> NDArray[np.intp]:
    # fmin maps NaN to the last bin (the NaN then propagates through the cubic).
    return np.fmin(q * scale, nbins - 1.0).astype(np.intp)


def _uniform_bins(grid: FloatArray) -> tuple[float, NDArray[np.intp], FloatArray]:
    """Uniform bins over [0, grid max] with at most one grid point each (exact search)."""
    top = float(grid[-1]) if grid[-1] > 0 else 1.0
    nbins = max(16, 2 * len(grid))
    while True:
        scale = nbins / top
        bg = _bin_of(grid, scale, nbins)  # the same float operations as at look-up
        if np.all(np.diff(bg) > 0) or nbins >= 1 << 20:
            break
        nbins *= 2
    below = np.searchsorted(bg, np.arange(nbins), side="left").astype(np.intp)
    split = np.full(nbins, np.inf)
    split[bg] = grid
    if not np.all(np.diff(bg) > 0):  # grid points closer than 1e-6 of the range: no bins
        below = np.zeros(nbins, dtype=np.intp)
        split = np.full(nbins, np.nan)
    below.flags.writeable = False
    return scale, below, _frozen(split)


def _grid_interval(table: FanTable, q: FloatArray) -> NDArray[np.intp]:
    """``searchsorted(table.grid_m3_per_s, q, 'right')`` for flows q >= 0 (or NaN)."""
    if np.isnan(table.bin_split_m3_per_s[0]):
        return np.searchsorted(table.grid_m3_per_s, q, side="right")
    b = _bin_of(q, table.bins_per_m3_per_s, len(table.bin_below))
    row = table.bin_below.take(b)
    row += q >= table.bin_split_m3_per_s.take(b)
    return row


def _as_table(models: Sequence[FanModel] | FanTable) -> FanTable:
    return models if isinstance(models, FanTable) else fan_table(models)


def _index(table: FanTable, index: ArrayLike) -> tuple[NDArray[np.int64], NDArray[np.bool_] | None]:
    """Integer fan index clipped into range, and the mask of bad entries (None if all good)."""
    idx = np.asarray(index)
    if idx.dtype.kind not in "iu":
        idx = np.rint(np.nan_to_num(np.asarray(idx, dtype=float), nan=-1.0)).astype(np.int64)
    nf = len(table.models)
    if idx.size and (idx.min() < 0 or idx.max() >= nf):
        bad = (idx < 0) | (idx >= nf)
        return np.clip(idx, 0, nf - 1), bad
    return idx, None


def fan_pressure_indexed(
    models: Sequence[FanModel] | FanTable, index: ArrayLike, flow_m3_per_s: ArrayLike
) -> FloatArray:
    """Return the static pressure of each design's own fan set at that design's flow, Pa.

    ``p = c0 + c1 t + c2 t^2 + c3 t^3``, ``t = Q - anchor``, the row gathered from the stacked
    table at ``index * (G + 1) + searchsorted(grid, Q, 'right')`` (no loop over designs).

    Parameters
    ----------
    models : the candidate FanModel sequence, or a FanTable built once by :func:`fan_table`
        (faster when called repeatedly).
    index : integer fan choice per design (0-based), broadcast against the flow.
    flow_m3_per_s : volumetric flow through each design's fan set, m^3/s.

    Returns
    -------
    Static pressure, Pa, the broadcast shape of index and flow; identical to
    ``fan_pressure(models[index], Q)`` element by element.

    Validity: as :func:`fan_pressure` (Q < 0 clipped to 0, linear extrapolation outside the
    data). An index outside ``0..len(models)-1`` gives NaN (flagged, no exception).

    Source: PCHIP (Fritsch & Carlson 1980), see :func:`fan_model`; the gather is common
    practice, no source.

    Example: with ``models = [a, b]``,
    ``fan_pressure_indexed(models, [1, 0], [q1, q2])`` equals
    ``[fan_pressure(b, q1), fan_pressure(a, q2)]``.
    """
    table = _as_table(models)
    idx, bad = _index(table, index)
    p = _pressure_rows(table, idx * (len(table.grid_m3_per_s) + 1), flow_m3_per_s)
    return p if bad is None else np.where(bad, np.nan, p)


def _pressure_rows(table: FanTable, base: NDArray[np.intp], flow: ArrayLike) -> FloatArray:
    """Fan pressure, Pa, with the fans' first table rows ``base = index * (G + 1)`` given."""
    flow = np.asarray(flow, dtype=float)
    shape = np.broadcast_shapes(flow.shape, base.shape)
    q = np.maximum(np.broadcast_to(flow, shape), 0.0).reshape(-1)  # a fresh 1-D array
    row = _grid_interval(table, q)
    row += base.reshape(-1) if base.shape == shape else np.broadcast_to(base, shape).reshape(-1)
    # c0 + t (c1 + t (c2 + t c3)), t = q - anchor, evaluated in place (population-size
    # temporaries are page-faulted anew each time, and this runs on every root-find pass)
    t = table.anchors_m3_per_s.take(row)
    np.subtract(q, t, out=t)
    p = table.c3.take(row)
    coef = q  # q is not needed any more: its buffer holds each gathered coefficient in turn
    for c in (table.c2, table.c1, table.c0):
        p *= t
        p += c.take(row, out=coef)
    return p.reshape(shape)


def inside_fan_data(
    models: Sequence[FanModel] | FanTable, index: ArrayLike, flow_m3_per_s: ArrayLike
) -> NDArray[np.bool_]:
    """Return True where the flow lies within the data points of the design's fan set.

    ``Q_first <= Q <= Q_last`` of the set's curve points (after the parallel-count scaling).

    Parameters
    ----------
    models : candidate FanModel sequence or FanTable.
    index : integer fan choice per design.
    flow_m3_per_s : flow through the set, m^3/s.

    Returns
    -------
    bool array (False where the pressure is extrapolated, the flow is NaN or the index is bad).

    Validity: any input.

    Source: common practice, no source.

    Example: for the curve (0, 0.01, 0.02 m^3/s; ...) one fan, Q = 0.021 gives False.
    """
    table = _as_table(models)
    idx, bad = _index(table, index)
    q = np.asarray(flow_m3_per_s, dtype=float)
    ok = (q >= table.flow_data_min_m3_per_s[idx]) & (q <= table.flow_data_max_m3_per_s[idx])
    return ok if bad is None else ok & ~bad


class OperatingPoint(NamedTuple):
    """Result of :func:`operating_point` (one element per design)."""

    flow_m3_per_s: FloatArray  # NaN where not found
    pressure_Pa: FloatArray  # fan set's static pressure there; NaN where not found
    found: NDArray[np.bool_]
    iterations: NDArray[np.int64]  # system-curve calls each design needed after the two ends


def operating_point(
    fan_models: Sequence[FanModel] | FanTable,
    fan_index: ArrayLike,
    system_pressure_drop: Callable[[FloatArray], FloatArray],
    q_hint: ArrayLike | None = None,
    *,
    rtol: float = 1e-9,
    maxiter: int = 40,
    system_dp_at_zero: ArrayLike | None = None,
) -> OperatingPoint:
    """Return the flow and pressure where each design's fan set meets its system curve.

    Solves ``g(Q) = p_fan(Q) - dp_system(Q) = 0`` for every design at once on the bracket
    ``[0, Q_free]`` (``Q_free`` the free delivery of that design's fan set) with
    :func:`models.roots.bracketed_root` (Anderson-Bjorck regula falsi). ``g(0) = p_shutoff -
    dp_system(0)`` and ``g(Q_free) = -dp_system(Q_free)``, so a system curve rising from below
    the shut-off pressure always meets the falling fan curve inside the bracket. First trial
    point (unless ``q_hint`` is given): the fan curve taken as the straight line from shut-off
    to free delivery, the system curve as the parabola through its two known points,
    ``dp = dp0 + S u^2`` with ``u = Q/Q_free``, ``S = dp_system(Q_free) - dp0``; they meet at
    ``u = 2 P / (P + sqrt(P^2 + 4 S P))`` with ``P = p_shutoff - dp0``.

    Parameters
    ----------
    fan_models : candidate FanModel sequence, or a FanTable (build it once with
        :func:`fan_table` when calling repeatedly).
    fan_index : integer fan choice per design (0-based).
    system_pressure_drop : ``dp(Q) -> Pa`` vectorized over the population: called with an
        array of flows (m^3/s) of the population's shape, element i for design i; increasing
        in Q (heat sink plus extra impedance ``k Q^2``). It is called
        ``2 + iterations.max()`` times (once less if ``system_dp_at_zero`` is given).
    q_hint : optional first guess of the flow per design, m^3/s (e.g. a previous solution).
    rtol : relative tolerance on the flow (dimensionless); the absolute tolerance is
        ``1e-12 * Q_free``.
    maxiter : most system-curve calls after the two ends.
    system_dp_at_zero : ``dp_system(0)`` in Pa if known (0 for a pure flow-resistance system).

    Returns
    -------
    OperatingPoint(flow_m3_per_s in [0, Q_free], pressure_Pa (the fan set's static pressure
    at that flow, Pa), found (bool), iterations (int, system-curve calls after the ends)).

    Validity: a design whose system curve does not meet the fan curve inside the bracket
    (``dp_system(0) > p_shutoff``), whose system curve is NaN, whose fan index is out of
    range, or that did not converge in ``maxiter`` calls, comes back with NaN flow and
    pressure and ``found = False`` (flagged, never an exception). The found flow may lie
    outside the fan's data points (see :func:`inside_fan_data`).

    Source: operating point as the intersection of fan and system curves: ASHRAE Handbook --
    HVAC Systems and Equipment, chapter "Fans" (recalled from memory; common practice).
    Root finder: Anderson & Bjorck, BIT 13 (1973) 253-264. First guess: common practice.

    Example: a fan p = 100 (1 - Q/0.02) Pa (points at 0, 0.01, 0.02 m^3/s) against a system
    dp = 5e5 Q^2 meets it where 5e5 Q^2 + 5000 Q - 100 = 0: Q = 0.01 m^3/s, p = 50 Pa.
    """
    table = _as_table(fan_models)
    idx, bad = _index(table, fan_index)
    hi = table.free_delivery_m3_per_s[idx]
    lo = np.zeros_like(hi)

    base = idx * (len(table.grid_m3_per_s) + 1)

    def g(q: FloatArray) -> FloatArray:
        p, dp = _pressure_rows(table, base, q), system_pressure_drop(q)
        if np.shape(dp) != p.shape:  # e.g. one fan index for a whole population
            return p - dp
        p -= dp  # in place: p is a fresh array
        return p

    dp0 = system_pressure_drop(lo) if system_dp_at_zero is None else system_dp_at_zero
    dp0 = np.asarray(dp0, dtype=float)
    g_lo = table.shutoff_pressure_Pa[idx] - dp0
    g_hi = g(hi)
    if q_hint is None:
        with np.errstate(divide="ignore", invalid="ignore"):
            p, s = g_lo, g_lo - g_hi - table.shutoff_pressure_Pa[idx]  # P and S
            q_hint = hi * (2.0 * p / (p + np.sqrt(p * p + 4.0 * s * p)))
    res = bracketed_root(
        g,
        lo,
        hi,
        1e-12 * hi,
        rtol,
        maxiter,
        f_lo=g_lo,
        f_hi=g_hi,
        x_first=q_hint,
        method="anderson-bjorck",
    )
    found = res.converged if bad is None else res.converged & ~bad
    flow = np.where(found, res.root, np.nan)
    pressure = fan_pressure_indexed(table, idx, np.where(found, flow, 0.0))
    return OperatingPoint(flow, np.where(found, pressure, np.nan), found, res.iterations)


class FanPower(NamedTuple):
    """Result of :func:`fan_power_at`."""

    air_W: FloatArray  # aerodynamic (air) power Q * p_static, W
    electrical_W: FloatArray  # electrical input of the set (rated, density-scaled), W; NaN: unknown


def fan_power_at(model: FanModel, flow_m3_per_s: ArrayLike) -> FanPower:
    """Return the air power delivered by the fan set and its electrical input power, W.

    ``P_air = Q * p_fan(Q)`` (static air power). ``P_el = count * power_W * rho / rho_rated``:
    the electrical input at the rated point, scaled by the fan law for density at fixed
    speed, and taken as constant along the curve (a one-number estimate; a fan's input power
    really varies along its curve, by tens of percent between shut-off and free delivery).

    Parameters
    ----------
    model : FanModel from :func:`fan_model`.
    flow_m3_per_s : flow through the set, m^3/s, any shape.

    Returns
    -------
    FanPower(air_W, electrical_W), both W, shape of the flow. ``air_W`` is 0 at shut-off and
    at free delivery and positive between; ``electrical_W`` is NaN when the curve gave no
    power_W.

    Validity: as :func:`fan_pressure` (Q < 0 clipped to 0; beyond free delivery the
    extrapolated pressure is negative and so is the air power -- a point outside the fan's
    range, see :func:`inside_fan_data`).

    Source: static air power Q * p: ASHRAE Handbook -- HVAC Systems and Equipment, chapter
    "Fans" (recalled from memory); fan law power ~ density at fixed speed: same chapter
    (recalled from memory).

    Example: the curve (0, 0.01, 0.02 m^3/s; 60, 40, 0 Pa), one fan at rated density, Q =
    0.01 m^3/s: air power 0.01 * 40 = 0.4 W.
    """
    q = np.maximum(np.asarray(flow_m3_per_s, dtype=float), 0.0)
    air = q * fan_pressure(model, q)
    return FanPower(air, np.full(np.shape(q), model.electrical_power_W))
