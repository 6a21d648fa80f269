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


def column_letters(column: int) -> str:
    """A 1-based column number as spreadsheet letters: 1 -> A, 27 -> AA."""
    letters = ""
    while column > 0:
        column, rest = divmod(column - 1, 26)
        letters = chr(ord("A") + rest) + letters
    return letters


@dataclass(frozen=True)
class Place:
    """Where in an input a problem sits."""

    file: str
    """Path of the input file as the user named it."""
    line: int | None = None
    """1-based line number (a workbook's row), when known."""
    column: int | None = None
    """1-based column number, when known."""
    sheet: str | None = None
    """Worksheet name, for a workbook: the place is then written ``file:Sheet!D14``."""

    def __str__(self) -> str:
        text = self.file
        if self.sheet is not None:
            # The spreadsheet's own cell notation; a sheet name with spaces or quotes is quoted.
            sheet = self.sheet
            if not sheet.replace("_", "").isalnum():
                sheet = "'" + sheet.replace("'", "''") + "'"
            text += f":{sheet}!"
            if self.line is not None:
                text += (column_letters(self.column) if self.column else "") + str(self.line)
            return text.rstrip("!")
        if self.line is not None:
            text += f":{self.line}"
            if self.column is not None:
                text += f":{self.column}"
        return text

    def order(self) -> tuple[str, int, int]:
        """Sort key: file, then line (row), then column."""
        return (self.file, self.line or 0, self.column or 0)


@dataclass(frozen=True)
class Problem:
    """One problem found in an input: collected with the others, reported together."""

    place: Place
    """Where it sits."""
    message: str
    """What is wrong."""
    hint: str | None = None
    """What to do about it."""

    def line(self) -> str:
        """One line: place, what is wrong, what to do."""
        text = f"{self.place}: {self.message}"
        if self.hint:
            text += f"; {self.hint}"
        return " ".join(text.split())


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

    def diagnostic_lines(self) -> list[str]:
        """Every line to show the user (one, unless several problems were collected)."""
        return [self.diagnostics()]

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


class InventoryProblems(InventoryError):
    """Several problems in one inventory, collected before stopping, sorted by position."""

    def __init__(self, problems: list[Problem]):
        ordered = sorted(problems, key=lambda p: p.place.order())
        first = ordered[0]
        super().__init__(first.message, place=first.place, hint=first.hint)
        self.problems = ordered

    def diagnostic_lines(self) -> list[str]:
        """One line per problem, then a count when there is more than one."""
        lines = [problem.line() for problem in self.problems]
        if len(lines) > 1:
            files = sorted({p.place.file for p in self.problems})
            lines.append(f"{len(lines)} problems in {', '.join(files)}; nothing was triaged")
        return lines


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
