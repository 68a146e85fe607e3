"""CAD hand-off: profile outline, DXF drawing, STEP solid, parameter sheet, atomic export.

Outside references: plane geometry in closed form (trapezoid areas; a round of radius r in a
corner of angle theta removes r^2 (cot(theta/2) - (pi - theta)/2); tangent lengths), ezdxf's
own reading of the written DXF (its bulge-to-path conversion and dimension measurement), and
the OpenCascade kernel's volume and bounding box of the re-imported STEP solid.
"""

from __future__ import annotations

import csv
import json
import math
import sys
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from ezdxf import bbox as dxf_bbox
from ezdxf import path as dxf_path

from models.contract import Design
from models.geometry import cross_section_area, plate_fin_geometry
from optim import export as export_mod
from optim.export import FORMATS, export_design, export_paths
from optim.export_dxf import LAYER_DATA, LAYER_DIMENSIONS, LAYER_PROFILE, render_png, write_dxf
from optim.export_step import CAD_EXTRA_HINT, MissingCadExtraError, write_step
from optim.parameter_sheet import (
    RESULT_KEYS,
    DesignMeta,
    parameter_sheet,
    read_parameter_sheet_csv,
    write_parameter_sheet,
)
from optim.profile_outline import Arc, Line, ProfileDims, outline_area, profile_outline

DENSITY = 2700.0  # kg/m^3, wrought aluminium -- common practice, no source

# Profiles in mm: (N, t_root, t_tip, H, t_b, W, L, r_f, r_t). Invented sizes, not check values.
CASES = {
    "straight_sharp": (2, 2.0, 2.0, 10.0, 3.0, 20.0, 50.0, 0.0, 0.0),
    "straight_rounded": (12, 1.5, 1.5, 30.0, 5.0, 100.0, 80.0, 1.0, 0.75),  # full round tips
    "tapered_sharp": (12, 2.0, 1.0, 30.0, 5.0, 100.0, 80.0, 0.0, 0.0),
    "tapered_fillets": (20, 1.6, 0.8, 40.0, 4.0, 150.0, 100.0, 1.2, 0.25),
    "tapered_full_round": (12, 2.0, 1.0, 30.0, 5.0, 100.0, 80.0, 1.5, 0.5),
    "knife_tip": (5, 3.0, 0.0, 20.0, 8.0, 60.0, 50.0, 2.0, 0.0),
}


def dims_of(case: str) -> ProfileDims:
    N, tr, tt, H, tb, W, L, rf, rt = CASES[case]
    return ProfileDims(N, tr * 1e-3, tt * 1e-3, H * 1e-3, tb * 1e-3, W * 1e-3, L * 1e-3,
                       rf * 1e-3, rt * 1e-3)


def model_area_mm2(d: ProfileDims) -> float:
    """models.geometry.cross_section_area of the design, in mm^2."""
    a = cross_section_area(d.fin_count, d.fin_thickness_root_m, d.fin_thickness_tip_m,
                           d.fin_height_m, d.base_thickness_m, d.base_width_m,
                           d.root_fillet_m, d.tip_radius_m)
    return float(a) * 1e6


def closed_form_area_mm2(N, tr, tt, H, tb, W, rf, rt) -> float:
    """Exact profile area from plane geometry, written independently of the outline code.

    Base rectangle + N trapezoids; each round of radius r in a corner of angle theta
    adds (concave fillet) or removes (convex round) r^2 (cot(theta/2) - (pi - theta)/2). Both
    the fillet corners and the tip corners of a fin tapered by half-angle alpha open at
    theta = 90 deg + alpha. A full round (rt = tt/2) is the arc tangent to both faces and the
    tip line: radius tt/2 tan(45 deg + alpha/2), two such corners meeting at the tip centre.
    """
    alpha = math.atan2(0.5 * (tr - tt), H)
    theta = 0.5 * math.pi + alpha
    corner = 1.0 / math.tan(0.5 * theta) - 0.5 * (math.pi - theta)
    if tt > 0 and rt >= 0.5 * tt:
        rt = 0.5 * tt * math.tan(0.25 * math.pi + 0.5 * alpha)
    return W * tb + N * H * 0.5 * (tr + tt) + 2 * (N - 1) * rf**2 * corner - 2 * N * rt**2 * corner


