"""``ProjectEditors``: every project editor in tabs above one red error bar.

Each tab is a mixin in its own module (``general``, ``inlet``, ``schedule``, ``limits``, ``ratings``, ``envelope``,
``cases``, ``grid``) with a ``_build_<tab>()`` and a ``_load_<tab>(project)``; the edit pipeline they share
(debounce, validation, the error bar) is ``pipeline.EditPipeline``. Spin-box ranges, decimals, steps and tooltips
come from the schema (``engine_air.project.schema``, see ``fields``), and the inlet tab shows the keys of the
inlet type chosen (from the registry of inlet types).
"""

from __future__ import annotations

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import QLabel, QTabWidget, QVBoxLayout, QWidget

from ..units import Units
from ..worker import Debouncer
from .cases import CasesTab
from .envelope import EnvelopeTab
from .general import GeneralTab
from .grid import GridTab
from .inlet import InletTab
from .limits import LimitsTab
from .pipeline import DEBOUNCE_MS, EditPipeline
from .ratings import RatingsTab
from .schedule import ScheduleTab
from .widgets import UnitSpin

TABS = ("general", "inlet", "schedule", "limits", "ratings", "envelope", "cases", "grid")
"""The tabs in order: each has ``_build_<name>()`` and ``_load_<name>(project)``."""


class ProjectEditors(EditPipeline, GeneralTab, InletTab, ScheduleTab, LimitsTab, RatingsTab, EnvelopeTab, CasesTab,
                     GridTab, QWidget):
    """All project editors in tabs, with one error bar."""

    projectEdited = Signal(object)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._project = None
        self._units = Units()
        self._pending: list = []
        self._timer = Debouncer(DEBOUNCE_MS, self.flush, self)
        self._loading = False
        self.project_path = None  # the project file (the characteristics table is named relative to it)

        self.error = QLabel("")
        self.error.setObjectName("editorError")
        self.error.setWordWrap(True)
        self.error.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.error.hide()
        self.tabs = QTabWidget()
        lay = QVBoxLayout(self)
        lay.setContentsMargins(2, 2, 2, 2)
        lay.addWidget(self.error)
        lay.addWidget(self.tabs, 1)
        for name in TABS:
            getattr(self, f"_build_{name}")()

    def _load(self) -> None:
        self._loading = True
        try:
            p, u = self._project, self._units
            for spin in self.findChildren(UnitSpin):
                spin.set_units(u)
            for name in TABS:
                getattr(self, f"_load_{name}")(p)
        finally:
            self._loading = False

    def _accepted(self, old, new) -> None:
        """After an accepted edit: rebuild the tables whose shape another tab's edit changed (the schedule's
        columns follow the inlet type and ramp count)."""
        if old is None or self._schedule_structure(old) != self._schedule_structure(new):
            self._load_schedule(new)
