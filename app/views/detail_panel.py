"""The selected point in full: stations, flow, shock system, each limit, and the flags in plain words.

Numbers come from ``engine_air.outputs.point_record`` (``point_record``, ``station_table``,
``shock_table``) and are shown in the current display units. Every table
cell that shows a number keeps its display value in ``Qt.UserRole`` and its SI
value in ``SI_ROLE`` so that tests (and copy-paste) can read them exactly.
"""

from __future__ import annotations

import html
import math

from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QScrollArea,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from engine_air.envelope import flags as F
from engine_air.outputs import point_record as report
from engine_air.outputs.ledger_table import NO_THRUST_DATA, has_thrust, ledger_rows

from ..units import Units, group_digits
from . import analysis

SI_ROLE = Qt.UserRole + 1

# station table columns: key, heading, dimension
STATION_COLUMNS = [
    ("mach", "M", "none"),
    ("p_pa", "p", "pressure"),
    ("t_k", "T", "temperature"),
    ("pt_pa", "p_t", "pressure"),
    ("tt_k", "T_t", "temperature"),
    ("v_m_s", "V", "speed"),
    ("area_m2", "A", "area"),
]

# flow table rows: record key, label, dimension
FLOW_ROWS = [
    ("theta2", "θ2 = T_t2 / T_ref", "none"),
    ("corrected_flow_kg_s", "Corrected flow demanded W_c2", "flow"),
    ("mass_flow_kg_s", "Mass flow delivered W", "flow"),
    ("recovery", "Recovery p_t2/p_t0", "none"),
    ("external_recovery", "  external shocks π_ext", "none"),
    ("duct_recovery", "  duct π_duct", "none"),
    ("reference_recovery", "Reference recovery (MIL-E-5008B)", "none"),
    ("mass_flow_ratio", "Mass-flow ratio A0/A_c", "none"),
    ("max_mass_flow_ratio", "Largest mass-flow ratio MFR_max", "none"),
    ("spillage_fraction", "Spillage fraction", "none"),
    ("additive_drag_coefficient", "Additive drag coefficient", "none"),
    ("spillage_drag_coefficient", "Spillage drag coefficient", "none"),
    ("face_static_to_ambient", "Face static / ambient p2/p0", "none"),
    ("relative_tip_mach", "Blade relative tip Mach", "none"),
]


ZERO_DECIMALS = 9
"""Display precision of the smallest numbers: a value that rounds to 0 at 9 decimals is shown as 0."""


def starting_text(rec: dict, units) -> str:
    """The internal contraction of a mixed-compression point in words (method §11): cowl entrance A_e, the
    internal contraction ratio CR = A_th/A_e and the self-start (Kantrowitz) limit K(M_e) on the same basis."""
    a_e, cr, k = rec.get("entrance_area_m2"), rec.get("internal_contraction_ratio"), rec.get("self_start_contraction")
    parts = []
    if a_e is not None:
        parts.append(f"cowl entrance A_e = {fmt(units.to_display('area', a_e))} {units.label('area')}")
    if cr is not None:
        parts.append(f"internal contraction A_th/A_e = {cr:.4f}")
    if k is not None:
        started = rec.get("started")
        if cr is None:
            verdict = ""
        elif cr >= k:
            verdict = " (reached: it starts itself here)"
        elif started:
            verdict = " (not reached: it runs started because it started at a lower Mach number)"
        else:
            verdict = " (not reached: it cannot swallow its starting shock here)"
        parts.append(f"self-start limit K(M_e) = {k:.4f} on A_th/A_e{verdict}")
    return "; ".join(parts)


def fmt(x, digits: int = 4) -> str:
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return "—"
    x = float(x)
    if round(x, ZERO_DECIMALS) == 0.0:  # rounding noise of a zero (e.g. 1 - MFR = 1.1e-16) shows as 0
        return "0"
    if abs(x) >= 1e5 or abs(x) < 1e-3:
        return f"{x:.3e}"
    if abs(x) >= 100:
        return f"{x:,.1f}".replace(",", " ")
    return f"{x:.{digits}g}" if abs(x) >= 1 else f"{x:.{digits}f}"


