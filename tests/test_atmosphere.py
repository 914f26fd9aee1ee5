"""Standard atmosphere (method §1): table values, reference-library cross-checks, ISA offset, model range."""

from __future__ import annotations

import math

import fluids
import numpy as np
import pytest
from ambiance import Atmosphere as IcaoAtmosphere

from engine_air.physics.atmosphere import (
    MAX_ALTITUDE_M,
    MIN_ALTITUDE_M,
    geometric_to_geopotential,
    geopotential_to_geometric,
    standard_atmosphere,
)
from engine_air.physics.constants import EARTH_RADIUS_M, GAMMA, R_AIR


def _at(h, dt=0.0):
    s = standard_atmosphere(h, dt)
    return float(s.temperature_k), float(s.pressure_pa), float(s.density_kg_m3), float(s.speed_of_sound_m_s)


# ---------------------------------------------------------------------------- table values
# (geopotential altitude, T K, p Pa); T to 0.01 K, p to the last tabulated digit.
TABLE = [
    (11000.0, 216.65, 22632.06, 0.005),  # U.S. Standard Atmosphere 1976, Table I
    (20000.0, 216.65, 5474.89, 0.005),  # U.S. Standard Atmosphere 1976, Table I
    (5000.0, 255.65, 54019.9, 0.05),  # U.S. Standard Atmosphere 1976, Table I
    (32000.0, 228.65, 868.02, 0.005),  # U.S. Standard Atmosphere 1976, Table I
    (47000.0, 270.65, 110.91, 0.005),  # U.S. Standard Atmosphere 1976, Table I
]


@pytest.mark.parametrize("h, t_table, p_table, p_tol", TABLE)
def test_table_values(h, t_table, p_table, p_tol):
    t, p, rho, a = _at(h)
    assert t == pytest.approx(t_table, abs=1e-9)  # U.S. Standard Atmosphere 1976, Table I
    assert abs(p - p_table) <= p_tol  # U.S. Standard Atmosphere 1976, Table I
    assert rho == pytest.approx(p / (R_AIR * t), rel=1e-14)


def test_sea_level():
    t, p, rho, a = _at(0.0)
    assert t == 288.15  # U.S. Standard Atmosphere 1976, Table I
    assert p == 101325.0  # U.S. Standard Atmosphere 1976, Table I
    assert a == pytest.approx(340.294, abs=5e-4)  # U.S. Standard Atmosphere 1976, Table I
    assert rho == pytest.approx(1.2250, abs=5e-5)  # U.S. Standard Atmosphere 1976, Table I


def test_density_at_11_km():
    # U.S. Standard Atmosphere 1976, Table I: rho = 0.36392 kg/m^3 at H = 11 000 m
    assert _at(11000.0)[2] == pytest.approx(0.36392, abs=5e-6)


def test_top_of_model():
    # U.S. Standard Atmosphere 1976, Table I: p = 0.37338 Pa at 86 km geometric (84 852 m geopotential).
    # The model carries the molecular-scale temperature T_M = 186.946 K there (derived from method §1 layers;
    # the standard's kinetic temperature, 186.87 K, differs above 80 km by the molecular-weight ratio).
    t, p, _, _ = _at(84852.0)
    assert t == pytest.approx(186.946, abs=1e-9)
    assert p == pytest.approx(0.37338, rel=2e-5)


def test_layers_are_continuous():
    # Temperature and pressure continuous across each layer base (derived from method §1).
    eps = 1e-6
    for hb in (11000.0, 20000.0, 32000.0, 47000.0, 51000.0, 71000.0):
        lo, hi = _at(hb - eps), _at(hb + eps)
        assert hi[0] == pytest.approx(lo[0], abs=1e-8)
        assert hi[1] == pytest.approx(lo[1], rel=1e-9)


def test_lapse_rates():
    # method §1: lapse -6.5, 0, +1.0, +2.8, 0 K/km in the layers based at 0, 11, 20, 32, 47 km
    for h0, lapse in ((0.0, -6.5), (11000.0, 0.0), (20000.0, 1.0), (32000.0, 2.8), (47000.0, 0.0)):
        t1, t2 = _at(h0 + 1000.0)[0], _at(h0 + 3000.0)[0]
        assert (t2 - t1) / 2.0 == pytest.approx(lapse, abs=1e-9)


# ---------------------------------------------------------------------------- reference libraries
H_GRID = np.linspace(0.0, 47000.0, 200)


def test_against_ambiance_icao_1993():
    # ambiance implements the ICAO 1993 atmosphere and takes GEOMETRIC altitude: z = r0 H / (r0 - H).
    z = EARTH_RADIUS_M * H_GRID / (EARTH_RADIUS_M - H_GRID)
    ref = IcaoAtmosphere(z)
    ours = standard_atmosphere(H_GRID)
    # Found agreement: T to 1e-15, speed of sound to 3.5e-7, p and rho to 6.9e-6 (the largest at 47 km).
    # The ICAO document's gas constant (287.05287 J/(kg K)) differs from the 1976 one (8314.32/28.9644 =
    # 287.0531) by 8e-6 relative, which enters the exponent g0/(R L) and grows with altitude.
    np.testing.assert_allclose(ours.temperature_k, ref.temperature, rtol=1e-12)
    np.testing.assert_allclose(ours.pressure_pa, ref.pressure, rtol=1e-5)
    np.testing.assert_allclose(ours.density_kg_m3, ref.density, rtol=1e-5)
    np.testing.assert_allclose(ours.speed_of_sound_m_s, ref.speed_of_sound, rtol=1e-6)
    # and it is no accident: below 11 km, where the exponent's effect is small, they agree far closer
    low = H_GRID <= 11000.0
    np.testing.assert_allclose(ours.pressure_pa[low], ref.pressure[low], rtol=2e-6)


