"""What the commands share: option help texts, the choices and what each maps to, output.

Imported when the app is assembled (also for ``pqtriage --help``), so at module level it
imports only typer and the errors; everything heavier is imported inside the functions.
"""

from __future__ import annotations

import sys
from collections.abc import Sequence
from enum import Enum
from typing import Any, Optional

import typer

from pqtriage.errors import EXIT_FINDINGS, EXIT_OK, UsageError

PROFILE_HELP = ("Threat profile: a shipped name (survey-2025-upper, survey-2025-lower, survey-2024-upper, "
                "survey-2024-lower) or a YAML file.")
HARDWARE_HELP = ("Hardware and progress file (YAML): error rate, cycle and reaction times, doubling time of usable "
                 "qubits, runtime limit, band sampling. Keys it leaves out keep the shipped values.")
AS_OF_HELP = "Date treated as today (YYYY-MM-DD), for reproducible reports."
CBOM_DEFAULTS_HELP = "For a CycloneDX input: YAML side file with shelf-life, migration time and other values a CBOM cannot carry."
POLICY_HELP = ("Policy timeline to check (repeatable): nist-ir-8547, cnsa2, uk-ncsc, eu-roadmap, au-ism, "
               "ca-roadmap, bsi, nsm-10. Added to those the inventory names.")
COLUMNS_HELP = ("For a CSV file or a workbook: YAML column map of header names and value spellings "
                "(see docs/inventory-format.md).")
WHERE_HELP = ("Show only systems matching this filter, e.g. \"criticality >= high and verdict = exposed\" "
              "(see docs/inventory-format.md, 'Views').")
GROUP_BY_HELP = "Group the systems by this field: owner, business_unit, criticality, verdict, hosting.model, tags, extra.NAME ..."
TOP_HELP = "Show only the N most urgent systems (after --where), in every format."
CAPACITY_HELP = "Migrations in parallel (3), person-weeks per quarter (40pw), or both (3,40pw)."
OUTPUT_HELP = ("Write to this file instead of stdout ('-' is stdout), atomically; a symbolic link is "
               "written through to its target. Devices, pipes, folders and this run's input files "
               "are refused.")


class ResultFormatChoice(str, Enum):
    """--format values of triage."""

    table = "table"
    json = "json"
    markdown = "markdown"
    csv = "csv"
    sarif = "sarif"
    cbom = "cbom"
    xlsx = "xlsx"


class VerdictChoice(str, Enum):
    """The verdict words, from most to least urgent (--fail-on also takes short forms)."""

    classically_broken = "classically-broken"
    exposed = "exposed"
    unassessed = "unassessed"
    within_margin = "within-margin"
    quantum_resistant = "quantum-resistant"


FAIL_ON_SHORT = {"broken": "classically-broken", "margin": "within-margin", "within": "within-margin",
                 "resistant": "quantum-resistant", "unknown": "unassessed"}
"""Short forms --fail-on accepts, beside the verdict words (the same table as parse_verdict)."""
FAIL_ON_HELP = ("Exit 1 if any system is at or above this verdict: classically-broken, exposed, unassessed, "
                "within-margin or quantum-resistant (short forms: broken, margin, resistant).")
FAIL_ON_NAMED = 10
"""Systems named on stderr when --fail-on triggers; the rest are counted."""


def check_fail_on(value: Optional[str]) -> Optional[str]:
    """Typer callback: the verdict word of a --fail-on value, or a usage error naming the words."""
    if value is None:
        return None
    from pqtriage.model.verdict import parse_verdict

    verdict = parse_verdict(value)
    if verdict is None:
        words = ", ".join(choice.value for choice in VerdictChoice)
        raise typer.BadParameter(
            f"{value!r} is not a verdict; use one of {words} (or broken, margin, resistant)"
        )
    return verdict.value


class DiscoveryFormat(str, Enum):
    """--format values of scan and probe."""

    yaml = "yaml"
    json = "json"


