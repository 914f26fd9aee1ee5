"""The inlet types the program knows, by the name written in ``inlet.type``.

Adding a type: write its module (one object implementing ``engine_air.inlets.base.InletType``), list it
here, add a sample project and its tests. The loader, the match, the studies, the file reference and the
program's editor read the type's keys and behaviour from that object.

A type's module is imported the first time its entry is read (``inlet_type(name)``, ``INLET_TYPES[name]``),
not when the registry is imported: a pitot study never loads the spike's conical-flow solver.
"""

from __future__ import annotations

import importlib

from engine_air.inlets.base import InletType

_MODULES = {
    "pitot": "engine_air.inlets.pitot",
    "external-ramp": "engine_air.inlets.external_ramp",
    "mixed-compression": "engine_air.inlets.mixed_compression",
    "axisymmetric-spike": "engine_air.inlets.axisymmetric_spike",
}


class _Registry(dict):
    """A dict of inlet types whose values are imported on first read (entries set by hand are kept as set)."""

    def __getitem__(self, name: str) -> InletType:
        value = super().__getitem__(name)
        if isinstance(value, str):  # a module path not imported yet
            value = importlib.import_module(value).INLET
            super().__setitem__(name, value)
        return value

    def get(self, name, default=None):
        return self[name] if name in self else default

    def values(self):
        return [self[name] for name in self]

    def items(self):
        return [(name, self[name]) for name in self]


INLET_TYPES: dict[str, InletType] = _Registry(_MODULES)


def inlet_type(name: str) -> InletType:
    """The inlet type called ``name``; ``KeyError`` naming the known types otherwise."""
    try:
        return INLET_TYPES[name]
    except KeyError:
        raise KeyError(f"unknown inlet type {name!r}; known: {', '.join(INLET_TYPES)}") from None
