"""Labels placed beside their points without covering each other (matplotlib).

A greedy placement in screen space: each label, in the order given, takes the first
of a list of candidate offsets whose box overlaps neither a label already placed, nor
any of the points, nor the axes' edge; a label set further out than the first ring
gets a thin leader line back to its point. Good enough for the tens of labels of a
ratio chart or a spectrum; it needs the figure laid out first, so call it last.
"""

from __future__ import annotations

import numpy as np

# Offsets in points, nearest first: the eight directions on three rings.
_DIRECTIONS = ((1, 1), (-1, 1), (1, -1), (-1, -1), (0, 1.3), (0, -1.3), (1.4, 0), (-1.4, 0))
RINGS = (5.0, 13.0, 24.0)
CANDIDATES = tuple((d * dx, d * dy) for d in RINGS for dx, dy in _DIRECTIONS)
MARKER_HALF = 4.0  # points: the box kept clear around each point


def laid_out_renderer(fig):
    """A renderer for a bare Figure, laid out (attach an Agg canvas if it has none that renders)."""
    if not hasattr(fig.canvas, "get_renderer"):
        from matplotlib.backends.backend_agg import FigureCanvasAgg

        FigureCanvasAgg(fig)
    # runs the layout engine, so positions below are final, without rasterising the figure
    # (a full draw of a ratio chart costs more than placing all its labels)
    fig.draw_without_rendering()
    return fig.canvas.get_renderer()


def _overlap(a, b) -> float:
    """Overlapping area of two boxes (x0, y0, x1, y1)."""
    w = min(a[2], b[2]) - max(a[0], b[0])
    h = min(a[3], b[3]) - max(a[1], b[1])
    return w * h if w > 0 and h > 0 else 0.0


def place_labels(ax, points, texts, *, candidates=CANDIDATES, fontsize: float = 7.0, colors=None,
                 obstacles=(), gid_prefix: str = "label", background: bool = False, below=None,
                 renderer=None):
    """Annotate ``points`` (data coordinates) with ``texts``, avoiding overlaps.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        The axes the points are drawn in (its figure must be fully drawn otherwise).
    points : sequence of (float, float)
        Where each label belongs, in data coordinates.
    texts : sequence of str
        The labels.
    candidates : sequence of (float, float)
        Offsets in points to try, in order of preference.
    fontsize : float
        Points.
    colors : sequence, optional
        One colour per label (default black).
    obstacles : sequence of (float, float)
        More points (data coordinates) that labels must not cover.
    background : bool
        Put each label on a white patch (over lines drawn through it).
    below : sequence of bool, optional
        Per label: try the places below the point first (a point on the top edge).
    renderer : optional
        The renderer of a figure already laid out (:func:`laid_out_renderer`): several axes of
        one figure are labelled after one layout instead of one each (labels placed are
        kept out of the layout, so it does not change between them).

    Returns
    -------
    list of matplotlib.text.Annotation
        One per label, in order; each has ``gid`` ``"{gid_prefix} {text}"``.
    """
    fig = ax.figure
    if renderer is None:
        renderer = laid_out_renderer(fig)
    scale = fig.dpi / 72.0
    to_px = ax.transData.transform
    frame = ax.get_window_extent(renderer)
    edge = (frame.x0, frame.y0, frame.x1, frame.y1)
    keep = [to_px(p) for p in list(points) + list(obstacles)]
    blocked = [(x - MARKER_HALF * scale, y - MARKER_HALF * scale, x + MARKER_HALF * scale,
                y + MARKER_HALF * scale) for x, y in keep if np.all(np.isfinite((x, y)))]
    colors = list(colors) if colors is not None else ["black"] * len(texts)
    below = list(below) if below is not None else [False] * len(texts)
    placed = []
    for (px, py), text, color, point, down in zip((to_px(p) for p in points), texts, colors, points, below):
        probe = ax.text(0, 0, text, fontsize=fontsize)
        box = probe.get_window_extent(renderer)
        probe.remove()
        w, h = box.width, box.height
        best, best_cost = None, np.inf
        for dx, dy in ((dx, -dy) for dx, dy in candidates) if down else candidates:
            ox, oy = dx * scale, dy * scale
            x0 = px + ox - (w if dx < 0 else 0 if dx > 0 else w / 2)
            y0 = py + oy - (h if dy < 0 else 0 if dy > 0 else h / 2)
            cand = (x0, y0, x0 + w, y0 + h)
            outside = (max(0, edge[0] - cand[0]) + max(0, cand[2] - edge[2])) * h + \
                (max(0, edge[1] - cand[1]) + max(0, cand[3] - edge[3])) * w
            cost = sum(_overlap(cand, b) for b in blocked) + 4.0 * outside
            if cost < best_cost - 1e-9:
                best, best_cost = (dx, dy, cand), cost
            if cost == 0:
                break
        dx, dy, cand = best
        far = np.hypot(dx, dy) > RINGS[0] * 1.5
        ann = ax.annotate(text, point, xytext=(dx, dy), textcoords="offset points", fontsize=fontsize,
                          color=color, ha="right" if dx < 0 else "left" if dx > 0 else "center",
                          va="top" if dy < 0 else "bottom" if dy > 0 else "center",
                          arrowprops=dict(arrowstyle="-", color="0.55", lw=0.6, shrinkA=0, shrinkB=3)
                          if far else None, annotation_clip=False, gid=f"{gid_prefix} {text}",
                          bbox=dict(boxstyle="round,pad=0.1", fc="white", ec="none", alpha=0.85)
                          if background else None)
        ann.set_in_layout(False)  # placed after the layout: must not move it
        blocked.append(cand)
        placed.append(ann)
    return placed


def boxes_overlap(annotations, renderer) -> list[tuple[str, str]]:
    """Pairs of annotations whose text boxes overlap (for checking a figure)."""
    boxes = [(a.get_text(), a.get_window_extent(renderer)) for a in annotations]
    out = []
    for i, (ta, a) in enumerate(boxes):
        for tb, b in boxes[i + 1:]:
            if _overlap((a.x0, a.y0, a.x1, a.y1), (b.x0, b.y0, b.x1, b.y1)) > 0.5:
                out.append((ta, tb))
    return out
