"""Typing mistakes in algorithm and curve names: close to a known spelling is an error.

A name the catalog does not know is triaged as unassessed. When it is one or two keystrokes
away from a name the catalog knows (``X25591`` for ``X25519``, ``P-265`` for ``P-256``), it is
almost certainly a typing mistake that would silently leave the use unassessed, so it is an
error that names the fix. A name far from every known one (a national cipher the catalog
does not carry) stays a warning: the use is unassessed, shown and counted in every output.
"""

from __future__ import annotations

from dataclasses import dataclass

from pqtriage.catalog.resolve import loose_key
from pqtriage.catalog.spec import Resolution


@dataclass(frozen=True)
class NameProblem:
    """A problem with the name of an algorithm or curve."""

    field: str
    """``algorithm`` or ``curve``."""
    message: str
    """What is wrong."""
    hint: str
    """What to do."""
    error: bool
    """True for a likely typing mistake; False for a name far from every known one."""


def edit_distance(first: str, second: str) -> int:
    """Edits (insert, delete, substitute, swap two neighbours) from one text to the other.

    The optimal string alignment distance (Damerau's four edits, each substring edited once),
    as in "A technique for computer detection and correction of spelling errors",
    Communications of the ACM 7(3), 1964.
    """
    if first == second:
        return 0
    previous2: list[int] = []
    previous = list(range(len(second) + 1))
    for i, a in enumerate(first, start=1):
        current = [i] + [0] * len(second)
        for j, b in enumerate(second, start=1):
            cost = 0 if a == b else 1
            current[j] = min(previous[j] + 1, current[j - 1] + 1, previous[j - 1] + cost)
            if i > 1 and j > 1 and a == second[j - 2] and first[i - 2] == b:
                current[j] = min(current[j], previous2[j - 2] + 1)
        previous2, previous = previous, current
    return previous[-1]


def allowed_edits(text: str) -> int:
    """Edits still counted as a typing mistake: one for short names, two from eight characters.

    pqtriage's own choice, no source: below four characters one edit turns most names into
    other names (DSA, RSA), so short names are never called typos.
    """
    size = len(text)
    if size < 4:
        return 0
    return 1 if size < 8 else 2


def closest(typed: str, candidates: tuple[str, ...]) -> str | None:
    """The candidates within the allowed edits of what was typed (case and separators aside),
    nearest first, as "'A'" or "'A' or 'B'"; None when none is that close."""
    key = loose_key(typed)
    limit = allowed_edits(key)
    near = sorted((d, i, c) for i, c in enumerate(candidates)
                  if 0 < (d := edit_distance(key, loose_key(c))) <= limit)
    if not near:
        return None
    best = [c for d, _, c in near if d == near[0][0]]
    return " or ".join(f"'{c}'" for c in best)


def name_problem(found: Resolution, algorithm: str, curve: str | None) -> NameProblem | None:
    """The problem with an unresolved use's names, or None when the names are not the issue."""
    if found.assessed or not found.reason:
        return None
    if curve and found.reason.startswith("unknown curve"):
        close = closest(curve, found.suggestions)
        if close:
            return NameProblem("curve", f"unknown curve '{curve}'", f"did you mean {close}?", True)
        return None  # the catalog's note says it; the use is unassessed
    if found.reason.endswith("is not in the algorithm catalog"):
        close = closest(algorithm, found.suggestions)
        if close:
            return NameProblem("algorithm", f"unknown algorithm '{algorithm}'", f"did you mean {close}?", True)
        nearby = f"close names: {', '.join(found.suggestions)}" if found.suggestions else "no close name known"
        return NameProblem("algorithm", f"algorithm '{algorithm}' is not in the catalog, so this use will be"
                           " unassessed", f"{nearby}; check the spelling (see docs/catalog.md)", False)
    return None
