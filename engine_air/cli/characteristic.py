"""``engine-air characteristic PROJECT --mach M [--mach M …] (--altitude-m H | --altitude-ft H | --fl FL)
[--case NAME] [--json] [--csv FILE] [--png FILE]``: the inlet characteristic at flight conditions (method §16).

Exit codes: 0 every limit judged at the operating points holds, 1 some limit fails there, 2 unusable input.
"""

from __future__ import annotations

import io
import json
import math
import sys

from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, UsageError, cases, check_output_path, err, load, out,
                                   path_text, recheck_outputs, with_tables)
from engine_air.cli.point import add_altitude_options, altitude_m

EPILOG = ("The characteristic: recovery against captured mass-flow ratio as the engine's corrected flow is swept "
          "from 2 %% to 99.5 %% of face choking, from the project's characteristics table where it covers the "
          "condition (source \"data\"), else from the model. Exit codes: 0 every limit judged at the operating "
          "points holds; 1 some limit fails; 2 unusable input.")


def add_parser(sub) -> None:
    c = sub.add_parser("characteristic", help="recovery against mass-flow ratio at flight conditions",
                       epilog=EPILOG)
    c.add_argument("project")
    c.add_argument("--mach", type=float, action="append", required=True, help="flight Mach number (repeatable)")
    add_altitude_options(c)
    c.add_argument("--case", help="case whose rating and incidence pick the curve; default the first")
    c.add_argument("--json", action="store_true", help="write the curves as JSON on stdout")
    c.add_argument("--csv", help="CSV file: one row per point of each curve")
    c.add_argument("--png", help="PNG picture of the curves")
    c.set_defaults(handler=run)


def curves_csv(curves) -> str:
    lines = ["mach,altitude_m,case,source,mass_flow_ratio,recovery"]
    for c in curves:
        for x, y in zip(c.mass_flow_ratio, c.recovery):
            cells = [repr(float(c.mach)), repr(float(c.altitude_m)), json.dumps(c.case), c.source,
                     "" if not math.isfinite(x) else repr(float(x)), "" if not math.isfinite(y) else repr(float(y))]
            lines.append(",".join(cells))
    return "\n".join(lines) + "\n"


def _write(path, data: bytes, inputs) -> None:
    from engine_air.outputs.writer import write_output_bytes

    write_output_bytes(path, data, inputs)


def run(args) -> int:
    from engine_air.envelope.characteristic import characteristic_at, measured_rows

    for m in args.mach:
        if not math.isfinite(m) or m < 0.0:
            raise UsageError(f"--mach {m}: must be a finite number, 0 or more")
    alt = altitude_m(args)
    targets = [(o, p) for o, p in (("--csv", args.csv), ("--png", args.png)) if p]
    inputs = (args.project,)  # every file this run reads
    for option, path in targets:
        check_output_path(path, option, inputs)
    project = load(args.project)
    inputs = with_tables(inputs, project)
    recheck_outputs(targets, inputs)
    case = project.cases[0] if args.case is None else project.case(cases(project, [args.case])[0])
    curves = [characteristic_at(project, case, m, alt) for m in args.mach]
    say = err if (args.json or not targets) else out  # stdout carries only the JSON when JSON is written
    if args.json or not targets:
        json.dump({"curves": [c.as_json() for c in curves]}, sys.stdout, indent=2, allow_nan=False)
        sys.stdout.write("\n")
    if args.csv:
        _write(args.csv, curves_csv(curves).encode("utf-8"), inputs)
        say(f"wrote {sum(len(c.recovery) for c in curves)} rows to {path_text(args.csv)}")
    if args.png:
        from engine_air.outputs.characteristic_picture import characteristic_figure

        title = f"{project.title or 'inlet'}: characteristic at {alt:g} m, case {case.name}"
        fig = characteristic_figure(curves, [measured_rows(project, c.mach, case) for c in curves], title)
        buffer = io.BytesIO()
        fig.savefig(buffer, format="png")
        _write(args.png, buffer.getvalue(), inputs)
        say(f"wrote {path_text(args.png)}")
    verdicts = [c.holds for c in curves if c.holds is not None]
    return EXIT_FAILS if verdicts and not all(verdicts) else EXIT_HOLDS
