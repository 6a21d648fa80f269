"""Inventory domain types: systems and the cryptography each one uses.

Pure data: no file, console or network access. Sources (YAML, CBOM, scans,
probes) build these; the triage model reads them.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field
from enum import Enum


class Purpose(str, Enum):
    """What a use of cryptography protects; decides which shelf-life applies."""

    KEY_ESTABLISHMENT = "key-establishment"
    ENCRYPTION = "encryption"
    SIGNATURE = "signature"
    AUTHENTICATION = "authentication"
    INTEGRITY = "integrity"


class Exposure(str, Enum):
    """How reachable a system's traffic is to an interceptor (harvest now, decrypt later)."""

    INTERNET = "internet"
    PARTNER = "partner"
    INTERNAL = "internal"
    ISOLATED = "isolated"


class Criticality(str, Enum):
    """Business criticality as the inventory owner rates it."""

    CRITICAL = "critical"
    HIGH = "high"
    MEDIUM = "medium"
    LOW = "low"


class Impact(str, Enum):
    """FIPS 199 potential impact level of a system (FIPS PUB 199, 2004, section 3)."""

    LOW = "low"
    MODERATE = "moderate"
    HIGH = "high"


class HostingModel(str, Enum):
    """Where a system runs."""

    ON_PREMISES = "on-premises"
    CLOUD = "cloud"
    HYBRID = "hybrid"


class KeyStorage(str, Enum):
    """Where keys are kept: a hardware security module, a TPM, software, a cloud key service."""

    HSM = "hsm"
    TPM = "tpm"
    SOFTWARE = "software"
    CLOUD_KMS = "cloud-kms"
    UNKNOWN = "unknown"


IMPACT_ORDER = {Impact.LOW: 0, Impact.MODERATE: 1, Impact.HIGH: 2}
"""FIPS 199 levels from least to most impact."""

EXPOSURE_ORDER = {Exposure.INTERNET: 0, Exposure.PARTNER: 1, Exposure.INTERNAL: 2, Exposure.ISOLATED: 3}
"""Ranking weight: lower is more exposed to interception."""
CRITICALITY_ORDER = {
    Criticality.CRITICAL: 0,
    Criticality.HIGH: 1,
    Criticality.MEDIUM: 2,
    Criticality.LOW: 3,
}
"""Ranking weight: lower is more critical."""


@dataclass(frozen=True, slots=True)
class SourceRef:
    """Where an item came from, so every finding can be traced back."""

    file: str
    """Inventory, CBOM or scanned file path (or ``host:port`` for a probe)."""
    line: int | None = None
    """1-based line in that file, when known."""
    column: int | None = None
    """1-based column in that file, when known."""
    detail: str | None = None
    """Extra locator: PEM block number, bom-ref, known_hosts line, probe target."""

    def __str__(self) -> str:
        text = self.file
        if self.line is not None:
            text += f":{self.line}"
            if self.column is not None:
                text += f":{self.column}"
        if self.detail:
            text += f" ({self.detail})"
        return text


IN_USE = "in-use"
"""Role of a use that is what the system actually runs (the default)."""
OFFERED = "offered"
"""Role of a use a server offers that a current client does not negotiate (older clients may)."""
USE_ROLES = (IN_USE, OFFERED)
"""Accepted values of :attr:`CryptoUse.role`."""

FACT_ORIGINS: tuple[str, ...] = ("inventory", "file", "handshake", "cbom", "default")
"""Where a fact came from: written in the input (``inventory``), read from a scanned file
(``file``: certificate, key), seen in a live handshake (``handshake``), imported from a CBOM
(``cbom``), or a documented default (``default``)."""


class SignatureRole(str, Enum):
    """What a signature protects; decides the cautious default x when ``trust_years`` is absent.

    The years per role are shipped data (``pqtriage/data/trust_defaults.yaml``).
    """

    ROOT_OF_TRUST = "root-of-trust"
    CERTIFICATE_AUTHORITY = "certificate-authority"
    FIRMWARE_SIGNING = "firmware-signing"
    CODE_SIGNING = "code-signing"
    DOCUMENT_SIGNING = "document-signing"
    LIVE_AUTHENTICATION = "live-authentication"
    SHORT_LIVED = "short-lived"


