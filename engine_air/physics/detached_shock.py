"""Detached (bow) shocks ahead of ramps, cones and inlets: Moeckel's method and the capture through attachment.

Moeckel's method [1] places a detached shock from three assumptions:
(a) the shock is a hyperbola asymptotic to the free-stream Mach lines,
        x_s(y) = x_v + cot(mu) (sqrt(y^2 + c^2) - c),   tan(mu) = 1/sqrt(M0^2 - 1),
    whose local wave angle sigma(y) satisfies tan(sigma) = tan(mu) sqrt(y^2 + c^2)/y;
(b) the flow is sonic on a straight line from the body's sonic point (x_b, y_b) to the shock's sonic point
    (x*, y*), where the wave angle sigma* makes the flow behind the shock sonic [2, eq. 167];
(c) the flow crossing the shock below y* leaves through that sonic line. Here the sonic line is taken normal
    to the mean of the flow directions at its ends, theta_m = (theta_b + delta*)/2 (delta* the deflection
    at sigma*), with the sonic mass flux rho* a* at the total pressure behind a normal shock at M0:
        2-D:           y*/y_b = 1 / (1 - K cos theta_m)
        axisymmetric:  (y*/y_b)^2 = 1 / (1 - K cos theta_m),   K = (A*/A)(M0) / pi_ns(M0) [2, eqs. 80, 99],
    and x* = x_b - (y* - y_b) tan(theta_m). The vertex then follows from (a) through (x*, y*) with
    c = y* sqrt((tan sigma* / tan mu)^2 - 1); the stand-off is the distance of the vertex ahead of the nose.
The straight sonic line normal to the mean flow and the normal-shock rho* a* are this module's reading of
[1] (recalled, not copied from the report): the stand-off is an estimate at the accuracy of the method
(Moeckel quotes agreement with schlieren pictures to within about 10-20 % of the stand-off, from memory).

Capture through attachment (method section 10). For an inlet the dividing stream line to the cowl lip
crosses a detached ramp shock far from its vertex, near the point where the shock's wave angle is that of
maximum deflection (sigma* and the maximum-deflection angle differ by well under a degree): the part of the
bow shock it crosses is taken as straight at the wave angle of maximum deflection beta_m(M), turning the flow
by delta_max(M), from the ramp's leading edge (the stand-off, a fraction of the ramp's own length near
attachment, is neglected against the distance to the lip). At the attachment Mach number beta_m and
delta_max are the attached shock's own values, so the maximum capture and the pre-entry drag run on
continuously through attachment; towards M0 = 1 the shock becomes normal and turns nothing (capture 1).

[1] Moeckel, W. E., Approximate method for predicting form and location of detached shock waves ahead of
    plane or axially symmetric bodies, NACA TN 1921 (1949).
[2] NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.isentropic import area_ratio
from engine_air.physics.shocks import deflection_from_wave_angle, normal_shock


@dataclass(frozen=True)
class ShockPoint:
    """An oblique shock at a given wave angle (arrays): the deflection and the jump across it."""

    wave_angle_rad: np.ndarray
    deflection_rad: np.ndarray
    downstream_mach: np.ndarray
    static_pressure_ratio: np.ndarray
    total_pressure_ratio: np.ndarray


def _shock_at(m, sigma, gamma=GAMMA) -> ShockPoint:
    delta = deflection_from_wave_angle(m, sigma, gamma)
    ns = normal_shock(m * np.sin(sigma), gamma)
    m2 = ns.downstream_mach / np.sin(sigma - delta)
    return ShockPoint(sigma, delta, m2, ns.static_pressure_ratio, ns.total_pressure_ratio)


def max_deflection_shock(upstream_mach, gamma=GAMMA) -> ShockPoint:
    """The oblique shock of maximum deflection at M (> 1; arrays) [2, eq. 168]:

    sin^2(beta_m) = [(g+1)/4 M^2 - 1 + sqrt((g+1)((g+1)/16 M^4 + (g-1)/2 M^2 + 1))] / (g M^2).

    Parameters
    ----------
    upstream_mach : array_like
        Mach number ahead of the shock (> 1).
    gamma : float
        Ratio of specific heats.

    Returns
    -------
    ShockPoint
        Wave angle and deflection (rad), downstream Mach, static and total-pressure ratios.

    Examples
    --------
    NACA Report 1135, chart 2: at M = 2 the largest deflection is 22.97 deg, at beta_m = 64.67 deg.

    >>> import numpy as np
    >>> s = max_deflection_shock(2.0)
    >>> print(f"{np.degrees(s.deflection_rad):.2f} {np.degrees(s.wave_angle_rad):.2f}")
    22.97 64.67
    """
    m = np.asarray(upstream_mach, dtype=float)
    ms = np.where(m > 1.0, m, 2.0)
    m2 = ms * ms
    sin2 = ((gamma + 1.0) / 4.0 * m2 - 1.0 + np.sqrt(
        (gamma + 1.0) * ((gamma + 1.0) / 16.0 * m2 * m2 + 0.5 * (gamma - 1.0) * m2 + 1.0))) / (gamma * m2)
    return _shock_at(ms, np.arcsin(np.sqrt(np.clip(sin2, 0.0, 1.0))), gamma)


def sonic_shock(upstream_mach, gamma=GAMMA) -> ShockPoint:
    """The oblique shock behind which the flow is just sonic, at M (> 1; arrays) [2, eq. 167]:

    sin^2(sigma*) = [(g+1)/4 M^2 - (3-g)/4 + sqrt((g+1)((9+g)/16 - (3-g)/8 M^2 + (g+1)/16 M^4))] / (g M^2).

    Parameters
    ----------
    upstream_mach : array_like
        Mach number ahead of the shock (> 1).
    gamma : float
        Ratio of specific heats.

    Returns
    -------
    ShockPoint
        Wave angle and deflection (rad), downstream Mach (1), static and total-pressure ratios.

    Examples
    --------
    At M = 2, sigma* = 61.49 deg, a little below the 64.67 deg of maximum deflection:

    >>> import numpy as np
    >>> s = sonic_shock(2.0)
    >>> print(f"{np.degrees(s.wave_angle_rad):.2f} {float(s.downstream_mach):.6f}")
    61.49 1.000000
    """
    m = np.asarray(upstream_mach, dtype=float)
    ms = np.where(m > 1.0, m, 2.0)
    m2 = ms * ms
    sin2 = ((gamma + 1.0) / 4.0 * m2 - (3.0 - gamma) / 4.0 + np.sqrt(
        (gamma + 1.0) * ((9.0 + gamma) / 16.0 - (3.0 - gamma) / 8.0 * m2 + (gamma + 1.0) / 16.0 * m2 * m2))) / (
        gamma * m2)
    return _shock_at(ms, np.arcsin(np.sqrt(np.clip(sin2, 0.0, 1.0))), gamma)


@dataclass(frozen=True)
class BowShock:
    """A detached shock by Moeckel's method (lengths in the unit of the body sonic point's height y_b,
    x measured from the body sonic point, downstream positive)."""

    flight_mach: np.ndarray
    vertex_x: np.ndarray  # shock vertex (on the axis), x from the body sonic point (negative: ahead)
    curvature_parameter: np.ndarray  # c of the hyperbola (vertex radius of curvature = c tan(mu))
    sonic_point: tuple[np.ndarray, np.ndarray]  # (x*, y*)
    mach_angle_rad: np.ndarray

    def x_at(self, y):
        """Shock position x_s(y) (same units and origin), arrays broadcast."""
        y = np.asarray(y, dtype=float)
        return self.vertex_x + (np.sqrt(y * y + self.curvature_parameter ** 2) - self.curvature_parameter) / np.tan(
            self.mach_angle_rad)

    def wave_angle_at(self, y):
        """Local wave angle sigma(y) (rad): tan(sigma) = tan(mu) sqrt(y^2 + c^2)/y (pi/2 on the axis)."""
        y = np.abs(np.asarray(y, dtype=float))
        with np.errstate(divide="ignore"):
            return np.arctan(np.tan(self.mach_angle_rad) * np.sqrt(y * y + self.curvature_parameter ** 2) / y)


def moeckel_bow_shock(flight_mach, body_flow_angle_rad=0.0, axisymmetric: bool = False,
                      gamma=GAMMA) -> BowShock:
    """Detached shock ahead of a body whose sonic point lies at height 1 (y_b = 1), flow angle theta_b there
    (rad), by Moeckel's method [1] as described in the module docstring (M0 > 1; arrays).

    The stand-off of the shock vertex ahead of a nose at the sonic point's axial station is ``-vertex_x``.

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach number M0 (> 1).
    body_flow_angle_rad : array_like
        Flow direction at the body's sonic point, rad (0: a flat face or a cowl lip).
    axisymmetric : bool
        True for a body of revolution, False for a plane (2-D) body.
    gamma : float
        Ratio of specific heats.

    Returns
    -------
    BowShock
        Vertex position, hyperbola parameter, the shock's sonic point and the Mach angle; ``x_at(y)`` and
        ``wave_angle_at(y)`` give the shape.

    Examples
    --------
    Flat faces (theta_b = 0) at M0 = 2: the stand-off is 2.27 sonic-point heights for a 2-D body and 0.89
    radii for a disk, smaller the faster the flight:

    >>> b2, ba = moeckel_bow_shock(2.0), moeckel_bow_shock(2.0, axisymmetric=True)
    >>> print(f"{-float(b2.vertex_x):.2f} {-float(ba.vertex_x):.2f}")
    2.27 0.89
    """
    m0 = np.asarray(flight_mach, dtype=float)
    ms = np.where(m0 > 1.0, m0, 2.0)
    theta_b = np.asarray(body_flow_angle_rad, dtype=float)
    ns = normal_shock(ms, gamma)
    k = (1.0 / area_ratio(ms, gamma)) / ns.total_pressure_ratio  # rho0 V0 / (rho* a*)_behind normal shock
    star = sonic_shock(ms, gamma)
    theta_m = 0.5 * (theta_b + star.deflection_rad)
    factor = 1.0 / (1.0 - k * np.cos(theta_m))
    y_star = np.sqrt(factor) if axisymmetric else factor
    x_star = -(y_star - 1.0) * np.tan(theta_m)
    mu = np.arcsin(1.0 / ms)
    c = y_star * np.sqrt(np.maximum((np.tan(star.wave_angle_rad) / np.tan(mu)) ** 2 - 1.0, 0.0))
    vertex = x_star - (np.sqrt(y_star ** 2 + c * c) - c) / np.tan(mu)
    return BowShock(m0, vertex, c, (x_star, y_star), mu)


def detached_cone_capture_blend(flight_mach, detachment_mach, value_at_detachment, value_at_mach_one):
    """A quantity of a detached cone's capture carried linearly in M0 from its attached value at the cone's
    detachment Mach number to its normal-shock value at M0 = 1 (arrays; method section 10).

    For a cone the bow shock's maximum-deflection part is a conical solution at another cone angle, too costly
    per flight Mach column; between M0 = 1 (a normal shock that turns nothing: capture 1, no pre-entry
    pressure rise ahead of the shock) and detachment the capture is taken linear in M0 (a simplification,
    continuous at both ends).

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach number M0 (dimensionless).
    detachment_mach : float
        The cone's detachment Mach number.
    value_at_detachment, value_at_mach_one : float
        The quantity just attached and at M0 = 1.

    Returns
    -------
    numpy.ndarray
        The quantity, held at the end values outside [1, detachment Mach].

    Examples
    --------
    >>> import numpy as np
    >>> print(detached_cone_capture_blend(np.array([1.0, 1.1, 1.2]), 1.2, 0.8, 1.0))
    [1.  0.9 0.8]
    """
    m0 = np.asarray(flight_mach, dtype=float)
    w = np.clip((m0 - 1.0) / (detachment_mach - 1.0), 0.0, 1.0)
    return value_at_mach_one + (value_at_detachment - value_at_mach_one) * w
