"""The inlet-engine match (method §1-§8): the names that stay here for the code that reads the result.

The match itself is a chain of stages (``engine_air.flow.chain``: free stream, demand, face, compression,
capture, throat and doors, drag, ledger, assemble); its result is ``OperatingPoints``
(``engine_air.flow.points``). The limits are judged by ``engine_air.envelope``: the judged match at arrays of
conditions is ``engine_air.evaluate_conditions`` (``engine_air.envelope.conditions``), since ``flow`` never
imports ``envelope``.

Example (checked in the tests): a pitot inlet at M0 = 2 with K = 0 has recovery 0.72087, the normal-shock
total-pressure ratio.
"""

from __future__ import annotations

from engine_air.flow.chain import characteristic, run_chain  # noqa: F401
from engine_air.flow.points import OperatingPoints  # noqa: F401
from engine_air.flow.throat import CRITICAL, REGIMES, SUBCRITICAL, SUBSONIC, SUPERCRITICAL  # noqa: F401


def __getattr__(name: str):
    if name == "evaluate_conditions":
        raise ImportError("evaluate_conditions judges the limits, so it lives with them: import it from engine_air "
                          "or engine_air.envelope.conditions (engine_air.flow.chain.run_chain is the unjudged chain)")
    raise AttributeError(f"module 'engine_air.flow.match' has no attribute {name!r}")
