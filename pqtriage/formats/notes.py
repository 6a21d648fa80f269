"""Cautions, assumptions and sources that every output carries.

An estimate can mislead people into leaving data exposed, so every report
repeats these and names the assumptions it used.
"""

from __future__ import annotations

import math

from pqtriage.catalog.transitions import Standing
from pqtriage.model.inventory import Fact
from pqtriage.model.verdict import TriageResult

CAUTIONS: tuple[str, ...] = (
    "Estimates of when a cryptographically relevant quantum computer (CRQC) arrives are uncertain: "
    "experts disagree by decades, and a breakthrough in algorithms or hardware could move them. "
    "Treat every date here as a planning aid, not a forecast.",
    "Follow NIST (FIPS 203, 204, 205; SP 800-208; NIST IR 8547), your national cyber-security "
    "agency and your regulator. Where their guidance and this report differ, the guidance wins.",
    "This report is not a certification, an audit opinion or a compliance attestation. It ranks "
    "the inventory it was given: anything missing from the inventory is missing from the ranking.",
    "Unassessed items are not safe: pqtriage could not evaluate them. Check each one by hand.",
)

SOURCES: tuple[str, ...] = (
    "Mosca's inequality: \"Cybersecurity in an era with quantum computers: will we be ready?\", "
    "IEEE Security & Privacy 16(5), 2018; IACR ePrint 2015/1075.",
    "Classical security strengths: NIST SP 800-57 Part 1 Rev. 5 (2020), Table 2.",
    "Hash strengths: NIST SP 800-107 Rev. 1 (2012).",
    "Transitions: NIST SP 800-131A Rev. 2 (2019); DRAFT NIST SP 800-131A Rev. 3 initial public draft "
    "(October 2024) for its later dates; FIPS 186-5 (2023) for DSA; RFC 6151 (2011) for MD5.",
    "Post-quantum standards: FIPS 203 (ML-KEM), FIPS 204 (ML-DSA), FIPS 205 (SLH-DSA), 2024; "
    "NIST SP 800-208 (LMS, XMSS), 2020.",
    "Security categories and deprecation: NIST IR 8547 ipd (2024), Tables 1, 2, 4 and 7.",
    "Quantum resource estimates: arXiv:1905.09749 (its own table); arXiv:2505.15917 (the "
    "authors' logical-cost tables); arXiv:1611.07995; arXiv:1706.06752; arXiv:2306.08585 (per key, "
    "amortised over several keys); arXiv:2603.28846 (claimed, circuit withheld); arXiv:2606.02235 "
    "(published circuit); IACR ePrint 2026/280.",
    "Arrival of a CRQC: Quantum Threat Timeline Report 2025 (Global Risk Institute, March 2026) "
    "and Quantum Threat Timeline Report 2024 (Global Risk Institute, December 2024).",
    "Grover costs: NIST PQC Call for Proposals (2016) section 4.A.5; NIST Call for Additional "
    "Digital Signature Schemes (2022) section 4.B.3.",
)


def classical_text(standing: Standing) -> str:
    """'legacy since 2011-03-01 (RFC 6151)', with the next scheduled status when there is one."""
    text = standing.label()
    following = standing.next_label()
    return f"{text}; next: {following}" if following else text


def fact_text(fact: Fact) -> str:
    """'key_size 2048 (inventory, demo.yaml:25:9)'."""
    where = f", {fact.source}" if fact.source is not None else ""
    return f"{fact.name} {fact.value} ({fact.origin}{where})"


def fmt_year(year: float | None) -> str:
    """A decimal year as text: one decimal, or 'beyond horizon'."""
    if year is None:
        return "n/a"
    if math.isinf(year):
        return "beyond horizon"
    return f"{year:.1f}"


def assumptions(result: TriageResult) -> list[str]:
    """The assumptions this run used, in plain words."""
    profile = result.profile
    items = [result.selection.describe()] if result.selection else []
    items += [
        f"Today is taken as {result.as_of.isoformat()} (set with --as-of).",
        f"Threat profile '{profile.name}': {profile.description}",
        f"Profile source: {profile.source}",
    ]
    if profile.caveat:
        items.append(f"Caveat on the source: {profile.caveat}")
    if profile.deterministic:
        items.append(
            f"Deterministic what-if: a CRQC arrives on 1 January {profile.crqc_year}; "
            "the exposure probability is then 0 or 1."
        )
    else:
        items.append(
            f"Risk tolerance {profile.risk_tolerance:.0%}: z is the year by which the CRQC has "
            "arrived with that probability. No CRQC by today: the probability the survey placed "
            "before today is held at today (it may arrive at any moment), never spread over later "
            "years, and every algorithm reads the same distribution shifted by its own requirement."
        )
        items.append(
            "Between the survey's horizons the cumulative probability is interpolated linearly; "
            "beyond the last horizon it keeps growing at the rate of the last interval until it "
            "reaches 1 (a cautious tail), so no later date makes a quantum-vulnerable use safe."
        )
    items.append(f"Per-algorithm arrival: {result.arrival_model}.")
    if result.band is not None:
        items.append(f"Uncertainty: {result.band.describe()}")
    items.append(
        "Mosca's x by purpose: data shelf-life for key establishment and encryption "
        "(harvest now, decrypt later); trust_years for signatures and integrity, or when not given the "
        "cautious default of the signature's role (signature_role; see docs/method.md), stated with each use "
        "that takes it; 0 for live authentication. y is the system's migration time."
    )
    items.append(
        "A system's verdict is that of its weakest use in use; an offered use that is classically broken makes "
        "it classically-broken (old clients will negotiate it); weaker offered uses are downgrade flags."
    )
    items.append(
        "Classical status on the as-of date from NIST SP 800-131A Rev. 2 (2019), and the DRAFT Rev. 3 "
        "(October 2024) for its later dates: disallowed or broken means classically-broken; legacy and "
        "deprecated are flags. A use whose name and attributes disagree is unassessed."
    )
    assumed = sorted({f for item in result.items for f in item.system.assumed})
    if assumed:
        items.append(
            "Some values are assumed defaults rather than facts from the inventory "
            f"({', '.join(assumed)}); they are flagged per system."
        )
    return items
