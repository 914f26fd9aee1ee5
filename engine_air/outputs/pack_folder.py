"""The review pack's folder: refusing a foreign one, writing files without following links, the manifest.

A pack is assembled in a fresh temporary folder beside its target (``engine_air.outputs.writer.staged_folder``)
and moved into place whole, so a failure (a full disk, a cancelled run) leaves no partial pack and the previous
pack as it was. ``check_pack_target`` refuses, before any work, a target that is a link, not a folder, or a
non-empty folder that is not a pack's (no manifest of ours, or files the manifest does not list: a file a
reviewer put beside the pack is never removed). Inside the staging folder every file is written under a fresh
temporary name (created exclusively, links not followed) and renamed over its final name.
"""

from __future__ import annotations

import errno
import json
import os
import re
import secrets
import stat

from engine_air import __version__

MANIFEST = "engine-air-pack.json"
"""The pack's own manifest file; a folder holding it was written by a pack before."""
_SIGNATURE = "engine-air review pack"


class PackFolderError(OSError):
    """The folder cannot take a review pack (not empty and not a pack's, a symbolic link, ...)."""

    def __init__(self, path, message: str) -> None:
        super().__init__(errno.EEXIST, message, os.fspath(path))

    def __str__(self) -> str:
        return f"{self.filename}: {self.strerror}"



# -- writing without following links -------------------------------------------------

_DIR_FD = os.open in os.supports_dir_fd and os.rename in os.supports_dir_fd and os.mkdir in os.supports_dir_fd
_NOFOLLOW = getattr(os, "O_NOFOLLOW", 0)
_DIRECTORY = getattr(os, "O_DIRECTORY", 0)


def _is_our_manifest(data: bytes) -> tuple[bool, list[str]]:
    try:
        doc = json.loads(data.decode("utf-8"))
    except (UnicodeDecodeError, ValueError):
        return False, []
    if not isinstance(doc, dict) or doc.get("written_by") != _SIGNATURE:
        return False, []
    files = doc.get("files", [])
    return True, [f for f in files if isinstance(f, str)] if isinstance(files, list) else []


_TEMPORARY = re.compile(r"^\..+\.[0-9a-f]{12}\.tmp$")
"""The name of a temporary file or folder a pack run left behind when it was killed."""


def _listing(path: str) -> list[str]:
    try:
        return os.listdir(path)
    except OSError as exc:
        raise PackFolderError(path, f"cannot be read: {exc.strerror or exc}") from None


def check_pack_target(path: str) -> None:
    """Refuse (``PackFolderError``), before any work, a folder the pack may not replace.

    Taken: a new name, an empty folder, or a pack's own folder (a manifest of ours) holding nothing but what its
    manifest lists. Refused: a link, something that is not a folder, any other non-empty folder.
    """
    if os.path.islink(path):
        raise PackFolderError(path, "is a symbolic link; the review pack does not write through links "
                                    "(give the real folder)")
    if not os.path.exists(path):
        return
    if not os.path.isdir(path):
        raise PackFolderError(path, "exists and is not a folder")
    entries = [n for n in _listing(path) if not _TEMPORARY.match(n)]
    if not entries:
        return
    ours, listed = False, []
    manifest = os.path.join(path, MANIFEST)
    if MANIFEST in entries and stat.S_ISREG(os.lstat(manifest).st_mode):
        fd = os.open(manifest, os.O_RDONLY | _NOFOLLOW | getattr(os, "O_NONBLOCK", 0))
        with os.fdopen(fd, "rb") as fh:
            ours, listed = _is_our_manifest(fh.read(1 << 20))
    if not ours:
        shown = ", ".join(sorted(entries)[:3]) + (", …" if len(entries) > 3 else "")
        raise PackFolderError(path, f"is not empty ({shown}) and holds no review-pack manifest "
                                    f"({MANIFEST}); give a new or empty folder")
    known = set(listed) | {MANIFEST, "maps", "sections"}
    foreign = [n for n in entries if n not in known]
    for sub in ("maps", "sections"):
        where = os.path.join(path, sub)
        if sub in entries and not os.path.islink(where) and os.path.isdir(where):
            foreign += [f"{sub}/{n}" for n in _listing(where) if f"{sub}/{n}" not in known
                        and not _TEMPORARY.match(n)]
    if foreign:
        shown = ", ".join(sorted(foreign)[:3]) + (", …" if len(foreign) > 3 else "")
        raise PackFolderError(path, f"holds files the review pack did not write ({shown}); the pack replaces "
                                    "its folder whole, so move them out or give another folder")