@dataclass(frozen=True, slots=True)
class Fact:
    """One fact an assessment rests on, and where it came from."""

    name: str
    """What the fact states: algorithm, key_size, curve, parameter_set, purpose, trust_years, role,
    signature_role, shelf_life_years, migration_years, or a source's own (signature_hash ...)."""
    value: str
    """The value as text, as it was read."""
    origin: str
    """One of FACT_ORIGINS: inventory, file, handshake, cbom or default."""
    source: SourceRef | None = None
    """Where exactly: inventory line, scanned file, host:port of the handshake, CBOM bom-ref."""

    def __post_init__(self) -> None:
        if self.origin not in FACT_ORIGINS:
            raise ValueError(f"fact origin {self.origin!r} is not one of {', '.join(FACT_ORIGINS)}")


@dataclass(frozen=True)
class DataClassification:
    """How the organisation classifies a system's data."""

    label: str
    """The organisation's own label (Confidential, Restricted ...)."""
    rank: int | None = None
    """Sensitivity on the organisation's scale, 0 (public) upwards; None when not ranked."""


@dataclass(frozen=True)
class Hosting:
    """Where a system runs."""

    model: HostingModel
    """On-premises, cloud or hybrid."""
    provider: str | None = None
    """Cloud or hosting provider."""
    country: str | None = None
    """ISO 3166-1 alpha-2 code of the country where it runs or keeps its data."""


ExtraValue = str | int | float | bool
"""A value of the organisation's own fields."""


@dataclass(frozen=True)
class CryptoUse:
    """One place where a system uses one algorithm for one purpose."""

    purpose: Purpose
    """What the algorithm protects here."""
    algorithm: str
    """The algorithm as written in the input (any catalog spelling)."""
    key_size: int | None = None
    """Key or modulus size in bits, when the algorithm name does not fix it."""
    curve: str | None = None
    """Elliptic curve name, when the algorithm name does not fix it."""
    parameter_set: str | None = None
    """Parameter set (for example ``768`` for ML-KEM), when not in the name."""
    trust_years: float | None = None
    """How long signatures or integrity tags must stay unforgeable (years)."""
    protocol: str | None = None
    """Protocol carrying the use (TLS 1.3, SSH, IPsec ...), informational."""
    protocol_version: str | None = None
    """Version of that protocol, when not in its name."""
    key_storage: KeyStorage | None = None
    """Where this use's key is kept (None: as the system says)."""
    crypto_library: str | None = None
    """Cryptographic library doing the operation (None: as the system says)."""
    crypto_module: str | None = None
    """Validated cryptographic module doing it (None: as the system says)."""
    fips_140_certificate: str | None = None
    """CMVP certificate number of that module (None: as the system says)."""
    fips_140_level: str | None = None
    """FIPS 140 edition and level, CycloneDX spelling (fips140-3-l2 ...)."""
    notes: str | None = None
    """Free text from the inventory owner."""
    source: SourceRef | None = None
    """Where this use was written or found."""
    assumed: tuple[str, ...] = ()
    """Names of fields whose values are documented defaults, not facts from the input."""
    role: str = IN_USE
    """``in-use`` (what runs) or ``offered`` (offered by a server, not what a current client
    negotiates: older or differently configured clients may still use it). The system's quantum
    verdict rests on in-use uses."""
    not_before: dt.date | None = None
    """Start of validity of the certificate this use rests on, when it comes from one."""
    not_after: dt.date | None = None
    """End of validity of the certificate this use rests on, when it comes from one."""
    signature_role: SignatureRole | None = None
    """What a signature protects (root of trust, CA, firmware ...): sets x when trust_years is absent."""
    evidence: tuple[Fact, ...] = ()
    """Facts a source recorded for this use, each with where it came from (certificate, handshake,
    CBOM ref); fields without one are facts of the input line (``use.source``)."""

    def __post_init__(self) -> None:
        if self.role not in USE_ROLES:
            raise ValueError(f"use role {self.role!r} is not one of {', '.join(USE_ROLES)}")
    oid: str | None = None
    """Object identifier the input gives for the algorithm (a CBOM's cryptoProperties.oid):
    the catalog resolves it first, and a name that contradicts it makes the use unassessed."""


