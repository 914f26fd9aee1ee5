"""The batched conical solution (engine_air.physics.conical) against an independent, tight integration.

Reference written here from the published relations, not from the package: the Taylor-Maccoll equation in
V_max units (Anderson, Modern Compressible Flow, 3rd ed., eq. 10.15) integrated by scipy's ``solve_ivp``
(DOP853, rtol 1e-12) outwards from the cone surface at the surface Mach number the package found, stopped where
Prandtl's oblique-shock relation holds (NACA Report 1135, eq. 137: V_n1 V_n2 = a*^2 - (g-1)/(g+1) V_t^2); the
free stream there must be the column's flight Mach number and the shock its wave angle. The detachment Mach
number is the least flight Mach number of that family (a bounded scalar minimisation over the surface Mach).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import minimize_scalar

from engine_air.physics.conical import cone_columns, detachment_mach

G1, K = 0.2, 0.4 / 2.4  # (g-1)/2 and (g-1)/(g+1) for air, g = 1.4


def _rhs(w, y):
    vr, vw = y
    a = G1 * (1.0 - vr * vr - vw * vw)
    return [vw, (vw * vw * vr - a * (2.0 * vr + vw / math.tan(w))) / (a - vw * vw)]


def _shock(w, y):
    return -y[1] * y[0] * math.tan(w) - K * (1.0 - y[0] ** 2)


_shock.terminal, _shock.direction = True, 1.0


def _from_surface(cone_deg: float, surface_mach: float) -> tuple[float, float]:
    """(M0, beta rad) of the conical flow with this surface Mach number: outwards to the shock."""
    x = G1 * surface_mach ** 2
    sol = solve_ivp(_rhs, (math.radians(cone_deg), 0.5 * math.pi - 1e-9), [math.sqrt(x / (1.0 + x)), 0.0],
                    events=_shock, method="DOP853", rtol=1e-12, atol=1e-14)
    beta = float(sol.t_events[0][0])
    v0 = sol.y_events[0][0][0] / math.cos(beta)
    return math.sqrt(v0 * v0 / (G1 * (1.0 - v0 * v0))), beta


def _to_cone(cone_deg: float, m0: float, beta: float) -> tuple[float, float]:
    """(V_w/V, Mach) on the cone from the state just behind the shock (NACA 1135 eq. 93: the normal component
    falls by the density ratio, the tangential one is kept), integrated inwards."""
    v0 = math.sqrt(G1 * m0 * m0 / (1.0 + G1 * m0 * m0))
    mn2 = (m0 * math.sin(beta)) ** 2
    density = 2.4 * mn2 / (0.4 * mn2 + 2.0)
    sol = solve_ivp(_rhs, (beta, math.radians(cone_deg)), [v0 * math.cos(beta), -v0 * math.sin(beta) / density],
                    method="DOP853", rtol=1e-12, atol=1e-14)
    vr, vw = sol.y[:, -1]
    v2 = vr * vr + vw * vw
    return vw / math.sqrt(v2), math.sqrt(v2 / (G1 * (1.0 - v2)))


@pytest.mark.parametrize("cone_deg", [8.0, 18.0, 30.0])
def test_columns_against_tight_integrations(cone_deg):
    m = np.array([detachment_mach(cone_deg) * 1.02, 1.5, 2.0, 3.0, 5.0])
    beta, surface = cone_columns(m, cone_deg)[:2]
    for m0, b, mc in zip(m, beta, surface):
        normal, ref_mc = _to_cone(cone_deg, m0, b)  # inwards from the package's shock: the flow meets the cone
        assert abs(normal) < 1e-8 and ref_mc == pytest.approx(mc, rel=1e-8)
        if m0 >= 1.5:  # outwards from its surface Mach (ill-conditioned in beta next to detachment)
            ref_m0, ref_beta = _from_surface(cone_deg, mc)
            assert ref_m0 == pytest.approx(m0, rel=1e-8)
            assert ref_beta == pytest.approx(b, abs=1e-8)


@pytest.mark.parametrize("cone_deg", [10.0, 25.0])
def test_detachment_against_a_tight_minimisation(cone_deg):
    near = minimize_scalar(lambda mc: _from_surface(cone_deg, mc)[0], bounds=(0.6, 1.2), method="bounded",
                           options={"xatol": 1e-7})
    assert detachment_mach(cone_deg) == pytest.approx(near.fun, rel=1e-9)


def test_a_maps_columns_solved_together_against_tight_integrations():
    """A map's worth of columns (an 18 deg cone, Mach axis of 401 points to 2.0, the lip at Mach 2) in one batch:
    every column attached, every 12th checked as above (the flow from the package's shock meets the cone, and
    outwards from its surface Mach the shock stands at the package's wave angle)."""
    cone = 18.0
    axis = np.linspace(0.3, 2.0, 401)
    m = axis[axis >= detachment_mach(cone)]
    beta, surface = cone_columns(m, cone, design_mach=2.0)[:2]
    assert np.isfinite(beta).all() and np.isfinite(surface).all()
    for m0, b, mc in list(zip(m, beta, surface))[::12]:
        normal, ref_mc = _to_cone(cone, m0, b)
        assert abs(normal) < 1e-8 and ref_mc == pytest.approx(mc, rel=1e-8)
        if m0 >= 1.5:
            ref_m0, ref_beta = _from_surface(cone, mc)
            assert ref_m0 == pytest.approx(m0, rel=1e-8)
            assert ref_beta == pytest.approx(b, abs=1e-8)
