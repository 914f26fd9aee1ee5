"""``engine-air pack PROJECT --out FOLDER [--quantity Q] [--case NAME]``: the review pack (HTML, PDF, pictures)."""

from __future__ import annotations

from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, UsageError, cases, check_input_path, check_not_inputs,
                                   load, out, path_text, write_error, recheck_outputs, with_tables)


def add_parser(sub) -> None:
    r = sub.add_parser("pack", help="review pack: one folder with an HTML page, the same review as a PDF, the maps and the inputs")
    r.add_argument("project")
    r.add_argument("--out", required=True, help="folder to write (created if needed)")
    r.add_argument("--quantity", action="append", help="quantity to map (repeatable); default: when a limit "
                   "fails, the least margin over every limit and each failing limit's own quantity; then face Mach "
                   "margin, recovery, spillage fraction, throat Mach")
    r.add_argument("--case", action="append", help="case name (repeatable); default every case")
    r.set_defaults(handler=run)


def run(args) -> int:
    from engine_air.outputs.quantities import QUANTITIES
    from engine_air.outputs.review_pack import write_review_pack
    from engine_air.project.errors import ProjectError

    check_input_path(args.out, "--out")
    inputs = (args.project,)  # every file this run reads
    check_not_inputs(args.out, "--out", inputs, folder=True)
    quantities = tuple(args.quantity) if args.quantity else None
    for q in quantities or ():
        if q not in QUANTITIES:
            raise UsageError(f"--quantity {q!r}: unknown quantity; choose from {', '.join(QUANTITIES)}")
    project = load(args.project)
    inputs = with_tables(inputs, project)
    recheck_outputs([("--out", args.out)], inputs, folder_option="--out")
    chosen = cases(project, args.case)
    try:
        pack = write_review_pack(args.project, args.out, quantities=quantities, case_names=chosen,
                                 inputs=inputs)
    except OSError as exc:
        if isinstance(exc, ProjectError):
            raise
        raise write_error(args.out, "review pack", exc) from None
    out(f"wrote {path_text(pack.index_path)} and {path_text(pack.pdf_path)} ({len(pack.pictures)} maps of "
        f"{', '.join(pack.quantities)}; {len(pack.section_pictures)} sections; inputs in {path_text(pack.project_path)})")
    out("VERDICT: " + ("every limit holds." if pack.holds else "some limit FAILS somewhere in the envelope."))
    return EXIT_HOLDS if pack.holds else EXIT_FAILS
