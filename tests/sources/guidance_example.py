"""A fictional inventory that sets every field official guidance asks for (issue 12).

Fernhollow Regional Transit Authority, its systems and people are invented for the tests.
"""

from __future__ import annotations

GUIDANCE_INVENTORY = """\
# Fernhollow Regional Transit Authority: crypto register (kept by hand)
version: 1
organization: Fernhollow Regional Transit Authority
frameworks: [us-federal, cnsa-2.0]
defaults:
  business_unit: Operations
  impact: moderate
systems:
  - id: 010                       # a leading zero: stays "010"
    name: Fare payment gateway
    owner: Payments team (Ilse Marchetti)
    business_unit: Revenue
    tags: [pci, public-facing]
    impact: high
    high_value_asset: true
    data_classification: {label: Restricted, rank: 4}
    hosting: {model: cloud, provider: Nimbus Cloud, country: DE}
    vendor: Tollgate Systems
    product: FareGate
    version: 2.10                 # not 2.1
    crypto_library: OpenSSL 3.0.13
    crypto_module: FareGate HSM module
    fips_140_certificate: "4282"
    fips_140_level: fips140-3-l3
    key_storage: hsm
    protocol: TLS
    protocol_version: "1.3"
    frameworks: [eu]
    extra: {cost_centre: CC-104, rack_units: 2, pen_tested: yes}
    shelf_life_years: 7
    migration_years: 2
    exposure: internet
    criticality: critical
    uses:
      - purpose: key-establishment
        algorithm: X25519
        protocol: TLS
        protocol_version: "1.3"
      - purpose: signature
        algorithm: ECDSA
        curve: P-256
        key_storage: hsm
        fips_140_level: fips140-3-l3
        crypto_module: FareGate HSM module
        fips_140_certificate: "#4282"
  - id: depot-scada
    name: Depot signalling link
    owner: Rail systems (Teodor Vasquez)
    hosting: {model: on-premises, country: FR}
    key_storage: tpm
    shelf_life_years: 15
    migration_years: 4
    uses:
      - purpose: authentication
        algorithm: RSA
        key_size: 2048
        key_storage: software
        crypto_library: mbed TLS 2.28
"""
"""Every new field, at system and use level, with a file-level frameworks list and defaults."""
