"""One assessment per use: classical status by date, conflicts, the facts, Mosca's inequality.

Mosca: "Cybersecurity in an era with quantum computers: will we be ready?" (IEEE Security &
Privacy 16(5), 2018; IACR ePrint 2015/1075): exposed when x + y > z. x is how long the protected
data or signatures must stay secure, y the migration time, z the time until a CRQC breaks the
algorithm. A use whose classical status on the as-of date is disallowed or broken is
classically-broken whatever z is; legacy and deprecated become flags; conflicting facts leave the
use unassessed (the catalog reports them). Every use carries the facts it rests on.
"""

from __future__ import annotations

import datetime as dt
import functools
import math
from typing import Protocol

from pqtriage.catalog.spec import AlgorithmSpec, Resolution
from pqtriage.catalog.transitions import Standing
from pqtriage.catalog.trust import TrustDefault
from pqtriage.model.arrival_model import ArrivalModel
from pqtriage.model.inventory import CryptoUse, Fact, Purpose, System
from pqtriage.model.profile import ThreatProfile, date_of, decimal_year
from pqtriage.model.validity import remaining_years
from pqtriage.model.verdict import SEVERITY, Flag, UseAssessment, Verdict

_ATTACK_ORDER = {"shor": 2, "grover": 1, "none": 0}
FIRMWARE_CATEGORY = "software-firmware-signing"
"""The CNSA 2.0 policy category whose signatures default to the firmware-signing trust period."""


class Knowledge(Protocol):
    """What an assessment needs of the catalog besides names: status by date, trust defaults."""

    def classical_standing(self, spec: AlgorithmSpec, purpose: str, as_of: dt.date) -> Standing:
        """Classical status of an algorithm for a purpose on a date."""
        ...

    def trust_default(self, role: str | None) -> TrustDefault:
        """Default trust period of a signature role (None: not known)."""
        ...


def signature_role(use: CryptoUse, system: System) -> str | None:
    """The role a signature use plays: its own signature_role, else firmware signing for a system
    in the CNSA 2.0 software-firmware-signing category, else None (not known)."""
    if use.signature_role is not None:
        return use.signature_role.value
    if system.policy_category == FIRMWARE_CATEGORY:
        return "firmware-signing"
    return None


def x_years(
    use: CryptoUse, system: System, knowledge: Knowledge, as_of: dt.date | None = None
) -> tuple[float, tuple[str, ...], Fact | None]:
    """Mosca's x for a use, by purpose, with any assumption it made and the default's fact.

    Key establishment and encryption protect data that can be recorded now and decrypted later
    (harvest now, decrypt later): x is the data's shelf-life. Signatures and integrity tags must
    stay unforgeable for ``trust_years``; when absent, for the remaining validity of the
    certificate they rest on (``not_after``), else for the cautious default of the signature's role
    (trust_defaults.yaml), stated. Live authentication holds only while the session runs (x = 0).
    """
    if use.purpose in (Purpose.KEY_ESTABLISHMENT, Purpose.ENCRYPTION):
        return system.shelf_life_years, (), None
    if use.purpose in (Purpose.SIGNATURE, Purpose.INTEGRITY):
        if use.trust_years is not None:
            return float(use.trust_years), (), None
        if use.not_after is not None and as_of is not None:
            years = remaining_years(use.not_after, as_of)
            text = (f"{use.purpose.value} with no trust_years: x = {years:g} years, the remaining validity of the "
                    f"certificate it rests on (until {use.not_after.isoformat()})")
            return years, (text,), None
        role = signature_role(use, system)
        default = knowledge.trust_default(role)
        whose = f"a {role} signature" if role else "a signature whose role is not given"
        via = " (from the system's policy_category)" if role and use.signature_role is None else ""
        text = (f"{use.purpose.value} with no trust_years: x = {default.years:g} years, the cautious default "
                f"for {whose}{via}: {default.why} ({default.source}); set trust_years or signature_role to change it")
        return default.years, (text,), Fact("trust_years", f"{default.years:g}", "default")
    return 0.0, (), None


