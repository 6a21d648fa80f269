"""Published check values for the threat model, each with its source.

Flags as in the shared reference sheet: V checked against the primary text, V2 agreed by
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
