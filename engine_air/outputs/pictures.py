"""Pictures without Qt, drawn with matplotlib (Agg): envelope maps and section plots as PNG files.

Maps (``map_figure``, ``render_map``, ``write_map_png``): one quantity of an
envelope evaluation (``engine_air.envelope.evaluate.MapResult``) for one case,
or the worst of all cases when ``case`` is None, over flight Mach number (x)
and pressure altitude (y: km in SI, ft in US units), with

- a title naming the quantity and the case (and the project);
- a colour bar labelled with the quantity and its unit. Margins use the
  diverging scale centred on zero (orange where the limit fails, blue where it
  holds), levels the sequential one (``engine_air.outputs.colours``, the same
  scales as the program);
- points where the quantity is not judged (not defined, or its check does not
  apply there) in neutral grey, points outside the envelope in light grey;
- the envelope outline, an ``x`` on failing points (thinned to a regular
  pattern when dense), the margin = 0 line (of the quantity shown, or of the
  least relative margin over all limits for a level quantity) and the dashed
  face static = ambient line (p2/p0 = 1), each named in a legend below.

Section plots (``section_figure``, ``write_section_png``): a cut from
``engine_air.outputs.sections.cut``, one line per case, the limit line (zero
for a margin) and the failing stretches marked.

Every figure-building function returns a ``matplotlib.figure.Figure`` (no pyplot,
no global state); ``figure_png`` renders one to PNG bytes.
"""

from __future__ import annotations

import io
import math
import warnings
from dataclasses import dataclass

import numpy as np

from engine_air.envelope.evaluate import WORST, MapResult
from engine_air.outputs import colours as C
from engine_air.outputs.marks import marked_points
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.sections import (
    ALTITUDE,
    Section,
    check_of,
    cut,
    judged_map,
    stretches,
)

DPI = 100
MAP_SIZE_IN = (9.6, 6.4)  # 960 x 640 px at DPI: a review map at least 900 x 600
SECTION_SIZE_IN = (8.0, 5.2)
MAX_NAME = 60  # characters of a case or project name shown in a title

SI, US = "si", "us"
_FT = 0.3048
_UNIT_US = {"m": ("ft", 1 / _FT), "m/s": ("ft/s", 1 / _FT), "m^2": ("ft²", 1 / _FT**2), "m²": ("ft²", 1 / _FT**2),
            "Pa": ("psi", 1 / 6894.757293168361), "kg/s": ("lbm/s", 1 / 0.45359237), "N": ("lbf", 1 / 4.4482216152605),
            "K": ("°R", 1.8)}


def _system(units: str) -> str:
    s = str(units).strip().lower()
    if s not in (SI, US):
        raise ValueError(f"units must be 'si' or 'us', got {units!r}")
    return s


def altitude_scale(units: str = SI) -> tuple[str, float]:
    """(unit label, display value of one metre) for the altitude axis: km in SI, ft in US units."""
    return ("km", 1e-3) if _system(units) == SI else ("ft", 1 / _FT)


def quantity_scale(quantity_key: str, units: str = SI) -> tuple[str, float]:
    """(unit label, display value of one SI unit) of a quantity; "–" for a dimensionless one."""
    unit = QUANTITIES[quantity_key].unit
    if _system(units) == US and unit in _UNIT_US:
        return _UNIT_US[unit]
    return (unit or "–"), 1.0


def short(text: str, limit: int = MAX_NAME) -> str:
    """``text`` on one line, cut to ``limit`` characters with an ellipsis."""
    one = " ".join(str(text).split())
    return one if len(one) <= limit else one[: limit - 1] + "…"


def case_title(case: str | None) -> str:
    return "worst of all cases" if case in (None, WORST) else f"case “{short(case)}”"


def _rgb(c) -> tuple[float, float, float]:
    return tuple(v / 255 for v in c[:3])


def _mpl():
    """matplotlib's pieces, imported on first use (importing this module stays cheap for the colour names)."""
    from matplotlib import patheffects
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.colors import ListedColormap, Normalize
    from matplotlib.figure import Figure
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    return patheffects, FigureCanvasAgg, ListedColormap, Normalize, Figure, Line2D, Patch


