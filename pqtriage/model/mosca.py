"""Mosca's inequality per use: exposed when x + y > z.

Source: "Cybersecurity in an era with quantum computers: will we be ready?"
(IEEE Security & Privacy 16(5), 2018; IACR ePrint 2015/1075). x is how long the
protected data or signatures must stay secure, y the migration time, z the time
until a CRQC breaks the algorithm.
"""

from __future__ import annotations

import datetime as dt
import functools
import math

from pqtriage.catalog.spec import AlgorithmSpec, Resolution
from pqtriage.model.arrival_model import ArrivalModel
from pqtriage.model.inventory import CryptoUse, Purpose, System
from pqtriage.model.profile import ThreatProfile, date_of, decimal_year
from pqtriage.model.validity import remaining_years
from pqtriage.model.verdict import SEVERITY, UseAssessment, Verdict

_ATTACK_ORDER = {"shor": 2, "grover": 1, "none": 0}


def x_years(use: CryptoUse, system: System, as_of: dt.date | None = None) -> tuple[float, tuple[str, ...]]:
    """Mosca's x for a use, by purpose, with any assumption it made.

    Key establishment and encryption protect data that can be recorded now and
    decrypted later (harvest now, decrypt later): x is the data's shelf-life.
    Signatures and integrity tags must stay unforgeable for ``trust_years``, else
    for the remaining validity of the certificate they rest on (``not_after``);
    live authentication needs to hold only while the session runs (x = 0).
    """
    if use.purpose in (Purpose.KEY_ESTABLISHMENT, Purpose.ENCRYPTION):
        return system.shelf_life_years, ()
    if use.purpose in (Purpose.SIGNATURE, Purpose.INTEGRITY):
        if use.trust_years is not None:
            return float(use.trust_years), ()
        if use.not_after is not None and as_of is not None:
            return remaining_years(use.not_after, as_of), ()
        return 0.0, (
            f"{use.purpose.value} with no trust_years: x = 0 (signatures need only hold until migration ends)",
        )
    return 0.0, ()


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
) -> tuple[Verdict, float, float | None, dt.date | None, float | None, float | None, str]:
    """Evaluate one non-composite algorithm. Returns verdict, P, margin, start-by, z, shift, reason."""
    if spec.classical_status in ("broken", "weak"):
        note = f": {spec.notes}" if spec.notes else ""
        return (Verdict.CLASSICALLY_BROKEN, 1.0, None, as_of, None, None,
                f"{spec.name} is {spec.classical_status} against classical attacks today{note}")
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
    use: CryptoUse,
    system: System,
    spec: AlgorithmSpec | None,
    profile: ThreatProfile,
    arrival: ArrivalModel,
    as_of: dt.date,
) -> Verdict:
    """Only the verdict of a use (for sensitivity runs): the same rules as evaluate_use."""
    if spec is None:
        return Verdict.UNASSESSED
    x, _ = x_years(use, system, as_of)
    best: tuple | None = None
    for part, purpose, part_x in evaluation_parts(use, system, spec, x):
        result = _evaluate_spec(part, purpose, part_x, system.migration_years, profile, arrival, as_of)
        if best is None or _worse(result, best):
            best = result
    assert best is not None
    return best[0]  # type: ignore[no-any-return]


def evaluate_use(
    use: CryptoUse,
    system: System,
    resolution: Resolution,
    profile: ThreatProfile,
    arrival: ArrivalModel,
    as_of: dt.date,
) -> UseAssessment:
    """Evaluate one use of a system against the profile."""
    x, assumptions = x_years(use, system, as_of)
    y = system.migration_years
    assumed = tuple(f"{name} is an assumed default" for name in use.assumed)
    if resolution.spec is None:
        hint = f"; did you mean {', '.join(resolution.suggestions)}?" if resolution.suggestions else ""
        if use.notes:  # the source's own account of what is missing (a dangling CBOM reference ...)
            hint += f" ({use.notes})"
        return UseAssessment(
            use=use, spec=None, deciding=None, verdict=Verdict.UNASSESSED, x_years=x, y_years=y,
            exposure_probability=None, margin_years=None, start_by=None, crqc_year=None,
            shift_years=None, reason=f"{resolution.reason or 'not in the catalog'}{hint}",
            replacement=None, suggestions=resolution.suggestions, assumptions=assumptions + assumed,
        )
    spec = resolution.spec
    parts = evaluation_parts(use, system, spec, x)
    best: tuple | None = None
    deciding: AlgorithmSpec | None = None
    for part, purpose, part_x in parts:
        result = _evaluate_spec(part, purpose, part_x, y, profile, arrival, as_of)
        if best is None or _worse(result, best):
            best, deciding = result, part
    assert best is not None and deciding is not None
    verdict, probability, margin, start_by, z, shift, reason = best
    if deciding is not spec:
        reason = f"{spec.name}: {reason}"
    needs_replacement = verdict in (Verdict.CLASSICALLY_BROKEN, Verdict.EXPOSED, Verdict.WITHIN_MARGIN)
    replacement = None
    if needs_replacement:
        replacement = deciding.replacement_for(
            next(p for s, p, _ in parts if s is deciding)) or spec.replacement_for(use.purpose.value)
    return UseAssessment(
        use=use, spec=spec, deciding=deciding if deciding is not spec else None, verdict=verdict,
        x_years=parts[0][2] if len(parts) == 1 else x, y_years=y, exposure_probability=probability,
        margin_years=margin, start_by=start_by, crqc_year=z, shift_years=shift, reason=reason,
        replacement=replacement, suggestions=(), assumptions=assumptions + assumed,
    )
