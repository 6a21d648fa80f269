"""The finders' shipped tables load, are checked at load, and carry their sources.

Check values: the IANA TLS Supported Groups registry code points cited on each row (RFC 8446
section 4.2.7, RFC 7919, draft-ietf-tls-ecdhe-mlkem 0x11EC), the TLS 1.3 suites of RFC 8446
appendix B.4, and the catalog (every strongSwan keyword names a catalog entry).
"""

from __future__ import annotations

import pytest

from pqtriage.catalog import load_catalog
from pqtriage.errors import CatalogError
from pqtriage.sources.scan.finders import source_code, strongswan, traffic
from pqtriage.sources.scan.finders.cipherstring import cipher_table
from pqtriage.sources.scan.finders.openssh_config import known_versions


def test_every_table_loads_with_sources() -> None:
    assert cipher_table().source.startswith("OpenSSL 3.")
    assert known_versions() == ("9.2",)
    table, ignored = strongswan.keywords()
    assert table["mlkem768"][0] == "ML-KEM-768" and "esn" in ignored
    assert len(source_code.rules()[0]) >= 70


def test_code_points() -> None:
    groups, suites, versions = traffic.codepoints()
    assert (groups[0x001D], groups[0x0017], groups[0x0100]) == ("x25519", "secp256r1", "ffdhe2048")
    assert groups[0x11EC] == "X25519MLKEM768"
    assert [suites[c] for c in (0x1301, 0x1302, 0x1303)] == [
        "TLS_AES_128_GCM_SHA256", "TLS_AES_256_GCM_SHA384", "TLS_CHACHA20_POLY1305_SHA256",
    ]  # fmt: skip
    assert suites[0xC02F] == "ECDHE-RSA-AES128-GCM-SHA256"  # IANA 0xC0,0x2F (RFC 5289)
    assert versions[0x0304] == "TLS 1.3"


def test_every_strongswan_keyword_names_a_catalog_entry() -> None:
    catalog = load_catalog()
    for token, (name, _) in strongswan.keywords()[0].items():
        assert catalog.resolve(name).spec is not None, token


def test_a_misspelt_rule_field_is_refused(monkeypatch: pytest.MonkeyPatch) -> None:
    original = source_code.load_data

    def misspelt(name: str, sections: object) -> dict:  # type: ignore[type-arg]
        document = original(name, sections)  # type: ignore[arg-type]
        document["rules"][0] = {**document["rules"][0], "size_ag": 0}
        return document

    monkeypatch.setattr(source_code, "load_data", misspelt)
    source_code.rules.cache_clear()
    try:
        with pytest.raises(CatalogError, match="unknown fields size_ag"):
            source_code.rules()
    finally:
        source_code.rules.cache_clear()
