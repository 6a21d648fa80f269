"""Output formats: each turns a TriageResult into a string (only the CLI writes)."""

from __future__ import annotations

from abc import ABC, abstractmethod

from pqtriage.model.verdict import TriageResult


class ResultFormat(ABC):
    """One output format of a triage result."""

    name: str = "format"
    """Identifier used by --format."""

    @abstractmethod
    def render(self, result: TriageResult) -> str:
        """Return the whole output as text."""
