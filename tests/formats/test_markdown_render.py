"""The report renders cleanly as GitHub-flavoured Markdown.

Rendered with markdown-it-py (a CommonMark reference implementation in Python, installed with
rich) with GFM tables enabled: every table row has as many cells as its header, and text from the
inventory produces no HTML of its own (no script, no link, no emphasis).
"""

from __future__ import annotations

from html.parser import HTMLParser

import pytest

from pqtriage.formats.markdown.triage import render_report
from pqtriage.model.arrival_model import SharedArrival
from pqtriage.model.inventory import CryptoUse, Inventory, Purpose, System
from pqtriage.model.triage import triage
from pqtriage.sources.profile_file import parse_profile
from tests.fakes import FakeCatalog

markdown_it = pytest.importorskip("markdown_it")

HOSTILE = "<script>alert(1)</script> | **bold** [link](http://x.invalid) `code` \x1b[31m [red]x[/red] _i_"


class _Tables(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.rows: list[list[str]] = []
        self.tags: list[str] = []
        self._row: list[str] | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append(tag)
        if tag == "tr":
            self._row = []
        elif tag in ("td", "th") and self._row is not None:
            self._row.append(tag)

    def handle_endtag(self, tag: str) -> None:
        if tag == "tr" and self._row is not None:
            self.rows.append(self._row)
            self._row = None


def _render(markdown: str) -> _Tables:
    html = markdown_it.MarkdownIt("commonmark").enable("table").render(markdown)
    parser = _Tables()
    parser.feed(html)
    return parser


def _hostile_report() -> str:
    use = CryptoUse(Purpose.KEY_ESTABLISHMENT, "RSA-2048", notes=HOSTILE, protocol=HOSTILE)
    unknown = CryptoUse(Purpose.ENCRYPTION, HOSTILE)
    system = System(id=HOSTILE, name=HOSTILE, owner=HOSTILE, description=HOSTILE, notes=HOSTILE,
                    shelf_life_years=5, migration_years=2, uses=(use, unknown))
    inventory = Inventory(organization=HOSTILE, systems=(system,), source_path=HOSTILE)
    profile = parse_profile(b"crqc_year: 2035\n", "p.yaml")
    import datetime as dt

    return render_report(triage(inventory, FakeCatalog(), profile, SharedArrival(), dt.date(2026, 12, 1)))


def test_every_table_row_has_the_header_width() -> None:
    from tests.formats.test_table import small_result

    for text in (render_report(small_result()), _hostile_report()):
        parsed = _render(text)
        assert parsed.rows, "the report has tables"
        # Rows come table by table: a header row (th) then body rows (td) of the same width.
        width = None
        for row in parsed.rows:
            if row and row[0] == "th":
                width = len(row)
            else:
                assert len(row) == width


def test_input_text_creates_no_markup() -> None:
    parsed = _render(_hostile_report())
    assert "script" not in parsed.tags
    assert "a" not in parsed.tags  # no link from input text
    assert "em" not in parsed.tags
    # Our own report uses strong only in the verdict legend and the caution.
    text = _hostile_report()
    assert "\x1b" not in text and "\\x1b" in text
    assert "<script>" not in text
