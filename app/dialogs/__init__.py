"""Design answers in the desktop program: sizing, comparison, trade sweep and the review pack.

One module per dialog (``sizing``, ``compare``, ``sweep``, ``review_pack``) on one base (``task.TaskDialog``),
the shared table and plot pieces in ``common`` and the menu in ``menu``.

Self-contained dialogs over ``engine_air.studies.sizing``, ``engine_air.studies.compare``,
``engine_air.studies.sweep`` and ``engine_air.outputs.review_pack``; the main window opens them
through ``add_design_menu(main_window, get_project)``, which adds a "Design"
menu. Every computation runs on the program's worker (``app.worker.Worker``) with a progress
bar and a Cancel button; results come back to the GUI thread by queued signals. Values
are in SI units, as in the analysis package.

- ``SizingDialog(project)``: choose a design variable, the search bounds and an
  optional objective; shows the feasible interval(s), the limit and the point
  (Mach, altitude, case) bounding each end, the optimum, and the worst relative
  margin against the value.
- ``CompareDialog(project, other_path)``: the current project (A) against a
  project file (B) on one grid: both maps with one shared colour scale, the
  difference map B - A on a scale centred on zero, and both verdicts.
- ``SweepDialog(project)``: 1 to 4 variables with ranges; a table of variants
  and, for two variables, an image of the worst relative margin with its zero
  contour (the feasible boundary).
"""

from .common import colour_map
from .compare import CompareDialog
from .menu import add_design_menu
from .review_pack import ReviewPackDialog
from .sizing import SizingDialog
from .sweep import SweepDialog

__all__ = ["CompareDialog", "ReviewPackDialog", "SizingDialog", "SweepDialog", "add_design_menu", "colour_map"]
