"""Benchmark of ``models.evaluate`` (not part of the test run).

    python tests/bench_model.py            # prints a markdown table; --quick for a short run

Measures, on one core (BLAS/OpenMP threads pinned to 1), the throughput of the vectorized
evaluation in fan-curve mode at 1e3 ... 1e6 designs, the peak memory of the 1e6 run (in a
fresh subprocess, resident set size), and the same physics evaluated design by design in a
Python loop the way a practitioner would script it: CoolProp for the air, ht's Gnielinski
for turbulent flow, scipy's PchipInterpolator for the fan curve and scipy's brentq for the
operating point, and finfront's own functions called on scalars where no reference library
has the correlation (developing laminar flow, tapered fins, entrance/exit losses, spreading).
"""

from __future__ import annotations

import os

for _v in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_v, "1")

import argparse
import json
import math
import resource
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from models import AirSupply, Conditions, Design, FanCurve, HeatSource, evaluate

FANS = (
    FanCurve(
        (0.0, 0.0047, 0.0094, 0.0142, 0.0189, 0.0236, 0.0274),
        (212.0, 179.0, 144.0, 112.0, 75.0, 37.0, 0.0),
        name="axial",
    ),
    FanCurve(
        (0.0, 0.0024, 0.0047, 0.0071, 0.0094, 0.0118, 0.0132),
        (399.0, 361.0, 304.0, 229.0, 139.0, 50.0, 0.0),
        name="blower",
    ),
)


def sources(count: int) -> tuple[HeatSource, ...]:
    xs = np.linspace(0.03, 0.12, count) if count > 1 else [None]
    return tuple(
        HeatSource(
            power_W=400.0 / count,
            length_m=0.03,
            width_m=0.03,
            x_m=None if x is None else float(x),
            y_m=None if x is None else 0.06,
            interface_resistance_K_m2_per_W=3e-5,
            junction_to_case_K_per_W=0.1,
            max_junction_temperature_K=423.15,
            name=f"s{i}",
        )
        for i, x in enumerate(xs)
    )


def conditions(n_sources: int = 1, clearance: float = 0.0) -> Conditions:
    return Conditions(
        clearance_top_m=clearance,
        clearance_side_m=clearance,
        fin_tip="convective" if clearance > 0 else "shrouded",
        ambient_temperature_K=313.15,
        ambient_pressure_Pa=101325.0,
        supply=AirSupply(mode="fan", fans=FANS),
        sources=sources(n_sources),
        system_impedance_Pa_s2_per_m6=1.0e4,
    )


def population(n: int, seed: int = 0) -> Design:
    rng = np.random.default_rng(seed)
    t = rng.uniform(1.2e-3, 3e-3, n)
    return Design(
        fin_count=rng.integers(10, 35, n),
        fin_thickness_root_m=t,
        fin_thickness_tip_m=0.7 * t,
        fin_height_m=rng.uniform(0.02, 0.045, n),
        base_thickness_m=rng.uniform(4e-3, 12e-3, n),
        base_width_m=0.12,
        flow_length_m=0.15,
        conductivity_W_per_mK=200.0,
        density_kg_per_m3=2700.0,
        fan_index=rng.integers(0, 2, n),
        fin_root_fillet_m=0.5e-3,
        fin_tip_radius_m=0.35 * t,
    )


def time_vectorized(n: int, n_sources: int = 1, repeats: int = 3, clearance: float = 0.0) -> float:
    d, c = population(n), conditions(n_sources, clearance)
    evaluate(population(1000), c)  # warm-up
    best = math.inf
    for _ in range(repeats):
        t0 = time.perf_counter()
        evaluate(d, c)
        best = min(best, time.perf_counter() - t0)
    return best


