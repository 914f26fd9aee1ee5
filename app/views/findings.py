"""The review findings: each limit, whether it holds over the envelope, the worst value and where.

Activating (clicking) a finding emits ``findingActivated(LimitSummary)``; the
main window then selects that finding's worst point on the map, switching to
its case when needed.
"""

from __future__ import annotations

import math

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import QAbstractItemView, QHeaderView, QTreeWidget, QTreeWidgetItem

from ..units import US, Units, group_digits

COLUMNS = ["Limit", "Rule", "Verdict", "Worst value", "Worst margin", "Where (worst)", "Failing share"]


def where_text(s, units: Units) -> str:
    if not math.isfinite(s.worst_mach):
        return "not judged anywhere"
    alt = units.to_display("altitude", s.worst_altitude_m)
    return f"M0 {s.worst_mach:.3f}, {group_digits(alt)} {units.label('altitude')}, {s.worst_case}"


def mechanisms(result, units: Units | None = None) -> list[str]:
    """Per finding of ``result.summary``: what drives that limit at its own worst point
    (``engine_air.envelope.explain.finding_mechanism``), flows, areas and forces in ``units``."""
    from engine_air.envelope.explain import finding_mechanism

    system = "us" if units is not None and units.system == US else "si"
    return [finding_mechanism(result.project, result, s, system)[2] for s in result.summary]


def finding_lines(summary, units: Units, mechanism_texts=None) -> list[str]:
    """The findings as plain text lines (for export and the clipboard); with ``mechanism_texts`` (one per
    finding, e.g. ``mechanisms(result)``) each line ends with its own mechanism."""
    lines = []
    for k, s in enumerate(summary):
        verdict = s.verdict
        value = "—" if not math.isfinite(s.worst_value) else f"{s.worst_value:.4g}"
        margin = "—" if not math.isfinite(s.worst_margin) else f"{s.worst_margin:+.4g}"
        line = (f"{s.label} [{s.limit_text}]: {verdict}; worst value {value} (margin {margin}) at "
                f"{where_text(s, units)}; fails at {100 * s.failing_share:.1f} % of envelope points")
        if not s.judged:
            line = f"{s.label} [{s.limit_text}]: {verdict} (judged at no envelope point)"
        if mechanism_texts is not None and k < len(mechanism_texts) and mechanism_texts[k]:
            line += f"; mechanism: {mechanism_texts[k]}"
        lines.append(line)
    return lines


class FindingsList(QTreeWidget):
    findingActivated = Signal(object)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setColumnCount(len(COLUMNS))
        self.setHeaderLabels(COLUMNS)
        self.setRootIsDecorated(False)
        self.setUniformRowHeights(True)
        self.setSelectionMode(QAbstractItemView.SingleSelection)
        self.header().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.header().setStretchLastSection(True)
        self._summary = []
        self._units = Units()
        self.itemClicked.connect(self._on_clicked)
        self.itemActivated.connect(self._on_clicked)

    def set_summary(self, summary, units: Units, mechanism_texts=None) -> None:
        """Show ``summary``; ``mechanism_texts`` (one per finding) become each row's tooltip."""
        self._summary = list(summary)
        self._units = units
        self.clear()
        for k, s in enumerate(self._summary):
            value = "—" if not math.isfinite(s.worst_value) else f"{s.worst_value:.4g}"
            margin = "—" if not math.isfinite(s.worst_margin) else f"{s.worst_margin:+.4g}"
            share = f"{100 * s.failing_share:.1f} %" if s.judged else "—"
            item = QTreeWidgetItem([s.label, s.limit_text, s.verdict, value, margin, where_text(s, units), share])
            item.setData(0, Qt.UserRole, k)
            if mechanism_texts is not None and k < len(mechanism_texts):
                for col in range(1, len(COLUMNS)):
                    item.setToolTip(col, mechanism_texts[k])
            if not s.judged:
                f = item.font(2)
                f.setItalic(True)
                item.setFont(2, f)
                item.setForeground(2, Qt.darkGray)
                item.setToolTip(2, "Judged at no envelope point (outside its region, limits.region, or where the "
                                   "check never applies): neither holding nor failing")
            if s.fails:
                f = item.font(2)
                f.setBold(True)
                item.setFont(2, f)
                item.setFont(0, f)
                item.setBackground(2, Qt.black)
                item.setForeground(2, Qt.white)
                item.setToolTip(0, "Click to select the worst point on the map")
            self.addTopLevelItem(item)

    def summary(self):
        return list(self._summary)

    def activate_row(self, row: int) -> None:
        """Programmatic click on finding ``row``."""
        self._on_clicked(self.topLevelItem(row), 0)

    def _on_clicked(self, item, _column=0) -> None:
        if item is None:
            return
        s = self._summary[item.data(0, Qt.UserRole)]
        if math.isfinite(s.worst_mach):
            self.findingActivated.emit(s)
