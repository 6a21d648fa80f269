"""The shipped attack-cost data (``pqtriage/data/methods.yaml``), loaded once and validated.

Rows become frozen dataclasses; a malformed row is a packaging bug and raises
:class:`~pqtriage.errors.CatalogError` naming the row and the field.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import lru_cache
from importlib import resources
from typing import Any

import yaml

from pqtriage.errors import CatalogError, Place
from pqtriage.threat.tables import VARIANTS, LogicalRow, PhysicalRow

try:  # The C loader when present; never an unsafe loader.
    from yaml import CSafeLoader as _Loader
except ImportError:  # pragma: no cover - depends on the PyYAML build
    from yaml import SafeLoader as _Loader  # type: ignore[assignment]

DATA_FILE = "methods.yaml"
FAMILIES: tuple[str, ...] = ("factoring", "finite-field-dlog", "elliptic-curve-dlog")
CHECKS: dict[str, str] = {
    "published-circuit": "published circuit",
    "withheld-circuit": "claimed, circuit withheld",
    "not-checked": "not checked here (secondary reports only)",
}
"""How a construction was checked by its authors, as the outputs say it."""


@dataclass(frozen=True)
class Quantity:
    """A resource as a function of the problem size n (one of three published shapes)."""

    terms: tuple[tuple[float, float, float], ...] = ()
    """Sum of coefficient * n^a * (log2 n)^b, as (coefficient, a, b)."""
    ceil_lg: bool = False
    """Round log2 n up before use (for '2 ceil(log2 n)' terms)."""
    anchor_bits: int | None = None
    """Problem size of a published headline figure that is scaled to other sizes."""
    anchor_value: float | None = None
    """The headline figure at ``anchor_bits``."""
    n_power: float = 0.0
    """Scaling exponent of n for an anchored figure."""
    lg_power: float = 0.0
    """Scaling exponent of log2 n for an anchored figure."""
    per_toffoli: float | None = None
    """Depth as this fraction of the Toffoli count (serial circuits)."""

    def at(self, n: int, toffoli: float | None = None) -> float:
        """Evaluate the quantity at problem size ``n`` (``toffoli`` for per-Toffoli depths)."""
        if self.per_toffoli is not None:
            if toffoli is None:
                raise ValueError("a per-Toffoli quantity needs the Toffoli count")
            return self.per_toffoli * toffoli
        lg = math.ceil(math.log2(n)) if self.ceil_lg else math.log2(n)
        if self.anchor_bits is not None and self.anchor_value is not None:
            lg_anchor = math.log2(self.anchor_bits)
            return (
                self.anchor_value
                * (n / self.anchor_bits) ** self.n_power
                * (lg / lg_anchor) ** self.lg_power
            )
        return sum(c * n**a * lg**b for c, a, b in self.terms)


@dataclass(frozen=True)
class LayoutParameter:
    """One method-level layout value with its provenance."""

    name: str
    """Key in methods.yaml (idle_storage_fraction ...)."""
    value: float
    """The value used."""
    verified: str
    """V, V2, M or A (A includes calibrations to a published headline)."""
    source: str
    """Where the value comes from, or why it was chosen."""


@dataclass(frozen=True)
class PhysicalLayout:
    """How a construction lays out its logical qubits, when it departs from the generic layer.

    Idle logical qubits sit in dense storage (yoked surface codes); magic states come from
    small cultivation sites instead of 72-tile CCZ factories; Toffoli gates run one after
    another at a rate set by lattice surgery.
    """

    idle_storage_fraction: float
    """Fraction of the logical qubits held in dense idle storage at any time."""
    storage_tiles_per_logical: float
    """Physical footprint of one stored logical qubit, in tiles of the compute distance."""
    magic_state_site_tiles: float
    """Footprint of one magic-state site (cultivation and its output stage), in tiles."""
    magic_state_site_cycles_per_toffoli: float
    """Code cycles one site needs for the magic states of one Toffoli gate."""
    distance_cycles_per_toffoli: float
    """Serial rate: each Toffoli takes this many times d code cycles (at least one reaction)."""
    parameters: tuple[LayoutParameter, ...]
    """Every value above with its source and flag, in file order."""


LAYOUT_KEYS: tuple[str, ...] = (
    "idle_storage_fraction",
    "storage_tiles_per_logical",
    "magic_state_site_tiles",
    "magic_state_site_cycles_per_toffoli",
    "distance_cycles_per_toffoli",
)


@dataclass(frozen=True)
class ShorMethod:
    """One published Shor-type construction, identified by its arXiv number."""

    id: str
    """arXiv identifier, for example ``1905.09749``; the value of ``--method``."""
    title: str
    """Title of the paper."""
    year: int
    """Year of the construction."""
    source: str
    """Venue and identifier."""
    families: tuple[str, ...]
    """Problems it solves: factoring, finite-field-dlog, elliptic-curve-dlog."""
    default_for: tuple[str, ...]
    """Families for which it is the default (most recent credible construction)."""
    credible: bool
    """False for claims not accepted as defaults (what-ifs)."""
    verified: str
    """V, V2, M or A: how well the figures are checked."""
    logical_qubits: Quantity
    """Logical qubits as a function of n."""
    toffoli_count: Quantity
    """Toffoli (+T/2) count as a function of n."""
    measurement_depth: Quantity
    """Reaction-limited layers as a function of n."""
    notes: str
    """What the construction does and what is assumed in modelling it."""
    ff_factoring_exponent_per_bit: float | None = None
    """Exponent qubits per modulus bit when factoring (Ekera-Hastad: 1.5)."""
    ff_dlog_exponent_per_bit: float | None = None
    """Exponent qubits per bit of a short discrete logarithm (Ekera-Hastad: 3)."""
    ff_exponent_bits_per_strength_bit: float | None = None
    """Short-exponent bits per bit of security strength (2)."""
    layout: PhysicalLayout | None = None
    """Method-level physical layout; None uses the generic surface-code layer."""
    reference_counterpart: str = ""
    """Factoring construction whose RSA-2048 cost this method's arrival is compared with
    (itself for a factoring method)."""
    arrival_exclusion: str = ""
    """Why the method is left out of arrival computations altogether ('' = included)."""
    check: str = "published-circuit"
    """How its authors' figures can be checked: a key of CHECKS."""
    check_note: str = ""
    """What was seen of the check (one line)."""
    in_band: bool = False
    """Whether the uncertainty band samples this construction for its families."""
    logical_table: dict[str, tuple[LogicalRow, ...]] | None = None
    """The paper's per-size logical costs per problem variant (arXiv:2505.15917)."""
    logical_table_source: str = ""
    """Where the logical table comes from (title, repository, commit)."""
    physical_table: dict[str, tuple[PhysicalRow, ...]] | None = None
    """The paper's per-size physical qubits and hours per problem variant (arXiv:1905.09749)."""
    physical_table_source: str = ""
    """Where the physical table comes from."""
    per_key_amortised_toffoli: float | None = None
    """A published per-key Toffoli count that holds only amortised over several keys."""
    amortisation_factor: float | None = None
    """How much more one key alone costs than the amortised per-key figure (at most)."""

    @property
    def check_label(self) -> str:
        """How the construction was checked, in words."""
        return CHECKS.get(self.check, self.check)