def figure_png(fig: Figure) -> bytes:
    """PNG bytes of ``fig`` (Agg)."""
    _, FigureCanvasAgg, *_rest = _mpl()
    canvas = fig.canvas if isinstance(fig.canvas, FigureCanvasAgg) else FigureCanvasAgg(fig)
    buf = io.BytesIO()
    canvas.print_png(buf, metadata={"Software": None})
    return buf.getvalue()


def _crosses(field, level: float) -> bool:
    f = np.asarray(field, float)
    if f.ndim != 2 or min(f.shape) < 2:
        return False
    with np.errstate(invalid="ignore"):
        finite = f[np.isfinite(f)]
    return finite.size > 0 and float(finite.min()) < level < float(finite.max())


def _contour(ax, x, y, field, level, **style) -> bool:
    """Draw the ``level`` line of ``field``; False when the field does not cross it."""
    if not _crosses(field, level):
        return False
    halo = style.pop("halo", 0)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        cs = ax.contour(x, y, np.ma.masked_invalid(field), levels=[level], **style)
    if halo:
        patheffects = _mpl()[0]
        cs.set(path_effects=[patheffects.withStroke(linewidth=halo, foreground="white")])
    return True


def least_relative_margin(result: MapResult, case: str) -> np.ndarray:
    """(ny, nx) least relative margin over the checks that apply (and over cases for WORST); NaN where none
    applies. Failing checks rank first, so the zero level bounds the failing region (engine_air.envelope.ranking)."""
    from engine_air.envelope.ranking import limiting_map

    return limiting_map(result, case)[0]


def _altitude_ticks(axis, unit: str) -> None:
    if unit == "ft":
        from matplotlib.ticker import StrMethodFormatter

        axis.set_major_formatter(StrMethodFormatter("{x:,.0f}"))


def _edges(v: np.ndarray) -> np.ndarray:
    v = np.asarray(v, float)
    if v.size == 1:
        return np.array([v[0] - 0.5, v[0] + 0.5])
    mid = 0.5 * (v[1:] + v[:-1])
    return np.concatenate([[2 * v[0] - mid[0]], mid, [2 * v[-1] - mid[-1]]])


@dataclass(frozen=True)
class MapPicture:
    """A rendered map: the PNG bytes and what they show (``vmin``/``vmax``: colour-scale ends, SI units)."""

    png: bytes
    width: int
    height: int
    kind: str
    vmin: float
    vmax: float
    failing_points: int
    not_judged_points: int
    quantity: str = ""
    label: str = ""
    unit: str = ""
    case: str = ""

    @property
    def undefined_points(self) -> int:
        return self.not_judged_points


@dataclass(frozen=True)
class MapFigure:
    """A map figure and its parts (for tests and callers that add to it)."""

    figure: Figure
    axes: object
    colour_bar: object
    legend: object
    kind: str
    vmin: float
    vmax: float
    failing_points: int
    not_judged_points: int
    zero_line: bool
    ram_line: bool


