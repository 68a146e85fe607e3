"""Heat-sink base: 1-D conduction, film, and spreading from rectangular sources.

The base is a rectangular plate, length ``a`` along the flow (x), width ``b`` across it (y),
thickness ``t``, conductivity ``k``. Heat enters through rectangular footprints on the source
face (z = 0); the fin side (z = t) is a uniform effective heat transfer coefficient
``h_eff = 1 / (R_sink a b)`` to the sink-side reference temperature (``R_sink`` is the fin
array's resistance referred to an isothermal base); the four edges are adiabatic.

Convention used throughout (the same as Muzychka, Culham & Yovanovich 2003 and Lee et al. 1995):

    mean source rise / Q  =  R_1D + R_film + R_sp,
    R_1D = t / (k a b),   R_film = 1 / (h_eff a b),

so a *spreading resistance* returned here EXCLUDES the 1-D and film parts, while a *temperature
rise* (``source_temperature_rise``) INCLUDES them: it is the mean temperature of a footprint above
the sink-side reference of ``h_eff``. Count the 1-D base conduction once.

Two ways to sum the Fourier modes, same truncation, same result to about 1e-9: "direct" (every
mode, design by design) and "grouped" (the mode weights depend only on the plate size and the
layout, the design only through phi(beta; t, h_eff/k): one table per layout, then a few dozen
interpolation nodes per design). The default "auto" groups the designs of a call by layout.

References
----------
Muzychka, Y. S., Culham, J. R., Yovanovich, M. M. (2003), "Thermal spreading resistance of
eccentric heat sources on rectangular flux channels", J. Electronic Packaging 125, 178-185.
Yovanovich, M. M., Muzychka, Y. S., Culham, J. R. (1999), "Spreading resistance of isoflux
rectangles and strips on compound flux channels", J. Thermophysics Heat Transfer 13(4), 495-500.
Lee, S., Song, S., Au, V., Moran, K. P. (1995), "Constriction/spreading resistance model for
electronics packaging", Proc. ASME/JSME Thermal Engineering Joint Conf., Vol. 4, 199-206.
The papers' full texts were not at hand when this was written: the equations below are given
in the papers' notation and were re-derived (separation of variables) and checked against an
independent finite-volume solution in tests/test_spreading.py; equation numbers are not cited
because they could not be verified.
"""

from __future__ import annotations

import functools
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from models.contract import HeatSource

FloatArray = NDArray[np.float64]

#: default number of Fourier modes per (base length / smallest source length), each direction
MODES_PER_SIZE = 8.0
#: default bounds on the number of modes per direction
MIN_MODES = 8
MAX_MODES = 100
#: elements per (design x mode x mode) work array; sets the block size (0.5 MB each: small
#: blocks avoid re-faulting fresh memory pages for every temporary, which was the main cost)
_BLOCK_ELEMENTS = 60_000
#: the grouped method interpolates phi(beta) - 1 in u = ln(beta * 1 m) on equal panels of at
#: most this width from the layout's smallest to its largest beta, one polynomial of degree
#: _PANEL_DEGREE per panel through Chebyshev-Lobatto nodes; pointwise error measured below
#: 1e-9 of |phi| for t = 0.5 .. 30 mm, h_eff/k = 0 .. 1e4 1/m (about 9 nodes per unit of u)
_PANEL_WIDTH = 1.5
_PANEL_DEGREE = 14
#: modes with beta t_min > _BETA_T_CUT are left out of the phi - 1 correction:
#: |phi - 1| <= 2 exp(-2 beta t) < 5e-16 there
_BETA_T_CUT = 18.0
#: designs per block of the grouped method (a block's work array stays within the CPU cache)
_DESIGN_BLOCK = 2048
#: modes per chunk when a layout table is built (bounds its memory for large mode counts)
_MODE_CHUNK = 1 << 14
#: method "auto" uses the grouped method for a group of at least this many designs, else direct
_MIN_GROUP = 32
_METHODS = ("auto", "grouped", "direct")


# ----------------------------------------------------------------------------- simple parts
def one_dimensional_base_resistance(
    t: ArrayLike, k: ArrayLike, a: ArrayLike, b: ArrayLike
) -> FloatArray:
    """Return the 1-D conduction resistance of the base plate, K/W.

    Formula: R_1D = t / (k a b).

    Parameters: t base thickness, m; k conductivity, W/(m K); a base length along the flow, m;
    b base width across the flow, m.

    Returns: R_1D in K/W, > 0 for valid inputs.

    Validity: t, k, a, b finite and > 0; otherwise NaN (flagged, no exception).

    Source: Fourier's law for a slab (common practice); it is the A_0 / B_0 (zero-mode) part of
    the flux-channel solution of Muzychka, Culham & Yovanovich (2003).

    Example: t = 5 mm, k = 200 W/(m K), a = b = 0.1 m gives 0.005 / (200 * 0.01) = 0.0025 K/W.
    """
    t, k, a, b = (np.asarray(v, dtype=float) for v in (t, k, a, b))
    ok = (t > 0) & (k > 0) & (a > 0) & (b > 0) & np.isfinite(t * k * a * b)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(ok, t / (k * a * b), np.nan)


def film_resistance(h_eff: ArrayLike, a: ArrayLike, b: ArrayLike) -> FloatArray:
    """Return the film resistance of the fin side referred to the base area, K/W.

    Formula: R_film = 1 / (h_eff a b)  (equals R_sink when h_eff = 1 / (R_sink a b)).

    Parameters: h_eff effective heat transfer coefficient of the fin side, W/(m^2 K); a, b base
    length and width, m.

    Returns: R_film in K/W, > 0 for valid inputs.

    Validity: h_eff, a, b > 0 (h_eff may be +inf: isothermal fin side, R_film = 0); otherwise NaN.

    Source: definition (common practice, no source).

    Example: h_eff = 1000 W/(m^2 K), a = b = 0.1 m gives 0.1 K/W.
    """
    h, a, b = (np.asarray(v, dtype=float) for v in (h_eff, a, b))
    ok = (h > 0) & (a > 0) & (b > 0) & np.isfinite(a * b) & ~np.isnan(h)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(ok, 1.0 / (h * a * b), np.nan)


def effective_htc(r_sink: ArrayLike, a: ArrayLike, b: ArrayLike) -> FloatArray:
    """Return the uniform fin-side heat transfer coefficient equivalent to a sink resistance.

    Formula: h_eff = 1 / (R_sink a b).

    Parameters: r_sink fin-array resistance referred to an isothermal base, K/W; a, b base length
    and width, m.

    Returns: h_eff in W/(m^2 K), > 0 for valid inputs.

    Validity: r_sink >= 0 (0 gives +inf, an isothermal fin side), a, b > 0; otherwise NaN.

    Source: Lee et al. (1995) (the sink-plane coefficient of their model); common practice.

    Example: R_sink = 0.1 K/W on a 0.1 m x 0.1 m base gives 1000 W/(m^2 K).
    """
    r, a, b = (np.asarray(v, dtype=float) for v in (r_sink, a, b))
    ok = (r >= 0) & (a > 0) & (b > 0) & np.isfinite(r * a * b)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(ok, 1.0 / (r * a * b), np.nan)


