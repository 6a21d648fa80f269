"""Key handling of a fictional ledger service (sample for the source-code finder)."""

import hashlib
import ssl

from cryptography.hazmat.primitives import hashes
from cryptography.hazmat.primitives.asymmetric import ec, rsa

LEGACY_BITS = 1024


def make_keys(size: int) -> list[object]:
    signing = rsa.generate_private_key(public_exponent=65537, key_size=LEGACY_BITS)
    agreement = ec.generate_private_key(ec.SECP256R1())
    chosen = rsa.generate_private_key(public_exponent=65537, key_size=size)
    return [signing, agreement, chosen, hashes.SHA1()]


def fingerprint(data: bytes) -> str:
    return hashlib.md5(data).hexdigest()


def context() -> ssl.SSLContext:
    ctx = ssl.create_default_context()
    ctx.minimum_version = ssl.TLSVersion.TLSv1_2
    ctx.set_ciphers("ECDHE-RSA-AES128-GCM-SHA256")
    return ctx


if __name__ == "__main__":
    make_keys(2048)
    print(fingerprint(b"ledger"), context().minimum_version)