_USE_FIELDS = ("algorithm", "purpose", "key_size", "curve", "parameter_set", "trust_years", "signature_role", "role",
               "not_before", "not_after")


def _text(value: object) -> str:
    if isinstance(value, float):
        return f"{value:g}"
    if isinstance(value, dt.date):
        return value.isoformat()
    return str(getattr(value, "value", value))


def facts_of(use: CryptoUse, system: System, x_fact: Fact | None, shelf_life: bool) -> tuple[Fact, ...]:
    """The facts an assessment rests on: what the source recorded, then each field of the use
    and the system's x and y, with where it came from (the input line, or a default)."""
    recorded = {fact.name: fact for fact in use.evidence}
    facts: list[Fact] = []
    for name in _USE_FIELDS:
        value = getattr(use, name)
        if name in recorded:
            facts.append(recorded[name])
        elif value is not None:
            default = name in use.assumed or (name == "role" and value == "in-use")
            facts.append(Fact(name, _text(value), "default" if default else "inventory",
                              None if default and name == "role" else use.source))
    facts += [fact for fact in use.evidence if fact.name not in _USE_FIELDS]
    if x_fact is not None and "trust_years" not in recorded:
        facts.append(x_fact)
    pairs = [("migration_years", system.migration_years)]
    if shelf_life:
        pairs.insert(0, ("shelf_life_years", system.shelf_life_years))
    for name, years in pairs:
        origin = "default" if name in system.assumed else "inventory"
        facts.append(Fact(name, f"{years:g}", origin, system.source))
    return tuple(facts)


def _broken_reason(spec: AlgorithmSpec, purpose: str, standing: Standing) -> str:
    when = f" {standing.when()}" if standing.when() else ""
    reason = f"{spec.name} is {standing.status} for {purpose}{when} ({standing.short}): {standing.note}"
    if standing.flag == "row" and spec.notes:
        reason += f"; {spec.notes}"
    return reason


# Memoised per run: many uses share algorithm, purpose, x and y (arguments are immutable or
# compared by identity, so a cached result is exactly what a fresh call would return).
@functools.lru_cache(maxsize=65536)
def _evaluate_spec(
    spec: AlgorithmSpec,
    purpose: str,
    x: float,
    y: float,
    profile: ThreatProfile,
    arrival: ArrivalModel,
    as_of: dt.date,
    blocked: Standing | None = None,
) -> tuple[Verdict, float, float | None, dt.date | None, float | None, float | None, str]:
    """Evaluate one non-composite algorithm. Returns verdict, P, margin, start-by, z, shift, reason.

    ``blocked`` is the classical standing when it is disallowed or broken: the use is
    classically-broken whatever a quantum computer does.
    """
    if blocked is not None:
        return (Verdict.CLASSICALLY_BROKEN, 1.0, None, as_of, None, None, _broken_reason(spec, purpose, blocked))
    if spec.quantum_attack == "none":
        category = f" (NIST category {spec.nist_category})" if spec.nist_category else ""
        return (Verdict.QUANTUM_RESISTANT, 0.0, None, None, math.inf, math.inf,
                f"{spec.name}{category}: no known quantum attack")
    shift = arrival.shift_years(spec)
    now = decimal_year(as_of)
    if math.isinf(shift):
        attack = "Grover's search gives only a square-root speedup" if spec.quantum_attack == "grover" else "no practical quantum attack"
        return (Verdict.QUANTUM_RESISTANT, 0.0, None, None, math.inf, math.inf,
                f"{spec.name}: {attack}; falls beyond the planning horizon")
    horizon = now + x + y
    probability = profile.arrival_probability(horizon, now, shift)
    z = profile.quantile(profile.risk_tolerance, now, shift)
    if math.isinf(z):
        margin = None
        start_by = None
    else:
        margin = z - horizon
        start_by = date_of(z - x - y)
    exposed = probability > profile.risk_tolerance
    verdict = Verdict.EXPOSED if exposed else Verdict.WITHIN_MARGIN
    attack = "Shor" if spec.quantum_attack == "shor" else "Grover"
    if math.isinf(z):
        when = "beyond the profile's horizon"
    else:
        when = f"{z:.1f}"
    if exposed:
        reason = (f"{spec.name} ({attack}-attackable) for {purpose}: x + y = {x:g} + {y:g} years "
                  f"reaches past z = {when} at P = {probability:.0%}")
    else:
        reason = (f"{spec.name} ({attack}-attackable) for {purpose}: migration of {y:g} years plus x = {x:g} "
                  f"ends before z = {when} (P = {probability:.0%})")
    return verdict, probability, margin, start_by, z, shift, reason