class GroupByChoice(str, Enum):
    """--group-by values of scan."""

    folder = "folder"
    file = "file"
    subject = "subject"
    host = "host"


class EstimateFormat(str, Enum):
    """--format values of estimate."""

    text = "text"
    json = "json"


class PlanFormat(str, Enum):
    """--format values of plan."""

    table = "table"
    markdown = "markdown"
    json = "json"


class PlanPeriod(str, Enum):
    """--period values of plan."""

    year = "year"
    quarter = "quarter"


class DiffFormat(str, Enum):
    """--format values of diff."""

    table = "table"
    markdown = "markdown"
    json = "json"


def result_formats() -> dict[str, Any]:
    """Every triage --format choice mapped to its formatter (None = terminal table)."""
    from pqtriage.formats.cbom.triage import CbomFormat
    from pqtriage.formats.csv.triage import CsvFormat
    from pqtriage.formats.json.triage import JsonFormat
    from pqtriage.formats.markdown.triage import MarkdownFormat
    from pqtriage.formats.sarif.triage import SarifFormat
    from pqtriage.formats.xlsx.triage import XlsxFormat

    return {
        ResultFormatChoice.table.value: None,
        ResultFormatChoice.json.value: JsonFormat(),
        ResultFormatChoice.markdown.value: MarkdownFormat(),
        ResultFormatChoice.csv.value: CsvFormat(),
        ResultFormatChoice.sarif.value: SarifFormat(),
        ResultFormatChoice.cbom.value: CbomFormat(),
        ResultFormatChoice.xlsx.value: XlsxFormat(),
    }


GROUPABLE_FORMATS = ("table", "markdown", "csv", "json", "xlsx")
"""Formats that show --group-by (SARIF and CycloneDX have no place for groups)."""


def view_of(result: Any, where: Optional[str], top: Optional[int], group_by: Optional[str],
            output_format: str = "table") -> Any:
    """The part of a result --where, --top and --group-by ask for (refused where it cannot apply)."""
    if where is None and top is None and group_by is None:
        return result
    from pqtriage.model.filter import parse_filter
    from pqtriage.model.view import check_group_field, select

    if group_by is not None and output_format not in GROUPABLE_FORMATS:
        raise UsageError(f"--group-by does not apply to --format {output_format}",
                         hint=f"use it with {', '.join(GROUPABLE_FORMATS)}")
    field = check_group_field(group_by) if group_by is not None else None
    return select(result, parse_filter(where) if where is not None else None, top, field)


def emit_bytes(data: bytes, output: Optional[str], what: str, inputs: Inputs = ()) -> None:
    """Write a binary output to -o FILE atomically, or to stdout when it is not a terminal."""
    if to_file(output):
        from pqtriage.cli.output import write_atomic

        write_atomic(str(output), data, inputs)
        return
    if sys.stdout.isatty():
        raise UsageError(f"{what} is a binary file: it is not printed on a terminal",
                         hint="give -o FILE, or redirect the output to a file")
    from pqtriage.cli.output import stdout_failure

    try:
        sys.stdout.flush()
        sys.stdout.buffer.write(data)
        sys.stdout.buffer.flush()
    except BrokenPipeError:
        raise
    except OSError as exc:
        raise stdout_failure(exc) from exc


def console(stderr: bool = False) -> Any:
    """A rich console for the terminal (stdout, or stderr for summaries)."""
    from rich.console import Console

    return Console(stderr=stderr, highlight=False, soft_wrap=False)


def plain_text(renderable: Any) -> str:
    """A terminal view as plain text at 100 columns, for -o FILE."""
    from io import StringIO

    from rich.console import Console

    buffer = StringIO()
    Console(file=buffer, width=100, no_color=True, color_system=None).print(renderable)
    return buffer.getvalue()


