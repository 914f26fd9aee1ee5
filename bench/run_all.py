"""Every speed figure of the README's performance table, one line each, as ratios measured in the same run.

    python bench/run_all.py [--repeats R]

1. start-up: ``engine-air check`` on a copy of sample_projects/subsonic_transport_nacelle.toml with a 3 x 3 grid
   against ``python -c "import numpy, tomllib"`` (best of R wall times each; goal <= 2x); where
   PYTHONDONTWRITEBYTECODE is set (Python then compiles the package at every run, numpy's bytecode came with it),
   also with the package's bytecode cached, as an installed package starts;
2. cost per point of ``evaluate_conditions`` (match and checks) on a 201 x 201 grid given as two full arrays, first
   case, warm, against the numpy floor (bench/numpy_floor.py) and the scalar script (bench/scalar_model.py), the
   three timed in turns, for pitot and external-ramp (goals: >= 100x the script; <= 4x the floor for
   pitot, <= 6x for the others); then ``evaluate_project``'s whole-map cost per case-point (201 x 201, 121 x 101);
3. peak resident memory of ``map --csv`` against ``check`` on the two-ramp sample at 401 x 301 (two cases;
   each in a fresh interpreter; goal <= 1.5x);
4. the table writer against polars' ``write_csv`` on the same table (the two-ramp map, 401 x 301; goal: at
   least as fast; polars only for this comparison, skipped when it is not installed);
5. a cold axisymmetric-spike map (conical caches empty) against the external-ramp map (its ramp-trace caches
   empty too), 401 x 301 (goal <= 1.5x);
6. the pixel size of ``map --png`` (goal >= 900 x 600, with axes).

Figures are noisy on a shared machine: each is the best of several runs; CPU-time ratios are printed beside
the wall-time ones where threads do not enter.
"""

from __future__ import annotations

import argparse
import dataclasses
import datetime
import json
import os
import pathlib
import re
import subprocess
import sys
import tempfile
import time

import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(HERE))

from timing import best_time  # noqa: E402

SAMPLES = ROOT / "sample_projects"


def _grid_copy(sample: str, nm: int, na: int, folder: pathlib.Path) -> pathlib.Path:
    text = (SAMPLES / f"{sample}.toml").read_text(encoding="utf-8")
    text = re.sub(r"(?m)^mach_points\s*=.*$", f"mach_points = {nm}", text)
    text = re.sub(r"(?m)^altitude_points\s*=.*$", f"altitude_points = {na}", text)
    path = folder / f"{sample}_{nm}x{na}.toml"
    path.write_text(text, encoding="utf-8")
    return path


def _wall(cmd, repeats: int, env=None) -> float:
    best = float("inf")
    for _ in range(repeats):
        t = time.perf_counter()
        subprocess.run(cmd, capture_output=True, cwd=ROOT, env=env)
        best = min(best, time.perf_counter() - t)
    return best


def startup(folder, repeats):
    tiny = _grid_copy("subsonic_transport_nacelle", 3, 3, folder)
    bare = _wall([sys.executable, "-c", "import numpy, tomllib"], repeats)
    check = _wall([sys.executable, "-m", "engine_air.cli", "check", str(tiny)], repeats)
    print(f"start-up: check 3 x 3 / bare 'import numpy, tomllib' = {check / bare:.2f}x "
          f"({check * 1e3:.0f} ms / {bare * 1e3:.0f} ms; goal <= 2x)")
    if os.environ.get("PYTHONDONTWRITEBYTECODE"):
        # Python here caches no bytecode, so every run compiles the package (numpy's came compiled with it); an
        # installed package, or one run once without that setting, starts from cached bytecode: compiled here
        # into a temporary folder (PYTHONPYCACHEPREFIX), the project's own folders untouched
        env = dict(os.environ, PYTHONPYCACHEPREFIX=str(folder / "bytecode"))
        env.pop("PYTHONDONTWRITEBYTECODE")
        subprocess.run([sys.executable, "-m", "compileall", "-q", "engine_air"], capture_output=True, cwd=ROOT,
                       env=env)
        cached = _wall([sys.executable, "-m", "engine_air.cli", "check", str(tiny)], repeats, env)
        print(f"start-up with the package's bytecode cached: {cached / bare:.2f}x ({cached * 1e3:.0f} ms; "
              f"PYTHONDONTWRITEBYTECODE is set here, so the line above compiles the package at every run)")


