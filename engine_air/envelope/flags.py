"""Status flags (method §8): ``engine_air.flow.flags`` re-exported for the envelope's checks and readers.

The flags are set by the match (``engine_air.flow``), so they live there; this name stays importable.

>>> from engine_air.envelope.flags import FLAG_BITS, names_of
>>> names_of(FLAG_BITS["supercritical"])
['supercritical']
"""

from __future__ import annotations

from engine_air.flow.flags import *  # noqa: F401,F403
from engine_air.flow.flags import (  # noqa: F401  (the names star-import leaves out or linters ask for)
    DESCRIPTIONS,
    FLAG_BITS,
    FLAG_DTYPE,
    flag_where,
    has,
    names_of,
)