def meta_for(d: ProfileDims) -> DesignMeta:
    """Meta with the model's mass: models.geometry volume x density."""
    g = plate_fin_geometry(d.fin_count, d.fin_thickness_root_m, d.fin_thickness_tip_m,
                           d.fin_height_m, d.base_thickness_m, d.base_width_m, d.flow_length_m,
                           d.root_fillet_m, d.tip_radius_m)
    return DesignMeta("D-0042", "demo drive study", "6063-T5", DENSITY,
                      float(g.volume_m3) * DENSITY, "2026-12-01")


RESULTS = {  # an invented row of the model's table (only copied through, never checked)
    "sink_resistance_K_per_W": 0.312,
    "pressure_drop_Pa": 41.5,
    "flow_m3_per_s": 0.0123,
    "system_pressure_Pa": 55.25,
    "total_area_m2": 0.1375,
}


# ---------------------------------------------------------------- outline geometry


@pytest.mark.parametrize("case", CASES)
def test_outline_is_closed_chain_and_area_matches_closed_form(case: str, check) -> None:
    N, tr, tt, H, tb, W, L, rf, rt = CASES[case]
    outline = profile_outline(N, tr, tt, H, tb, W, rf, rt)
    for a, b in zip(outline, outline[1:] + outline[:1], strict=True):
        assert math.dist(a.end, b.start) < 1e-12
    for s in outline:
        if isinstance(s, Arc):  # both ends on the circle
            assert math.dist(s.start, s.center) == pytest.approx(s.radius, rel=1e-12)
            assert math.dist(s.end, s.center) == pytest.approx(s.radius, rel=1e-12)
    # plane geometry, closed form (docstring of closed_form_area_mm2); float round-off only.
    check(f"profile area, {case} (mm^2)", outline_area(outline),
          closed_form_area_mm2(N, tr, tt, H, tb, W, rf, rt),
          "plane geometry: trapezoids + r^2(cot(theta/2)-(pi-theta)/2) corners -- "
          "common practice, no source", rtol=1e-10)


def test_straight_two_fin_example_is_100_mm2(check) -> None:
    # models/geometry.py cross_section_area example: 20*3 + 2*10*2 = 100 mm^2 (rectangles).
    outline = profile_outline(2, 2.0, 2.0, 10.0, 3.0, 20.0)
    assert all(isinstance(s, Line) for s in outline) and len(outline) == 8
    check("two-fin rectangle profile area (mm^2)", outline_area(outline), 100.0,
          "plane geometry, sum of rectangles -- common practice, no source", rtol=1e-12)


def test_fillet_tangent_points_on_tapered_fin() -> None:
    # Corner of 90 deg + alpha: the fillet touches each edge at r tan(45 deg - alpha/2) from
    # the sharp corner and sweeps 90 deg - alpha (tangent-length rule of plane geometry).
    N, tr, tt, H, tb, W, rf = 2, 2.0, 1.0, 10.0, 3.0, 20.0, 1.0
    alpha = math.atan2(0.5 * (tr - tt), H)
    fillets = [s for s in profile_outline(N, tr, tt, H, tb, W, rf, 0.0) if isinstance(s, Arc)]
    assert len(fillets) == 2 * (N - 1)
    d = rf * math.tan(0.25 * math.pi - 0.5 * alpha)
    first = fillets[0]  # left root of the right fin: face first, then the base top
    corner = (W - tr, tb)
    assert first.end == pytest.approx((corner[0] - d, tb), abs=1e-12)
    assert math.dist(first.start, corner) == pytest.approx(d, rel=1e-12)
    assert first.sweep == pytest.approx(-(0.5 * math.pi - alpha), rel=1e-12)
    assert first.center[1] == pytest.approx(tb + rf, rel=1e-12)


def test_full_round_tip_is_one_arc_tangent_to_faces_and_tip_line() -> None:
    tr, tt, H, tb = 2.0, 1.0, 30.0, 5.0
    alpha = math.atan2(0.5 * (tr - tt), H)
    outline = profile_outline(2, tr, tt, H, tb, 40.0, 0.0, 0.5 * tt)
    tips = [s for s in outline if isinstance(s, Arc)]
    assert len(tips) == 2  # one arc per fin
    r = 0.5 * tt * math.tan(0.25 * math.pi + 0.5 * alpha)  # plane geometry, see docstring
    for arc in tips:
        assert arc.radius == pytest.approx(r, rel=1e-12)
        assert arc.center[1] + arc.radius == pytest.approx(tb + H, abs=1e-12)  # touches tip
        assert arc.sweep == pytest.approx(math.pi - 2 * alpha, rel=1e-12)  # tangent to faces


