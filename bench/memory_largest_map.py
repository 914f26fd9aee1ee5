"""Benchmark: peak memory and time of ``evaluate_project`` for the largest grid a project file may ask for.

    python bench/memory_largest_map.py [PROJECT.toml] [--mach-points N] [--altitude-points N] [--cases K]

(defaults: sample_projects/supersonic_two_ramp.toml, 500 x 500 = 250 000 points, the loader's per-case maximum
``project_file.MAX_GRID_POINTS``, with 3 cases: the sample's cases repeated with other ISA offsets as needed).

Each measurement runs in a fresh child process so that one does not inherit the other's heap. Prints, in MB
(10^6 bytes) and seconds:
1. the tracemalloc peak of the numpy/Python allocations made inside ``evaluate_project`` (tracemalloc
   slows the run, so its time is not the speed figure);
2. the growth of the process's resident set (psutil RSS after the call, and the high-water mark
   ``ru_maxrss`` where the platform gives it, minus RSS before) and the wall time of an untraced run;
3. the size of the result that is kept (sum of the bytes of the distinct arrays the points and their checks keep,
   in their instance state: fields, slots and anything cached there), per case and in all.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import pathlib
import subprocess
import sys
import time

HERE = pathlib.Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

DEFAULT_PROJECT = ROOT / "sample_projects" / "supersonic_two_ramp.toml"
MB = 1e6


def _project(path: str, nx: int, ny: int, n_cases: int):
    from engine_air.project.model import Case, Grid
    from engine_air.project import load_project

    project = load_project(path)
    cases = list(project.cases)
    k = 0
    while len(cases) < n_cases:
        base = project.cases[k % len(project.cases)]
        k += 1
        cases.append(Case(f"{base.name} (ISA{10 * k:+d})", base.rating, base.isa_offset_K + 10.0 * k))
    return dataclasses.replace(project, grid=Grid(mach_points=nx, altitude_points=ny), cases=tuple(cases[:n_cases]))


def _kept_bytes(result) -> int:
    import numpy as np

    seen: set[int] = set()
    total = 0

    def add(a):
        nonlocal total
        if isinstance(a, np.ndarray):
            base = a
            while base.base is not None and isinstance(base.base, np.ndarray):
                base = base.base
            if id(base) not in seen:
                seen.add(id(base))
                total += base.nbytes

    for cm in result.cases:
        for v in _state(cm.points).values():
            add(v)
        for c in cm.points.checks:
            for v in _state(c).values():
                add(v)
    add(result.inside)
    return total


def _state(obj) -> dict:
    """Everything an object keeps: its instance dict (fields, and anything cached there) and its slots."""
    state = dict(getattr(obj, "__dict__", {}))
    for cls in type(obj).__mro__:
        for name in getattr(cls, "__slots__", ()):
            if hasattr(obj, name):
                state[name] = getattr(obj, name)
    return state


def child(mode: str, path: str, nx: int, ny: int, n_cases: int) -> dict:
    """One measurement in this (fresh) process; returns figures as a dict."""
    import gc
    import tracemalloc

    import psutil

    from engine_air.envelope.evaluate import evaluate_project

    project = _project(path, nx, ny, n_cases)
    # warm the imports and caches on a tiny grid first
    evaluate_project(dataclasses.replace(project, grid=dataclasses.replace(project.grid, mach_points=3,
                                                                           altitude_points=3)))
    gc.collect()
    proc = psutil.Process()
    rss_before = proc.memory_info().rss
    out: dict = {"mode": mode, "points_per_case": nx * ny, "cases": n_cases}
    if mode == "traced":
        tracemalloc.start()
        t0 = time.perf_counter()
        result = evaluate_project(project)
        out["traced_seconds"] = time.perf_counter() - t0
        current, peak = tracemalloc.get_traced_memory()
        out["tracemalloc_peak_mb"] = peak / MB
        out["tracemalloc_kept_mb"] = current / MB
        _read_as_check_and_gui_do(result)
        gc.collect()
        out["tracemalloc_kept_after_reads_mb"] = tracemalloc.get_traced_memory()[0] / MB
        tracemalloc.stop()
    else:
        t0 = time.perf_counter()
        result = evaluate_project(project)
        out["seconds"] = time.perf_counter() - t0
        out["rss_growth_mb"] = (proc.memory_info().rss - rss_before) / MB
        try:
            import resource

            maxrss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss  # KiB on Linux
            if sys.platform == "darwin":
                maxrss /= 1024
            out["peak_rss_growth_mb"] = (maxrss * 1024 - rss_before) / MB
        except (ImportError, AttributeError):
            pass
        out["kept_result_mb"] = _kept_bytes(result) / MB
        _read_as_check_and_gui_do(result)
        out["kept_after_reads_mb"] = _kept_bytes(result) / MB
    return out


def _read_as_check_and_gui_do(result) -> None:
    """Read the result as ``engine-air check`` (the summary's verdict), the map window (the least-margin map and
    what limits it, the shown quantity, the failing points, a point's record) and the table writer do, so that
    anything cached by a read would show in what is kept after."""
    from engine_air.envelope.evaluate import WORST, verdict_text
    from engine_air.envelope.ranking import limiting_map
    from engine_air.outputs.point_record import point_record

    verdict_text(result)
    for case in [WORST] + [c.name for c in result.cases]:
        limiting_map(result, case)
        result.quantity(case, "worst_relative_margin")
        result.quantity(case, "face_mach_margin")
        result.failing(case)
    for cm in result.cases:
        point_record(cm.points, (0, 0), cm.name)
        for c in cm.points.checks:
            c.margin, c.relative_margin, c.fails  # noqa: B018 (read, as the table writer does)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("project", nargs="?", default=str(DEFAULT_PROJECT))
    ap.add_argument("--mach-points", type=int, default=500)
    ap.add_argument("--altitude-points", type=int, default=500)
    ap.add_argument("--cases", type=int, default=3)
    ap.add_argument("--child", choices=("traced", "plain"), help=argparse.SUPPRESS)
    args = ap.parse_args(argv)
    if args.child:
        print(json.dumps(child(args.child, args.project, args.mach_points, args.altitude_points, args.cases)))
        return 0

    figures = {}
    for mode in ("plain", "traced"):
        cmd = [sys.executable, __file__, args.project, "--mach-points", str(args.mach_points),
               "--altitude-points", str(args.altitude_points), "--cases", str(args.cases), "--child", mode]
        res = subprocess.run(cmd, capture_output=True, text=True, check=True)
        figures.update(json.loads(res.stdout.strip().splitlines()[-1]))

    n = args.mach_points * args.altitude_points
    print(f"evaluate_project, {pathlib.Path(args.project).name}: {args.mach_points} x {args.altitude_points} = "
          f"{n} points per case, {args.cases} cases ({n * args.cases} case-points)")
    print(f"  wall time (untraced)           {figures['seconds']:8.2f} s")
    print(f"  tracemalloc peak               {figures['tracemalloc_peak_mb']:8.1f} MB  "
          f"({figures['tracemalloc_peak_mb'] / args.cases:.1f} MB per case)")
    print(f"  tracemalloc kept after return  {figures['tracemalloc_kept_mb']:8.1f} MB")
    print(f"  RSS growth after return        {figures['rss_growth_mb']:8.1f} MB")
    if "peak_rss_growth_mb" in figures:
        print(f"  peak RSS growth (ru_maxrss)    {figures['peak_rss_growth_mb']:8.1f} MB")
    print(f"  arrays kept in the result      {figures['kept_result_mb']:8.1f} MB  "
          f"({figures['kept_result_mb'] / args.cases:.1f} MB per case, "
          f"{figures['kept_result_mb'] * MB / (n * args.cases):.0f} bytes per case-point)")
    print(f"  kept after check's and the GUI's reads {figures['kept_after_reads_mb']:8.1f} MB in arrays, "
          f"{figures['tracemalloc_kept_after_reads_mb']:.1f} MB traced")
    print(f"  traced run time (not a speed figure) {figures['traced_seconds']:.2f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