@dataclass(frozen=True)
class SurfaceCodeConstants:
    """Constants of the surface-code physical layer, with their sources."""

    source: str
    """Documents the constants come from."""
    logical_error_prefactor: float
    """A in p_L = A (p/p_th)^((d+1)/2) per tile per cycle."""
    qubits_per_tile_coefficient: float
    """c in c (d + o)^2 physical qubits per distance-d tile."""
    qubits_per_tile_offset: float
    """o in c (d + o)^2."""
    routing_tiles_per_logical: float
    """Tiles per logical qubit in the routed block (data included)."""
    routing_tiles_fixed: float
    """Fixed tiles of the routed block."""
    factory_tiles: float
    """Footprint of one CCZ factory in tiles."""
    factory_cycles_per_distance: float
    """Code cycles per CCZ state, per unit of distance."""
    max_distance: int
    """Largest distance tried before giving up."""


@dataclass(frozen=True)
class GroverFigures:
    """NIST's published AES key-search gate figures of one year."""

    year: int
    """2016 (PQC call) or 2022 (call for additional signatures)."""
    source: str
    """Document and section."""
    quantum_gates_times_depth_log2: dict[int, float]
    """log2(gates x MAXDEPTH) per AES key size."""
    classical_gates_log2: dict[int, float]
    """log2 classical gates per AES key size."""


@dataclass(frozen=True)
class AesOracle:
    """Depth and width of an AES Grover search (the model's reference oracle)."""

    key_bits: int
    """AES key size."""
    serial_depth_log2: float
    """log2 of the depth of the whole unparallelised search."""
    oracle_qubits: int
    """Logical qubits of one search machine."""
    source: str
    """Where the figures come from."""


