"""The error hierarchy: one base with a diagnostics() text, one subclass per layer.

The CLI catches :class:`PqtriageError` in one place and maps it to an exit code
(see :data:`EXIT_CODES`). Every message names the place (``file:line:column``)
when there is one, says what is wrong and what to do about it.
"""

from __future__ import annotations

from dataclasses import dataclass

#: Documented exit codes of the ``pqtriage`` command.
EXIT_OK = 0
EXIT_FINDINGS = 1
EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3


@dataclass(frozen=True)
class Place:
    """Where in an input a problem sits."""

    file: str
    """Path of the input file as the user named it."""
    line: int | None = None
    """1-based line number, when known."""
    column: int | None = None
    """1-based column number, when known."""

    def __str__(self) -> str:
        text = self.file
        if self.line is not None:
            text += f":{self.line}"
            if self.column is not None:
                text += f":{self.column}"
        return text


class PqtriageError(Exception):
    """Base of every error pqtriage reports to a user."""

    exit_code: int = EXIT_BAD_INPUT

    def __init__(self, message: str, *, place: Place | None = None, hint: str | None = None):
        super().__init__(message)
        self.message = message
        self.place = place
        self.hint = hint

    def diagnostics(self) -> str:
        """One line for the user: place, what is wrong, what to do."""
        text = f"{self.place}: {self.message}" if self.place else self.message
        if self.hint:
            text += f"; {self.hint}"
        # One line, always: inputs may smuggle newlines into messages.
        return " ".join(text.split())

    def __str__(self) -> str:
        return self.diagnostics()


QUOTED_LIMIT = 120
"""Longest input text quoted in a message (a 10 MB id is cut with an ellipsis)."""


def quoted(text: object, limit: int = QUOTED_LIMIT) -> str:
    """``'text'`` for a message, cut to ``limit`` characters with an ellipsis."""
    value = str(text)
    if len(value) > limit:
        cut = value[: limit - 1]
        space = cut.rfind(" ")
        if space >= limit * 3 // 4:  # end at a word when one ends near the limit
            cut = cut[:space]
        value = cut.rstrip() + "…"
    return f"'{value}'"


def chain_text(ids: list[str], closed: bool = False, shown: int = 3) -> str:
    """A chain of ids for a message: ``a -> b -> c``; a long one as its first and last members
    and a count (``a -> b -> c -> ... -> y -> z (100,000 systems)``), so a cycle of 100,000
    systems is one short line. ``closed`` repeats the first id at the end (a cycle)."""
    names = [quoted(i, 60)[1:-1] for i in (ids[:shown] + ids[-shown:] if len(ids) > 2 * shown else ids)]
    if closed:
        names.append(names[0])
    if len(ids) > 2 * shown:
        text = " -> ".join(names[:shown]) + " -> ... -> " + " -> ".join(names[shown:])
        return f"{text} ({len(ids):,} systems)"
    return " -> ".join(names)


class InventoryError(PqtriageError):
    """The inventory file cannot be read or does not follow the format."""


class ProfileError(PqtriageError):
    """The threat profile cannot be read or is inconsistent."""


class CatalogError(PqtriageError):
    """A shipped knowledge table is malformed (a packaging bug, not user input)."""

    exit_code = EXIT_INTERNAL


class ScanError(PqtriageError):
    """A scan or probe was asked for something it cannot do."""


class PlanError(PqtriageError):
    """Planning inputs are inconsistent (for example a dependency cycle)."""


class UsageError(PqtriageError):
    """A command-line option has a value that cannot be used."""
