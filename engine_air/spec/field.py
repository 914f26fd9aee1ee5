"""One key of the project file, described once: its type, unit, bounds, the inlet types it belongs to and a
one-line description. ``engine_air.project.schema`` collects every ``Field``; each inlet type declares its own
keys (``engine_air.inlets``) with this same class. The loader, ``validate_project``, the program's editors and
the generated file reference (``docs/project-file.md``) all read these objects.

The rules a ``Field`` states about one value (type, bounds, length, order) are checked by ``check_value``;
rules between keys it names (``same_length_as``, ``row_length_as``, ``excludes``, ``requires``) are checked by
the loader (``engine_air.project.load``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

KINDS = ("number", "integer", "text", "boolean", "number list", "number table", "number or name", "choice",
         "named numbers", "number or Mach table")


@dataclass(frozen=True)
class Field:
    """A key of the project file.

    ``kind``: "number", "integer", "text", "boolean", "number list", "number table" (a list of number lists),
    "number or name" (a number, or one of ``names``, case-insensitive), "choice" (one of ``names``) or "named
    numbers" (a TOML table of name = number, kept as (name, value) pairs in file order).
    ``lo``/``hi`` bound numbers (and list entries); ``lo_open``/``hi_open`` say whether the bound itself is
    excluded. ``length`` is (least, most) entries of a list (rows of a table), ``None`` for unbounded; for text,
    ``length=(1, None)`` means it must not be blank. ``order`` is "" (any), "increasing" (strictly) or
    "non-decreasing" for list entries. ``default`` is ``REQUIRED`` for a key the file must give, ``None`` for an
    optional key without a value.

    Between keys (names without a dot are keys of the same table, with a dot full paths such as
    ``inlet.ramp_angles_deg``): ``same_length_as`` (a list exactly as long as that list), ``row_length_as``
    (each row of a table as long as that list), ``excludes`` (not together with those keys), ``requires``
    (only together with those keys).

    ``decimals`` and ``step`` are how the program's editor shows and steps the value.
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
    order: str = ""
    same_length_as: str | None = None
    row_length_as: str | None = None
    excludes: tuple[str, ...] = ()
    requires: tuple[str, ...] = ()
    decimals: int | None = None
    step: float | None = None

    @property
    def path(self) -> str:
        return f"{self.table}.{self.key}"

    @property
    def required(self) -> bool:
        return self.default is REQUIRED

    # -- plain-words statements of the rules (messages and the file reference) --------------------------------
    def bounds_text(self, name: str | None = None) -> str:
        """``0 < name <= 100 m^2``-style statement of the bounds of a number (or of each entry)."""
        name = name or self.key
        if self.lo is None and self.hi is None:
            text = f"any finite {name}"
        else:
            text = ""
            if self.lo is not None:
                text += f"{_g(self.lo)} {'<' if self.lo_open else '<='} "
            text += name
            if self.hi is not None:
                text += f" {'<' if self.hi_open else '<='} {_g(self.hi)}"
        if self.unit:
            text += f" ({self.unit})"
        return text

    def length_text(self) -> str:
        if self.length is None:
            return ""
        least, most = self.length
        if most is None:
            return f"at least {least}"
        if least == most:
            return f"exactly {least}"
        return f"{least} to {most}"

    def allowed_text(self) -> str:
        """What a value of this key may be, in plain words (one sentence, no cross-key rules)."""
        k = self.kind
        if k == "number":
            return "a finite number with " + self.bounds_text()
        if k == "integer":
            return f"a whole number from {_g(self.lo)} to {_g(self.hi)}" if self.lo is not None else "a whole number"
        if k == "text":
            return "non-empty text" if self.length else "text"
        if k == "boolean":
            return "true or false"
        if k == "choice":
            return "one of " + ", ".join(f'"{n}"' for n in self.names)
        if k == "number or name":
            names = " or ".join(f'"{n}"' for n in self.names)
            return f"a finite number with {self.bounds_text()}, or the name {names}"
        if k == "number or Mach table":
            return (f"a finite number with {self.bounds_text()}, or a table {{ mach = [...], deg = [...] }} of at "
                    "least 2 entries each, as many deg as mach, mach from 0 to 6 strictly increasing, each deg with "
                    f"{self.bounds_text('deg')}")
        if k == "named numbers":
            return ("a table of name = number, e.g. { tolerances = 0.04 }, with " + self.bounds_text("each value")
                    + (f", at most {self.length[1]} names" if self.length and self.length[1] else ""))
        entries = self.bounds_text("each entry" if k == "number list" else "each value")
        shape = ""
        if self.length is not None:
            noun = "entries" if k == "number list" else "rows"
            shape = f" of {self.length_text()} {noun}"
        what = "a list of numbers" if k == "number list" else "a list of rows (lists of numbers)"
        text = f"{what}{shape} with {entries}"
        if self.order == "increasing":
            text += ", strictly increasing"
        elif self.order == "non-decreasing":
            text += ", first <= second" if self.length == (2, 2) else ", never decreasing"
        return text


def _g(x) -> str:
    return f"{x:g}" if isinstance(x, float) else str(x)


class _Required:
    def __repr__(self) -> str:
        return "REQUIRED"


REQUIRED = _Required()


def finite_float(value: object) -> float | None:
    """``float(value)`` for a finite real number (not a bool); ``None`` for anything else (also huge ints)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return None
    try:
        x = float(value)
    except OverflowError:
        return None
    return x if math.isfinite(x) else None
