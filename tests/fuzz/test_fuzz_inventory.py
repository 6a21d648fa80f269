"""Fuzzing the YAML inventory reader and what follows it (hypothesis, bounded time).

Only PqtriageError subclasses may escape the reader, with a one-line message;
an inventory that is read must triage and render in every format. Inputs that
ever crashed are kept in tests/fuzz/regressions/ and replayed by
test_regressions_replay. Set PQTRIAGE_FUZZ_SAVE=1 to save a new crash there, and
PQTRIAGE_FUZZ_SCALE=20 for a run twenty times longer.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import io
import os
from functools import lru_cache
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st
from rich.console import Console

from pqtriage.catalog import load_catalog
from pqtriage.errors import PqtriageError
from pqtriage.formats.cbom.triage import CbomFormat
from pqtriage.formats.csv.triage import CsvFormat
from pqtriage.formats.json.triage import JsonFormat
from pqtriage.formats.markdown.triage import render_report
from pqtriage.formats.sarif.triage import SarifFormat
from pqtriage.formats.table.triage import terminal_view
from pqtriage.model.inventory import Inventory
from pqtriage.model.triage import triage
from pqtriage.pipeline import arrival_model_for
from pqtriage.sources.loading import load_inventory
from pqtriage.sources.profile_file import load_profile
from pqtriage.sources.yaml_writer import inventory_to_yaml
from tests.fuzz.common import REGRESSIONS, fuzz
from tests.hostile.generate_corpus import VALID, injection_inventory
from tests.properties.strategies import inventories

pytestmark = pytest.mark.fuzz



SEEDS = [VALID, injection_inventory(), Path("inventories/demo.yaml").read_text(encoding="utf-8")]
"""Valid documents that the structured fuzzer corrupts."""
TOKENS = [":", ": ", "-", "- ", "[", "]", "{", "}", ",", "&a ", "*a", "!!str ", "!!int ", "!!binary ",
          "!!python/name:os.system ", "\t", "\n", "\r\n", "'", '"', "<<: ", "%YAML 1.1\n", "---\n", "...\n",
          "? ", "|\n", ">-\n", "#", "\\", "\x00", "\ufeff", "\u202e", "1e400", ".nan", "-.inf", "0x_1",
          "9" * 30, "~", "null", "yes", "2026-13-45", "\x1b[31m", "key_size", "purpose", "uses", "systems"]


@lru_cache(maxsize=1)
def _triage_setup() -> tuple:
    profile = load_profile(None)
    return load_catalog(), profile, arrival_model_for(profile)


def read(data: bytes, folder: Path) -> Inventory | None:
    """Read bytes as an inventory file: an Inventory, or None after a PqtriageError."""
    path = folder / "fuzz.yaml"
    path.write_bytes(data)
    try:
        return load_inventory(str(path))
    except PqtriageError as exc:
        assert "\n" not in exc.diagnostics()
        return None
    except Exception:
        if os.environ.get("PQTRIAGE_FUZZ_SAVE"):
            REGRESSIONS.mkdir(exist_ok=True)
            name = f"crash-{hashlib.sha256(data).hexdigest()[:16]}.yaml"
            (REGRESSIONS / name).write_bytes(data)
        raise


def render_everything(inventory: Inventory) -> None:
    """Triage and render in every format; any exception is a bug."""
    catalog, profile, arrival = _triage_setup()
    result = triage(inventory, catalog, profile, arrival, dt.date(2026, 12, 1))
    for output in (JsonFormat(), CsvFormat(), SarifFormat(), CbomFormat()):
        output.render(result)
    render_report(result)
    Console(file=io.StringIO(), width=100, no_color=True).print(terminal_view(result))


@pytest.fixture(scope="module")
def folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tmp_path_factory.mktemp("fuzz")


@fuzz(400)
@given(st.binary(max_size=2000))
def test_arbitrary_bytes(folder: Path, data: bytes) -> None:
    read(data, folder)


@st.composite
def near_valid(draw: st.DrawFn) -> bytes:
    """A valid document with a few cuts, insertions and replacements."""
    text = draw(st.sampled_from(SEEDS))
    for _ in range(draw(st.integers(1, 6))):
        position = draw(st.integers(0, len(text)))
        action = draw(st.sampled_from(["insert", "delete", "replace-line", "duplicate-line"]))
        if action == "insert":
            text = text[:position] + draw(st.sampled_from(TOKENS) | st.text(max_size=8)) + text[position:]
        elif action == "delete":
            text = text[:position] + text[position + draw(st.integers(1, 40)):]
        else:
            lines = text.split("\n")
            index = min(position * len(lines) // (len(text) + 1), len(lines) - 1)
            if action == "replace-line":
                indent = lines[index][: len(lines[index]) - len(lines[index].lstrip())]
                lines[index] = indent + draw(st.sampled_from(TOKENS)) + draw(st.text(max_size=12))
            else:
                lines.insert(index, lines[index])
            text = "\n".join(lines)
    return text.encode("utf-8", "surrogatepass")


@fuzz(400)
@given(near_valid())
def test_near_valid_documents(folder: Path, data: bytes) -> None:
    inventory = read(data, folder)
    if inventory is not None:
        render_everything(inventory)


@fuzz(80)
@given(inventories(max_systems=5))
def test_generated_inventories_triage_and_render(folder: Path, inventory: Inventory) -> None:
    again = read(inventory_to_yaml(inventory).encode("utf-8"), folder)
    assert again is not None
    render_everything(again)


def _regression_files() -> list[Path]:
    return sorted(p for p in REGRESSIONS.glob("*") if p.is_file() and p.name != "README.md")


@pytest.mark.parametrize("path", _regression_files(), ids=lambda p: p.name)
def test_regressions_replay(folder: Path, path: Path) -> None:
    inventory = read(path.read_bytes(), folder)
    if inventory is not None:
        render_everything(inventory)


def test_regression_folder_is_not_empty() -> None:
    assert _regression_files(), "keep at least the seed regression cases"
