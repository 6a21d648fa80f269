"""Command implementations as plain functions; pqtriage.cli wires them into typer."""
