"""Output formats: each turns a TriageResult into a string (only the CLI writes)."""

from __future__ import annotations

from abc import ABC, abstractmethod

from pqtriage.model.verdict import TriageResult


class ResultFormat(ABC):
    """One output format of a triage result."""

    name: str = "format"
    """Identifier used by --format."""
    binary: bool = False
    """Whether the output is a binary file (a workbook): the CLI then calls render_bytes."""

    @abstractmethod
    def render(self, result: TriageResult) -> str:
        """Return the whole output as text."""

    def render_bytes(self, result: TriageResult) -> bytes:
        """Return the whole output as bytes (UTF-8 text unless the format is binary)."""
        return self.render(result).encode("utf-8")