def to_file(output: Optional[str]) -> bool:
    """Whether -o names a file ('-' and no -o mean stdout)."""
    return bool(output and output != "-")


Inputs = Sequence[Optional[str]]
"""Paths of a run's input files: ``-o`` may not name any of them (pqtriage.cli.output)."""


def emit(text: str, output: Optional[str], inputs: Inputs = ()) -> None:
    """Write to -o FILE atomically, or to stdout (every write checked)."""
    from pqtriage.cli.output import write_atomic, write_stdout

    if to_file(output):
        write_atomic(str(output), text, inputs)
    else:
        write_stdout(text)


def echo(text: str, output: Optional[str], inputs: Inputs = ()) -> None:
    """Like :func:`emit`, ending the text in one newline."""
    emit(text if text.endswith("\n") else text + "\n", output, inputs)


def check_outputs(output: Optional[str], inputs: Inputs = (), *extra: Optional[str]) -> None:
    """Refuse unusable -o targets (and files written beside them) before any work is done."""
    from pqtriage.cli.output import output_target

    for path in (output, *extra):
        if to_file(path):
            output_target(str(path), inputs)


def profile_input(profile: Optional[str]) -> Optional[str]:
    """The --profile value when it names a file (an input of the run), else None."""
    if profile is None:
        return None
    from pathlib import Path

    return profile if Path(profile).exists() else None


def fail_code(result: Any, fail_on: Optional[str]) -> int:
    """Exit code for --fail-on: 1 if any system's verdict is at or above it, else 0.

    When it triggers, stderr names the systems that did (the first FAIL_ON_NAMED in rank order,
    then how many more), so a CI log says what to fix.
    """
    if fail_on is None:
        return EXIT_OK
    from pqtriage.formats.text import visible
    from pqtriage.model.verdict import SEVERITY, parse_verdict

    verdict = parse_verdict(str(getattr(fail_on, "value", fail_on)))
    if verdict is None:  # pragma: no cover - the option's callback refuses it first
        raise UsageError(f"--fail-on {fail_on!r} is not a verdict")
    threshold = SEVERITY[verdict]
    hits = [item for item in result.items if SEVERITY[item.verdict] >= threshold]
    if not hits:
        return EXIT_OK
    named = ", ".join(f"{visible(item.system.id)} ({item.verdict.value})" for item in hits[:FAIL_ON_NAMED])
    more = f" and {len(hits) - FAIL_ON_NAMED} more" if len(hits) > FAIL_ON_NAMED else ""
    sys.stderr.write(f"--fail-on {verdict.value}: {len(hits)} of {len(result.items)} systems at or above it: "
                     f"{named}{more}\n")
    return EXIT_FINDINGS


def chart_path_for(output: str) -> str:
    """The timeline chart's file name beside a Markdown file: report.md -> report-timeline.svg."""
    from pathlib import Path

    path = Path(output)
    return str(path.with_name(f"{path.stem}-timeline.svg"))


def write_discovery(result: Any, output: Optional[str], inputs: Inputs = ()) -> Any:
    """Write a scan's or probe's inventory to -o FILE (atomically); the result names the file."""
    if not to_file(output):
        return result
    from dataclasses import replace

    from pqtriage.cli.output import write_atomic

    write_atomic(str(output), result.text, [*inputs, *getattr(result, "read", ())])
    return replace(result, written=output)


def finish_discovery(result: Any) -> None:
    """Print a scan's or probe's inventory (unless written) and summary, then exit with its code.

    Summary lines carry file names, certificate subjects and SSH banners: each goes through
    the one text neutraliser, so none can move or retitle the terminal.
    """
    from pqtriage.cli.output import write_stdout
    from pqtriage.formats.text import visible

    if result.written is None:
        write_stdout(result.text)
    for line in result.summary:
        sys.stderr.write(visible(line.rstrip("\n")) + "\n")
    raise typer.Exit(result.exit_code)
