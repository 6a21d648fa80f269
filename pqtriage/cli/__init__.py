"""The pqtriage command: the typer app, assembled from one small module per command.

Exit codes: 0 done; 1 findings at or above --fail-on; 2 bad input or usage;
3 internal or environment failure. Errors print one line; --debug shows the
traceback. Each command imports what it needs when it runs, so start-up stays fast.
"""

from __future__ import annotations

import sys
from typing import Any, Optional

import typer

try:  # typer 0.2x vendors its own click; older releases use the click package
    from typer._click import exceptions as _click_errors  # type: ignore[import-not-found]
except ImportError:  # pragma: no cover - depends on the installed typer
    from click import exceptions as _click_errors  # type: ignore[no-redef]

from pqtriage import __version__
from pqtriage.cli import check, diff, estimate, init, plan, probe, report, scan, schema, triage
from pqtriage.errors import EXIT_BAD_INPUT, EXIT_INTERNAL, EXIT_OK, PqtriageError

app = typer.Typer(
    name="pqtriage",
    help="Rank systems by post-quantum exposure (Mosca's inequality) and plan their migration.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
)

_STATE: dict[str, Any] = {"debug": False}


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


# In this order in --help.
app.command("triage")(triage.triage_command)
app.command("report")(report.report_command)
app.command("check")(check.check_command)
app.command("init")(init.init_command)
app.command("estimate")(estimate.estimate)
app.command("scan")(scan.scan)
app.command("probe")(probe.probe)
app.command("plan")(plan.plan)
app.command("schema")(schema.schema)
app.command("diff")(diff.diff)


def print_error(text: str, label: str = "error") -> None:
    """The CLI's one error printer: one line on stderr, input text neutralised.

    Messages quote ids, file names and values from inputs, so the line goes through
    pqtriage.formats.text.visible (escape sequences, bidi and invisible characters shown as
    escapes) and is cut to a bounded length.
    """
    from pqtriage.formats.text import one_line

    try:
        sys.stderr.write(f"pqtriage: {label}: {one_line(text, MAX_ERROR_CHARACTERS)}\n")
        sys.stderr.flush()
    except OSError:  # stderr itself is gone: nothing left to tell
        pass


MAX_ERROR_CHARACTERS = 2000
"""Longest error line: a 10 MB id quoted in a message is cut (with an ellipsis)."""


def main(argv: Optional[list[str]] = None) -> int:
    """Entry point: run the app and map errors to documented exit codes."""
    from pqtriage.cli.warnings_capture import captured_warnings

    command = typer.main.get_command(app)
    args = list(sys.argv[1:] if argv is None else argv)
    debug = "--debug" in args
    try:
        with captured_warnings(print_error):
            code = command.main(args=args, prog_name="pqtriage", standalone_mode=False)
        sys.stdout.flush()  # a full disk behind stdout shows here, not at interpreter exit
    except PqtriageError as exc:
        if debug:
            raise
        for line in exc.diagnostic_lines():
            print_error(line)
        if exc.exit_code == EXIT_INTERNAL:
            from pqtriage.cli.output import quiet_stdout

            quiet_stdout()
        return exc.exit_code
    except typer.Abort:
        print_error("aborted", "error")
        return EXIT_INTERNAL
    except _click_errors.ClickException as exc:
        if debug:
            raise
        print_error(f"{exc.format_message()} (see 'pqtriage --help')")
        return EXIT_BAD_INPUT
    except BrokenPipeError:
        from pqtriage.cli.output import quiet_stdout

        quiet_stdout()
        return EXIT_OK
    except KeyboardInterrupt:
        print_error("interrupted")
        return EXIT_INTERNAL
    except OSError as exc:
        if debug:
            raise
        from pqtriage.cli.output import WRITE_ERRNOS, quiet_stdout

        if exc.errno in WRITE_ERRNOS and exc.filename is None:  # stdout or stderr failed
            print_error(f"cannot write the output: {exc.strerror}; check the disk or pipe it goes to")
            quiet_stdout()
            return EXIT_INTERNAL
        print_error(f"{type(exc).__name__}: {exc} (rerun with --debug for the traceback and report it)",
                    "internal error")
        return EXIT_INTERNAL
    except Exception as exc:  # the one place internal failures are caught
        if debug:
            raise
        print_error(f"{type(exc).__name__}: {exc} (rerun with --debug for the traceback and report it)",
                    "internal error")
        return EXIT_INTERNAL
    return code if isinstance(code, int) else EXIT_OK
