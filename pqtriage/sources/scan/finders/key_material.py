"""Key and certificate files: PEM, DER, PKCS#12, JSON Web Keys, OpenSSH key lines.

The readers themselves are the scan's original ones (``pem``, ``der``, ``pkcs12``, ``jwks``,
``openssh``); this finder only puts them behind the common interface.
"""

from __future__ import annotations

from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
)
from pqtriage.sources.scan.findings import FAILURE_KINDS, FindingKind, ProblemKind
from pqtriage.sources.scan.recognise import recognise


class KeyMaterialFinder(Finder):
    """PEM blocks, DER structures, PKCS#12 bundles, JWK sets, OpenSSH keys."""

    name = "keys and certificates"

    def wants(self, path: str, head: bytes) -> bool:
        return True  # recognition is by content, done by the readers themselves

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        outcome = recognise(data, path, context.password)
        if not outcome.recognised:
            return NOT_MINE
        for password in context.passwords[1:]:  # the first did not open it: try the others
            if not any(f.kind is FindingKind.PKCS12_ENCRYPTED for f in outcome.findings):
                break
            outcome = recognise(data, path, password)
        why = next(
            (
                f"{p.kind.value}: {p.reason}"
                for p in outcome.problems
                if p.kind in FAILURE_KINDS and p.place == path and not outcome.findings
            ),
            None,
        )
        if why is None:
            locked = [f for f in outcome.findings if f.kind is FindingKind.PKCS12_ENCRYPTED]
            if locked:
                why = "encrypted PKCS#12: " + locked[0].notes[-1]
        return FinderResult(
            claimed=True,
            findings=outcome.findings,
            problems=outcome.problems,
            not_understood=why,
        )


__all__ = ["KeyMaterialFinder", "ProblemKind"]
