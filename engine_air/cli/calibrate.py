"""``engine-air calibrate PROJECT --fit KEY [--fit KEY …] --out NEW.toml [--json] [--png FILE]``: fit model
parameters to the project's characteristics table (method §17); the calibrated project is written as a new file,
never over PROJECT.

Exit codes: 0 fitted and written, 2 unusable input (no characteristics table, an unknown key, too few rows).
"""

from __future__ import annotations

import io
import json
import sys

from engine_air.cli.common import (EXIT_HOLDS, UsageError, check_output_path, load, out, path_text, recheck_outputs,
                                   with_tables)


def add_parser(sub) -> None:
    c = sub.add_parser("calibrate", help="fit model parameters to measured characteristics")
    c.add_argument("project")
    c.add_argument("--fit", action="append", required=True,
                   help="key to fit (repeatable): duct_loss_coefficient, internal_recovery_factor, "
                        "stable_flow_fraction")
    c.add_argument("--out", required=True, help="the calibrated project, a new file (never PROJECT itself)")
    c.add_argument("--json", action="store_true", help="write the fit as JSON on stdout")
    c.add_argument("--png", help="PNG picture of the data against the fitted model")
    c.set_defaults(handler=run)


def run(args) -> int:
    from engine_air.studies.calibrate import FITTABLE, calibrate
    for key in args.fit:
        if key not in FITTABLE:
            raise UsageError(f"--fit {key}: cannot be fitted; choose from {', '.join(FITTABLE)}")
    targets = [(o, p) for o, p in (("--out", args.out), ("--png", args.png)) if p]
    inputs = (args.project,)  # every file this run reads; the calibrated project is always a new file
    for option, path in targets:
        check_output_path(path, option, inputs)
    project = load(args.project)
    inputs = with_tables(inputs, project)
    recheck_outputs(targets, inputs)
    if project.characteristics is None:
        raise UsageError(f"{path_text(args.project)}: names no characteristics table ([characteristics] file) "
                         "to calibrate against")
    result = calibrate(project, project.characteristics.table, list(args.fit))
    from engine_air.project.save import save_project

    save_project(result.project, args.out)  # names the table relative to the new file's folder
    if args.json:
        json.dump(result.as_json(), sys.stdout, indent=2, allow_nan=False)
        sys.stdout.write("\n")
    else:
        for key, (value, error) in result.fitted.items():
            out(f"{key} = {value:.6g} ± {error:.2g} (standard error)")
        out(f"rms residual {result.rms_residual:.5f} over {len(result.curves)} zero-incidence curves")
        out(f"wrote {path_text(args.out)}")
    if args.png:
        from engine_air.outputs.characteristic_picture import calibration_figure
        from engine_air.outputs.writer import write_output_bytes

        buffer = io.BytesIO()
        calibration_figure(result, project.title).savefig(buffer, format="png")
        write_output_bytes(args.png, buffer.getvalue(), inputs)
    return EXIT_HOLDS
