"""The verdict banner above the map: every limit holds, some fail, computing, or out of date."""

from __future__ import annotations

import html

from PySide6.QtCore import Qt
from PySide6.QtGui import QFont, QFontMetrics
from PySide6.QtWidgets import QLabel

from .. import style
from ..views import analysis

STATES = ("holds", "fails", "busy", "stale")


def _line_height(pt: float, bold: bool = False) -> int:
    """One line of the banner's type at ``pt`` points (its font's line spacing)."""
    font = QFont()
    font.setPointSizeF(pt)
    font.setBold(bold)
    return QFontMetrics(font).lineSpacing()


class VerdictBanner(QLabel):
    """A two-line banner (white on a coloured field) whose height follows the last verdict's lines.

    ``state`` is one of ``STATES``. The height is set from the last non-busy text only, so the
    "Computing…" between two results never resizes (and repaints) the map.
    """

    def __init__(self, parent=None) -> None:
        super().__init__("Computing…", parent)
        self.setObjectName("verdict")
        self.setAlignment(Qt.AlignCenter)
        self.setWordWrap(True)
        self.setTextFormat(Qt.RichText)
        self.state = "busy"
        self.presentation = False
        self.small_window = False  # presentation mode's smaller type (``style.compact``)
        self._sized_text = ""  # the last result's (or error's) text: the height is kept for it

    def set_presentation(self, on: bool, small_window: bool = False) -> None:
        self.presentation = bool(on)
        self.small_window = bool(small_window)
        self.fit_height()

    def show_state(self, state: str, text: str) -> None:
        colour = {"holds": style.HOLDS_BG, "fails": style.FAILS_BG, "busy": style.BUSY_BG,
                  "stale": style.STALE_BG}[state]
        self.state = state
        self.setText(text)
        if state != "busy":
            self._sized_text = text
            self.fit_height()
        css = f"background: {colour};"
        if self.styleSheet() != css:  # restyling costs a few ms: only on a change of colour
            self.setStyleSheet(css)

    def show_result(self, result) -> None:
        self.show_state(*self.verdict_for(result))

    def verdict_for(self, result) -> tuple[str, str]:
        """("holds" or "fails", the banner's two lines as rich text) for a ``MapResult``; a limit judged at no
        envelope point is named apart and not counted among those that hold."""
        failing, total = analysis.failing_count(result)
        n_cases = len(result.cases)
        small = style.presentation_pt(self.small_window) + 3 if self.presentation else style.BASE_PT + 1
        over = f"whole envelope, {n_cases} case{'s' if n_cases != 1 else ''}"
        unjudged = [s for s in result.summary if s.holds is None]  # outside their regions everywhere (§15)
        if unjudged:
            over += "; not judged anywhere: " + ", ".join(html.escape(s.label) for s in unjudged)
        if failing == 0:
            head = f"✔  ALL {total} LIMITS HOLD" if total else "NO LIMIT IS JUDGED ANYWHERE"
            return "holds", (f"{head}<br><span style='font-size:{small}pt; font-weight:normal'>{over}</span>")
        names = "; ".join(html.escape(s.label) for s in result.summary if s.holds is False)
        return "fails", (f"✖  {failing} OF {total} LIMITS FAIL<br><span style='font-size:{small}pt; "
                         f"font-weight:normal'>{names} — {over}</span>")

    def fit_height(self) -> None:
        """Room for two lines of banner text, or more when the last verdict wraps to more at this width."""
        big = style.banner_pt(self.presentation, self.small_window)
        small = style.presentation_pt(self.small_window) + 3 if self.presentation else style.BASE_PT + 1
        pad = 10 if self.presentation else 6
        height = _line_height(big, bold=True) + _line_height(small) + 2 * pad + 12  # 12: the text's margins
        if self._sized_text and self.width() > 0:
            shown = self.text()
            if shown != self._sized_text:
                self.setText(self._sized_text)
            height = max(height, self.heightForWidth(self.width()))
            if shown != self._sized_text:
                self.setText(shown)
        if self.height() != height or self.minimumHeight() != height:
            self.setFixedHeight(height)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().resizeEvent(event)
        if event.size().width() != event.oldSize().width():
            self.fit_height()
