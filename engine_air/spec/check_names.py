"""The names of the checks (``engine-air point --json`` ``checks[].name``), in the order they are built.

Kept apart from ``engine_air.envelope.checks`` (which needs numpy and the physics), in the leaf ``engine_air.spec``,
so that the project-file schema can name them without importing the envelope: a ``[limits.region.NAME]`` table must name one of these. A new check adds its name here;
``build_checks`` refuses a check whose name is not listed.
"""

from __future__ import annotations

CHECK_NAMES = ("face-mach", "throat-mach", "recovery", "stability", "relative-tip-mach", "spillage", "started",
               "installation-loss", "dc60", "surge-margin")
