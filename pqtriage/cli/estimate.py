"""`pqtriage estimate`: Shor and Grover resource estimates and when each algorithm falls."""

from __future__ import annotations

from collections.abc import Callable, Iterable
from typing import TYPE_CHECKING, Optional

import typer

from pqtriage.cli.common import (
    HARDWARE_HELP,
    OUTPUT_HELP,
    EstimateFormat,
    check_outputs,
    console,
    emit,
    profile_input,
)
from pqtriage.errors import EXIT_OK, UsageError

if TYPE_CHECKING:  # annotations only: --help must not load the estimator
    from rich.console import RenderableType

    from pqtriage.catalog.spec import AlgorithmSpec
    from pqtriage.threat.parameters import ThreatParameters
    from pqtriage.threat.resource_arrival import ArrivalDistribution
    from pqtriage.threat.run import Resolver

OUTPUT_FORMATS: tuple[str, ...] = ("text", "json")


def estimate_command(
    algorithm: str | None,
    all_: bool,
    method: str | None,
    error_rate: float | None,
    cycle_us: float | None,
    reaction_us: float | None,
    maxdepth: float | None,
    output_format: str,
    *,
    resolve: Resolver,
    specs: Callable[[], Iterable[AlgorithmSpec]] | Iterable[AlgorithmSpec],
    base: ThreatParameters | None = None,
    profile: ArrivalDistribution | None = None,
    as_of_year: float | None = None,
    as_of_label: str | None = None,
    design: object = None,
) -> tuple[RenderableType | str, int]:
    """Estimate one algorithm (working view) or all (side-by-side table), or JSON of either.

    The computation is :func:`pqtriage.threat.run.run_estimates` (its arguments, plus
    ``output_format``, text or json, and ``as_of_label``, the --as-of date for the legend).

    Returns:
        The renderable (text) or JSON string, and the exit code.

    Raises:
        UsageError: unknown algorithm, method or format, or out-of-range options.
    """
    if output_format not in OUTPUT_FORMATS:
        raise UsageError(f"--format {output_format!r} is not supported", hint="use text or json")
    from pqtriage.threat.run import run_estimates

    run = run_estimates(
        algorithm, all_, method, error_rate, cycle_us, reaction_us, maxdepth,
        resolve=resolve, specs=specs, base=base, profile=profile, as_of_year=as_of_year,
        design=design,  # type: ignore[arg-type]
    )  # fmt: skip
    if run.side_by_side:
        if output_format == "json":
            from pqtriage.formats.json.estimate import estimates_json

            return estimates_json(run.estimates), EXIT_OK
        from pqtriage.formats.table.side_by_side import legend_context, side_by_side

        context = legend_context(run.estimates, run.params, run.model, run.data, profile, as_of_label)
        return side_by_side(run.estimates, context), EXIT_OK
    if output_format == "json":
        from pqtriage.formats.json.estimate import estimate_json

        return estimate_json(run.estimates[0]), EXIT_OK
    from pqtriage.formats.table.estimate import working_view

    return working_view(run.estimates[0]), EXIT_OK


def estimate(
    algorithm: Optional[str] = typer.Argument(None, help="Any catalog spelling: RSA-3072, P-384, X25519, AES-128, SHA-256 ..."),
    all_: bool = typer.Option(False, "--all", help="Side-by-side table of what falls when."),
    method: Optional[str] = typer.Option(None, "--method", help="Construction by arXiv id (1905.09749, 2505.15917, 1611.07995, 1706.06752, 2306.08585)."),
    error_rate: Optional[float] = typer.Option(None, "--error-rate", help="Physical error rate per operation (default: the hardware file's, 1e-3)."),
    cycle_us: Optional[float] = typer.Option(None, "--cycle-us", help="Surface-code cycle time in microseconds (default: the hardware file's, 1)."),
    reaction_us: Optional[float] = typer.Option(None, "--reaction-us", help="Classical reaction time in microseconds (default: the hardware file's, 10)."),
    maxdepth: Optional[float] = typer.Option(None, "--maxdepth", help="log2 of MAXDEPTH, the serial depth limit for Grover (default 64)."),
    output_format: EstimateFormat = typer.Option(EstimateFormat.text, "--format", "-f", help="text or json."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help=OUTPUT_HELP),
    profile: Optional[str] = typer.Option(None, "--profile", help="Threat profile for the arrival years."),
    as_of: Optional[str] = typer.Option(None, "--as-of", help="Assessment date YYYY-MM-DD for the years (default today)."),
    hardware: Optional[str] = typer.Option(None, "--hardware", help=HARDWARE_HELP),
) -> None:
    """Estimate the quantum resources that break an algorithm, and when it falls."""
    from pqtriage.catalog import load_catalog
    from pqtriage.model.band import make_design
    from pqtriage.model.profile import decimal_year
    from pqtriage.sources.hardware_file import load_hardware
    from pqtriage.sources.profile_file import load_profile

    if not all_ and not algorithm:
        raise UsageError("name an algorithm or pass --all", hint="for example: pqtriage estimate RSA-2048")
    from pqtriage.pipeline import parse_as_of

    day = parse_as_of(as_of)  # bounded: dates past the planning range leave the calendar
    inputs = [profile_input(profile), hardware]
    check_outputs(output, inputs)
    threat_profile = load_profile(profile)
    machine = load_hardware(hardware)
    base = machine.parameters(doubling_years=threat_profile.qubit_doubling_years)
    design = make_design(machine.band_settings(threat_profile.qubit_doubling_years),
                         threat_profile.central_position, threat_profile.has_band)
    catalog = load_catalog()
    view, code = estimate_command(
        algorithm, all_, method, error_rate, cycle_us, reaction_us, maxdepth, output_format.value,
        resolve=lambda name: catalog.resolve(name), specs=catalog.specs, base=base,
        profile=threat_profile, as_of_year=decimal_year(day), as_of_label=day.isoformat(),
        design=design,
    )
    if isinstance(view, str):
        emit(view if view.endswith("\n") else view + "\n", output, inputs)
    elif output and output != "-":
        from pqtriage.cli.common import plain_text

        emit(plain_text(view), output, inputs)
    else:
        console().print(view)
    raise typer.Exit(code)
