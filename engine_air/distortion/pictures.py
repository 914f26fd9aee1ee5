"""Pictures of engine-face distortion, drawn with matplotlib (no pyplot, no Qt; imported in the functions).

``draw_face`` draws one rake point on the annulus: filled contours of p_t/PFAV from the rings' linear
profiles, the probes, each ring's low arcs and the worst sector of DC(θ). ``draw_stack_up`` draws the
surge-margin stack-up of one point as a waterfall against the required minimum. The program embeds the same
drawings in Qt; ``write_distortion_png`` writes them for the command line.

Display conventions (not from a standard): angles clockwise from the top of the face, looking downstream;
rings at the radii of the centroids of equal-area rings of an annulus of hub-to-tip ratio ``HUB_RATIO``.
"""

from __future__ import annotations

import math

import numpy as np

from engine_air.distortion.profile import RingProfiles

HUB_RATIO = 0.35
"""Hub-to-tip radius ratio of the drawn annulus (display only: the descriptors do not use it)."""
MAX_FACES = 12
"""Most face pictures in one PNG."""


def ring_radii(rings: int, hub_ratio: float = HUB_RATIO) -> tuple[np.ndarray, np.ndarray]:
    """(ring boundaries (R+1,), probe radii (R,)) of R equal-area rings, tip radius 1.

    >>> edges, probes = ring_radii(1, 0.0)
    >>> round(float(probes[0]), 4)
    0.7071
    """
    h2 = hub_ratio * hub_ratio
    edges2 = h2 + (1.0 - h2) * np.arange(rings + 1) / rings
    return np.sqrt(edges2), np.sqrt(0.5 * (edges2[:-1] + edges2[1:]))


def _xy(r, theta_deg):
    t = np.radians(theta_deg)
    return r * np.sin(t), r * np.cos(t)


def draw_face(ax, g, row: int, sector_deg: float, title: str = "", levels=None):
    """One point of a ``GroupDescriptors`` on the matplotlib axes ``ax``; returns the contour set."""
    rings = g.group.rings
    edges, radii = ring_radii(rings)
    prof = RingProfiles(g.group.pressure_pa[row:row + 1], g.group.angle_deg[row:row + 1])
    theta = np.linspace(0.0, 360.0, 181)
    values = prof.value(np.broadcast_to(theta, (1, rings, theta.size)))[0] / g.face_average_pa[row]
    r_nodes = np.concatenate([[edges[0]], radii, [edges[-1]]])
    z = np.vstack([values[:1], values, values[-1:]])
    x, y = _xy(r_nodes[:, None], theta[None, :])
    if levels is None:
        span = max(float(np.max(np.abs(z - 1.0))), 1e-4)
        levels = np.linspace(1.0 - span, 1.0 + span, 17)
    filled = ax.contourf(x, y, z, levels=levels, cmap="RdBu", extend="both")
    px, py = _xy(radii[:, None], g.group.angle_deg[row])
    ax.plot(px.ravel(), py.ravel(), "k.", markersize=4, label="probes")
    arcs = g.arcs
    for i in range(rings):
        for k in np.flatnonzero(~np.isnan(arcs.start_deg[row, i])):
            t = np.linspace(arcs.start_deg[row, i, k], arcs.end_deg[row, i, k], 60)
            ax.plot(*_xy(radii[i], t), color="#111111", linewidth=1.5, solid_capstyle="butt")
    start = float(g.sector_start_deg[row])
    t = np.linspace(start, start + sector_deg, 40)
    outline_x = np.concatenate([_xy(edges[-1], t)[0], _xy(edges[0], t[::-1])[0]])
    outline_y = np.concatenate([_xy(edges[-1], t)[1], _xy(edges[0], t[::-1])[1]])
    ax.fill(np.append(outline_x, outline_x[0]), np.append(outline_y, outline_y[0]), fill=False, linestyle="--",
            linewidth=1.8, edgecolor="#7b1fa2")
    for r in (edges[0], edges[-1]):
        ax.plot(*_xy(r, theta), color="0.3", linewidth=0.8)
    ax.set_aspect("equal")
    ax.set_axis_off()
    dc = g.dc[row]
    ax.set_title(title + (f"\nDC({sector_deg:g}) = {dc:.3f}" if math.isfinite(dc) else f"\nDC({sector_deg:g}): no face Mach"),
                 fontsize=9)
    return filled


