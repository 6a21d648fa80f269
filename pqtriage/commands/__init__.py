"""Commands of the larger features, registered on the typer app by cli.register_all."""

from __future__ import annotations

import typer


def register(app: typer.Typer) -> None:
    """Add every feature command to the app (modules are imported when a command runs)."""
    from pqtriage.commands import discover, estimate, interop, plan

    estimate.register(app)
    discover.register(app)
    plan.register(app)
    interop.register(app)