@dataclass(frozen=True)
class MethodData:
    """Everything in methods.yaml."""

    shor_methods: tuple[ShorMethod, ...]
    """The constructions, in file order."""
    surface_code: SurfaceCodeConstants
    """The physical layer's constants."""
    grover_figures: tuple[GroverFigures, ...]
    """NIST figures per year."""
    aes_oracles: tuple[AesOracle, ...]
    """Oracle data per AES key size."""

    def method(self, method_id: str) -> ShorMethod | None:
        """Return the construction with this arXiv id, or None."""
        return next((m for m in self.shor_methods if m.id == method_id), None)

    def default_method(self, family: str) -> ShorMethod:
        """Return the default construction for a problem family."""
        return next(m for m in self.shor_methods if family in m.default_for)

    def figures(self, year: int) -> GroverFigures | None:
        """Return NIST's figures of that year, or None."""
        return next((f for f in self.grover_figures if f.year == year), None)


def _fail(where: str, message: str) -> CatalogError:
    return CatalogError(
        f"{where}: {message}",
        place=Place(f"pqtriage/data/{DATA_FILE}"),
        hint="fix the shipped data file; this is a packaging bug",
    )


def _quantity(row: dict[str, Any], key: str, where: str) -> Quantity:
    raw = row.get(key)
    if not isinstance(raw, dict):
        raise _fail(where, f"'{key}' must be a mapping with terms, anchor or per_toffoli")
    try:
        if "terms" in raw:
            terms = tuple((float(c), float(a), float(b)) for c, a, b in raw["terms"])
            return Quantity(terms=terms, ceil_lg=bool(raw.get("ceil_lg", False)))
        if "anchor" in raw:
            a = raw["anchor"]
            return Quantity(
                anchor_bits=int(a["bits"]),
                anchor_value=float(a["value"]),
                n_power=float(a["n_power"]),
                lg_power=float(a["lg_power"]),
            )
        if "per_toffoli" in raw:
            return Quantity(per_toffoli=float(raw["per_toffoli"]))
    except (KeyError, TypeError, ValueError) as exc:
        raise _fail(where, f"'{key}' is malformed ({exc})") from exc
    raise _fail(where, f"'{key}' needs terms, anchor or per_toffoli")


def _layout(raw: Any, where: str) -> PhysicalLayout | None:
    if raw is None:
        return None
    if not isinstance(raw, dict) or set(raw) != set(LAYOUT_KEYS):
        raise _fail(where, f"'physical_layout' needs exactly {', '.join(LAYOUT_KEYS)}")
    parameters = []
    for key in LAYOUT_KEYS:
        entry = raw[key]
        try:
            value = float(entry["value"])
            verified, source = str(entry["verified"]), " ".join(str(entry["source"]).split())
        except (KeyError, TypeError, ValueError) as exc:
            raise _fail(where, f"physical_layout.{key} needs value, verified, source") from exc
        if not (math.isfinite(value) and value > 0) or not source or not verified:
            raise _fail(where, f"physical_layout.{key} must be positive with a source and flag")
        parameters.append(LayoutParameter(key, value, verified, source))
    values = {p.name: p.value for p in parameters}
    if values["idle_storage_fraction"] >= 1:
        raise _fail(where, "physical_layout.idle_storage_fraction must be below 1")
    return PhysicalLayout(**values, parameters=tuple(parameters))


def _logical_table(raw: Any, where: str) -> dict[str, tuple[LogicalRow, ...]] | None:
    if raw is None:
        return None
    if not isinstance(raw, list) or not raw:
        raise _fail(where, "'logical_table' must be a non-empty list of rows")
    table: dict[str, list[LogicalRow]] = {}
    for entry in raw:
        try:
            bits = int(entry["bits"])
            commit, verified = str(entry["commit"]), str(entry["verified"])
            strength = int(entry["strength"]) if entry.get("strength") is not None else None
            for variant in VARIANTS:
                if variant in entry:
                    qubits, toffoli = (float(v) for v in entry[variant])
                    if not (qubits > 0 and toffoli > 0):
                        raise ValueError("costs must be positive")
                    table.setdefault(variant, []).append(
                        LogicalRow(bits, qubits, toffoli, strength, commit, verified)
                    )
        except (KeyError, TypeError, ValueError) as exc:
            raise _fail(where, f"malformed logical_table row {entry!r} ({exc})") from exc
        if not commit or verified not in ("V", "V2", "M"):
            raise _fail(where, f"logical_table row {bits} needs a commit and a flag")
    return _sorted_rows(table, where)