def map_figure(
    result: MapResult,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    *,
    units: str = SI,
    levels: tuple[float, float] | None = None,
    project_title: str | None = None,
) -> MapFigure:
    """Build the map of ``quantity_key`` for ``case`` (None: the worst of all cases).

    KeyError for an unknown quantity or case; ValueError for unknown ``units``.
    """
    q = QUANTITIES[quantity_key]
    name = WORST if case is None else case
    if name != WORST:
        result.case_map(name)  # KeyError for an unknown case
    alt_unit, alt_f = altitude_scale(units)
    q_unit, q_f = quantity_scale(quantity_key, units)
    kind = q.kind
    x = np.asarray(result.mach, float)
    y = np.asarray(result.altitude_m, float) * alt_f
    values = np.asarray(result.quantity(name, quantity_key), float)
    judged = judged_map(result, name, quantity_key) if kind == C.MARGIN else (result.inside & np.isfinite(values))
    not_judged = result.inside & ~judged
    shown = np.where(judged, values, np.nan)
    failing = result.failing(name) & result.inside  # any limit, as in the program's map
    if levels is None:
        levels = C.levels_for(kind, shown)
    vmin, vmax = float(levels[0]), float(levels[1])
    if not (math.isfinite(vmin) and math.isfinite(vmax)) or vmax <= vmin:
        vmin, vmax = C.levels_for(kind, np.array([vmin, vmax]))

    _, FigureCanvasAgg, ListedColormap, Normalize, Figure, Line2D, Patch = _mpl()
    fig = Figure(figsize=MAP_SIZE_IN, dpi=DPI, layout="constrained")
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    ax.set_facecolor(_rgb(C.OUTSIDE_GREY))
    xe, ye = _edges(x), _edges(y)
    grey = np.where(not_judged, 1.0, np.nan)
    ax.pcolormesh(xe, ye, np.ma.masked_invalid(grey), cmap=ListedColormap([_rgb(C.NOT_JUDGED_GREY)]),
                  vmin=0, vmax=2, shading="flat")
    mesh = ax.pcolormesh(xe, ye, np.ma.masked_invalid(shown * q_f), cmap=C.matplotlib_colormap(kind),
                         norm=Normalize(vmin * q_f, vmax * q_f), shading="flat")

    env = result.project.envelope
    ex = np.array(list(env.mach) + [env.mach[0]], float)
    ey = np.array(list(env.altitude_m) + [env.altitude_m[0]], float) * alt_f
    ax.plot(ex, ey, color=_rgb(C.OUTLINE), lw=2.0, zorder=4)

    zero_field = shown if kind == C.MARGIN else least_relative_margin(result, name)
    zero = _contour(ax, x, y, zero_field, 0.0, colors=[_rgb(C.ZERO_LINE)], linewidths=2.2, halo=5, zorder=5)
    ratio = np.asarray(result.quantity(name, "face_static_to_ambient"), float)
    ram = _contour(ax, x, y, ratio, 1.0, colors=[_rgb(C.RAM_LINE)], linewidths=2.2, linestyles="--",
                   halo=4.5, zorder=5)

    ii, jj = marked_points(failing)
    ax.scatter(x[jj], y[ii], marker="x", s=22, c=[_rgb(C.FAIL_MARK)], linewidths=1.1, zorder=6)

    ax.set_xlim(xe[0], xe[-1])
    ax.set_ylim(ye[0], ye[-1])
    _altitude_ticks(ax.yaxis, alt_unit)
    ax.set_xlabel("Flight Mach number M0")
    ax.set_ylabel(f"Pressure altitude ({alt_unit})")
    title = f"{q.label} — {case_title(name)}"
    sub = short(project_title if project_title is not None else (result.project.title or ""))
    ax.set_title(title + (f"\n{sub}" if sub else ""), fontsize=12)
    ax.grid(True, color="white", alpha=0.25, lw=0.6)

    bar = fig.colorbar(mesh, ax=ax, fraction=0.06, pad=0.02)
    bar_label = f"{q.label} ({q_unit})"
    if kind == C.MARGIN:
        bar_label += "\n< 0: limit fails   > 0: limit holds"
    bar.set_label(bar_label)

    none = " (none here)"
    zero_text = (f"{q.label} = 0" if kind == C.MARGIN else "limit boundary (least margin = 0)")
    handles = [
        Line2D([], [], color=_rgb(C.OUTLINE), lw=2.0, label="flight envelope"),
        Line2D([], [], color=_rgb(C.ZERO_LINE), lw=2.2, label=zero_text + ("" if zero else none)),
        Line2D([], [], color=_rgb(C.RAM_LINE), lw=2.2, ls="--",
               label="face static = ambient (p2/p0 = 1)" + ("" if ram else none)),
        Line2D([], [], color=_rgb(C.FAIL_MARK), marker="x", ls="", ms=7,
               label="a limit fails here" + ("" if failing.any() else " (nowhere)")),
        Patch(facecolor=_rgb(C.NOT_JUDGED_GREY), edgecolor="0.3", label="not judged / not defined"),
        Patch(facecolor=_rgb(C.OUTSIDE_GREY), edgecolor="0.3", label="outside the envelope"),
    ]
    legend = fig.legend(handles=handles, loc="outside lower center", ncols=3, fontsize=9, frameon=True)
    return MapFigure(fig, ax, bar, legend, kind, vmin, vmax, int(failing.sum()), int(not_judged.sum()), zero, ram)


