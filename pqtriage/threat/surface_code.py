"""Surface-code physical layer: code distance, physical qubits and runtime of one run.

Model (constants in ``pqtriage/data/methods.yaml``, section ``surface_code``):

- logical error per tile per cycle p_L = A (p / p_th)^((d+1)/2), A = 0.1, p_th = 1e-2
  (arXiv:1905.09749 section 2: 10^-(ceil(d/2)+1) at p = 1e-3, each +2 of distance 10x);
- a distance-d tile holds 2 (d+1)^2 physical qubits (arXiv:1905.09749);
- routed block of 2 Q + 4 tiles for Q logical qubits ("A Game of Surface Codes",
  arXiv:1808.02892, intermediate block);
- CCZ factories of 12d x 6d = 72 tiles, one CCZ per 5.5 d cycles (arXiv:1812.01238);
- runtime = max(measurement depth x reaction time, Toffoli count / factory rate);
- the smallest odd d whose run failure 1 - exp(-p_L x tiles x cycles) stays under the target.

A construction may bring its own :class:`~pqtriage.threat.methods.PhysicalLayout`
(arXiv:2505.15917): a fraction of the logical qubits sits in dense idle storage, magic-state
sites replace the factories, and each Toffoli takes max(reaction, k d cycles). Stored qubits
still count one tile each toward run failure; only their footprint shrinks.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from pqtriage.threat.methods import PhysicalLayout, SurfaceCodeConstants, load_method_data
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.shor import LogicalResources


@dataclass(frozen=True)
class PhysicalResources:
    """What one run needs on surface-code hardware."""

    code_distance: int | None
    """Chosen odd code distance; None when no distance up to the limit suffices."""
    physical_qubits: float | None
    """Physical qubits: data and routing tiles plus factories."""
    data_tiles: float
    """Tiles that hold logical qubits and count toward failure (routed block and storage)."""
    factories: int | None
    """Number of CCZ factories, or of magic-state sites under a method's own layout."""
    runtime_hours: float | None
    """Wall-clock hours of one run."""
    limited_by: str | None
    """'reaction' or 'factory': what sets the runtime."""
    failure_probability: float | None
    """Probability that the run fails from logical errors."""
    logical_error_per_cycle: float | None
    """p_L per tile per cycle at the chosen distance."""
    working: tuple[str, ...]
    """Each step of the computation, with its source."""


def logical_error_rate(
    distance: int, params: ThreatParameters, constants: SurfaceCodeConstants
) -> float:
    """p_L = A (p/p_th)^((d+1)/2) per tile per cycle (arXiv:1905.09749; Phys. Rev. A 86, 032324)."""
    ratio = params.physical_error_rate / params.threshold
    return constants.logical_error_prefactor * ratio ** ((distance + 1) / 2)


def qubits_per_tile(distance: int, constants: SurfaceCodeConstants) -> float:
    """2 (d+1)^2 physical qubits per distance-d tile (arXiv:1905.09749)."""
    return (
        constants.qubits_per_tile_coefficient * (distance + constants.qubits_per_tile_offset) ** 2
    )


def block_tiles(logical_qubits: float, constants: SurfaceCodeConstants) -> float:
    """2 Q + 4 tiles hold and route Q logical qubits (arXiv:1808.02892, intermediate block)."""
    return constants.routing_tiles_per_logical * logical_qubits + constants.routing_tiles_fixed


@dataclass(frozen=True)
class _Footprint:
    """Where the logical qubits sit: tiles counted for failure and physical footprint in tiles."""

    error_tiles: float
    footprint_tiles: float
    description: str


def _footprint(
    logical_qubits: float, constants: SurfaceCodeConstants, layout: PhysicalLayout | None
) -> _Footprint:
    if layout is None:
        tiles = block_tiles(logical_qubits, constants)
        text = f"routed block {tiles:,.0f} tiles = 2 x {logical_qubits:,.0f} + 4 (arXiv:1808.02892)"
        return _Footprint(tiles, tiles, text)
    stored = layout.idle_storage_fraction * logical_qubits
    active = logical_qubits - stored
    routed = block_tiles(active, constants)
    footprint = routed + stored * layout.storage_tiles_per_logical
    text = (
        f"{stored:,.0f} logical qubits in idle storage ({layout.idle_storage_fraction:g}, "
        f"calibration A) at {layout.storage_tiles_per_logical:g} tile each (yoked surface codes, "
        f"arXiv:2312.04522, M); {active:,.0f} in a routed block of {routed:,.0f} tiles = "
        f"2 x {active:,.0f} + 4 (arXiv:1808.02892): footprint {footprint:,.0f} tiles, "
        f"{routed + stored:,.0f} tiles exposed to logical errors"
    )
    return _Footprint(routed + stored, footprint, text)


