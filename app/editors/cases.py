"""The "Cases" tab: case name, rating, ISA offset, the optional region where the case is judged
(``mach_range``, ``altitude_range_m``: two cells each, both blank for no bound) and the incidence (angle of attack
and sideslip, method §17: a number of degrees, blank for none; a Mach table from the file is shown as
"table: N Mach numbers" and kept unless a number is typed over it).

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtWidgets import (
    QComboBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPushButton,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from engine_air.project import schema as S
from engine_air.project.model import Case

from .fields import tooltip

from .widgets import CellError, cell_number, cell_si, make_table, number_item, range_cells


REGION_HEADERS = ("M0 from", "M0 to", "H from", "H to")
INCIDENCE_HEADERS = ("α (deg)", "β (deg)")
INCIDENCE_KEYS = ("angle_of_attack_deg", "sideslip_deg")


def incidence_text(value) -> str:
    """A case's incidence as the cell shows it: blank (none), the number, or "table: N Mach numbers"."""
    if value is None:
        return ""
    if isinstance(value, tuple):
        return f"table: {len(value[0])} Mach numbers"
    return f"{float(value):g}"


def incidence_cell(table, row: int, col: int, old, what: str):
    """The incidence in a cell: the old value while its text is unchanged, None when blank, else the number."""
    item = table.item(row, col)
    text = "" if item is None else item.text().strip()
    if text == incidence_text(old):
        return old
    if not text:
        return None
    return cell_number(text, row, what, "a number of degrees (blank: none)")


class CasesTab:
    """The "Cases" tab: case name, rating, ISA offset and the optional region (Mach and altitude ranges)."""

    def _build_cases(self) -> None:
        w = QWidget()
        lay = QVBoxLayout(w)
        self.case_table = make_table(["Case name", "Engine rating", "ISA offset ΔT", *REGION_HEADERS,
                                      *INCIDENCE_HEADERS])
        self.case_table.cellChanged.connect(lambda _r, _c: self._cases_changed())
        self.case_table.verticalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)  # long names wrap
        for c, key in ((3, "mach_range"), (4, "mach_range"), (5, "altitude_range_m"), (6, "altitude_range_m")):
            self.case_table.horizontalHeaderItem(c).setToolTip(
                tooltip(S.field(f"case.{key}")) + "\nLeave both cells blank for no limit on this axis.")
        for c, key in ((0, "name"), (1, "rating"), (2, "isa_offset_K")):
            self.case_table.horizontalHeaderItem(c).setToolTip(tooltip(S.field(f"case.{key}")))
        for c, key in ((7, "angle_of_attack_deg"), (8, "sideslip_deg")):
            self.case_table.horizontalHeaderItem(c).setToolTip(
                f"{key}: the case's incidence in degrees (picks the measured characteristics' curve); blank: "
                "none. A Mach table from the file is kept unless you type a number over it.")
        lay.addWidget(self.case_table, 1)
        note = QLabel("Region (optional): the case is judged only for M0 and altitude inside these bounds "
                      "(included); outside it its points are computed, shown grey and judged by no check. Blank "
                      "cells: no bound on that axis. α, β: the case's incidence (blank: none).")
        note.setWordWrap(True)
        lay.addWidget(note)
        buttons = QHBoxLayout()
        add, remove = QPushButton("Add case"), QPushButton("Remove case")
        add.clicked.connect(self._add_case)
        remove.clicked.connect(self._remove_case)
        buttons.addWidget(add)
        buttons.addWidget(remove)
        lay.addLayout(buttons)
        self.tabs.addTab(w, "Cases")

    def _load_cases(self, p) -> None:
        t, u = self.case_table, self._units
        t.blockSignals(True)
        t.setHorizontalHeaderLabels(["Case name", "Engine rating",
                                     u.with_unit("ISA offset ΔT", "temperature_difference"), "M0 from", "M0 to",
                                     u.with_unit("H from", "altitude"), u.with_unit("H to", "altitude"),
                                     *INCIDENCE_HEADERS])
        t.setRowCount(len(p.cases))
        names = [r.name for r in p.ratings]
        for k, c in enumerate(p.cases):
            t.setItem(k, 0, QTableWidgetItem(c.name))
            combo = QComboBox()
            combo.addItems(names)
            combo.setCurrentText(c.rating)
            combo.currentTextChanged.connect(lambda _t: self._cases_changed())
            t.setCellWidget(k, 1, combo)
            t.setItem(k, 2, number_item(c.isa_offset_K, "temperature_difference", u))
            for col, values, dim in ((3, c.mach_range, "none"), (5, c.altitude_range_m, "altitude")):
                for j in range(2):
                    t.setItem(k, col + j, number_item(values[j], dim, u) if values is not None
                              else QTableWidgetItem(""))
            for col, key in ((7, "angle_of_attack_deg"), (8, "sideslip_deg")):
                t.setItem(k, col, QTableWidgetItem(incidence_text(getattr(c, key))))
        t.blockSignals(False)

    def _cases_changed(self) -> None:
        if self._loading:
            return
        t, u = self.case_table, self._units
        old = self._project.cases if self._project is not None else ()
        try:
            cases = []
            for r in range(t.rowCount()):
                name = t.item(r, 0).text().strip() if t.item(r, 0) is not None else ""
                combo = t.cellWidget(r, 1)
                rating = combo.currentText() if combo is not None else ""
                dt = cell_si(t, r, 2, "temperature_difference", u, "ISA offset")
                mach = range_cells(t, r, 3, "none", u, "Mach range")
                alt = range_cells(t, r, 5, "altitude", u, "altitude range")
                base = old[r] if r < len(old) else Case(name=name, rating=rating)
                alpha = incidence_cell(t, r, 7, base.angle_of_attack_deg, "angle of attack")
                beta = incidence_cell(t, r, 8, base.sideslip_deg, "sideslip")
                cases.append(replace(base, name=name, rating=rating, isa_offset_K=dt, mach_range=mach,
                                     altitude_range_m=alt, angle_of_attack_deg=alpha, sideslip_deg=beta))
        except CellError as exc:
            self.show_error(str(exc))
            return
        self.apply_now(lambda p: replace(p, cases=tuple(cases)))

    def _add_case(self) -> None:
        def change(p):
            names = {c.name for c in p.cases}
            n = len(p.cases) + 1
            while f"case {n}" in names:
                n += 1
            return replace(p, cases=p.cases + (Case(name=f"case {n}", rating=p.ratings[0].name, isa_offset_K=0.0),))

        if self.apply_now(change):
            self._load_cases(self._project)

    def _remove_case(self) -> None:
        row = self.case_table.currentRow()

        def change(p):
            k = row if 0 <= row < len(p.cases) else len(p.cases) - 1
            return replace(p, cases=p.cases[:k] + p.cases[k + 1:])

        if self.apply_now(change):
            self._load_cases(self._project)
