"""The "Engine" tab: engine ratings: name, corrected flow against theta2, the fan tip speed (none, physical, or
corrected against theta2) and the thrust table (``thrust``).

A mixin of ``app.editors.ProjectEditors``: it uses the edit pipeline (``queue``, ``apply_now``,
``show_error``, ``_field_spin``) of ``app.editors.pipeline.EditPipeline``.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
from PySide6.QtCore import Qt

from PySide6.QtWidgets import (
    QComboBox,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPushButton,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from engine_air.project import schema as S

from .fields import tooltip as _tooltip
from .thrust import ThrustEditor
from .widgets import CellError, cell_si, make_table, number_item

TIP_MODES = ("no tip speed", "physical U_tip", "corrected U_tip/√θ2 per θ2 row")


class RatingsTab(ThrustEditor):
    """The "Engine" tab: engine ratings (name, fan tip speed, corrected flow against theta2, thrust table)."""

    def _build_ratings(self) -> None:
        w = QWidget()
        lay = QVBoxLayout(w)
        top = QHBoxLayout()
        self.rating_pick = QComboBox()
        self.rating_pick.currentIndexChanged.connect(lambda _i: self._show_rating())
        self.rating_name = QLineEdit()
        self.rating_name.editingFinished.connect(self._rename_rating)
        add, remove = QPushButton("Add rating"), QPushButton("Remove rating")
        add.clicked.connect(self._add_rating)
        remove.clicked.connect(self._remove_rating)
        top.addWidget(QLabel("Rating"))
        top.addWidget(self.rating_pick, 1)
        top.addWidget(add)
        top.addWidget(remove)
        lay.addLayout(top)
        self.rating_parts = QTabWidget()
        lay.addWidget(self.rating_parts, 1)
        airflow = QWidget()
        self.rating_parts.addTab(airflow, "Airflow and tip speed")
        lay = QVBoxLayout(airflow)
        form = QFormLayout()
        form.addRow("Name", self.rating_name)
        self.tip_mode = QComboBox()
        self.tip_mode.addItems(TIP_MODES)
        corrected = S.field("engine.rating.corrected_tip_speed_m_s")
        self.tip_mode.setItemData(2, _tooltip(corrected), Qt.ToolTipRole)
        self.tip_mode.setToolTip("The fan tip speed for the blade relative tip Mach: none, one physical speed, "
                                 "or a corrected speed U_tip/√θ2 at each θ2 row (the table's third column); "
                                 "the file keys fan_tip_speed_m_s and corrected_tip_speed_m_s exclude each other.")
        self.tip_speed = self._field_spin(S.field("engine.rating.fan_tip_speed_m_s"), None)
        self.tip_mode.currentIndexChanged.connect(lambda _i: self._tip_mode_changed())
        self.tip_speed.valueChanged.connect(lambda _v: self._tip_changed(False))
        row = QHBoxLayout()
        row.addWidget(self.tip_mode)
        row.addWidget(self.tip_speed, 1)
        form.addRow("Fan tip speed", row)
        lay.addLayout(form)
        self.rating_table = make_table(["θ2 = T_t2/T_ref", "Corrected flow W_c2"])
        self.rating_table.cellChanged.connect(lambda _r, _c: self._rating_table_changed())
        lay.addWidget(self.rating_table, 1)
        buttons = QHBoxLayout()
        add_row, remove_row = QPushButton("Add row"), QPushButton("Remove row")
        add_row.clicked.connect(self._add_rating_row)
        remove_row.clicked.connect(self._remove_rating_row)
        buttons.addWidget(add_row)
        buttons.addWidget(remove_row)
        lay.addLayout(buttons)
        theta = S.field("engine.rating.theta")
        hint = QLabel(f"θ2 must increase strictly ({theta.bounds_text('θ2')}); corrected flow is interpolated "
                      "linearly and held at the end values outside the table.")
        hint.setToolTip(_tooltip(theta))
        hint.setWordWrap(True)
        lay.addWidget(hint)
        self._build_thrust(self.rating_parts)
        self.tabs.addTab(w, "Engine")

    def _rating_index(self) -> int:
        return max(0, self.rating_pick.currentIndex())

    def _load_ratings(self, p) -> None:
        keep = self._rating_index()
        self.rating_pick.blockSignals(True)
        self.rating_pick.clear()
        self.rating_pick.addItems([r.name for r in p.ratings])
        self.rating_pick.setCurrentIndex(min(keep, len(p.ratings) - 1))
        self.rating_pick.blockSignals(False)
        self._show_rating()

    def _show_rating(self) -> None:
        if self._project is None or not self._project.ratings:
            return
        was = self._loading
        self._loading = True
        try:
            r = self._project.ratings[min(self._rating_index(), len(self._project.ratings) - 1)]
            self.rating_name.setText(r.name)
            mode = 2 if r.corrected_tip_speed_m_s is not None else (1 if r.fan_tip_speed_m_s is not None else 0)
            self.tip_mode.setCurrentIndex(mode)
            self.tip_speed.setEnabled(mode == 1)
            self.tip_speed.set_si(r.fan_tip_speed_m_s if r.fan_tip_speed_m_s is not None else 400.0)
            t = self.rating_table
            t.blockSignals(True)
            t.setColumnCount(3 if mode == 2 else 2)
            headers = ["θ2 = T_t2/T_ref", self._units.with_unit("Corrected flow W_c2", "flow")]
            if mode == 2:
                headers.append(self._units.with_unit("U_tip/√θ2", "blade_speed"))
            t.setHorizontalHeaderLabels(headers)
            for c, key in enumerate(("theta", "corrected_flow_kg_s", "corrected_tip_speed_m_s")[:len(headers)]):
                t.horizontalHeaderItem(c).setToolTip(_tooltip(S.field(f"engine.rating.{key}")))
            t.setRowCount(len(r.theta))
            for k, (th, wc) in enumerate(zip(r.theta, r.corrected_flow_kg_s)):
                t.setItem(k, 0, number_item(th, "none", self._units))
                t.setItem(k, 1, number_item(wc, "flow", self._units))
                if mode == 2:
                    t.setItem(k, 2, number_item(r.corrected_tip_speed_m_s[k], "blade_speed", self._units))
            t.blockSignals(False)
            self._show_thrust(r)
        finally:
            self._loading = was

    def _replace_rating(self, p, k, rating):
        ratings = list(p.ratings)
        old = ratings[k].name
        ratings[k] = rating
        cases = p.cases
        if rating.name != old:
            cases = tuple(replace(c, rating=rating.name) if c.rating == old else c for c in cases)
        return replace(p, ratings=tuple(ratings), cases=cases)

    def _rating_table_changed(self) -> None:
        if self._loading:
            return
        k = self._rating_index()
        t, u = self.rating_table, self._units
        try:
            theta = tuple(cell_si(t, r, 0, "none", u, "θ2") for r in range(t.rowCount()))
            flow = tuple(cell_si(t, r, 1, "flow", u, "corrected flow") for r in range(t.rowCount()))
            tip = (tuple(cell_si(t, r, 2, "blade_speed", u, "corrected tip speed") for r in range(t.rowCount()))
                   if t.columnCount() > 2 else None)
        except CellError as exc:
            self.show_error(str(exc))
            return
        extra = {} if tip is None else {"corrected_tip_speed_m_s": tip}
        self.apply_now(lambda p: self._replace_rating(
            p, k, replace(p.ratings[k], theta=theta, corrected_flow_kg_s=flow, **extra)))

    def _tip_mode_changed(self) -> None:
        """None, physical or corrected tip speed; switching to corrected fills each θ2 row with the physical speed
        over √θ2 (or 400 m/s), switching back takes the corrected speed at θ2 = 1."""
        mode = self.tip_mode.currentIndex()
        self.tip_speed.setEnabled(mode == 1)
        if self._loading:
            return
        k = self._rating_index()
        physical = self.tip_speed.si()

        def change(p):
            r = p.ratings[k]
            if mode == 0:
                new = replace(r, fan_tip_speed_m_s=None, corrected_tip_speed_m_s=None)
            elif mode == 1:
                value = physical
                if r.corrected_tip_speed_m_s is not None:
                    value = float(np.interp(1.0, r.theta, r.corrected_tip_speed_m_s))
                new = replace(r, fan_tip_speed_m_s=value, corrected_tip_speed_m_s=None)
            else:
                base = r.fan_tip_speed_m_s if r.fan_tip_speed_m_s is not None else physical
                new = replace(r, fan_tip_speed_m_s=None,
                              corrected_tip_speed_m_s=tuple(float(base / np.sqrt(th)) for th in r.theta))
            return self._replace_rating(p, k, new)

        self.apply_now(change)
        self._show_rating()

    def _tip_changed(self, immediate: bool) -> None:
        if self._loading or self.tip_mode.currentIndex() != 1:
            return
        k = self._rating_index()
        value = self.tip_speed.si()
        change = lambda p: self._replace_rating(p, k, replace(p.ratings[k], fan_tip_speed_m_s=value))  # noqa: E731
        self.apply_now(change) if immediate else self.queue(change)

    def _rename_rating(self) -> None:
        if self._loading or self._project is None:
            return
        k = self._rating_index()
        name = self.rating_name.text().strip()
        if name == self._project.ratings[k].name:
            return
        if self.apply_now(lambda p: self._replace_rating(p, k, replace(p.ratings[k], name=name))):
            self._load_ratings(self._project)
            self._load_cases(self._project)

    def _add_rating(self) -> None:
        if self._project is None:
            return
        base = self._project.ratings[self._rating_index()]
        names = {r.name for r in self._project.ratings}
        n = 2
        while f"{base.name} ({n})" in names:
            n += 1
        new = replace(base, name=f"{base.name} ({n})")
        if self.apply_now(lambda p: replace(p, ratings=p.ratings + (new,))):
            self._load_ratings(self._project)
            self.rating_pick.setCurrentIndex(len(self._project.ratings) - 1)
            self._load_cases(self._project)

    def _remove_rating(self) -> None:
        if self._project is None:
            return
        k = self._rating_index()
        name = self._project.ratings[k].name
        if any(c.rating == name for c in self._project.cases):
            self.show_error(f"rating {name!r} is used by a case; change or remove that case first")
            return
        if len(self._project.ratings) == 1:
            self.show_error("the project needs at least one engine rating")
            return
        if self.apply_now(lambda p: replace(p, ratings=tuple(r for i, r in enumerate(p.ratings) if i != k))):
            self._load_ratings(self._project)
            self._load_cases(self._project)

    def _add_rating_row(self) -> None:
        k = self._rating_index()

        def change(p):
            r = p.ratings[k]
            th = r.theta[-1] + 0.1
            tip = r.corrected_tip_speed_m_s
            return self._replace_rating(p, k, replace(r, theta=r.theta + (th,),
                                                      corrected_flow_kg_s=r.corrected_flow_kg_s
                                                      + (r.corrected_flow_kg_s[-1],),
                                                      corrected_tip_speed_m_s=None if tip is None
                                                      else tip + (tip[-1],)))

        if self.apply_now(change):
            self._show_rating()

    def _remove_rating_row(self) -> None:
        k = self._rating_index()
        row = self.rating_table.currentRow()

        def change(p):
            r = p.ratings[k]
            j = row if 0 <= row < len(r.theta) else len(r.theta) - 1
            tip = r.corrected_tip_speed_m_s
            return self._replace_rating(p, k, replace(
                r, theta=r.theta[:j] + r.theta[j + 1:],
                corrected_flow_kg_s=r.corrected_flow_kg_s[:j] + r.corrected_flow_kg_s[j + 1:],
                corrected_tip_speed_m_s=None if tip is None else tip[:j] + tip[j + 1:]))

        if self.apply_now(change):
            self._show_rating()
