"""Pictures without Qt, drawn with matplotlib (Agg): envelope maps and section plots as PNG files.

Maps (``map_figure``, ``render_map``, ``write_map_png``): one quantity of an
envelope evaluation (``engine_air.envelope.evaluate.MapResult``) for one case,
or the worst of the evaluated cases when ``case`` is None (the only case when
one was evaluated), over flight Mach number (x) and pressure altitude (y: km in
SI, ft in US units); ``default_quantity(result)`` is the one shown when none is
asked for (the least margin when a limit fails, else the face Mach margin), with

- a title naming the quantity and the case shown (and the project), wrapped to fit;
- a colour bar labelled with the quantity and its unit. Margins use the
  diverging scale centred on zero (orange where the limit fails, blue where it
  holds), levels the sequential one (``engine_air.outputs.colours``, the same
  scales as the program);
- points where the quantity is not judged (not defined, or its check does not
  apply there) in neutral grey, points outside the envelope in light grey;
- the envelope outline, an ``x`` where the limit of the quantity shown fails
  (any limit's for the least margin and for a quantity no limit judges; thinned
  to a regular pattern when dense), the margin = 0 line (of the quantity shown, or of the
  least relative margin over all limits for a level quantity) and the dashed
  face static = ambient line (p2/p0 = 1), each named in a legend below;
- for a quantity defined nowhere (e.g. the installation loss without thrust
  data) no colour bar, and the reason written on the picture.

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
MAP_SIZE_IN = (9.6, 6.8)  # 960 x 680 px: a map picture is at least 900 x 600 px
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
    check: str | None = None  # the check whose failures are marked and counted (None: any limit's)
    note: str = ""  # written on the picture instead of a colour scale: why the quantity is defined nowhere

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
    case: str = ""  # the case shown (WORST for the worst of the evaluated cases)
    check: str | None = None  # the check whose failures are marked and counted (None: any limit's)
    note: str = ""  # written on the picture instead of a colour scale (a quantity defined nowhere)


def default_quantity(result: MapResult) -> str:
    """The quantity a map shows when none is asked for, as in the program: the least relative margin over every
    limit (``worst_relative_margin``) when some limit fails (it shows where, whichever limit it is), else the face
    Mach margin."""
    if result.summary and not result.holds:
        return "worst_relative_margin"
    return "face_mach_margin"


def shown_case(result: MapResult, case: str | None) -> str:
    """The case a map of ``case`` shows: the named one; for None (or WORST) the worst of the evaluated cases, or
    the only one when a single case was evaluated (``--case NAME``)."""
    if case not in (None, WORST):
        result.case_map(case)  # KeyError for an unknown case
        return case
    return result.cases[0].name if len(result.cases) == 1 else WORST


def map_case_title(result: MapResult, case: str) -> str:
    """The case named in a map's title: "case “A”", "worst of all cases", or "worst of cases “A”, “B”" when only
    some of the project's cases were evaluated."""
    if case != WORST:
        return case_title(case)
    names = [c.name for c in result.cases]
    if len(names) < len(result.project.cases):
        return "worst of cases " + ", ".join(f"“{short(n, 30)}”" for n in names)
    return case_title(WORST)


TITLE_CHARS = 72
"""Characters per title line of a map or section (12 pt on the figure's width); longer titles wrap, at most three
lines."""


def fitted_title(*parts: str, width: int = TITLE_CHARS) -> str:
    """``parts`` one per line, each wrapped to ``width`` characters, three lines at most (the last cut with an
    ellipsis): a title that fits its figure whatever the names."""
    import textwrap

    lines: list[str] = []
    for part in parts:
        if part:
            lines += textwrap.wrap(" ".join(str(part).split()), width, break_long_words=True) or [""]
    if len(lines) > 3:
        lines = lines[:3]
        lines[2] = short(lines[2] + " …", width)
    return "\n".join(lines)


THRUST_KEYS = ("net_thrust_n", "installed_thrust_n", "installation_loss_fraction")
"""Quantities that need the rating's thrust table (method §13)."""


def missing_reason(result: MapResult, quantity_key: str, case: str) -> str:
    """Why ``quantity_key`` is not defined at any envelope point of ``case``."""
    from engine_air.envelope import flags as F

    q = QUANTITIES[quantity_key]
    bits = np.asarray(result.flags(case))[np.asarray(result.inside, bool)]
    if quantity_key in THRUST_KEYS and bits.size and np.all(bits & F.NO_THRUST_DATA):
        what = "installation loss" if quantity_key == "installation_loss_fraction" else q.label.lower()
        return f"no thrust data: {what} is not computed"
    if quantity_key in ("started", "self_start_contraction", "internal_contraction_ratio"):
        return f"{q.label}: defined for a mixed-compression inlet only"
    if quantity_key in ("dc60", "remaining_surge_margin"):
        return (f"{q.label}: needs a characteristics table with distortion columns (method 17-18); "
                "defined only where its data decide")
    return f"{q.label}: not defined at any point of the envelope"


