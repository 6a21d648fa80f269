"""The Markdown report: exact text on a fixed inventory and --as-of, cautions, neutralised input."""

from __future__ import annotations

from pathlib import Path

from pqtriage.formats.markdown.triage import render_report
from tests.formats.test_table import small_result

HERE = Path(__file__).parent


def test_report_exact_text() -> None:
    text = render_report(small_result()).replace(str(HERE), "<tests>")
    assert text == (HERE / "expected_report.md").read_text(encoding="utf-8")


def test_report_carries_cautions_assumptions_and_sources() -> None:
    text = render_report(small_result())
    assert "not a certification" in text
    assert "Follow NIST" in text and "national cyber-security agency" in text and "regulator" in text
    assert "## Assumptions" in text and "what-if" in text.lower()
    assert "IACR ePrint 2015/1075" in text and "NIST SP 800-57 Part 1 Rev. 5" in text
    assert "Inventory SHA-256" in text


def test_input_markup_is_neutralised_in_tables() -> None:
    text = render_report(small_result())
    # The system name "[bold]Legacy[/bold] | link" is shown literally: brackets and the pipe
    # escaped so a Git forge renders neither a link nor an extra table column.
    assert "\\[bold\\]Legacy\\[/bold\\] \\| link" in text
    assert "[bold]Legacy" not in text
