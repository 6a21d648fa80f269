"""Grover-type estimates for key search and hash preimages; the collision bound.

All sizes are log2 values so that 2^298 stays exact in a float. Sources:

- iterations (pi/4) sqrt(2^k) for one marked item among 2^k, and (pi/4) sqrt(2^k / S) per
  machine when split over S machines ("Grover's quantum searching algorithm is optimal",
  Phys. Rev. A 60, 2746, 1999);
- total gates 2^G / MAXDEPTH with G per AES size from NIST (PQC call 2016 section 4.A.5;
  call for additional signatures 2022 section 4.B.3); other key sizes k take G = k + (G - k)
  of the nearest AES size, i.e. an oracle about as costly as AES (assumption);
- when MAXDEPTH exceeds the serial depth of the whole search, one machine suffices and the
  gate count is that of the serial search, 2^G / serial depth;
- hash collisions: no quantum attack beats classical parallel collision search in cost
  ("Cost analysis of hash collisions", SHARCS 2009), so the bound is 2^(n/2).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from pqtriage.threat.methods import AesOracle, MethodData, load_method_data
from pqtriage.threat.parameters import SECONDS_PER_YEAR, ThreatParameters

LOG2_PI_OVER_4 = math.log2(math.pi / 4)


@dataclass(frozen=True)
class GroverResources:
    """What a Grover-type search (or the collision bound) costs for one target."""

    target: str
    """key-search, preimage or collision."""
    bits: int
    """Key bits or hash output bits."""
    iterations_log2: float | None
    """log2 of the (pi/4) sqrt(2^k) Grover iterations of a serial search; None for collisions."""
    total_gates_log2: float | None
    """log2 of the quantum gates of the search under MAXDEPTH; None for collisions."""
    nist_formula_gates_log2: float | None
    """log2 of NIST's 2^G / MAXDEPTH as published (meaningful while MAXDEPTH < serial depth)."""
    serial_depth_log2: float | None
    """log2 of the depth of the unparallelised search."""
    machines_log2: float | None
    """log2 of the machines the MAXDEPTH limit forces: (serial depth / MAXDEPTH)^2."""
    classical_gates_log2: float
    """log2 of the classical cost (NIST figures for key search; 2^(n/2) for collisions)."""
    quantum_security_bits: float
    """Effective security against a quantum attacker, in bits of gate cost."""
    nist_category: int
    """NIST category (0 means below category 1)."""
    wallclock_years_log2: float | None
    """log2 of the years the search takes on the stated machines at the stated gate rate."""
    oracle_qubits: int | None
    """Logical qubits of one search machine (AES oracle, arXiv:1512.04965)."""
    working: tuple[str, ...]
    """Each step of the computation, with its source."""


def grover_iterations_log2(bits: int) -> float:
    """log2 of (pi/4) sqrt(2^k) (Phys. Rev. A 60, 2746, 1999)."""
    return bits / 2 + LOG2_PI_OVER_4


def nearest_oracle(bits: int, data: MethodData | None = None) -> AesOracle:
    """The AES oracle row closest in key size (ties go to the larger key)."""
    data = data or load_method_data()
    return min(data.aes_oracles, key=lambda o: (abs(o.key_bits - bits), -o.key_bits))


def nist_quantum_gates_log2(
    bits: int, maxdepth_log2: float, year: int, data: MethodData | None = None
) -> float:
    """log2 of NIST's quantum gate figure 2^G / MAXDEPTH for a k-bit key search."""
    data = data or load_method_data()
    figures = data.figures(year)
    if figures is None:
        raise ValueError(f"no NIST figures for {year}")
    oracle = nearest_oracle(bits, data)
    g = figures.quantum_gates_times_depth_log2[oracle.key_bits] + (bits - oracle.key_bits)
    return g - maxdepth_log2


def break_even_oracle_operations(params: ThreatParameters, speedup_power: float = 2.0) -> float:
    """Largest oracle (in operations) for which the quantum search wins within the window.

    Within window T a classical searcher at rate R_c covers N_c = T R_c / c items, a quantum one
    at rate R_q covers N_q = (T R_q / c)^s for a speedup of power s (s = 2 for Grover). N_q > N_c
    while c^(s-1) < T^(s-1) R_q^s / R_c (common practice, no source).
    """
    s = speedup_power
    t = params.window_seconds
    value = (t ** (s - 1) * params.logical_gate_rate**s / params.classical_rate) ** (1 / (s - 1))
    return float(value)


