"""JSON: one module per view, each a JSON-ready dict and its text."""
