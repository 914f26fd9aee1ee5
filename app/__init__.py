"""Desktop program for engine_air: the envelope map, the selected point, the findings and the project editors.

PySide6 + pyqtgraph. The analysis runs on a worker thread (``app.worker``);
nothing here changes ``engine_air``.
"""

ORGANISATION = "EngineAirTools"
APPLICATION = "Engine Air Desk"
