"""The least numpy work per point of a pitot map: the floor that the package's cost per point is measured against.

    python bench/numpy_floor.py [PROJECT.toml] [--grid N]

Over the same (altitude, Mach) grid as the package and nothing else: the standard atmosphere (troposphere and
lower stratosphere, US Standard Atmosphere 1976 layer formulas), free-stream totals, the engine's corrected-flow
demand from its theta table (``numpy.interp``), the engine-face Mach number from the mass-flow function by a
fixed number of vectorised Newton steps, and the face-Mach margin. No shocks, no flags, no checks beyond that
one margin: a lower bound for what ``evaluate_conditions`` does per point, written from the relations, not from
the package.
"""

from __future__ import annotations

import argparse
import pathlib
import sys

import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))
sys.path.insert(0, str(HERE))

G0, R, GAMMA = 9.80665, 287.05287, 1.4
P_SL, T_SL = 101325.0, 288.15


def floor_map(mach, altitude_m, theta_table, flow_table, face_area_m2, recovery, face_mach_max):
    """Face-Mach margin at every point of ``mach`` x ``altitude_m`` (broadcast arrays); the floor's whole work."""
    h = altitude_m
    t = np.where(h < 11000.0, T_SL - 0.0065 * h, 216.65)
    p = np.where(h < 11000.0, P_SL * (t / T_SL) ** (G0 / (0.0065 * R)),
                 22632.06 * np.exp(-G0 * (h - 11000.0) / (R * 216.65)))
    x = 1.0 + 0.5 * (GAMMA - 1.0) * mach * mach
    tt, pt = t * x, p * x ** (GAMMA / (GAMMA - 1.0)) * recovery
    theta = tt / T_SL
    w = np.interp(theta, theta_table, flow_table) * (pt / P_SL) / np.sqrt(theta)
    target = w * np.sqrt(tt) / (face_area_m2 * pt)  # mass-flow parameter at the face
    k = np.sqrt(GAMMA / R)
    m = np.full(np.shape(target), 0.3)
    for _ in range(6):  # Newton on MFP(M) = k M (1 + (g-1)/2 M^2)^(-(g+1)/(2(g-1))), subsonic branch
        base = 1.0 + 0.5 * (GAMMA - 1.0) * m * m
        f = k * m * base ** (-(GAMMA + 1.0) / (2.0 * (GAMMA - 1.0)))
        df = f * (1.0 / m - (GAMMA + 1.0) * 0.5 * m / base)
        m = np.clip(m - (f - target) / df, 1e-6, 1.0)
    return face_mach_max - m


def floor_inputs(project):
    """The floor's arguments from a project (its first case) on the project's own grid."""
    from engine_air.envelope.polygon import grid_axes

    mach, alt = grid_axes(project.envelope, project.grid)
    case = project.cases[0]
    rating = next(r for r in project.ratings if r.name == case.rating)
    return (mach[None, :], alt[:, None], np.asarray(rating.theta), np.asarray(rating.corrected_flow_kg_s),
            project.inlet.face_area_m2, 0.97, project.limits.face_mach_max)


def main(argv=None) -> int:
    from timing import best_time

    from engine_air.project import load_project

    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("project", nargs="?", default=str(HERE.parent / "sample_projects" /
                                                       "subsonic_transport_nacelle.toml"))
    args = ap.parse_args(argv)
    inputs = floor_inputs(load_project(args.project))
    n = np.broadcast(inputs[0], inputs[1]).size
    t = best_time(lambda: floor_map(*inputs), 20)
    print(f"numpy floor: {t * 1e3:.2f} ms for {n} points ({t / n * 1e9:.0f} ns per point)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