def _physical_table(raw: Any, where: str) -> dict[str, tuple[PhysicalRow, ...]] | None:
    if raw is None:
        return None
    if not isinstance(raw, dict) or not set(raw) <= set(VARIANTS):
        raise _fail(where, f"'physical_table' maps problem variants ({', '.join(VARIANTS)}) to rows")
    table: dict[str, list[PhysicalRow]] = {}
    for variant, rows in raw.items():
        for entry in rows:
            try:
                retry = entry.get("retry_risk")
                row = PhysicalRow(
                    bits=int(entry["bits"]),
                    physical_qubits=float(entry["physical_qubits"]),
                    hours_per_run=float(entry["hours_per_run"]),
                    retry_risk=None if retry is None else float(retry),
                    distances=str(entry.get("distances") or ""),
                    commit=str(entry["commit"]),
                    verified=str(entry["verified"]),
                )
            except (KeyError, TypeError, ValueError, AttributeError) as exc:
                raise _fail(where, f"malformed physical_table row {entry!r} ({exc})") from exc
            if row.physical_qubits <= 0 or row.hours_per_run <= 0 or not 0 <= (row.retry_risk or 0) < 1:
                raise _fail(where, f"physical_table row {row.bits}: values out of range")
            table.setdefault(variant, []).append(row)
    return _sorted_rows(table, where)


def _sorted_rows(table: dict[str, list[Any]], where: str) -> dict[str, tuple[Any, ...]]:
    result = {}
    for variant, rows in table.items():
        ordered = sorted(rows, key=lambda r: r.bits)
        if len({r.bits for r in ordered}) != len(ordered):
            raise _fail(where, f"table for {variant} repeats a size")
        result[variant] = tuple(ordered)
    return result


def _method(row: Any, index: int) -> ShorMethod:
    if not isinstance(row, dict):
        raise _fail(f"shor_methods[{index}]", "must be a mapping")
    where = f"shor_methods[{index}] ({row.get('id', '?')})"
    for key in ("id", "title", "year", "source", "families", "notes", "verified"):
        if not row.get(key):
            raise _fail(where, f"missing '{key}'")
    families = tuple(row["families"])
    default_for = tuple(row.get("default_for") or ())
    for family in families + default_for:
        if family not in FAMILIES:
            raise _fail(where, f"unknown family '{family}' (expected one of {', '.join(FAMILIES)})")
    if not set(default_for) <= set(families):
        raise _fail(where, "default_for names a family the method does not cover")
    ff = row.get("finite_field_dlog") or {}
    if "finite-field-dlog" in families and not ff:
        raise _fail(where, "covers finite-field-dlog but has no 'finite_field_dlog' block")
    counterpart = str(row.get("reference_counterpart") or "")
    if not counterpart:
        if "factoring" not in families:
            raise _fail(where, "needs 'reference_counterpart' (a factoring method to compare with)")
        counterpart = str(row["id"])
    check = str(row.get("check") or "")
    if check not in CHECKS:
        raise _fail(where, f"'check' must be one of {', '.join(CHECKS)}")
    amortised = row.get("per_key_amortised") or {}
    if row.get("logical_table") and not row.get("logical_table_source"):
        raise _fail(where, "a logical_table needs a logical_table_source")
    if row.get("physical_table") and not row.get("physical_table_source"):
        raise _fail(where, "a physical_table needs a physical_table_source")
    toffoli = _quantity(row, "toffoli_count", where)
    if toffoli.per_toffoli is not None:
        raise _fail(where, "toffoli_count cannot be per_toffoli")
    return ShorMethod(
        id=str(row["id"]),
        title=str(row["title"]),
        year=int(row["year"]),
        source=str(row["source"]),
        families=families,
        default_for=default_for,
        credible=bool(row.get("credible", False)),
        verified=str(row["verified"]),
        logical_qubits=_quantity(row, "logical_qubits", where),
        toffoli_count=toffoli,
        measurement_depth=_quantity(row, "measurement_depth", where),
        notes=" ".join(str(row["notes"]).split()),
        ff_factoring_exponent_per_bit=ff.get("factoring_exponent_per_modulus_bit"),
        ff_dlog_exponent_per_bit=ff.get("dlog_exponent_per_exponent_bit"),
        ff_exponent_bits_per_strength_bit=ff.get("exponent_bits_per_strength_bit"),
        layout=_layout(row.get("physical_layout"), where),
        reference_counterpart=counterpart,
        arrival_exclusion=" ".join(str(row.get("arrival_exclusion") or "").split()),
        check=check,
        check_note=" ".join(str(row.get("check_note") or "").split()),
        in_band=bool(row.get("in_band", False)),
        logical_table=_logical_table(row.get("logical_table"), where),
        logical_table_source=" ".join(str(row.get("logical_table_source") or "").split()),
        physical_table=_physical_table(row.get("physical_table"), where),
        physical_table_source=" ".join(str(row.get("physical_table_source") or "").split()),
        per_key_amortised_toffoli=float(amortised["toffoli"]) if "toffoli" in amortised else None,
        amortisation_factor=float(amortised["amortisation_factor"])
        if "amortisation_factor" in amortised else None,
    )


