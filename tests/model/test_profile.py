"""Threat profile arithmetic: conditioning, quantiles, what-if years."""

from __future__ import annotations

import datetime as dt
import math

import pytest

from pqtriage.model.profile import ThreatProfile, date_of, decimal_year
from pqtriage.sources.profile_file import load_profile, parse_profile, shipped_profiles


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
    # Quantum Threat Timeline Report 2025 (Global Risk Institute, published 9 March 2026),
    # both ends of its ranges (V2): 5-15%, 28-49%, 51-70%, 69-86%, 81-93%.
    upper = load_profile("survey-2025-upper")
    lower = load_profile("survey-2025-lower")
    assert [p for _, p in upper.points] == [0.15, 0.49, 0.70, 0.86, 0.93]
    assert [p for _, p in lower.points] == [0.05, 0.28, 0.51, 0.69, 0.81]
    # Both carry the whole range as their band; only the central curve differs.
    assert upper.optimistic == lower.optimistic and upper.pessimistic == lower.pessimistic
    assert (upper.central_position, lower.central_position) == (1.0, 0.0)
    start = decimal_year(dt.date(2026, 3, 9))
    assert [round(y - start, 6) for y, _ in upper.points] == [5, 10, 15, 20, 30]
    # At the reference date: the 10-year probability is the survey's.
    assert upper.arrival_probability(start + 10, start) == pytest.approx(0.49)
    assert load_profile(None).name == "survey-2025-upper"  # the cautious end is the default
    assert "sells quantum-safe products" in upper.caveat
    assert upper.row_flags == ("V2",) * 5


def test_the_2024_edition_with_its_memory_rows_flagged() -> None:
    # Quantum Threat Timeline Report 2024 (Global Risk Institute, December 2024), reference
    # sheet section 8.4: 5 y 5-14 % and 10 y 19-34 % (V2); 15 y 39-62 % (V2, weak); 20 y 60-82 %
    # and 30 y 77-92 % from memory (M): this test uses those two M rows, as flagged.
    upper = load_profile("survey-2024-upper")
    lower = load_profile("survey-2024-lower")
    assert [p for _, p in upper.points] == [0.14, 0.34, 0.62, 0.82, 0.92]
    assert [p for _, p in lower.points] == [0.05, 0.19, 0.39, 0.60, 0.77]
    assert upper.row_flags == ("V2", "V2", "V2", "M", "M")
    assert upper.reference_year == pytest.approx(decimal_year(dt.date(2024, 12, 1)))


def test_profile_sources_cite_the_survey_not_a_file() -> None:
    for name in shipped_profiles():
        profile = load_profile(name)
        assert "Quantum Threat Timeline Report" in profile.source
        assert "Global Risk Institute" in profile.source
        assert "shared/" not in profile.source and ".md" not in profile.source


def test_no_crqc_by_the_as_of_date_holds_the_past_probability_at_the_as_of_date() -> None:
    profile = load_profile("survey-2025-upper")
    start = decimal_year(dt.date(2026, 3, 9))
    target = start + 10
    # Two quiet years later, the probability for the same calendar date is unchanged: the
    # survey's F(start + 10) = 0.49; the 0.06 it put before start + 2 (0.15 x 2/5) is held at
    # the as-of date (it may arrive at any moment), never spread over later years.
    assert profile.arrival_probability(target, start + 2) == pytest.approx(0.49)
    # It arrives "at any moment": by a week after the as-of date, P is at least 0.06.
    assert profile.arrival_probability(start + 2 + 7 / 365.25, start + 2) >= 0.06
    # Re-counting the survey's horizons from the later date would give F(target - 2) = 0.354
    # (0.15 + 0.34 x 3/5): the threat pushed later; holding it is more cautious.
    assert profile.arrival_probability(target - 2, start) == pytest.approx(0.354)
    # z at 10 %: F reaches 0.10 at 0.10 / 0.15 x 5 = 3.33 years; two years on, the same year.
    assert profile.quantile(0.10, start) == pytest.approx(start + 10 / 3)
    assert profile.quantile(0.10, start + 2) == pytest.approx(start + 10 / 3)
    # Once that year has passed without a CRQC, z is the as-of date itself (overdue).
    assert profile.quantile(0.10, start + 4) == pytest.approx(start + 4)


def test_the_cautious_tail_keeps_the_rest_of_the_probability_inside_the_horizon() -> None:
    profile = load_profile("survey-2025-upper")
    start = profile.reference_year
    # Last interval 20 -> 30 years: 0.86 -> 0.93, 0.007 a year; at that rate the remaining 0.07
    # takes 10 years: probability 1 at 40 years (the optimistic end: 0.012 a year, 45.8 years).
    assert profile.tail_end_year == pytest.approx(start + 40)
    assert profile.cdf(start + 35) == pytest.approx(0.93 + 0.007 * 5)
    assert math.isfinite(profile.quantile(0.99, start))
    # After the last horizon no date makes P zero: as of 2060 (34 years on), P within a year
    # is (F(35) - F(34)) held... here F(35) = 0.965 with the held mass: never 0.
    late = start + 34
    assert profile.arrival_probability(late + 1, late) > 0.9
    assert profile.arrival_probability(start + 60, start + 50) == 1.0


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
        (b"reference_date: 2026-03-01\narrival:\n  - {within_years: 5, optimistic: 0.5, pessimistic: 0.4}\n",
         "above 'pessimistic'"),
        (b"reference_date: 2026-03-01\ncentral: middle\narrival:\n"
         b"  - {within_years: 5, optimistic: 0.1, pessimistic: 0.4}\n", "'central' must be"),
        (b"reference_date: 2026-03-01\ntail: flat\narrival:\n  - {within_years: 5, probability: 0.1}\n",
         "unknown tail rule"),
        (b"- a\n", "must be a mapping"),
    ],
)
def test_bad_profiles_name_the_place(text: bytes, message: str) -> None:
    from pqtriage.errors import ProfileError

    with pytest.raises(ProfileError) as caught:
        parse_profile(text, "p.yaml")
    assert message in caught.value.diagnostics()
    assert caught.value.diagnostics().startswith("p.yaml:")


def test_priority_weights_come_from_the_profile() -> None:
    from pqtriage.model.priority import PriorityWeights
    from pqtriage.sources.profile_file import load_profile, parse_profile

    shipped = load_profile("survey-2025-upper").priority
    assert shipped == PriorityWeights()  # the shipped profiles state the documented defaults
    custom = parse_profile(b"crqc_year: 2035\npriority:\n  per_year_overdue: 2\n  criticality: {critical: 50}\n", "p.yaml")
    assert custom.priority.per_year_overdue == 2 and custom.priority.criticality_points("critical") == 50
    assert custom.priority.criticality_points("high") == 20  # the rest keep their defaults


def test_priority_mistakes_are_one_line_with_the_place() -> None:
    import pytest

    from pqtriage.errors import ProfileError
    from pqtriage.sources.profile_file import parse_profile

    with pytest.raises(ProfileError) as caught:
        parse_profile(b"crqc_year: 2035\npriority:\n  criticality: {urgent: 5}\n", "p.yaml")
    assert "unknown criticality value 'urgent'" in caught.value.diagnostics()
    assert "p.yaml:3:" in caught.value.diagnostics()
    with pytest.raises(ProfileError, match="unknown field 'per_pct'"):
        parse_profile(b"crqc_year: 2035\npriority:\n  per_pct: 1\n", "p.yaml")
