"""Elliptic curves after 2023: the 2026 figures within their stated bounds, how each was
checked, the default, and 2306.08585's amortised per-key figure never taken as one run.

Check values: tests/threat/published.py, from the papers themselves (arXiv:2603.28846
V2, arXiv:2606.02235 V abstract, IACR ePrint 2026/280 V2, arXiv:2306.08585 V abstract).
"""

from __future__ import annotations

import pytest

from pqtriage.threat.estimate import estimate
from pqtriage.threat.methods import load_method_data
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.requirement import logical_costs, requirement
from pqtriage.threat.resource_arrival import ResourceArrivalModel
from tests.threat import published as P
from tests.threat.helpers import curve, rsa

DATA = load_method_data()


def _costs(method_id: str, bits: int = 256) -> tuple[float, float]:
    method = DATA.method(method_id)
    assert method is not None
    costs = logical_costs(method, "elliptic-curve-dlog", bits, None)
    return costs.logical_qubits, costs.toffoli_count


def test_2603_28846_within_its_stated_bounds_and_flagged_withheld() -> None:
    # arXiv:2603.28846 (V2): under 1200 logical qubits and under 90 M Toffoli (narrower variant).
    qubits, toffoli = _costs("2603.28846")
    assert qubits <= P.B2026_QUBITS_BOUND and toffoli <= P.B2026_TOFFOLI_BOUND
    method = DATA.method("2603.28846")
    assert method is not None and method.check == "withheld-circuit"
    assert method.check_label == "claimed, circuit withheld"
    assert not method.default_for


def test_2606_02235_matches_2603_28846_as_stated_and_is_the_default() -> None:
    # arXiv:2606.02235 (V, abstract): about 1.5 % more qubits and 6.5-10 % fewer Toffoli than
    # arXiv:2603.28846's circuit (its bounds: 1200 qubits, 90 M Toffoli).
    qubits, toffoli = _costs("2606.02235")
    assert qubits == pytest.approx(P.B2026_QUBITS_BOUND * (1 + P.C2026_MORE_QUBITS), rel=0.005)
    low, high = P.C2026_FEWER_TOFFOLI
    assert P.B2026_TOFFOLI_BOUND * (1 - high) <= toffoli <= P.B2026_TOFFOLI_BOUND * (1 - low)
    # Issue 11: "published circuits at about 1.2-1.5 k logical qubits and under 0.1 billion Toffoli".
    assert 1200 <= qubits <= 1500 and toffoli < 1e8
    assert DATA.default_method("elliptic-curve-dlog").id == "2606.02235"
    method = DATA.method("2606.02235")
    assert method is not None and method.check == "published-circuit" and method.in_band


def test_eprint_2026_280_within_its_reported_range() -> None:
    # IACR ePrint 2026/280 (V2): about 1.1-1.2 k qubits at n = 256; 22 runs of 2^38-2^39 Toffoli.
    qubits, toffoli = _costs("2026/280")
    assert P.E2026_QUBITS[0] <= qubits <= P.E2026_QUBITS[1]
    low, high = (P.E2026_RUNS * 2.0**e for e in P.E2026_TOFFOLI_LOG2)
    assert low <= toffoli <= high
    method = DATA.method("2026/280")
    assert method is not None and method.check == "not-checked" and not method.in_band


def test_2306_08585_is_per_key_amortised_never_one_run() -> None:
    # arXiv:2306.08585 (V, abstract): 5e7 Toffoli per key, amortised over several keys (up to
    # 5x from spreading the division over parallel instances). One run is costed at 5 x 5e7.
    method = DATA.method("2306.08585")
    assert method is not None and method.per_key_amortised_toffoli == P.L2023_TOFFOLI_256
    _, toffoli = _costs("2306.08585")
    assert toffoli == pytest.approx(5 * P.L2023_TOFFOLI_256)
    e = estimate(curve("P-256", 256), method="2306.08585")
    assert any("amortised over several keys" in step for step in e.working)
    assert "per key" in (e.method_check or "")


def test_the_compact_layout_against_2603_28846s_physical_claim() -> None:
    # Validation of a calibration on a figure it was not tuned to: the compact layout's one
    # calibrated value (idle storage 0.95) was chosen on arXiv:2505.15917's RSA-2048 headline;
    # arXiv:2603.28846 claims "minutes" on under 0.5 M physical qubits for its 256-bit circuit
    # (V2). Our layout gives about 0.61 M and about half an hour for 2606.02235's circuit: on the
    # cautious side for the defender's planning (more qubits, so the curve falls later than the
    # claim would put it) by about 22 %. Recorded in docs/threat-model.md section 2.
    method = DATA.method("2606.02235")
    assert method is not None and method.layout is not None
    need = requirement(method, "elliptic-curve-dlog", 256, None, ThreatParameters(), DATA, True)
    assert need.physical_qubits is not None and need.hours_per_run is not None
    assert P.B2026_PHYSICAL_BOUND < need.physical_qubits <= 1.25 * P.B2026_PHYSICAL_BOUND
    assert need.hours_per_run < 1.0  # minutes, not hours


def test_a_256_bit_curve_falls_before_rsa_2048_under_the_defaults() -> None:
    # Under the 2026 constructions a 256-bit curve needs fewer physical qubits than RSA-2048 and
    # runs in under an hour against RSA-2048's two days: it falls first.
    model = ResourceArrivalModel()
    assert model.shift_years(curve("P-256", 256)) < model.shift_years(rsa(2048)) == 0.0
    row = model.explain(curve("P-256", 256))
    assert row.comparison is not None and row.comparison.method == "2606.02235"
    assert "most recent result whose circuit is published" in row.why_method
    assert dict(row.alternatives).keys() == {"2306.08585", "2603.28846"}
