"""Terminal views: inert rich renderables, one module per view (the CLI prints them)."""