def _worse(a: tuple, b: tuple) -> bool:
    """Whether evaluation a is more urgent than b: severity, then P, then smaller margin."""
    margin_a = a[2] if a[2] is not None else math.inf
    margin_b = b[2] if b[2] is not None else math.inf
    return (SEVERITY[a[0]], a[1], -margin_a) > (SEVERITY[b[0]], b[1], -margin_b)


def evaluation_parts(
    use: CryptoUse, system: System, spec: AlgorithmSpec, x: float
) -> list[tuple[AlgorithmSpec, str, float]]:
    """What is evaluated for a use: the algorithm itself, or each part of a cipher suite
    with the x of its own purpose (key exchange and cipher: shelf-life; authentication: 0)."""
    if spec.primitive == "cipher-suite" and spec.components:
        parts = []
        for component in spec.components:
            if component.purpose in ("key-establishment", "encryption"):
                part_x = system.shelf_life_years
            elif component.purpose in ("signature", "integrity") and use.trust_years is not None:
                part_x = float(use.trust_years)
            else:
                part_x = 0.0
            parts.append((component.spec, component.purpose, part_x))
        return parts
    return [(spec, use.purpose.value, x)]


def use_verdict(
    assessed: UseAssessment,
    system: System,
    profile: ThreatProfile,
    arrival: ArrivalModel,
    as_of: dt.date,
) -> Verdict:
    """Only the verdict of an assessed use under another arrival (for sensitivity runs).

    Classical breakage and unassessed uses do not depend on when a CRQC arrives; the rest is
    re-evaluated with the same rules as evaluate_use.
    """
    if assessed.spec is None or assessed.verdict in (Verdict.CLASSICALLY_BROKEN, Verdict.UNASSESSED):
        return assessed.verdict
    best: tuple | None = None
    for part, purpose, part_x in evaluation_parts(assessed.use, system, assessed.spec, assessed.x_years):
        result = _evaluate_spec(part, purpose, part_x, system.migration_years, profile, arrival, as_of)
        if best is None or _worse(result, best):
            best = result
    assert best is not None
    return best[0]  # type: ignore[no-any-return]


def _flags(standings: list[Standing]) -> tuple[Flag, ...]:
    """A legacy or deprecated flag per cautioned standing, once each."""
    flags: dict[str, Flag] = {}
    for standing in standings:
        if standing.cautioned and standing.algorithm not in flags:
            flags[standing.algorithm] = Flag(
                kind=standing.status, algorithm=standing.algorithm,
                text=f"{standing.label()}: {standing.algorithm}", date=standing.since or standing.until,
                draft=standing.draft,
            )
    return tuple(flags.values())


def _worst_standing(standings: list[Standing]) -> Standing:
    from pqtriage.catalog.transitions import STANDINGS

    chosen = standings[0]
    for standing in standings[1:]:
        if STANDINGS.index(standing.status) > STANDINGS.index(chosen.status):
            chosen = standing
    return chosen


