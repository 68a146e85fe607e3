"""Plate-fin geometry against plane geometry and the hydraulic-diameter definition."""

from __future__ import annotations

import numpy as np

from models.geometry import cross_section_area, plate_fin_geometry


def _polygon_area(x: np.ndarray, y: np.ndarray) -> float:
    return 0.5 * abs(float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1))))


def _profile_polygon(N, tr, tt, H, tb, W):
    """An independent outline of the profile without fillets, as a polygon."""
    p = (W - tr) / (N - 1)
    # walk right to left along the top: fins and gaps
    pts = [(W, 0.0)]
    for i in range(N - 1, -1, -1):
        c = tr / 2 + i * p
        right_root, left_root = c + tr / 2, c - tr / 2
        pts += [(right_root, tb), (c + tt / 2, tb + H), (c - tt / 2, tb + H), (left_root, tb)]
    pts.append((0.0, 0.0))
    arr = np.array(pts)
    return arr[:, 0], arr[:, 1]


def test_profile_area_equals_polygon_area_without_fillets(check):
    N, tr, tt, H, tb, W = 7, 2.0e-3, 1.2e-3, 30e-3, 5e-3, 60e-3
    x, y = _profile_polygon(N, tr, tt, H, tb, W)
    # shoelace formula on the drawn outline: plane geometry, common practice, no source
    check(
        "profile area, tapered fins, no fillets (m^2)",
        float(cross_section_area(N, tr, tt, H, tb, W)),
        _polygon_area(x, y),
        "shoelace area of the outline polygon (plane geometry, common practice, no source)",
        rtol=1e-12,
    )


def test_fillet_area_equals_square_minus_quarter_circle(check):
    r = 1.0e-3
    base = float(cross_section_area(3, 2e-3, 2e-3, 20e-3, 4e-3, 40e-3))
    with_fillets = float(cross_section_area(3, 2e-3, 2e-3, 20e-3, 4e-3, 40e-3, root_fillet=r))
    # four fillets; each adds r^2 - pi r^2/4 (square less a quarter disc): plane geometry
    check(
        "added area of 4 root fillets (m^2)",
        with_fillets - base,
        4 * (r * r - np.pi * r * r / 4),
        "plane geometry: r^2 (1 - pi/4) per 90-degree fillet, common practice, no source",
        rtol=1e-12,
    )


def test_parallel_plate_limit_of_hydraulic_diameter(check):
    # Shah & London (1978), ch. 1: D_h = 4 A / P; for a very tall channel D_h -> 2 b.
    g = plate_fin_geometry(np.array([11]), 1e-3, 1e-3, 100.0, 3e-3, 0.051, 0.1)
    check(
        "D_h of a 4 mm gap, very tall fins (m)",
        float(g.hydraulic_diameter_m[0]),
        8e-3,
        "Shah & London (1978) ch. 1, parallel-plate limit D_h = 2b",
        rtol=1e-4,
    )


def test_pitch_gap_and_square_channel(check):
    g = plate_fin_geometry(np.array([11]), 1e-3, 1e-3, 4e-3, 3e-3, 0.051, 0.1)
    check("pitch (m)", float(g.pitch_m[0]), 5e-3, "(W - t)/(N - 1), plane geometry", rtol=1e-12)
    # square duct: D_h equals the side (Shah & London 1978, ch. 1 definition)
    check(
        "D_h of a 4 mm square channel (m)",
        float(g.hydraulic_diameter_m[0]),
        4e-3,
        "Shah & London (1978) ch. 1: D_h of a square duct = side",
        rtol=1e-12,
    )
    assert abs(g.channel_aspect_ratio[0] - 1.0) < 1e-9


def test_impossible_profiles_are_flagged_not_raised():
    N = np.array([1, 5, 40, 5, 5])
    t_root = np.array([1e-3, 1e-3, 2e-3, 1e-3, 1e-3])
    t_tip = np.array([1e-3, 2e-3, 1e-3, 1e-3, 1e-3])
    H = np.array([0.02, 0.02, 0.02, -0.01, 0.02])
    g = plate_fin_geometry(N, t_root, t_tip, H, 3e-3, 0.05, 0.1)
    assert g.valid.tolist() == [False, False, False, False, True]
    assert g.reason_code.tolist() == [1, 3, 4, 2, 0]
    assert np.all(np.isfinite(g.hydraulic_diameter_m))
