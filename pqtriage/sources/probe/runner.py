"""Run probes with bounded concurrency; every target gets an outcome, in input order.

Each probe bounds its own time (connect, then one deadline for the exchange), so a silent
or slow target costs at most ``timeout`` seconds of one worker.
"""

from __future__ import annotations

from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor

from pqtriage.errors import UsageError
from pqtriage.sources.probe.outcome import ProbeOutcome
from pqtriage.sources.probe.ssh import probe_ssh
from pqtriage.sources.probe.targets import Target
from pqtriage.sources.probe.tls import probe_tls

ProbeFunction = Callable[[Target, float], ProbeOutcome]

DEFAULT_TIMEOUT = 5.0
DEFAULT_CONCURRENCY = 8
MAX_CONCURRENCY = 64
PROBES: dict[str, ProbeFunction] = {"tls": probe_tls, "ssh": probe_ssh}


def run_probes(
    targets: list[Target],
    timeout: float = DEFAULT_TIMEOUT,
    concurrency: int = DEFAULT_CONCURRENCY,
    probes: dict[str, ProbeFunction] | None = None,
    done: Callable[[ProbeOutcome], None] | None = None,
) -> list[ProbeOutcome]:
    """Probe every target, at most ``concurrency`` at once; outcomes in target order."""
    if not 0 < timeout <= 120:
        raise UsageError(f"timeout {timeout:g} s is out of range", hint="give 0.1 to 120 seconds")
    if not 0 < concurrency <= MAX_CONCURRENCY:
        raise UsageError(
            f"concurrency {concurrency} is out of range", hint=f"give 1 to {MAX_CONCURRENCY}"
        )
    table = probes or PROBES
    if not targets:
        return []

    def one(target: Target) -> ProbeOutcome:
        try:
            outcome = table[target.protocol](target, timeout)
        except Exception as error:  # noqa: BLE001 - a probe bug must not hide other targets
            outcome = ProbeOutcome(target.text, failure=f"probe failed ({type(error).__name__})")
        if done is not None:
            done(outcome)
        return outcome

    with ThreadPoolExecutor(max_workers=min(concurrency, len(targets))) as pool:
        return list(pool.map(one, targets))