def spreading_function(zeta: ArrayLike, t: ArrayLike, k: ArrayLike, h_eff: ArrayLike) -> FloatArray:
    """Return the spreading function phi(zeta) of a plate cooled by h_eff on its far face (-).

    Formula (Muzychka, Culham & Yovanovich 2003; Yovanovich, Muzychka & Culham 1999):

        phi(zeta) = [(e^{2 zeta t} + 1) zeta k - (1 - e^{2 zeta t}) h]
                    / [(e^{2 zeta t} - 1) zeta k + (1 + e^{2 zeta t}) h]
                  = (zeta + (h/k) tanh(zeta t)) / (zeta tanh(zeta t) + h/k),

    the second (overflow-free) form being the one evaluated here. A Fourier mode of the source
    flux with wavenumber zeta and amplitude q raises the source-face temperature by
    q phi(zeta) / (k zeta).

    Parameters: zeta wavenumber, 1/m (> 0); t plate thickness, m; k conductivity, W/(m K);
    h_eff fin-side coefficient, W/(m^2 K) (+inf allowed: isothermal far face).

    Returns: phi, dimensionless; tanh(zeta t) <= phi <= coth(zeta t); phi -> 1 for zeta t >> 1.

    Validity: zeta, t, k > 0, h_eff > 0; otherwise NaN.

    Source: Muzychka, Culham & Yovanovich (2003), spreading function of the isotropic channel.

    Example: h_eff -> inf gives tanh(zeta t); zeta t = 20 gives 1.0 to 1e-16 for any h_eff.
    """
    z, t, k, h = (np.asarray(v, dtype=float) for v in (zeta, t, k, h_eff))
    ok = (z > 0) & (t > 0) & (k > 0) & (h > 0) & np.isfinite(z * t * k)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        r = k / h  # 0 for an isothermal far face
        th = np.tanh(z * t)
        phi = (r * z + th) / (r * z * th + 1.0)
    return np.where(ok, phi, np.nan)


def _mode_kernel(lam: FloatArray, dl: FloatArray, t: FloatArray, r: FloatArray) -> FloatArray:
    """k g(beta) = phi(beta) / beta on the grid beta = sqrt(lam_m^2 + del_n^2), shape
    (nb, M+1, N+1), with its beta -> 0 limit t + r at (0, 0); r = k / h. In place (a few
    passes over one block), no validation."""
    beta = lam[:, :, None] ** 2 + dl[:, None, :] ** 2
    np.sqrt(beta, out=beta)
    beta[:, 0, 0] = 1.0  # placeholder, overwritten below
    th = beta * t[:, None, None]
    np.tanh(th, out=th)
    rb = beta * r[:, None, None]  # r beta; 0 for an isothermal sink plane
    g = rb + th
    rb *= th
    rb += 1.0
    rb *= beta
    g /= rb  # (r beta + tanh) / (beta (r beta tanh + 1)) = phi / beta
    g[:, 0, 0] = t + r
    return g


def _valid_plate(*arrays: FloatArray) -> FloatArray:
    a, b, t, k, h = arrays
    return (
        (a > 0)
        & (b > 0)
        & (t > 0)
        & (k > 0)
        & (h > 0)
        & np.isfinite(a)
        & np.isfinite(b)
        & np.isfinite(t)
        & np.isfinite(k)
        & ~np.isnan(h)
    )


def _mode_counts(length: FloatArray, size: FloatArray, per_size: float, lo: int, hi: int):
    """Modes per direction: ceil(per_size * length / size), clipped to [lo, hi], int64."""
    with np.errstate(divide="ignore", invalid="ignore"):
        m = np.ceil(per_size * length / size)
    m = np.where(np.isfinite(m), m, lo)
    return np.clip(m, lo, hi).astype(np.int64)


# ----------------------------------------------------------------------------- centred source
def spreading_resistance_centred(
    a: ArrayLike,
    b: ArrayLike,
    t: ArrayLike,
    k: ArrayLike,
    h_eff: ArrayLike,
    c: ArrayLike,
    d: ArrayLike,
    *,
    modes_per_size: float = MODES_PER_SIZE,
    max_modes: int = MAX_MODES,
    extrapolate: bool = True,
    method: str = "auto",
) -> FloatArray:
    """Return the spreading resistance of one centred rectangular source, K/W (excl. 1-D, film).

    Formula (Yovanovich, Muzychka & Culham 1999, isotropic channel, in this module's notation:
    source c x d centred on an a x b base; lam_j = 2 j pi / a, del_l = 2 l pi / b,
    beta = sqrt(lam^2 + del^2), S_x = sin(lam c / 2) / (lam c / 2), S_y likewise with d, b):

        R_sp = 1/(a b k) [ 2 sum_j S_x^2 phi(lam_j)/lam_j + 2 sum_l S_y^2 phi(del_l)/del_l
                           + 4 sum_j sum_l S_x^2 S_y^2 phi(beta_jl)/beta_jl ],

    identical to the published half-width form R_s = 1/(2 a'^2 c' d' k) sum sin^2(a' d_m)
    phi/d_m^3 + ... with a' = c/2, c' = a/2 (source and base half-lengths), and so on.
    Only the even modes of the eccentric solution survive for a centred source.

    Truncation: j <= J = M // 2 with M = clip(ceil(modes_per_size * a / c), 8, max_modes), and
    likewise in y; the truncation error falls as 1/J^2 and, with ``extrapolate`` (default), one
    Richardson step on the J and J/2 partial sums removes most of it. Tolerance with the
    defaults: below 0.5 % of R_sp while the cap is not reached (c/a and d/b >= 0.08; measured
    at most 0.2 %), below 1 % down to c/a, d/b = 0.02 (cap reached; measured at most 0.84 %).
    ``method`` as in ``source_influence_matrix``: "grouped" evaluates the same modes through the
    per-(a, b, c, d) table of the eccentric solution with the source at the centre (within 1e-6
    of "direct"); "auto" takes it for groups of at least 32 designs.

    Parameters: a base length, m; b base width, m; t base thickness, m; k conductivity, W/(m K);
    h_eff fin-side coefficient, W/(m^2 K) (+inf allowed); c source length (along a), m; d source
    width (along b), m. Arrays broadcast together (designs). method "auto", "grouped" or
    "direct".

    Returns: R_sp in K/W, >= 0 (0 when the source covers the base); broadcast shape of inputs.

    Validity: all lengths, k, h_eff > 0, c <= a, d <= b. Outside: NaN (flagged, no exception).

    Source: Yovanovich, Muzychka & Culham (1999), isoflux rectangle centred on a rectangular
    flux channel with a convective sink plane; the spreading function of Muzychka, Culham &
    Yovanovich (2003).

    Example: a source covering the whole base (c = a, d = b) has R_sp = 0 (1-D limit).
    a = b = 0.1 m, t = 8 mm, k = 200, h_eff = 1000, c = d = 20 mm: R_sp = 0.1292 K/W, so the
    mean source rise is 0.004 + 0.1 + 0.1292 = 0.2332 K/W (a 80 x 80 x 16-cell finite-volume
    solution gives 0.2340 K/W; the published half-space limit k sqrt(cd) R_sp -> 0.4732 is
    reproduced for small, deep sources).
    """
    _check_method(method)
    arr = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (a, b, t, k, h_eff, c, d)))
    shape = arr[0].shape
    a_, b_, t_, k_, h_, c_, d_ = (v.ravel() for v in arr)
    ok = _valid_plate(a_, b_, t_, k_, h_) & (c_ > 0) & (d_ > 0) & (c_ <= a_) & (d_ <= b_)
    ok &= np.isfinite(c_) & np.isfinite(d_)
    M = _mode_counts(a_, c_, modes_per_size, MIN_MODES, max_modes) // 2
    N = _mode_counts(b_, d_, modes_per_size, MIN_MODES, max_modes) // 2
    out = np.full(a_.shape, np.nan)
    idx = np.flatnonzero(ok)
    if method != "direct":  # the eccentric table with the source at the centre (odd modes: 0)
        opts = (modes_per_size, max_modes, extrapolate)
        small = []
        for rows in _groups([a_, b_, c_, d_], idx):
            if method == "grouped" or rows.size >= _MIN_GROUP:
                i0 = rows[0]
                lay = (
                    float(a_[i0]),
                    float(b_[i0]),
                    ([a_[i0] / 2], [b_[i0] / 2], [c_[i0]], [d_[i0]]),
                )
                _grouped_rows(rows, lay, t_, k_, h_, None, opts, out, with_one_d=False)
            else:
                small.append(rows)
        idx = np.concatenate(small) if small else idx[:0]
    for sel in _blocks(M[idx], N[idx]):
        i = idx[sel]
        out[i] = _centred_block(
            a_[i], b_[i], t_[i], k_[i], h_[i], c_[i], d_[i], M[i], N[i], extrapolate
        )
    return out.reshape(shape)


