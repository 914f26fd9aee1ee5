"""The periodic linear profile of a ring of probes, and exact integrals of it (method §18).

A ring's total pressure between two neighbouring probes is taken as linear in angle, and the profile is
periodic over 360°. Every function works on a whole group of rake points at once: pressures of shape
(points, rings, probes) with each ring's probes in increasing angle and equally spaced, angles of the same
shape (or broadcastable to it) in degrees, in [0, 360).

The primitive ``F_i(θ) = ∫_{θ_i0}^{θ} P_i(φ) dφ`` of ring i is exact for the piecewise-linear profile (a sum
of trapezoids plus the part-interval, quadratic in the angle), so means over any arc or sector are exact.
"""

from __future__ import annotations

import numpy as np


class RingProfiles:
    """The linear profiles of every ring of a group of points.

    ``pressure``: (P, R, N) total pressures, each ring's probes in increasing angle; ``angle_deg``: (P, R, N)
    their angles, equally spaced by 360/N degrees. Angles passed to the methods are in degrees, any real
    value (taken modulo 360), of shape (P, R, K) or broadcastable to it.

    >>> import numpy as np
    >>> p = np.array([[[0.9, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0]]])
    >>> prof = RingProfiles(p, np.arange(8.0)[None, None, :] * 45.0)
    >>> float(prof.average[0, 0])
    0.9875
    >>> float(prof.value(np.array([[[22.5]]]))[0, 0, 0])
    0.95
    """

    def __init__(self, pressure: np.ndarray, angle_deg: np.ndarray) -> None:
        self.pressure = np.asarray(pressure, float)
        self.angle_deg = np.broadcast_to(np.asarray(angle_deg, float), self.pressure.shape)
        n = self.pressure.shape[-1]
        self.spacing_deg = 360.0 / n
        nxt = np.roll(self.pressure, -1, axis=-1)
        segment = 0.5 * self.spacing_deg * (self.pressure + nxt)  # exact integral over each probe interval
        self.cumulative = np.concatenate([np.zeros(self.pressure.shape[:-1] + (1,)), np.cumsum(segment, -1)], -1)
        self.period_integral = self.cumulative[..., -1]
        self.average = self.period_integral / 360.0  # PAV_i: the mean over 360° (= mean of the probes)
        self._next = nxt

    def _locate(self, theta_deg):
        """(whole periods, interval index j, fraction t in [0, 1)) of each angle, measured from probe 0."""
        u = np.asarray(theta_deg, float) - self.angle_deg[..., :1]
        periods = np.floor(u / 360.0)
        v = u - 360.0 * periods
        j = np.clip(np.floor(v / self.spacing_deg).astype(np.intp), 0, self.pressure.shape[-1] - 1)
        t = (v - j * self.spacing_deg) / self.spacing_deg
        return periods, j, t

    def _gather(self, a: np.ndarray, j: np.ndarray) -> np.ndarray:
        shape = np.broadcast_shapes(a.shape[:-1] + (1,), j.shape)
        return np.take_along_axis(np.broadcast_to(a, shape[:-1] + a.shape[-1:]), np.broadcast_to(j, shape), -1)

    def value(self, theta_deg) -> np.ndarray:
        """P_i(θ), the linear profile at each angle."""
        _periods, j, t = self._locate(theta_deg)
        p0, p1 = self._gather(self.pressure, j), self._gather(self._next, j)
        return p0 + (p1 - p0) * t

    def primitive(self, theta_deg) -> np.ndarray:
        """F_i(θ): the exact integral of the profile from probe 0 of the ring to θ (Pa·deg), unwrapped."""
        periods, j, t = self._locate(theta_deg)
        p0, p1 = self._gather(self.pressure, j), self._gather(self._next, j)
        within = self.spacing_deg * (p0 * t + 0.5 * (p1 - p0) * t * t)
        return periods * self.period_integral[..., None] + self._gather(self.cumulative, j) + within

    def mean_over(self, start_deg, end_deg) -> np.ndarray:
        """Mean of the profile over the arc from ``start_deg`` to ``end_deg`` (end > start, unwrapped)."""
        with np.errstate(invalid="ignore", divide="ignore"):
            return (self.primitive(end_deg) - self.primitive(start_deg)) / (np.asarray(end_deg) - start_deg)
