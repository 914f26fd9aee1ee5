"""The inlet types the program knows, by the name written in ``inlet.type``.

Adding a type: write its module (one object implementing ``engine_air.inlets.base.InletType``), list it
here, add a sample project and its tests. The loader, the match, the studies, the file reference and the
program's editor read the type's keys and behaviour from that object.
"""

from __future__ import annotations

from engine_air.inlets import axisymmetric_spike, external_ramp, mixed_compression, pitot
from engine_air.inlets.base import InletType

INLET_TYPES: dict[str, InletType] = {
    module.INLET.name: module.INLET for module in (pitot, external_ramp, mixed_compression, axisymmetric_spike)}


def inlet_type(name: str) -> InletType:
    """The inlet type called ``name``; ``KeyError`` naming the known types otherwise."""
    try:
        return INLET_TYPES[name]
    except KeyError:
        raise KeyError(f"unknown inlet type {name!r}; known: {', '.join(INLET_TYPES)}") from None