def draw_stack_up(ax, available: float, loss: float, other: tuple[tuple[str, float], ...],
                  minimum: float | None, title: str = "") -> None:
    """The surge-margin stack-up as a waterfall: available margin, distortion loss, each other item, remaining;
    a dashed line at the required minimum (none drawn when the project sets none)."""
    names = ["available", "distortion\nloss"] + [n for n, _v in other] + ["remaining"]
    steps = [loss] + [v for _n, v in other]
    level = available
    bottoms, heights, colours = [0.0], [available], ["#4c72b0"]
    for s in steps:
        bottoms.append(level - s)
        heights.append(s)
        colours.append("#dd8452" if s >= 0 else "#55a868")
        level -= s
    ok = minimum is None or level >= minimum
    bottoms.append(min(0.0, level))
    heights.append(abs(level))
    colours.append("#55a868" if ok else "#c44e52")
    x = np.arange(len(names))
    ax.bar(x, heights, bottom=bottoms, color=colours, edgecolor="0.2", linewidth=0.6)
    for k, (b, h) in enumerate(zip(bottoms, heights)):
        value = available if k == 0 else (level if k == len(names) - 1 else -steps[k - 1])
        ax.annotate(f"{value:+.3f}" if k else f"{value:.3f}", (k, b + h), ha="center", va="bottom", fontsize=8)
    ax.axhline(0.0, color="0.3", linewidth=0.8)
    if minimum is not None:
        ax.axhline(minimum, color="#c44e52", linestyle="--", linewidth=1.2, label=f"required minimum {minimum:g}")
        ax.legend(loc="upper right", fontsize=8)
    ax.set_xticks(x)
    ax.set_xticklabels(names, fontsize=8)
    ax.set_ylabel("surge margin\n(fraction of PR_surge)", fontsize=8)
    ax.set_title(title, fontsize=9)


def distortion_figure(assessment, minimum: float | None = None, max_faces: int = MAX_FACES):
    """A figure: up to ``max_faces`` face pictures and, with a stack-up, the waterfall of the point with the
    least remaining margin."""
    from matplotlib.figure import Figure

    d = assessment.descriptors
    n = min(d.rakes.points, max_faces)
    stack = assessment.stability is not None
    cols = min(4, n)
    rows = math.ceil(n / cols) + (1 if stack else 0)
    fig = Figure(figsize=(3.2 * cols + 1.0, 3.3 * rows), dpi=110)
    filled = None
    for k in range(n):
        g, row = d.where(k)
        ax = fig.add_subplot(rows, cols, k + 1)
        filled = draw_face(ax, g, row, d.sector_deg, d.rakes.labels[k], levels=_common_levels(d, n))
    if filled is not None:
        fig.colorbar(filled, ax=fig.axes, shrink=0.6, label="p_t / PFAV")
    if stack:
        worst = int(np.nanargmin(assessment.remaining_surge_margin))
        ax = fig.add_subplot(rows, 1, rows)
        draw_stack_up(ax, assessment.stability.available_surge_margin, float(assessment.surge_margin_loss[worst]),
                      assessment.stability.other_losses, minimum,
                      f"surge-margin stack-up, rating {assessment.rating!r}, point {d.rakes.labels[worst]!r} "
                      "(least remaining)")
    if d.rakes.points > n:
        fig.suptitle(f"first {n} of {d.rakes.points} points", fontsize=9)
    return fig


def _common_levels(d, n: int) -> np.ndarray:
    span = 1e-4
    for k in range(n):
        g, row = d.where(k)
        p = g.group.pressure_pa[row] / g.face_average_pa[row]
        span = max(span, float(np.max(np.abs(p - 1.0))))
    return np.linspace(1.0 - span, 1.0 + span, 17)


def write_distortion_png(assessment, path, minimum: float | None = None) -> None:
    """``distortion_figure`` written as a PNG file."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    fig = distortion_figure(assessment, minimum)
    FigureCanvasAgg(fig)
    fig.savefig(path)