class StagingFolder:
    """A new, empty staging folder of a pack: writes files by exclusive temp file + rename, never through a
    link. ``final`` is where the folder will be moved when the pack is done: the paths it reports."""

    def __init__(self, path: str, final: str | None = None) -> None:
        self.path = path
        self.final = final if final is not None else path
        self.fd = os.open(path, os.O_RDONLY | _DIRECTORY | _NOFOLLOW) if _DIR_FD else None
        self.dirs: dict[str, int | None] = {"": self.fd}
        self.previous: list[str] = []

    def close(self) -> None:
        for fd in set(self.dirs.values()):
            if fd is not None:
                os.close(fd)
        self.dirs = {}

    def _lstat(self, sub: str, name: str):
        try:
            if self.fd is not None:
                return os.stat(name, dir_fd=self.dirs[sub], follow_symlinks=False)
            return os.lstat(os.path.join(self.path, sub, name))
        except FileNotFoundError:
            return None

    def _read(self, sub: str, name: str) -> bytes:
        if self.fd is not None:
            fd = os.open(name, os.O_RDONLY | _NOFOLLOW, dir_fd=self.dirs[sub])
        else:
            fd = os.open(os.path.join(self.path, sub, name), os.O_RDONLY | _NOFOLLOW)
        with os.fdopen(fd, "rb") as fh:
            return fh.read(1 << 20)

    def subfolder(self, sub: str) -> None:
        """Make sure ``sub`` is a real folder of ours: a link there is removed (the link, not its target)."""
        st = self._lstat("", sub)
        if st is not None and stat.S_ISLNK(st.st_mode):
            if self.fd is not None:
                os.unlink(sub, dir_fd=self.fd)
            else:
                os.unlink(os.path.join(self.path, sub))
            st = None
        if st is None:
            if self.fd is not None:
                os.mkdir(sub, dir_fd=self.fd)
            else:
                os.mkdir(os.path.join(self.path, sub))
        elif not stat.S_ISDIR(st.st_mode):
            raise PackFolderError(os.path.join(self.path, sub), "exists and is not a folder")
        if self.fd is not None:
            self.dirs[sub] = os.open(sub, os.O_RDONLY | _DIRECTORY | _NOFOLLOW, dir_fd=self.fd)
        else:
            self.dirs[sub] = None

    def write(self, relative: str, data: bytes) -> str:
        """Write ``data`` to ``relative`` (``name`` or ``sub/name``) by a fresh temporary file and a rename:
        a link at the final name is replaced, never written through. Returns the full path."""
        sub, _, name = relative.rpartition("/")
        tmp = f".{name[:40]}.{secrets.token_hex(6)}.tmp"
        flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | _NOFOLLOW | getattr(os, "O_BINARY", 0)
        dir_fd = self.dirs[sub]
        base = os.path.join(self.path, sub)
        fd = os.open(tmp, flags, 0o644, dir_fd=dir_fd) if dir_fd is not None else os.open(os.path.join(base, tmp),
                                                                                          flags, 0o644)
        try:
            with os.fdopen(fd, "wb") as fh:
                fh.write(data)
            if dir_fd is not None:
                os.replace(tmp, name, src_dir_fd=dir_fd, dst_dir_fd=dir_fd)
            else:
                os.replace(os.path.join(base, tmp), os.path.join(base, name))
        except BaseException:
            try:
                os.unlink(tmp, dir_fd=dir_fd) if dir_fd is not None else os.unlink(os.path.join(base, tmp))
            except OSError:
                pass
            raise
        return os.path.join(self.final, *relative.split("/"))

    def remove(self, relative: str) -> None:
        """Remove a file (or a link: the link itself) the previous pack wrote; missing is fine."""
        sub, _, name = relative.rpartition("/")
        if sub not in self.dirs:
            return
        try:
            if self.dirs[sub] is not None:
                os.unlink(name, dir_fd=self.dirs[sub])
            else:
                os.unlink(os.path.join(self.path, sub, name))
        except (FileNotFoundError, IsADirectoryError, PermissionError):
            pass

    def is_picture(self, relative: str) -> bool:
        sub, _, name = relative.rpartition("/")
        st = self._lstat(sub, name)
        return st is not None and stat.S_ISREG(st.st_mode) and st.st_size > 0

    def manifest(self, files: list[str], complete: bool) -> None:
        doc = {"written_by": _SIGNATURE, "version": __version__, "complete": complete, "files": files}
        self.write(MANIFEST, json.dumps(doc, indent=1).encode("utf-8"))


__all__ = ["MANIFEST", "PackFolderError", "StagingFolder", "check_pack_target"]