def _cell(t: QTableWidget, row: int, col: int) -> QTableWidgetItem:
    """The item at (row, col), made once and then reused (creating items is the slow part of a refill)."""
    item = t.item(row, col)
    if item is None:
        item = QTableWidgetItem()
        t.setItem(row, col, item)
    return item


def _set_num(t: QTableWidget, row: int, col: int, display, si=None, digits: int = 4) -> QTableWidgetItem:
    item = _cell(t, row, col)
    item.setText(fmt(display, digits))
    item.setData(Qt.UserRole, display)
    item.setData(SI_ROLE, si if si is not None else display)
    item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
    return item


def _set_text(t: QTableWidget, row: int, col: int, text: str) -> QTableWidgetItem:
    item = _cell(t, row, col)
    item.setText(text)
    item.setData(Qt.UserRole, text)
    return item


def _set_rows(t: QTableWidget, n: int) -> bool:
    """Set the row count; True when it changed (the height then needs fitting again)."""
    if t.rowCount() == n:
        return False
    t.setRowCount(n)
    return True


def _table(columns: list[str]) -> QTableWidget:
    t = QTableWidget(0, len(columns))
    t.setHorizontalHeaderLabels(columns)
    t.verticalHeader().setVisible(False)
    t.setEditTriggers(QAbstractItemView.NoEditTriggers)
    t.setSelectionMode(QAbstractItemView.ContiguousSelection)
    t.setVerticalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
    t.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)  # as wide as its columns (``_fit_width``)
    t.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
    t.horizontalHeader().setStretchLastSection(True)
    return t


WRAP_COLUMN_EM = 12  # a word-wrapped column is never narrower than this many average characters


def _fit_width(t: QTableWidget, wrap_column: int | None = None) -> None:
    """Never narrower than its columns' contents: a narrow panel scrolls as a whole; no column is cut.

    A word-wrapped column counts with at most ``WRAP_COLUMN_EM`` characters (it wraps below that).
    """
    h = t.horizontalHeader()
    total = 0
    for c in range(t.columnCount()):
        if h.isSectionHidden(c):
            continue
        need = max(h.sectionSizeHint(c), t.sizeHintForColumn(c), h.minimumSectionSize())
        if c == wrap_column:
            need = min(need, WRAP_COLUMN_EM * t.fontMetrics().averageCharWidth())
        elif c == t.columnCount() - 1 and h.stretchLastSection():
            need = max(need, h.defaultSectionSize())  # a stretched last section keeps at least this
        total += need
    width = total + 2 * t.frameWidth() + 2
    if t.minimumWidth() != width:
        t.setMinimumWidth(width)


def _fit_height(t: QTableWidget) -> None:
    """Show every row without a vertical scroll bar."""
    header = t.horizontalHeader().sizeHint().height()
    rows = t.verticalHeader().length()
    scroll = t.horizontalScrollBar().sizeHint().height() if t.horizontalScrollBar().isVisible() else 0
    t.setFixedHeight(header + rows + scroll + 2 * t.frameWidth() + 2)


