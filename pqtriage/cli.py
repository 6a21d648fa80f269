"""The pqtriage command: wiring only, no domain logic.

Exit codes: 0 done; 1 findings at or above --fail-on; 2 bad input or usage;
3 internal or environment failure. Errors print one line; --debug shows the
traceback. Modules are imported inside each command so start-up stays fast.
"""

from __future__ import annotations

import os
import sys
from enum import Enum
from typing import Any, List, Optional

import typer

try:  # typer 0.2x vendors its own click; older releases use the click package
    from typer._click import exceptions as _click_errors  # type: ignore[import-not-found]
except ImportError:  # pragma: no cover - depends on the installed typer
    from click import exceptions as _click_errors  # type: ignore[no-redef]

from pqtriage import __version__
from pqtriage.errors import EXIT_BAD_INPUT, EXIT_FINDINGS, EXIT_INTERNAL, EXIT_OK, PqtriageError

app = typer.Typer(
    name="pqtriage",
    help="Rank systems by post-quantum exposure (Mosca's inequality) and plan their migration.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
)

_STATE: dict[str, Any] = {"debug": False}


class ResultFormatChoice(str, Enum):
    """--format values of triage."""

    table = "table"
    json = "json"
    markdown = "markdown"
    csv = "csv"
    sarif = "sarif"
    cbom = "cbom"


class VerdictChoice(str, Enum):
    """--fail-on values, from most to least urgent."""

    classically_broken = "classically-broken"
    exposed = "exposed"
    unassessed = "unassessed"
    within_margin = "within-margin"
    quantum_resistant = "quantum-resistant"


def result_formats() -> dict[str, Any]:
    """Every --format choice mapped to its formatter (None = terminal table)."""
    from pqtriage.formats.cbom_format import CbomFormat
    from pqtriage.formats.csv_format import CsvFormat
    from pqtriage.formats.json_format import JsonFormat
    from pqtriage.formats.markdown import MarkdownFormat
    from pqtriage.formats.sarif_format import SarifFormat

    return {
        ResultFormatChoice.table.value: None,
        ResultFormatChoice.json.value: JsonFormat(),
        ResultFormatChoice.markdown.value: MarkdownFormat(),
        ResultFormatChoice.csv.value: CsvFormat(),
        ResultFormatChoice.sarif.value: SarifFormat(),
        ResultFormatChoice.cbom.value: CbomFormat(),
    }


def _console(stderr: bool = False) -> Any:
    from rich.console import Console

    return Console(stderr=stderr, highlight=False, soft_wrap=False)


def _emit(text: str, output: Optional[str]) -> None:
    """Write to -o FILE atomically, or to stdout."""
    if output and output != "-":
        from pqtriage.output import write_atomic

        write_atomic(output, text)
    else:
        sys.stdout.write(text)
        sys.stdout.flush()


def _fail_code(result: Any, fail_on: Optional[VerdictChoice]) -> int:
    if fail_on is None:
        return EXIT_OK
    from pqtriage.model.verdict import SEVERITY, Verdict

    threshold = SEVERITY[Verdict(fail_on.value)]
    worst = max((SEVERITY[i.verdict] for i in result.items), default=-1)
    return EXIT_FINDINGS if worst >= threshold else EXIT_OK


def _print_version(value: bool) -> None:
    if value:
        typer.echo(f"pqtriage {__version__}")
        raise typer.Exit(EXIT_OK)


@app.callback()
def _root(
    debug: bool = typer.Option(False, "--debug", help="Show tracebacks of errors."),
    version: bool = typer.Option(False, "--version", is_eager=True, callback=_print_version,
                                 help="Print the version and exit."),
) -> None:
    _STATE["debug"] = debug


PROFILE_HELP = "Threat profile: a shipped name (survey-2025-upper, survey-2025-lower) or a YAML file."
AS_OF_HELP = "Date treated as today (YYYY-MM-DD), for reproducible reports."
CBOM_DEFAULTS_HELP = "For a CycloneDX input: YAML side file with shelf-life, migration time and other values a CBOM cannot carry."


