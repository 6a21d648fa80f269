"""CBOM import: a hand-written CycloneDX 1.6 CBOM becomes the systems and uses its graph describes."""

from __future__ import annotations

import copy
import datetime as dt
import json
from pathlib import Path

import pytest

from pqtriage.errors import InventoryError, UsageError
from pqtriage.model.inventory import Exposure, Purpose
from pqtriage.sources.cbom import CycloneDxSource
from pqtriage.sources.loading import load_inventory, load_inventory_with_side_file
from tests.sources.cbom_example import CBOM, cbom_text, line_of_bom_ref


def _write(tmp_path: Path, text: str, name: str = "scan.cdx.json") -> str:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return str(path)


def _uses(inventory: object, system_id: str) -> list[tuple[str, str, int | None, str | None, str | None]]:
    system = inventory.system(system_id)  # type: ignore[attr-defined]
    return [(u.purpose.value, u.algorithm, u.key_size, u.curve, u.protocol) for u in system.uses]


def test_the_example_is_a_valid_cyclonedx_16_bom() -> None:
    # Checked against the official CycloneDX 1.6 JSON Schema (strict), shipped by cyclonedx-python-lib.
    validation = pytest.importorskip("cyclonedx.validation.json")
    schema = pytest.importorskip("cyclonedx.schema")
    validator = validation.JsonStrictValidator(schema.SchemaVersion.V1_6)
    assert validator.validate_str(cbom_text()) is None


def test_recognised_by_content_not_by_name(tmp_path: Path) -> None:
    inventory = load_inventory(_write(tmp_path, cbom_text(), name="inventory.yaml"))
    assert inventory.extra["format"] == "CycloneDX"
    assert inventory.organization == "Larkspur Tide Ferries"  # metadata.supplier.name
    assert CycloneDxSource().accepts(cbom_text())
    assert not CycloneDxSource().accepts("version: 1\norganization: x\nsystems: []\n")
    assert not CycloneDxSource().accepts('{"bomFormat": "SPDX"}')


def test_systems_are_the_components_that_depend_on_crypto_assets(tmp_path: Path) -> None:
    inventory = load_inventory(_write(tmp_path, cbom_text()))
    # metadata.component first, then components in document order; the library gets the
    # algorithm it provides (no component depends on it).
    assert [s.id for s in inventory.systems] == ["app-booking", "app-ticket-api", "lib-cryptokit"]
    assert inventory.system("app-booking").name == "ferry-booking 2.0.1"
    # dependsOn between two systems becomes depends_on
    assert inventory.system("app-booking").depends_on == ("app-ticket-api",)
    assert inventory.system("app-ticket-api").depends_on == ("lib-cryptokit",)


def test_every_asset_type_becomes_uses(tmp_path: Path) -> None:
    inventory = load_inventory(_write(tmp_path, cbom_text()))
    assert _uses(inventory, "app-booking") == [
        # protocol: the named cipher suite, curve and RSA size taken from its algorithms
        ("key-establishment", "TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256", 2048, "secp256r1", "TLS 1.2"),
        # certificate: the issuer's signature on it (the issuing CA is not in the BOM, so the
        # signing key's size is unknown) and its subject key (related material, size 3072)
        ("signature", "sha256WithRSAEncryption", None, None, None),
        ("authentication", "RSA", 3072, None, None),
    ]
    assert _uses(inventory, "app-ticket-api") == [
        # protocol with IKEv2 transform types: ke -> key establishment, encr -> encryption
        ("key-establishment", "ML-KEM", 768, None, "IKE 2"),
        ("encryption", "AES-128-GCM", 128, None, "IKE 2"),
        # algorithm the catalog does not know: kept, purpose from its primitive
        ("encryption", "Kuznyechik", None, None, None),
        # related-crypto-material secret key: its algorithm (AES, mode cbc) with the material's size
        ("encryption", "AES-CBC", 256, None, None),
    ]
    assert _uses(inventory, "lib-cryptokit") == [("encryption", "ChaCha20-Poly1305", None, None, None)]
    # Certificate validity 2026-01-01 to 2028-01-01: kept as dates; the signature's trust period is
    # what remains of it at the triage date.
    signature, key = inventory.system("app-booking").uses[1:3]
    assert (signature.not_before, signature.not_after) == (dt.date(2026, 1, 1), dt.date(2028, 1, 1))
    assert signature.trust_years is None and key.not_after == dt.date(2028, 1, 1)
    assert "whose certificate is not in the BOM" in (signature.notes or "")


