"""CycloneDX 1.6: a triage result as a cryptography bill of materials (CBOM)."""
