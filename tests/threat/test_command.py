"""The estimate command function with a fake catalog lookup."""

from __future__ import annotations

import json

import pytest

from pqtriage.catalog.spec import Resolution
from pqtriage.cli.estimate import estimate_command
from pqtriage.errors import EXIT_OK, UsageError
from tests.threat.helpers import cipher, curve, rsa
from tests.threat.test_view import render

SPECS = [rsa(2048), rsa(3072, 128), curve("ECDSA P-256", 256), cipher(128)]
BY_NAME = {s.name: s for s in SPECS}


def resolve(name: str) -> Resolution:
    spec = BY_NAME.get(name)
    if spec is None:
        return Resolution(None, "unknown algorithm", ("RSA-2048",))
    return Resolution(spec)


def run(
    algorithm: str | None, all_: bool = False, method: str | None = None, fmt: str = "text"
) -> object:
    out, code = estimate_command(
        algorithm, all_, method, 1e-3, 1.0, 10.0, 64, fmt, resolve=resolve, specs=SPECS
    )
    assert code == EXIT_OK
    return out


def test_json_for_one_algorithm_states_the_method() -> None:
    doc = json.loads(str(run("RSA-2048", method="1905.09749", fmt="json")))
    assert doc["method"] == "1905.09749" and doc["method_is_default"] is False
    assert doc["arrival"]["shift_years"] == pytest.approx(0.0)
    default = json.loads(str(run("RSA-2048", fmt="json")))
    assert default["method"] == "2505.15917" and default["method_is_default"] is True


def test_working_view_mentions_the_default_and_sources() -> None:
    text = render(run("RSA-2048"))  # type: ignore[arg-type]
    assert "2505.15917 (default)" in text
    # The default's own layout: yoked storage and cultivation sites, not 72-tile factories.
    assert "arXiv:1905.09749" in text and "arXiv:2312.04522" in text
    assert "arXiv:2409.17595" in text and "arXiv:1812.01238" not in text
    # 1905.09749 on its own layer: the paper's table (commit 4ce507c), not the model's factories.
    table = render(run("RSA-2048", method="1905.09749"))  # type: ignore[arg-type]
    assert "factoring table of arXiv:1905.09749 (4ce507c, V)" in table
    assert "arXiv:2312.04522" not in table and "published circuit" in table


def test_all_lists_every_attackable_algorithm_once() -> None:
    doc = json.loads(str(run(None, all_=True, method="1905.09749", fmt="json")))
    assert sorted(d["algorithm"] for d in doc) == sorted(BY_NAME)
    # A factoring method does not apply to curves: they keep their default.
    methods = {d["algorithm"]: d["method"] for d in doc}
    assert methods["ECDSA P-256"] == "2606.02235" and methods["RSA-2048"] == "1905.09749"


def test_options_reach_the_physical_layer() -> None:
    base = json.loads(str(run("RSA-2048", fmt="json")))
    out, _ = estimate_command(
        "RSA-2048", False, None, 1e-4, 1.0, 10.0, 64, "json", resolve=resolve, specs=SPECS
    )
    better = json.loads(str(out))
    assert better["code_distance"] < base["code_distance"]


def test_unknown_algorithm_method_and_format_are_usage_errors() -> None:
    with pytest.raises(UsageError, match="did you mean RSA-2048"):
        run("RSA-2049")
    with pytest.raises(UsageError, match="not a known construction"):
        run("RSA-2048", method="0000.00000")
    with pytest.raises(UsageError, match="does not cover"):
        run("ECDSA P-256", method="1905.09749")
    with pytest.raises(UsageError, match="--format"):
        run("RSA-2048", fmt="xml")
    with pytest.raises(UsageError, match="--all"):
        run(None)


def test_cli_as_of_gives_years_and_refuses_a_bad_date(capsys: pytest.CaptureFixture[str]) -> None:
    from pqtriage.cli import main

    code = main(["estimate", "RSA-2048", "--format", "json", "--as-of", "2026-03-01"])
    doc = json.loads(capsys.readouterr().out)
    assert code == 0
    # Quantum Threat Timeline Report 2025 (upper end, V2): median about 10.2 years after the
    # report (2026-03-01), 10 % after about 3.3 years; RSA-2048 is the reference task.
    assert doc["arrival"]["profile"] == "survey-2025-upper"
    assert 2036.3 < doc["arrival"]["median_year"] < 2036.5
    assert 2029.4 < doc["arrival"]["cautious_year"] < 2029.6
    assert main(["estimate", "RSA-2048", "--as-of", "tomorrow"]) == 2
    assert "--as-of" in capsys.readouterr().err
