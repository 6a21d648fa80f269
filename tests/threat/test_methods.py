"""The shipped methods.yaml: complete, sourced, and validated at load."""

from __future__ import annotations

import copy
from importlib import resources

import pytest
import yaml

from pqtriage.errors import CatalogError
from pqtriage.threat.methods import load_method_data, parse_method_data

REQUIRED_IDS = {
    "1905.09749", "2505.15917", "1611.07995", "1706.06752", "2306.08585",
    # Curves after 2023: arXiv:2603.28846 (March 2026),
    # arXiv:2606.02235 (June 2026), IACR ePrint 2026/280 (EUROCRYPT 2026).
    "2603.28846", "2606.02235", "2026/280",
}


def _document() -> dict:  # type: ignore[type-arg]
    text = resources.files("pqtriage").joinpath("data", "methods.yaml").read_text(encoding="utf-8")
    return yaml.safe_load(text)  # type: ignore[no-any-return]


def test_every_construction_of_the_issue_is_a_sourced_row() -> None:
    data = load_method_data()
    assert {m.id for m in data.shor_methods} == REQUIRED_IDS
    for m in data.shor_methods:
        assert m.source and m.title and m.year >= 2017 and m.notes
        assert f"arXiv:{m.id}" in m.source or f"ePrint {m.id}" in m.source
        assert m.check in {"published-circuit", "withheld-circuit", "not-checked"} and m.check_note
    assert data.surface_code.source
    # Method-level layout values each carry a source and a flag; calibrations say so.
    layouts = [m.layout for m in data.shor_methods if m.layout is not None]
    assert layouts
    for layout in layouts:
        for parameter in layout.parameters:
            assert parameter.source and parameter.verified in {"V", "V2", "M", "A"}
        calibrated = [p for p in layout.parameters if "Calibration" in p.source]
        assert all(p.verified == "A" and "Not tuned per key size" in p.source for p in calibrated)
    assert all(f.source for f in data.grover_figures)


@pytest.mark.parametrize(
    "mutate, message",
    [
        (lambda d: d["shor_methods"][0].pop("source"), "missing 'source'"),
        (lambda d: d["shor_methods"][0].update(families=["lattice"]), "unknown family"),
        (lambda d: d["shor_methods"].append(copy.deepcopy(d["shor_methods"][0])), "duplicate"),
        (lambda d: d["shor_methods"][1].update(default_for=[]), "needs exactly one default"),
        (lambda d: d["shor_methods"][0].update(check="peer-reviewed"), "'check' must be one of"),
        (lambda d: d["shor_methods"][1]["logical_table"][0].pop("commit"), "malformed logical_table"),
        (lambda d: d["shor_methods"][1]["logical_table"].append(
            copy.deepcopy(d["shor_methods"][1]["logical_table"][0])), "repeats a size"),
        (lambda d: d["shor_methods"][0]["physical_table"]["factoring"][0].update(retry_risk=1.5),
         "out of range"),
        (lambda d: d["shor_methods"][0].pop("physical_table_source"), "needs a physical_table_source"),
        (lambda d: d["shor_methods"][6].update(physical_layout_of="1905.09749"), "names no method"),
        (
            lambda d: d["shor_methods"][0].update(toffoli_count={"per_toffoli": 1}),
            "cannot be per_toffoli",
        ),
        (lambda d: d["surface_code"].pop("factory_tiles"), "malformed"),
        (
            lambda d: d["shor_methods"][1]["physical_layout"].pop("magic_state_site_tiles"),
            "needs exactly",
        ),
        (
            lambda d: d["shor_methods"][1]["physical_layout"]["idle_storage_fraction"].pop(
                "source"
            ),
            "needs value, verified, source",
        ),
        (
            lambda d: d["shor_methods"][1]["physical_layout"]["idle_storage_fraction"].update(
                value=1.0
            ),
            "below 1",
        ),
        # A curve construction must name the factoring method its arrival is compared with.
        (lambda d: d["shor_methods"][3].pop("reference_counterpart"), "reference_counterpart"),
        (
            lambda d: d["shor_methods"][3].update(reference_counterpart="2306.08585"),
            "is not a factoring method",
        ),
    ],
)
def test_malformed_rows_raise_catalog_errors(mutate: object, message: str) -> None:
    document = _document()
    mutate(document)  # type: ignore[operator]
    with pytest.raises(CatalogError, match=message) as info:
        parse_method_data(document)
    assert "methods.yaml" in info.value.diagnostics()
