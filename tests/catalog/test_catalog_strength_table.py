"""Classical strengths against NIST SP 800-57 Part 1 Rev. 5 (2020), Table 2 (tests/vectors)."""

from __future__ import annotations

import pytest

from pqtriage.catalog import Catalog
from tests.catalog.catalog_vectors import vectors

TABLE = vectors("sp800_57_table2.yaml")


@pytest.mark.parametrize("row", TABLE["rows"], ids=lambda row: str(row["bits"]))
def test_every_table_row_rsa_ffc_dsa(catalog: Catalog, row: dict) -> None:
    # SP 800-57 Part 1 Rev. 5 Table 2: IFC modulus and FFC L columns.
    assert catalog.resolve("RSA", key_size=row["ifc"]).spec.classical_bits == row["bits"]
    assert catalog.resolve(f"RSA-{row['ifc']}").spec.classical_bits == row["bits"]
    assert catalog.resolve("DH", key_size=row["ffc_l"]).spec.classical_bits == row["bits"]
    assert catalog.resolve(f"DSA-{row['ffc_l']}").spec.classical_bits == row["bits"]


@pytest.mark.parametrize("row", TABLE["rows"], ids=lambda row: str(row["bits"]))
def test_every_table_row_ecc_order_range(catalog: Catalog, row: dict) -> None:
    # The ECC column gives order-size ranges; both ends of each range map to the row.
    table = catalog._builder.table
    assert table.bits("ecc", row["ecc_min"]) == row["bits"]
    assert table.bits("ecc", row["ecc_max"]) == row["bits"]


@pytest.mark.parametrize("row", TABLE["rows"], ids=lambda row: row["symmetric"])
def test_every_table_row_symmetric(catalog: Catalog, row: dict) -> None:
    assert catalog.resolve(row["symmetric"]).spec.classical_bits == row["bits"]


@pytest.mark.parametrize(
    "case", TABLE["between"], ids=lambda c: f"{c['algorithm']}-{c['key_size']}"
)
def test_sizes_between_rows_take_the_lower_row(catalog: Catalog, case: dict) -> None:
    spec = catalog.resolve(case["algorithm"], key_size=case["key_size"]).spec
    assert spec is not None and spec.classical_bits == case["bits"]


@pytest.mark.parametrize(
    ("curve", "bits"),
    [
        ("P-192", 80),
        ("P-224", 112),
        ("P-256", 128),
        ("P-384", 192),
        ("P-521", 256),
        ("brainpoolP256r1", 128),
        ("brainpoolP384r1", 192),
        ("brainpoolP512r1", 256),
        ("secp256k1", 128),
    ],
)
def test_named_curves_by_order_bits(catalog: Catalog, curve: str, bits: int) -> None:
    # Table 2 ECC column, f = order bits (P-521: 521 >= 512 -> 256).
    for family in ("ECDSA", "ECDH"):
        spec = catalog.resolve(family, curve=curve).spec
        assert spec is not None and spec.classical_bits == bits
        assert spec.shor_problem == "elliptic-curve-dlog"


def test_edwards_and_montgomery_curves_take_their_stated_strength(catalog: Catalog) -> None:
    # RFC 7748 §4.1/§4.2 (from memory): about 128-bit and 224-bit security.
    assert catalog.resolve("X25519").spec.classical_bits == 128
    assert catalog.resolve("Ed25519").spec.classical_bits == 128
    assert catalog.resolve("X448").spec.classical_bits == 224
    assert catalog.resolve("Ed448").spec.classical_bits == 224


def test_rsa_problem_bits_is_the_modulus_and_shor_factoring(catalog: Catalog) -> None:
    spec = catalog.resolve("RSA", key_size=3072).spec
    assert (spec.shor_problem, spec.problem_bits, spec.quantum_attack) == (
        "factoring",
        3072,
        "shor",
    )
    dh = catalog.resolve("ffdhe4096").spec
    assert (dh.shor_problem, dh.problem_bits, dh.classical_bits) == ("finite-field-dlog", 4096, 128)


def test_below_the_table_has_no_strength_and_is_not_acceptable(catalog: Catalog) -> None:
    spec = catalog.resolve("RSA", key_size=512).spec
    assert spec.classical_bits is None
    # 512-bit moduli are publicly factored (from memory: RSA-155, 1999; RSA-250, 2020).
    assert spec.classical_status == "broken"