def test_each_use_keeps_its_bom_ref_and_line(tmp_path: Path) -> None:
    text = cbom_text()
    inventory = load_inventory(_write(tmp_path, text))
    details = [u.source.detail for s in inventory.systems for u in s.uses]  # type: ignore[union-attr]
    assert details == [
        "bom-ref proto-tls12",
        "bom-ref cert-booking > alg-sha256-rsa",
        "bom-ref cert-booking > key-booking > alg-rsa",
        "bom-ref proto-ike > alg-mlkem768",
        "bom-ref proto-ike > alg-aes-128-gcm",
        "bom-ref alg-kuznyechik",
        "bom-ref key-session > alg-aes",
        "bom-ref alg-chacha",
    ]
    for system in inventory.systems:
        assert system.source is not None and system.source.line == line_of_bom_ref(text, system.id)
        for use in system.uses:
            assert use.source is not None
            carrier = use.source.detail.split()[1]  # type: ignore[union-attr]
            assert use.source.line == line_of_bom_ref(text, carrier)


def test_unknown_algorithms_are_unassessed_uses(tmp_path: Path) -> None:
    import datetime as dt

    from pqtriage.catalog import load_catalog
    from pqtriage.model.arrival_model import SharedArrival
    from pqtriage.model.triage import triage
    from pqtriage.model.verdict import Verdict
    from pqtriage.sources.profile_file import load_profile

    inventory = load_inventory(_write(tmp_path, cbom_text()))
    result = triage(inventory, load_catalog(), load_profile(None), SharedArrival(), dt.date(2026, 12, 1))
    by_algorithm = {u.use.algorithm: u for i in result.items for u in i.uses}
    assert by_algorithm["Kuznyechik"].verdict is Verdict.UNASSESSED
    # RSA signature without the signing key's size cannot be assessed either (NIST SP 800-57 Part 1
    # Rev. 5 Table 2 gives RSA strength by modulus size).
    assert by_algorithm["sha256WithRSAEncryption"].verdict is Verdict.UNASSESSED
    assert by_algorithm["RSA"].spec is not None and by_algorithm["RSA"].spec.name == "RSA-3072"
    assert by_algorithm["ML-KEM"].verdict is Verdict.QUANTUM_RESISTANT  # FIPS 203


def test_values_a_cbom_cannot_carry_are_flagged_defaults(tmp_path: Path) -> None:
    inventory = load_inventory(_write(tmp_path, cbom_text()))
    for system in inventory.systems:
        assert (system.shelf_life_years, system.migration_years) == (10.0, 3.0)
        assert set(system.assumed) == {"shelf_life_years", "migration_years"}
    assert any("assumed shelf-life" in w for w in inventory.warnings)


def test_side_file_supplies_them(tmp_path: Path) -> None:
    bom = _write(tmp_path, cbom_text())
    side = _write(tmp_path, (
        "organization: Larkspur Tide Ferries (booking unit)\n"
        "policies: [nist-ir-8547]\n"
        "defaults:\n  shelf_life_years: 4\n  migration_years: 1.5\n"
        "systems:\n"
        "  app-booking:\n    shelf_life_years: 12\n    migration_years: 2\n    exposure: internet\n"
        "    owner: Booking team\n"
        "  cryptokit:\n    migration_years: 0.5\n"
    ), name="side.yaml")
    inventory = load_inventory_with_side_file(bom, side)
    assert inventory.organization == "Larkspur Tide Ferries (booking unit)"
    assert inventory.policies == ("nist-ir-8547",)
    booking = inventory.system("app-booking")
    assert (booking.shelf_life_years, booking.migration_years, booking.exposure, booking.owner) == (
        12, 2, Exposure.INTERNET, "Booking team")
    assert booking.assumed == ()
    ticket = inventory.system("app-ticket-api")  # side-file defaults: still assumed
    assert (ticket.shelf_life_years, ticket.migration_years) == (4, 1.5)
    assert set(ticket.assumed) == {"shelf_life_years", "migration_years"}
    library = inventory.system("lib-cryptokit")  # matched by component name
    assert (library.shelf_life_years, library.migration_years) == (4, 0.5)
    assert library.assumed == ("shelf_life_years",)