def render_map(
    result: MapResult,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    levels: tuple[float, float] | None = None,
    *,
    units: str = SI,
    **_ignored,
) -> MapPicture:
    """Render ``quantity_key`` (a key of ``QUANTITIES``) for ``case`` (None: worst of all cases) as PNG."""
    m = map_figure(result, quantity_key, case, units=units, levels=levels)
    png = figure_png(m.figure)
    w, h = (int(round(v)) for v in m.figure.get_size_inches() * m.figure.dpi)
    q = QUANTITIES[quantity_key]
    return MapPicture(png, w, h, m.kind, m.vmin, m.vmax, m.failing_points, m.not_judged_points, quantity_key,
                      q.label, q.unit, WORST if case is None else case)


def map_png_bytes(result, quantity_key="face_mach_margin", case=None, levels=None, *, units: str = SI) -> bytes:
    """The PNG bytes of ``render_map(result, quantity_key, case, levels)``."""
    return render_map(result, quantity_key, case, levels, units=units).png


def write_map_png(
    result: MapResult,
    path,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    levels: tuple[float, float] | None = None,
    *,
    units: str = SI,
    inputs=(),
) -> MapPicture:
    """Write the map of ``quantity_key`` for ``case`` (None: worst of all cases) to ``path`` as PNG.

    Returns the ``MapPicture``. Raises KeyError for an unknown quantity or case, ``OutputIsInputError`` when
    ``path`` is one of ``inputs``, and OSError when the file cannot be written (the old file is then kept:
    ``engine_air.outputs.writer``).
    """
    from engine_air.outputs.writer import check_not_input, write_output_bytes

    check_not_input(path, inputs)
    pic = render_map(result, quantity_key, case, levels, units=units)
    write_output_bytes(path, pic.png, inputs)
    return pic


# -- sections ------------------------------------------------------------------------

def _fail_colour() -> tuple[int, int, int]:
    """The failing band of section plots: the orange arm of the margin scale."""
    return C.anchors(C.MARGIN, 9)[1][1]


@dataclass(frozen=True)
class SectionFigure:
    figure: Figure
    axes: object
    legend: object
    section: Section