def test_profile_dims_from_a_model_design() -> None:
    design = Design(
        fin_count=np.array([8, 12]), fin_thickness_root_m=2e-3, fin_thickness_tip_m=1e-3,
        fin_height_m=np.array([25e-3, 30e-3]), base_thickness_m=5e-3, base_width_m=0.1,
        flow_length_m=0.08, conductivity_W_per_mK=200.0, density_kg_per_m3=DENSITY,
        fin_root_fillet_m=1.5e-3, fin_tip_radius_m=0.5e-3,
    )
    d = ProfileDims.from_design(design, 1)
    assert d == ProfileDims(12, 2e-3, 1e-3, 30e-3, 5e-3, 0.1, 0.08, 1.5e-3, 0.5e-3)
    assert type(d.fin_count) is int
    with pytest.raises(ValueError, match=r"^fin_count = 1: expected an integer >= 2$"):
        ProfileDims(np.int64(1), 2e-3, 1e-3, 30e-3, 5e-3, 0.1, 0.08)


def test_fillets_that_just_fill_the_gap_are_accepted_and_larger_ones_refused() -> None:
    N, tr, tt, H, tb, W = 3, 2.0, 1.0, 20.0, 3.0, 22.0  # pitch 10, root gap 8
    alpha = math.atan2(0.5 * (tr - tt), H)
    r_fill = 4.0 / math.tan(0.25 * math.pi - 0.5 * alpha)  # 2 r tan(45-alpha/2) = 8
    outline = profile_outline(N, tr, tt, H, tb, W, r_fill, 0.0)
    flats = [s for s in outline if isinstance(s, Line) and s.start[1] == s.end[1] == tb]
    assert flats == []  # the base top between the fillets has vanished
    assert outline_area(outline) == pytest.approx(
        closed_form_area_mm2(N, tr, tt, H, tb, W, r_fill, 0.0), rel=1e-10)
    with pytest.raises(ValueError, match=r"^root_fillet = .*root gap"):
        profile_outline(N, tr, tt, H, tb, W, r_fill * 1.001, 0.0)


@pytest.mark.parametrize(
    ("change", "pattern"),
    [
        (dict(fin_count=1), r"^fin_count = 1: expected an integer >= 2$"),
        (dict(fin_thickness_tip_m=3e-3), r"^fin_thickness_tip_m = 0.003: expected at most"),
        (dict(tip_radius_m=0.6e-3), r"^tip_radius_m = 0.0006: expected at most half"),
        (dict(root_fillet_m=4e-3), r"^root_fillet_m = 0.004: expected .*root gap"),
        (dict(fin_height_m=-1.0), r"^fin_height_m = -1.0: expected a finite length > 0$"),
        (dict(flow_length_m=0.0), r"^flow_length_m = 0.0: expected a finite length > 0$"),
        (dict(base_width_m=20e-3), r"^base_width_m = 0.02: expected wider than 12 fins"),
    ],
)
def test_impossible_profiles_are_refused_in_one_line(change: dict, pattern: str) -> None:
    base = dict(fin_count=12, fin_thickness_root_m=2e-3, fin_thickness_tip_m=1e-3,
                fin_height_m=30e-3, base_thickness_m=5e-3, base_width_m=100e-3,
                flow_length_m=80e-3, root_fillet_m=1e-3, tip_radius_m=0.5e-3)
    with pytest.raises(ValueError, match=pattern) as err:
        ProfileDims(**{**base, **change})
    assert "\n" not in str(err.value)


# ---------------------------------------------------------------- DXF


def profile_entities(doc):
    return [e for e in doc.modelspace() if e.dxf.layer == LAYER_PROFILE]