def parse_method_data(document: Any) -> MethodData:
    """Validate a parsed methods.yaml document and build :class:`MethodData`."""
    if not isinstance(document, dict):
        raise _fail("top level", "must be a mapping")
    rows = document.get("shor_methods") or []
    methods = tuple(_method(r, i) for i, r in enumerate(rows))
    borrowed = []
    for raw, m in zip(rows, methods, strict=True):
        lender_id = raw.get("physical_layout_of")
        if lender_id:
            lender = next((x for x in methods if x.id == str(lender_id)), None)
            if lender is None or lender.layout is None or m.layout is not None:
                raise _fail(f"shor_methods ({m.id})",
                            f"physical_layout_of {lender_id!r} names no method with a layout")
            m = replace(m, layout=lender.layout)
        borrowed.append(m)
    methods = tuple(borrowed)
    for family in FAMILIES:
        defaults = [m.id for m in methods if family in m.default_for]
        if len(defaults) != 1:
            raise _fail("shor_methods", f"{family} needs exactly one default, not {defaults}")
    ids = [m.id for m in methods]
    if len(set(ids)) != len(ids):
        raise _fail("shor_methods", "duplicate method id")
    for m in methods:
        counterpart = next((c for c in methods if c.id == m.reference_counterpart), None)
        if counterpart is None or "factoring" not in counterpart.families:
            raise _fail(
                f"shor_methods ({m.id})",
                f"reference_counterpart {m.reference_counterpart!r} is not a factoring method",
            )
    for family in FAMILIES:
        count = sum(family in m.default_for for m in methods)
        if count != 1:
            raise _fail("shor_methods", f"{count} defaults for {family}; exactly one is needed")
    sc = document.get("surface_code")
    if not isinstance(sc, dict):
        raise _fail("surface_code", "must be a mapping")
    try:
        surface = SurfaceCodeConstants(
            source=" ".join(str(sc["source"]).split()),
            logical_error_prefactor=float(sc["logical_error_prefactor"]),
            qubits_per_tile_coefficient=float(sc["physical_qubits_per_tile"]["coefficient"]),
            qubits_per_tile_offset=float(sc["physical_qubits_per_tile"]["offset"]),
            routing_tiles_per_logical=float(sc["routing_tiles_per_logical"]),
            routing_tiles_fixed=float(sc["routing_tiles_fixed"]),
            factory_tiles=float(sc["factory_tiles"]),
            factory_cycles_per_distance=float(sc["factory_cycles_per_distance"]),
            max_distance=int(sc["max_distance"]),
        )
        grover = document["grover"]
        figures = tuple(
            GroverFigures(
                year=int(f["year"]),
                source=str(f["source"]),
                quantum_gates_times_depth_log2={
                    int(k): float(v) for k, v in f["quantum_gates_times_depth_log2"].items()
                },
                classical_gates_log2={
                    int(k): float(v) for k, v in f["classical_gates_log2"].items()
                },
            )
            for f in grover["figures"]
        )
        oracles = tuple(
            AesOracle(
                key_bits=int(o["key_bits"]),
                serial_depth_log2=float(o["serial_depth_log2"]),
                oracle_qubits=int(o["oracle_qubits"]),
                source=str(o["source"]),
            )
            for o in grover["aes_oracles"]
        )
    except (KeyError, TypeError, ValueError, AttributeError) as exc:
        raise _fail("surface_code / grover", f"malformed ({exc!r})") from exc
    for f in figures:
        if set(f.quantum_gates_times_depth_log2) != {o.key_bits for o in oracles}:
            raise _fail(f"grover figures {f.year}", "key sizes differ from aes_oracles")
    return MethodData(methods, surface, figures, oracles)


@lru_cache(maxsize=1)
def load_method_data() -> MethodData:
    """Load and validate the shipped methods.yaml (once per process)."""
    text = resources.files("pqtriage").joinpath("data", DATA_FILE).read_text(encoding="utf-8")
    try:
        document = yaml.load(text, Loader=_Loader)  # a safe loader, never yaml.Loader
    except yaml.YAMLError as exc:
        raise _fail("file", f"not valid YAML ({exc})") from exc
    return parse_method_data(document)
