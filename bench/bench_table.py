"""Benchmark: the table writer (engine_air.outputs.table) against numpy.savetxt, and map --csv against check.

    python bench/bench_table.py [PROJECT.toml] [--mach-points 401] [--altitude-points 301] [--repeats 3]

(default: sample_projects/supersonic_two_ramp.toml, two cases, on a 401 x 301 grid: 241 402 rows)

Prints, best of R repeats, all in the same run:
1. the table writer's CSV of every grid point and case (all columns of ``map --csv``), and its Parquet;
2. ``numpy.savetxt`` (default format "%.18e", delimiter ",") of the same float columns;
   goal: the CSV writer at least 4x faster than numpy.savetxt;
3. the whole ``engine-air map PROJECT --csv FILE`` and ``engine-air check PROJECT`` on the same file;
   goal: map --csv within 5x of check.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import os
import pathlib
import re
import sys
import tempfile
import time

import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

from engine_air.cli import main  # noqa: E402
from engine_air.envelope.evaluate import evaluate_project  # noqa: E402
from engine_air.outputs.table import point_table, write_table  # noqa: E402
from engine_air.project.toml_file import load_project  # noqa: E402

SAVETXT_RATIO_GOAL = 4.0
MAP_OVER_CHECK_GOAL = 5.0


def best_of(repeats: int, fn) -> float:
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def main_bench() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("project", nargs="?", default=str(ROOT / "sample_projects" / "supersonic_two_ramp.toml"))
    ap.add_argument("--mach-points", type=int, default=401)
    ap.add_argument("--altitude-points", type=int, default=301)
    ap.add_argument("--repeats", type=int, default=3)
    args = ap.parse_args()
    print(f"load average before the run: {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores "
          "(figures are noisy on a shared machine)")

    with tempfile.TemporaryDirectory() as tmp:
        tmp = pathlib.Path(tmp)
        text = pathlib.Path(args.project).read_text(encoding="utf-8")
        text = re.sub(r"(?m)^mach_points\s*=.*$", f"mach_points = {args.mach_points}", text)
        text = re.sub(r"(?m)^altitude_points\s*=.*$", f"altitude_points = {args.altitude_points}", text)
        project_file = tmp / "bench.toml"
        project_file.write_text(text, encoding="utf-8")

        result = evaluate_project(load_project(project_file))
        table = point_table(result)
        rows = table.num_rows
        floats = np.column_stack([table.column(k).to_numpy(zero_copy_only=False).astype(float)
                                  for k, t in zip(table.column_names, table.schema.types) if str(t) == "double"])
        csv_path, pq_path, txt_path = tmp / "t.csv", tmp / "t.parquet", tmp / "t.txt"

        t_table = best_of(args.repeats, lambda: point_table(result))
        t_csv = best_of(args.repeats, lambda: write_table(table, csv_path, "csv"))
        t_pq = best_of(args.repeats, lambda: write_table(table, pq_path, "parquet"))
        t_savetxt = best_of(args.repeats, lambda: np.savetxt(txt_path, floats, delimiter=","))

        def cli(argv):
            with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
                main(argv)

        map_csv = tmp / "map.csv"
        t_check = best_of(args.repeats, lambda: cli(["check", str(project_file)]))
        t_map = best_of(args.repeats, lambda: cli(["map", str(project_file), "--csv", str(map_csv)]))

        print(f"project {pathlib.Path(args.project).name}: {args.mach_points} x {args.altitude_points} grid, "
              f"{len(result.cases)} cases = {rows} rows, {table.num_columns} columns "
              f"({floats.shape[1]} float columns); best of {args.repeats}")
        print(f"  build the table (point_table)          {t_table:8.3f} s")
        print(f"  write CSV (orjson + pyarrow)           {t_csv:8.3f} s   "
              f"{os.path.getsize(csv_path) / 1e6:7.1f} MB")
        print(f"  write Parquet                          {t_pq:8.3f} s   {os.path.getsize(pq_path) / 1e6:7.1f} MB")
        print(f"  numpy.savetxt of the same floats       {t_savetxt:8.3f} s   "
              f"{os.path.getsize(txt_path) / 1e6:7.1f} MB")
        ratio = t_savetxt / t_csv
        print(f"  savetxt / CSV write = {ratio:.1f}x  (goal >= {SAVETXT_RATIO_GOAL:g}x: "
              f"{'met' if ratio >= SAVETXT_RATIO_GOAL else 'NOT met'}); savetxt / (table + CSV) = "
              f"{t_savetxt / (t_table + t_csv):.1f}x")
        print(f"  engine-air check                       {t_check:8.3f} s")
        print(f"  engine-air map --csv                   {t_map:8.3f} s")
        over = t_map / t_check
        print(f"  map --csv / check = {over:.2f}x  (goal <= {MAP_OVER_CHECK_GOAL:g}x: "
              f"{'met' if over <= MAP_OVER_CHECK_GOAL else 'NOT met'})")


if __name__ == "__main__":
    main_bench()
