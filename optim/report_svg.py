"""A to-scale, dimensioned cross-section of one design as inline SVG (drawn in screen pixels).

The profile is the exact outline of :mod:`optim.profile_outline` (the one the DXF and STEP
exports draw): straight or tapered fins, root fillets and tip rounds as arcs. The main view
carries the overall dimensions; two magnified details of one fin pair carry the small ones
(fin thickness at root and tip, gap at root and tip, pitch, radii). Equal scales in x and y;
a 10 mm scale bar in the main view. Dimensions in mm.
"""

from __future__ import annotations

import math

from optim.profile_outline import Arc, ProfileDims, Segment
from optim.report_format import esc, length_mm

FONT = 15  # px, dimension text
INK = "#111111"
DIM = "#0b3d91"  # dimension lines and text
FILL = "#cfd6df"
ARROW = 8.0  # arrow length, px
HALO = 'paint-order="stroke" stroke="#ffffff" stroke-width="4" stroke-linejoin="round"'


class _Canvas:
    """SVG fragments in pixels; ``X``/``Y`` map profile millimetres to pixels."""

    def __init__(self) -> None:
        self.parts: list[str] = []

    def add(self, fragment: str) -> None:
        self.parts.append(fragment)

    def line(self, x1: float, y1: float, x2: float, y2: float, colour: str = DIM,
             width: float = 1.2, dash: str | None = None) -> None:
        d = f' stroke-dasharray="{dash}"' if dash else ""
        self.add(f'<line x1="{x1:.2f}" y1="{y1:.2f}" x2="{x2:.2f}" y2="{y2:.2f}" '
                 f'stroke="{colour}" stroke-width="{width}"{d}/>')

    def arrow(self, x: float, y: float, ux: float, uy: float) -> None:
        """A filled arrowhead with its tip at (x, y), pointing along (ux, uy)."""
        bx, by = x - ARROW * ux, y - ARROW * uy
        px, py = -uy * 3.0, ux * 3.0
        self.add(f'<polygon points="{x:.2f},{y:.2f} {bx + px:.2f},{by + py:.2f} '
                 f'{bx - px:.2f},{by - py:.2f}" fill="{DIM}"/>')

    def text(self, x: float, y: float, s: str, anchor: str = "middle", rotate: bool = False,
             colour: str = DIM, size: int = FONT, weight: str = "normal") -> None:
        rot = f' transform="rotate(-90 {x:.2f} {y:.2f})"' if rotate else ""
        self.add(f'<text x="{x:.2f}" y="{y:.2f}" font-size="{size}" text-anchor="{anchor}" '
                 f'fill="{colour}" font-weight="{weight}" {HALO}{rot}>{esc(s)}</text>')

    def dim_h(self, x1: float, x2: float, y: float, label: str, above: bool = True,
              text_x: float | None = None) -> None:
        """Horizontal dimension between x1 < x2 at height y (arrows outside if it is short)."""
        inside = x2 - x1 >= 2 * ARROW + 6
        if inside:
            self.line(x1, y, x2, y)
            self.arrow(x1, y, -1, 0)
            self.arrow(x2, y, 1, 0)
        else:
            self.line(x1 - 2.2 * ARROW, y, x2 + 2.2 * ARROW, y)
            self.arrow(x1, y, 1, 0)
            self.arrow(x2, y, -1, 0)
        tx = 0.5 * (x1 + x2) if text_x is None else text_x
        self.text(tx, y - 6 if above else y + FONT + 2, label)

    def dim_v(self, x: float, y_top: float, y_bottom: float, label: str, side: str = "right",
              rotate: bool = False) -> None:
        """Vertical dimension from y_top to y_bottom (pixels, y down) at x."""
        inside = y_bottom - y_top >= 2 * ARROW + 4
        if inside:
            self.line(x, y_top, x, y_bottom)
            self.arrow(x, y_top, 0, -1)
            self.arrow(x, y_bottom, 0, 1)
        else:
            self.line(x, y_top - 2.2 * ARROW, x, y_bottom + 2.2 * ARROW)
            self.arrow(x, y_top, 0, 1)
            self.arrow(x, y_bottom, 0, -1)
        ym = 0.5 * (y_top + y_bottom)
        if rotate:
            self.text(x - 7, ym, label, rotate=True)
        elif side == "right":
            self.text(x + 7, ym + FONT * 0.35, label, anchor="start")
        else:
            self.text(x - 7, ym + FONT * 0.35, label, anchor="end")


