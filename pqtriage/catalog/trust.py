"""Cautious default trust periods for signatures, by what they protect (shipped data).

``pqtriage/data/trust_defaults.yaml`` gives, for each :class:`SignatureRole`, how many years a
signature must stay unforgeable when a use states no ``trust_years``; ``unspecified`` covers a
signature whose role is unknown. Loaded and validated once, then pure.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Any

import yaml

from pqtriage.catalog.loader import _Loader
from pqtriage.errors import CatalogError, Place
from pqtriage.model.inventory import SignatureRole

UNSPECIFIED = "unspecified"
"""The key of the default for a signature whose role is not known."""


@dataclass(frozen=True)
class TrustDefault:
    """The default x of one signature role."""

    role: str
    """A SignatureRole value, or 'unspecified'."""
    years: float
    """Years the signature must stay unforgeable."""
    why: str
    """One line: why this many years."""
    source: str
    """Where the figure comes from ("common practice, no source" for a judgement of the trade)."""


class TrustDefaults:
    """Default trust periods per signature role."""

    def __init__(self, rows: dict[str, TrustDefault]):
        self.rows = rows

    def for_role(self, role: str | None) -> TrustDefault:
        """The default for a role (None or an unknown role: the unspecified default)."""
        return self.rows.get(role or UNSPECIFIED) or self.rows[UNSPECIFIED]


def _fail(path: str, label: str, message: str) -> CatalogError:
    return CatalogError(f"{label}: {message}", place=Place(path),
                        hint="fix the row in the trust defaults file; see docs/method.md")


def _row(row: Any, role: str, path: str, label: str) -> TrustDefault:
    if not isinstance(row, dict):
        raise _fail(path, label, "must be a mapping")
    expected = {"years", "why", "source"} | ({"role"} if "role" in row else set())
    if set(row) != expected:
        raise _fail(path, label, "needs exactly 'years', 'why' and 'source'")
    years = row["years"]
    if isinstance(years, bool) or not isinstance(years, (int, float)) or not 0 <= years <= 100:
        raise _fail(path, label, "'years' must be a number from 0 to 100")
    for key in ("why", "source"):
        if not isinstance(row[key], str) or not row[key].strip():
            raise _fail(path, label, f"'{key}' must be a non-empty text")
    return TrustDefault(role, float(years), row["why"], row["source"])


def parse_trust_defaults(data: Any, path: str) -> TrustDefaults:
    """Validate the document: one row per SignatureRole, plus the unspecified default."""
    if not isinstance(data, dict) or set(data) != {"version", "roles", UNSPECIFIED}:
        raise _fail(path, "top level", "needs exactly 'version', 'roles' and 'unspecified'")
    if not isinstance(data["roles"], list):
        raise _fail(path, "roles", "must be a list")
    rows: dict[str, TrustDefault] = {}
    known = {role.value for role in SignatureRole}
    for index, row in enumerate(data["roles"]):
        role = row.get("role") if isinstance(row, dict) else None
        label = f"roles[{index}] ({role})"
        if role not in known:
            raise _fail(path, label, f"unknown role (known: {', '.join(sorted(known))})")
        if role in rows:
            raise _fail(path, label, "role listed twice")
        rows[role] = _row(row, role, path, label)
    missing = known - set(rows)
    if missing:
        raise _fail(path, "roles", f"no row for {', '.join(sorted(missing))}")
    rows[UNSPECIFIED] = _row(data[UNSPECIFIED], UNSPECIFIED, path, UNSPECIFIED)
    return TrustDefaults(rows)


def read_trust_defaults(path: Path | None = None) -> TrustDefaults:
    """Read the shipped trust defaults, or the file at ``path``.

    Raises:
        CatalogError: the file is missing, not YAML, or a row is malformed.
    """
    if path is None:
        from importlib import resources

        path = Path(str(resources.files("pqtriage") / "data" / "trust_defaults.yaml"))
    where = str(path)
    try:
        data = yaml.load(path.read_text(encoding="utf-8"), Loader=_Loader)  # noqa: S506 - a safe loader
    except OSError as error:
        raise CatalogError(f"cannot read the trust defaults: {error.strerror}", place=Place(where)) from error
    except yaml.YAMLError as error:
        raise CatalogError("the trust defaults file is not valid YAML", place=Place(where)) from error
    return parse_trust_defaults(data, where)