def test_against_fluids_atmosphere_1976():
    # fluids.ATMOSPHERE_1976 takes GEOMETRIC altitude too. Found agreement: 5e-15 relative in T, p, rho, a
    # (same constants, same layer equations); checked to 1e-12.
    z = geopotential_to_geometric(H_GRID)
    ours = standard_atmosphere(H_GRID)
    for i, zi in enumerate(z):
        ref = fluids.ATMOSPHERE_1976(float(zi))
        assert ours.temperature_k[i] == pytest.approx(ref.T, rel=1e-12)
        assert ours.pressure_pa[i] == pytest.approx(ref.P, rel=1e-12)
        assert ours.density_kg_m3[i] == pytest.approx(ref.rho, rel=1e-12)
        assert ours.speed_of_sound_m_s[i] == pytest.approx(ref.v_sonic, rel=1e-12)


def test_geometric_geopotential_round_trip():
    # U.S. Standard Atmosphere 1976, eq. 18: H = r0 z / (r0 + z), r0 = 6 356 766 m
    h = np.linspace(-5000.0, 84852.0, 101)
    z = geopotential_to_geometric(h)
    np.testing.assert_allclose(geometric_to_geopotential(z), h, rtol=0, atol=1e-8)
    assert float(geopotential_to_geometric(84852.0)) == pytest.approx(86000.0, abs=1.0)  # 1976 standard: 86 km


# ---------------------------------------------------------------------------- ISA offset
@pytest.mark.parametrize("h", [0.0, 5000.0, 11000.0, 15000.0])
@pytest.mark.parametrize("dt", [-15.0, 20.0, 35.0])
def test_isa_offset_same_pressure_shifted_temperature(h, dt):
    std = standard_atmosphere(h)
    hot = standard_atmosphere(h, dt)
    assert float(hot.pressure_pa) == float(std.pressure_pa)  # method §1: same pressure
    assert float(hot.temperature_k) == pytest.approx(float(std.temperature_k) + dt, abs=1e-12)
    t = float(std.temperature_k) + dt
    assert float(hot.density_kg_m3) == pytest.approx(float(std.pressure_pa) / (R_AIR * t), rel=1e-14)
    assert float(hot.speed_of_sound_m_s) == pytest.approx(math.sqrt(GAMMA * R_AIR * t), rel=1e-14)


def test_isa_plus_20_at_5_km_by_hand():
    # derived from method §1: T = 255.65 + 20 K, p = 54 019.9 Pa, rho = p/(R T)
    t, p, rho, _ = _at(5000.0, 20.0)
    assert t == pytest.approx(275.65, abs=1e-9)
    assert p == pytest.approx(54019.9, abs=0.05)
    assert rho == pytest.approx(54019.912 / (287.0531 * 275.65), rel=1e-6)


def test_broadcasting():
    s = standard_atmosphere(np.array([[0.0], [11000.0], [20000.0]]), np.array([0.0, 10.0]))
    assert s.temperature_k.shape == (3, 2)
    assert s.pressure_pa.shape == (3, 2)
    assert s.inside_model.shape == (3, 2)
    assert s.temperature_k[1, 1] == pytest.approx(226.65)
    assert s.pressure_pa[1, 0] == s.pressure_pa[1, 1]


# ---------------------------------------------------------------------------- range of the model
def test_outside_model_is_nan_and_flagged():
    h = np.array([MIN_ALTITUDE_M - 1.0, MIN_ALTITUDE_M, 0.0, MAX_ALTITUDE_M, MAX_ALTITUDE_M + 1.0, 120000.0, np.nan])
    s = standard_atmosphere(h)
    assert MIN_ALTITUDE_M == -5000.0 and MAX_ALTITUDE_M == 84852.0
    assert s.inside_model.tolist() == [False, True, True, True, False, False, False]
    for field in (s.temperature_k, s.pressure_pa, s.density_kg_m3, s.speed_of_sound_m_s):
        assert np.isnan(field[[0, 4, 5, 6]]).all()
        assert np.isfinite(field[[1, 2, 3]]).all()
    # -5 km: T = 320.65 K, p = 177 687 Pa (U.S. Standard Atmosphere 1976, Table I, from memory)
    assert s.temperature_k[1] == pytest.approx(320.65)
    assert s.pressure_pa[1] == pytest.approx(177687.0, abs=1.0)


def test_nonphysical_offset_is_outside_model():
    # An offset that takes T to or below 0 K gives NaN and inside_model False (nothing can be computed).
    s = standard_atmosphere(11000.0, -216.65)
    assert not bool(s.inside_model)
    assert math.isnan(float(s.temperature_k)) and math.isnan(float(s.density_kg_m3))
