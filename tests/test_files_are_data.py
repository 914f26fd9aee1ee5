"""Files are data (interfaces document): nothing in a project file is executed, and saving touches only the
chosen file, atomically.

1. The source of engine_air/ and app/ is searched for the ways text could be run or objects revived: eval(,
   exec(, compile(, __import__(, pickle, marshal, shelve, yaml.load, os.system, subprocess with shell=True.
   Comments and string literals are left out of the search (tokenize), and an AST pass finds the same calls
   however they are spelt. Legitimate uses are listed in ALLOWED with the reason.
2. ``save_project`` writes only the chosen path (the folder listing before and after differs by that file at
   most, no temporary file left) and, on any failing step, raises ProjectSaveError with a one-line message and
   leaves the old file byte-identical.
"""

from __future__ import annotations

import ast
import errno
import io
import os
import re
import tempfile
import tokenize
from dataclasses import replace
from pathlib import Path

import pytest

from engine_air.project import toml_file as pf
from engine_air.project.errors import ProjectSaveError

ROOT = Path(__file__).resolve().parent.parent
SOURCE_DIRS = ("engine_air", "app")
SAMPLE = ROOT / "sample_projects" / "subsonic_transport_nacelle.toml"

# Text patterns searched in the code (comments and strings removed).
PATTERNS = {
    "eval(": re.compile(r"\beval\s*\("),
    "exec(": re.compile(r"\bexec\s*\("),
    "compile(": re.compile(r"(?<![\w.])(?<!\. )compile\s*\("),  # the builtin, not re.compile
    "__import__(": re.compile(r"\b__import__\s*\("),
    "pickle": re.compile(r"\b(c?pickle|cloudpickle|dill|shelve)\b"),
    "marshal": re.compile(r"\bmarshal\b"),
    "yaml.load": re.compile(r"\byaml\s*\.\s*(load|unsafe_load|full_load)\b"),
    "os.system": re.compile(r"\bos\s*\.\s*(system|popen)\b"),
    "shell=True": re.compile(r"\bshell\s*=\s*True\b"),
}

# (file, pattern) -> why it is not file content being executed. Keep each entry justified.
ALLOWED = {
    ("app/main.py", "exec("): "QApplication.exec(): starts the Qt event loop; not Python's exec",
    ("app/recovery/offer.py", "exec("): "QMessageBox.exec(): runs a modal dialog; not Python's exec",
    ("app/window/changed_on_disk.py", "exec("): "QMessageBox.exec(): runs a modal dialog; not Python's exec",
}


def source_files() -> list[Path]:
    files = []
    for d in SOURCE_DIRS:
        files.extend(sorted((ROOT / d).rglob("*.py")))
    assert files
    return files


def code_without_comments_and_strings(path: Path) -> str:
    """The file's code tokens only, joined line by line (comments, docstrings and string literals dropped)."""
    out = []
    tokens = tokenize.generate_tokens(io.StringIO(path.read_text(encoding="utf-8")).readline)
    skip = {tokenize.COMMENT, tokenize.STRING}
    skip |= {getattr(tokenize, n) for n in ("FSTRING_START", "FSTRING_MIDDLE", "FSTRING_END") if hasattr(tokenize, n)}
    last_line = 0
    for tok in tokens:
        if tok.type in skip:
            continue
        if tok.start[0] != last_line:
            out.append("\n")
            last_line = tok.start[0]
        out.append(tok.string + " ")
    return "".join(out)


def test_no_code_execution_or_object_revival_in_the_source():
    found = set()
    for path in source_files():
        rel = path.relative_to(ROOT).as_posix()
        code = code_without_comments_and_strings(path)
        for name, rx in PATTERNS.items():
            if rx.search(code):
                found.add((rel, name))
    unexpected = sorted(found - set(ALLOWED))
    assert unexpected == [], f"code execution or unpickling in the source: {unexpected}"
    stale = sorted(set(ALLOWED) - found)
    assert stale == [], f"ALLOWED lists uses that are gone (remove them): {stale}"


