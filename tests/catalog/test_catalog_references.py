"""Curve sizes against the cryptography library (a reference implementation)."""

from __future__ import annotations

import pytest
from cryptography.hazmat.primitives.asymmetric import ec

from pqtriage.catalog import Catalog

CURVES = {
    "P-192": ec.SECP192R1,
    "P-224": ec.SECP224R1,
    "P-256": ec.SECP256R1,
    "P-384": ec.SECP384R1,
    "P-521": ec.SECP521R1,
    "secp256k1": ec.SECP256K1,
    "brainpoolP256r1": ec.BrainpoolP256R1,
    "brainpoolP384r1": ec.BrainpoolP384R1,
    "brainpoolP512r1": ec.BrainpoolP512R1,
}


@pytest.mark.parametrize(("name", "curve"), sorted(CURVES.items()))
def test_curve_sizes_match_cryptography(catalog: Catalog, name: str, curve: type) -> None:
    # For these prime-order curves the order has as many bits as the field (SEC 2 v2, RFC 5639).
    spec = catalog.resolve("ECDSA", curve=name).spec
    assert spec.problem_bits == curve().key_size
    assert catalog.resolve("ECDSA", curve=curve.name).spec.name == f"ECDSA {name}"
