"""Inventory sources: anything that turns input bytes into an Inventory."""

from __future__ import annotations

import hashlib
import os
import stat
from abc import ABC, abstractmethod

from pqtriage.errors import InventoryError, Place
from pqtriage.model.inventory import Inventory
from pqtriage.yamlio import MAX_FILE_BYTES, decode_text


class InventorySource(ABC):
    """Reads one kind of inventory file (our YAML format, a CycloneDX CBOM ...)."""

    name: str = "inventory"
    """Short name of the format, for messages."""

    @abstractmethod
    def accepts(self, text: str) -> bool:
        """Whether the text looks like this source's format (by content, not file name)."""

    @abstractmethod
    def parse(self, text: str, path: str, sha256: str | None = None) -> Inventory:
        """Build an Inventory; raise InventoryError naming file:line:column on bad input."""


def read_input(path: str, limit: int | None = None) -> tuple[bytes, str]:
    """Read an input file's bytes and SHA-256 (the one place inventories touch the disk).

    Only regular files are read (a FIFO or /dev/zero would block or never end), and
    at most ``limit + 1`` bytes, so an oversized file is refused without loading it.
    """
    try:
        # O_NONBLOCK: opening a FIFO must not wait for a writer; no effect on regular files.
        with os.fdopen(os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0)), "rb") as stream:
            if not stat.S_ISREG(os.fstat(stream.fileno()).st_mode):
                raise InventoryError("is not a regular file (a device, pipe or socket)", place=Place(path),
                                     hint="give the path of an inventory file")
            data = stream.read() if limit is None else stream.read(limit + 1)
    except FileNotFoundError as exc:
        raise InventoryError("file not found", place=Place(path), hint="check the path") from exc
    except IsADirectoryError as exc:
        raise InventoryError("is a folder, not a file", place=Place(path)) from exc
    except OSError as exc:
        raise InventoryError(f"cannot read: {exc.strerror}", place=Place(path)) from exc
    return data, hashlib.sha256(data).hexdigest()


def read_inventory_text(path: str) -> tuple[str, str]:
    """An inventory file's text and SHA-256: bounded read, size limit, UTF-8 checks."""
    data, sha256 = read_input(path, MAX_FILE_BYTES)
    if len(data) > MAX_FILE_BYTES:
        raise InventoryError(
            f"the file is larger than {MAX_FILE_BYTES // (1024 * 1024)} MiB",
            place=Place(path),
            hint="split the inventory into several files",
        )
    return decode_text(data, path, InventoryError), sha256