def per_point(repeats):
    """Cost per point of ``evaluate_conditions`` (match and judging) on a 201 x 201 grid given as two full arrays
    (``numpy.broadcast_arrays``), the first case, warm (one call first); the package, the numpy floor and the
    scalar script (200 random grid points) timed in turns, R rounds, the least of each (wall and CPU time), so
    that all see the same machine."""
    import scalar_model
    from numpy_floor import floor_face_margin

    from engine_air.envelope.polygon import grid_axes
    from engine_air.envelope.conditions import evaluate_conditions
    from engine_air.project import load_project
    from engine_air.project.model import Grid

    for sample in ("subsonic_transport_nacelle", "supersonic_two_ramp"):
        project = load_project(SAMPLES / f"{sample}.toml")
        project = dataclasses.replace(project, grid=Grid(mach_points=201, altitude_points=201))
        mach, alt = grid_axes(project.envelope, project.grid)
        case = project.cases[0]
        m2, a2 = np.broadcast_arrays(mach[None, :], alt[:, None])
        rating = project.rating(case.rating)
        floor_args = (mach, alt, case.isa_offset_K, np.asarray(rating.theta, float),
                      np.asarray(rating.corrected_flow_kg_s, float), project.inlet.face_area_m2,
                      project.limits.face_mach_max)
        rng = np.random.default_rng(1)
        pts = [(mach[i], alt[j]) for i, j in zip(rng.integers(0, mach.size, 200), rng.integers(0, alt.size, 200))]
        runs = {"package": lambda: evaluate_conditions(project, case, m2, a2),
                "map axes": lambda: evaluate_conditions(project, case, mach[None, :], alt[:, None]),
                "floor": lambda: floor_face_margin(*floor_args),
                "scalar": lambda: [scalar_model.evaluate_point(project, case, m, h) for m, h in pts]}
        size = {"scalar": len(pts)}
        wall = {k: float("inf") for k in runs}
        cpu = dict(wall)
        for fn in runs.values():
            fn()
        for _ in range(max(1, repeats)):
            for k, fn in runs.items():
                t, c = time.perf_counter(), time.process_time()
                fn()
                wall[k] = min(wall[k], (time.perf_counter() - t) / size.get(k, m2.size))
                cpu[k] = min(cpu[k], (time.process_time() - c) / size.get(k, m2.size))
        print(f"per point, {project.inlet.type}: {wall['package'] * 1e9:.0f} ns wall, {cpu['package'] * 1e9:.0f} ns "
              f"CPU (given as a row and a column: {wall['map axes'] * 1e9:.0f} ns); scalar script / package = "
              f"{wall['scalar'] / wall['package']:,.0f}x wall, {cpu['scalar'] / cpu['package']:,.0f}x CPU "
              f"(goal >= 100x); package / numpy floor = {wall['package'] / wall['floor']:.1f}x wall, "
              f"{cpu['package'] / cpu['floor']:.1f}x CPU ({wall['floor'] * 1e9:.0f} ns per point, "
              f"bench/numpy_floor.py; goal <= 4x pitot, <= 6x the others)")

def per_case_point(repeats):
    """Whole-map cost per case-point of ``evaluate_project`` (match, checks, envelope mask, summary), least of R
    runs after one, wall and CPU time, at 201 x 201 and 121 x 101."""
    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.project import load_project
    from engine_air.project.model import Grid

    for sample in ("subsonic_transport_nacelle", "undersized_business_jet", "supersonic_two_ramp"):
        project = load_project(SAMPLES / f"{sample}.toml")
        for nm, na in ((201, 201), (121, 101)):
            p = dataclasses.replace(project, grid=Grid(mach_points=nm, altitude_points=na))
            n = nm * na * len(p.cases)
            evaluate_project(p)
            wall = cpu = float("inf")
            for _ in range(max(1, repeats)):
                t, c = time.perf_counter(), time.process_time()
                evaluate_project(p)
                wall, cpu = min(wall, time.perf_counter() - t), min(cpu, time.process_time() - c)
            print(f"evaluate_project per case-point, {sample} {nm} x {na} x {len(p.cases)}: "
                  f"{cpu / n * 1e9:.0f} ns CPU, {wall / n * 1e9:.0f} ns wall")


_PEAK = ("import resource, sys, contextlib, io\nsys.path.insert(0, {root!r})\nfrom engine_air.cli import main\n"
         "with contextlib.redirect_stdout(io.StringIO()):\n    main({argv!r})\n"
         "print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)")


def _peak_kb(argv) -> int:
    code = _PEAK.format(root=str(ROOT), argv=argv)
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    return int(done.stdout.strip().splitlines()[-1])


