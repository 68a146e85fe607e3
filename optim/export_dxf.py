"""DXF drawing of one design's extrusion profile (millimetres), with dimensions and a data block.

Layers: ``PROFILE_OUTLINE`` holds the profile as one closed polyline whose arcs are exact
(bulges); ``PROFILE_DIMENSIONS`` the linear dimensions and the fin-count note;
``DESIGN_DATA`` the text block (design, study, material, mass, date).
"""

from __future__ import annotations

from pathlib import Path

import ezdxf
from ezdxf.document import Drawing
from ezdxf.fonts import fonts
from ezdxf.layouts import Modelspace

from optim.parameter_sheet import DesignMeta
from optim.profile_outline import ProfileDims

LAYER_PROFILE = "PROFILE_OUTLINE"
LAYER_DIMENSIONS = "PROFILE_DIMENSIONS"
LAYER_DATA = "DESIGN_DATA"
DIMSTYLE = "FINFRONT_MM"

_MM = 1e3


def _text_height(dims: ProfileDims) -> float:
    """A standard lettering height (mm) in proportion to the drawing, at most fin height/3.5.

    The cap keeps the root dimensions' texts, beside the last fin, between the extension lines
    of the base thickness and fin height.
    """
    size = max(dims.base_width_m, dims.overall_height_m) * _MM
    h = min((1.8, 2.5, 3.5, 5.0, 7.0, 10.0, 14.0, 20.0), key=lambda h: abs(h - size / 45.0))
    return min(h, dims.fin_height_m * _MM / 3.5)


def _setup(doc: Drawing, h: float) -> None:
    doc.header["$INSUNITS"] = 4  # millimetres
    doc.header["$MEASUREMENT"] = 1  # metric
    doc.header["$LUNITS"] = 2  # decimal
    doc.layers.add(LAYER_PROFILE, color=7, lineweight=50)
    doc.layers.add(LAYER_DIMENSIONS, color=1, lineweight=18)
    doc.layers.add(LAYER_DATA, color=3, lineweight=25)
    doc.dimstyles.new(
        DIMSTYLE,
        dxfattribs=dict(
            dimlfac=1.0,  # drawing units are mm and dimensions read mm
            dimscale=1.0,
            dimtxt=h,
            dimasz=0.6 * h,
            dimblk="",  # closed filled arrows
            dimexo=0.3 * h,
            dimexe=0.4 * h,
            dimgap=0.25 * h,
            dimtad=1,  # text above the dimension line
            dimtih=0,
            dimtoh=0,
            dimdec=2,
            dimzin=8,  # suppress trailing zeros: 100, 1.5, 8.91
            dimdsep=ord("."),
            dimtmove=0,
            dimtix=0,
            dimsoxd=0,
            dimclrd=1,
            dimclre=1,
            dimclrt=1,
        ),
    )


def _label(value: float) -> str:
    return f"{round(value, 2):.2f}".rstrip("0").rstrip(".")


def _text_width(text: str, h: float) -> float:
    """Width (mm) of ``text`` at lettering height ``h`` in the drawing's text font."""
    return fonts.make_font("txt", h).text_width(text)


def _linear(
    msp: Modelspace,
    p1: tuple[float, float],
    p2: tuple[float, float],
    offset: float,
    vertical: bool,
    h: float,
    text_side: int = 0,
    text_at: tuple[float, float] | None = None,
    centre_ok: bool = True,
) -> None:
    """One linear dimension between p1 and p2, its line at x (vertical) or y = ``offset``.

    The text sits centred above the dimension line when it fits between the extension lines
    (and ``centre_ok``); otherwise beyond p2 (``text_side`` +1) or beyond p1 (-1), or at
    ``text_at`` with a leader.
    """
    if vertical:
        base = (offset, 0.5 * (p1[1] + p2[1]))
        span = abs(p2[1] - p1[1])
    else:
        base = (0.5 * (p1[0] + p2[0]), offset)
        span = abs(p2[0] - p1[0])
    width = _text_width(_label(span), h)
    dim = msp.add_linear_dim(
        base=base, p1=p1, p2=p2, angle=90.0 if vertical else 0.0, dimstyle=DIMSTYLE,
        dxfattribs={"layer": LAYER_DIMENSIONS},
    )
    if width > span - 0.5 * h or not centre_ok:
        if text_at is not None:
            dim.set_location(text_at, leader=True)
        elif text_side:
            end = p2 if text_side > 0 else p1
            shift = text_side * (0.5 * width + 1.5 * h)
            if vertical:
                loc = (offset - 0.75 * h, end[1] + shift)
            else:
                loc = (end[0] + shift, offset + 0.75 * h)
            dim.set_location(loc, leader=False)
    dim.render()


