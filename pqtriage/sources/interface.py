"""Inventory sources: anything that turns input bytes into an Inventory."""

from __future__ import annotations

import hashlib
import os
import stat
from abc import ABC, abstractmethod
from collections.abc import Callable
from dataclasses import dataclass

from pqtriage.errors import InventoryError, InventoryProblems, Place, Problem
from pqtriage.model.inventory import CryptoUse, Inventory
from pqtriage.yamlio import MAX_FILE_BYTES, decode_text


@dataclass(frozen=True)
class FieldProblem:
    """A problem with one field of a use, found by a check outside the reader (the catalog's)."""

    field: str
    """The use's field it concerns (algorithm, curve ...)."""
    message: str
    """What is wrong."""
    hint: str | None = None
    """What to do about it."""
    error: bool = True
    """An error stops the run; otherwise a warning (an error under ``check --strict``)."""


UseCheck = Callable[[CryptoUse], list[FieldProblem]]
"""Checks one use as read (for example its algorithm name against the catalog)."""


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

    def read(self, text: str, path: str, sha256: str | None = None, check: UseCheck | None = None) -> Inventory:
        """Parse, then run ``check`` on every use: errors are collected and raised together.

        Sources that know each field's position (the YAML reader, the spreadsheets) override
        this to report at the field and together with their own problems.
        """
        inventory = self.parse(text, path, sha256)
        return apply_check(inventory, check)


def apply_check(inventory: Inventory, check: UseCheck | None) -> Inventory:
    """Run a use check on a read inventory, placing problems at each use's position."""
    if check is None:
        return inventory
    from dataclasses import replace

    problems: list[Problem] = []
    warnings = list(inventory.warnings)
    for system in inventory.systems:
        for use in system.uses:
            for found in check(use):
                ref = use.source
                place = Place(ref.file if ref else (inventory.source_path or "inventory"),
                              ref.line if ref else None, ref.column if ref else None)
                problem = Problem(place, found.message, found.hint)
                if found.error:
                    problems.append(problem)
                else:
                    warnings.append(problem.line())
    if problems:
        raise InventoryProblems(problems)
    return replace(inventory, warnings=tuple(warnings))


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
