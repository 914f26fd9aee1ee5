"""The map's legend (every line and marker named, optional entries added only when the map needs them) and the
fitting of the legend and the title to the map's width.

``MapLegend`` is a part of ``EnvelopeMap`` (``app.views.map_view``).
"""

from __future__ import annotations

import html

import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtGui import QFont, QFontMetrics

from engine_air.outputs.quantities import QUANTITIES

from .colour_maps import NOT_JUDGED_GREY
from .map_overlays import (DATA_COLOUR, HATCH, LEAST_MARGIN, OUTSIDE_GREY, START_COLOUR, UNSTART_COLOUR,
                           UNSTARTED_COLOUR)


def limiting_text(labels: list[str], line_chars: int = 70) -> str:
    """The legend's "limiting: A / B / C" (rich text), broken between checks into lines of about
    ``line_chars`` characters."""
    parts = [html.escape(x) for x in labels] or ["nothing judged"]
    lines, line = [], "limiting:"
    for k, part in enumerate(parts):
        piece = part + (" /" if k < len(parts) - 1 else "")
        if len(line) + 1 + len(piece) > line_chars and line != "limiting:":
            lines.append(line)
            line = piece
        else:
            line = f"{line} {piece}"
    lines.append(line)
    return "<br>".join(lines)


class MapLegend:
    """Legend entries and the title's and legend's fit to the width (mixed into ``EnvelopeMap``)."""

    def _build_legend(self) -> None:
        """Legend entries are made once (clearing a legend is unsafe with some Qt bindings); texts update."""
        self._legend_fail = pg.ScatterPlotItem(symbol="x", size=12, pen=pg.mkPen("w", width=0.8),
                                               brush=pg.mkBrush("k"))
        self._legend_sel = pg.ScatterPlotItem(symbol="o", size=16, pen=pg.mkPen("k", width=3), brush=None)
        entries = [(self.outline, "flight envelope"), (self.zero_line, "margin = 0"),
                   (self.ram_line, "face static = ambient (p2/p0 = 1)"),
                   (self._legend_fail, "a limit fails here"), (self._legend_sel, "selected point")]
        for item, text in entries:
            self.legend.addItem(item, text)
        self._legend_labels = [label for _sample, label in self.legend.items]
        self._legend_texts = [text for _item, text in entries]

    def _rebuild_legend(self, margin_shown: bool) -> None:
        none = " (none here)"
        zero = "least margin = 0" if self._key == LEAST_MARGIN else f"{QUANTITIES[self._key].label} = 0"
        self._legend_texts[1] = (zero if margin_shown
                                 else "limit boundary (least margin = 0)") + ("" if self._zero_found else none)
        self._legend_texts[2] = "face static = ambient (p2/p0 = 1)" + ("" if self._ram_found else none)
        self._legend_texts[3] = "a limit fails here" + ("" if self.fail_mark_count else " (nowhere)")
        self._sync_optional_legend(self._optional_legend(margin_shown))
        self._update_legend_text()

    def _optional_legend(self, margin_shown: bool) -> list[tuple[str, str]]:
        """(entry, text) of the legend entries this map needs beyond the fixed five."""
        out = []
        if self.not_judged_count:  # the two greys side by side, so that neither is mistaken for the other
            out.append(("not-judged", "not judged here"))
            out.append(("outside", "outside the envelope"))
        start, unstart = self.starting_machs
        if self.unstarted_count or start is not None:
            out.append(("unstarted", "unstarted (hatched)" + ("" if self.unstarted_count else " (nowhere)")))
        if start is not None:
            if unstart is not None and unstart < start:
                out.append(("self-start", f"self-start M0 {start:.3f}"))
                out.append(("unstart", f"unstart M0 {unstart:.3f}"))
                out.append(("band", "hysteresis: started only if reached from above"))
            else:
                out.append(("self-start", f"self-start = unstart M0 {start:.3f}"))
        if self.data_count is not None:
            out.append(("data", "data back the verdict here" + ("" if self.data_count else " (nowhere)")))
        if self._key == LEAST_MARGIN:  # last: it gets a row of its own across the legend (``_span_limiting``)
            out.append(("limiting", limiting_text(self.limiting_labels)))
        return out

    def _legend_sample(self, entry: str):
        samples = getattr(self, "_legend_samples", None)
        if samples is None:
            samples = self._legend_samples = {}
        if entry not in samples:
            if entry in ("outside", "not-judged", "band"):
                colour = {"outside": OUTSIDE_GREY, "not-judged": pg.mkColor(*NOT_JUDGED_GREY[:3]),
                          "band": pg.mkColor(255, 200, 0, 110)}[entry]
                item = pg.ScatterPlotItem(symbol="s", size=14, pen=pg.mkPen("#555555", width=0.8),
                                          brush=pg.mkBrush(colour))
            elif entry == "unstarted":
                item = pg.ScatterPlotItem(symbol=HATCH, size=12, pen=pg.mkPen(UNSTARTED_COLOUR, width=2.2),
                                          brush=None)
            elif entry == "self-start":
                item = pg.PlotDataItem(pen=pg.mkPen(START_COLOUR, width=3.0, style=Qt.DashLine))
            elif entry == "unstart":
                item = pg.PlotDataItem(pen=pg.mkPen(UNSTART_COLOUR, width=3.0, style=Qt.DashDotLine))
            elif entry == "data":
                item = pg.PlotDataItem(pen=pg.mkPen(DATA_COLOUR, width=3.0, style=Qt.DashLine))
            else:  # a text entry
                item = pg.PlotDataItem(pen=None)
            samples[entry] = item
        return samples[entry]

    def _sync_optional_legend(self, wanted: list[tuple[str, str]]) -> None:
        """Add or remove the optional entries (only when the set changes); texts are updated in place."""
        keys = [k for k, _t in wanted]
        if keys != getattr(self, "_optional_keys", []):
            for k in getattr(self, "_optional_keys", []):
                self.legend.removeItem(self._legend_sample(k))
            for k, text in wanted:
                self.legend.addItem(self._legend_sample(k), text)
            self._optional_keys = keys
            n = self.legend.columnCount
            self.legend.columnCount = -1
            self.legend.setColumnCount(n)  # lays every entry out again
            self._span_limiting()
            self._legend_labels = [label for _sample, label in self.legend.items]
            self._legend_shown = None
            self._legend_fit_key = None
        self._legend_texts = self._legend_texts[:5] + [t for _k, t in wanted]
        self.legend_entries = list(self._legend_texts)

    def _span_limiting(self) -> None:
        """The "limiting" entry (always the last) on a row of its own across every column, so that its checks
        take one or two lines of the legend instead of one line each in one narrow column."""
        samples = getattr(self, "_legend_samples", {})
        item = samples.get("limiting")
        pair = next(((smp, lab) for smp, lab in self.legend.items if item is not None and smp.item is item), None)
        if pair is None:
            return
        sample, label = pair
        lay = self.legend.layout
        lay.removeItem(sample)
        lay.removeItem(label)
        row = max((r for r in range(lay.rowCount()) for c in range(lay.columnCount()) if lay.itemAt(r, c)),
                  default=-1) + 1
        lay.addItem(sample, row, 0, alignment=Qt.AlignVCenter)
        lay.addItem(label, row, 1, 1, max(1, 2 * self.legend.columnCount - 1))
        self.legend.updateSize()

    def _update_legend_text(self) -> None:
        self._fit_legend()

    def _set_legend_text(self, pt: float) -> None:
        shown = (tuple(self._legend_texts), round(pt, 1))
        if shown == getattr(self, "_legend_shown", None):
            return
        self._legend_shown = shown
        for label, text in zip(self._legend_labels, self._legend_texts):
            label.setText(text, size=f"{pt:.0f}pt", color="k")


    def _fit_legend(self) -> None:
        """Five or four legend columns when the width allows (few rows leave the plot its height); in a
        narrow window the legend's type first shrinks (to 85 %, then 75 %), then it drops columns."""
        if not getattr(self, "_legend_labels", None):
            return
        room = self.canvas.width() - 30
        key = (tuple(self._legend_texts), room, self._scale)
        if key == getattr(self, "_legend_fit_key", None):
            return  # the same texts in the same room: laid out already (a new result must not re-lay it)
        self._legend_fit_key = key
        full = 11 * self._scale
        tries = [(n, f * full) for f in (1.0, 0.85) for n in (5, 4)] + [(n, 0.75 * full) for n in (5, 4, 3, 2, 1)]
        before = getattr(self, "_legend_shown", None)
        moved = False  # LegendItem.setColumnCount puts the legend at (0, 0) until the scene is laid out again
        for n, pt in tries:
            self._set_legend_text(pt)
            if self.legend.columnCount != n:
                self.legend.setColumnCount(n)
                self._span_limiting()
                moved = True
            self.legend.layout.invalidate()
            if self.legend.layout.effectiveSizeHint(Qt.MinimumSize).width() <= room:
                break
        if moved or self._legend_shown != before:
            self._schedule_canvas_fit()

    def _fit_title(self) -> None:
        """The title on one line when it fits beside the colour bar (its type shrinking to 80 % first),
        else on two (quantity / case), so a narrow window never widens the map beyond its place; the title
        row is as high as its lines."""
        parts = getattr(self, "_title_parts", None)
        if parts is None:
            return
        one = f"{parts[0]} — {parts[1]}"
        room = (self.canvas.width() - self.colour_bar.maximumWidth()
                - self.plot.getAxis("left").width() - 40)
        font = QFont()
        for factor in (1.0, 0.9, 0.8):
            font.setPointSizeF(15 * self._scale * factor)
            fm = QFontMetrics(font)
            if fm.horizontalAdvance(one) <= room:
                break
        lines = [one] if fm.horizontalAdvance(one) <= room else []
        if not lines:  # one line per part, each part wrapped at its words when it is still too wide
            for part in parts:
                line = ""
                for word in part.split(" "):
                    trial = f"{line} {word}".strip()
                    if line and fm.horizontalAdvance(trial) > room:
                        lines.append(line)
                        line = word
                    else:
                        line = trial
                lines.append(line)
        text = "<br>".join(html.escape(line) for line in lines)
        if (text, font.pointSizeF()) == getattr(self, "_title_shown", None):
            return
        self._title_shown = (text, font.pointSizeF())
        self.plot.setTitle(text, size=f"{font.pointSizeF():.1f}pt", color="#000")
        height = len(lines) * fm.lineSpacing() + 12
        self.plot.titleLabel.setMaximumHeight(height)
        self.plot.layout.setRowFixedHeight(0, height)
        self._schedule_canvas_fit()

    def _fit_bar_label(self) -> None:
        """The colour bar's label in full when it fits along the bar, else its unit alone (the title above
        the map names the quantity), so the label is never cut at the bar's ends."""
        labels = getattr(self, "_bar_labels", None)
        if labels is None:
            return
        axis = self.colour_bar.getAxis("right")
        font = QFont(axis.label.font())
        font.setPointSizeF(13 * self._scale)
        room = self.colour_bar.boundingRect().height() - 8
        text = labels[0] if QFontMetrics(font).horizontalAdvance(labels[0]) <= room else labels[1]
        if text != axis.labelText:
            axis.setLabel(text)
            axis.resizeEvent(None)  # places the new label along the bar
