"""Output formats: one package per medium, one module per view it renders.

Formatters return strings or inert rich renderables; only the CLI prints or writes them.
Shared across media: text.py (neutralising input text), notes.py (cautions, assumptions,
sources), labels.py (short labels) and interface.py (the triage result formatter ABC).
"""