def peak_memory_mb(n: int) -> float:
    code = (
        "import sys; sys.argv=['x']; import tests.bench_model as b, resource;"
        f"b.evaluate(b.population({n}), b.conditions());"
        "print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)"
    )
    root = Path(__file__).resolve().parents[1]
    out = subprocess.run(
        [sys.executable, "-c", code],
        cwd=root,
        capture_output=True,
        text=True,
        check=True,
        env={**os.environ, "PYTHONPATH": str(root)},
    )
    return int(out.stdout.strip().splitlines()[-1]) / 1024.0


def loop_designs_per_second(n: int) -> float:
    """The same physics, one design at a time, with reference libraries and brentq."""
    import CoolProp.CoolProp as CoolProp  # noqa: N813
    import ht
    from scipy.interpolate import PchipInterpolator
    from scipy.optimize import brentq

    from models.channel_friction import fanning_apparent_laminar, fanning_turbulent_smooth
    from models.channel_heat import nusselt_laminar_developing_mean
    from models.fins import fin_efficiency_tapered
    from models.geometry import plate_fin_geometry
    from models.minor_losses import entrance_loss_coefficient, exit_loss_coefficient
    from models.spreading import source_temperature_rise

    d = population(n).arrays()
    c = conditions(1)
    src = c.sources[0]
    T, p = c.ambient_temperature_K, c.ambient_pressure_Pa
    t0 = time.perf_counter()
    for i in range(n):
        rho = CoolProp.PropsSI("D", "T", T, "P", p, "Air")
        mu = CoolProp.PropsSI("V", "T", T, "P", p, "Air")
        k_air = CoolProp.PropsSI("L", "T", T, "P", p, "Air")
        cp = CoolProp.PropsSI("C", "T", T, "P", p, "Air")
        pr = cp * mu / k_air
        fan = FANS[d["fan_index"][i]]
        curve = PchipInterpolator(fan.flow_m3_per_s, fan.pressure_Pa)
        ratio = rho / fan.rated_density_kg_per_m3
        g = plate_fin_geometry(
            d["fin_count"][i],
            d["fin_thickness_root_m"][i],
            d["fin_thickness_tip_m"][i],
            d["fin_height_m"][i],
            d["base_thickness_m"][i],
            d["base_width_m"][i],
            d["flow_length_m"][i],
            d["fin_root_fillet_m"][i],
            d["fin_tip_radius_m"][i],
        )
        area, dh, alpha = (
            float(g.flow_area_m2),
            float(g.hydraulic_diameter_m),
            float(g.channel_aspect_ratio),
        )
        L = float(d["flow_length_m"][i])
        sigma = float(g.free_flow_ratio)
        kminor = float(entrance_loss_coefficient(sigma) + exit_loss_coefficient(sigma))

        def friction(re: float) -> float:
            if re <= 2300:
                return float(fanning_apparent_laminar(L / (dh * re), alpha)) / re
            if re >= 1e4:
                return float(fanning_turbulent_smooth(re))
            lo = float(fanning_apparent_laminar(L / (dh * 2300), alpha)) * 2300
            hi = max(float(fanning_turbulent_smooth(1e4)) * 1e8, lo)
            w = (re - 2300) / 7700
            return ((1 - w) * lo + w * hi) / re**2

        def dp(q: float) -> float:
            v = q / area
            re = rho * v * dh / mu
            return (
                kminor + 4 * friction(re) * L / dh
            ) * 0.5 * rho * v * v + c.system_impedance_Pa_s2_per_m6 * q * q

        q = brentq(
            lambda q: float(curve(q)) * ratio - dp(q), 1e-9, fan.flow_m3_per_s[-1], rtol=1e-9
        )
        v = q / area
        re = rho * v * dh / mu
        nu_lam = float(nusselt_laminar_developing_mean(L, dh, min(re, 2300.0), pr, alpha))
        fd = 4 * float(fanning_turbulent_smooth(max(re, 1e4)))
        nu_turb = ht.conv_internal.turbulent_Gnielinski(max(re, 1e4), pr, fd) * (
            1 + (dh / L) ** (2 / 3)
        )
        w = min(max((re - 2300) / 7700, 0.0), 1.0)
        nu = (1 - w) * nu_lam + w * nu_turb
        h = nu * k_air / dh
        k_s = d["conductivity_W_per_mK"][i]
        eta = float(
            fin_efficiency_tapered(
                h,
                k_s,
                d["fin_thickness_root_m"][i],
                d["fin_thickness_tip_m"][i],
                d["fin_height_m"][i],
            )
        )
        eta_o = 1 - float(g.fin_area_m2 / g.total_area_m2) * (1 - eta)
        mcp = rho * q * cp
        r_sink = 1 / (mcp * (1 - math.exp(-eta_o * h * float(g.total_area_m2) / mcp)))
        h_eff = 1 / (r_sink * L * d["base_width_m"][i])
        rise = source_temperature_rise(
            L,
            d["base_width_m"][i],
            d["base_thickness_m"][i],
            k_s,
            h_eff,
            np.nan,
            np.nan,
            src.length_m,
            src.width_m,
            src.power_W,
        )
        _ = float(rise.ravel()[0]) + src.power_W * src.junction_to_case_K_per_W
    return n / (time.perf_counter() - t0)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="smaller sizes, fewer repeats")
    ap.add_argument("--json", type=Path, help="also write the figures as JSON here")
    args = ap.parse_args()
    sizes = [1000, 10_000, 100_000] if args.quick else [1000, 10_000, 100_000, 1_000_000]
    rows = []
    for n in sizes:
        t = time_vectorized(n, 1, repeats=1 if n >= 1_000_000 else 3)
        rows.append(dict(designs=n, sources=1, seconds=t, per_second=n / t))
    t4 = time_vectorized(100_000, 4)
    rows.append(dict(designs=100_000, sources=4, seconds=t4, per_second=1e5 / t4))
    tb = time_vectorized(100_000, 4, clearance=5e-3)
    rows.append(dict(designs=100_000, sources="4 + bypass", seconds=tb, per_second=1e5 / tb))
    # the same at 1e5 designs with glibc's allocator thresholds raised, as the finfront
    # command runs (optim.runtime.tune_allocator): fewer page faults on large temporaries
    from optim.runtime import tune_allocator

    if tune_allocator():
        for ns, clearance, label in ((1, 0.0, "1"), (4, 0.0, "4"), (4, 5e-3, "4 + bypass")):
            t = time_vectorized(100_000, ns, clearance=clearance)
            rows.append(
                dict(
                    designs=100_000,
                    sources=f"{label}, allocator tuned",
                    seconds=t,
                    per_second=1e5 / t,
                )
            )
    loop_rate = loop_designs_per_second(100 if args.quick else 300)
    vec_rate = next(r["per_second"] for r in rows if r["designs"] == 100_000)
    mem = peak_memory_mb(100_000 if args.quick else 1_000_000)
    print("| designs | heat sources | seconds | designs/s |")
    print("| ---: | ---: | ---: | ---: |")
    for r in rows:
        print(
            f"| {r['designs']:,} | {r['sources']} | {r['seconds']:.3f} | {r['per_second']:,.0f} |"
        )
    print()
    print(f"Python loop (reference libraries + brentq): {loop_rate:,.0f} designs/s")
    print(f"Vectorized / loop at 1e5 designs: {vec_rate / loop_rate:,.0f}x")
    print(f"Peak resident memory, {'1e5' if args.quick else '1e6'} designs: {mem:,.0f} MB")
    print(f"(this process: {resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:,.0f} MB)")
    if args.json:
        args.json.write_text(
            json.dumps(
                dict(rows=rows, loop_per_second=loop_rate, ratio=vec_rate / loop_rate, peak_mb=mem),
                indent=1,
            )
        )


if __name__ == "__main__":
    main()
