"""Labels of the picked designs placed clear of the curves, the points and each other.

``place_labels`` tries, for each label, a ring of spots around its anchor (in pixels, after the
figure's layout is fixed), scores each spot by the obstacles it covers, the other labels it
overlaps, how far it leaves the axes and what its leader line crosses, and keeps the best;
the labels are placed greedily in order (the knee first), then twice more each with all the
others in place.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np
from scipy.spatial import cKDTree


def _dense(xy: np.ndarray, step: float) -> np.ndarray:
    """Points along a polyline (pixels) at most ``step`` apart (non-finite points dropped)."""
    xy = xy[np.isfinite(xy).all(axis=1)]
    if len(xy) < 2:
        return xy
    seg = np.hypot(*np.diff(xy, axis=0).T)
    s = np.concatenate([[0.0], np.cumsum(seg)])
    t = np.linspace(0.0, s[-1], max(2, int(s[-1] / step) + 1))
    return np.column_stack([np.interp(t, s, xy[:, 0]), np.interp(t, s, xy[:, 1])])


def place_labels(ax: Any, anchors: Any, texts: Sequence[str], obstacles: Any = (),
                 weights: Any = None, lines: Sequence[tuple[Any, Any]] = (),
                 fontsize: float = 12, colours: Sequence[str] | None = None) -> None:
    """Annotate each anchor (data coordinates) with its text, in a box joined to it by a
    leader line, placed where it covers the fewest obstacles (points with weights, and
    ``lines`` as (x, y) arrays, in data coordinates), no other label and nothing outside the
    axes; the leader line keeps clear of lines and other anchors. The figure's layout is
    fixed first."""
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    frame = ax.get_window_extent(renderer)
    px = fig.dpi / 72.0
    obstacles = np.asarray(obstacles, dtype=float).reshape(-1, 2)
    w_obs = np.ones(len(obstacles)) if weights is None else np.asarray(weights, float)
    ok = np.isfinite(obstacles).all(axis=1)
    obs, w_obs = ax.transData.transform(obstacles[ok]), w_obs[ok]
    for lx, ly in lines:  # a point every 3 px along each line, in the axes
        dense = _dense(ax.transData.transform(np.column_stack([lx, ly])), 3.0)
        dense = dense[(dense[:, 0] >= frame.x0) & (dense[:, 0] <= frame.x1)
                      & (dense[:, 1] >= frame.y0) & (dense[:, 1] <= frame.y1)]
        obs = np.concatenate([obs, dense])
        w_obs = np.concatenate([w_obs, np.full(len(dense), 2.0)])
    pts = ax.transData.transform(np.asarray(anchors, dtype=float).reshape(-1, 2))
    strong = cKDTree(obs[w_obs >= 1.0])  # the lines and front points a leader should not cross
    sizes = []
    for text in texts:
        probe = ax.text(0, 0, text, fontsize=fontsize)
        ext = probe.get_window_extent(renderer)
        probe.remove()
        sizes.append((ext.width, ext.height))
    pad = 0.35 * fontsize * px

    def best_spot(k: int, boxes: list, leaders: list):
        """(score, dx, dy, ha, va, box, leader samples) of the best place for label k."""
        p = pts[k]
        w, h = sizes[k][0] + 2 * pad, sizes[k][1] + 2 * pad
        others = np.delete(pts, k, axis=0)
        best = None
        for dist in (26, 44, 66, 92, 124, 160, 200, 250):
            for deg in range(0, 360, 15):
                c, s = math.cos(math.radians(deg)), math.sin(math.radians(deg))
                ha = "left" if c > 0.35 else "right" if c < -0.35 else "center"
                va = "bottom" if s > 0.35 else "top" if s < -0.35 else "center"
                x = p[0] + dist * c * px
                y = p[1] + dist * s * px
                x0 = x - pad if ha == "left" else x - w + pad if ha == "right" else x - w / 2
                y0 = y - pad if va == "bottom" else y - h + pad if va == "top" else y - h / 2
                x1, y1 = x0 + w, y0 + h
                out = (max(0.0, frame.x0 - x0) + max(0.0, x1 - frame.x1)) * h + (
                    max(0.0, frame.y0 - y0) + max(0.0, y1 - frame.y1)) * w
                inside = ((obs[:, 0] > x0 - 6) & (obs[:, 0] < x1 + 6) & (obs[:, 1] > y0 - 6)
                          & (obs[:, 1] < y1 + 6))
                hits = float(w_obs[inside].sum())
                anchors_hit = int(((pts[:, 0] > x0 - 8) & (pts[:, 0] < x1 + 8)
                                   & (pts[:, 1] > y0 - 8) & (pts[:, 1] < y1 + 8)).sum())
                overlaps = [max(0.0, min(x1, b[2]) - max(x0, b[0]) + 6.0)
                            * max(0.0, min(y1, b[3]) - max(y0, b[1]) + 6.0) for b in boxes]
                overlap = 300.0 * sum(o > 0 for o in overlaps) + 100.0 * sum(overlaps) / (w * h)
                # the leader line: matplotlib starts it at the text's corner or side midpoint
                # nearest the anchor; it should keep clear of the curves, anchors and labels
                tx = min((x0 + pad, 0.5 * (x0 + x1), x1 - pad), key=lambda v: abs(v - p[0]))
                ty = min((y0 + pad, 0.5 * (y0 + y1), y1 - pad), key=lambda v: abs(v - p[1]))
                vec = np.array([tx, ty]) - p
                u0 = min(1.0, 16.0 / max(float(np.hypot(*vec)), 1e-9))  # clear of the anchor
                n_seg = max(4, int(np.hypot(*vec) * (1.0 - u0) / 4.0))  # every 4 px
                seg = p + np.linspace(u0, 1.0, n_seg)[:, None] * vec
                crossed = sum(bool(((seg[:, 0] > b[0]) & (seg[:, 0] < b[2]) & (seg[:, 1] > b[1])
                                    & (seg[:, 1] < b[3])).any()) for b in boxes)
                near, _ = strong.query(seg, distance_upper_bound=7.0)
                near_pts = np.hypot(*(seg[:, None, :] - others[None, :, :]).transpose(2, 0, 1))
                leader = (3.0 * float(np.isfinite(near).sum())
                          + 20.0 * float((near_pts < 10).any(axis=0).sum()) + 40.0 * crossed)
                cut = sum(int(((q[:, 0] > x0) & (q[:, 0] < x1) & (q[:, 1] > y0)
                               & (q[:, 1] < y1)).any()) for q in leaders)
                score = (hits + leader + 40.0 * cut + 20.0 * anchors_hit + overlap
                         + (300.0 + 2000.0 * out / (w * h) if out > 0 else 0.0) + 0.02 * dist)
                if best is None or score < best[0]:
                    best = (score, dist * c, dist * s, ha, va, (x0, y0, x1, y1), seg)
        return best

    spots: list = []
    for k in range(len(pts)):  # greedy, in order (the knee first) ...
        spots.append(best_spot(k, [b[5] for b in spots], [b[6] for b in spots]))
    for _ in range(2):  # ... then each label again, with all the others in place
        for k in range(len(pts)):
            rest = spots[:k] + spots[k + 1:]
            spots[k] = best_spot(k, [b[5] for b in rest], [b[6] for b in rest])
    for k, (text, p, spot) in enumerate(zip(texts, pts, spots, strict=True)):
        _, dx, dy, ha, va, _, _ = spot
        edge = colours[k] if colours is not None else "0.35"
        ann = ax.annotate(
            text, xy=tuple(ax.transData.inverted().transform(p)), xytext=(dx, dy),
            textcoords="offset points", ha=ha, va=va, fontsize=fontsize, zorder=20,
            bbox=dict(boxstyle="round,pad=0.35", fc="white", ec=edge, lw=1.2, alpha=0.9),
            arrowprops=dict(arrowstyle="-", color=edge, lw=1.2, shrinkA=0, shrinkB=4))
        ann.set_in_layout(False)