def _dangerous_calls(tree: ast.AST) -> list[str]:
    bad = []
    for node in ast.walk(tree):
        if isinstance(node, (ast.Import, ast.ImportFrom)):
            names = [a.name for a in node.names] + ([node.module] if isinstance(node, ast.ImportFrom) and node.module else [])
            for n in names:
                if n.split(".")[0] in ("pickle", "cPickle", "marshal", "shelve", "dill", "cloudpickle", "yaml"):
                    bad.append(f"import {n} (line {node.lineno})")
        if isinstance(node, ast.Call):
            f = node.func
            if isinstance(f, ast.Name) and f.id in ("eval", "exec", "compile", "__import__"):
                bad.append(f"{f.id}() (line {node.lineno})")
            if isinstance(f, ast.Attribute) and f.attr in ("system", "popen") and isinstance(f.value, ast.Name) \
                    and f.value.id == "os":
                bad.append(f"os.{f.attr}() (line {node.lineno})")
            for kw in node.keywords:
                if kw.arg == "shell" and not (isinstance(kw.value, ast.Constant) and kw.value.value is False):
                    bad.append(f"shell= (line {node.lineno})")
            if isinstance(f, ast.Attribute) and f.attr in ("run_path", "run_module"):
                bad.append(f"runpy.{f.attr}() (line {node.lineno})")
    return bad


def test_ast_finds_no_eval_exec_pickle_or_shell():
    problems = {}
    for path in source_files():
        calls = _dangerous_calls(ast.parse(path.read_text(encoding="utf-8"), filename=str(path)))
        if calls:
            problems[path.relative_to(ROOT).as_posix()] = calls
    assert problems == {}


def test_the_search_itself_finds_what_it_looks_for(tmp_path):
    # the searches are not vacuous: a file with each construct is caught (and comments/strings are not)
    bad = tmp_path / "bad.py"
    bad.write_text("import pickle\nx = eval(text)\nexec(code)\nsubprocess.run(cmd, shell=True)\n"
                   "os.system(cmd)\nyaml.load(f)\n# eval(in a comment)\ns = 'exec(in a string)'\n", encoding="utf-8")
    code = code_without_comments_and_strings(bad)
    hits = {name for name, rx in PATTERNS.items() if rx.search(code)}
    assert hits == {"eval(", "exec(", "pickle", "shell=True", "os.system", "yaml.load"}
    assert "in a comment" not in code and "in a string" not in code
    assert len(_dangerous_calls(ast.parse(bad.read_text()))) == 5
    # Qt's method and re.compile are attribute calls, not the builtins
    ok = tmp_path / "ok.py"
    ok.write_text("app.exec()\nrx = re.compile('a')\n", encoding="utf-8")
    assert _dangerous_calls(ast.parse(ok.read_text())) == []
    assert not PATTERNS["compile("].search(code_without_comments_and_strings(ok))


def test_project_file_is_parsed_by_tomllib_only(tmp_path):
    # A file whose text is Python, or TOML strings that look like code, is only ever data.
    marker = tmp_path / "was_run"
    text = SAMPLE.read_text(encoding="utf-8").replace(
        'title = "Twin-engine transport, pitot nacelle study"',
        f"title = \"__import__('pathlib').Path({str(marker)!r}).touch()\"")
    path = tmp_path / "code_in_title.toml"
    path.write_text(text, encoding="utf-8")
    project = pf.load_project(path)
    assert project.title.startswith("__import__(")
    pf.save_project(project, tmp_path / "again.toml")
    assert pf.load_project(tmp_path / "again.toml").title == project.title
    assert not marker.exists()


# -- saving ---------------------------------------------------------------------------------------------------------

@pytest.fixture
def project():
    return pf.load_project(SAMPLE)


def listing(folder: Path) -> set[str]:
    return set(os.listdir(folder))


def test_save_writes_only_the_chosen_path(project, tmp_path):
    (tmp_path / "other.toml").write_text("x = 1\n", encoding="utf-8")
    (tmp_path / "notes.txt").write_text("keep me\n", encoding="utf-8")
    before = listing(tmp_path)
    target = tmp_path / "study.toml"
    pf.save_project(project, target)
    assert listing(tmp_path) == before | {"study.toml"}
    assert pf.load_project(target) == project
    # overwriting: same listing, new content
    changed = replace(project, title="changed")
    pf.save_project(changed, target)
    assert listing(tmp_path) == before | {"study.toml"}
    assert pf.load_project(target).title == "changed"
    assert (tmp_path / "other.toml").read_text(encoding="utf-8") == "x = 1\n"
    assert (tmp_path / "notes.txt").read_text(encoding="utf-8") == "keep me\n"


def test_save_through_a_symlink_replaces_the_linked_file_only(project, tmp_path):
    real_dir, link_dir = tmp_path / "real", tmp_path / "links"
    real_dir.mkdir()
    link_dir.mkdir()
    real = real_dir / "study.toml"
    pf.save_project(project, real)
    link = link_dir / "study.toml"
    link.symlink_to(real)
    before_real, before_link = listing(real_dir), listing(link_dir)
    pf.save_project(replace(project, title="via link"), link)
    assert listing(real_dir) == before_real and listing(link_dir) == before_link
    assert link.is_symlink() and pf.load_project(real).title == "via link"


