"""Benchmark: ``evaluate_project`` per point against a minimal numpy floor and against the scalar model.

    python bench/numpy_floor.py [PROJECT.toml ...] [--grid N] [--repeats R] [--scalar-points K]

The *floor* is the least numpy work a map point needs for the face-Mach check alone, written directly here:
the 1976 standard atmosphere (two layers, 0-20 km), the totals, theta2 and the demand (``numpy.interp``), the
face Mach as the subsonic root of the mass-flow function (Newton, 6 steps from M = 0.3) and the margin
limit - M2. Every other quantity of the match (shock system, capture, throat, doors, drag, ledger, the other
checks) is what ``evaluate_project`` does beyond the floor. Prints, per case-point: the vectorised map's time,
the floor's, their ratio, and the scalar model's (bench/scalar_model.py, on K random grid points) with the
vectorised speed-up over it. Best of R runs (bench/timing.py).
"""

from __future__ import annotations

import argparse
import dataclasses
import pathlib
import sys

import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(HERE))

import scalar_model  # noqa: E402
from timing import best_time  # noqa: E402

from engine_air.envelope.evaluate import evaluate_project  # noqa: E402
from engine_air.envelope.polygon import grid_axes  # noqa: E402
from engine_air.project import load_project  # noqa: E402
from engine_air.project.model import Grid  # noqa: E402

GAMMA, R_AIR, G0 = 1.4, 8314.32 / 28.9644, 9.80665
T_REF, P_REF = 288.15, 101325.0


def floor_face_margin(mach_1d, alt_1d, isa_offset_k, theta, corrected_flow, face_area, face_mach_max):
    """The floor: face-Mach margin on the (altitude, Mach) grid with the fewest numpy operations."""
    h = alt_1d[:, None]
    t_std = np.where(h < 11000.0, 288.15 - 6.5e-3 * h, 216.65)
    p = np.where(h < 11000.0, 101325.0 * (t_std / 288.15) ** (G0 / (R_AIR * 6.5e-3)),
                 22632.06 * np.exp(-G0 * (h - 11000.0) / (R_AIR * 216.65)))
    m0 = mach_1d[None, :]
    base = 1.0 + 0.2 * m0 * m0
    tt0 = (t_std + isa_offset_k) * base  # (altitude, Mach)
    pt0 = p * base ** 3.5  # the totals (the face Mach needs only theta2: pressures cancel in W_c2)
    theta2 = tt0 / T_REF
    wc2 = np.interp(theta2, theta, corrected_flow)
    target = wc2 * np.sqrt(T_REF) / (P_REF * face_area)  # = MFP(M2)
    k = np.sqrt(GAMMA / R_AIR)
    m = np.full(target.shape, 0.3)
    for _ in range(6):  # Newton on MFP(M) = k M b^-3, b = 1 + 0.2 M^2; dMFP/dM = k b^-4 (1 - M^2)
        b = 1.0 + 0.2 * m * m
        m = m - (k * m * b ** -3.0 - target) / (k * b ** -4.0 * (1.0 - m * m))
    return face_mach_max - m, pt0


def bench_one(path: str, grid: int, repeats: int, scalar_points: int) -> None:
    project = load_project(path)
    project = dataclasses.replace(project, grid=Grid(mach_points=grid, altitude_points=grid))
    n_cases, n_points = len(project.cases), grid * grid
    mach_1d, alt_1d = grid_axes(project.envelope, project.grid)

    evaluate_project(project)  # warm-up: imports, per-Mach caches
    t_map = best_time(lambda: evaluate_project(project), repeats)

    def floor():
        for case in project.cases:
            r = project.rating(case.rating)
            floor_face_margin(mach_1d, alt_1d, case.isa_offset_K, np.asarray(r.theta, float),
                              np.asarray(r.corrected_flow_kg_s, float), project.inlet.face_area_m2,
                              project.limits.face_mach_max)

    case = project.cases[0]
    r = project.rating(case.rating)
    margin, _ = floor_face_margin(mach_1d, alt_1d, case.isa_offset_K, np.asarray(r.theta, float),
                                  np.asarray(r.corrected_flow_kg_s, float), project.inlet.face_area_m2,
                                  project.limits.face_mach_max)
    full = evaluate_project(dataclasses.replace(project, cases=(case,))).cases[0].points.face_mach_margin
    ok = alt_1d <= 20000.0  # the floor's atmosphere stops at 20 km
    agree = np.nanmax(np.abs(margin[ok] - full[ok]))
    t_floor = best_time(floor, repeats)
    per_map = t_map / (n_points * n_cases)
    per_floor = t_floor / (n_points * n_cases)
    print(f"{pathlib.Path(path).name} ({project.inlet.type}): {grid} x {grid} x {n_cases} case(s), best of {repeats}")
    print(f"  evaluate_project      {per_map * 1e9:8.0f} ns per case-point")
    print(f"  numpy floor           {per_floor * 1e9:8.0f} ns per case-point  "
          f"(evaluate_project / floor = {per_map / per_floor:.1f}x; face-Mach margins agree to {agree:.1e})")
    if project.inlet.type not in scalar_model.SUPPORTED_TYPES:
        print(f"  scalar model          (none for {project.inlet.type})")
        return
    rng = np.random.default_rng(1)
    mi, ai = rng.integers(0, mach_1d.size, scalar_points), rng.integers(0, alt_1d.size, scalar_points)

    def scalar():
        for case in project.cases:
            for j, k in zip(mi, ai):
                scalar_model.evaluate_point(project, case, mach_1d[j], alt_1d[k])

    per_scalar = best_time(scalar, 3) / (scalar_points * n_cases)
    print(f"  scalar model          {per_scalar * 1e9:8.0f} ns per case-point  "
          f"(scalar / evaluate_project = {per_scalar / per_map:.0f}x)")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("projects", nargs="*", default=[str(ROOT / "sample_projects" / n) for n in (
        "undersized_business_jet.toml", "supersonic_two_ramp.toml", "variable_geometry_fighter.toml")])
    ap.add_argument("--grid", type=int, default=201)
    ap.add_argument("--repeats", type=int, default=7)
    ap.add_argument("--scalar-points", type=int, default=200)
    args = ap.parse_args(argv)
    for path in args.projects:
        bench_one(path, args.grid, args.repeats, args.scalar_points)
    return 0


if __name__ == "__main__":
    sys.exit(main())
