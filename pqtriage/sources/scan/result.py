"""What a discovery run (scan or probe) produced, and the step both end with.

The findings are grouped into systems, targets that could not be probed kept as systems
with no uses (unassessed in triage), the whole folded into an existing inventory
(``--merge``) and rendered as YAML or JSON. Nothing here writes a file: the CLI writes
the text (atomically) or prints it.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from pqtriage.errors import EXIT_FINDINGS, EXIT_OK, InventoryError, Place, ScanError, UsageError
from pqtriage.sources.roundtrip import dump_round_trip, is_round_trip
from pqtriage.sources.scan.emit import (
    ASSUMED_SYSTEM_FIELDS,
    DEFAULT_EXPOSURE,
    DEFAULT_ORGANIZATION,
    inventory_dict,
    render,
    slugify,
    unique_id,
)
from pqtriage.sources.scan.findings import Finding, FindingKind
from pqtriage.sources.scan.grouping import GroupBy, group_findings
from pqtriage.sources.scan.merge import merge_inventory
from pqtriage.sources.schema import MAX_MIGRATION_YEARS, MAX_SHELF_LIFE_YEARS
from pqtriage.yamlio import MAX_FILE_BYTES, MAX_NODES

OUTPUT_FORMATS = ("yaml", "json")


@dataclass(frozen=True)
class CommandResult:
    """What a discovery command produced."""

    text: str
    """The inventory (YAML or JSON); the CLI prints it when no output file was given."""
    summary: list[str]
    """Lines for stderr: counts, one line per problem, assumed defaults, merge report."""
    exit_code: int
    """0 when everything was read or reached, 1 otherwise."""
    written: str | None = None
    """Path the inventory was written to, if any."""
    read: frozenset[tuple[int, int]] = frozenset()
    """(device, inode) of every file the run read: ``-o`` may not name one of them."""
    scan_summary: dict[str, Any] | None = None
    """Per-finder counts and the files not understood (scan only), as plain data for JSON."""


def check_format(output_format: str) -> None:
    """Refuse an output format other than yaml or json."""
    if output_format not in OUTPUT_FORMATS:
        raise UsageError(f"unknown format {output_format!r}", hint="use yaml or json")


def check_years(shelf_life_years: float, migration_years: float) -> None:
    """Refuse assumed years the inventory format would refuse (the output must always triage)."""
    if not 0 <= shelf_life_years <= MAX_SHELF_LIFE_YEARS:
        raise UsageError(f"--shelf-life {shelf_life_years:g} is outside 0..{MAX_SHELF_LIFE_YEARS:g} years")
    if not 0 < migration_years <= MAX_MIGRATION_YEARS:
        raise UsageError(f"--migration-years {migration_years:g} must be more than 0 and at most "
                         f"{MAX_MIGRATION_YEARS:g} years", hint="a migration takes time: for example 0.5")


def load_existing_text(merge: str) -> tuple[Any, str]:
    """The inventory given to --merge with its comments and layout (an empty file is an empty
    inventory), and its text; refused like any inventory if it is hostile."""
    from pqtriage.sources.interface import read_inventory_text
    from pqtriage.sources.roundtrip import load_round_trip

    try:
        text, _ = read_inventory_text(merge)
    except InventoryError as error:
        raise InventoryError(f"cannot read the inventory to merge into: {error.message}",
                             place=error.place or Place(merge),
                             hint=error.hint or "check the path given to --merge") from error
    document = load_round_trip(text, merge)
    if document is None:
        document = {"version": 1, "organization": DEFAULT_ORGANIZATION, "systems": []}
    return document, text


def load_existing(merge: str) -> Any:
    """The inventory given to --merge, as YAML data keeping its comments and layout."""
    return load_existing_text(merge)[0]


def assumed_line(systems: int, shelf_life: float, migration: float) -> str:
    """The summary line naming the defaults written and marked assumed."""
    return (
        f"assumed in {systems} systems: shelf_life_years={shelf_life:g}, "
        f"migration_years={migration:g}, exposure={DEFAULT_EXPOSURE} (defaults a scan cannot "
        "know, marked 'assumed'; set them in the inventory)"
    )


def finish_inventory(
    findings: list[Finding],
    group_by: GroupBy,
    organization: str,
    shelf_life_years: float,
    migration_years: float,
    merge: str | None,
    in_scope: Callable[[str], bool],
    output_format: str,
    summary: list[str],
    failed: bool,
    system_extras: dict[str, dict[str, Any]] | None = None,
    unreached: list[tuple[str, str]] | None = None,
    as_of: dt.date | None = None,
) -> CommandResult:
    """Group the findings into systems, merge if asked, and render the inventory (``as_of``:
    the date certificates' remaining validity is counted from)."""
    groups = group_findings(findings, group_by)
    document = inventory_dict(
        groups, organization, shelf_life_years, migration_years, system_extras, as_of
    )
    if unreached and merge is None:
        # A target that could not be probed is not dropped: it becomes a system with no
        # uses, which triage reports as unassessed in every output. (With --merge the
        # existing entry for it is left untouched instead.)
        taken = {system["id"] for system in document["systems"]}
        for target, line in unreached:
            document["systems"].append({
                "id": unique_id(slugify(target), taken),
                "name": target,
                "shelf_life_years": shelf_life_years,
                "migration_years": migration_years,
                "assumed": list(ASSUMED_SYSTEM_FIELDS),
                "source": target,
                "exposure": DEFAULT_EXPOSURE,
                "notes": f"probe failed, not assessed: {line}",
                "uses": [],
            })
    summary.append(f"{len(findings)} uses in {len(groups)} systems (grouped by {group_by.value})")
    if groups:
        summary.append(assumed_line(len(groups), shelf_life_years, migration_years))
    private = sum(1 for f in findings if f.kind is FindingKind.PRIVATE_KEY)
    if private:
        summary.append(f"{private} private keys in plain files (type and size recorded only)")
    if merge is not None:
        existing, original = load_existing_text(merge)
        document, report = merge_inventory(existing, document, in_scope)
        summary.extend(report.lines())
        if output_format == "yaml" and is_round_trip(document):
            # Comments, key order, flow or block style and blank lines of the file are kept.
            text = dump_round_trip(document, original)
            check_readable(text, len(findings))
            return CommandResult(text, summary, EXIT_FINDINGS if failed else EXIT_OK)
    text = render(document, output_format)
    check_readable(text, len(findings))
    return CommandResult(text, summary, EXIT_FINDINGS if failed else EXIT_OK)


def check_readable(text: str, uses: int) -> None:
    """Refuse to hand back an inventory that ``triage`` would refuse whole.

    The reader takes at most 16 MiB and 1,000,000 values (pqtriage.yamlio); every value of
    the block YAML (and of the indented JSON) is on a line of its own, so counting lines
    bounds the values. Nothing is written then: the fix is to scan in several runs.
    """
    size = len(text.encode("utf-8", "backslashreplace"))
    lines = text.count("\n")
    if size <= MAX_FILE_BYTES and lines <= MAX_NODES:
        return
    raise ScanError(
        f"the inventory of {uses:,} uses would be {size / (1024 * 1024):.1f} MiB with up to {lines:,} "
        f"values, more than 'pqtriage triage' reads ({MAX_FILE_BYTES // (1024 * 1024)} MiB, "
        f"{MAX_NODES:,} values); nothing was written",
        hint="scan fewer folders per run (one inventory each), or group them with --group-by",
    )
