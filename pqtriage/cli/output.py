"""The one place pqtriage writes files: atomically (temp file, then rename), every step checked.

Rules for ``-o PATH`` (docs/hardening.md, "Outputs"):

- ``-`` is standard output. Anything else must be a regular file or a name that does not
  exist yet, in a folder that exists. A device (``/dev/null``, ``/dev/full``), a named pipe,
  a socket or a folder is refused: renaming over it would replace the device by a file.
- A symbolic link is written *through*: its final target is replaced atomically and the link
  stays. A dangling link or a link loop is refused.
- The target may not be an input of the same run (inventory, profile, side file, mapping
  file, previous review ...): files are compared by device and inode after resolving
  symbolic links, so a hard link or a link to the inventory is caught too.
- Every write, fsync, close and rename is checked. A failure (no space left, I/O error,
  quota) leaves the old file intact, removes the temporary file and ends the run with exit
  code 3; a refused target is bad usage (exit code 2).
"""

from __future__ import annotations

import errno
import os
import stat
import sys
from collections.abc import Iterable
from pathlib import Path

from pqtriage.errors import EXIT_INTERNAL, Place, PqtriageError

STDOUT = "-"
"""The ``-o`` value meaning standard output."""
WRITE_ERRNOS = frozenset(
    {errno.ENOSPC, errno.EIO, errno.EDQUOT, errno.EFBIG, errno.EROFS, errno.ENXIO}
)
"""Errors of the environment while writing: reported with exit code 3 (not bad usage)."""
_CHUNK = 1 << 20

Identity = tuple[int, int]
"""(st_dev, st_ino) of a file."""


class OutputError(PqtriageError):
    """An output target cannot be used (bad usage: exit code 2)."""


class WriteFailure(OutputError):
    """Writing failed in the environment (disk full, I/O error): exit code 3, old file intact."""

    exit_code = EXIT_INTERNAL