def section_figure(section: Section, *, units: str = SI, project_title: str | None = None) -> SectionFigure:
    """A section plot: one line per case against Mach (values up) or against altitude (altitude up), the
    limit line, failing stretches under a broad orange band; points not judged drawn thin and dotted."""
    q = QUANTITIES[section.quantity]
    alt_unit, alt_f = altitude_scale(units)
    q_unit, q_f = quantity_scale(section.quantity, units)
    along_mach = section.axis != ALTITUDE
    _, FigureCanvasAgg, _, _, Figure, Line2D, _ = _mpl()
    fig = Figure(figsize=SECTION_SIZE_IN, dpi=DPI, layout="constrained")
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    from matplotlib import colormaps

    palette = [colormaps["tab10"](k) for k in (0, 4, 2, 8, 6, 5)]  # orange is kept for the failing band
    styles = ["-", "--", "-.", (0, (5, 1, 1, 1, 1, 1))]
    position = section.x * (1.0 if along_mach else alt_f)
    any_fail = False

    def draw(a, b, **kw):
        return ax.plot(a, b, **kw) if along_mach else ax.plot(b, a, **kw)

    for k, cs in enumerate(section.cases):
        worst = cs.case == WORST
        colour = (0, 0, 0) if worst else palette[k % len(palette)]
        style = ":" if worst else styles[k % len(styles)]
        width = 1.6 if worst else 2.2
        v = cs.values * q_f
        label = case_title(cs.case)
        n = len(v)
        for a, b in stretches(cs.failing):
            # the failing points, extended half a grid step towards finite neighbours
            at = [float(a - 0.5)] if a > 0 and np.isfinite(v[a - 1]) else []
            at += list(range(a, b + 1))
            at += [float(b + 0.5)] if b + 1 < n and np.isfinite(v[b + 1]) else []
            at = np.asarray(at, float)
            finite = np.isfinite(v)
            xs = np.interp(at, np.arange(n), position)
            ys = np.interp(at, np.flatnonzero(finite), v[finite])
            draw(xs, ys, color=_rgb(_fail_colour()), lw=9, alpha=0.45, solid_capstyle="round", zorder=1,
                 marker="o" if len(at) == 1 else None, ms=9)
            any_fail = True
        draw(position, np.where(cs.judged, v, np.nan), color=colour, lw=width, ls=style,
             label=label, zorder=4 if worst else 3)
        loose = np.where(~cs.judged & np.isfinite(v), v, np.nan)
        if np.isfinite(loose).any():
            draw(position, loose, color=colour, lw=0.9, ls=":", zorder=2)
    handles, labels = ax.get_legend_handles_labels()
    if section.limit is not None:
        lim = section.limit * q_f
        (ax.axhline if along_mach else ax.axvline)(lim, color="k", lw=1.4, ls=(0, (6, 2, 1, 2)), zorder=2)
        handles.append(Line2D([], [], color="k", lw=1.4, ls=(0, (6, 2, 1, 2))))
        labels.append("margin = 0 (the limit)" if section.kind == C.MARGIN else f"limit {lim:g}")
    handles.append(Line2D([], [], color=_rgb(_fail_colour()), lw=9, alpha=0.45))
    labels.append("limit fails" + ("" if any_fail else " (nowhere on this cut)"))
    handles.append(Line2D([], [], color="0.3", lw=0.9, ls=":"))
    labels.append("not judged")
    value_label = f"{q.label} ({q_unit})"
    if along_mach:
        ax.set_xlabel("Flight Mach number M0")
        ax.set_ylabel(value_label)
        where = f"at {section.at * alt_f:,.{1 if alt_unit == 'km' else 0}f} {alt_unit}"
        title = f"{q.label} against flight Mach number {where}"
    else:
        ax.set_xlabel(value_label)
        ax.set_ylabel(f"Pressure altitude ({alt_unit})")
        _altitude_ticks(ax.yaxis, alt_unit)
        title = f"{q.label} against altitude at Mach {section.at:.3g}"
    sub = short(project_title or "")
    ax.set_title(title + (f"\n{sub}" if sub else ""), fontsize=12)
    ax.grid(True, alpha=0.3)
    legend = fig.legend(handles, labels, loc="outside lower center", ncols=3, fontsize=9)
    return SectionFigure(fig, ax, legend, section)


def write_section_png(section: Section, path, *, units: str = SI, project_title: str | None = None,
                      inputs=()) -> bytes:
    """Write a section plot to ``path`` (whole or not at all, never over one of ``inputs``); returns the PNG."""
    from engine_air.outputs.writer import check_not_input, write_output_bytes

    check_not_input(path, inputs)
    png = figure_png(section_figure(section, units=units, project_title=project_title).figure)
    write_output_bytes(path, png, inputs)
    return png


def section_png_bytes(result: MapResult, quantity_key: str, *, altitude_m=None, mach=None, units: str = SI,
                      cases=None) -> bytes:
    """PNG bytes of the section of ``quantity_key`` at ``altitude_m`` (along Mach) or ``mach`` (along altitude)."""
    sec = cut(result, quantity_key, altitude_m=altitude_m, mach=mach, cases=cases)
    return figure_png(section_figure(sec, units=units, project_title=result.project.title).figure)


def quantity_kind(quantity_key: str) -> str:
    """``"margin"`` or ``"level"``; KeyError for a key that is not a map quantity."""
    return QUANTITIES[quantity_key].kind


__all__ = [
    "MapFigure", "MapPicture", "SectionFigure", "altitude_scale", "check_of", "figure_png", "map_figure",
    "map_png_bytes", "quantity_kind", "quantity_scale", "render_map", "section_figure", "section_png_bytes",
    "write_map_png", "write_section_png",
]
