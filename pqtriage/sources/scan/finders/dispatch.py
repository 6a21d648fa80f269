"""Hand each file to the finders that want it; follow references; recurse into archives.

Every finder whose :meth:`~Finder.wants` accepts a file's name or first bytes reads it; a
file may be claimed by more than one (an OpenVPN file with inline certificates). What a file
names (a certificate in a server configuration, an included fragment) is read through the
``read_reference`` callable the caller gives (the edge), once per path, so include loops end.
Archive members are handed back to the finders with the nesting depth, inside one budget
of bytes and members per archive on disk.

The tally per finder feeds the scan summary: files seen, understood, findings, and each file
not understood with why.
"""

from __future__ import annotations

import dataclasses
import glob
import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

from pqtriage.sources.scan.finders.interface import (
    ArchiveBudget,
    Finder,
    FinderContext,
    FinderResult,
    Member,
)
from pqtriage.sources.scan.finders.tlsconfig import SERVER_CERTIFICATE, fill_from_certificates
from pqtriage.sources.scan.findings import Finding, ProblemKind, ScanProblem

#: How many bytes of a file the ``wants`` tests see.
HEAD_BYTES = 4096
#: References followed from one file on disk (certificates, includes), transitively.
MAX_REFERENCES = 256


@dataclass
class FinderTally:
    """Counts for one finder over a scan."""

    seen: int = 0
    """Files the finder claimed (of its kind by name or content)."""
    understood: int = 0
    """Claimed files it could use."""
    findings: int = 0
    """Uses it reported."""
    not_understood: list[tuple[str, str]] = field(default_factory=list)
    """(file, why) for each claimed file it could not use."""


@dataclass
class ScanSummary:
    """What each finder did, and the files no finder took."""

    finders: dict[str, FinderTally] = field(default_factory=dict)
    """Tally per finder name, in the finders' order."""
    unclaimed: int = 0
    """Files (and archive members) that no finder took: no material of a known kind."""
    understood: int = 0
    """Files (and archive members) at least one finder understood."""
    not_understood: int = 0
    """Files (and archive members) some finder claimed but none understood."""
    members: int = 0
    """Archive members read."""
    named: int = 0
    """Files read because a configuration names them (outside the walk)."""

    def tally(self, name: str) -> FinderTally:
        """The tally of a finder (created on first use)."""
        return self.finders.setdefault(name, FinderTally())

    def headline(self, files_read: int) -> str:
        """The first summary line: what was read, and what the finders made of it."""
        extra = [f"{self.members} archive members"] if self.members else []
        extra += [f"{self.named} files named by configurations"] if self.named else []
        read = f"{files_read} files read" + (" (and " + ", ".join(extra) + ")" if extra else "")
        return (
            f"scan: {read}: {self.understood} understood by a finder, {self.not_understood} "
            f"not understood, {self.unclaimed} with nothing a finder reads"
        )

    def lines(self, listed: set[str] | frozenset[str] = frozenset()) -> list[str]:
        """One line per finder that saw anything, then each file not understood (except the
        places in ``listed``, which already have a problem line of their own)."""
        lines = []
        for name, tally in self.finders.items():
            if tally.seen:
                lines.append(
                    f"{name}: {tally.seen} seen, {tally.understood} understood, "
                    f"{tally.findings} findings, {len(tally.not_understood)} not understood"
                )
        for name, tally in self.finders.items():
            lines += [
                f"{place}: not understood by {name}: {why}"
                for place, why in tally.not_understood
                if place not in listed
            ]

        return lines

    def to_dict(self) -> dict[str, Any]:
        """The same, as plain data for JSON."""
        return {
            "finders": [
                {
                    "finder": name,
                    "seen": tally.seen,
                    "understood": tally.understood,
                    "findings": tally.findings,
                    "not_understood": [
                        {"file": place, "why": why} for place, why in tally.not_understood
                    ],
                }
                for name, tally in self.finders.items()
            ],
            "understood": self.understood,
            "not_understood": self.not_understood,
            "unclaimed": self.unclaimed,
            "archive_members": self.members,
            "named_by_configurations": self.named,
        }


