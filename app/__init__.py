"""Desktop program for engine_air: the envelope map, the selected point, the findings and the project editors.

PySide6 + pyqtgraph. The analysis runs on a worker thread (``app.worker``);
nothing here changes ``engine_air``.

Layout: ``main`` (start-up), ``main_window`` (builds the window, runs the map) with its parts in
``window/`` (verdict banner, file actions, autosave); the views ``map_view``, ``detail_panel`` and
``findings``; the project ``document``, its ``editors/`` (one module per tab; ``validation``); ``dialogs/``
(sizing, compare, sweep, review pack); ``recovery/`` (autosave slots and recovery at start-up);
``worker`` (the one way work runs off the GUI thread, and the one debounce); ``exports``, ``style``,
``units``, ``colour_maps``, ``contours``, ``analysis``.
"""

ORGANISATION = "EngineAirTools"
APPLICATION = "Engine Air Desk"
