"""The shipped catalog validates; malformed files raise CatalogError naming the row."""

from __future__ import annotations

from pathlib import Path

import pytest
import yaml

from pqtriage.catalog import load_catalog, shipped_path
from pqtriage.catalog.loader import read_catalog
from pqtriage.errors import EXIT_INTERNAL, CatalogError


def _shipped_data() -> dict:
    return yaml.safe_load(shipped_path().read_text(encoding="utf-8"))


def _write(tmp_path: Path, data: dict) -> Path:
    path = tmp_path / "catalog.yaml"
    path.write_text(yaml.safe_dump(data, sort_keys=False), encoding="utf-8")
    return path


def test_shipped_catalog_validates_and_is_cached() -> None:
    assert load_catalog() is load_catalog()
    raw = read_catalog(shipped_path())
    assert len(raw.strength_table) == 5
    for row in (*raw.entries, *raw.curves, *raw.groups, *raw.families, *raw.names):
        assert row["source"].strip()


def test_a_copy_of_the_shipped_file_loads_from_a_path(tmp_path: Path) -> None:
    catalog = load_catalog(_write(tmp_path, _shipped_data()))
    assert catalog.resolve("RSA-2048").spec.classical_bits == 112


def test_missing_source_names_the_row(tmp_path: Path) -> None:
    data = _shipped_data()
    del data["entries"][1]["rows"][0]["source"]
    with pytest.raises(CatalogError) as error:
        load_catalog(_write(tmp_path, data))
    text = error.value.diagnostics()
    assert "AES-128" in text and "missing 'source'" in text and "catalog.yaml" in text
    assert error.value.exit_code == EXIT_INTERNAL


@pytest.mark.parametrize(
    ("change", "message"),
    [
        (lambda d: d["entries"][1]["rows"][0].update(colour="blue"), "unknown key 'colour'"),
        (lambda d: d["entries"][1]["rows"][0].update(status="fine"), "'status' is 'fine'"),
        (lambda d: d["entries"][1]["rows"][0].update(quantum="magic"), "'quantum' is 'magic'"),
        (lambda d: d["entries"][1]["rows"][0].update(bits="many"), "'bits' has the wrong type"),
        (
            lambda d: d["entries"][1]["rows"][0].update(replacements="nothing"),
            "unknown replacement set",
        ),
        (lambda d: d["curves"][0].pop("order_bits"), "missing 'order_bits'"),
        (lambda d: d["names"][0].update(source=" "), "empty 'source'"),
        (lambda d: d.update(extra={}), "unknown key 'extra'"),
        (
            lambda d: d["entries"][-1]["rows"][0]["components"][0].update(ref="Nope"),
            "component 'Nope'",
        ),
        (lambda d: d["names"][0].update(name="RSA"), "spelling 'RSA' names both"),
    ],
)
def test_malformed_rows(tmp_path: Path, change, message: str) -> None:
    data = _shipped_data()
    change(data)
    with pytest.raises(CatalogError) as error:
        load_catalog(_write(tmp_path, data))
    assert message in error.value.diagnostics()


def test_not_yaml_and_missing_file(tmp_path: Path) -> None:
    bad = tmp_path / "bad.yaml"
    bad.write_text("entries: [\n", encoding="utf-8")
    with pytest.raises(CatalogError, match="not valid YAML"):
        load_catalog(bad)
    with pytest.raises(CatalogError, match="cannot read"):
        load_catalog(tmp_path / "absent.yaml")


def test_loader_refuses_python_tags(tmp_path: Path) -> None:
    evil = tmp_path / "evil.yaml"
    evil.write_text("version: !!python/object/apply:os.system ['true']\n", encoding="utf-8")
    with pytest.raises(CatalogError, match="not valid YAML"):
        load_catalog(evil)