@dataclass(frozen=True)
class _MapData:
    quantity: object
    name: str
    kind: str
    x: np.ndarray
    y: np.ndarray
    alt_unit: str
    q_unit: str
    q_factor: float
    shown: np.ndarray
    not_judged: np.ndarray
    failing: np.ndarray
    check: str | None
    vmin: float
    vmax: float


def _map_data(result, quantity_key, case, units, levels) -> _MapData:
    q = QUANTITIES[quantity_key]
    name = shown_case(result, case)
    alt_unit, alt_f = altitude_scale(units)
    q_unit, q_f = quantity_scale(quantity_key, units)
    values = np.asarray(result.quantity(name, quantity_key), float)
    # judged: inside the envelope and the case's region, defined, and where the quantity's own check applies (e.g.
    # "started" only in supersonic flight)
    judged = judged_map(result, name, quantity_key) & result.judged(name)
    shown = np.where(judged, values, np.nan)
    check = check_of(result, quantity_key)
    # the marks and counts are the failures of the quantity shown (its own check); any limit's for the least margin
    # and for a quantity no check judges
    failing = (result.failing(name, check) & judged if check is not None else result.failing(name)) & result.inside
    if levels is None:
        levels = C.levels_for(q.kind, shown)
    vmin, vmax = float(levels[0]), float(levels[1])
    if not (math.isfinite(vmin) and math.isfinite(vmax)) or vmax <= vmin:
        vmin, vmax = C.levels_for(q.kind, np.array([vmin, vmax]))
    return _MapData(q, name, q.kind, np.asarray(result.mach, float), np.asarray(result.altitude_m, float) * alt_f,
                    alt_unit, q_unit, q_f, shown, result.inside & ~judged, failing, check, vmin, vmax)


def _map_lines(ax, result, d: _MapData, alt_f: float) -> tuple[bool, bool]:
    """The envelope outline, the zero-margin line and the face static = ambient line; (zero drawn, ram drawn)."""
    env = result.project.envelope
    ex = np.array(list(env.mach) + [env.mach[0]], float)
    ey = np.array(list(env.altitude_m) + [env.altitude_m[0]], float) * alt_f
    ax.plot(ex, ey, color=_rgb(C.OUTLINE), lw=2.0, zorder=4)
    zero_field = d.shown if d.kind == C.MARGIN else least_relative_margin(result, d.name)
    zero = _contour(ax, d.x, d.y, zero_field, 0.0, colors=[_rgb(C.ZERO_LINE)], linewidths=2.2, halo=5, zorder=5)
    ratio = np.asarray(result.quantity(d.name, "face_static_to_ambient"), float)
    ram = _contour(ax, d.x, d.y, ratio, 1.0, colors=[_rgb(C.RAM_LINE)], linewidths=2.2, linestyles="--",
                   halo=4.5, zorder=5)
    return zero, ram


def _fail_label(result, d: _MapData) -> str:
    if d.check is None:
        return "some limit fails here"
    label = next((c.label for c in result.cases[0].points.checks if c.name == d.check), d.check)
    return f"{label}: fails here"


def _map_legend(fig, result, d: _MapData, zero: bool, ram: bool, empty: bool):
    _, _, _, _, _, Line2D, Patch = _mpl()
    none = " (none here)"
    zero_text = (f"{d.quantity.label} = 0" if d.kind == C.MARGIN else "limit boundary (least margin = 0)")
    handles = [
        Line2D([], [], color=_rgb(C.OUTLINE), lw=2.0, label="flight envelope"),
        Line2D([], [], color=_rgb(C.ZERO_LINE), lw=2.2, label=zero_text + ("" if zero else none)),
        Line2D([], [], color=_rgb(C.RAM_LINE), lw=2.2, ls="--",
               label="face static = ambient (p2/p0 = 1)" + ("" if ram else none)),
        Line2D([], [], color=_rgb(C.FAIL_MARK), marker="x", ls="", ms=7,
               label=_fail_label(result, d) + ("" if d.failing.any() else " (nowhere)")),
        Patch(facecolor=_rgb(C.NOT_JUDGED_GREY), edgecolor="0.3",
              label="not defined here" if empty else "not judged / not defined"),
        Patch(facecolor=_rgb(C.OUTSIDE_GREY), edgecolor="0.3", label="outside the envelope"),
    ]
    return fig.legend(handles=handles, loc="outside lower center", ncols=3, fontsize=9, frameon=True)


