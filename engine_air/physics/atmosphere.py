"""U.S. Standard Atmosphere 1976, geopotential altitude, with an ISA offset.

Layer by layer from -5 km to 84.852 km geopotential [1, Table 4]; identical to
ISO 2533:1975 and the ICAO standard atmosphere below 32 km [2].

In a layer with base altitude H_b, base temperature T_b, base pressure p_b and
lapse L = dT/dH:

    T = T_b + L (H - H_b)
    p = p_b (T_b / T)^(g0 / (R L))            (L != 0)
    p = p_b exp(-g0 (H - H_b) / (R T_b))       (L == 0)

An ISA offset dT shifts the temperature at the same pressure (the usual
"ISA+20" hot day): T_day = T + dT, p_day = p, rho = p / (R T_day).

Worked example: H = 11 000 m gives T = 216.65 K, p = 22 632.06 Pa [1].

[1] U.S. Standard Atmosphere, 1976, NOAA/NASA/USAF, Tables 1 and 4.
[2] ISO 2533:1975, Standard Atmosphere.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.physics.constants import EARTH_RADIUS_M, G0, GAMMA, R_AIR

# Layer base geopotential altitudes (m) and lapse rates (K/m), [1] Table 4.
_BASE_ALTITUDE_M = np.array([0.0, 11000.0, 20000.0, 32000.0, 47000.0, 51000.0, 71000.0])
_LAPSE_K_PER_M = np.array([-6.5e-3, 0.0, 1.0e-3, 2.8e-3, 0.0, -2.8e-3, -2.0e-3])
_SEA_LEVEL_T_K = 288.15
_SEA_LEVEL_P_PA = 101325.0

MIN_ALTITUDE_M = -5000.0
"""Lowest geopotential altitude of the model, m."""
MAX_ALTITUDE_M = 84852.0
"""Highest geopotential altitude of the model, m."""


def _layer_bases() -> tuple[np.ndarray, np.ndarray]:
    """Base temperature (K) and base pressure (Pa) of every layer, integrated upwards."""
    t_base = [_SEA_LEVEL_T_K]
    p_base = [_SEA_LEVEL_P_PA]
    for i in range(len(_BASE_ALTITUDE_M) - 1):
        dh = _BASE_ALTITUDE_M[i + 1] - _BASE_ALTITUDE_M[i]
        t0, p0, lapse = t_base[-1], p_base[-1], _LAPSE_K_PER_M[i]
        t1 = t0 + lapse * dh
        if lapse == 0.0:
            p1 = p0 * np.exp(-G0 * dh / (R_AIR * t0))
        else:
            p1 = p0 * (t0 / t1) ** (G0 / (R_AIR * lapse))
        t_base.append(t1)
        p_base.append(p1)
    return np.array(t_base), np.array(p_base)


_BASE_T_K, _BASE_P_PA = _layer_bases()


@dataclass(frozen=True)
class Atmosphere:
    """Static state of the free stream at one or more altitudes (arrays broadcast together)."""

    temperature_k: np.ndarray
    pressure_pa: np.ndarray
    density_kg_m3: np.ndarray
    speed_of_sound_m_s: np.ndarray
    inside_model: np.ndarray  # bool: altitude within the model's range


def standard_atmosphere(altitude_m, isa_offset_k=0.0) -> Atmosphere:
    """Static temperature (K), pressure (Pa), density (kg/m^3) and speed of sound (m/s) [1].

    In the layer containing H (base H_b, T_b, p_b, lapse L = dT/dH) [1, eqs. 23, 33a, 33b]:

        T = T_b + L (H - H_b)
        p = p_b (T_b / T)^(g0 / (R L))            (L != 0)
        p = p_b exp(-g0 (H - H_b) / (R T_b))       (L == 0)

    then with the day's temperature T_day = T + dT: rho = p / (R T_day),
    a = sqrt(g R T_day); g0 = 9.80665 m/s^2, R = 287.0531 J/(kg K), g = 1.4.

    Parameters
    ----------
    altitude_m : array_like
        Geopotential (pressure) altitude H, m, any array shape; the model spans
        -5 000 m to 84 852 m.
    isa_offset_k : array_like
        Temperature offset dT from the standard day, K (broadcasts with ``altitude_m``);
        the pressure is the standard one at the same altitude.

    Returns
    -------
    Atmosphere
        ``temperature_k`` (K), ``pressure_pa`` (Pa), ``density_kg_m3`` (kg/m^3),
        ``speed_of_sound_m_s`` (m/s) and ``inside_model`` (bool). Outside the model's
        range, or where T_day <= 0 K, the values are NaN and ``inside_model`` is False
        (the caller flags ``outside-atmosphere``).

    Examples
    --------
    U.S. Standard Atmosphere 1976 [1]: at H = 11 000 m, T = 216.65 K, p = 22 632 Pa,
    rho = 0.36392 kg/m^3, a = 295.07 m/s; at sea level rho = 1.2250 kg/m^3, a = 340.29 m/s.

    >>> s = standard_atmosphere(11000.0)
    >>> print(f"{float(s.temperature_k):.2f} {float(s.pressure_pa):.0f} {float(s.density_kg_m3):.5f} "
    ...       f"{float(s.speed_of_sound_m_s):.2f}")
    216.65 22632 0.36392 295.07
    >>> s = standard_atmosphere(0.0)
    >>> print(f"{float(s.density_kg_m3):.4f} {float(s.speed_of_sound_m_s):.2f}")
    1.2250 340.29

    An ISA+20 day at 5 000 m keeps the standard pressure (54 020 Pa [1]) at 255.65 + 20 K:

    >>> s = standard_atmosphere(5000.0, 20.0)
    >>> print(f"{float(s.temperature_k):.2f} {float(s.pressure_pa):.0f}")
    275.65 54020
    """
    h = np.asarray(altitude_m, dtype=float)
    dt = np.asarray(isa_offset_k, dtype=float)
    inside = (h >= MIN_ALTITUDE_M) & (h <= MAX_ALTITUDE_M)
    hc = np.clip(h, MIN_ALTITUDE_M, MAX_ALTITUDE_M)
    layer = np.clip(np.searchsorted(_BASE_ALTITUDE_M, hc, side="right") - 1, 0, len(_BASE_ALTITUDE_M) - 1)
    hb = _BASE_ALTITUDE_M[layer]
    tb = _BASE_T_K[layer]
    pb = _BASE_P_PA[layer]
    lapse = _LAPSE_K_PER_M[layer]
    t_std = tb + lapse * (hc - hb)
    isothermal = lapse == 0.0
    safe_lapse = np.where(isothermal, 1.0, lapse)
    p_gradient = pb * (tb / t_std) ** (G0 / (R_AIR * safe_lapse))
    p_isothermal = pb * np.exp(-G0 * (hc - hb) / (R_AIR * tb))
    p = np.where(isothermal, p_isothermal, p_gradient)
    t = t_std + dt
    nan = np.nan
    t = np.where(inside & (t > 0), t, nan)
    p = np.where(inside, p, nan)
    rho = p / (R_AIR * t)
    a = np.sqrt(GAMMA * R_AIR * t)
    t, p, rho, a, inside = np.broadcast_arrays(t, p, rho, a, inside & np.isfinite(t))
    return Atmosphere(t, p, rho, a, inside)


def geometric_to_geopotential(z_m):
    """Geopotential altitude H = r0 z / (r0 + z), m, from geometric altitude z [1, eq. 18].

    Parameters
    ----------
    z_m : array_like
        Geometric altitude z, m (r0 = 6 356 766 m, the 1976 standard's effective earth radius).

    Returns
    -------
    ndarray
        Geopotential altitude H, m.

    Examples
    --------
    U.S. Standard Atmosphere 1976 [1]: the model's top, 86 km geometric, is 84 852 m geopotential.

    >>> print(f"{float(geometric_to_geopotential(86000.0)):.0f}")
    84852
    """
    z = np.asarray(z_m, dtype=float)
    return EARTH_RADIUS_M * z / (EARTH_RADIUS_M + z)


def geopotential_to_geometric(h_m):
    """Geometric altitude z = r0 H / (r0 - H), m, from geopotential altitude H [1, eq. 18].

    Parameters
    ----------
    h_m : array_like
        Geopotential altitude H, m (r0 = 6 356 766 m).

    Returns
    -------
    ndarray
        Geometric altitude z, m.

    Examples
    --------
    U.S. Standard Atmosphere 1976 [1]: the tropopause, H = 11 000 m, is at z = 11 019 m.

    >>> print(f"{float(geopotential_to_geometric(11000.0)):.0f}")
    11019
    """
    h = np.asarray(h_m, dtype=float)
    return EARTH_RADIUS_M * h / (EARTH_RADIUS_M - h)