@dataclass(frozen=True)
class System:
    """A system that uses cryptography and has to be migrated as a unit."""

    id: str
    """Unique identifier within the inventory."""
    name: str
    """Human-readable name."""
    shelf_life_years: float
    """Mosca's x: how long the system's data must stay confidential."""
    migration_years: float
    """Mosca's y: how long moving this system to post-quantum cryptography takes."""
    uses: tuple[CryptoUse, ...] = ()
    """Every cryptographic use of the system."""
    depends_on: tuple[str, ...] = ()
    """Ids of systems that must migrate first (a PKI, an HSM ...)."""
    owner: str | None = None
    """Accountable person or team."""
    description: str | None = None
    """Free text."""
    exposure: Exposure = Exposure.INTERNAL
    """Reachability of its traffic to an interceptor."""
    criticality: Criticality = Criticality.MEDIUM
    """Business criticality."""
    protocol: str | None = None
    """Main protocol of the system, informational."""
    notes: str | None = None
    """Free text."""
    policy_category: str | None = None
    """CNSA 2.0 system category (software-firmware-signing, web-cloud, networking ...)."""
    effort_person_weeks: float | None = None
    """Planning input: estimated effort of the migration."""
    vendor_readiness: str | None = None
    """Planning input: available, announced or unknown post-quantum support from vendors."""
    business_unit: str | None = None
    """Business unit or department the system belongs to."""
    tags: tuple[str, ...] = ()
    """The organisation's own labels."""
    impact: Impact | None = None
    """FIPS 199 impact level."""
    high_value_asset: bool | None = None
    """Whether it is a high-value asset (OMB M-19-03); None when not stated."""
    data_classification: DataClassification | None = None
    """Classification of its data."""
    hosting: Hosting | None = None
    """Where it runs."""
    vendor: str | None = None
    """Vendor of the product."""
    product: str | None = None
    """Product name."""
    version: str | None = None
    """Product version, as text."""
    protocol_version: str | None = None
    """Version of the main protocol."""
    crypto_library: str | None = None
    """Cryptographic library it uses."""
    crypto_module: str | None = None
    """Validated cryptographic module it uses."""
    fips_140_certificate: str | None = None
    """CMVP certificate number of that module."""
    fips_140_level: str | None = None
    """FIPS 140 edition and level, CycloneDX spelling (fips140-3-l2 ...)."""
    key_storage: KeyStorage | None = None
    """Where its keys are kept."""
    frameworks: tuple[str, ...] | None = None
    """Policy frameworks that apply to it; None: those of the inventory."""
    extra: tuple[tuple[str, ExtraValue], ...] = ()
    """The organisation's own fields, in input order."""
    source: SourceRef | None = None
    """Where this system was written or found."""
    assumed: tuple[str, ...] = ()
    """Names of fields whose values are documented defaults, not facts from the input."""


@dataclass(frozen=True)
class Inventory:
    """A whole inventory: the systems of one organisation."""

    organization: str
    """Organisation the inventory describes."""
    systems: tuple[System, ...]
    """All systems, in input order."""
    version: int = 1
    """Inventory format version."""
    source_path: str | None = None
    """Path of the file the inventory was read from."""
    source_sha256: str | None = None
    """SHA-256 of that file's bytes, for the compliance record."""
    policies: tuple[str, ...] = ()
    """Policy timeline identifiers the inventory names as applying to it."""
    frameworks: tuple[str, ...] = ()
    """Policy frameworks that apply to every system that does not name its own."""
    warnings: tuple[str, ...] = ()
    """One-line diagnostics that do not stop the run (for example a dependency outside the file)."""
    extra: dict[str, object] = field(default_factory=dict, compare=False, hash=False)
    """Source-specific metadata (for example CBOM serial number), passed through."""

    def frameworks_of(self, system: System) -> tuple[str, ...]:
        """The frameworks that apply to a system: its own list, else the inventory's."""
        return self.frameworks if system.frameworks is None else system.frameworks

    def system(self, system_id: str) -> System:
        """Return the system with this id (KeyError if absent)."""
        for item in self.systems:
            if item.id == system_id:
                return item
        raise KeyError(system_id)
