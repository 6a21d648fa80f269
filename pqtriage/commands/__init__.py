"""Commands of the larger features, registered on the typer app by cli.register_all."""

from __future__ import annotations

import typer


def register(app: typer.Typer) -> None:
    """Add every feature command to the app (modules are imported when a command runs)."""
    from pqtriage.commands import estimate, interop

    estimate.register(app)
    interop.register(app)