def test_side_file_errors_name_the_place(tmp_path: Path) -> None:
    bom = _write(tmp_path, cbom_text())
    side = _write(tmp_path, "systems:\n  app-booking:\n    shelf_life_years: -3\n", name="side.yaml")
    with pytest.raises(InventoryError) as caught:
        load_inventory_with_side_file(bom, side)
    assert "side.yaml:3:23" in caught.value.diagnostics() and "below the minimum" in caught.value.diagnostics()
    yaml_inventory = _write(tmp_path, "version: 1\norganization: x\nsystems: []\n", name="inv.yaml")
    good_side = _write(tmp_path, "defaults:\n  migration_years: 2\n", name="good.yaml")
    with pytest.raises(UsageError):
        load_inventory_with_side_file(yaml_inventory, good_side)


def test_orphan_assets_without_a_subject_become_systems_of_their_own(tmp_path: Path) -> None:
    bom = {
        "bomFormat": "CycloneDX", "specVersion": "1.6", "version": 1,
        "components": [
            {"type": "cryptographic-asset", "bom-ref": "tls13", "name": "TLS",
             "cryptoProperties": {"assetType": "protocol", "protocolProperties": {
                 "type": "tls", "version": "1.3",
                 "cipherSuites": [{"name": "TLS_AES_256_GCM_SHA384", "algorithms": ["aes256"]}]}}},
            {"type": "cryptographic-asset", "bom-ref": "aes256", "name": "AES-256-GCM",
             "cryptoProperties": {"assetType": "algorithm", "algorithmProperties": {"primitive": "ae"}}},
            {"type": "cryptographic-asset", "bom-ref": "ed25519", "name": "Ed25519",
             "cryptoProperties": {"assetType": "algorithm", "algorithmProperties": {
                 "primitive": "signature"}}},
            {"type": "cryptographic-asset", "bom-ref": "mystery", "name": "Mystery",
             "cryptoProperties": {"assetType": "algorithm"}},
        ],
    }
    inventory = load_inventory(_write(tmp_path, json.dumps(bom)))
    # The algorithm the protocol refers to is part of the protocol's system, not a system itself.
    assert [s.id for s in inventory.systems] == ["tls13", "ed25519", "mystery"]
    assert _uses(inventory, "tls13") == [("key-establishment", "TLS_AES_256_GCM_SHA384", None, None, "TLS 1.3")]
    (mystery,) = inventory.system("mystery").uses
    assert mystery.purpose is Purpose.KEY_ESTABLISHMENT and mystery.assumed == ("purpose",)
    assert inventory.organization == "(organisation not named in the BOM)"


def test_cyclonedx_17_additions_are_read(tmp_path: Path) -> None:
    bom = {
        "bomFormat": "CycloneDX", "specVersion": "1.7", "version": 1,
        "metadata": {"component": {"type": "application", "bom-ref": "gw", "name": "gateway"}},
        "components": [
            {"type": "cryptographic-asset", "bom-ref": "tls", "name": "TLS",
             "cryptoProperties": {"assetType": "protocol", "protocolProperties": {
                 "type": "tls", "version": "1.3", "tlsGroups": ["X25519MLKEM768"],
                 "tlsSignatureSchemes": ["ecdsa_secp256r1_sha256"]}}},
        ],
    }
    inventory = load_inventory(_write(tmp_path, json.dumps(bom)))
    assert _uses(inventory, "gw") == [
        ("key-establishment", "X25519MLKEM768", None, None, "TLS 1.3"),
        ("authentication", "ecdsa_secp256r1_sha256", None, None, "TLS 1.3"),
    ]
    expected = (f"{tmp_path / 'scan.cdx.json'}: 1 of 1 systems use assumed shelf-life or migration time"
                " (the BOM cannot carry them); give real values in a CBOM side file")
    assert inventory.warnings == (expected,)


def test_dangling_reference_is_an_unassessed_use_and_a_warning(tmp_path: Path) -> None:
    bom = copy.deepcopy(CBOM)
    bom["components"][12]["cryptoProperties"]["certificateProperties"]["signatureAlgorithmRef"] = "gone"
    inventory = load_inventory(_write(tmp_path, cbom_text(bom)))
    algorithms = [u.algorithm for u in inventory.system("app-booking").uses]
    assert "gone" in algorithms
    assert any("'gone', which is not in the BOM" in w for w in inventory.warnings)