def _kind(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISCHR(mode):
        return "a character device"
    if stat.S_ISBLK(mode):
        return "a block device"
    if stat.S_ISFIFO(mode):
        return "a named pipe"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def identity_of(path: str | Path) -> Identity | None:
    """Device and inode of the file a path names (symbolic links followed), None if absent."""
    try:
        info = os.stat(path)
    except (OSError, ValueError):
        return None
    return info.st_dev, info.st_ino


def input_identities(inputs: Iterable[str | Path | Identity | None]) -> set[Identity]:
    """Identities of the run's inputs (paths, or identities already known); absent ones skipped."""
    found: set[Identity] = set()
    for item in inputs:
        if item is None:
            continue
        if isinstance(item, tuple):
            found.add(item)
        elif str(item) != STDOUT:
            known = identity_of(item)
            if known is not None:
                found.add(known)
    return found


def output_target(path: str | Path, inputs: Iterable[str | Path | Identity | None] = ()) -> Path:
    """The file ``-o PATH`` will replace, after the checks in this module's docstring.

    Returns:
        The path to write: PATH itself, or the final target of a symbolic link.

    Raises:
        OutputError: the target is a device, pipe, socket or folder, a dangling link or link
            loop, sits in a missing folder, or is an input of the same run.
    """
    name = str(path)
    place = Place(name)
    try:
        link = os.lstat(name)
    except FileNotFoundError:
        link = None
    except OSError as exc:
        raise OutputError(f"cannot use as output: {exc.strerror}", place=place) from exc
    target = Path(name)
    if link is not None and stat.S_ISLNK(link.st_mode):
        try:
            os.stat(name)
        except FileNotFoundError as exc:
            raise OutputError("is a symbolic link to a missing file", place=place,
                              hint="give the path of the file to write, or remove the link") from exc
        except OSError as exc:
            if exc.errno == errno.ELOOP:
                raise OutputError("is a symbolic link loop", place=place,
                                  hint="give the path of a regular file") from exc
            raise OutputError(f"cannot use as output: {exc.strerror}", place=place) from exc
        target = Path(os.path.realpath(name))
    try:
        info: os.stat_result | None = os.stat(target)
    except FileNotFoundError:
        info = None
    except OSError as exc:
        raise OutputError(f"cannot use as output: {exc.strerror}", place=place) from exc
    if info is not None and not stat.S_ISREG(info.st_mode):
        raise OutputError(
            f"is {_kind(info.st_mode)}, not a regular file; pqtriage writes only regular files",
            place=place, hint="give a file name, or '-' for standard output")
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise OutputError("the folder to write into does not exist", place=place,
                          hint="create the folder first, or give another path")
    if info is not None and (info.st_dev, info.st_ino) in input_identities(inputs):
        raise OutputError("is an input of this run; writing there would destroy it", place=place,
                          hint="give another output file")
    return target


def _mode_for(target: Path) -> int:
    """The replaced file's permissions, or those the umask gives a new file."""
    try:
        return stat.S_IMODE(os.stat(target).st_mode)
    except OSError:
        umask = os.umask(0o022)
        os.umask(umask)
        return 0o666 & ~umask


def _sync_folder(folder: Path, place: Place) -> None:
    """Make the rename durable (POSIX: fsync on the directory).

    Folders that cannot be opened or synced at all (EINVAL, EBADF on some file systems) are
    left alone; an I/O error is reported: the new file is in place, its durability is not.
    """
    try:
        descriptor = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(descriptor)
    except OSError as exc:
        if exc.errno in WRITE_ERRNOS:
            raise WriteFailure(f"written, but the folder could not be synced: {exc.strerror}",
                               place=place, hint="check the disk") from exc
    finally:
        os.close(descriptor)


def _write_all(descriptor: int, data: str | bytes) -> None:
    """os.write until every byte is written (a write may be partial). Text is encoded a chunk at
    a time, so a 200 MB report does not need a second 200 MB copy as bytes."""
    for start in range(0, len(data), _CHUNK):
        piece = data[start: start + _CHUNK]
        view = memoryview(piece if isinstance(piece, bytes) else encode_output(piece))
        while view:
            written = os.write(descriptor, view)
            if written <= 0:  # pragma: no cover - POSIX write returns > 0 or raises
                raise OSError(errno.EIO, os.strerror(errno.EIO))
            view = view[written:]


def encode_output(text: str | bytes) -> bytes:
    """UTF-8 bytes of an output; a lone surrogate (an undecodable file name) becomes ``\\udcXX``."""
    return text if isinstance(text, bytes) else text.encode("utf-8", "backslashreplace")


def write_atomic(path: str | Path, text: str | bytes,
                 inputs: Iterable[str | Path | Identity | None] = ()) -> None:
    """Write text (or bytes: a workbook) to path so a reader sees the old file or the new one,
    never a partial one.

    Raises:
        OutputError: the target is refused (see :func:`output_target`), exit code 2.
        WriteFailure: a write, fsync, close or rename failed; the old file is intact.
    """
    place = Place(str(path))
    target = output_target(path, inputs)
    folder = target.parent if str(target.parent) else Path(".")
    import tempfile  # here, not at module level: pqtriage --help never writes

    try:
        handle, temp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        failure = WriteFailure if exc.errno in WRITE_ERRNOS else OutputError
        raise failure(f"cannot write: {exc.strerror}", place=place,
                      hint="check that the folder is writable") from exc
    open_handle: int | None = handle
    try:
        os.fchmod(handle, _mode_for(target))  # mkstemp makes 0600; keep what a plain write would give
        _write_all(handle, text)
        os.fsync(handle)
        open_handle = None
        os.close(handle)  # close can report a delayed write error (NFS): checked too
        os.replace(temp, target)
    except OSError as exc:
        if open_handle is not None:
            try:
                os.close(open_handle)
            except OSError:
                pass
        _remove(temp)
        failure = WriteFailure if exc.errno in WRITE_ERRNOS or exc.errno is None else OutputError
        raise failure(f"cannot write: {exc.strerror or exc}; the previous file is unchanged",
                      place=place) from exc
    except BaseException:
        if open_handle is not None:
            try:
                os.close(open_handle)
            except OSError:
                pass
        _remove(temp)
        raise
    _sync_folder(folder, place)


def _remove(temp: str) -> None:
    try:
        os.unlink(temp)
    except OSError:
        pass


def write_stdout(text: str) -> None:
    """Write text to standard output and flush it; a failed write is exit code 3.

    Raises:
        WriteFailure: standard output is full or failing (``> /dev/full``).
    """
    try:
        try:
            sys.stdout.write(text)
        except UnicodeEncodeError:
            sys.stdout.flush()
            sys.stdout.buffer.write(text.encode(sys.stdout.encoding or "utf-8", "backslashreplace"))
        sys.stdout.flush()
    except BrokenPipeError:
        raise
    except OSError as exc:
        raise stdout_failure(exc) from exc


def stdout_failure(exc: OSError) -> WriteFailure:
    """The error for a failed write to standard output."""
    return WriteFailure(f"cannot write to standard output: {exc.strerror or exc}",
                        hint="check the disk or the pipe standard output goes to")


def quiet_stdout() -> None:
    """Point stdout at /dev/null so that the interpreter's last flush cannot fail a second time
    (after a broken pipe or a full disk; Python documentation, "Note on SIGPIPE")."""
    try:
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, sys.stdout.fileno())
        os.close(null)
    except (OSError, ValueError, AttributeError):
        pass
