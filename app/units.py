"""Display units: SI or US customary, at the edge of the program only.

Every number inside the program is SI (the analysis package's units). A
``Units`` object converts an SI value of a given *dimension* for display and
back. All conversions are linear (K and degrees Rankine are both absolute).
"""

from __future__ import annotations

import numpy as np

SI = "SI"
US = "US"
SYSTEM_LABELS = {SI: "SI", US: "US customary"}

# dimension -> system -> (unit label, SI value of one display unit)
_TABLE: dict[str, dict[str, tuple[str, float]]] = {
    "altitude": {SI: ("m", 1.0), US: ("ft", 0.3048)},
    "pressure": {SI: ("kPa", 1000.0), US: ("psi", 6894.757293168361)},
    "temperature": {SI: ("K", 1.0), US: ("°R", 1.0 / 1.8)},
    "temperature_difference": {SI: ("K", 1.0), US: ("°R", 1.0 / 1.8)},
    "speed": {SI: ("m/s", 1.0), US: ("kt", 1852.0 / 3600.0)},
    "blade_speed": {SI: ("m/s", 1.0), US: ("ft/s", 0.3048)},
    "area": {SI: ("m²", 1.0), US: ("ft²", 0.09290304)},
    "flow": {SI: ("kg/s", 1.0), US: ("lbm/s", 0.45359237)},
    "force": {SI: ("N", 1.0), US: ("lbf", 4.4482216152605)},
    "none": {SI: ("", 1.0), US: ("", 1.0)},
}

# SI unit strings used by engine_air.outputs.quantities -> dimension
_SI_UNIT_DIMENSION = {
    "m": "altitude", "Pa": "pressure", "K": "temperature", "m/s": "speed",
    "m^2": "area", "m²": "area", "kg/s": "flow", "N": "force", "": "none",
}


def dimension_of_si_unit(unit: str) -> str | None:
    """The dimension of an SI unit string from the analysis package; None if unknown."""
    return _SI_UNIT_DIMENSION.get(unit)


class Units:
    """One unit system's conversions."""

    def __init__(self, system: str = SI) -> None:
        if system not in (SI, US):
            raise ValueError(f"unknown unit system {system!r}")
        self.system = system

    def label(self, dimension: str) -> str:
        return _TABLE[dimension][self.system][0]

    def factor(self, dimension: str) -> float:
        """SI value of one display unit."""
        return _TABLE[dimension][self.system][1]

    def to_display(self, dimension: str, value_si):
        if value_si is None:
            return None
        f = self.factor(dimension)
        if isinstance(value_si, np.ndarray):
            return value_si / f
        return float(value_si) / f

    def to_si(self, dimension: str, value):
        if value is None:
            return None
        f = self.factor(dimension)
        if isinstance(value, np.ndarray):
            return value * f
        return float(value) * f

    def with_unit(self, text: str, dimension: str) -> str:
        """``text`` followed by the unit in brackets (nothing for dimensionless)."""
        unit = self.label(dimension)
        return f"{text} ({unit})" if unit else text

    def __eq__(self, other) -> bool:
        return isinstance(other, Units) and other.system == self.system

    def __hash__(self) -> int:
        return hash(self.system)


def group_digits(x: float, decimals: int = 0) -> str:
    """A number with its thousands grouped by spaces (12 500), readable in either unit system."""
    return f"{x:,.{decimals}f}".replace(",", " ")
