"""``pqtriage probe`` as a plain function: targets in, an inventory (text) and a summary out.

It returns a :class:`~pqtriage.sources.scan.result.CommandResult`: the inventory text,
summary lines for stderr and the exit code (0 all reached, 1 something could not be
reached). Bad usage raises a :class:`~pqtriage.errors.PqtriageError` subclass (exit code
2). It writes nothing.
"""

from __future__ import annotations

import datetime as dt
from typing import Any

from pqtriage.errors import UsageError
from pqtriage.sources.probe.runner import DEFAULT_CONCURRENCY, DEFAULT_TIMEOUT, run_probes
from pqtriage.sources.probe.targets import parse_target, read_targets_file
from pqtriage.sources.scan.emit import (
    DEFAULT_MIGRATION_YEARS,
    DEFAULT_ORGANIZATION,
    DEFAULT_SHELF_LIFE_YEARS,
)
from pqtriage.sources.scan.findings import Finding, ScanProblem
from pqtriage.sources.scan.grouping import GroupBy
from pqtriage.sources.scan.merge import target_scope
from pqtriage.sources.scan.result import CommandResult, check_format, check_years, finish_inventory


def probe_inventory(
    targets: list[str],
    targets_file: str | None = None,
    timeout: float = DEFAULT_TIMEOUT,
    concurrency: int = DEFAULT_CONCURRENCY,
    output_format: str = "yaml",
    merge: str | None = None,
    organization: str = DEFAULT_ORGANIZATION,
    shelf_life_years: float = DEFAULT_SHELF_LIFE_YEARS,
    migration_years: float = DEFAULT_MIGRATION_YEARS,
    as_of: dt.date | None = None,
) -> CommandResult:
    """Probe explicitly named TLS (``host:port``) and SSH (``ssh://host:port``) endpoints.

    One system per target. Every target is parsed before any connection is made, so bad
    usage fails fast with exit code 2. ``as_of`` (default today) is the date the remaining
    validity of the certificates seen is counted from.
    """
    check_format(output_format)
    check_years(shelf_life_years, migration_years)
    names = list(targets)
    if targets_file is not None:
        try:
            with open(targets_file, encoding="utf-8") as stream:
                names += read_targets_file(stream.read(), targets_file)
        except OSError as error:
            raise UsageError(
                f"targets file {targets_file} cannot be read ({error.strerror})"
            ) from error
    if not names:
        raise UsageError("probe needs at least one target", hint="give host:port or ssh://host")
    parsed = list({target.text: target for target in map(parse_target, names)}.values())
    outcomes = run_probes(parsed, timeout, concurrency)
    findings: list[Finding] = []
    problems: list[ScanProblem] = []
    extras: dict[str, dict[str, Any]] = {}
    summary = [f"probe: {len(parsed)} targets"]
    unreached: list[tuple[str, str]] = []
    for outcome in outcomes:
        problem = outcome.problem()
        if problem is not None:
            problems.append(problem)
            summary.append(problem.line())
            unreached.append((outcome.target, problem.line()))
            continue
        findings.extend(outcome.findings)
        extras[outcome.target] = {"protocol": outcome.protocol, "notes": outcome.summary}
        summary.append(outcome.summary or outcome.target)
    return finish_inventory(
        findings, GroupBy.FILE, organization, shelf_life_years, migration_years, merge,
        target_scope([t.text for t in parsed if t.text in extras]), output_format,
        summary, bool(problems), extras, unreached, as_of or dt.date.today(),
    )  # fmt: skip
