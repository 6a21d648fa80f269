"""`pqtriage estimate`: Shor and Grover resource estimates and per-algorithm arrival."""

from __future__ import annotations

from enum import Enum
from typing import Optional

import typer


class EstimateFormat(str, Enum):
    """--format values of estimate."""

    text = "text"
    json = "json"


def register(app: typer.Typer) -> None:
    """Add the estimate command to the app."""

    @app.command("estimate")
    def estimate(
        algorithm: Optional[str] = typer.Argument(None, help="Any catalog spelling: RSA-3072, P-384, X25519, AES-128, SHA-256 ..."),
        all_: bool = typer.Option(False, "--all", help="Side-by-side table of what falls when."),
        method: Optional[str] = typer.Option(None, "--method", help="Construction by arXiv id (1905.09749, 2505.15917, 1611.07995, 1706.06752, 2306.08585)."),
        error_rate: float = typer.Option(1e-3, "--error-rate", help="Physical error rate per operation."),
        cycle_us: float = typer.Option(1.0, "--cycle-us", help="Surface-code cycle time in microseconds."),
        reaction_us: float = typer.Option(10.0, "--reaction-us", help="Classical reaction time in microseconds."),
        maxdepth: float = typer.Option(64, "--maxdepth", help="log2 of MAXDEPTH, the serial depth limit for Grover."),
        output_format: EstimateFormat = typer.Option(EstimateFormat.text, "--format", "-f", help="text or json."),
        output: Optional[str] = typer.Option(None, "--output", "-o", help="Write to this file."),
        profile: Optional[str] = typer.Option(None, "--profile", help="Threat profile for the arrival years."),
        as_of: Optional[str] = typer.Option(None, "--as-of", help="Assessment date YYYY-MM-DD for the years (default today)."),
    ) -> None:
        """Estimate the quantum resources that break an algorithm, and when it falls."""
        import datetime as dt

        from pqtriage.catalog import load_catalog
        from pqtriage.errors import UsageError
        from pqtriage.model.profile import decimal_year
        from pqtriage.sources.profile_file import load_profile
        from pqtriage.threat.command import estimate_command
        from pqtriage.threat.parameters import ThreatParameters

        if not all_ and not algorithm:
            raise UsageError("name an algorithm or pass --all", hint="for example: pqtriage estimate RSA-2048")
        try:
            day = dt.date.fromisoformat(as_of) if as_of else dt.date.today()
        except ValueError as exc:
            raise UsageError(f"--as-of {as_of!r} is not a date", hint="write YYYY-MM-DD, for example 2026-05-01") from exc
        threat_profile = load_profile(profile)
        base = ThreatParameters()
        if threat_profile.qubit_doubling_years:
            import dataclasses

            base = dataclasses.replace(base, doubling_years=threat_profile.qubit_doubling_years)
        catalog = load_catalog()
        view, code = estimate_command(
            algorithm, all_, method, error_rate, cycle_us, reaction_us, maxdepth, output_format.value,
            resolve=lambda name: catalog.resolve(name), specs=catalog.specs, base=base,
            profile=threat_profile, as_of_year=decimal_year(day), as_of_label=day.isoformat(),
        )
        if isinstance(view, str):
            if output:
                from pqtriage.output import write_atomic

                write_atomic(output, view)
            else:
                typer.echo(view, nl=not view.endswith("\n"))
        else:
            from rich.console import Console

            Console(highlight=False).print(view)
        raise typer.Exit(code)
