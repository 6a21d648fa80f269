"""Fuzzing the text neutralisers every output relies on (pqtriage.formats.text).

Checked against what the media define: CommonMark 0.31 (raw HTML starts with '<';
a table cell ends at an unescaped '|', GFM tables extension), ECMA-48 (control
functions start with ESC, C0 and C1 controls), and the OWASP CSV-injection
guidance (cells starting with = + - @ tab or CR).
"""

from __future__ import annotations

import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.formats.text import csv_cell, markdown_code, markdown_text, visible

pytestmark = pytest.mark.fuzz

ANY_TEXT = st.text(st.characters(blacklist_categories=["Cs"]), max_size=200)
CONTROL = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


@settings(max_examples=500, deadline=None)
@given(ANY_TEXT)
def test_visible_has_no_control_or_bidi_characters(text: str) -> None:
    shown = visible(text)
    assert not CONTROL.search(shown)
    assert "\n" not in shown


@settings(max_examples=500, deadline=None)
@given(ANY_TEXT)
def test_markdown_text_has_no_html_no_unescaped_pipe_no_control(text: str) -> None:
    shown = markdown_text(text)
    assert "<" not in shown and ">" not in shown
    assert not re.search(r"(?<!\\)\|", shown.replace("\\\\", ""))
    assert not CONTROL.search(shown)


@settings(max_examples=500, deadline=None)
@given(ANY_TEXT)
def test_markdown_code_is_inert(text: str) -> None:
    inner = markdown_code(text)[len("<code>"):-len("</code>")]
    assert not re.search(r"[<>|`*_\[\]~\\]", inner)
    assert not CONTROL.search(inner)


@settings(max_examples=500, deadline=None)
@given(ANY_TEXT)
def test_csv_cell_cannot_start_a_formula(text: str) -> None:
    cell = csv_cell(text)
    assert not cell or cell[0] not in "=+-@\t\r"


# The parsers of discovery and interop are fuzzed in test_fuzz_discovery.py (PEM, DER, PKCS#12,
# OpenSSH lines and blobs, SSH KEXINIT) and test_fuzz_cbom.py (CycloneDX CBOM).