def _path(outline: list[Segment], X, Y, scale: float) -> str:
    """SVG path data of the outline; y is flipped, so a counter-clockwise arc (positive sweep,
    a convex round) is drawn with SVG's sweep flag 0 and a concave fillet with 1."""
    x0, y0 = outline[0].start
    d = [f"M{X(x0):.3f} {Y(y0):.3f}"]
    for s in outline:
        ex, ey = s.end
        if isinstance(s, Arc):
            r = s.radius * scale
            large = 1 if abs(s.sweep) > math.pi else 0
            flag = 0 if s.sweep > 0 else 1
            d.append(f"A{r:.3f} {r:.3f} 0 {large} {flag} {X(ex):.3f} {Y(ey):.3f}")
        else:
            d.append(f"L{X(ex):.3f} {Y(ey):.3f}")
    d.append("Z")
    return " ".join(d)


def _fin_x(dims_mm: dict, i: int) -> float:
    return 0.5 * dims_mm["tr"] + i * dims_mm["p"]


def cross_section_svg(dims: ProfileDims, uid: str, width: int = 620) -> str:
    """Inline SVG of the profile: main view to scale plus two magnified details, in mm."""
    outline = dims.outline(scale=1e3)
    m = dict(W=dims.base_width_m * 1e3, tb=dims.base_thickness_m * 1e3,
             Hf=dims.fin_height_m * 1e3, tr=dims.fin_thickness_root_m * 1e3,
             tt=dims.fin_thickness_tip_m * 1e3, p=dims.pitch_m * 1e3,
             rf=dims.root_fillet_m * 1e3, rt=dims.tip_radius_m * 1e3, N=dims.fin_count)
    Ht = m["tb"] + m["Hf"]
    c = _Canvas()
    uid = "".join(ch if ch.isalnum() else "-" for ch in uid)

    # ---- main view ------------------------------------------------------------------------
    left, right, top, bottom = 64.0, 118.0, 64.0, 58.0
    s = min((width - left - right) / m["W"], 260.0 / Ht)
    ox, oy = left, top + s * Ht  # pixel position of the profile origin (bottom-left)

    def X(x: float) -> float:
        return ox + s * x

    def Y(y: float) -> float:
        return oy - s * y

    i0 = max(0, m["N"] // 2 - 1)
    i1 = i0 + 1
    xa, xb = _fin_x(m, i0), _fin_x(m, i1)
    win_x = (xa - 0.8 * m["p"], xb + 0.8 * m["p"])
    root_win = (m["tb"] - 0.7 * m["p"], m["tb"] + 1.3 * m["p"])
    tip_win = (Ht - 1.2 * m["p"], Ht + 0.8 * m["p"])
    c.add(f'<path d="{_path(outline, X, Y, s)}" fill="{FILL}" stroke="{INK}" '
          'stroke-width="1.4" stroke-linejoin="round"/>')
    for name, (ylo, yhi) in (("A", root_win), ("B", tip_win)):
        ylo, yhi = max(ylo, -0.5), min(yhi, Ht + 0.5)  # marks stay inside the drawing
        c.add(f'<rect x="{X(win_x[0]):.2f}" y="{Y(yhi):.2f}" '
              f'width="{s * (win_x[1] - win_x[0]):.2f}" height="{s * (yhi - ylo):.2f}" '
              f'fill="none" stroke="{DIM}" stroke-width="1.2" stroke-dasharray="4 3"/>')
        y_label = Y(ylo) - 2 if name == "A" else Y(yhi) + FONT
        c.text(X(win_x[1]) + 4, y_label, name, anchor="start", weight="bold")
    # overall width, below
    yb = oy + 26
    c.line(X(0), oy + 4, X(0), yb + 6)
    c.line(X(m["W"]), oy + 4, X(m["W"]), yb + 6)
    c.dim_h(X(0), X(m["W"]), yb, length_mm(dims.base_width_m), above=False)
    # overall height, left
    xl = ox - 30
    c.line(ox - 4, Y(0), xl - 6, Y(0))
    c.line(X(0.5 * (m["tr"] - m["tt"])) - 4, Y(Ht), xl - 6, Y(Ht))
    c.dim_v(xl, Y(Ht), Y(0), length_mm(dims.overall_height_m), rotate=True)
    # base thickness and fin height, right (a chain)
    xr = X(m["W"]) + 26
    x_tip_right = X(m["W"] - 0.5 * (m["tr"] - m["tt"]))
    c.line(X(m["W"]) + 4, Y(0), xr + 6, Y(0))
    c.line(X(m["W"]) + 4, Y(m["tb"]), xr + 6, Y(m["tb"]))
    c.line(x_tip_right + 4, Y(Ht), xr + 6, Y(Ht))
    c.dim_v(xr, Y(m["tb"]), Y(0), f"base {length_mm(dims.base_thickness_m)}")
    c.dim_v(xr, Y(Ht), Y(m["tb"]), f"fin {length_mm(dims.fin_height_m)}")
    # fin count, pitch and scale bar, above
    c.text(ox, top - 34, f"{m['N']} fins at {length_mm(dims.pitch_m)} mm pitch", anchor="start",
           colour=INK)
    bar = 10.0 * s
    bx = X(m["W"]) - bar
    c.line(bx, top - 40, bx + bar, top - 40, colour=INK, width=2.5)
    for xx in (bx, bx + bar):
        c.line(xx, top - 45, xx, top - 35, colour=INK, width=1.5)
    c.text(bx - 6, top - 35, "10 mm", anchor="end", colour=INK)
    main_h = oy + bottom

    # ---- details A (roots) and B (tips) ------------------------------------------------------
    gap = 24.0
    dw = (width - gap) / 2.0
    span_x = win_x[1] - win_x[0]
    sd = min(dw / span_x, 240.0 / (root_win[1] - root_win[0]))
    dh = sd * (root_win[1] - root_win[0])
    y_det = main_h + 30  # top of the detail windows (title line above)
    c.text(0, y_det - 10, f"A: fin roots, {sd / s:.1f} × the main view", anchor="start",
           colour=INK)
    c.text(dw + gap, y_det - 10, f"B: fin tips, {sd / s:.1f} × the main view", anchor="start",
           colour=INK)
    for k, (_ylo, yhi) in enumerate((root_win, tip_win)):
        x_off = k * (dw + gap)

        def DX(x: float, x_off: float = x_off) -> float:
            return x_off + sd * (x - win_x[0])

        def DY(y: float, yhi: float = yhi) -> float:
            return y_det + sd * (yhi - y)

        cid = f"xs-{uid}-{'AB'[k]}"
        c.add(f'<clipPath id="{cid}"><rect x="{x_off:.2f}" y="{y_det:.2f}" '
              f'width="{sd * span_x:.2f}" height="{dh:.2f}"/></clipPath>')
        c.add(f'<g clip-path="url(#{cid})"><path d="{_path(outline, DX, DY, sd)}" '
              f'fill="{FILL}" stroke="{INK}" stroke-width="1.6"/></g>')
        c.add(f'<rect x="{x_off:.2f}" y="{y_det:.2f}" width="{sd * span_x:.2f}" '
              f'height="{dh:.2f}" fill="none" stroke="{DIM}" stroke-width="1" '
              'stroke-dasharray="4 3"/>')
        if k == 0:
            _root_dims(c, m, dims, xa, xb, DX, DY)
        else:
            _tip_dims(c, m, dims, xa, xb, Ht, DX, DY)
    total_h = y_det + dh + 8
    return (f'<svg xmlns="http://www.w3.org/2000/svg" class="xsection" width="{width}" '
            f'height="{total_h:.0f}" viewBox="0 0 {width} {total_h:.0f}" role="img" '
            f'font-family="Segoe UI, Helvetica, Arial, sans-serif" '
            f'aria-label="cross-section of design {esc(uid)}, to scale">'
            + "".join(c.parts) + "</svg>")


def _face_x(m: dict, xc: float, y: float, side: int) -> float:
    """x of a fin face (side -1 left, +1 right) at height y (mm), tapered fins."""
    frac = min(max((y - m["tb"]) / m["Hf"], 0.0), 1.0)
    half = 0.5 * (m["tr"] + (m["tt"] - m["tr"]) * frac)
    return xc + side * half


def _root_dims(c: _Canvas, m: dict, dims: ProfileDims, xa: float, xb: float, DX, DY) -> None:
    p = m["p"]
    y1 = m["tb"] + m["rf"] + 0.3 * p  # fin thickness at the root, just above the fillets
    c.dim_h(DX(_face_x(m, xa, m["tb"], -1)), DX(_face_x(m, xa, m["tb"], 1)), DY(y1),
            length_mm(dims.fin_thickness_root_m))
    y2 = m["tb"] + m["rf"] + 0.85 * p  # gap at the root
    gap = dims.pitch_m - dims.fin_thickness_root_m
    c.dim_h(DX(_face_x(m, xa, m["tb"], 1)), DX(_face_x(m, xb, m["tb"], -1)), DY(y2),
            length_mm(gap))
    if m["rf"] > 0:  # leader to the fillet on the right of fin a
        r = m["rf"]
        fx = _face_x(m, xa, m["tb"], 1) + r * (1 - math.sqrt(0.5))
        fy = m["tb"] + r * (1 - math.sqrt(0.5))
        tx, ty = DX(fx) + 26, DY(m["tb"] - 0.4 * p)
        c.line(DX(fx), DY(fy), tx - 2, ty - FONT * 0.4)
        c.text(tx, ty, f"R {length_mm(dims.root_fillet_m)}", anchor="start")


def _tip_dims(c: _Canvas, m: dict, dims: ProfileDims, xa: float, xb: float, Ht: float,
              DX, DY) -> None:
    p = m["p"]
    if m["tt"] > 0:
        y1 = Ht - max(m["rt"] * 2.2, 0.15 * p) - 0.1 * p  # below the tip round
        c.dim_h(DX(_face_x(m, xa, Ht, -1)), DX(_face_x(m, xa, Ht, 1)), DY(y1),
                length_mm(dims.fin_thickness_tip_m), above=False)
    y2 = Ht - 1.1 * p  # gap at the tip
    gap_tip = dims.pitch_m - dims.fin_thickness_tip_m
    c.dim_h(DX(_face_x(m, xa, Ht, 1)), DX(_face_x(m, xb, Ht, -1)), DY(y2), length_mm(gap_tip))
    # pitch between the centre lines, above the tips
    y3 = Ht + 0.45 * p
    for xc in (xa, xb):
        c.line(DX(xc), DY(Ht - 0.3 * p), DX(xc), DY(y3) - 6, dash="8 3 2 3", width=1.0)
    c.dim_h(DX(xa), DX(xb), DY(y3), f"pitch {length_mm(dims.pitch_m)}")
    if m["rt"] > 0:  # a note in the window's top-left corner, with a leader to fin a's tip
        full = m["rt"] >= 0.5 * m["tt"] * (1 - 1e-9)
        label = "tips: full round" if full else f"tips: R {length_mm(dims.tip_radius_m)}"
        tx, ty = DX(xa - 0.75 * p), DY(Ht + 0.8 * p) + FONT + 2
        c.text(tx, ty, label, anchor="start")
        c.line(tx + 12, ty + 4, DX(xa - 0.25 * m["tt"]), DY(Ht - 0.05 * m["tt"]))