ReadReference = Callable[[str], "bytes | ScanProblem"]


class Dispatcher:
    """Runs the finders over files; one per scan (it remembers the files already read)."""

    def __init__(
        self,
        finders: Sequence[Finder],
        context: FinderContext,
        read_reference: ReadReference | None = None,
        fallback: Callable[[bytes, str], Any] | None = None,
    ) -> None:
        self.finders = list(finders)
        self.by_name = {finder.name: finder for finder in self.finders}
        self.context = context
        self.read_reference = read_reference
        self.fallback = fallback
        self.summary = ScanSummary()
        for finder in self.finders:
            self.summary.tally(finder.name)
        self._visited: set[str] | None = None
        self._walk_paths: set[str] | None = None
        self._walk_list: list[str] = []
        self._done: list[str] = []
        self.claimed_by: dict[str, set[str]] = {}
        """Real path -> finders that claimed it (plain paths until the first reference)."""
        self.claimed_by_real = False
        """True once paths in ``claimed_by`` are real paths (references need them)."""
        self.hints: dict[str, set[str]] = {}
        """Real path of a walked file not read yet -> finders it must go to (included fragments)."""
        self.certificate_links: dict[str, list[str]] = {}
        """Configuration file -> real paths of the server certificates it names."""

    def mark_seen(self, paths: Sequence[str]) -> None:
        """Paths the walk will read anyway: references to them are not read twice."""
        self._walk_list.extend(paths)
        self._walk_paths = None

    @property
    def walk_paths(self) -> set[str]:
        """Real paths the walk reads (resolved on first need: most scans follow no reference)."""
        if self._walk_paths is None:
            self._walk_paths = {os.path.realpath(path) for path in self._walk_list}
        return self._walk_paths

    @property
    def visited(self) -> set[str]:
        """Real paths read so far (by the walk or as references)."""
        if self._visited is None:
            self._visited = {os.path.realpath(path) for path in self._done}
        return self._visited

    def run_file(self, data: bytes, path: str) -> tuple[list[Finding], list[ScanProblem]]:
        """All findings and problems of one file on disk, references and members included."""
        if self._visited is None:
            self._done.append(path)
        else:
            self._visited.add(os.path.realpath(path))
        findings: list[Finding] = []
        problems: list[ScanProblem] = []
        budget = ArchiveBudget(self.context.limits.max_total_bytes, self.context.limits.max_members)
        references_left = [MAX_REFERENCES]
        self._run(data, path, 0, None, budget, references_left, findings, problems)
        return findings, problems

    def _run(
        self,
        data: bytes,
        path: str,
        depth: int,
        only: str | None,
        budget: ArchiveBudget,
        references_left: list[int],
        findings: list[Finding],
        problems: list[ScanProblem],
    ) -> None:
        head = data[:HEAD_BYTES]
        context = dataclasses.replace(self.context, depth=depth, budget=budget)
        claimed = understood = False
        real = path
        if self.hints or self.claimed_by_real:
            real = os.path.realpath(path) if depth == 0 else path
        hinted = self.hints.pop(real, set())
        candidates = [self.by_name[only]] if only in self.by_name else self.finders
        for finder in candidates:
            if only is None and finder.name not in hinted and not finder.wants(path, head):
                continue
            if finder.name in self.claimed_by.get(real, ()):
                continue
            try:
                result = finder.read(data, path, context)
            except RecursionError:
                result = FinderResult(
                    claimed=True,
                    not_understood="nested too deeply to read",
                    problems=(ScanProblem(path, ProblemKind.NOT_UNDERSTOOD, "nested too deeply"),),
                )
            if not result.claimed:
                continue
            claimed = True
            understood = understood or result.understood
            if result.references and not self.claimed_by_real:
                self._use_real_paths()
            if self.claimed_by_real and depth == 0:
                real = os.path.realpath(path)
            self.claimed_by.setdefault(real, set()).add(finder.name)
            self._record(finder.name, path, result)
            findings.extend(result.findings)
            problems.extend(result.problems)
            for member in result.members:
                self._member(member, depth, budget, references_left, findings, problems)
            for reference in result.references:
                self._reference(reference, depth, budget, references_left, findings, problems)
        if not claimed and self.fallback is not None:
            outcome = self.fallback(data, path)
            if outcome.recognised:
                tally = self.summary.tally(self.finders[0].name)
                tally.seen += 1
                reasons = "; ".join(p.reason for p in outcome.problems) or "not recognised"
                tally.not_understood.append((path, reasons))
                problems.extend(outcome.problems)
                claimed = True
        if not claimed:
            self.summary.unclaimed += 1
        elif understood:
            self.summary.understood += 1
        else:
            self.summary.not_understood += 1

    def _record(self, name: str, path: str, result: FinderResult) -> None:
        tally = self.summary.tally(name)
        tally.seen += 1
        tally.findings += len(result.findings)
        if result.not_understood is None:
            tally.understood += 1
        else:
            tally.not_understood.append((path, result.not_understood))

    def _member(
        self,
        member: Member,
        depth: int,
        budget: ArchiveBudget,
        references_left: list[int],
        findings: list[Finding],
        problems: list[ScanProblem],
    ) -> None:
        self.summary.members += 1
        self._run(member.data, member.name, depth + 1, None, budget, references_left,
                  findings, problems)  # fmt: skip

    def _use_real_paths(self) -> None:
        """From the first reference on, files are known by their real paths."""
        converted: dict[str, set[str]] = {}
        for key, names in self.claimed_by.items():
            converted.setdefault(key if "!" in key else os.path.realpath(key), set()).update(names)
        self.claimed_by = converted
        self.claimed_by_real = True

    def link_facts(self, findings: list[Finding]) -> list[Finding]:
        """Facts that cross files: a configuration's suites take its certificate's key size."""
        return fill_from_certificates(findings, self.certificate_links)

    def _reference(
        self,
        reference: Any,
        depth: int,
        budget: ArchiveBudget,
        references_left: list[int],
        findings: list[Finding],
        problems: list[ScanProblem],
    ) -> None:
        if self.read_reference is None or "!" in reference.referrer.file:
            return  # inside an archive, paths name files of another machine
        if any(char in reference.path for char in "*?["):
            # include sites-enabled/*.conf: every match, in order; none is no problem (the
            # programs themselves accept a pattern that matches nothing).
            for match in sorted(glob.glob(reference.path))[:MAX_REFERENCES]:
                self._reference(dataclasses.replace(reference, path=match), depth, budget,
                                references_left, findings, problems)  # fmt: skip
            return
        real = os.path.realpath(reference.path)
        if reference.role == SERVER_CERTIFICATE:
            self.certificate_links.setdefault(reference.referrer.file, []).append(real)
        if real in self.walk_paths and real not in self.visited:
            if reference.finder:  # the walk reads it later: make sure that finder sees it
                self.hints.setdefault(real, set()).add(reference.finder)
            return
        if real in self.visited and (
            reference.finder is None or reference.finder in self.claimed_by.get(real, ())
        ):
            return  # read already (by the walk, or an include loop): never twice
        self.visited.add(real)
        where = f"{reference.referrer.file}:{reference.referrer.line}"
        if references_left[0] <= 0:
            problems.append(ScanProblem(
                reference.path, ProblemKind.SKIPPED,
                f"named by {where} ({reference.role}); too many files named, not read",
            ))  # fmt: skip
            return
        references_left[0] -= 1
        data = self.read_reference(reference.path)
        if isinstance(data, ScanProblem):
            # A named file that does not exist is a note (nothing is known to be there); one
            # that exists but cannot be read is a failure.
            kind = ProblemKind.SKIPPED if data.reason == "no such file or folder" else data.kind
            problems.append(ScanProblem(
                reference.path, kind, f"named by {where} ({reference.role}): {data.reason}"
            ))  # fmt: skip
            return
        self.summary.named += 1
        self._run(data, reference.path, depth, reference.finder, budget, references_left,
                  findings, problems)  # fmt: skip
