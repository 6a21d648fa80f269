"""The fields official guidance asks for: read, validated, written back, in the JSON Schema.

Sources of the field definitions: FIPS PUB 199 (2004), section 3 (impact levels low, moderate,
high); OMB M-19-03 (2018) (high-value assets); ISO 3166-1 alpha-2 (country codes); NIST CMVP
validation certificates are numbered (common practice, no source); FIPS 140 editions and levels
as CycloneDX 1.6 (ECMA-424) spells them in algorithmProperties.certificationLevel.
"""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest
import yaml

from pqtriage.errors import InventoryError
from pqtriage.model.inventory import HostingModel, Impact, KeyStorage
from pqtriage.sources.loading import load_inventory
from pqtriage.sources.schema import FIPS_140_LEVELS, json_schema
from pqtriage.sources.yaml_writer import inventory_to_yaml
from tests.sources.guidance_example import GUIDANCE_INVENTORY


def _load(tmp_path: Path, text: str) -> object:
    path = tmp_path / "inv.yaml"
    path.write_text(text, encoding="utf-8")
    return load_inventory(str(path))


def _lines(tmp_path: Path, text: str) -> list[str]:
    path = tmp_path / "inv.yaml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(InventoryError) as caught:
        load_inventory(str(path))
    return [line.replace(str(path), "inv.yaml") for line in caught.value.diagnostic_lines()]


def test_every_guidance_field_is_read(tmp_path: Path) -> None:
    inventory = _load(tmp_path, GUIDANCE_INVENTORY)
    assert inventory.frameworks == ("us-federal", "cnsa-2.0")
    fare, depot = inventory.systems
    assert fare.id == "010" and fare.version == "2.10"  # text as typed, not YAML 1.1's 8 and 2.1
    assert (fare.business_unit, fare.tags, fare.impact, fare.high_value_asset) == (
        "Revenue", ("pci", "public-facing"), Impact.HIGH, True)
    assert (fare.data_classification.label, fare.data_classification.rank) == ("Restricted", 4)
    assert (fare.hosting.model, fare.hosting.provider, fare.hosting.country) == (HostingModel.CLOUD, "Nimbus Cloud", "DE")
    assert (fare.vendor, fare.product, fare.crypto_library, fare.crypto_module) == (
        "Tollgate Systems", "FareGate", "OpenSSL 3.0.13", "FareGate HSM module")
    assert (fare.fips_140_certificate, fare.fips_140_level, fare.key_storage) == ("4282", "fips140-3-l3", KeyStorage.HSM)
    assert (fare.protocol, fare.protocol_version) == ("TLS", "1.3")
    assert fare.extra == (("cost_centre", "CC-104"), ("rack_units", 2), ("pen_tested", True))
    assert inventory.frameworks_of(fare) == ("eu",) and inventory.frameworks_of(depot) == ("us-federal", "cnsa-2.0")
    kex, sig = fare.uses
    assert (kex.protocol, kex.protocol_version) == ("TLS", "1.3")
    assert (sig.key_storage, sig.fips_140_level, sig.fips_140_certificate) == (KeyStorage.HSM, "fips140-3-l3", "#4282")
    # Defaults fill what a system leaves out.
    assert (depot.business_unit, depot.impact, depot.key_storage) == ("Operations", Impact.MODERATE, KeyStorage.TPM)
    assert depot.hosting.model is HostingModel.ON_PREMISES and depot.hosting.provider is None
    assert depot.uses[0].key_storage is KeyStorage.SOFTWARE and depot.uses[0].crypto_library == "mbed TLS 2.28"


def test_written_back_and_read_again_unchanged(tmp_path: Path) -> None:
    inventory = _load(tmp_path, GUIDANCE_INVENTORY)
    text = inventory_to_yaml(inventory)
    assert "id: '010'" in text and "version: '2.10'" in text  # quoted so no reader coerces them
    again = _load(tmp_path, text)
    strip = lambda inv: [(s.id, s.version, s.extra, s.hosting, s.data_classification, s.frameworks,  # noqa: E731
                          s.key_storage, tuple((u.key_storage, u.fips_140_level) for u in s.uses)) for s in inv.systems]
    assert strip(again) == strip(inventory)


