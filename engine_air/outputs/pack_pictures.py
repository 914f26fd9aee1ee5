"""The review pack's pictures and its PDF: maps per case and quantity, sections through each limit's own worst point.

- ``pack_quantities(result)``: the quantities mapped by default: when some limit
  fails, the least margin over every limit, then the own quantity of each failing
  limit (e.g. ``started``, ``installation_loss_fraction``), then ``PACK_QUANTITIES``.
- ``write_maps``: every case (and the worst of all cases) of every quantity, as
  ``maps/<stem>__<quantity>.png``; the caption counts the failures of the quantity
  shown (its own limit's; any limit's on the least-margin map).
- ``write_sections``: for each limit judged somewhere, its own quantity (the least
  margin for a limit without one) against Mach and against altitude through that
  limit's own worst point, as ``sections/<check>__along-mach.png`` and
  ``..__along-altitude.png``.
- ``Book``: the same pictures (the PNG images, each on a page of its own size, so
  nothing is drawn twice), after text pages with the verdict, the findings and the
  tables at the worst point, as one PDF (matplotlib's multi-page ``PdfPages``).
"""

from __future__ import annotations

import base64
import html
import io
from dataclasses import dataclass
from typing import Callable

import numpy as np

from engine_air.envelope.evaluate import WORST, Cancelled
from engine_air.outputs.pictures import figure_png, map_figure, picture_of, section_figure, short
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.sections import check_of, cut

PACK_QUANTITIES = ("face_mach_margin", "recovery", "spillage_fraction", "throat_mach")
"""Quantities always mapped in a pack by default (after the failing limits' own)."""
LEAST_MARGIN = "worst_relative_margin"

e = html.escape


def limit_quantity(result, check: str) -> str | None:
    """The map quantity that the check ``check`` judges (its own quantity), or None (e.g. the buzz check)."""
    return next((k for k in QUANTITIES if check_of(result, k) == check), None)


def pack_quantities(result) -> tuple[str, ...]:
    """The quantities a pack maps by default (see the module text)."""
    keys: list[str] = []
    if result.summary and not result.holds:
        keys.append(LEAST_MARGIN)
        for s in result.summary:
            own = limit_quantity(result, s.name) if s.fails else None
            if own is not None and own not in keys:
                keys.append(own)
    return tuple(keys + [k for k in PACK_QUANTITIES if k not in keys])


@dataclass
class Steps:
    """Progress (a fraction of ``total`` steps) and cancellation of a pack being written."""

    total: int
    progress: Callable[[float], None] | None = None
    cancelled: Callable[[], bool] | None = None
    done: int = 0

    def check(self) -> None:
        if self.cancelled is not None and self.cancelled():
            raise Cancelled()

    def tick(self, finished: bool = False) -> None:
        self.done = self.total if finished else self.done + 1
        if self.progress is not None:
            self.progress(min(1.0, self.done / max(self.total, 1)))


class Book:
    """The pack as one PDF: text pages, then every picture, in matplotlib's multi-page PDF backend."""

    PAGE_IN = (11.69, 8.27)  # A4 landscape
    LINES = 52
    CHARS = 150

    def __init__(self, title: str) -> None:
        from matplotlib.backends.backend_pdf import PdfPages

        self.buffer = io.BytesIO()
        self.pdf = PdfPages(self.buffer, metadata={"Title": f"Review pack: {title}", "Creator": "engine-air",
                                                   "Producer": "engine-air (matplotlib)"})

    def add(self, figure) -> None:
        self.pdf.savefig(figure)

    def picture(self, png: bytes, dpi: float = 100.0) -> None:
        """A page holding the picture ``png`` at its own size (the PNG already drawn: nothing is drawn twice)."""
        from matplotlib import image
        from matplotlib.figure import Figure

        pixels = image.imread(io.BytesIO(png), format="png")
        height, width = pixels.shape[:2]
        fig = Figure(figsize=(width / dpi, height / dpi), dpi=dpi)
        fig.figimage(pixels, resize=False)
        self.pdf.savefig(fig, dpi=dpi)

    def text(self, lines: list[str]) -> None:
        """``lines`` (plain text, wrapped to the page) on as many pages as they need."""
        import textwrap

        from matplotlib.figure import Figure

        wrapped: list[str] = []
        for line in lines:
            indent = " " * (len(line) - len(line.lstrip(" ")))
            wrapped += textwrap.wrap(line, self.CHARS, subsequent_indent=indent + "  ") or [""]
        for start in range(0, max(len(wrapped), 1), self.LINES):
            fig = Figure(figsize=self.PAGE_IN)
            fig.text(0.04, 0.96, "\n".join(wrapped[start:start + self.LINES]), va="top", ha="left",
                     family="DejaVu Sans Mono", fontsize=7.6, linespacing=1.35)
            self.add(fig)

    def close(self) -> bytes:
        self.pdf.close()
        return self.buffer.getvalue()


def _figure_html(fig_id: str, alt: str, png: bytes, caption: str, size: tuple[int, int] | None = None) -> str:
    data = base64.b64encode(png).decode("ascii")
    wh = f' width="{size[0]}" height="{size[1]}"' if size else ""
    return (f'<figure id="{e(fig_id)}"><img alt="{e(alt)}"{wh} src="data:image/png;base64,{data}">'
            f"<figcaption>{caption}</figcaption></figure>")


