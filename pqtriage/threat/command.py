"""The ``pqtriage estimate`` command as a plain function; the CLI wires it into typer.

It receives the catalog's lookups as arguments (``resolve`` and ``specs``), so it does
not import the catalog, and it returns what to show; the CLI prints it.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Iterable
from dataclasses import replace

from rich.console import RenderableType

from pqtriage.catalog.spec import AlgorithmSpec, Resolution
from pqtriage.errors import EXIT_OK, UsageError
from pqtriage.threat.resource_arrival import ArrivalDistribution, ResourceArrivalModel
from pqtriage.threat.estimate import Estimate, estimate
from pqtriage.threat.methods import MethodData, load_method_data
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.table import TARGETS, TableContext, side_by_side
from pqtriage.threat.view import compact_qubits, to_json_dict, working_view

OUTPUT_FORMATS: tuple[str, ...] = ("text", "json")
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


def estimate_command(
    algorithm: str | None,
    all_: bool,
    method: str | None,
    error_rate: float,
    cycle_us: float,
    reaction_us: float,
    maxdepth: float,
    output_format: str,
    *,
    resolve: Resolver,
    specs: Callable[[], Iterable[AlgorithmSpec]] | Iterable[AlgorithmSpec],
    base: ThreatParameters | None = None,
    profile: ArrivalDistribution | None = None,
    as_of_year: float | None = None,
    as_of_label: str | None = None,
) -> tuple[RenderableType | str, int]:
    """Estimate one algorithm (working view) or all (side-by-side table), or JSON of either.

    Args:
        algorithm: name to resolve; ignored with ``all_``.
        all_: estimate every catalog algorithm with a quantum attack side by side.
        method: construction id (--method), or None for the defaults.
        error_rate, cycle_us, reaction_us: physical layer (--error-rate, --cycle-us, --reaction-us).
        maxdepth: log2 of MAXDEPTH (--maxdepth).
        output_format: text or json.
        resolve: catalog lookup, name -> AlgorithmSpec or Resolution (or None when unknown).
        specs: every catalog spec (a sequence or a callable returning one), for ``all_``.
        base: further parameters (from the profile); the options above override them.
        profile: threat profile for the years each algorithm falls (median and at its risk
            tolerance); None leaves the years out.
        as_of_year: decimal year of the assessment (--as-of), needed with ``profile``.
        as_of_label: the same date as YYYY-MM-DD, for the legend.

    Returns:
        The renderable (text) or JSON string, and the exit code.

    Raises:
        UsageError: unknown algorithm, method or format, or out-of-range options.
    """
    if output_format not in OUTPUT_FORMATS:
        raise UsageError(f"--format {output_format!r} is not supported", hint="use text or json")
    params = replace(
        base or ThreatParameters(),
        physical_error_rate=error_rate,
        cycle_us=cycle_us,
        reaction_us=reaction_us,
        maxdepth_log2=maxdepth,
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
        methods=overrides, params=params, data=data, profile=profile, as_of_year=as_of_year
    )
    if all_:
        pool = specs() if callable(specs) else specs
        chosen_specs = [s for s in pool if s.quantum_attack in ("shor", "grover")]
        estimates = [
            estimate(s, params, method, strict=False, arrival_model=model, data=data)
            for s in chosen_specs
        ]
        if output_format == "json":
            return json.dumps([to_json_dict(e) for e in estimates], indent=2), EXIT_OK
        context = _context(estimates, params, model, data, profile, as_of_label)
        return side_by_side(estimates, context), EXIT_OK
    if not algorithm:
        raise UsageError("name an algorithm or give --all", hint="for example: estimate RSA-2048")
    spec = _resolve(algorithm, resolve)
    result = estimate(spec, params, method, strict=True, arrival_model=model, data=data)
    if output_format == "json":
        return json.dumps(to_json_dict(result), indent=2), EXIT_OK
    return working_view(result), EXIT_OK


def _context(
    estimates: list[Estimate],
    params: ThreatParameters,
    model: ResourceArrivalModel,
    data: MethodData,
    profile: ArrivalDistribution | None,
    as_of_label: str | None,
) -> TableContext:
    """The legend's facts: methods in use, assumptions, profile, and method caveats."""
    targets = dict(
        zip(
            ("factoring", "finite-field-dlog", "elliptic-curve-dlog", "key-search", "preimage"),
            TARGETS,
            strict=True,
        )
    )
    seen: dict[tuple[str, str], bool] = {}
    for e in estimates:
        if e.method is not None and e.problem in targets:
            seen.setdefault((targets[e.problem], e.method), e.method_is_default)
    methods = tuple((target, method, default) for (target, method), default in seen.items())
    notes: list[str] = []
    decided: dict[str, list[str]] = {}
    grover = False
    for e in estimates:
        comparison = e.arrival.comparison if e.arrival is not None else None
        grover = grover or (e.attack == "grover" and e.problem in targets)
        if comparison is None or e.problem not in targets:
            continue
        pair = f"{comparison.method} vs {comparison.reference_method}"
        pair += " (own layouts)" if comparison.own_layouts else " (generic)"
        pairs = decided.setdefault(targets[e.problem], [])
        if pair not in pairs:
            pairs.append(pair)
    if decided or grover:
        listed = "; ".join(
            f"{target} {', '.join(decided[target])}" for target in TARGETS if target in decided
        )
        if grover:
            listed += ("; " if listed else "") + f"key search vs {model.reference_method} (generic)"
        notes.append(
            "Shifts compare like with like: both sides on one layer, their own layouts only if "
            f"both have one, else the generic surface-code layer (RSA-2048 under "
            f"{model.reference_method}: {compact_qubits(model.reference_generic_physical_qubits)}"
            f"); the earliest credible pair decides{' unless named by --method' if model.methods else ''}. "
            f"Pairs used: {listed} (docs/threat-model.md section 4)."
        )
    return TableContext(
        params=params,
        methods=methods,
        reference_physical_qubits=model.reference_physical_qubits,
        profile=None if profile is None else profile.name,
        risk_tolerance=None if profile is None else profile.risk_tolerance,
        as_of=as_of_label,
        notes=tuple(notes),
    )
