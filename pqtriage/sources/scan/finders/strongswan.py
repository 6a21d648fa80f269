"""strongSwan: ``swanctl.conf`` (``proposals``, ``esp_proposals``, ``ah_proposals``, ``certs``)
and ``ipsec.conf`` (``ike=``, ``esp=``, ``ah=``, ``leftcert=``, ``authby=``), proposals split
into their algorithms by a shipped keyword table (swanctl.conf(5), ipsec.conf(5)).

A proposal is ``alg-alg-...`` (several proposals separated by commas; ``!`` marks a strict
list). ML-KEM appears on its own (``mlkem768``) or as an additional key exchange
(``ke1_mlkem768``, RFC 9370). Keywords the table does not know are kept as uses named as
written, so triage reports them unassessed.
"""

from __future__ import annotations

import functools
import re

from pqtriage.errors import CatalogError, Place
from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.data import load_data, require_sources
from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
    Reference,
    not_understood,
)
from pqtriage.sources.scan.finders.tlsconfig import resolve_path
from pqtriage.sources.scan.findings import Finding, FindingKind

_PROPOSAL_KEYS = {"proposals": "IKE", "esp_proposals": "ESP", "ah_proposals": "AH",
                  "ike": "IKE", "esp": "ESP", "ah": "AH"}  # fmt: skip
_CERT_KEYS = ("certs", "cacerts", "leftcert", "rightcert", "leftca", "rightca")
_SWANCTL = re.compile(rb"^\s*connections\s*\{", re.M)
_IPSEC = re.compile(rb"^\s*conn\s+\S+", re.M)


@functools.lru_cache(maxsize=1)
def keywords() -> tuple[dict[str, tuple[str, Purpose]], frozenset[str]]:
    """Proposal keyword -> (catalog name, purpose), and the keywords that name nothing."""
    raw = load_data("strongswan_keywords.yaml", ("tokens", "ignore"))
    require_sources(raw["tokens"], "strongswan_keywords.yaml", "tokens")
    table = {}
    for row in raw["tokens"]:
        try:
            table[str(row["token"])] = (str(row["algorithm"]), Purpose(row["purpose"]))
        except (KeyError, ValueError) as error:
            raise CatalogError(
                f"strongSwan keyword {row.get('token')}: needs an algorithm and a known purpose",
                place=Place("pqtriage/data/discovery/strongswan_keywords.yaml"),
            ) from error
    return table, frozenset(str(t) for t in raw["ignore"])


def split_proposal(proposal: str) -> list[tuple[str, str, Purpose | None]]:
    """(keyword as written, catalog name or the keyword, purpose or None when unknown)."""
    table, ignore = keywords()
    parts = []
    for token in proposal.strip().rstrip("!").split("-"):
        word = re.sub(r"^ke\d_", "", token.strip().lower())
        if not word or word in ignore:
            continue
        name, purpose = table.get(word, (token, None))  # type: ignore[assignment]
        parts.append((token, name, purpose))
    return parts


class StrongswanFinder(Finder):
    """Reads swanctl.conf and ipsec.conf."""

    name = "strongswan"

    def wants(self, path: str, head: bytes) -> bool:
        lower = path.lower()
        return (
            lower.endswith(("swanctl.conf", "ipsec.conf"))
            or "/swanctl/" in lower and lower.endswith(".conf")
            or bool(_SWANCTL.search(head))
            or bool(_IPSEC.search(head)) and (b"ike=" in head or b"esp=" in head or b"left" in head)
        )

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        text = data.decode("utf-8", "replace")
        if not (_SWANCTL.search(data) or _IPSEC.search(data)):
            return NOT_MINE
        if _SWANCTL.search(data) and text.count("{") != text.count("}"):
            return not_understood(path, "swanctl.conf braces do not balance")
        findings: list[Finding] = []
        references: list[Reference] = []
        stack: list[str] = []
        conn = ""
        for number, raw in enumerate(text.splitlines(), 1):
            line = raw.split("#", 1)[0].strip()
            if not line:
                continue
            if line.startswith("conn "):
                conn = line.split(None, 1)[1]
                continue
            if line.endswith("{"):
                stack.append(line[:-1].strip())
                continue
            if line == "}":
                if stack:
                    stack.pop()
                continue
            key, sep, value = line.partition("=")
            key, value = key.strip().lower(), value.strip()
            if not sep:
                continue
            where = ".".join(stack) if stack else f"conn {conn}"
            if key in _PROPOSAL_KEYS:
                for proposal in value.split(","):
                    for token, name, purpose in split_proposal(proposal):
                        findings.append(_use(path, number, token, name, purpose,
                                             _PROPOSAL_KEYS[key], where, proposal))  # fmt: skip
            elif key in _CERT_KEYS and value and not value.startswith("%"):
                for item in re.split(r"[,\s]+", value):
                    folder = "x509ca" if "ca" in key else "x509"
                    named = item if "/" in item else f"{folder}/{item}"
                    references.append(Reference(
                        resolve_path(path, named), SourceRef(path, line=number, detail=f"line{number}"),
                        "certificate",
                    ))  # fmt: skip
            elif key in ("authby", "auth") and value in ("psk", "secret"):
                findings.append(Finding(
                    source=SourceRef(path, line=number, detail=f"line{number}:psk"),
                    kind=FindingKind.CONFIG_SETTING, algorithm="unknown",
                    purpose=Purpose.AUTHENTICATION, protocol="IKE",
                    notes=(f"pre-shared key authentication in {where}; its strength is the "
                           "secret's, not an algorithm's",),
                ))  # fmt: skip
        return FinderResult(claimed=True, findings=tuple(findings), references=tuple(references))


def _use(
    path: str, line: int, token: str, name: str, purpose: Purpose | None, protocol: str,
    where: str, proposal: str,
) -> Finding:
    notes = [f"{protocol} proposal {proposal.strip()} in {where}"]
    if purpose is None:
        notes.append(f"keyword {token} is not in the shipped strongSwan table")
    if token.lower().startswith("ke") and "_" in token:
        notes.append("additional key exchange (RFC 9370)")
    return Finding(
        source=SourceRef(path, line=line, detail=f"line{line}:{proposal.strip()}:{token}"),
        kind=FindingKind.CONFIG_SETTING,
        algorithm=name,
        purpose=purpose or Purpose.KEY_ESTABLISHMENT,
        protocol=protocol,
        notes=tuple(notes),
    )