def _failing_save(project, target: Path, monkeypatch, where: str, exc: OSError):
    """Make one step of save_project fail and return the ProjectSaveError raised."""
    if where == "replace":
        monkeypatch.setattr(pf.os, "replace", lambda *a, **k: (_ for _ in ()).throw(exc))
    elif where == "fsync":
        monkeypatch.setattr(pf.os, "fsync", lambda *a, **k: (_ for _ in ()).throw(exc))
    elif where == "chmod":
        monkeypatch.setattr(pf.os, "chmod", lambda *a, **k: (_ for _ in ()).throw(exc))
    elif where == "write":
        real = tempfile.NamedTemporaryFile

        class FailingWrite:
            def __init__(self, *a, **k):
                self._f = real(*a, **k)
                self.name = self._f.name

            def __enter__(self):
                return self

            def __exit__(self, *exc_info):
                return self._f.__exit__(*exc_info)

            def write(self, data):
                self._f.write(data[: len(data) // 2])  # half written, then the disk is full
                raise exc

            def __getattr__(self, name):
                return getattr(self._f, name)

        monkeypatch.setattr(pf.tempfile, "NamedTemporaryFile", FailingWrite)
    elif where == "read-only-folder":
        # tests run as root, for whom a read-only folder is still writable: simulate what a user would get
        def refuse(*a, **k):
            raise exc
        monkeypatch.setattr(pf.tempfile, "NamedTemporaryFile", refuse)
    else:
        raise AssertionError(where)
    with pytest.raises(ProjectSaveError) as info:
        pf.save_project(project, target)
    monkeypatch.undo()
    return info.value


FAILURES = [
    ("replace", OSError(errno.EXDEV, "Invalid cross-device link")),
    ("replace", PermissionError(errno.EPERM, "Operation not permitted")),  # read-only (immutable) target
    ("fsync", OSError(errno.EIO, "Input/output error")),
    ("write", OSError(errno.ENOSPC, "No space left on device")),
    ("chmod", PermissionError(errno.EPERM, "Operation not permitted")),
    ("read-only-folder", PermissionError(errno.EACCES, "Permission denied")),
    ("read-only-folder", OSError(errno.EROFS, "Read-only file system")),
]


@pytest.mark.parametrize("where, exc", FAILURES, ids=[f"{w}-{errno.errorcode[e.errno]}" for w, e in FAILURES])
def test_failed_save_keeps_the_old_file(project, tmp_path, monkeypatch, where, exc):
    target = tmp_path / "study.toml"
    pf.save_project(project, target)
    old = target.read_bytes()
    old_mode = os.stat(target).st_mode
    before = listing(tmp_path)
    err = _failing_save(replace(project, title="never written"), target, monkeypatch, where, exc)
    assert target.read_bytes() == old
    assert os.stat(target).st_mode == old_mode
    assert listing(tmp_path) == before  # the temporary file is gone
    text = str(err)
    assert "\n" not in text and str(target) in text and exc.strerror in text
    assert "unchanged" in text
    assert err.errno == exc.errno and err.path == str(target)
    assert pf.load_project(target) == project


@pytest.mark.parametrize("where, exc", FAILURES[:4], ids=[f"{w}-{errno.errorcode[e.errno]}" for w, e in FAILURES[:4]])
def test_failed_save_of_a_new_file_leaves_nothing(project, tmp_path, monkeypatch, where, exc):
    target = tmp_path / "new.toml"
    before = listing(tmp_path)
    _failing_save(project, target, monkeypatch, where, exc)
    assert listing(tmp_path) == before and not target.exists()


def test_save_error_message_is_one_line_even_for_multiline_reasons(project, tmp_path, monkeypatch):
    target = tmp_path / "study.toml"
    pf.save_project(project, target)
    err = _failing_save(project, target, monkeypatch, "replace", OSError(errno.EIO, "first line\nsecond line"))
    assert "\n" not in str(err) and "first line second line" in str(err)


def test_save_into_a_missing_folder(project, tmp_path):
    target = tmp_path / "no" / "such" / "folder" / "study.toml"
    with pytest.raises(ProjectSaveError) as info:
        pf.save_project(project, target)
    assert "\n" not in str(info.value) and str(target) in str(info.value)
    assert not (tmp_path / "no").exists()
