"""The one place pqtriage writes files: atomically (temp file, then rename)."""

from __future__ import annotations

import os
import stat
import tempfile
from pathlib import Path

from pqtriage.errors import Place, PqtriageError


class OutputError(PqtriageError):
    """An output file cannot be written."""


def _mode_for(target: Path) -> int:
    """The replaced file's permissions, or those the umask gives a new file."""
    try:
        return stat.S_IMODE(os.stat(target).st_mode)
    except OSError:
        umask = os.umask(0o022)
        os.umask(umask)
        return 0o666 & ~umask


def _sync_folder(folder: Path) -> None:
    """Make the rename itself durable (POSIX: fsync on the directory); best effort."""
    try:
        descriptor = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(descriptor)
    except OSError:
        pass
    finally:
        os.close(descriptor)


def write_atomic(path: str | Path, text: str | bytes) -> None:
    """Write text (or bytes) to path so a reader sees the old file or the new one, never a partial one."""
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    try:
        handle, temp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise OutputError(f"cannot write: {exc.strerror}", place=Place(str(path)),
                          hint="check that the folder exists and is writable") from exc
    try:
        os.fchmod(handle, _mode_for(target))  # mkstemp makes 0600; keep what a plain write would give
        if isinstance(text, bytes):
            with os.fdopen(handle, "wb") as binary:
                binary.write(text)
                binary.flush()
                os.fsync(binary.fileno())
        else:
            with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as stream:
                stream.write(text)
                stream.flush()
                os.fsync(stream.fileno())
        os.replace(temp, target)
        _sync_folder(folder)
    except OSError as exc:
        try:
            os.unlink(temp)
        except OSError:
            pass
        raise OutputError(f"cannot write: {exc.strerror}", place=Place(str(path))) from exc
    except BaseException:
        try:
            os.unlink(temp)
        except OSError:
            pass
        raise
