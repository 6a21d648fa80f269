"""The one place pqtriage writes files: atomically (temp file, then rename)."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from pqtriage.errors import PqtriageError, Place


class OutputError(PqtriageError):
    """An output file cannot be written."""


def write_atomic(path: str | Path, text: str) -> None:
    """Write text to path so a reader sees the old file or the new one, never a partial one."""
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    try:
        handle, temp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise OutputError(f"cannot write: {exc.strerror}", place=Place(str(path)),
                          hint="check that the folder exists and is writable") from exc
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as stream:
            stream.write(text)
            stream.flush()
            os.fsync(stream.fileno())
        # mkstemp creates the file private (0600); give it the permissions a plain open() would.
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(temp, 0o666 & ~umask)
        os.replace(temp, target)
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
