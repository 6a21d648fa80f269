"""``pqtriage estimate`` as a plain computation: options in, estimates out.

It receives the catalog's lookups as arguments (``resolve`` and ``specs``), so it does
not import the catalog; it returns the estimates and what they were computed with, and
the CLI picks the view (pqtriage.formats) and prints it.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass, replace

from pqtriage.catalog.spec import AlgorithmSpec, Resolution
from pqtriage.errors import UsageError
from pqtriage.threat.estimate import Estimate, estimate
from pqtriage.threat.methods import MethodData, load_method_data
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.resource_arrival import (
    ArrivalDistribution,
    ResourceArrivalModel,
    SampleSource,
)

Resolver = Callable[[str], "AlgorithmSpec | Resolution | None"]


def _resolve(name: str, resolve: Resolver) -> AlgorithmSpec:
    found = resolve(name)
    if isinstance(found, Resolution):
        if found.spec is not None:
            return found.spec
        hint = f"did you mean {', '.join(found.suggestions)}?" if found.suggestions else None
        raise UsageError(
            f"cannot estimate {name!r}: {found.reason or 'unknown algorithm'}",
            hint=hint or "see the catalog for known names",
        )
    if found is None:
        raise UsageError(
            f"cannot estimate {name!r}: unknown algorithm", hint="see the catalog for known names"
        )
    return found


@dataclass(frozen=True)
class EstimateRun:
    """What ``pqtriage estimate`` computed."""

    estimates: tuple[Estimate, ...]
    """The named algorithm's estimate, or one per Shor- or Grover-attackable algorithm (--all)."""
    side_by_side: bool
    """True for --all: the estimates are shown side by side."""
    params: ThreatParameters
    """The hardware and search assumptions used (options over the profile's)."""
    model: ResourceArrivalModel
    """The arrival model that gave each estimate its shift and years."""
    data: MethodData
    """The constructions (methods.yaml) the estimates were computed from."""


def run_estimates(
    algorithm: str | None,
    all_: bool,
    method: str | None,
    error_rate: float | None,
    cycle_us: float | None,
    reaction_us: float | None,
    maxdepth: float | None,
    *,
    resolve: Resolver,
    specs: Callable[[], Iterable[AlgorithmSpec]] | Iterable[AlgorithmSpec],
    base: ThreatParameters | None = None,
    profile: ArrivalDistribution | None = None,
    as_of_year: float | None = None,
    design: SampleSource | None = None,
) -> EstimateRun:
    """Estimate one algorithm, or every catalog algorithm with a quantum attack (``all_``).

    Args:
        algorithm: name to resolve; ignored with ``all_``.
        all_: estimate every catalog algorithm with a quantum attack side by side.
        method: construction id (--method), or None for the defaults.
        error_rate, cycle_us, reaction_us: physical layer (--error-rate, --cycle-us,
            --reaction-us); None keeps the hardware file's (``base``).
        maxdepth: log2 of MAXDEPTH (--maxdepth); None keeps ``base``'s.
        resolve: catalog lookup, name -> AlgorithmSpec or Resolution (or None when unknown).
        specs: every catalog spec (a sequence or a callable returning one), for ``all_``.
        base: the hardware file's parameters; the options above override them.
        profile: threat profile for the years each algorithm falls (median and at its risk
            tolerance); None leaves the years out.
        as_of_year: decimal year of the assessment (--as-of), needed with ``profile``.
        design: the uncertainty band's samples, for the arrival bands.

    Raises:
        UsageError: unknown algorithm or method, or out-of-range options.
    """
    base = base or ThreatParameters()
    params = replace(
        base,
        physical_error_rate=base.physical_error_rate if error_rate is None else error_rate,
        cycle_us=base.cycle_us if cycle_us is None else cycle_us,
        reaction_us=base.reaction_us if reaction_us is None else reaction_us,
        maxdepth_log2=base.maxdepth_log2 if maxdepth is None else maxdepth,
    )
    data = load_method_data()
    overrides: dict[str, str] = {}
    if method is not None:
        chosen = data.method(method)
        if chosen is None:
            known = ", ".join(m.id for m in data.shor_methods)
            raise UsageError(
                f"--method {method!r} is not a known construction", hint=f"use {known}"
            )
        overrides = {family: chosen.id for family in chosen.families}
    model = ResourceArrivalModel(
        methods=overrides, params=params, data=data, profile=profile, as_of_year=as_of_year,
        design=design,
    )
    if all_:
        pool = specs() if callable(specs) else specs
        chosen_specs = [s for s in pool if s.quantum_attack in ("shor", "grover")]
        estimates = tuple(
            estimate(s, params, method, strict=False, arrival_model=model, data=data)
            for s in chosen_specs
        )
        return EstimateRun(estimates, True, params, model, data)
    if not algorithm:
        raise UsageError("name an algorithm or give --all", hint="for example: estimate RSA-2048")
    spec = _resolve(algorithm, resolve)
    result = estimate(spec, params, method, strict=True, arrival_model=model, data=data)
    return EstimateRun((result,), False, params, model, data)