def _centred_block(a, b, t, k, h, c, d, M, N, extrapolate):
    j = np.arange(M.max() + 1, dtype=float)
    n = np.arange(N.max() + 1, dtype=float)
    lam = 2.0 * np.pi * j[None, :] / a[:, None]
    dl = 2.0 * np.pi * n[None, :] / b[:, None]
    sx = np.sinc(lam * c[:, None] / (2.0 * np.pi)) ** 2  # (sin(lam c/2) / (lam c/2))^2
    sy = np.sinc(dl * d[:, None] / (2.0 * np.pi)) ** 2
    wx = np.where(j[None, :] == 0, 1.0, 2.0) * sx
    wy = np.where(n[None, :] == 0, 1.0, 2.0) * sy
    g = _mode_kernel(lam, dl, t, k / h)
    g[:, 0, 0] = 0.0  # the (0, 0) mode is R_1D + R_film: excluded from R_sp

    def partial(mx, ny):
        fx = wx * (j[None, :] <= mx[:, None])
        fy = wy * (n[None, :] <= ny[:, None])
        return np.einsum("bm,bmn,bn->b", fx, g, fy, optimize=True)

    s = partial(M, N)
    if extrapolate:
        s = s + (s - partial(M // 2, N // 2)) / 3.0
    return s / (a * b * k)


# ----------------------------------------------------------------------------- Lee et al.
def spreading_resistance_lee(
    a: ArrayLike,
    b: ArrayLike,
    t: ArrayLike,
    k: ArrayLike,
    h_eff: ArrayLike,
    c: ArrayLike,
    d: ArrayLike,
) -> FloatArray:
    """Return the closed-form mean spreading resistance of Lee et al. (1995), K/W (excl. 1-D, film).

    Formula (equivalent circular radii of source and base):

        r1 = sqrt(c d / pi), r2 = sqrt(a b / pi), eps = r1/r2, tau = t/r2, Bi = h_eff r2 / k,
        lam_c = pi + 1 / (sqrt(pi) eps),
        phi_c = (tanh(lam_c tau) + lam_c/Bi) / (1 + (lam_c/Bi) tanh(lam_c tau)),
        psi_avg = (1/2) (1 - eps)^(3/2) phi_c,
        R_sp = psi_avg / (sqrt(pi) k r1).

    Parameters: a, b base length and width, m; t base thickness, m; k conductivity, W/(m K);
    h_eff fin-side coefficient, W/(m^2 K) (+inf allowed); c, d source length and width, m.

    Returns: R_sp in K/W, >= 0 (0 when the source area equals the base area).

    Validity: the model is for a centred source; it ignores the source and base aspect ratios
    (equivalent circles). Against the rectangular series (``spreading_resistance_centred``) it
    was found within about +-12 % for 0.1 <= eps <= 0.5, 0.03 <= t/r2 <= 0.3 and
    1e-3 <= Bi <= 10, square-ish shapes (tests/test_spreading.py). Inputs with any length,
    k or h_eff <= 0, or c d > a b: NaN (flagged, no exception).

    Source: Lee, Song, Au & Moran (1995), average constriction resistance of a circular source
    on a circular plate with a convective sink plane, as restated by S. Lee, "Calculating
    spreading resistance in heat sinks", Electronics Cooling 4(1), 1998 (formulas recalled from
    memory; the papers were not at hand).

    Example: eps -> 1 gives 0; small source on a thick, weakly cooled plate (phi_c -> 1) gives
    k sqrt(c d) R_sp -> 1/2 (exact isoflux disc on a half-space: 8 / (3 pi^1.5) = 0.479).
    """
    a, b, t, k, h, c, d = (np.asarray(v, dtype=float) for v in (a, b, t, k, h_eff, c, d))
    ok = _valid_plate(a, b, t, k, h) & (c > 0) & (d > 0) & (c * d <= a * b)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        r1 = np.sqrt(c * d / np.pi)
        r2 = np.sqrt(a * b / np.pi)
        eps = np.minimum(r1 / r2, 1.0)
        tau = t / r2
        inv_bi = k / (h * r2)  # 1/Bi, 0 for an isothermal sink plane
        lam = np.pi + 1.0 / (np.sqrt(np.pi) * eps)
        th = np.tanh(lam * tau)
        phi_c = (th + lam * inv_bi) / (1.0 + lam * inv_bi * th)
        psi = 0.5 * (1.0 - eps) ** 1.5 * phi_c
        r = psi / (np.sqrt(np.pi) * k * r1)
    return np.where(ok, r, np.nan)


# ----------------------------------------------------------------------------- several sources
def check_sources_on_base(
    a: ArrayLike, b: ArrayLike, x: ArrayLike, y: ArrayLike, c: ArrayLike, d: ArrayLike
) -> NDArray[np.bool_]:
    """Return, per design and source, True where the footprint lies on the base and overlaps
    no other footprint.

    Formula: on base  <=>  c, d > 0 and 0 <= x - c/2, x + c/2 <= a, 0 <= y - d/2, y + d/2 <= b
    (1e-9 relative slack); overlap of i and j  <=>  |x_i - x_j| < (c_i + c_j)/2 and
    |y_i - y_j| < (d_i + d_j)/2 (touching edges are allowed). NaN x (or y) means centred.

    Parameters: a, b base length and width, m, shape (n,) or scalar; x, y footprint centre along
    the flow from the inlet edge and across it from the left edge, m; c, d footprint length and
    width, m; x, y, c, d of shape (S,) or (n, S).

    Returns: boolean array (n, S); False marks a source off the base, of non-positive size, or
    overlapping another.

    Validity: any finite input; non-finite sizes or base dimensions give False.

    Source: geometry (common practice, no source).

    Example: a = b = 0.1, one source x = y = 0.05, c = d = 0.02 gives [[True]]; moving it to
    x = 0.095 gives [[False]] (it would overhang the outlet edge by 5 mm).
    """
    (a, b), (x, y, c, d) = _broadcast((a, b), (x, y, c, d))
    on = _on_base(a, b, x, y, c, d)
    tol = 1e-9 * np.maximum(a, b)[:, None, None]
    with np.errstate(invalid="ignore"):
        ox = np.abs(x[:, :, None] - x[:, None, :]) < (c[:, :, None] + c[:, None, :]) / 2 - tol
        oy = np.abs(y[:, :, None] - y[:, None, :]) < (d[:, :, None] + d[:, None, :]) / 2 - tol
    over = ox & oy
    s = x.shape[1]
    over[:, np.arange(s), np.arange(s)] = False
    return on & ~over.any(axis=2)


def _on_base(a, b, x, y, c, d) -> NDArray[np.bool_]:
    """(n, S) mask: footprint of positive, finite size entirely on the base (1e-9 rel. slack)."""
    tol = 1e-9 * np.maximum(a, b)[:, None]
    a, b = a[:, None], b[:, None]
    with np.errstate(invalid="ignore"):
        return (
            (c > 0)
            & (d > 0)
            & np.isfinite(c)
            & np.isfinite(d)
            & (x - c / 2 >= -tol)
            & (x + c / 2 <= a + tol)
            & (y - d / 2 >= -tol)
            & (y + d / 2 <= b + tol)
        )


def source_layout_problems(
    a: float,
    b: float,
    x: Sequence[float | None],
    y: Sequence[float | None],
    c: Sequence[float],
    d: Sequence[float],
    names: Sequence[str] | None = None,
) -> list[str]:
    """Return one plain-language line per footprint that is off the base, empty or overlapping.

    Formula: the tests of ``check_sources_on_base`` for one base (a, b); None or NaN position
    means centred.

    Parameters: a, b base length and width, m (for a study: the smallest base the search may
    choose); x, y footprint centres, m; c, d footprint length and width, m; names source names
    (default "source 1", ...).

    Returns: list of messages (empty when the layout is valid), e.g.
    "source 'igbt': footprint x = 0.085 +- 0.01 m runs past the base length 0.09 m
    (expected 0 <= x - c/2 and x + c/2 <= a)".

    Validity: any input; used by the study-file validator, never in the hot path.

    Source: geometry (common practice, no source).

    Example: source_layout_problems(0.1, 0.1, [0.05], [0.05], [0.02], [0.02]) == [].
    """
    s = len(c)
    names = list(names) if names is not None else [f"source {i + 1}" for i in range(s)]
    xs = [a / 2 if v is None or not np.isfinite(v) else float(v) for v in x]
    ys = [b / 2 if v is None or not np.isfinite(v) else float(v) for v in y]
    tol = 1e-9 * max(a, b)
    msgs: list[str] = []
    for i in range(s):
        n, ci, di = names[i], float(c[i]), float(d[i])
        if not (ci > 0 and di > 0 and np.isfinite(ci) and np.isfinite(di)):
            msgs.append(f"source '{n}': footprint {ci} m x {di} m; expected positive sizes")
            continue
        if xs[i] - ci / 2 < -tol or xs[i] + ci / 2 > a + tol:
            msgs.append(
                f"source '{n}': footprint x = {xs[i]:g} +- {ci / 2:g} m runs past the base "
                f"length {a:g} m (expected 0 <= x - c/2 and x + c/2 <= a)"
            )
        if ys[i] - di / 2 < -tol or ys[i] + di / 2 > b + tol:
            msgs.append(
                f"source '{n}': footprint y = {ys[i]:g} +- {di / 2:g} m runs past the base "
                f"width {b:g} m (expected 0 <= y - d/2 and y + d/2 <= b)"
            )
    for i in range(s):
        for j in range(i + 1, s):
            if (
                abs(xs[i] - xs[j]) < (c[i] + c[j]) / 2 - tol
                and abs(ys[i] - ys[j]) < (d[i] + d[j]) / 2 - tol
            ):
                msgs.append(
                    f"sources '{names[i]}' and '{names[j]}' overlap; expected separate footprints"
                )
    return msgs


def heat_source_arrays(sources: Sequence[HeatSource]) -> dict[str, FloatArray]:
    """Return the footprints and powers of ``sources`` as arrays of shape (S,) (SI).

    Formula: none (unpacking); a ``None`` position becomes NaN, which the functions of this
    module read as "centred on the base".

    Parameters: sources, a sequence of :class:`models.contract.HeatSource`.

    Returns: dict with keys x, y, c (length along the flow), d (width across it), power, each a
    float array of shape (S,); units m and W.

    Validity: any sequence (empty gives arrays of shape (0,)).

    Source: none (data plumbing).

    Example: one 20 W source, 10 mm x 15 mm, centred: x = [nan], c = [0.01], d = [0.015].
    """

    def col(f):
        return np.array([np.nan if f(s) is None else float(f(s)) for s in sources], dtype=float)

    return dict(
        x=col(lambda s: s.x_m),
        y=col(lambda s: s.y_m),
        c=col(lambda s: s.length_m),
        d=col(lambda s: s.width_m),
        power=col(lambda s: s.power_W),
    )


def _broadcast(design, sources, centre=True):
    """Design arrays -> float (n,); footprint arrays ((S,) or (n, S)) -> float (n, S).

    The first two design arrays are the base length and width: with ``centre``, NaN x or y
    (first two footprint arrays) are replaced by the base centre; without, every result is a
    read-only broadcast view (no copy)."""
    dz = [np.atleast_1d(np.asarray(v, dtype=float)) for v in design]
    sz = [np.atleast_1d(np.asarray(v, dtype=float)) for v in sources]
    if any(v.ndim != 1 for v in dz) or any(v.ndim > 2 for v in sz):
        raise ValueError("design arrays must be 1-D (n,), source arrays (S,) or (n, S)")
    n = np.broadcast_shapes(*(v.shape for v in dz), *(v.shape[:1] for v in sz if v.ndim == 2))[0]
    s = np.broadcast_shapes(*(v.shape[-1:] for v in sz))[0]
    dz = [np.broadcast_to(v, (n,)) for v in dz]
    sz = [np.broadcast_to(v if v.ndim == 2 else v[None, :], (n, s)) for v in sz]
    if not centre:
        return dz, sz
    a, b = dz[0], dz[1]
    sz[0] = np.where(np.isnan(sz[0]), a[:, None] / 2, sz[0])
    sz[1] = np.where(np.isnan(sz[1]), b[:, None] / 2, sz[1])
    return dz, sz


def source_influence_matrix(
    a: ArrayLike,
    b: ArrayLike,
    t: ArrayLike,
    k: ArrayLike,
    h_eff: ArrayLike,
    x: ArrayLike,
    y: ArrayLike,
    c: ArrayLike,
    d: ArrayLike,
    *,
    modes_per_size: float = MODES_PER_SIZE,
    max_modes: int = MAX_MODES,
    extrapolate: bool = True,
    method: str = "auto",
) -> FloatArray:
    """Return the influence matrix R[n, j, i]: mean rise of footprint j per watt into source i, K/W.

    Formula (Muzychka, Culham & Yovanovich 2003, eccentric isoflux rectangles, superposed): with
    lam_m = m pi / a, del_n = n pi / b, beta_mn = sqrt(lam_m^2 + del_n^2), eps_0 = 1,
    eps_{m>0} = 2, and the footprint averages of the cosine modes
    P_i(m) = cos(lam_m x_i) sin(lam_m c_i / 2) / (lam_m c_i / 2)  (P_i(0) = 1), Q_i(n) likewise
    in y,

        R_ji = 1/(a b) sum_{m>=0} sum_{n>=0} eps_m eps_n P_i(m) P_j(m) Q_i(n) Q_j(n) g(beta_mn),
        g(beta) = phi(beta) / (k beta),   g(0) = t/k + 1/h_eff.

    The (0, 0) term is R_1D + R_film; the single sums (m = 0 or n = 0) and the double sum are the
    published A_m, A_n and A_mn terms of the mean source temperature. R is symmetric
    (reciprocity), and R_jj - R_1D - R_film is source j's own spreading resistance.

    Truncation: per design m <= M = clip(ceil(modes_per_size * a / min c), 8, max_modes), n <= N
    likewise with b / min d; with ``extrapolate`` one Richardson step on the (M, N) and
    (M/2, N/2) partial sums (error ~ 1/M^2). Tolerance with the defaults: below 0.5 % of the
    design's largest spreading part while the cap is not reached (every c/a, d/b >= 0.08;
    measured at most 0.15 % over 95 random 3-source designs), below 1 % down to footprints of
    2 % of the base (cap reached).

    Method: "direct" sums the modes design by design. "grouped" uses that the mode weights
    w_ji(m, n) (Richardson factor included) depend only on (a, b) and the layout, the design
    only through phi(beta; t, h_eff / k). Per group of designs sharing (a, b, x, y, c, d):

        k a b R_ji = (t + k/h_eff) + S0_ji + sum_g C_gji (phi(beta_g) - 1),
        S0_ji = sum_{(m,n) != 0} w_ji / beta_mn  (exact),
        C_gji = sum_{(m,n) != 0} L_g(ln beta_mn) w_ji / beta_mn,

    L_g the Lagrange basis of piecewise polynomials in ln(beta) (panels of width <= 1.5,
    degree 14, Chebyshev-Lobatto nodes beta_g): the interpolation of phi - 1 is collapsed onto
    the nodes, exactly and for any sign of the weights. phi is analytic in a strip of half-width
    pi/2 about the real ln(beta) axis for any t and Bi, so the interpolation error is uniform
    (measured below 1e-9 of |phi| for every t, h_eff tried). Nodes with beta t_min > 18 are dropped
    (|phi - 1| <= 2 exp(-2 beta t) < 5e-16). The table (S0, C, nodes: a few kB) is built once
    per layout and cached (it depends only on its arguments); per design only
    (phi(beta_g) - 1) @ C remains. Deviation from "direct": below 1e-6 of
    sum_i |R_ji - R_1D - R_film| (tested; measured below 1e-9). "auto" (default) takes
    "grouped" for groups of at least 32 designs and "direct" for smaller ones, so a design's
    result depends on the rest of the call by that much at most.

    Parameters: a, b base length (along the flow) and width, m, shape (n,) or scalar; t base
    thickness, m; k conductivity, W/(m K); h_eff fin-side coefficient, W/(m^2 K) (+inf allowed);
    x, y footprint centres (from the inlet edge, from the left edge), m, NaN = centred; c, d
    footprint length and width, m; x, y, c, d of shape (S,) or (n, S); method "auto",
    "grouped" or "direct" (anything else raises ValueError: a programming error, not data).

    Returns: array (n, S, S) in K/W; rows of designs with invalid plates or with a source off
    the base are NaN (see ``check_sources_on_base``). Overlapping footprints are computed by
    superposition (their fluxes add) but flagged by ``check_sources_on_base``.

    Validity: a, b, t, k, h_eff > 0; footprints on the base. Outside: NaN rows, no exception.

    Source: Muzychka, Culham & Yovanovich (2003), J. Electronic Packaging 125, 178-185
    (solution for eccentric sources; superposition for several).

    Example: a single source covering the base gives R = R_1D + R_film exactly.
    """
    return _run(a, b, t, k, h_eff, x, y, c, d, None, modes_per_size, max_modes, extrapolate, method)


def source_temperature_rise(
    a: ArrayLike,
    b: ArrayLike,
    t: ArrayLike,
    k: ArrayLike,
    h_eff: ArrayLike,
    x: ArrayLike,
    y: ArrayLike,
    c: ArrayLike,
    d: ArrayLike,
    power: ArrayLike,
    *,
    modes_per_size: float = MODES_PER_SIZE,
    max_modes: int = MAX_MODES,
    extrapolate: bool = True,
    method: str = "auto",
) -> FloatArray:
    """Return the mean temperature rise of each source footprint above the sink-side reference, K.

    Formula: theta_j = sum_i R_ji Q_i with R_ji of ``source_influence_matrix`` (superposition of
    the eccentric-source solutions of Muzychka, Culham & Yovanovich 2003), evaluated without
    forming R: W(m, n) = sum_i Q_i eps_m eps_n P_i(m) Q_i(n), theta_j = 1/(a b) sum_mn
    P_j(m) Q_j(n) g(beta_mn) W(m, n). It INCLUDES the 1-D and film parts: for one source,
    theta / Q = R_1D + R_film + R_sp. "Sink-side reference" is the temperature that h_eff refers
    to (the fin array's reference, e.g. the air, when h_eff = 1/(R_sink a b)). With the
    "grouped" method (see ``source_influence_matrix``):

        theta_j = Q_tot (t/k + 1/h_eff)/(a b) + [sum_i Q_i (S0_ji + sum_g C_gji (phi(beta_g) - 1))]
                  / (a b k),

    S0 and the node weights C depending only on (a, b) and the layout (computed once per group
    and kept in a small cache), beta_g the interpolation nodes.

    Truncation and tolerance: as ``source_influence_matrix`` (below 0.5 % of the spreading part
    with the defaults while the cap of ``max_modes`` modes per direction is not reached, below
    1 % for footprints down to 2 % of the base; "grouped" within 1e-6 of "direct").
    Cost, one core, about 100 x 100 modes, 4 sources: "direct" about 150-400 us per design;
    "grouped" 5-15 ms per new layout (cached after) plus 0.3 us per design: 1e5 designs about
    0.03 s, 1e6 about 0.35 s using about 50 MB beyond the inputs and output. Raising
    ``max_modes`` costs the grouped method almost nothing per design (400 modes: table about
    60 ms, +25 % per design) but makes "direct" 16 times slower.

    Parameters: a, b base length (along the flow) and width, m, shape (n,) or scalar; t base
    thickness, m; k conductivity, W/(m K); h_eff fin-side coefficient, W/(m^2 K) (+inf allowed);
    x, y footprint centres from the inlet and left edges, m (NaN = centred); c, d footprint length
    and width, m; power heat into each footprint, W; x, y, c, d, power of shape (S,) or (n, S);
    method "auto" (default), "grouped" or "direct" (see ``source_influence_matrix``).

    Returns: array (n, S) of mean footprint temperature rises, K. Designs with an invalid plate
    or a source off the base: NaN row (flag it with ``check_sources_on_base``).

    Validity: a, b, t, k, h_eff > 0, footprints on the base; outside: NaN rows, no exception.

    Source: Muzychka, Culham & Yovanovich (2003), J. Electronic Packaging 125, 178-185.

    Example: one source covering a 0.1 m x 0.1 m, 5 mm thick base, k = 200, h_eff = 1000,
    Q = 10 W: theta = 10 * (0.0025 + 0.1) = 1.025 K.
    """
    return _run(
        a, b, t, k, h_eff, x, y, c, d, power, modes_per_size, max_modes, extrapolate, method
    )


def _check_method(method: str) -> None:
    if method not in _METHODS:
        raise ValueError(f"method: {method!r}; expected one of {', '.join(_METHODS)}")


def _run(a, b, t, k, h, x, y, c, d, power, per_size, max_modes, extrapolate, method):
    _check_method(method)
    src = (x, y, c, d) if power is None else (x, y, c, d, power)
    (a, b, t, k, h), src = _broadcast((a, b, t, k, h), src, centre=False)
    x, y, c, d = src[:4]
    q = None if power is None else src[4]
    n, s = x.shape
    out = np.full((n, s, s) if q is None else (n, s), np.nan)
    if s == 0 or n == 0:
        return out
    ok = _valid_plate(a, b, t, k, h)
    if q is not None:
        ok &= np.isfinite(q).all(axis=1)
    opts = (per_size, max_modes, extrapolate)
    layout = None if method == "direct" else _common_layout(a, b, (x, y, c, d))
    if layout is not None:  # the usual case: one plate size and layout for the whole call
        a0, b0, (x0, y0, c0, d0) = layout
        on = _on_base(np.array([a0]), np.array([b0]), x0[None], y0[None], c0[None], d0[None])
        rows = np.flatnonzero(ok) if on.all() else np.zeros(0, dtype=np.int64)
        if method == "grouped" or rows.size >= _MIN_GROUP:
            _grouped_rows(rows, layout, t, k, h, q, opts, out, with_one_d=True)
            return out
    x = np.where(np.isnan(x), a[:, None] / 2, x)
    y = np.where(np.isnan(y), b[:, None] / 2, y)
    # overlapping footprints do not invalidate the physics (superposition), only the study
    ok &= _on_base(a, b, x, y, c, d).all(axis=1)
    idx = np.flatnonzero(ok)
    if method != "direct":
        small = []
        for rows in _groups([a, b, x, y, c, d], idx):
            if method == "grouped" or rows.size >= _MIN_GROUP:
                i0 = rows[0]
                layout = (float(a[i0]), float(b[i0]), (x[i0], y[i0], c[i0], d[i0]))
                _grouped_rows(rows, layout, t, k, h, q, opts, out, with_one_d=True)
            else:
                small.append(rows)
        idx = np.concatenate(small) if small else idx[:0]
    M = _mode_counts(a[idx], c[idx].min(axis=1, initial=np.inf), per_size, MIN_MODES, max_modes)
    N = _mode_counts(b[idx], d[idx].min(axis=1, initial=np.inf), per_size, MIN_MODES, max_modes)
    for sel in _blocks(M, N):
        i = idx[sel]
        qi = None if q is None else q[i]
        out[i] = _eccentric_block(
            a[i],
            b[i],
            t[i],
            k[i],
            h[i],
            x[i],
            y[i],
            c[i],
            d[i],
            M[sel],
            N[sel],
            qi,
            extrapolate,
        )
    return out


def _blocks(M: NDArray[np.int64], N: NDArray[np.int64]):
    """Yield index arrays of designs, grouped by mode count, each block within the memory budget."""
    if M.size == 0:
        return
    L = np.maximum(M, N)
    order = np.argsort(L, kind="stable")
    Ls = L[order]
    i0 = 0
    while i0 < order.size:
        nb = max(1, _BLOCK_ELEMENTS // (int(Ls[i0]) + 1) ** 2)
        end = min(order.size, i0 + nb)
        nb = max(1, _BLOCK_ELEMENTS // (int(Ls[end - 1]) + 1) ** 2)
        end = min(order.size, i0 + nb)
        yield order[i0:end]
        i0 = end


def _footprint_mean(lam: FloatArray, centre: FloatArray, size: FloatArray) -> FloatArray:
    """Mean of cos(lam u) over [centre - size/2, centre + size/2]: (nb, S, modes).

    = cos(lam centre) sin(lam size / 2) / (lam size / 2), and 1 for lam = 0."""
    lam3 = lam[:, None, :]
    return np.cos(lam3 * centre[:, :, None]) * np.sinc(lam3 * size[:, :, None] / (2.0 * np.pi))


def _eccentric_block(a, b, t, k, h, x, y, c, d, M, N, q, extrapolate):
    mm = np.arange(M.max() + 1, dtype=float)
    nn = np.arange(N.max() + 1, dtype=float)
    lam = np.pi * mm[None, :] / a[:, None]  # (nb, M+1)
    dl = np.pi * nn[None, :] / b[:, None]  # (nb, N+1)
    # footprint means of cos(lam x), cos(del y): (nb, S, M+1), (nb, S, N+1)
    px = _footprint_mean(lam, x, c)
    py = _footprint_mean(dl, y, d)
    ex = np.where(mm == 0, 1.0, 2.0)
    ey = np.where(nn == 0, 1.0, 2.0)
    g = _mode_kernel(lam, dl, t, k / h)

    def partial(mx, ny):
        """Truncated sums over m <= mx, n <= ny (per design), on the smallest array slice."""
        sm, sn = int(mx.max()) + 1, int(ny.max()) + 1
        fx = px[:, :, :sm] * (mm[:sm] <= mx[:, None])[:, None, :]
        fy = py[:, :, :sn] * (nn[:sn] <= ny[:, None])[:, None, :]
        gg = g[:, :sm, :sn]
        if q is None:  # influence matrix R[b, j, i]
            s = fx.shape[1]
            src = (fx * ex[:sm])[:, None, :, :] * fx[:, :, None, :]  # (nb, j, i, m)
            tmp = src.reshape(fx.shape[0], s * s, sm) @ gg  # (nb, j*i, n)
            yy = ((fy * ey[:sn])[:, None, :, :] * fy[:, :, None, :]).reshape(fx.shape[0], s * s, sn)
            return np.sum(tmp * yy, axis=2).reshape(fx.shape[0], s, s)
        w = np.swapaxes(fx * ex[:sm] * q[:, :, None], 1, 2) @ (fy * ey[:sn])  # (nb, m, n)
        return np.sum((fx @ (gg * w)) * fy, axis=2)  # (nb, S)

    full = partial(M, N)
    if extrapolate:
        half = partial(M // 2, N // 2)
        full = full + (full - half) / 3.0  # the (0,0) term cancels in full - half
    scale = (a * b * k)[:, None, None] if q is None else (a * b * k)[:, None]
    return full / scale


# ----------------------------------------------------------------------------- grouped method
def _constant(v: FloatArray) -> bool:
    """True when every design (first axis) holds the same values (NaN equal to NaN)."""
    if v.shape[0] <= 1 or v.strides[0] == 0:
        return True
    v0 = v[0]
    same = v == v0
    if not same.all():
        same |= np.isnan(v) & np.isnan(v0)
    return bool(same.all())


def _common_layout(a, b, sources):
    """(a, b, (x, y, c, d)) with x, y centred, when all designs share them, else None."""
    if not all(_constant(v) for v in (a, b, *sources)):
        return None
    a0, b0 = float(a[0]), float(b[0])
    x0, y0, c0, d0 = (np.array(v[0], dtype=float) for v in sources)
    x0[np.isnan(x0)] = a0 / 2
    y0[np.isnan(y0)] = b0 / 2
    return a0, b0, (x0, y0, c0, d0)


def _groups(cols: list[FloatArray], idx: NDArray[np.int64]) -> list[NDArray[np.int64]]:
    """Split the designs ``idx`` into groups of equal rows of ``cols`` ((n,) or (n, S) arrays)."""
    if idx.size == 0:
        return []
    # hash each design by a fixed random projection, then check that no hash collided
    rng = np.random.default_rng(12345)
    sub = [v[idx].reshape(idx.size, -1) for v in cols]
    if all(np.all(v == v[0]) for v in sub):
        return [idx]
    proj = np.zeros(idx.size)
    for v in sub:
        proj += v @ rng.uniform(0.5, 1.5, v.shape[1])
    _, first, inv = np.unique(proj, return_index=True, return_inverse=True)
    inv = inv.ravel()
    rep = first[inv]
    if not all(np.array_equal(v, v[rep]) for v in sub):
        _, inv = np.unique(np.hstack(sub), axis=0, return_inverse=True)
        inv = inv.ravel()
    order = np.argsort(inv, kind="stable")
    cuts = np.flatnonzero(np.diff(inv[order])) + 1
    return np.split(idx[order], cuts)


@dataclass(frozen=True)
class _LayoutTable:
    """The design-independent part of the mode sums for one plate size and source layout.

    R_ji k a b - (t + k/h) = s0[j, i] + sum_g coef[g, j, i] (phi(beta[g]) - 1)."""

    s0: FloatArray  # (S, S): sum over the modes other than (0, 0) of weight / beta, m
    beta: FloatArray  # (B,) interpolation nodes, increasing, 1/m
    coef: FloatArray  # (B, S, S): node weights of phi - 1, m


def _chebyshev_lobatto(p: int) -> tuple[FloatArray, FloatArray]:
    """Nodes -cos(pi l / p) on [-1, 1] and their barycentric weights."""
    l = np.arange(p + 1)
    w = (-1.0) ** l
    w[[0, -1]] *= 0.5
    return -np.cos(np.pi * l / p), w


def _lagrange_rows(xi: FloatArray, nodes: FloatArray, w: FloatArray) -> FloatArray:
    """(K, p+1): the Lagrange basis through ``nodes`` at the points ``xi`` (barycentric form)."""
    diff = xi[:, None] - nodes[None, :]
    hit = diff == 0.0
    with np.errstate(divide="ignore", invalid="ignore"):
        lag = w / diff
        lag /= lag.sum(axis=1, keepdims=True)
    rows = hit.any(axis=1)
    lag[rows] = hit[rows]
    return lag


@functools.lru_cache(maxsize=64)
def _layout_table(
    a: float,
    b: float,
    x: tuple,
    y: tuple,
    c: tuple,
    d: tuple,
    per_size: float,
    max_modes: int,
    extrapolate: bool,
) -> _LayoutTable:
    """Build the table of one layout (cached: the result depends only on the arguments)."""
    x, y, c, d = (np.array(v, dtype=float)[None, :] for v in (x, y, c, d))
    s = x.shape[1]
    M = int(_mode_counts(np.array(a), c.min(), per_size, MIN_MODES, max_modes))
    N = int(_mode_counts(np.array(b), d.min(), per_size, MIN_MODES, max_modes))
    mm, nn = np.arange(M + 1), np.arange(N + 1)
    lam, dl = np.pi * mm / a, np.pi * nn / b
    px = _footprint_mean(lam[None, :], x, c)[0] * np.where(mm == 0, 1.0, 2.0)  # eps_m P_i(m)
    py = _footprint_mean(dl[None, :], y, d)[0] * np.where(nn == 0, 1.0, 2.0)
    # footprint averages are taken with eps once: P_j eps P_i = (eps P_j)(eps P_i) / eps
    inv_ex = np.where(mm == 0, 1.0, 0.5)
    inv_ey = np.where(nn == 0, 1.0, 0.5)
    beta_min = np.pi / max(a, b)
    beta_max = np.pi * np.hypot(M / a, N / b)
    u0, u1 = np.log(beta_min), np.log(beta_max)
    n_pan = max(1, int(np.ceil((u1 - u0) / _PANEL_WIDTH)))
    width = max(u1 - u0, 1e-3) / n_pan
    p = _PANEL_DEGREE
    xi_nodes, bw = _chebyshev_lobatto(p)
    u_nodes = u0 + width * (np.arange(n_pan)[:, None] + (xi_nodes[:p] + 1.0) / 2.0)
    beta_nodes = np.exp(np.append(u_nodes.ravel(), u0 + width * n_pan))
    s0 = np.zeros((s, s))
    coef = np.zeros((beta_nodes.size, s, s))
    step = max(1, _MODE_CHUNK // (N + 1))
    for m0 in range(0, M + 1, step):  # chunks of rows m of the mode grid
        mi, ni = (v.ravel() for v in np.meshgrid(mm[m0 : m0 + step], nn, indexing="ij"))
        keep = (mi > 0) | (ni > 0)
        mi, ni = mi[keep], ni[keep]
        beta = np.hypot(lam[mi], dl[ni])
        v = inv_ex[mi] * inv_ey[ni] / beta
        if extrapolate:  # Richardson: (4 S(M, N) - S(M/2, N/2)) / 3 as mode weights
            v *= np.where((mi <= M // 2) & (ni <= N // 2), 1.0, 4.0 / 3.0)
        G = px[:, mi] * py[:, ni]  # (S, K): eps_m eps_n P_j(m) Q_j(n)
        H = (G[:, None, :] * G[None, :, :]).reshape(s * s, -1).T  # (K, S*S)
        s0 += (v @ H).reshape(s, s)
        upos = np.maximum(np.log(beta) - u0, 0.0) / width
        pan = np.minimum(upos.astype(np.int64), n_pan - 1)
        lag = _lagrange_rows(2.0 * (upos - pan) - 1.0, xi_nodes, bw) * v[:, None]
        order = np.argsort(pan, kind="stable")
        bounds = np.searchsorted(pan[order], np.arange(n_pan + 1))
        for i in range(n_pan):
            sel = order[bounds[i] : bounds[i + 1]]
            if sel.size:
                coef[i * p : i * p + p + 1] += (lag[sel].T @ H[sel]).reshape(p + 1, s, s)
    for arr in (s0, coef, beta_nodes):
        arr.flags.writeable = False
    return _LayoutTable(s0=s0, beta=beta_nodes, coef=coef)


def _half_phi_minus_one(beta: FloatArray, t: FloatArray, r: FloatArray) -> FloatArray:
    """(phi(beta) - 1) / 2 on the grid (designs, nodes); t, r = k/h_eff of shape (nb,).

    (phi - 1)/2 = e (r beta - 1) / (r beta + 1 - e (r beta - 1)), e = exp(-2 beta t): the
    overflow-free form of (r beta + tanh)/(r beta tanh + 1) - 1 (tanh = (1 - e)/(1 + e)),
    without cancellation for large beta t; the denominator is >= 1."""
    e = np.multiply.outer(-2.0 * t, beta)
    np.exp(e, out=e)
    rb = np.multiply.outer(r, beta)
    num = rb - 1.0
    num *= e
    rb += 1.0
    rb -= num
    num /= rb
    return num


def _grouped_rows(rows, layout, t, k, h, q, opts, out, with_one_d):
    """Fill ``out[rows]`` for designs sharing ``layout`` = (a, b, (x, y, c, d)), x, y centred.

    out is (n, S) (powers q given), (n, S, S) (q None: influence matrix) or (n,) (one source,
    q None, spreading part only); ``opts`` = (modes per size, max modes, extrapolate).
    ``with_one_d`` adds R_1D + R_film (the (0, 0) mode)."""
    if rows.size == 0:
        return
    a0, b0, src = layout
    per_size, max_modes, extrapolate = opts
    tab = _layout_table(
        a0,
        b0,
        *(tuple(np.asarray(v, dtype=float).tolist()) for v in src),
        float(per_size),
        int(max_modes),
        bool(extrapolate),
    )
    s = tab.s0.shape[0]
    i0 = rows[0]
    uniform = q is not None and (q.strides[0] == 0 or bool(np.all(q[rows] == q[i0])))
    if uniform:  # the usual case: contract the powers into the table once
        s0, coef = tab.s0 @ q[i0], 2.0 * (tab.coef @ q[i0])
        q_tot = float(q[i0].sum())
    else:
        s0, coef = tab.s0.reshape(-1), 2.0 * tab.coef.reshape(tab.beta.size, -1)
    area = a0 * b0
    log_beta = np.log(tab.beta)
    log_cut = np.log(_BETA_T_CUT)
    for j0 in range(0, rows.size, _DESIGN_BLOCK):
        r_ = rows[j0 : j0 + _DESIGN_BLOCK]
        tb, kb, hb = t[r_], k[r_], h[r_]
        rb = kb / hb  # 0 for an isothermal fin side
        # nodes past beta t_min = cut only carry |phi - 1| < 5e-16 (one past the cut is kept)
        used = min(int(np.searchsorted(log_beta, log_cut - np.log(tb.min()))) + 1, tab.beta.size)
        val = _half_phi_minus_one(tab.beta[:used], tb, rb) @ coef[:used]
        val += s0
        if q is not None and not uniform:
            val = np.einsum("nji,ni->nj", val.reshape(-1, s, s), q[r_])
        one_d = (tb + rb) if with_one_d else 0.0
        scale = 1.0 / (area * kb)
        if q is not None:
            qt = q_tot if uniform else q[r_].sum(axis=1)
            out[r_] = (val + (one_d * qt)[:, None]) * scale[:, None]
        elif out.ndim == 3:
            out[r_] = (val.reshape(-1, s, s) + np.reshape(one_d, (-1, 1, 1))) * scale[:, None, None]
        else:
            out[r_] = (val[:, 0] + one_d) * scale
