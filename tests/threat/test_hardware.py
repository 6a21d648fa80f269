"""The hardware and progress file: shipped defaults with sources, the doubling-time derivation,
user files over the defaults, and --hardware on every command that computes arrivals."""

from __future__ import annotations

import datetime as dt
import json
import math
from pathlib import Path

import pytest

from pqtriage.cli import main
from pqtriage.errors import ProfileError
from pqtriage.model.profile import decimal_year
from pqtriage.sources.hardware_file import load_hardware, parse_hardware, shipped_hardware
from pqtriage.sources.profile_file import load_profile

ROOT = Path(__file__).resolve().parents[2]
DEMO = str(ROOT / "inventories" / "demo.yaml")


def test_shipped_values_are_the_papers_hardware_with_sources() -> None:
    # "How to factor 2048 bit RSA integers in 8 hours using 20 million noisy qubits"
    # (arXiv:1905.09749, section 2) and arXiv:2505.15917 (abstract): gate error 0.1 %, cycle
    # 1 us, reaction 10 us (V).
    hardware = shipped_hardware()
    for name, value in (("physical_error_rate", 1e-3), ("cycle_us", 1.0), ("reaction_us", 10.0)):
        entry = hardware.value(name)
        assert entry.value == value and entry.flag == "V"
        assert "arXiv:1905.09749" in entry.source
    # The survey's reference task: RSA-2048 within 24 hours (Quantum Threat Timeline Report 2025).
    assert (hardware.reference_algorithm, hardware.reference_hours) == ("RSA-2048", 24.0)
    assert hardware.value("runtime_limit_hours").value == 24.0
    for entry in hardware.values:
        assert entry.source and entry.flag in {"V", "V2", "M", "A"}


def test_the_default_doubling_time_is_derived_from_the_default_profile() -> None:
    # docs/threat-model.md section 3, by hand: about 1e3 good qubits today, about 1e6 needed
    # (RSA-2048 under arXiv:2505.15917: under a million noisy qubits, V), so log2(1e6 / 1e3) =
    # 9.97 doublings by the profile's median. The 2025 survey's pessimistic end reaches 0.5
    # between 10 y (0.49) and 15 y (0.70): 10 + 5 x 0.01 / 0.21 = 10.24 years after 9 March 2026.
    doublings = math.log2(1e6 / 1e3)
    assert doublings == pytest.approx(9.966, abs=1e-3)
    median = decimal_year(dt.date(2026, 3, 9)) + 10 + 5 * 0.01 / 0.21
    assert load_profile("survey-2025-upper").quantile(0.5, decimal_year(dt.date(2026, 12, 2))) == pytest.approx(median)
    years_per_doubling = (median - decimal_year(dt.date(2026, 12, 2))) / doublings
    assert years_per_doubling == pytest.approx(0.95, abs=0.01)
    # The optimistic end: 10 + 5 x 0.22 / 0.23 = 14.78 years: 1.41 years per doubling.
    optimistic = (decimal_year(dt.date(2026, 3, 9)) + 10 + 5 * 0.22 / 0.23 - decimal_year(dt.date(2026, 12, 2))) / doublings
    assert optimistic == pytest.approx(1.41, abs=0.01)
    entry = shipped_hardware().value("qubit_doubling_years")
    assert entry.value == pytest.approx(years_per_doubling, rel=0.06)  # 1.0, "about a yearly doubling"
    assert entry.low is not None and entry.high is not None
    assert entry.low < years_per_doubling and optimistic < entry.high


def test_a_user_file_overrides_only_what_it_gives(tmp_path: Path) -> None:
    path = tmp_path / "hw.yaml"
    path.write_text("qubit_doubling_years: {value: 2.0, low: 1.5, high: 3.0, source: our view}\n"
                    "monte_carlo: {samples: 64}\n", encoding="utf-8")
    hardware = load_hardware(str(path))
    assert hardware.value("qubit_doubling_years").value == 2.0
    assert hardware.value("cycle_us").value == 1.0  # kept from the shipped file
    assert hardware.parameters().doubling_years == 2.0
    settings = hardware.band_settings()
    assert (settings.samples, settings.doubling_low, settings.doubling_high) == (64, 1.5, 3.0)
    assert str(path) in hardware.origin


@pytest.mark.parametrize("text, message", [
    ("cycle_uss: 2\n", "did you mean 'cycle_us'"),
    ("physical_error_rate: 0.02\n", "not below the surface-code threshold"),
    ("qubit_doubling_years: {value: 1, low: 2, high: 3}\n", "low <= value <= high"),
    ("monte_carlo: {samples: 100}\n", "multiple of 8"),
    ("reference_task: {algorithm: RSA-4096, within_hours: 24}\n", "must be RSA-2048"),
    ("runtime_limit_hours: fast\n", "must be a number"),
])
def test_bad_hardware_files_name_the_place(tmp_path: Path, text: str, message: str) -> None:
    with pytest.raises(ProfileError) as caught:
        parse_hardware(text.encode(), "hw.yaml", shipped_hardware())
    assert message in caught.value.diagnostics()
    assert caught.value.diagnostics().startswith("hw.yaml:")


def _run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def test_every_arrival_command_takes_hardware(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    slow = tmp_path / "slow.yaml"
    slow.write_text("qubit_doubling_years: {value: 3.0, low: 2.0, high: 4.0}\n", encoding="utf-8")
    as_of = ["--as-of", "2026-12-02"]
    code, shipped, _ = _run(capsys, "estimate", "RSA-4096", "--format", "json", *as_of)
    assert code == 0
    code, slower, _ = _run(capsys, "estimate", "RSA-4096", "--format", "json", *as_of, "--hardware", str(slow))
    assert code == 0
    # RSA-4096 needs more than RSA-2048: a slower doubling time puts it proportionally later.
    a, b = json.loads(shipped)["arrival"], json.loads(slower)["arrival"]
    assert b["shift_years"] == pytest.approx(3 * a["shift_years"])
    code, out, _ = _run(capsys, "triage", DEMO, "--format", "json", *as_of, "--hardware", str(slow))
    assert code == 0 and "usable qubits double every 3 years" in json.loads(out)["arrival_model"]
    for command in (["report", DEMO], ["plan", DEMO, "--format", "json"], ["diff", DEMO, DEMO]):
        code, _, err = _run(capsys, *command, *as_of, "--hardware", str(slow))
        assert code == 0, (command, err)
    code, _, err = _run(capsys, "triage", DEMO, *as_of, "--hardware", str(tmp_path / "missing.yaml"))
    assert code == 2 and "no such hardware file" in err