@app.command("triage")
def triage_command(
    inventory: str = typer.Argument(..., help="Inventory file (pqtriage YAML or CycloneDX JSON)."),
    output_format: ResultFormatChoice = typer.Option(ResultFormatChoice.table, "--format", "-f", help="Output format."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Write to this file instead of stdout."),
    profile: Optional[str] = typer.Option(None, "--profile", help=PROFILE_HELP),
    as_of: Optional[str] = typer.Option(None, "--as-of", help=AS_OF_HELP),
    top: Optional[int] = typer.Option(None, "--top", min=1, help="Show only the N most urgent systems (table)."),
    fail_on: Optional[VerdictChoice] = typer.Option(None, "--fail-on", help="Exit 1 if any system is at or above this verdict."),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
) -> None:
    """Rank the inventory's systems by post-quantum exposure."""
    from pqtriage.pipeline import parse_as_of, run_triage

    result = run_triage(inventory, profile, parse_as_of(as_of), cbom_defaults)
    formatter = result_formats()[output_format.value]
    if formatter is None:
        from pqtriage.formats.table import terminal_view

        view = terminal_view(result, top)
        if output and output != "-":
            from io import StringIO

            from rich.console import Console

            buffer = StringIO()
            Console(file=buffer, width=100, no_color=True, color_system=None).print(view)
            _emit(buffer.getvalue(), output)
        else:
            _console().print(view)
    else:
        _emit(formatter.render(result), output)
        if output and output != "-":
            from pqtriage.formats.table import summary_block

            _console(stderr=True).print(summary_block(result))
    raise typer.Exit(_fail_code(result, fail_on))


@app.command("report")
def report_command(
    inventory: str = typer.Argument(..., help="Inventory file (pqtriage YAML or CycloneDX JSON)."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Markdown file to write (stdout if absent); the timeline chart goes beside it as NAME-timeline.svg."),
    profile: Optional[str] = typer.Option(None, "--profile", help=PROFILE_HELP),
    as_of: Optional[str] = typer.Option(None, "--as-of", help=AS_OF_HELP),
    policy: Optional[List[str]] = typer.Option(None, "--policy", help="Policy timeline for the plan section (repeatable); added to those the inventory names."),
    capacity: Optional[str] = typer.Option(None, "--capacity", help="Plan capacity: migrations in parallel (3), person-weeks per quarter (40pw), or both."),
    fail_on: Optional[VerdictChoice] = typer.Option(None, "--fail-on", help="Exit 1 if any system is at or above this verdict."),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
) -> None:
    """Write the Markdown report for the compliance file (ranking, plan, sensitivity)."""
    from pathlib import Path

    from pqtriage.commands.plan import chart_path_for
    from pqtriage.formats.markdown import render_report
    from pqtriage.formats.sensitivity_view import sensitivity_markdown
    from pqtriage.formats.table import summary_block
    from pqtriage.pipeline import parse_as_of, prepare
    from pqtriage.plan.markdown import plan_section
    from pqtriage.plan.svg import plan_svg

    run = prepare(inventory, profile, parse_as_of(as_of), cbom_defaults)
    result = run.result
    the_plan = run.plan(tuple(policy or ()), capacity)
    to_file = bool(output and output != "-")
    chart = chart_path_for(output) if to_file and output else None
    sections = [
        plan_section(the_plan, Path(chart).name if chart else None),
        sensitivity_markdown(run.sensitivity()),
    ]
    if chart:
        from pqtriage.output import write_atomic

        write_atomic(chart, plan_svg(the_plan))
    _emit(render_report(result, sections), output)
    _console(stderr=True).print(summary_block(result))
    raise typer.Exit(_fail_code(result, fail_on))


@app.command("check")
def check_command(
    inventory: str = typer.Argument(..., help="Inventory file to validate."),
    strict: bool = typer.Option(False, "--strict", help="Treat warnings (dependencies outside the file) as errors."),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
) -> None:
    """Validate an inventory file (YAML or CycloneDX); report unknown algorithms."""
    from pqtriage.catalog import load_catalog
    from pqtriage.formats.text import visible
    from pqtriage.pipeline import load_any

    inv = load_any(inventory, cbom_defaults)
    catalog = load_catalog()
    console = _console(stderr=True)
    unknown = 0
    for system in inv.systems:
        for use in system.uses:
            found = catalog.resolve(use.algorithm, key_size=use.key_size, curve=use.curve,
                                    parameter_set=use.parameter_set, purpose=use.purpose.value)
            if not found.assessed:
                unknown += 1
                console.print(f"note: {visible(use.source)}: {visible(use.algorithm)}: "
                              f"{visible(found.reason)} (this use will be unassessed)", markup=False)
    for warning in inv.warnings:
        console.print(f"warning: {visible(warning)}", markup=False)
    uses = sum(len(s.uses) for s in inv.systems)
    console.print(f"{visible(inventory)}: valid inventory of {len(inv.systems)} systems and {uses} uses"
                  f" ({unknown} unassessed, {len(inv.warnings)} warnings)", markup=False)
    if strict and inv.warnings:
        raise typer.Exit(EXIT_BAD_INPUT)
    raise typer.Exit(EXIT_OK)


@app.command("init")
def init_command(
    output: str = typer.Argument("inventory.yaml", help="File to create."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing file."),
) -> None:
    """Write a commented inventory template to start from."""
    from importlib import resources

    from pqtriage.errors import UsageError
    from pqtriage.output import write_atomic

    if os.path.exists(output) and not force:
        raise UsageError(f"{output} exists", hint="choose another name or pass --force")
    template = (resources.files("pqtriage") / "data" / "inventory-template.yaml").read_text("utf-8")
    write_atomic(output, template)
    _console(stderr=True).print(f"wrote {output}: edit it, then run 'pqtriage check {output}'", markup=False)


def _register_optional_commands() -> None:
    """Commands whose modules may be absent in a partial install."""
    try:
        from pqtriage import commands
    except ImportError:
        return
    commands.register(app)


_register_optional_commands()


def main(argv: Optional[list[str]] = None) -> int:
    """Entry point: run the app and map errors to documented exit codes."""
    command = typer.main.get_command(app)
    args = list(sys.argv[1:] if argv is None else argv)
    debug = "--debug" in args
    try:
        code = command.main(args=args, prog_name="pqtriage", standalone_mode=False)
    except PqtriageError as exc:
        if debug:
            raise
        sys.stderr.write(f"pqtriage: error: {exc.diagnostics()}\n")
        return exc.exit_code
    except typer.Abort:
        sys.stderr.write("pqtriage: aborted\n")
        return EXIT_INTERNAL
    except _click_errors.ClickException as exc:
        if debug:
            raise
        sys.stderr.write(f"pqtriage: error: {' '.join(exc.format_message().split())}"
                         " (see 'pqtriage --help')\n")
        return EXIT_BAD_INPUT
    except BrokenPipeError:
        return EXIT_OK
    except KeyboardInterrupt:
        sys.stderr.write("pqtriage: interrupted\n")
        return EXIT_INTERNAL
    except Exception as exc:  # the one place internal failures are caught
        if debug:
            raise
        sys.stderr.write(f"pqtriage: internal error: {type(exc).__name__}: {' '.join(str(exc).split())}"
                         " (rerun with --debug for the traceback and report it)\n")
        return EXIT_INTERNAL
    return code if isinstance(code, int) else EXIT_OK


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
