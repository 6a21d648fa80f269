"""Benchmarks of pqtriage: one script per figure; run_all.py writes docs/performance.md."""