@pytest.mark.parametrize("case", CASES)
def test_dxf_profile_is_one_closed_outline_with_model_mass(case: str, tmp_path: Path,
                                                           check) -> None:
    d = dims_of(case)
    f = write_dxf(tmp_path / "p.dxf", d, meta_for(d))
    doc = ezdxf.readfile(f)
    assert doc.header["$INSUNITS"] == 4 and doc.header["$MEASUREMENT"] == 1
    ents = profile_entities(doc)
    assert len(ents) == 1 and ents[0].dxftype() == "LWPOLYLINE" and ents[0].closed
    # ezdxf turns the bulges into curves itself; flatten to 0.1 um and take the shoelace area.
    pts = np.array([(v.x, v.y) for v in dxf_path.make_path(ents[0]).flattening(1e-4)])
    x, y = pts[:, 0], pts[:, 1]
    area_mm2 = 0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))
    L_mm = d.flow_length_m * 1e3
    mass_dxf = area_mm2 * 1e-9 * L_mm * DENSITY
    # Brief: within 1 % of the model's mass (the model treats fillet corners as 90 deg).
    assert mass_dxf == pytest.approx(model_area_mm2(d) * 1e-9 * L_mm * DENSITY, rel=0.01)
    N, tr, tt, H, tb, W, L, rf, rt = CASES[case]
    # Closed form; flattening to 1e-4 mm chords loses < perimeter * 1e-4 mm^2.
    check(f"DXF outline area (flattened by ezdxf), {case} (mm^2)", area_mm2,
          closed_form_area_mm2(N, tr, tt, H, tb, W, rf, rt),
          "plane geometry closed form -- common practice, no source", rtol=2e-4)
    box = dxf_bbox.extents(ents, fast=False)
    assert box.extmin.x == pytest.approx(0.0, abs=1e-6)
    assert box.extmin.y == pytest.approx(0.0, abs=1e-6)
    assert box.extmax.x == pytest.approx(W, abs=1e-6)
    assert box.extmax.y == pytest.approx(tb + H, abs=1e-6)


@pytest.mark.parametrize("case", ["tapered_full_round", "straight_sharp", "knife_tip"])
def test_dxf_dimensions_measure_the_design(case: str, tmp_path: Path) -> None:
    d = dims_of(case)
    f = write_dxf(tmp_path / "p.dxf", d, meta_for(d))
    doc = ezdxf.readfile(f)
    N, tr, tt, H, tb, W, L, rf, rt = CASES[case]
    p = (W - tr) / (N - 1)
    expected = {
        "overall width": W, "overall height": tb + H, "base thickness": tb, "fin height": H,
        "fin thickness at root": tr, "fin thickness at tip": tt, "root gap": p - tr, "pitch": p,
    }
    dims = [e for e in doc.modelspace().query("DIMENSION")]
    assert all(e.dxf.layer == LAYER_DIMENSIONS for e in dims)
    measured = sorted(e.get_measurement() for e in dims)
    if tt == 0.0:
        expected.pop("fin thickness at tip")
    assert measured == pytest.approx(sorted(expected.values()), abs=1e-9)
    for e in dims:
        style = doc.dimstyles.get(e.dxf.dimstyle)
        assert style.dxf.dimlfac == 1.0  # see traps: ezdxf's own style would read 100 mm as 10000
        texts = [t.plain_text() for t in e.get_geometry_block().query("MTEXT")]
        value = e.get_measurement()
        assert texts == [f"{round(value, 2):.2f}".rstrip("0").rstrip(".")]
    if case == "tapered_full_round":
        labels = {t.plain_text() for e in dims for t in e.get_geometry_block().query("MTEXT")}
        assert {"100", "35", "5", "30", "2", "1", "8.91", "6.91"} == labels
    notes = [t.dxf.text for t in doc.modelspace().query("TEXT")
             if t.dxf.layer == LAYER_DIMENSIONS]
    assert f"{N} fins, equal pitch" in notes
    data = " | ".join(t.dxf.text for t in doc.modelspace().query("TEXT")
                      if t.dxf.layer == LAYER_DATA)
    m = meta_for(d)
    for needed in ("D-0042", "demo drive study", "6063-T5", f"{m.mass_kg:.4g} kg", "2026-12-01"):
        assert needed in data


def _dense(corners: np.ndarray, step: float = 0.05) -> np.ndarray:
    """Points every ``step`` mm along a polyline (a text box cannot slip between them)."""
    return np.concatenate([
        np.linspace(a, b, max(2, int(np.hypot(*(b - a)) / step) + 2))
        for a, b in zip(corners[:-1], corners[1:], strict=True)
    ])


# Awkward shapes for the layout (invented): two tall fins on a narrow or wide base, stubby fins
# with big fillets, a dense array, a flat wide sink.
LAYOUT_CASES = {
    **{k: v for k, v in CASES.items()},
    "two_tall_narrow": (2, 4.07, 1.24, 129.2, 26.8, 13.9, 50.0, 0.0, 0.62),
    "two_tall_wide": (2, 4.0, 4.0, 101.7, 11.7, 63.4, 50.0, 0.73, 1.14),
    "stubby": (5, 3.99, 1.64, 2.9, 12.4, 59.3, 50.0, 3.76, 0.0),
    "dense": (40, 1.0, 0.6, 25.0, 3.0, 120.0, 100.0, 0.5, 0.3),
    "flat_wide": (30, 1.5, 1.5, 8.0, 10.0, 300.0, 200.0, 0.5, 0.0),
    "few_narrow": (6, 0.8, 0.8, 20.0, 3.0, 14.0, 30.0, 0.2, 0.0),
}


