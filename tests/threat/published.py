"""Published check values for the threat model, each with its source.

Flags: V checked against the primary text, V2 agreed by
several secondary sources, M from memory.
"""

# "How to factor 2048 bit RSA integers in 8 hours using 20 million noisy qubits"
# (Quantum 5, 433, 2021; arXiv:1905.09749) - V.
GE2019_LOGICAL_QUBITS_2048 = 6189  # 3n + 0.002 n lg n at n = 2048
GE2019_TOFFOLI_2048 = 2.7e9
GE2019_RSA2048_PHYSICAL = 20e6
GE2019_RSA2048_HOURS = 5.1
GE2019_RSA1024_PHYSICAL = 9.7e6
GE2019_RSA1024_HOURS = 1.3
GE2019_DLOG2048_PHYSICAL = 20e6  # 2048-bit safe prime, short exponent
GE2019_DLOG2048_HOURS = 1.2

# "How to factor 2048 bit RSA integers with less than a million noisy qubits"
# (arXiv:2505.15917, 2025) - V2 for these two.
G2025_LOGICAL_QUBITS_2048 = 1400
G2025_TOFFOLI_2048 = 6.5e9

# "Factoring using 2n+2 qubits with Toffoli based modular multiplication"
# (QIC 17, 2017; arXiv:1611.07995) - V2.
HRS2017_TOFFOLI_2048 = 5.20e12

# "Quantum resource estimates for computing elliptic curve discrete logarithms"
# (ASIACRYPT 2017; arXiv:1706.06752) - V for formulas, V2 for the P-256 row.
RNSL2017_P256_QUBITS = 2330
RNSL2017_P256_TOFFOLI = 1.26e11

# "How to compute a 256-bit elliptic curve private key with only 50 million Toffoli gates"
# (arXiv:2306.08585, 2023) - V.
L2023_TOFFOLI_256 = 5e7

# NIST PQC Call for Proposals (2016) section 4.A.5 and Call for Additional Digital Signature
# Schemes (2022) section 4.B.3 - V2: log2(quantum gates x MAXDEPTH) for AES key search.
NIST_2016_GATES_TIMES_DEPTH = {128: 170, 192: 233, 256: 298}
NIST_2022_GATES_TIMES_DEPTH = {128: 157, 192: 221, 256: 285}
NIST_CLASSICAL_GATES = {128: 143, 192: 207, 256: 272}
NIST_MAXDEPTHS = (40, 64, 96)

# NIST IR 8547 ipd (2024), Table 7 - V: (collision category, preimage category); 0 = below 1.
IR8547_HASH_CATEGORIES = {
    "SHA-1": (160, 0, None),  # preimage category not listed for SHA-1
    "SHA-224": (224, 0, 3),
    "SHA-256": (256, 2, 5),
    "SHA-384": (384, 4, 5),
    "SHA-512": (512, 5, 5),
}
# NIST PQC Call for Proposals (2016) 4.A.5; FIPS 197: AES-128/192/256 = categories 1/3/5 - V.
AES_CATEGORIES = {128: 1, 192: 3, 256: 5}


# arXiv:2505.15917, per-size logical costs: the authors' generated tables (GitHub
# ekera/quantum-factor-2025-code, commit 13a291ec7f100617bbc92fd135a735d4c3345ab3, files
# assets/gen/*-logical-cost-table.tex) - V. Per problem: {n: (logical qubits, Toffoli)}; the
# Toffoli count is the expected total over all runs. schnorr-group: Schnorr/DSA groups.
G2025_COMMIT = "13a291ec7f100617bbc92fd135a735d4c3345ab3"
G2025_TABLE = {
    "factoring": {1024: (759, 1.0e9), 1536: (1073, 3.1e9), 2048: (1398, 6.5e9),
                  3072: (2042, 1.9e10), 4096: (2691, 4.0e10), 6144: (3977, 1.2e11),
                  8192: (5146, 2.8e11)},
    "finite-field-dlog": {1024: (320, 1.9e8), 1536: (387, 3.0e8), 2048: (435, 4.9e8),
                          3072: (461, 9.6e8), 4096: (537, 1.8e9), 6144: (581, 3.6e9),
                          8192: (648, 5.7e9)},
    "schnorr-group": {1024: (419, 4.5e7), 1536: (483, 8.7e7), 2048: (406, 3.4e8),
                      3072: (429, 7.0e8), 4096: (499, 1.3e9), 6144: (559, 2.4e9),
                      8192: (619, 3.8e9)},
}
# The arXiv v1 table (commit 4a85706) differs: RSA-2048 1399 qubits, RSA-8192 5261 qubits and
# 2.7e11 Toffoli. The tool cites the later commit.
G2025_V1_RSA2048_QUBITS = 1399

# arXiv:1905.09749, the paper's own table (authors' LaTeX, GitHub
# Strilanc/efficient-quantum-factoring-2019, commit 4ce507c, main.tex) - V. Per run:
# {n: (physical qubits, hours per run, retry risk)}; expected time = hours / (1 - retry risk).
GE2019_COMMIT = "4ce507c"
GE2019_RSA_TABLE = {1024: (9.7e6, 1.3, 0.06), 2048: (20e6, 5.1, 0.31), 3072: (38e6, 12, 0.09),
                    4096: (55e6, 22, 0.05), 8192: (140e6, 86, 0.05)}
# Discrete logarithm, safe prime, short exponent (same paper): {n: (physical qubits, hours)}.
GE2019_DH_TABLE = {1024: (9.2e6, 0.4), 2048: (20e6, 1.2), 3072: (29e6, 2.0), 4096: (51e6, 3.1),
                   8192: (110e6, 8.3)}
# Full-length exponent rows (same paper).
GE2019_DH_FULL_TABLE = {2048: (26e6, 11), 3072: (41e6, 24), 4096: (55e6, 43)}

# Elliptic curves after 2023 (the papers named below).
# "Securing Elliptic Curve Cryptocurrencies against Quantum Vulnerabilities: Resource Estimates
# and Mitigations" (arXiv:2603.28846, March 2026) - V2: 256-bit ECDLP under 1200 logical qubits
# and under 90 M Toffoli, or under 1450 and under 70 M; circuits withheld; "minutes" on under
# 0.5 M physical qubits at p = 1e-3, planar.
B2026_QUBITS_BOUND, B2026_TOFFOLI_BOUND = 1200, 90e6
B2026_WIDE_QUBITS_BOUND, B2026_WIDE_TOFFOLI_BOUND = 1450, 70e6
B2026_PHYSICAL_BOUND = 0.5e6
# "Optimized Point Addition Circuits for Elliptic Curve Discrete Logarithms" (arXiv:2606.02235,
# June 2026) - V (abstract): published circuit matching the row above, about 1.5 % more qubits,
# 6.5-10 % fewer Toffoli (secp256k1).
C2026_MORE_QUBITS = 0.015
C2026_FEWER_TOFFOLI = (0.065, 0.10)
# "Reducing the Number of Qubits in Quantum Discrete Logarithms on Elliptic Curves" (IACR ePrint
# 2026/280, EUROCRYPT 2026) - V2: about 1.1-1.2 k qubits at n = 256; 22 runs of 2^38-2^39 Toffoli.
E2026_QUBITS = (1100, 1200)
E2026_RUNS, E2026_TOFFOLI_LOG2 = 22, (38, 39)
