"""Result of probing one target: findings, or one clear line saying why it failed."""

from __future__ import annotations

from dataclasses import dataclass

from pqtriage.sources.scan.findings import Finding, ProblemKind, ScanProblem


@dataclass(frozen=True)
class ProbeOutcome:
    """What one probe learned about one target."""

    target: str
    """The target as shown in outputs."""
    findings: tuple[Finding, ...] = ()
    """Uses seen at the target."""
    protocol: str | None = None
    """Protocol and version spoken (TLS 1.3, SSH-2.0 ...)."""
    summary: str | None = None
    """One line about the target (negotiated group, hybrid post-quantum or not ...)."""
    failure: str | None = None
    """Why the probe failed: refused, timed out, not TLS, not SSH ... (None on success)."""

    def problem(self) -> ScanProblem | None:
        """The failure as a scan problem, for the shared summary and exit code."""
        if self.failure is None:
            return None
        return ScanProblem(self.target, ProblemKind.UNREACHABLE, self.failure)


class ProbeFailure(Exception):
    """A probe could not complete; the message is the one line shown to the user."""