def _notes(dims: ProfileDims) -> list[str]:
    """Fin count and the rounds, as notes above the drawing."""
    rf = dims.root_fillet_m * _MM
    rt = dims.tip_radius_m * _MM
    tt = dims.fin_thickness_tip_m * _MM
    rounds = []
    if rf > 0.0:
        rounds.append(f"root fillets R{_label(rf)}")
    if tt > 0.0 and rt >= 0.5 * tt * (1.0 - 1e-9):
        rounds.append("full round fin tips")
    elif rt > 0.0:
        rounds.append(f"fin tip corners R{_label(rt)}")
    return [f"{dims.fin_count} fins, equal pitch"] + ([", ".join(rounds)] if rounds else [])


def _data_lines(dims: ProfileDims, meta: DesignMeta) -> list[str]:
    return [
        f"Design: {meta.design_id}",
        f"Study: {meta.study_name}",
        f"Material: {meta.material} ({meta.density_kg_per_m3:g} kg/m3)",
        f"Mass: {meta.mass_kg:.4g} kg  (extrusion length {_label(dims.flow_length_m * _MM)} mm)",
        f"Date: {meta.date_iso}",
        "Units: mm",
    ]


def build_drawing(dims: ProfileDims, meta: DesignMeta) -> Drawing:
    """Return the DXF document (profile, dimensions, data block) of one design."""
    h = _text_height(dims)
    doc = ezdxf.new("R2010", setup=True, units=4)
    _setup(doc, h)
    msp = doc.modelspace()

    outline = dims.outline(scale=_MM)
    points = [(s.start[0], s.start[1], getattr(s, "bulge", 0.0)) for s in outline]
    msp.add_lwpolyline(points, format="xyb", close=True, dxfattribs={"layer": LAYER_PROFILE})

    def mm(value_m: float) -> float:  # as the outline rounds them
        return float(f"{value_m * _MM:.12g}")

    N = dims.fin_count
    W = mm(dims.base_width_m)
    tb = mm(dims.base_thickness_m)
    H = mm(dims.fin_height_m)
    Ht = tb + H
    tr = mm(dims.fin_thickness_root_m)
    tt = mm(dims.fin_thickness_tip_m)
    rf = mm(dims.root_fillet_m)
    p = (W - tr) / (N - 1)
    xs = [0.5 * tr + i * p for i in range(N)]
    gap = 2.5 * h  # distance of the first dimension line from the part
    # Texts of the root dimensions go right of the part; the right column stays clear of them.
    root_w = _text_width(_label(tr), h)
    gap_w = _text_width(_label(p - tr), h)
    right = W + 1.5 * h + root_w + 2.5 * h

    # Overall width (below) and overall height (left).
    _linear(msp, (0.0, 0.0), (W, 0.0), -gap, False, h)
    _linear(msp, (0.0, 0.0), (xs[0] - 0.5 * tt, Ht), -gap, True, h)
    # Base thickness and fin height, chained on the right.
    _linear(msp, (W, 0.0), (W, tb), right, True, h, text_side=-1)
    _linear(msp, (W, tb), (xs[-1] + 0.5 * tt, Ht), right, True, h, text_side=+1)
    # Row A above the tips: tip thickness of the first fin (text to its left, never centred,
    # so that no extension line can cross it) and the pitch of fins 1-2 when there is room
    # beside the root gap's text; otherwise the pitch of fins 0-1 goes one row up.
    row_a, row_b, row_c = Ht + gap, Ht + gap + 3.0 * h, Ht + gap + 6.0 * h
    if tt > 0.0:
        _linear(msp, (xs[0] - 0.5 * tt, Ht), (xs[0] + 0.5 * tt, Ht), row_a, False, h,
                text_side=-1, centre_ok=False)
    pitch_w = _text_width(_label(p), h)
    gap_text_x0 = xs[-1] - 0.5 * p + 0.35 * h  # left end of the root gap's text above the tips
    pitch_in_a = N >= 6 and (pitch_w <= p - 0.5 * h
                             or xs[2] + 2.5 * h + pitch_w < gap_text_x0)
    # Root row in the last gap, just above the fillets: root gap and root thickness of the
    # last fin. The thickness text goes right of the part; the gap text stays in the gap if
    # it fits there above the fillets, else rises on a leader up the gap above the tips (one
    # row higher for two fins, where the pitch's extension lines flank that gap).
    y_root = tb + min(rf + 1.5 * h, 0.5 * H)
    _linear(msp, (xs[-1] - 0.5 * tr, tb), (W, tb), y_root, False, h,
            text_at=(W + 1.5 * h + 0.5 * root_w, y_root + 0.75 * h), centre_ok=False)
    gap_row = row_c if (N == 2 and gap_text_x0 + gap_w + 0.5 * h > xs[1]) else row_a
    _linear(msp, (xs[-2] + 0.5 * tr, tb), (xs[-1] - 0.5 * tr, tb), y_root, False, h,
            text_at=(xs[-1] - 0.5 * p + 0.5 * gap_w + 0.6 * h, gap_row),
            centre_ok=y_root >= tb + rf + 1.5 * h)
    if pitch_in_a:
        _linear(msp, (xs[1], Ht), (xs[2], Ht), row_a, False, h, text_side=+1)
    else:  # with the gap's leader rising through this row, the pitch text goes beside
        _linear(msp, (xs[0], Ht), (xs[1], Ht), row_b, False, h, text_side=+1,
                centre_ok=gap_row != row_c)
    note_y = max(row_b if not pitch_in_a else row_a, gap_row) + 3.0 * h
    for k, note in enumerate(reversed(_notes(dims))):
        msp.add_text(note, height=h, dxfattribs={"layer": LAYER_DIMENSIONS}).set_placement(
            (0.0, note_y + 1.6 * h * k), align=ezdxf.enums.TextEntityAlignment.BOTTOM_LEFT
        )

    y = -gap - 3.5 * h
    for line in _data_lines(dims, meta):
        msp.add_text(line, height=h, dxfattribs={"layer": LAYER_DATA}).set_placement(
            (0.0, y), align=ezdxf.enums.TextEntityAlignment.TOP_LEFT
        )
        y -= 1.6 * h
    return doc


def write_dxf(path: str | Path, dims: ProfileDims, meta: DesignMeta) -> Path:
    """Write the profile drawing of one design to ``path`` (DXF R2010, millimetres)."""
    path = Path(path)
    build_drawing(dims, meta).saveas(path)
    return path


def render_png(dxf_path: str | Path, png_path: str | Path, dpi: int = 200) -> Path:
    """Render a DXF file to PNG with ezdxf's matplotlib drawing add-on (white background)."""
    from ezdxf.addons.drawing import matplotlib as draw

    doc = ezdxf.readfile(dxf_path)
    draw.qsave(doc.modelspace(), png_path, bg="#FFFFFF", dpi=dpi)
    return Path(png_path)


__all__ = [
    "DIMSTYLE", "LAYER_DATA", "LAYER_DIMENSIONS", "LAYER_PROFILE", "build_drawing",
    "render_png", "write_dxf",
]