def memory(folder, repeats):
    big = _grid_copy("supersonic_two_ramp", 401, 301, folder)
    check = min(_peak_kb(["check", str(big)]) for _ in range(max(1, repeats // 2)))
    csv = min(_peak_kb(["map", str(big), "--csv", str(folder / "m.csv")]) for _ in range(max(1, repeats // 2)))
    print(f"map --csv peak RSS / check = {csv / check:.2f}x ({csv / 1024:.0f} MB / {check / 1024:.0f} MB, "
          f"401 x 301, 2 cases; goal <= 1.5x)")
    return big


def csv_speed(big, folder, repeats):
    try:
        import polars as pl
    except ImportError:
        print("CSV vs polars: skipped (polars is not installed; pip install polars for this comparison)")
        return
    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.outputs.table import point_table, write_point_table, write_table
    from engine_air.project import load_project

    result = evaluate_project(load_project(big))
    table = point_table(result)
    frame = pl.from_arrow(table)
    ours = theirs = streamed = float("inf")
    for _ in range(repeats):  # interleaved, so both see the same machine
        ours = min(ours, best_time(lambda: write_table(table, folder / "a.csv"), 1))
        theirs = min(theirs, best_time(lambda: frame.write_csv(folder / "b.csv"), 1))
        streamed = min(streamed, best_time(lambda: write_point_table(result, folder / "c.csv"), 1))
    print(f"CSV: polars write_csv / ours on the same table = {theirs / ours:.2f} (>= 1: ours at least as fast; "
          f"ours {ours * 1e3:.0f} ms, polars {theirs * 1e3:.0f} ms; map's streamed writer from the result "
          f"{streamed * 1e3:.0f} ms)")


def spike_vs_ramp(repeats):
    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.inlets import ramp_layout
    from engine_air.physics import conical
    from engine_air.project import load_project
    from engine_air.project.model import Grid

    def project(sample):
        p = load_project(SAMPLES / f"{sample}.toml")
        return dataclasses.replace(p, grid=Grid(mach_points=401, altitude_points=301))

    ramp, spike = project("supersonic_two_ramp"), project("supersonic_spike_nacelle")
    evaluate_project(ramp), evaluate_project(spike)

    def best(fn, clock):
        out = float("inf")
        for _ in range(repeats):
            conical.clear_cache()
            ramp_layout.clear_cache()  # both cold: the ramp's traces of a Mach row are cached too
            t = clock()
            fn()
            out = min(out, clock() - t)
        return out
    wall = best(lambda: evaluate_project(spike), time.perf_counter) / best(lambda: evaluate_project(ramp),
                                                                            time.perf_counter)
    cpu = best(lambda: evaluate_project(spike), time.process_time) / best(lambda: evaluate_project(ramp),
                                                                          time.process_time)
    print(f"cold spike map / ramp map (401 x 301) = {wall:.2f}x wall, {cpu:.2f}x CPU (goal <= 1.5x)")


def png_size(folder):
    import matplotlib.image as mpimg

    out = folder / "map.png"
    subprocess.run([sys.executable, "-m", "engine_air.cli", "map", str(SAMPLES / "supersonic_two_ramp.toml"),
                    "--png", str(out)], capture_output=True, cwd=ROOT)
    h, w = mpimg.imread(out).shape[:2]
    print(f"map --png: {w} x {h} px (goal >= 900 x 600, with axes)")


FIGURES = ("startup", "per-point", "memory", "csv", "spike", "png")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeats", type=int, default=5)
    ap.add_argument("--only", nargs="+", choices=FIGURES, help="only these figures (default: all)")
    args = ap.parse_args(argv)
    only = set(args.only or FIGURES)
    print(f"{datetime.date.today()}  python {sys.version.split()[0]}, numpy {np.__version__}; "
          f"load average {json.dumps(round(__import__('os').getloadavg()[0], 1))}")
    with tempfile.TemporaryDirectory() as tmp:
        folder = pathlib.Path(tmp)
        if "startup" in only:
            startup(folder, args.repeats)
        if "per-point" in only:
            per_point(args.repeats)
            per_case_point(args.repeats)
        big = memory(folder, args.repeats) if "memory" in only else _grid_copy("supersonic_two_ramp", 401, 301, folder)
        if "csv" in only:
            csv_speed(big, folder, args.repeats)
        if "spike" in only:
            spike_vs_ramp(args.repeats)
        if "png" in only:
            png_size(folder)
    return 0


if __name__ == "__main__":
    sys.exit(main())