def _key_category(bits: float) -> int:
    # NIST PQC call (2016) 4.A.5: categories 1, 3, 5 = AES-128, AES-192, AES-256 key search.
    return 5 if bits >= 256 else 3 if bits >= 192 else 1 if bits >= 128 else 0


def _collision_category(bits: int) -> int:
    # NIST IR 8547 ipd, Table 7: SHA-256 collision 2, SHA-384 4, SHA-512 5, SHA-224 below 1.
    return 5 if bits >= 512 else 4 if bits >= 384 else 2 if bits >= 256 else 0


def grover_resources(
    target: str, bits: int, params: ThreatParameters, data: MethodData | None = None
) -> GroverResources:
    """Cost of a Grover-type search for ``target`` (key-search, preimage, collision) at ``bits``."""
    data = data or load_method_data()
    if target == "collision":
        half = bits / 2
        return GroverResources(
            target,
            bits,
            None,
            None,
            None,
            None,
            None,
            half,
            half,
            _collision_category(bits),
            None,
            None,
            (
                (
                    f"collision on {bits} bits: classical parallel collision search, 2^{half:g} "
                    "operations, is the bound; no quantum attack beats it in cost (SHARCS 2009)"
                ),
                f"NIST category {_collision_category(bits)} (NIST IR 8547 ipd, Table 7)",
            ),
        )
    figures = data.figures(params.nist_figures_year)
    assert figures is not None  # ThreatParameters validates the year
    oracle = nearest_oracle(bits, data)
    iterations = grover_iterations_log2(bits)
    serial_depth = oracle.serial_depth_log2 + (bits - oracle.key_bits) / 2
    g = figures.quantum_gates_times_depth_log2[oracle.key_bits] + (bits - oracle.key_bits)
    nist_gates = g - params.maxdepth_log2
    depth = min(params.maxdepth_log2, serial_depth)
    total = g - depth
    machines = max(0.0, 2 * (serial_depth - params.maxdepth_log2))
    classical = figures.classical_gates_log2[oracle.key_bits] + (bits - oracle.key_bits)
    per_machine_depth = serial_depth - min(math.log2(params.machines), 2 * serial_depth) / 2
    wallclock = (
        per_machine_depth - math.log2(params.logical_gate_rate) - math.log2(SECONDS_PER_YEAR)
    )
    category = _key_category(bits)
    scope = (
        "AES"
        if bits == oracle.key_bits and target == "key-search"
        else f"AES-{oracle.key_bits}-like oracle (assumption)"
    )
    working = [
        f"Grover iterations (pi/4) sqrt(2^{bits}) = 2^{iterations:.2f} (Phys. Rev. A 60, 2746)",
        f"serial depth 2^{serial_depth:.1f} ({scope}; {oracle.source})",
        (
            f"NIST {figures.year}: 2^{g:g} / MAXDEPTH 2^{params.maxdepth_log2:g} = "
            f"2^{nist_gates:g} gates ({figures.source})"
        ),
    ]
    if params.maxdepth_log2 >= serial_depth:
        working.append(f"MAXDEPTH exceeds the serial depth: one machine, 2^{total:.1f} gates")
    else:
        working.append(f"parallel split: 2^{machines:.1f} machines to stay under MAXDEPTH")
    working += [
        (
            f"on {params.machines:g} machines at {params.logical_gate_rate:g} gates/s: "
            f"2^{wallclock:.1f} years"
        ),
        f"classical search 2^{classical:g} gates; NIST category {category}",
    ]
    return GroverResources(
        target=target,
        bits=bits,
        iterations_log2=iterations,
        total_gates_log2=total,
        nist_formula_gates_log2=nist_gates,
        serial_depth_log2=serial_depth,
        machines_log2=machines,
        classical_gates_log2=classical,
        quantum_security_bits=total,
        nist_category=category,
        wallclock_years_log2=wallclock,
        oracle_qubits=oracle.oracle_qubits,
        working=tuple(working),
    )