def map_figure(
    result: MapResult,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    *,
    units: str = SI,
    levels: tuple[float, float] | None = None,
    project_title: str | None = None,
) -> MapFigure:
    """Build the map of ``quantity_key`` for ``case`` (None: the worst of the evaluated cases, or the only one).

    A quantity defined nowhere in the envelope (e.g. the installation loss of a rating without thrust data) is
    drawn grey with the reason written on the picture and no colour bar. KeyError for an unknown quantity or
    case; ValueError for unknown ``units``.
    """
    d = _map_data(result, quantity_key, case, units, levels)
    _, alt_f = altitude_scale(units)
    _, FigureCanvasAgg, ListedColormap, Normalize, Figure, _, _ = _mpl()
    fig = Figure(figsize=MAP_SIZE_IN, dpi=DPI, layout="constrained")
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    ax.set_facecolor(_rgb(C.OUTSIDE_GREY))
    xe, ye = _edges(d.x), _edges(d.y)
    grey = np.where(d.not_judged, 1.0, np.nan)
    ax.pcolormesh(xe, ye, np.ma.masked_invalid(grey), cmap=ListedColormap([_rgb(C.NOT_JUDGED_GREY)]),
                  vmin=0, vmax=2, shading="flat", rasterized=True)
    empty = not np.isfinite(d.shown).any()
    mesh = ax.pcolormesh(xe, ye, np.ma.masked_invalid(d.shown * d.q_factor), cmap=C.matplotlib_colormap(d.kind),
                         norm=Normalize(d.vmin * d.q_factor, d.vmax * d.q_factor), shading="flat", rasterized=True)
    zero, ram = _map_lines(ax, result, d, alt_f)
    ii, jj = marked_points(d.failing)
    ax.scatter(d.x[jj], d.y[ii], marker="x", s=22, c=[_rgb(C.FAIL_MARK)], linewidths=1.1, zorder=6)
    ax.set_xlim(xe[0], xe[-1])
    ax.set_ylim(ye[0], ye[-1])
    _altitude_ticks(ax.yaxis, d.alt_unit)
    ax.set_xlabel("Flight Mach number M0")
    ax.set_ylabel(f"Pressure altitude ({d.alt_unit})")
    sub = project_title if project_title is not None else (result.project.title or "")
    ax.set_title(fitted_title(f"{d.quantity.label} — {map_case_title(result, d.name)}", sub), fontsize=12)
    ax.grid(True, color="white", alpha=0.25, lw=0.6)
    bar, note = None, ""
    if empty:
        note = missing_reason(result, quantity_key, d.name)
        ax.text(0.5, 0.5, fitted_title(note, width=48),
                transform=ax.transAxes, ha="center", va="center", fontsize=14, zorder=7,
                bbox=dict(boxstyle="round,pad=0.6", facecolor="white", edgecolor="0.3"))
    else:
        bar = fig.colorbar(mesh, ax=ax, fraction=0.06, pad=0.02)
        bar_label = f"{d.quantity.label} ({d.q_unit})"
        if d.kind == C.MARGIN:
            bar_label += "\n< 0: limit fails   > 0: limit holds"
        bar.set_label(bar_label)
    legend = _map_legend(fig, result, d, zero, ram, empty)
    return MapFigure(fig, ax, bar, legend, d.kind, d.vmin, d.vmax, int(d.failing.sum()), int(d.not_judged.sum()),
                     zero, ram, d.name, d.check, note)


def render_map(
    result: MapResult,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    levels: tuple[float, float] | None = None,
    *,
    units: str = SI,
    **_ignored,
) -> MapPicture:
    """Render ``quantity_key`` (a key of ``QUANTITIES``) for ``case`` (None: the worst of the evaluated cases, or
    the only one) as PNG."""
    return picture_of(map_figure(result, quantity_key, case, units=units, levels=levels), quantity_key)


def picture_of(m: MapFigure, quantity_key: str) -> MapPicture:
    """The ``MapPicture`` (PNG bytes and what they show) of a map figure."""
    png = figure_png(m.figure)
    w, h = (int(round(v)) for v in m.figure.get_size_inches() * m.figure.dpi)
    q = QUANTITIES[quantity_key]
    return MapPicture(png, w, h, m.kind, m.vmin, m.vmax, m.failing_points, m.not_judged_points, quantity_key,
                      q.label, q.unit, m.case, m.check, m.note)


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
    """Write the map of ``quantity_key`` for ``case`` (None: the worst of the evaluated cases, or the only one) to
    ``path`` as PNG (960 x 680 px).

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
    ax.set_title(fitted_title(title, project_title or ""), fontsize=12)
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
    "MapFigure", "MapPicture", "SectionFigure", "THRUST_KEYS", "altitude_scale", "check_of", "default_quantity",
    "figure_png", "fitted_title", "map_case_title", "map_figure", "map_png_bytes", "missing_reason", "picture_of",
    "quantity_kind", "quantity_scale", "render_map", "section_figure", "section_png_bytes", "shown_case",
    "write_map_png", "write_section_png",
]
