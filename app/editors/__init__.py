"""The project editors: forms and tables that edit the project, one module per tab.

``ProjectEditors`` (``editor``) holds the tabs; ``pipeline`` turns widget edits into validated project edits;
``fields`` reads spin-box ranges, units and tooltips from the schema; ``widgets`` has the unit-aware spin box and
table cells.
"""

from .editor import ProjectEditors, TABS
from .fields import MAX_AREA, MAX_AXIS, MAX_FLOW, MAX_GRID, MAX_TIP, MIN_AXIS
from .pipeline import DEBOUNCE_MS

__all__ = ["DEBOUNCE_MS", "MAX_AREA", "MAX_AXIS", "MAX_FLOW", "MAX_GRID", "MAX_TIP", "MIN_AXIS", "ProjectEditors",
           "TABS"]
