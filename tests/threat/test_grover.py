"""Grover-type estimates against NIST's published figures."""

from __future__ import annotations

import math
from dataclasses import replace

import pytest

from pqtriage.threat import grover
from pqtriage.threat.parameters import ThreatParameters
from tests.threat import published as P


@pytest.mark.parametrize("maxdepth", P.NIST_MAXDEPTHS)
@pytest.mark.parametrize("bits", [128, 192, 256])
def test_nist_2016_and_2022_gate_costs(bits: int, maxdepth: int) -> None:
    # NIST PQC call (2016) 4.A.5 and call for additional signatures (2022) 4.B.3 (V2):
    # quantum gates 2^G / MAXDEPTH for AES-128/192/256.
    assert (
        grover.nist_quantum_gates_log2(bits, maxdepth, 2016)
        == P.NIST_2016_GATES_TIMES_DEPTH[bits] - maxdepth
    )
    assert (
        grover.nist_quantum_gates_log2(bits, maxdepth, 2022)
        == P.NIST_2022_GATES_TIMES_DEPTH[bits] - maxdepth
    )
    for year, table in (
        (2016, P.NIST_2016_GATES_TIMES_DEPTH),
        (2022, P.NIST_2022_GATES_TIMES_DEPTH),
    ):
        r = grover.grover_resources(
            "key-search", bits, ThreatParameters(maxdepth_log2=maxdepth, nist_figures_year=year)
        )
        assert r.nist_formula_gates_log2 == table[bits] - maxdepth
        assert r.classical_gates_log2 == P.NIST_CLASSICAL_GATES[bits]
        assert r.total_gates_log2 is not None and r.serial_depth_log2 is not None
        if maxdepth < r.serial_depth_log2:  # the formula's own domain
            assert r.total_gates_log2 == table[bits] - maxdepth
            assert r.machines_log2 == pytest.approx(2 * (r.serial_depth_log2 - maxdepth))
        else:  # one machine runs the serial search
            assert r.total_gates_log2 == pytest.approx(table[bits] - r.serial_depth_log2)
            assert r.machines_log2 == 0


def test_depth_beyond_serial_needs_no_parallel_machines() -> None:
    # AES-128's serial search (about 2^80 deep, arXiv:1512.04965, from memory) fits in MAXDEPTH 2^96.
    r = grover.grover_resources("key-search", 128, ThreatParameters(maxdepth_log2=96))
    assert r.machines_log2 == 0
    assert r.total_gates_log2 is not None and r.nist_formula_gates_log2 is not None
    assert r.total_gates_log2 > r.nist_formula_gates_log2


@pytest.mark.parametrize("bits", [1, 2, 10, 20, 40, 128, 256])
def test_grover_iterations(bits: int) -> None:
    # (pi/4) sqrt(N) oracle calls ("Grover's quantum searching algorithm is optimal",
    # Phys. Rev. A 60, 2746, 1999).
    assert 2 ** grover.grover_iterations_log2(bits) == pytest.approx(
        math.pi / 4 * math.sqrt(2.0**bits)
    )


def test_grover_iterations_against_a_simulated_search() -> None:
    # The optimal iteration count maximises the amplitude of the marked item: sin((2j+1) theta)
    # with sin theta = 1/sqrt(N) (Phys. Rev. A 60, 2746). Simulated directly for N = 2^16.
    n = 2**16
    theta = math.asin(1 / math.sqrt(n))
    best = max(range(400), key=lambda j: math.sin((2 * j + 1) * theta) ** 2)
    assert abs(best - 2 ** grover.grover_iterations_log2(16)) < 1


@pytest.mark.parametrize("name", sorted(P.IR8547_HASH_CATEGORIES))
def test_hash_categories_of_ir_8547_table_7(name: str) -> None:
    # NIST IR 8547 ipd (2024), Table 7 (V).
    bits, collision, preimage = P.IR8547_HASH_CATEGORIES[name]
    params = ThreatParameters()
    assert grover.grover_resources("collision", bits, params).nist_category == collision
    if preimage is not None:
        assert grover.grover_resources("preimage", bits, params).nist_category == preimage


@pytest.mark.parametrize("bits", [128, 192, 256])
def test_aes_categories(bits: int) -> None:
    # NIST PQC call (2016) 4.A.5: categories 1, 3, 5 are AES-128, -192, -256 key search (V).
    assert (
        grover.grover_resources("key-search", bits, ThreatParameters()).nist_category
        == P.AES_CATEGORIES[bits]
    )


def test_collision_bound_is_classical_parallel_search() -> None:
    # "Cost analysis of hash collisions" (SHARCS 2009): classical parallel rho, 2^(n/2), is the bound.
    r = grover.grover_resources("collision", 256, ThreatParameters())
    assert r.quantum_security_bits == 128
    assert r.iterations_log2 is None and r.total_gates_log2 is None


def test_break_even_oracle_is_about_one_operation() -> None:
    # Fact of the trade (common practice, no source): at 1e4 logical ops/s against 1e14
    # classical, a quadratic speedup pays off within two weeks only for oracles under about one
    # operation.
    params = ThreatParameters(logical_gate_rate=1e4, classical_rate=1e14, window_days=14)
    assert 0.5 < grover.break_even_oracle_operations(params) < 2
    # Faster quantum gates help quadratically.
    faster = replace(params, logical_gate_rate=1e5)
    assert grover.break_even_oracle_operations(faster) == pytest.approx(
        100 * grover.break_even_oracle_operations(params)
    )


def test_more_machines_shorten_wallclock_by_a_square_root() -> None:
    # Split over S machines each needs (pi/4) sqrt(N/S) (Phys. Rev. A 60, 2746).
    one = grover.grover_resources("key-search", 128, ThreatParameters(machines=1))
    many = grover.grover_resources("key-search", 128, ThreatParameters(machines=2.0**20))
    assert one.wallclock_years_log2 is not None and many.wallclock_years_log2 is not None
    assert one.wallclock_years_log2 - many.wallclock_years_log2 == pytest.approx(10)
