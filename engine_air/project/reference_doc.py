"""The file reference ``docs/project-file.md``, generated from the schema (``engine_air.project.schema``).

``python -m engine_air.project.reference_doc`` rewrites the file; ``python -m engine_air.project.reference_doc
--check`` exits 1 when the committed file differs from what the schema gives (a test does the same).
"""

from __future__ import annotations

import sys
from pathlib import Path

from engine_air.project import schema as S
from engine_air.project.atomic import write_bytes_atomic
from engine_air.project.schema_field import REQUIRED, Field

DOC_PATH = Path(__file__).resolve().parents[2] / "docs" / "project-file.md"


def _cell(text: str) -> str:
    return str(text).replace("|", "\\|").replace("\n", " ")


def _default(f: Field) -> str:
    if f.default is REQUIRED:
        return "required"
    if f.default is None:
        return "optional, none"
    if isinstance(f.default, str):
        return f'"{f.default}"' if f.default else '"" (empty)'
    if isinstance(f.default, bool):
        return "true" if f.default else "false"
    return f"{f.default:g}" if isinstance(f.default, float) else str(f.default)


def _allowed(f: Field) -> str:
    text = f.allowed_text()
    if f.path == "project.format":
        text = "one of " + ", ".join(str(x) for x in S.SUPPORTED_FORMATS)
    extra = []
    if f.same_length_as:
        extra.append(f"as many {'rows' if f.kind == 'number table' else 'entries'} as {f.same_length_as}")
    if f.row_length_as:
        extra.append(f"each row as long as {f.row_length_as}")
    if f.excludes:
        extra.append("not together with " + ", ".join(f.excludes))
    if f.requires:
        extra.append("only together with " + ", ".join(f.requires))
    return "; ".join([text] + extra)


def _kind(f: Field) -> str:
    return {"number or name": "number or text", "choice": "text", "number table": "list of number lists",
            "number or Mach table": "number or { mach, deg } table",
                   "named numbers": "table of numbers"}.get(
        f.kind, f.kind)


def reference_markdown() -> str:
    """The whole file reference as Markdown text."""
    out = [
        "# Project file reference",
        "",
        "<!-- Generated from engine_air/project/schema.py by `python -m engine_air.project.reference_doc`; "
        "do not edit by hand. -->",
        "",
        "A project file is TOML in SI units, one file per design variant. Every key is listed below once: its "
        "type, unit, allowed values, default and the inlet types it applies to (blank: every type). A key not "
        "listed here is an error (the message suggests the closest known key), and so is a key of another inlet "
        "type. Keys at their default value are left out when the program saves a file.",
        "",
        "Limits on the file as a whole: at most "
        f"{S.MAX_FILE_BYTES} bytes; dotted keys of at most {S.MAX_KEY_PARTS} parts; integers of at most 4300 "
        f"digits; at most {S.MAX_CASES} cases, {S.MAX_GRID_POINTS} grid points per case and "
        f"{S.MAX_CASE_POINTS} grid points over all cases; at most {S.MAX_ENVELOPE_VERTICES} envelope vertices.",
        "",
        "Inlet types: " + ", ".join(f"`{name}` ({kind.label})" for name, kind in S.inlet_types().items()) + ".",
        "",
        "Rules between tables: inlet.throat_area_m2 (and every scheduled throat area) must not exceed "
        "inlet.capture_area_m2; the inlet type's design checks hold for the fixed geometry and at each "
        "[inlet.schedule] row (for ramps: every ramp shock attached at that row's own shock-on-lip Mach number, "
        "total deflection at most 40 deg); rating and case names are unique; every case names a rating; the "
        "envelope polygon does not cross itself, repeats no neighbouring vertex and encloses an area.",
        "",
    ]
    for table in S.TABLES:
        header = f"[[{table.name}]]" if table.array else f"[{table.name}]"
        need = "required" if table.required else "optional"
        if table.array:
            need = "required, one or more" if table.required else "optional, any number"
        out += [f"## `{header}`", "", f"{table.description[0].upper()}{table.description[1:]} ({need}).", "",
                "| key | type | unit | allowed | default | inlet types | description |",
                "|---|---|---|---|---|---|---|"]
        for f in S.fields(table.name):
            types = ", ".join(f.inlet_types)
            out.append("| " + " | ".join(_cell(x) for x in (
                f"`{f.key}`", _kind(f), f.unit, _allowed(f), _default(f), types, f.description)) + " |")
        out.append("")
    return "\n".join(out)


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    text = reference_markdown()
    if "--check" in argv:
        current = DOC_PATH.read_text(encoding="utf-8") if DOC_PATH.exists() else ""
        if current != text:
            print(f"{DOC_PATH} is stale: run python -m engine_air.project.reference_doc", file=sys.stderr)
            return 1
        return 0
    DOC_PATH.parent.mkdir(parents=True, exist_ok=True)
    # whole or not at all: what the output writer (engine_air.outputs.writer) does for a file that no run reads;
    # called directly, since the project package sits below the outputs and never imports them
    write_bytes_atomic(DOC_PATH, text.encode("utf-8"))
    print(f"wrote {DOC_PATH}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
