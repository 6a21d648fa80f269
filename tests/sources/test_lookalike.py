"""The look-alike skeleton of ids (pqtriage.sources.lookalike) against Unicode's own data.

Sources: Unicode Technical Standard #39 (Unicode Security Mechanisms), section 4 and its data
file confusables.txt, read through the confusable-homoglyphs package (its confusables.json is
generated from confusables.txt); Unicode Standard Annex #15 (normalisation forms) through
Python's unicodedata.
"""

from __future__ import annotations

import json
import unicodedata
from importlib import resources

import pytest

from pqtriage.sources.lookalike import (
    lookalike_pairs,
    looks_alike,
    prototypes,
    skeleton,
    spelled_out,
)


@pytest.fixture(scope="module")
def confusables() -> dict[str, list[dict[str, str]]]:
    text = (resources.files("confusable_homoglyphs") / "confusables.json").read_text("utf-8")
    return json.loads(text)  # type: ignore[no-any-return]


def test_every_shipped_row_is_in_the_unicode_confusables_data(confusables: dict[str, list[dict[str, str]]]) -> None:
    table = prototypes()
    assert len(table) >= 100
    for char, target in table.items():
        listed = {entry["c"] for entry in confusables.get(char, [])}
        # The prototype itself, or one the data lists whose own prototype is ours (0 -> O, 1 -> l).
        assert target in listed or any(table.get(c) == target for c in listed), (hex(ord(char)), target)


def test_rows_name_their_character_as_unicode_does() -> None:
    folder = resources.files("pqtriage") / "data" / "confusables.yaml"
    text = folder.read_text("utf-8")
    for char in prototypes():
        assert f'"U+{ord(char):04X}"' in text and unicodedata.name(char) in text


@pytest.mark.parametrize(
    ("a", "b"),
    [("pay", "p\u0430y"), ("\u00c5", "A\u030a"), ("WEB", "\uff37\uff25\uff22"), ("web", "web\u200b"),
     ("Internal", "\u0406nternal"), ("db-0", "db-\u041e")],
)
def test_look_alike_pairs_share_a_skeleton(a: str, b: str) -> None:
    assert skeleton(a) == skeleton(b)
    assert looks_alike(a, b) and lookalike_pairs([a, "other", b]) == [(0, 2)]


def test_nfc_and_nfd_forms_are_one_skeleton() -> None:
    """UAX #15: NFC and NFD of the same text are canonically equivalent."""
    text = "Smørrebrød-Åarhus-é"
    assert skeleton(unicodedata.normalize("NFC", text)) == skeleton(unicodedata.normalize("NFD", text))


def test_distinct_plain_ascii_ids_are_never_look_alikes() -> None:
    assert lookalike_pairs(["app1", "appl", "srv-O", "srv-0", "web", "Web"]) == []
    assert not looks_alike("app1", "appl")


def test_spelled_out_shows_what_the_eye_cannot() -> None:
    assert spelled_out("p\u0430y\x1b\u200b") == "p\\u0430y\\x1b\\u200b"
