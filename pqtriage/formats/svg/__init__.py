"""SVG: standalone charts (the plan's timeline)."""