class DetailPanel(QScrollArea):
    """Everything about one grid point of one case.

    The panel scrolls down, never sideways: ``needed_width()`` is the width at which every table shows
    every column; ``neededWidthChanged(width)`` says when that changes (after a font or content change).
    """

    neededWidthChanged = Signal(int)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setWidgetResizable(True)
        self._units = Units()
        self._record = None
        self._stations_si: list[dict] = []
        self._shocks: list[dict] = []
        self._ledger: dict | None = None
        self._ledger_rows: list[dict] = []
        self._index = None
        self._case = None
        self._fitted: dict = {}
        self._refit_pending = False
        self._needed_width = 0

        body = QWidget()
        lay = QVBoxLayout(body)
        lay.setContentsMargins(6, 6, 6, 6)
        self.header = QLabel("No point selected. Click the map to select a flight condition.")
        self.header.setObjectName("detailHeader")
        self.header.setWordWrap(True)
        self.header.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.stale_label = QLabel("")
        self.stale_label.setObjectName("detailStale")
        self.stale_label.setStyleSheet("background: #8a3b00; color: white; font-weight: bold; padding: 4px;")
        self.stale_label.hide()
        self.stations = _table(["", "0\nfree stream", "1\ncapture", "th\nthroat", "2\nface"])
        self.flow = _table(["Quantity", "Value", "Unit"])
        self.shocks = _table(["Shock", "M\nahead", "M\nbehind", "Wave\nangle (°)", "p_t\nratio"])
        self.checks = _table(["Limit: rule", "Value", "Margin", "Status"])
        self.ledger = _table(["Ledger item", "Value", "Unit"])
        self.ledger.setObjectName("ledgerTable")
        self.ledger_note = QLabel("")
        self.ledger_note.setObjectName("ledgerNote")
        self.ledger_note.setWordWrap(True)
        self.started_label = QLabel("")
        self.started_label.setObjectName("startedState")
        self.started_label.setWordWrap(True)
        # the rule texts and the shocks' names (long for a mixed-compression inlet) wrap: their rows follow the
        # column's width; no table is narrower than its columns
        for t in (self.checks, self.shocks):
            t.setWordWrap(True)
            t.horizontalHeader().setSectionResizeMode(0, QHeaderView.Stretch)
            t.horizontalHeader().setStretchLastSection(False)
        for t in (self.checks, self.stations, self.flow, self.shocks, self.ledger):
            t.horizontalHeader().sectionResized.connect(self._schedule_refit)
        self.flags_label = QLabel("")
        self.flags_label.setWordWrap(True)
        self.flags_label.setTextFormat(Qt.RichText)
        self.flags_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.regime_label = QLabel("")
        self.regime_label.setWordWrap(True)
        self.source_label = QLabel("")  # measured characteristics or the model (method §17), the incidence
        self.source_label.setObjectName("dataSource")
        self.source_label.setWordWrap(True)
        self.source_label.setTextInteractionFlags(Qt.TextSelectableByMouse)

        def heading(text):
            h = QLabel(text)
            h.setObjectName("detailHeading")
            h.setStyleSheet("font-weight: bold; margin-top: 6px;")
            return h

        lay.addWidget(self.stale_label)
        lay.addWidget(self.header)
        lay.addWidget(self.source_label)
        lay.addWidget(heading("Limits at this point"))
        lay.addWidget(self.checks)
        lay.addWidget(heading("Stations (SAE AS755 numbering)"))
        lay.addWidget(self.stations)
        lay.addWidget(heading("Flow, recovery and capture"))
        lay.addWidget(self.flow)
        lay.addWidget(heading("Installation ledger"))
        lay.addWidget(self.ledger_note)
        lay.addWidget(self.ledger)
        lay.addWidget(heading("Shock system"))
        lay.addWidget(self.regime_label)
        lay.addWidget(self.started_label)
        lay.addWidget(self.shocks)
        lay.addWidget(heading("Flags"))
        lay.addWidget(self.flags_label)
        lay.addStretch(1)
        self.setWidget(body)

    # -- data for tests and export ------------------------------------------
    def record(self) -> dict | None:
        """The ``report.point_record`` of the point shown (SI)."""
        return self._record

    def station_cell(self, station: str, key: str) -> float | None:
        """The display value shown in the stations table for ``station`` ("0", "1", "th", "2") and ``key``."""
        col = 1 + [r["station"] for r in self._stations_si].index(station)
        row = [c[0] for c in STATION_COLUMNS].index(key)
        return self.stations.item(row, col).data(Qt.UserRole)

    def station_rows(self, si: bool = False) -> list[dict]:
        """The station table as dicts (keys as ``report.station_table``), in display units unless ``si``."""
        if si:
            return [dict(r) for r in self._stations_si]
        out = []
        for r in self._stations_si:
            d = {"station": r["station"], "name": r["name"]}
            for key, _, dim in STATION_COLUMNS:
                d[key] = self._units.to_display(dim, r[key]) if dim != "none" else r[key]
            out.append(d)
        return out

    def check_rows(self) -> list[dict]:
        return [] if self._record is None else [dict(c) for c in self._record["checks"]]

    def shock_rows(self) -> list[dict]:
        return [dict(s) for s in self._shocks]

    def ledger_rows(self) -> list[dict]:
        """The ledger's rows as shown: dicts with key, label, value (SI, N or –) and sign (+1, -1; 0 for the
        installed thrust, the sum of the others with their signs)."""
        return [dict(r) for r in self._ledger_rows]

    @property
    def index(self):
        return self._index

    @property
    def case(self):
        return self._case

    # -- display ---------------------------------------------------------------
    def set_units(self, units: Units) -> None:
        self._units = units
        if self._record is not None:
            self._fill()

    def refresh(self) -> None:
        """Redraw (after a style change: row heights follow the font)."""
        self._fitted.clear()
        if self._record is not None:
            self._fill()
        self._schedule_refit()

    def _fit(self, t: QTableWidget) -> None:
        """Fit rows and height once per (row count, style); refits cost more than the refill itself."""
        key = (t.rowCount(), t.columnCount())
        if self._fitted.get(id(t)) == key:
            return
        t.resizeRowsToContents()
        _fit_height(t)
        self._fitted[id(t)] = key

    def _schedule_refit(self, *_args) -> None:
        """Fit widths and wrapped rows again once the layout has settled (a font or width change)."""
        if not self._refit_pending:
            self._refit_pending = True
            QTimer.singleShot(0, self._refit_layout)

    def _refit_layout(self) -> None:
        self._refit_pending = False
        for t in (self.checks, self.stations, self.flow, self.shocks, self.ledger):
            _fit_width(t, 0 if t in (self.checks, self.shocks) else None)
        for t in (self.checks, self.shocks):
            if t.rowCount():
                t.resizeRowsToContents()
                _fit_height(t)
        need = self.needed_width()
        if need != self._needed_width:
            self._needed_width = need
            self.neededWidthChanged.emit(need)

    def needed_width(self) -> int:
        """The panel's width at which its content needs no sideways scrolling."""
        body = self.widget()
        return (body.minimumSizeHint().width() + self.verticalScrollBar().sizeHint().width()
                + 2 * self.frameWidth() + 2)

    def set_stale(self, text: str | None) -> None:
        if text:
            self.stale_label.setText(text)
            self.stale_label.show()
        else:
            self.stale_label.hide()

    def clear(self) -> None:
        self._record = None
        self._stations_si = []
        self._shocks = []
        self._index = None
        self._case = None
        for t in (self.stations, self.flow, self.shocks, self.checks, self.ledger):
            t.setRowCount(0)
        self._ledger, self._ledger_rows = None, []
        self.ledger_note.setText("")
        self.started_label.setText("")
        self._fitted.clear()
        self.header.setText("No point selected. Click the map to select a flight condition.")
        self.flags_label.setText("")
        self.regime_label.setText("")
        self.source_label.setText("")

    def show_point(self, result, case_name: str, index: tuple[int, int]) -> None:
        """Show grid point ``index`` (row, column) of case ``case_name`` from ``result``."""
        points = result.case_map(case_name).points
        self._index = tuple(index)
        self._case = case_name
        self._record = report.point_record(points, self._index, case_name)
        self._stations_si = report.station_table(result.project, points, self._index)
        self._shocks = report.shock_table(result.project, points, self._index)
        case = next((c for c in result.project.cases if c.name == case_name), None)
        rating = result.project.rating(case.rating) if case is not None else None
        self._ledger = ledger_rows(self._record, getattr(rating, "recovery_thrust_exchange", None))
        self._inside = bool(result.inside[self._index])
        self.source_label.setText(analysis.source_text(result.project, case, self._record))
        self._fill()

    def _fill(self) -> None:
        tables = (self.checks, self.stations, self.flow, self.shocks, self.ledger)
        # Item changes with the models' signals blocked, then one repaint per table: a refill
        # otherwise sends hundreds of dataChanged signals through the views.
        for t in tables:
            t.model().blockSignals(True)
        try:
            self._fill_all()
        finally:
            for t in tables:
                m = t.model()
                m.blockSignals(False)
                if t.rowCount() and t.columnCount():  # one change notice for the whole table
                    m.dataChanged.emit(m.index(0, 0), m.index(t.rowCount() - 1, t.columnCount() - 1))
        for t in tables:
            self._fit(t)
        self._schedule_refit()

    def _fill_all(self) -> None:
        u, rec = self._units, self._record
        alt = u.to_display("altitude", rec["altitude_m"])
        lim = rec["limiting"]
        lim_label = next((c["label"] for c in rec["checks"] if c["name"] == lim), lim)
        lim_holds = next((c["holds"] for c in rec["checks"] if c["name"] == lim), None)
        verdict = "all limits hold" if rec["holds"] else "SOME LIMIT FAILS"
        where = "" if self._inside else "  (outside the envelope: computed, not judged)"
        self.header.setText(
            f"<b>Case “{html.escape(rec['case'])}”</b> &nbsp; <span style='white-space:nowrap'>"
            f"M0 = {rec['mach']:.3f},</span> <span style='white-space:nowrap'>"
            f"altitude = {group_digits(alt)} {u.label('altitude')}</span>" +
            f"<br>Regime: {rec['regime']} &nbsp;·&nbsp; limiting: {html.escape(str(lim_label))}"
            f"{'' if lim_holds is None else (' (holds)' if lim_holds else ' (FAILS)')}"
            f"<br><b>{verdict}</b>{where}"
        )
        self.header.setTextFormat(Qt.RichText)
        self._fill_checks(rec)
        self._fill_stations()
        self._fill_flow(rec)
        self._fill_shocks(rec)
        self._fill_ledger()
        names = rec["flags"]
        self.flags_label.setText("<br>".join(
            f"<b>{html.escape(n)}</b>: {html.escape(F.DESCRIPTIONS.get(n, ''))}" for n in names))

    def _fill_checks(self, rec) -> None:
        t = self.checks
        _set_rows(t, len(rec["checks"]))
        for r, c in enumerate(rec["checks"]):
            _set_text(t, r, 0, f"{c['label']}: {c['limit']}")
            _set_num(t, r, 1, c["value"])
            _set_num(t, r, 2, c["margin"])
            status = "not judged here" if c["holds"] is None else ("holds" if c["holds"] else "FAILS")
            item = _set_text(t, r, 3, status)
            fails = c["holds"] is False
            f = item.font()
            f.setBold(fails)
            item.setFont(f)
            item.setBackground(Qt.black if fails else Qt.transparent)
            item.setForeground(Qt.white if fails else self.palette().text())

    def _fill_stations(self) -> None:
        """Rows are quantities (M, p, T, ...), columns are the stations, so the table stays narrow."""
        u = self._units
        t = self.stations
        rows = self._stations_si
        if t.columnCount() != 1 + len(rows):
            t.setColumnCount(1 + len(rows))
            t.setHorizontalHeaderLabels([""] + [f"{r['station']}\n{r['name']}" for r in rows])
        _set_rows(t, len(STATION_COLUMNS))
        for q, (key, head, dim) in enumerate(STATION_COLUMNS):
            _set_text(t, q, 0, head if dim == "none" else f"{head} ({u.label(dim)})")
            for c, row in enumerate(rows, start=1):
                si = row[key]
                disp = u.to_display(dim, si) if dim != "none" else si
                _set_num(t, q, c, disp, si)

    def _fill_flow(self, rec) -> None:
        u = self._units
        t = self.flow
        _set_rows(t, len(FLOW_ROWS))
        for r, (key, label, dim) in enumerate(FLOW_ROWS):
            si = rec.get(key)
            disp = u.to_display(dim, si) if dim != "none" else si
            _set_text(t, r, 0, label)
            _set_num(t, r, 1, disp, si)
            _set_text(t, r, 2, u.label(dim) if dim != "none" else "–")

    def _fill_ledger(self) -> None:
        """``engine_air.outputs.ledger_table.ledger_rows``: memo drags, then + / − terms down to the installed
        thrust (= the sum of the terms), then the installation loss; "no thrust data" when the rating has none."""
        u, t, led = self._units, self.ledger, self._ledger
        if led is None:
            return
        complete = has_thrust(self._record)
        rows = []
        for r in led:
            prefix = {"term": "+ " if (r["value"] or 0.0) >= 0 else "− ", "total": "= "}.get(r["role"], "")
            if not complete and r["role"] in ("term", "total"):
                prefix = ""
            rows.append(dict(r, shown=prefix + r["label"]))
        self._ledger_rows = rows
        undefined = complete and any(r["value"] is None for r in led if r["role"] in ("term", "total"))
        self.ledger_note.setText(
            ("Memo items (not summed), then the terms marked + and − that add up to the installed thrust."
             + (" A value shown as — is not defined here (see the flags)." if undefined else ""))
            if complete else
            "No thrust data for this case's rating (flag no-thrust-data): the drags are shown, the installed "
            "thrust is not.")
        _set_rows(t, len(rows))
        for k, row in enumerate(rows):
            si = row["value"]
            dim = "none" if row["role"] == "share" else "force"
            _set_text(t, k, 0, row["shown"])
            if si is None and row.get("note") == NO_THRUST_DATA:
                _set_text(t, k, 1, NO_THRUST_DATA)
            else:
                disp = None if si is None else (u.to_display(dim, si) if dim != "none" else si)
                item = _set_num(t, k, 1, disp, si)
                f = item.font()
                f.setBold(row["role"] == "total")
                item.setFont(f)
            _set_text(t, k, 2, u.label(dim) if dim != "none" else "–")
            if row.get("note"):
                t.item(k, 0).setToolTip(row["note"])

    def _fill_shocks(self, rec) -> None:
        started = rec.get("started")
        if started is None:
            self.started_label.setText("")
            self.started_label.hide()
        else:
            text = ("<b>Started</b>: the supersonic compression continues inside the cowl to the throat; the "
                    "terminal shock stands just behind the throat."
                    if started else
                    "<b>UNSTARTED</b>: a normal shock stands ahead of the cowl.") if rec["mach"] > 1.0 else \
                "Subsonic flight: a mixed-compression inlet is not started."
            text += "<br>" + starting_text(rec, self._units)
            self.started_label.setTextFormat(Qt.RichText)
            self.started_label.setText(text)
            self.started_label.show()
        t = self.shocks
        rows = self._shocks
        if rec["mach"] is not None and rec["mach"] <= 1.0:
            self.regime_label.setText("Subsonic flight: no external shock.")
        elif not rows:
            self.regime_label.setText(f"Regime: {rec['regime']}.")
        else:
            total = 1.0
            for s in rows:
                total *= s["total_pressure_ratio"]
            self.regime_label.setText(f"Regime: {rec['regime']}; the external shocks keep {total:.4f} of p_t0.")
        _set_rows(t, len(rows))
        for r, s in enumerate(rows):
            _set_text(t, r, 0, s["kind"])
            _set_num(t, r, 1, s["mach_ahead"])
            _set_num(t, r, 2, s["mach_behind"])
            _set_num(t, r, 3, s["wave_angle_deg"])
            _set_num(t, r, 4, s["total_pressure_ratio"])
        t.setVisible(bool(rows))