def _map_caption(result, pic, quantity, case: str, name: str) -> str:
    if pic.check is not None:
        label = next((c.label for c in result.cases[0].points.checks if c.name == pic.check), pic.check)
        what = f"where the limit “{label}” fails"
    else:
        what = "where some limit fails"
    fails = (f"{pic.failing_points} points {what} (x marks)" if pic.failing_points else f"no point {what}")
    if pic.note:
        scale = f"Not coloured: {e(pic.note)}; neutral grey where not defined, light grey outside the envelope"
    else:
        kind = ("diverging, centred on zero: orange where the limit fails, blue where it holds"
                if pic.kind == "margin" else "sequential")
        scale = (f"Colour scale {e(kind)}, from {e(f'{pic.vmin:.4g}')} to {e(f'{pic.vmax:.4g}')}; neutral grey "
                 "where not judged, light grey outside the envelope")
    return (f"<b>{e(quantity.label)}</b> ({e(quantity.description)}), case <b>{e(case)}</b>. {scale}; "
            f"{e(fails)}. File: <code>maps/{e(name)}</code>.")


def write_maps(out, result, quantities, cases, stems, units, book: Book, steps: Steps):
    """Every map picture; returns (paths, relative names written, HTML per quantity)."""
    paths, written, parts = [], [], {}
    for q in quantities:
        quantity = QUANTITIES[q]
        row = []
        for case in cases:
            steps.check()
            m = map_figure(result, q, None if case == WORST else case, units=units)
            pic = picture_of(m, q)
            book.picture(pic.png)
            name = f"{stems[case]}__{q}.png"
            paths.append(out.write(f"maps/{name}", pic.png))
            written.append(f"maps/{name}")
            row.append(_figure_html(f"map-{stems[case]}-{q}", f"{quantity.label}, {short(case)}", pic.png,
                                    _map_caption(result, pic, quantity, case, name), (pic.width, pic.height)))
            steps.tick()
        parts[q] = f"<h3>{e(quantity.label)}</h3><div class=\"maps\">{''.join(row)}</div>"
    return paths, written, "".join(parts[q] for q in quantities)


@dataclass(frozen=True)
class SectionTarget:
    """One pair of sections: ``quantity`` through (``mach``, ``altitude_m``), for limit ``check`` (or None)."""

    tag: str  # file-name stem: the check's name, or the quantity's when no check is judged anywhere
    quantity: str
    mach: float
    altitude_m: float
    title: str  # what the cut is through, in words


def section_targets(result, quantities) -> list[SectionTarget]:
    """Each limit judged somewhere: its own quantity through its own worst point; when no limit is judged anywhere,
    the mapped quantities through the middle of the grid."""
    out = []
    for s in result.summary:
        if not s.worst_case or not np.isfinite(s.worst_mach):
            continue
        q = limit_quantity(result, s.name) or LEAST_MARGIN
        out.append(SectionTarget(s.name, q, s.worst_mach, s.worst_altitude_m,
                                 f"{s.label}: through its worst point, Mach {s.worst_mach:.3f}, "
                                 f"{s.worst_altitude_m:.0f} m, case {s.worst_case}"))
    if out:
        return out
    mach = float(result.mach[len(result.mach) // 2])
    alt = float(result.altitude_m[len(result.altitude_m) // 2])
    return [SectionTarget(q, q, mach, alt, "through the middle of the grid (no check applies anywhere)")
            for q in quantities]


def write_sections(out, project, result, targets, cases, units, book: Book, steps: Steps):
    """The section pictures of ``targets``; returns (paths, relative names written, HTML)."""
    paths, written, parts = [], [], []
    for t in targets:
        quantity = QUANTITIES[t.quantity]
        row = []
        for tag, kw in (("along-mach", {"altitude_m": t.altitude_m}), ("along-altitude", {"mach": t.mach})):
            steps.check()
            sec = cut(result, t.quantity, cases=cases, **kw)
            fig = section_figure(sec, units=units, project_title=project.title).figure
            png = figure_png(fig)
            book.picture(png)
            name = f"{t.tag}__{tag}.png"
            paths.append(out.write(f"sections/{name}", png))
            written.append(f"sections/{name}")
            cut_text = (f"against flight Mach number at {sec.at:.0f} m" if tag == "along-mach"
                        else f"against altitude at Mach {sec.at:.3f}")
            row.append(_figure_html(
                f"section-{t.tag}-{tag}", f"{quantity.label} {cut_text}", png,
                f"<b>{e(quantity.label)}</b> {e(cut_text)}, every case; the limit as a dash-dot line, failing "
                f"stretches under a broad orange band. File: <code>sections/{e(name)}</code>."))
            steps.tick()
        parts.append(f"<h3>{e(t.title)}</h3><div class=\"maps\">{''.join(row)}</div>")
    return paths, written, "".join(parts)


__all__ = ["Book", "LEAST_MARGIN", "PACK_QUANTITIES", "SectionTarget", "Steps", "limit_quantity", "pack_quantities",
           "section_targets", "write_maps", "write_sections"]
