"""SARIF 2.1.0: a triage result as code-scanning findings."""