def evaluate_use(
    use: CryptoUse,
    system: System,
    resolution: Resolution,
    profile: ThreatProfile,
    arrival: ArrivalModel,
    as_of: dt.date,
    knowledge: Knowledge,
) -> UseAssessment:
    """Evaluate one use of a system: classical status by date, conflicts, Mosca, the facts."""
    x, assumptions, x_fact = x_years(use, system, knowledge, as_of)
    y = system.migration_years
    assumed = tuple(f"{name} is an assumed default" for name in use.assumed)
    confidential = use.purpose in (Purpose.KEY_ESTABLISHMENT, Purpose.ENCRYPTION)
    if resolution.spec is None:
        facts = facts_of(use, system, x_fact, confidential)
        hint = f"; did you mean {', '.join(resolution.suggestions)}?" if resolution.suggestions else ""
        if use.notes:  # the source's own account of what is missing (a dangling CBOM reference ...)
            hint += f" ({use.notes})"
        return UseAssessment(
            use=use, spec=None, deciding=None, verdict=Verdict.UNASSESSED, x_years=x, y_years=y,
            exposure_probability=None, margin_years=None, start_by=None, crqc_year=None,
            shift_years=None, reason=f"{resolution.reason or 'not in the catalog'}{hint}",
            replacement=None, suggestions=resolution.suggestions, assumptions=assumptions + assumed,
            conflicts=resolution.conflicts, facts=facts,
        )
    spec = resolution.spec
    parts = evaluation_parts(use, system, spec, x)
    facts = facts_of(use, system, x_fact, confidential or any(
        purpose in ("key-establishment", "encryption") for _, purpose, _ in parts))
    standings = [knowledge.classical_standing(part, purpose, as_of) for part, purpose, _ in parts]
    entries = [(part, purpose, part_x, standing) for (part, purpose, part_x), standing in zip(parts, standings, strict=True)]
    if spec.components and spec.primitive == "cipher-suite":
        whole = knowledge.classical_standing(spec, use.purpose.value, as_of)
        if whole.not_acceptable:  # an anonymous key exchange breaks the suite, whatever its parts
            entries.append((spec, use.purpose.value, x, whole))
            standings.append(whole)
    best: tuple | None = None
    deciding: AlgorithmSpec | None = None
    deciding_standing: Standing | None = None
    for part, purpose, part_x, standing in entries:
        blocked = standing if standing.not_acceptable else None
        result = _evaluate_spec(part, purpose, part_x, y, profile, arrival, as_of, blocked)
        if best is None or _worse(result, best):
            best, deciding, deciding_standing = result, part, standing
    assert best is not None and deciding is not None and deciding_standing is not None
    verdict, probability, margin, start_by, z, shift, reason = best
    if deciding is not spec:
        reason = f"{spec.name}: {reason}"
    classical = deciding_standing if verdict is Verdict.CLASSICALLY_BROKEN else _worst_standing(standings)
    flags = _flags(standings)
    needs_replacement = verdict in (Verdict.CLASSICALLY_BROKEN, Verdict.EXPOSED, Verdict.WITHIN_MARGIN) or bool(flags)
    replacement = None
    if needs_replacement:
        purpose_of_part = next((p for s, p, _, _ in entries if s is deciding), use.purpose.value)
        replacement = deciding.replacement_for(purpose_of_part) or spec.replacement_for(use.purpose.value)
        if replacement is None and flags:
            flagged = next((s for s, _, _, st in entries if st.cautioned), spec)
            replacement = flagged.replacement_for(use.purpose.value) or flagged.replacement_for("default")
    return UseAssessment(
        use=use, spec=spec, deciding=deciding if deciding is not spec else None, verdict=verdict,
        x_years=parts[0][2] if len(parts) == 1 else x, y_years=y, exposure_probability=probability,
        margin_years=margin, start_by=start_by, crqc_year=z, shift_years=shift, reason=reason,
        replacement=replacement, suggestions=(), assumptions=assumptions + assumed,
        classical=classical, facts=facts, flags=flags,
    )