def physical_resources(
    logical: LogicalResources,
    params: ThreatParameters,
    constants: SurfaceCodeConstants | None = None,
    layout: PhysicalLayout | None = None,
) -> PhysicalResources:
    """Choose the code distance and count physical qubits and runtime for one run.

    Args:
        logical: the circuit's logical resources.
        params: hardware assumptions.
        constants: the generic layer's constants (shipped methods.yaml by default).
        layout: the construction's own layout; None for the generic layer.
    """
    constants = constants or load_method_data().surface_code
    place = _footprint(logical.logical_qubits, constants, layout)
    site_tiles = constants.factory_tiles if layout is None else layout.magic_state_site_tiles
    for distance in range(3, constants.max_distance + 1, 2):
        layer_seconds = max(params.reaction_seconds, params.cycle_seconds)
        if layout is None:
            seconds_per_ccz = (
                constants.factory_cycles_per_distance * distance * params.cycle_seconds
            )
        else:
            # Serial Toffoli rate: one lattice-surgery step of k d cycles, at least one reaction.
            layer_seconds = max(
                layer_seconds, layout.distance_cycles_per_toffoli * distance * params.cycle_seconds
            )
            seconds_per_ccz = layout.magic_state_site_cycles_per_toffoli * params.cycle_seconds
        reaction_seconds = logical.measurement_depth * layer_seconds
        # A hair below an integer is that integer (150 / 25 cycles is 6.000000000000001 in floats).
        needed = max(1, math.ceil(logical.toffoli_count * seconds_per_ccz / reaction_seconds - 1e-9))
        factories = needed if params.max_factories is None else min(needed, params.max_factories)
        factory_seconds = logical.toffoli_count * seconds_per_ccz / factories
        runtime = max(reaction_seconds, factory_seconds)
        cycles = runtime / params.cycle_seconds
        p_l = logical_error_rate(distance, params, constants)
        failure = -math.expm1(-p_l * place.error_tiles * cycles)
        if failure <= params.target_failure:
            break
    else:
        return PhysicalResources(
            None,
            None,
            place.error_tiles,
            None,
            None,
            None,
            None,
            None,
            (
                (
                    f"no odd code distance up to {constants.max_distance} keeps the run's failure "
                    f"under {params.target_failure:g}"
                ),
            ),
        )
    per_tile = qubits_per_tile(distance, constants)
    factory_tiles = factories * site_tiles
    physical = (place.footprint_tiles + factory_tiles) * per_tile
    limited_by = "factory" if factory_seconds > reaction_seconds else "reaction"
    if layout is None:
        magic = (
            f"{factories} CCZ factories of 72 tiles, one CCZ per 5.5 d cycles (arXiv:1812.01238)"
        )
        step = f"{layer_seconds * 1e6:g} us reaction"
    else:
        magic = (
            f"{factories} magic-state sites of {site_tiles:g} tiles, one Toffoli's states per "
            f"{layout.magic_state_site_cycles_per_toffoli:g} cycles (cultivation, "
            "arXiv:2409.17595; footprint and rate A)"
        )
        step = (
            f"{layer_seconds * 1e6:g} us per Toffoli (max of reaction and "
            f"{layout.distance_cycles_per_toffoli:g} x d cycles of lattice surgery, A)"
        )
    working = (
        place.description,
        (
            f"code distance {distance}: p_L = 0.1 (p/p_th)^((d+1)/2) = {p_l:.2g} per tile per "
            f"cycle; run failure {failure:.3f} <= target {params.target_failure:g} (arXiv:1905.09749)"
        ),
        f"{per_tile:,.0f} physical qubits per tile = 2 (d+1)^2 (arXiv:1905.09749)",
        magic,
        (
            f"physical qubits ({place.footprint_tiles:,.0f} + {factory_tiles:,.0f}) x "
            f"{per_tile:,.0f} = {physical:.3g}"
        ),
        (
            f"runtime {runtime / 3600:.3g} h, {limited_by}-limited: depth "
            f"{logical.measurement_depth:.3g} x {step}; "
            f"magic states {factory_seconds / 3600:.3g} h"
        ),
    )
    return PhysicalResources(
        code_distance=distance,
        physical_qubits=physical,
        data_tiles=place.error_tiles,
        factories=factories,
        runtime_hours=runtime / 3600,
        limited_by=limited_by,
        failure_probability=failure,
        logical_error_per_cycle=p_l,
        working=working,
    )


def distance_for_volume(
    tile_cycles_log2: float, params: ThreatParameters, constants: SurfaceCodeConstants | None = None
) -> int | None:
    """Smallest odd distance whose failure over 2^tile_cycles_log2 tile-cycles meets the target.

    Works in log2 so that the volumes of Grover searches (2^100 and more) stay finite.
    """
    constants = constants or load_method_data().surface_code
    for distance in range(3, constants.max_distance + 1, 2):
        exponent = math.log2(logical_error_rate(distance, params, constants)) + tile_cycles_log2
        if exponent < 1000 and -math.expm1(-(2.0**exponent)) <= params.target_failure:
            return distance
    return None
