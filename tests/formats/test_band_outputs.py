"""Every medium shows the central value with its 10-90 % band (table, Markdown, JSON, CSV,
SARIF), says the ranking uses the central value, and the report lists band flips."""

from __future__ import annotations

import csv
import io
import json

from pqtriage.formats.csv.triage import CsvFormat
from pqtriage.formats.json.triage import JsonFormat
from pqtriage.formats.markdown.triage import render_report
from pqtriage.formats.sarif.triage import SarifFormat
from pqtriage.model.sensitivity import band_flips
from tests.formats.test_table import banded_result

# crew-archive (RSA-3072, x + y = 14): central P 0.589, band 0.469-0.652 (expected_table_band.txt).


def test_markdown_shows_the_band_and_the_ranking_rule() -> None:
    text = render_report(banded_result())
    # P with its band, then the priority points (59 + 9 years overdue + medium 10 + internal 5), then the verdict.
    assert "| 59% (47-65%) | 83 | exposed |" in text
    assert "Verdicts and the ranking use the central values" in text
    assert "Uncertainty: 10-90 % band from 256 seeded samples" in text


def test_json_csv_and_sarif_carry_the_band() -> None:
    result = banded_result()
    doc = json.loads(JsonFormat().render(result))
    crew = next(i for i in doc["items"] if i["id"] == "crew-archive")
    assert crew["band"]["exposure_probability"] == {"low": 0.4694, "high": 0.6523}
    assert crew["band"]["exposure_probability"]["low"] <= crew["exposure_probability"] <= crew["band"]["exposure_probability"]["high"]
    assert doc["uncertainty"]["ranking_uses"] == "central value"
    rows = list(csv.DictReader(io.StringIO(CsvFormat().render(result))))
    row = next(r for r in rows if r["system_id"] == "crew-archive")
    assert (row["exposure_probability_low"], row["exposure_probability_high"]) == ("0.4694", "0.6523")
    assert row["start_by_earliest"] <= row["start_by"] <= row["start_by_latest"]
    sarif = json.loads(SarifFormat().render(result))
    found = next(r for r in sarif["runs"][0]["results"] if r["properties"]["system"] == "crew-archive")
    props = found["properties"]
    assert props["exposureProbabilityLow"] <= props["exposureProbability"] <= props["exposureProbabilityHigh"]
    assert props["crqcYearLow"] <= props["crqcYear"] <= props["crqcYearHigh"]


def test_band_flips_are_computed_from_the_band_ends() -> None:
    # ticket-web (X25519, x + y = 5): central P 34 % > 10 % tolerance, exposed; its band starts at
    # 15 %, still above 10 %: no flip. crew-archive likewise. So no system flips here.
    result = banded_result()
    assert band_flips(result) == ()
