"""engine_air: inlet–engine airflow match over a flight envelope.

Preliminary-design analysis. It is not a substitute for test data, the engine
manufacturer's installation requirements, or the applicable airworthiness rules
and licensed engineering judgement.

The package never imports Qt; the desktop program in ``app`` calls it on a
worker thread.

Public API (the names below; everything else is reached through its package):

- ``load_project(path)`` / ``save_project(project, path)``: the project file (TOML, SI);
- ``evaluate_project(project)``: every case over the envelope grid, a ``MapResult`` with the verdict;
- ``evaluate_point(project, mach, altitude_m, case=None)``: one condition as the point record (a dict);
- ``evaluate_conditions(project, case, mach, altitude_m, demand=None)``: the station chain at arrays of
  conditions, judged against the limits;
- ``run_chain(...)`` / ``characteristic(project, case, mach, altitude_m, corrected_flow_kg_s)``: the chain of
  stages unjudged, and with the engine's demand swept along a new axis (the inlet characteristic, method §16);
- ``Project`` and its parts, ``MapResult``, ``OperatingPoints``, ``ProjectError``.

Packages: ``spec`` (the project's dataclasses and file keys), ``physics`` (air and gas dynamics), ``inlets`` (one module per inlet type and the registry),
``flow`` (the match as a chain of stages, airflow management, the thrust ledger, the flags), ``project`` (model, schema, files),
``envelope`` (grid, evaluation, checks, flags, ranking), ``studies`` (sizing, sweep, compare),
``distortion`` (engine-face distortion from rake files, method §18),
``outputs`` (quantities, tables, pictures, review pack), ``cli``.
"""

from __future__ import annotations

import importlib

__version__ = "0.1.0"

CAUTION = (
    "Preliminary-design analysis only. Results come from one-dimensional gas "
    "dynamics and idealised shock systems; they are not a substitute for test "
    "data, the engine manufacturer's installation requirements, or the "
    "applicable airworthiness rules and licensed engineering judgement."
)

_EXPORTS = {
    "load_project": "engine_air.project.load",
    "save_project": "engine_air.project.save",
    "validate_project": "engine_air.project.load",
    "Project": "engine_air.project.model",
    "ProjectError": "engine_air.project.errors",
    "evaluate_project": "engine_air.envelope.evaluate",
    "MapResult": "engine_air.envelope.evaluate",
    "WORST": "engine_air.envelope.evaluate",
    "evaluate_point": "engine_air.outputs.point",
    "evaluate_conditions": "engine_air.envelope.conditions",
    "OperatingPoints": "engine_air.flow.points",
    "run_chain": "engine_air.flow.chain",
    "characteristic": "engine_air.flow.chain",
}

__all__ = ["CAUTION", "__version__", *sorted(_EXPORTS)]


def __getattr__(name: str):
    """The public names, imported on first use (importing ``engine_air`` stays light)."""
    module = _EXPORTS.get(name)
    if module is None:
        raise AttributeError(f"module 'engine_air' has no attribute {name!r}")
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value
