"""Arrival per algorithm relative to the reference task, and its properties."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.errors import ProfileError, UsageError
from pqtriage.model.arrival import ArrivalModel
from pqtriage.threat.arrival import ResourceArrivalModel
from pqtriage.threat.parameters import ThreatParameters
from tests.threat.helpers import cipher, curve, ffdh, hash_, rsa

DEFAULT = ResourceArrivalModel()
GE2019 = ResourceArrivalModel(
    methods={"factoring": "1905.09749", "finite-field-dlog": "1905.09749"}
)


def test_is_an_arrival_model() -> None:
    model: ArrivalModel = DEFAULT
    assert "RSA-2048" in model.name


def test_reference_task_has_no_shift() -> None:
    assert DEFAULT.shift_years(rsa(2048)) == pytest.approx(0.0)
    assert GE2019.shift_years(rsa(2048)) == pytest.approx(0.0)


def test_shift_is_doubling_years_times_log2_of_the_requirement_ratio() -> None:
    row = DEFAULT.explain(rsa(4096, 152))
    assert row.physical_qubits_log2 is not None
    expected = 2.0 * (row.physical_qubits_log2 - math.log2(row.reference_physical_qubits))
    assert row.shift_years == pytest.approx(expected)
    slower = ResourceArrivalModel(doubling_years=4.0)
    assert slower.shift_years(rsa(4096, 152)) == pytest.approx(
        2 * DEFAULT.shift_years(rsa(4096, 152))
    )


def test_fewer_resources_arrive_earlier() -> None:
    assert DEFAULT.shift_years(rsa(1024, 80)) < 0 < DEFAULT.shift_years(rsa(3072, 128))
    # Under the 2019 constructions a 256-bit curve needs far fewer qubits than RSA-2048.
    ecc = ResourceArrivalModel(
        methods={"factoring": "1905.09749", "elliptic-curve-dlog": "1706.06752"}
    )
    assert ecc.shift_years(curve("P-256", 256)) < 0


def test_symmetric_128_bits_and_more_lie_beyond_the_horizon_with_numbers() -> None:
    for bits in (128, 192, 256):
        row = DEFAULT.explain(cipher(bits))
        assert math.isinf(row.shift_years)
        assert row.computed_shift_years is not None and row.computed_shift_years > 100
        assert "beyond the 100-year planning horizon" in row.explanation
        assert "2^" in row.explanation
    # A 56-bit key falls within the horizon, though later than RSA-2048.
    des = DEFAULT.shift_years(cipher(56, "DES"))
    assert 0 < des < 100


def test_collisions_and_no_attack_never_fall() -> None:
    assert math.isinf(DEFAULT.shift_years(hash_("SHA-256", 256, "collision")))
    from pqtriage.catalog.spec import AlgorithmSpec

    pq = AlgorithmSpec(
        "ML-KEM-768", "ML-KEM", "kem", 192, "acceptable", "none", "FIPS 203", nist_category=3
    )
    assert math.isinf(DEFAULT.shift_years(pq))


def test_median_year_follows_the_profile_reference() -> None:
    model = ResourceArrivalModel(params=ThreatParameters(reference_median_year=2040.0))
    row = model.explain(rsa(4096, 152))
    assert row.median_year == pytest.approx(2040.0 + row.shift_years)


def test_bad_override_and_bad_doubling_are_refused() -> None:
    with pytest.raises(UsageError):
        ResourceArrivalModel(methods={"factoring": "1706.06752"})
    with pytest.raises(ProfileError):
        ResourceArrivalModel(doubling_years=0.0)


def _family_specs(family: str, a: int, b: int) -> tuple[object, object]:
    if family == "factoring":
        return rsa(a), rsa(b)
    if family == "finite-field-dlog":
        return ffdh(a, 112), ffdh(b, 112)
    return curve("C-a", a), curve("C-b", b)


@settings(max_examples=40, deadline=None)
@given(
    family=st.sampled_from(["factoring", "finite-field-dlog", "elliptic-curve-dlog"]),
    method=st.sampled_from(["default", "2019"]),
    sizes=st.tuples(st.integers(160, 8192), st.integers(160, 8192)).map(sorted),
)
def test_larger_keys_never_arrive_earlier(family: str, method: str, sizes: list[int]) -> None:
    small, large = sizes
    if family == "elliptic-curve-dlog":
        small, large = small // 16 + 150, large // 16 + 150  # 160..662-bit curves
    model = (
        DEFAULT
        if method == "default"
        else ResourceArrivalModel(
            methods={
                "factoring": "1905.09749",
                "finite-field-dlog": "1905.09749",
                "elliptic-curve-dlog": "1706.06752",
            }
        )
    )
    a, b = _family_specs(family, small, large)
    assert model.shift_years(a) <= model.shift_years(b)  # type: ignore[arg-type]


@settings(max_examples=20, deadline=None)
@given(small=st.integers(40, 300), step=st.integers(0, 200))
def test_larger_symmetric_keys_never_arrive_earlier(small: int, step: int) -> None:
    assert DEFAULT.shift_years(cipher(small)) <= DEFAULT.shift_years(cipher(small + step))
