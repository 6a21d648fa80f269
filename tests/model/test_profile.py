"""Threat profile arithmetic: conditioning, quantiles, what-if years."""

from __future__ import annotations

import datetime as dt
import math

import pytest

from pqtriage.model.profile import ThreatProfile, date_of, decimal_year
from pqtriage.sources.profile_file import load_profile, parse_profile


def test_decimal_year_round_trip() -> None:
    for day in (dt.date(2026, 1, 1), dt.date(2026, 7, 2), dt.date(2028, 12, 31), dt.date(2024, 2, 29)):
        assert date_of(decimal_year(day)) == day


def test_crqc_year_only_file_is_a_valid_profile() -> None:
    profile = parse_profile(b"crqc_year: 2035\n", "what-if.yaml")
    assert profile.deterministic and profile.crqc_year == 2035
    now = decimal_year(dt.date(2026, 12, 1))
    assert profile.arrival_probability(2034.99, now) == 0.0
    assert profile.arrival_probability(2035.0, now) == 0.0  # strict: x + y > z
    assert profile.arrival_probability(2035.01, now) == 1.0
    assert profile.quantile(profile.risk_tolerance, now) == 2035.0


def test_shipped_survey_profiles_match_published_ranges() -> None:
    # Quantum Threat Timeline Report 2025 (Global Risk Institute, March 2026), as restated in
    # shared/reference/published-figures.md section 5 (V2): 5-15%, 28-49%, 51-70%, 69-86%, 81-93%.
    upper = load_profile("survey-2025-upper")
    lower = load_profile("survey-2025-lower")
    assert [p for _, p in upper.points] == [0.15, 0.49, 0.70, 0.86, 0.93]
    assert [p for _, p in lower.points] == [0.05, 0.28, 0.51, 0.69, 0.81]
    start = decimal_year(dt.date(2026, 3, 1))
    assert [round(y - start, 6) for y, _ in upper.points] == [5, 10, 15, 20, 30]
    # Unconditioned at the reference date: the 10-year probability is the survey's.
    assert upper.arrival_probability(start + 10, start) == pytest.approx(0.49)
    assert load_profile(None).name == "survey-2025-upper"  # the cautious end is the default
    assert "sells quantum-safe products" in upper.caveat


def test_later_as_of_never_pushes_the_threat_later() -> None:
    profile = load_profile("survey-2025-upper")
    start = decimal_year(dt.date(2026, 3, 1))
    target = start + 10
    later = profile.arrival_probability(target, start + 2)
    # Hand computation: F(start+2) = 0.15 * 2/5 = 0.06; (0.49 - 0.06) / (1 - 0.06) = 0.45745
    assert later == pytest.approx((0.49 - 0.06) / 0.94)
    # Re-counting the survey's horizons from the later date would give F(target - 2), with
    # F(start + 8) = 0.15 + 0.34 * 3/5 = 0.354: lower, i.e. the threat pushed later. Conditioning
    # keeps the calendar years of the survey.
    reanchored = profile.arrival_probability(target - 2, start)
    assert reanchored == pytest.approx(0.354)
    assert later > reanchored
    assert profile.quantile(0.10, start + 2) < profile.quantile(0.10, start) + 2


def test_quantile_beyond_horizon_is_infinite() -> None:
    profile = load_profile("survey-2025-upper")
    start = decimal_year(dt.date(2026, 3, 1))
    assert math.isinf(profile.quantile(0.99, start))


def test_shift_moves_the_distribution() -> None:
    profile = ThreatProfile(name="t", description="", source="", risk_tolerance=0.5,
                            reference_task="", reference_year=2030.0, points=((2040.0, 1.0),))
    # Linear from 0 at 2030 to 1 at 2040: median 2035; shifted -3 years: 2032.
    assert profile.quantile(0.5, 2030.0) == pytest.approx(2035.0)
    assert profile.quantile(0.5, 2020.0, shift_years=-3) == pytest.approx(2032.0)
    assert profile.arrival_probability(2032.0, 2020.0, shift_years=-3) == pytest.approx(0.5)


@pytest.mark.parametrize(
    "text, message",
    [
        (b"crqc_year: 1800\n", "between 2000 and 2200"),
        (b"crqc_yaer: 2035\n", "did you mean 'crqc_year'"),
        (b"reference_date: 2026-03-01\narrival:\n  - {within_years: 5, probability: 0.5}\n"
         b"  - {within_years: 10, probability: 0.4}\n", "never decrease"),
        (b"risk_tolerance: 2\ncrqc_year: 2035\n", "outside"),
        (b"- a\n", "must be a mapping"),
    ],
)
def test_bad_profiles_name_the_place(text: bytes, message: str) -> None:
    from pqtriage.errors import ProfileError

    with pytest.raises(ProfileError) as caught:
        parse_profile(text, "p.yaml")
    assert message in caught.value.diagnostics()
    assert caught.value.diagnostics().startswith("p.yaml:")
