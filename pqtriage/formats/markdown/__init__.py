"""Markdown (GitHub-flavoured): the report for the compliance file and its sections, one module per view."""