@pytest.mark.parametrize("line, expected", [
    ("impact: severe", "'impact' in system '010' is 'severe', not a known value; use one of: low, moderate, high"),
    ("high_value_asset: maybe", "'high_value_asset' in system '010' must be true or false, got 'maybe'"),
    ("hosting: {model: cloud, country: Germany}", "'country' in 'hosting' in system '010' is 'Germany', not a two-letter ISO 3166-1 code"),
    ("hosting: {provider: Nimbus}", "'hosting' in system '010' has no 'model'"),
    ("data_classification: {label: Secret, rank: 11}", "'rank' in 'data_classification' in system '010' is 11, above the maximum 10"),
    ("fips_140_certificate: FIPS-4282", "'fips_140_certificate' in system '010' is 'FIPS-4282', not a CMVP certificate number"),
    ("fips_140_level: fips140-3-l5", "'fips_140_level' in system '010' is 'fips140-3-l5', not a known value"),
    ("key_storage: vault", "'key_storage' in system '010' is 'vault', not a known value"),
    ("frameworks: [EU Roadmap]", "an entry of 'frameworks' in system '010' is 'EU Roadmap', not lower-case letters"),
    ("extra: {2fa: yes}", "'extra' in system '010' has the key '2fa', not a letter, then letters"),
    ("extra: {owners: [a, b]}", "'owners' in 'extra' in system '010' must be text, a number or true/false, got a list"),
    ("tags: pci", "'tags' in system '010' must be a list, got text"),
])
def test_each_field_is_validated(tmp_path: Path, line: str, expected: str) -> None:
    key = line.split(":")[0]
    lines = [kept for kept in GUIDANCE_INVENTORY.splitlines() if not kept.startswith(f"    {key}:")]
    at = lines.index("    name: Fare payment gateway")
    lines.insert(at + 1, "    " + line)
    found = _lines(tmp_path, "\n".join(lines) + "\n")
    assert any(expected in message for message in found), found


def test_the_json_schema_has_the_fields_and_accepts_the_example() -> None:
    schema = json_schema()
    system = schema["$defs"]["system"]["properties"]
    for name in ("business_unit", "tags", "impact", "high_value_asset", "data_classification", "hosting", "vendor",
                 "product", "version", "crypto_library", "crypto_module", "fips_140_certificate", "fips_140_level",
                 "key_storage", "protocol", "protocol_version", "extra", "frameworks"):
        assert name in system, name
    assert system["impact"]["enum"] == ["low", "moderate", "high"]  # FIPS 199 section 3
    assert system["fips_140_level"]["enum"] == list(FIPS_140_LEVELS)
    assert "frameworks" in schema["properties"]
    # A JSON Schema validator (jsonschema, draft 2020-12) accepts the example once YAML has read
    # it (the schema describes the data: ids typed as text are strings there).
    data = yaml.safe_load(GUIDANCE_INVENTORY.replace("id: 010 ", "id: '010' ").replace("version: 2.10 ", "version: '2.10' "))
    jsonschema.validate(data, schema)
    data["systems"][0]["impact"] = "severe"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(data, schema)


def test_the_template_shows_the_fields_and_is_valid(tmp_path: Path) -> None:
    from importlib import resources

    template = (resources.files("pqtriage") / "data" / "inventory-template.yaml").read_text("utf-8")
    for name in ("business_unit", "impact", "high_value_asset", "data_classification", "hosting", "key_storage",
                 "fips_140_certificate", "frameworks", "extra"):
        assert f"{name}:" in template, name
    inventory = _load(tmp_path, template)
    assert inventory.systems and json.dumps(json_schema())


def test_the_format_document_names_every_field() -> None:
    from pqtriage.sources.schema import SYSTEM_FIELDS, TOP_FIELDS, USE_FIELDS

    doc = (Path(__file__).resolve().parents[2] / "docs" / "inventory-format.md").read_text(encoding="utf-8")
    for spec in (*TOP_FIELDS, *SYSTEM_FIELDS, *USE_FIELDS):
        assert f"| `{spec.name}` |" in doc, spec.name


def test_init_writes_the_template_as_a_workbook_too(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    from pqtriage.cli import main

    book = tmp_path / "inventory.xlsx"
    assert main(["init", str(book), "--format", "xlsx"]) == 0
    from_book = load_inventory(str(book))
    from_yaml = _load(tmp_path, (Path(__file__).resolve().parents[2] / "pqtriage" / "data" /
                                 "inventory-template.yaml").read_text(encoding="utf-8"))
    assert [(s.id, s.hosting, s.fips_140_level, len(s.uses)) for s in from_book.systems] == [
        (s.id, s.hosting, s.fips_140_level, len(s.uses)) for s in from_yaml.systems]
    header = next(openpyxl_rows(book))
    for column in ("id", "business_unit", "impact", "hosting.model", "system.key_storage", "purpose", "algorithm"):
        assert column in header, column


def openpyxl_rows(path: Path) -> object:
    import openpyxl

    return openpyxl.load_workbook(path)["Uses"].iter_rows(values_only=True)
