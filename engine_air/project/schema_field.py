"""One key of the project file, described once: its type, unit, bounds, the inlet types it belongs to and a
one-line description. ``engine_air.project.schema`` collects every ``Field``; each inlet type declares its own
keys (``engine_air.inlets``) with this same class."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Field:
    """A key of the project file.

    ``kind``: "number", "integer", "text", "boolean", "number list", "number table" (a list of number lists),
    or "number or name" (a number, or one of ``names``). ``lo``/``hi`` bound numbers (and list entries);
    ``lo_open``/``hi_open`` say whether the bound itself is excluded. ``length`` is (least, most) entries of a
    list, ``None`` for unbounded. ``default`` is ``REQUIRED`` for a key the file must give.
    """

    key: str  # path below its table, e.g. "capture_area_m2"
    table: str  # e.g. "inlet", "limits", "engine.rating", "case", "inlet.schedule"
    kind: str
    description: str
    unit: str = ""
    lo: float | None = None
    hi: float | None = None
    lo_open: bool = False
    hi_open: bool = False
    length: tuple[int, int | None] | None = None
    default: object = None
    names: tuple[str, ...] = ()
    inlet_types: tuple[str, ...] = ()  # empty: every type

    @property
    def path(self) -> str:
        return f"{self.table}.{self.key}"

    @property
    def required(self) -> bool:
        return self.default is REQUIRED


class _Required:
    def __repr__(self) -> str:
        return "REQUIRED"


REQUIRED = _Required()