@pytest.mark.parametrize("case", LAYOUT_CASES)
def test_dxf_texts_clear_of_each_other_other_dimensions_and_the_profile(case: str,
                                                                          tmp_path: Path) -> None:
    N, tr, tt, H, tb, W, L, rf, rt = LAYOUT_CASES[case]
    d = ProfileDims(N, tr * 1e-3, tt * 1e-3, H * 1e-3, tb * 1e-3, W * 1e-3, L * 1e-3,
                    rf * 1e-3, rt * 1e-3)
    doc = ezdxf.readfile(write_dxf(tmp_path / "p.dxf", d, meta_for(d)))
    msp = doc.modelspace()
    texts: list[tuple[int, object]] = []  # (owning dimension or -1, text entity)
    lines: list[tuple[int, np.ndarray]] = []  # (owning dimension, -2 = profile; points)
    for k, dim in enumerate(msp.query("DIMENSION")):
        for e in dim.virtual_entities():
            if e.dxftype() in ("MTEXT", "TEXT"):
                texts.append((k, e))
            elif e.dxftype() == "LINE":
                ends = np.array([tuple(e.dxf.start)[:2], tuple(e.dxf.end)[:2]])
                lines.append((k, _dense(ends)))
            elif e.dxftype() == "SOLID":  # arrow heads
                tri = np.array([tuple(e.dxf.get(v))[:2] for v in ("vtx0", "vtx1", "vtx2")])
                lines.append((k, _dense(np.vstack([tri, tri[:1]]))))
    texts += [(-1, t) for t in msp.query("TEXT")]
    corners = np.array([(v.x, v.y) for v in dxf_path.make_path(profile_entities(doc)[0])
                        .flattening(1e-3, segments=64)])
    lines.append((-2, _dense(corners)))
    boxes = [dxf_bbox.extents([t]) for _, t in texts]
    for i, a in enumerate(boxes):
        for b in boxes[i + 1:]:
            assert not a.has_intersection(b), (a, b)
    for (owner, t), b in zip(texts, boxes, strict=True):
        for other, pts in lines:
            if other == owner:
                continue  # a dimension's own line runs under its text
            inside = ((pts[:, 0] > b.extmin.x) & (pts[:, 0] < b.extmax.x)
                      & (pts[:, 1] > b.extmin.y) & (pts[:, 1] < b.extmax.y))
            where = "the profile" if other == -2 else f"dimension {other}"
            assert not inside.any(), f"text {t.plain_text()!r} is crossed by {where}"


def test_dxf_preview_renders(tmp_path: Path) -> None:
    d = dims_of("tapered_full_round")
    png = render_png(write_dxf(tmp_path / "p.dxf", d, meta_for(d)), tmp_path / "p.png", dpi=60)
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


# ---------------------------------------------------------------- STEP


def test_missing_cad_extra_is_named_in_one_line(tmp_path: Path, monkeypatch) -> None:
    monkeypatch.setitem(sys.modules, "build123d", None)  # makes `import build123d` fail
    with pytest.raises(MissingCadExtraError, match=r'pip install "finfront\[cad\]"') as err:
        write_step(tmp_path / "s.step", dims_of("tapered_sharp"))
    assert str(err.value) == CAD_EXTRA_HINT and "\n" not in CAD_EXTRA_HINT
    d = dims_of("tapered_sharp")
    with pytest.raises(MissingCadExtraError):
        export_design(tmp_path / "out", d, meta_for(d), RESULTS)
    assert not (tmp_path / "out").exists() or list((tmp_path / "out").iterdir()) == []


