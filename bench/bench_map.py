"""Benchmark: whole-map evaluation of a sample project, against the scalar model and numpy.exp.

    python bench/bench_map.py [PROJECT.toml ...] [--grid N] [--repeats R] [--scalar-points K]

(default: sample_projects/supersonic_two_ramp.toml, ramp shocks and the streamline trace, and
sample_projects/supersonic_spike_nacelle.toml, the axisymmetric spike with its Taylor-Maccoll solution per Mach column)

Prints, for the vectorised ``engine_air.envelope.evaluate.evaluate_project`` on an N x N grid (default 201 x 201,
every case, best of R repeats):
1. points per second (case-points: grid points x cases);
2. the speed ratio vectorised / scalar (bench/scalar_model.py on K random grid points), goal >= 100x;
3. the cost per point as a multiple of one numpy.exp over a float64 array of the same size, timed in the
   same run: (time per case-map / n_points) / (time of np.exp on n_points / n_points), goal <= 150.
4. for an inlet whose shock system is cached per flight Mach column (the spike's conical flow): the first map
   with empty caches ("cold") beside the best of R ("warm", caches filled by the warm-up).
Last, the whole-map time of each type against the external-ramp map's (goal: spike or mixed within 3x).
"""

from __future__ import annotations

import argparse
import dataclasses
import pathlib
import sys
import time

import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(HERE))

import scalar_model  # noqa: E402

from timing import best_time  # noqa: E402
from engine_air.envelope.polygon import grid_axes  # noqa: E402
from engine_air.envelope.evaluate import evaluate_project  # noqa: E402
from engine_air.project.model import Grid  # noqa: E402
from engine_air.project import load_project  # noqa: E402

SPEED_RATIO_GOAL = 100.0
EXP_MULTIPLE_GOAL = 150.0
TYPE_RATIO_GOAL = 3.0


def clear_caches():
    """Empty the per-Mach-column caches of the shock systems (conical flow, ramp traces), for a cold timing."""
    from engine_air.inlets import ramp_layout
    from engine_air.physics import conical

    conical.clear_cache()
    ramp_layout.clear_cache()


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("projects", nargs="*", default=[str(ROOT / "sample_projects" / "supersonic_two_ramp.toml"),
                                                    str(ROOT / "sample_projects" / "supersonic_spike_nacelle.toml")])
    ap.add_argument("--grid", type=int, default=201, help="grid points per axis (>= 201 gives >= 40 000 points)")
    ap.add_argument("--repeats", type=int, default=7)
    ap.add_argument("--scalar-points", type=int, default=300)
    args = ap.parse_args(argv)
    times = {}
    for i, path in enumerate(args.projects):
        if i:
            print()
        times[path] = bench_one(path, args)
    ramp = [t for t in times.values() if t[0] == "external-ramp"]
    if ramp and len(times) > 1:
        print()
        base_cold, base_warm = ramp[0][1], ramp[0][2]
        for path, (kind, cold, warm) in times.items():
            if kind == "external-ramp":
                continue
            ok = "meets" if max(cold / base_cold, warm / base_warm) <= TYPE_RATIO_GOAL else "MISSES"
            print(f"{kind} map vs external-ramp map (201 x 201 x cases): cold {cold / base_cold:.2f}x, "
                  f"warm {warm / base_warm:.2f}x  (goal <= {TYPE_RATIO_GOAL:.0f}x: {ok})")
    return 0


def bench_one(path, args):
    project = load_project(path)
    project = dataclasses.replace(project, grid=Grid(mach_points=args.grid, altitude_points=args.grid))
    n_points = args.grid * args.grid
    n_cases = len(project.cases)

    evaluate_project(project)  # warm-up (imports, tables)
    t_cold = float("inf")
    for _ in range(min(3, args.repeats)):
        clear_caches()
        t = time.perf_counter()
        evaluate_project(project)
        t_cold = min(t_cold, time.perf_counter() - t)
    t_map = best_time(lambda: evaluate_project(project), args.repeats)
    t_case = t_map / n_cases

    x = np.random.default_rng(0).uniform(-1.0, 1.0, n_points)
    t_exp = best_time(lambda: np.exp(x), max(20, 3 * args.repeats))

    # scalar model on a random subset of the same grid, every case
    mach_1d, alt_1d = grid_axes(project.envelope, project.grid)
    rng = np.random.default_rng(1)
    mi = rng.integers(0, mach_1d.size, args.scalar_points)
    ai = rng.integers(0, alt_1d.size, args.scalar_points)

    if project.inlet.type not in scalar_model.SUPPORTED_TYPES:
        print(f"project: {pathlib.Path(path).name}: {project.title}")
        print(f"grid: {args.grid} x {args.grid} = {n_points} points, {n_cases} case(s); best of {args.repeats}")
        print(f"whole map, caches empty (cold): {t_cold * 1e3:.1f} ms; filled (warm): {t_map * 1e3:.1f} ms; "
              f"per case-map warm {t_case * 1e3:.2f} ms")
        print(f"1. vectorised throughput (warm): {n_points * n_cases / t_map:,.0f} points/s")
        print(f"2. (no scalar model for {project.inlet.type})")
        print(f"3. cost per point (warm): {(t_case / n_points) / (t_exp / n_points):.1f} x numpy.exp")
        return project.inlet.type, t_cold, t_map

    def run_scalar():
        for case in project.cases:
            for j, k in zip(mi, ai):
                scalar_model.evaluate_point(project, case, mach_1d[j], alt_1d[k])

    t_scalar = best_time(run_scalar, 3)
    per_point_vec = t_case / n_points
    per_point_scalar = t_scalar / (args.scalar_points * n_cases)

    points_per_s = n_points * n_cases / t_map
    ratio = per_point_scalar / per_point_vec
    exp_multiple = per_point_vec / (t_exp / n_points)

    print(f"project: {pathlib.Path(path).name}: {project.title}")
    print(f"grid: {args.grid} x {args.grid} = {n_points} points, {n_cases} case(s); best of {args.repeats}")
    print(f"whole map (evaluate_project, all cases): {t_map * 1e3:.1f} ms (caches empty: {t_cold * 1e3:.1f} ms); "
          f"per case-map {t_case * 1e3:.2f} ms")
    print(f"numpy.exp on {n_points} float64: {t_exp * 1e6:.1f} us")
    print(f"scalar model: {args.scalar_points} points x {n_cases} case(s) in {t_scalar * 1e3:.1f} ms "
          f"({per_point_scalar * 1e6:.1f} us per point)")
    print()
    print(f"1. vectorised throughput: {points_per_s:,.0f} points/s ({per_point_vec * 1e9:.0f} ns per point)")
    ok = "meets" if ratio >= SPEED_RATIO_GOAL else "MISSES"
    print(f"2. vectorised / scalar speed ratio: {ratio:,.0f}x  (goal >= {SPEED_RATIO_GOAL:.0f}x: {ok})")
    ok = "meets" if exp_multiple <= EXP_MULTIPLE_GOAL else "MISSES"
    print(f"3. cost per point: {exp_multiple:.1f} x numpy.exp  (goal <= {EXP_MULTIPLE_GOAL:.0f}: {ok})")
    return project.inlet.type, t_cold, t_map


if __name__ == "__main__":
    sys.exit(main())
