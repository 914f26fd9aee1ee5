"""Gas and reference constants (SI).

Air is a calorically perfect gas with the U.S. Standard Atmosphere 1976 values:
R = R* / M0 = 8314.32 / 28.9644 J/(kg K) [1], gamma = 1.4.

[1] U.S. Standard Atmosphere, 1976, NOAA/NASA/USAF, Table 2 and eq. (1)-(2).
"""

GAMMA = 1.4
"""Ratio of specific heats of air, dimensionless."""

R_AIR = 8314.32 / 28.9644
"""Specific gas constant of air, J/(kg K) (= 287.0531)."""

T_REF = 288.15
"""Standard-day reference temperature for corrected quantities, K."""

P_REF = 101325.0
"""Standard-day reference pressure for corrected quantities, Pa."""

G0 = 9.80665
"""Standard acceleration of gravity, m/s^2 (1976 standard)."""

EARTH_RADIUS_M = 6356766.0
"""Effective earth radius r0 of the 1976 standard, m (geometric <-> geopotential)."""

LOW_SPEED_MACH = 0.05
"""Below this flight Mach number the captured stream tube is not defined."""

CRITICAL_BAND = 0.005
"""|MFR/MFR_max - 1| within this band counts as critical operation."""