@pytest.mark.slow  # importing build123d (OpenCascade) alone takes 5-13 s here
@pytest.mark.parametrize("case", ["tapered_fillets", "straight_sharp"])
def test_step_reimports_as_one_solid_of_the_outline_volume(case: str, tmp_path: Path,
                                                           check) -> None:
    bd = pytest.importorskip("build123d", reason='STEP export needs pip install "finfront[cad]"')
    d = dims_of(case)
    f = write_step(tmp_path / "s.step", d)
    assert f.read_text(errors="replace").startswith("ISO-10303-21;")
    shape = bd.import_step(f)
    solids = shape.solids()
    assert len(solids) == 1 and solids[0].is_valid
    N, tr, tt, H, tb, W, L, rf, rt = CASES[case]
    # OpenCascade's volume of the re-read solid vs the exact outline area x length; 0.5 % is
    # the brief's tolerance (an exact B-rep gives round-off only).
    check(f"STEP solid volume, {case} (mm^3)", solids[0].volume,
          closed_form_area_mm2(N, tr, tt, H, tb, W, rf, rt) * L,
          "OpenCascade volume vs plane-geometry closed form x length", rtol=5e-3)
    box = solids[0].bounding_box()
    assert (box.min.X, box.min.Y, box.min.Z) == pytest.approx((0, 0, 0), abs=1e-4)
    assert (box.max.X, box.max.Y, box.max.Z) == pytest.approx((W, tb + H, L), abs=1e-4)


# ---------------------------------------------------------------- parameter sheet, export


def test_parameter_sheet_round_trips_and_carries_the_model_mass(tmp_path: Path) -> None:
    d = dims_of("tapered_fillets")
    meta = meta_for(d)
    row = {**RESULTS, "junction_temperature_K": 371.5, "fin_height_m": 0.04, "mass_kg":
           meta.mass_kg}
    sheet = parameter_sheet(d, meta, row)
    assert sheet["junction_temperature_K"] == 371.5 and "fin_height_m" not in sheet
    assert sheet["mass_kg"] == meta.mass_kg  # the model's mass, unchanged
    assert sheet["profile_mass_kg"] == pytest.approx(meta.mass_kg, rel=0.01)
    assert sheet["fin_thickness_root_mm"] == 1.6 and sheet["gap_root_mm"] == pytest.approx(
        (150.0 - 1.6) / 19 - 1.6, abs=1e-9)  # sheet rounds mm to 1e-9
    for key in RESULT_KEYS:
        assert sheet[key] == RESULTS[key]
    unitless = {"format", "design_id", "study_name", "date", "fin_count", "material"}
    assert all(k in unitless or k.rsplit("_", 1)[-1] in
               {"mm", "mm2", "kg", "m3", "W", "Pa", "s", "m2", "K"} for k in sheet)
    j, c = tmp_path / "s.json", tmp_path / "s.csv"
    write_parameter_sheet(j, c, sheet)
    assert json.loads(j.read_text()) == sheet
    assert read_parameter_sheet_csv(c) == sheet
    with open(c, newline="") as fh:
        assert next(csv.reader(fh)) == list(sheet)


def test_parameter_sheet_refuses_a_mass_that_is_not_this_profile() -> None:
    d = dims_of("tapered_fillets")
    meta = meta_for(d)
    wrong = DesignMeta(meta.design_id, meta.study_name, meta.material, DENSITY,
                       meta.mass_kg * 1.02, meta.date)
    with pytest.raises(ValueError, match=r"^mass_kg = .*within 1%"):
        parameter_sheet(d, wrong, RESULTS)
    with pytest.raises(ValueError, match=r"^results mass_kg = "):
        parameter_sheet(d, meta, {**RESULTS, "mass_kg": meta.mass_kg * 1.001})
    with pytest.raises(ValueError, match=r"^results: missing pressure_drop_Pa"):
        parameter_sheet(d, meta, {k: v for k, v in RESULTS.items() if k != "pressure_drop_Pa"})


def test_export_design_writes_all_or_nothing(tmp_path: Path, monkeypatch) -> None:
    d = dims_of("tapered_full_round")
    meta = meta_for(d)
    formats = ("dxf", "json", "csv")
    out = export_design(tmp_path / "a", d, meta, RESULTS, formats)
    assert sorted(out) == sorted(formats)
    assert sorted(p.name for p in (tmp_path / "a").iterdir()) == sorted(
        export_paths(tmp_path / "a", "D-0042")[f].name for f in formats)
    assert json.loads(out["json"].read_text())["mass_kg"] == meta.mass_kg

    def broken(*args, **kwargs):
        raise OSError("disk full")

    monkeypatch.setattr(export_mod, "write_parameter_sheet", broken)
    with pytest.raises(OSError, match="disk full"):
        export_design(tmp_path / "b", d, meta, RESULTS, formats)
    assert list((tmp_path / "b").iterdir()) == []  # the DXF written first was not kept
    with pytest.raises(ValueError, match=r"^formats = \['pdf'\]"):
        export_design(tmp_path / "c", d, meta, RESULTS, ("pdf",))
    assert set(FORMATS) == {"dxf", "step", "json", "csv"}