def test_dependency_cycle_between_systems_is_broken_with_a_warning(tmp_path: Path) -> None:
    bom = copy.deepcopy(CBOM)
    bom["dependencies"].append({"ref": "lib-cryptokit", "dependsOn": ["app-booking"]})
    inventory = load_inventory(_write(tmp_path, cbom_text(bom)))
    # app-booking -> app-ticket-api -> lib-cryptokit -> app-booking: the edge that closes it goes.
    assert [s.depends_on for s in inventory.systems] == [("app-ticket-api",), ("lib-cryptokit",), ()]
    (warning,) = [w for w in inventory.warnings if "dependency cycle" in w]
    assert warning.endswith("app-booking -> app-ticket-api -> lib-cryptokit -> app-booking;"
                            " dropped 'lib-cryptokit' depends on 'app-booking'")


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ('{"bomFormat": "CycloneDX", "specVersion": "1.6",\n  "components": [}', "scan.cdx.json:2:18: invalid JSON"),
        ('{"bomFormat": "CycloneDX", "specVersion": "1.5", "components": []}', "CycloneDX 1.5 cannot describe"),
        ('{"bomFormat": "CycloneDX", "specVersion": "1.6", "components": []}', "lists no cryptographic assets"),
        ('{"bomFormat": "CycloneDX", "specVersion": "1.6", "components": {}}', "components: must be a list"),
        ('{"bomFormat": "CycloneDX", "bomFormat": "CycloneDX"}', "duplicate key 'bomFormat'"),
        ('{"bomFormat": "CycloneDX", "specVersion": "1.6", "version": NaN}', "NaN is not a JSON number"),
        ('{"bomFormat": "CycloneDX", "x": ' + "[" * 100_000 + "]" * 100_000 + "}", "nested too deeply"),
    ],
    ids=["syntax", "old-version", "no-crypto", "wrong-type", "duplicate-key", "nan", "deep"],
)
def test_bad_json_is_a_one_line_error_with_the_place(tmp_path: Path, text: str, expected: str) -> None:
    path = _write(tmp_path, text)
    with pytest.raises(InventoryError) as caught:
        load_inventory(path)
    message = caught.value.diagnostics().replace(str(tmp_path) + "/", "")
    assert "\n" not in message
    assert expected in message


def test_duplicate_bom_ref_is_refused_at_its_line(tmp_path: Path) -> None:
    bom = copy.deepcopy(CBOM)
    bom["components"][3]["bom-ref"] = "alg-rsa"
    text = cbom_text(bom)
    with pytest.raises(InventoryError) as caught:
        load_inventory(_write(tmp_path, text))
    first = line_of_bom_ref(text, "alg-rsa")
    assert f"duplicate bom-ref 'alg-rsa' (first at line {first})" in caught.value.diagnostics()
    # Reported at the second one: the bom-ref of components[3]: the place of the error.
    second = next(n for n, line in enumerate(text.splitlines(), 1) if n > first and '"bom-ref": "alg-rsa"' in line)
    assert f"scan.cdx.json:{second}:" in caught.value.diagnostics()


def test_non_ascii_digits_in_a_size_are_not_read_as_numbers() -> None:
    """str.isdigit() is true for superscripts such as '¹', which int() refuses: a size written
    that way stays text (the use is unassessed), never a crash. Found by the CBOM round-trip
    property test (tests/formats/test_cbom_roundtrip.py)."""
    bom = {
        "bomFormat": "CycloneDX", "specVersion": "1.6", "version": 1,
        "metadata": {"component": {"type": "application", "bom-ref": "app", "name": "app"}},
        "components": [{
            "type": "cryptographic-asset", "bom-ref": "k", "name": "RSA",
            "cryptoProperties": {"assetType": "algorithm",
                                 "algorithmProperties": {"parameterSetIdentifier": "\u00b9"}},
        }],
        "dependencies": [{"ref": "app", "dependsOn": ["k"]}],
    }
    inventory = CycloneDxSource().parse(json.dumps(bom), "bom.json")
    uses = [u for s in inventory.systems for u in s.uses]
    assert [u.key_size for u in uses] == [None]
