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


# Parsers of the discovery and interop branches join here when merged (module, what to fuzz).
PARSERS = [
    ("pqtriage.sources.cbom", "CycloneDX CBOM JSON"),
    ("pqtriage.sources.scan", "PEM, DER and PKCS#12 files"),
    ("pqtriage.sources.scan", "authorized_keys and known_hosts lines"),
    ("pqtriage.sources.probe", "SSH KEXINIT packets"),
    ("pqtriage.sources.probe", "TLS records (ServerHello)"),
]


def _merged(module: str) -> bool:
    import importlib.util

    try:
        return importlib.util.find_spec(module) is not None
    except ModuleNotFoundError:
        return False


@pytest.mark.parametrize(
    "module, what",
    [pytest.param(*p, marks=pytest.mark.skipif(not _merged(p[0]), reason="not merged yet")) for p in PARSERS],
)
def test_parser_fuzzing_is_written(module: str, what: str) -> None:
    pytest.fail(f"add a hypothesis fuzz test of {what} ({module}) to tests/fuzz/")
