"""Walk files and folders with limits: symlink loops, special files and oversized files are
skipped with a note, unreadable entries reported, and the walk goes on.

Paths are kept as the user wrote them (joined with the names below them), so every finding
points at a path the user recognises.
"""

from __future__ import annotations

import os
import stat
from collections.abc import Iterator
from dataclasses import dataclass

from pqtriage.sources.scan.findings import ProblemKind, ScanProblem

#: Default size limit: larger files are skipped with a note (key material is small).
DEFAULT_MAX_FILE_BYTES = 16 * 1024 * 1024


@dataclass(frozen=True)
class FileEntry:
    """A regular file to read."""

    path: str
    """Path as the user named it, joined with the names below it."""
    size: int
    """Size in bytes at walk time."""
    identity: tuple[int, int] | None = None
    """(device, inode) at walk time."""


MAX_WALK_DEPTH = 4096
"""Deepest folder nesting walked; deeper folders are skipped with a note (the walk itself keeps
an explicit stack, so depth never costs recursion)."""


def walk(
    paths: list[str], max_file_bytes: int = DEFAULT_MAX_FILE_BYTES
) -> Iterator[FileEntry | ScanProblem]:
    """Yield every regular file below the given paths, or a problem for what is not read.

    Symbolic links are followed; a link back to a folder already being walked (a loop) or
    already walked is skipped with a note. Folders are walked in sorted name order, depth
    first, with an explicit stack (a folder nested 990 deep is walked like any other).
    """
    seen_dirs: set[tuple[int, int]] = set()
    seen_files: set[tuple[int, int]] = set()
    for path in paths:
        # Each stack entry: the names of one folder still to visit (reversed), its path, depth.
        stack: list[tuple[list[str], str, int]] = []
        yield from _visit(path, 0, max_file_bytes, seen_dirs, seen_files, stack)
        while stack:
            names, folder, depth = stack[-1]
            if not names:
                stack.pop()
                continue
            name = names.pop()
            child = name if folder == os.curdir else os.path.join(folder, name)
            yield from _visit(child, depth + 1, max_file_bytes, seen_dirs, seen_files, stack)


def _visit(
    path: str,
    depth: int,
    max_file_bytes: int,
    seen_dirs: set[tuple[int, int]],
    seen_files: set[tuple[int, int]],
    stack: list[tuple[list[str], str, int]],
) -> Iterator[FileEntry | ScanProblem]:
    """One path: yield its file entry or problem; a folder pushes its names onto ``stack``."""
    try:
        info = os.stat(path)
    except FileNotFoundError:
        if os.path.islink(path):
            yield ScanProblem(path, ProblemKind.SKIPPED, "dangling symbolic link")
        else:
            yield ScanProblem(path, ProblemKind.UNREADABLE, "no such file or folder")
        return
    except OSError as error:
        if error.errno == 40:  # ELOOP: the link chain itself loops
            yield ScanProblem(path, ProblemKind.SKIPPED, "symbolic link loop")
        else:
            yield ScanProblem(path, ProblemKind.UNREADABLE, error.strerror or "cannot stat")
        return
    identity = (info.st_dev, info.st_ino)
    if stat.S_ISDIR(info.st_mode):
        if identity in seen_dirs:
            yield ScanProblem(path, ProblemKind.SKIPPED, "symbolic link loop or folder seen before")
            return
        seen_dirs.add(identity)
        if depth >= MAX_WALK_DEPTH:
            yield ScanProblem(path, ProblemKind.SKIPPED,
                              f"folder nested deeper than {MAX_WALK_DEPTH} levels (not walked)")
            return
        try:
            names = sorted(os.listdir(path), reverse=True)
        except OSError as error:
            yield ScanProblem(path, ProblemKind.UNREADABLE, error.strerror or "cannot list folder")
            return
        stack.append((names, path, depth))
        return
    if not stat.S_ISREG(info.st_mode):
        yield ScanProblem(path, ProblemKind.SKIPPED, f"special file ({_kind(info.st_mode)})")
        return
    if identity in seen_files:
        yield ScanProblem(path, ProblemKind.SKIPPED, "same file reached before by another path")
        return
    seen_files.add(identity)
    if info.st_size > max_file_bytes:
        yield ScanProblem(
            path,
            ProblemKind.SKIPPED,
            f"larger than the limit ({info.st_size} > {max_file_bytes} bytes)",
        )
        return
    yield FileEntry(path, info.st_size, identity)


def _kind(mode: int) -> str:
    if stat.S_ISFIFO(mode):
        return "named pipe"
    if stat.S_ISSOCK(mode):
        return "socket"
    if stat.S_ISCHR(mode):
        return "character device"
    if stat.S_ISBLK(mode):
        return "block device"
    return "not a regular file"


def read_file(
    entry: FileEntry, max_file_bytes: int = DEFAULT_MAX_FILE_BYTES
) -> bytes | ScanProblem:
    """Read a file's bytes, at most the limit (a file that grew is cut, with a problem)."""
    try:
        # O_NONBLOCK: a file swapped for a pipe after the walk must not block the scan.
        descriptor = os.open(entry.path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except OSError as error:
        return ScanProblem(entry.path, ProblemKind.UNREADABLE, error.strerror or "cannot open")
    try:
        if not stat.S_ISREG(os.fstat(descriptor).st_mode):
            return ScanProblem(entry.path, ProblemKind.SKIPPED, "no longer a regular file")
        chunks = []
        remaining = max_file_bytes + 1
        while remaining > 0:
            chunk = os.read(descriptor, min(remaining, 1 << 20))
            if not chunk:
                break
            chunks.append(chunk)
            remaining -= len(chunk)
    except OSError as error:
        return ScanProblem(entry.path, ProblemKind.UNREADABLE, error.strerror or "read failed")
    finally:
        os.close(descriptor)
    data = b"".join(chunks)
    if len(data) > max_file_bytes:
        return ScanProblem(entry.path, ProblemKind.SKIPPED, "grew past the size limit while read")
    return data
