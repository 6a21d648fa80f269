"""OpenSSH ``sshd_config`` and ``ssh_config``: the algorithm lists and the host keys.

Lists (sshd_config(5), ssh_config(5)): KexAlgorithms, Ciphers, MACs, HostKeyAlgorithms,
PubkeyAcceptedAlgorithms (formerly PubkeyAcceptedKeyTypes), CASignatureAlgorithms,
HostbasedAcceptedAlgorithms. A value starting with ``+`` appends to the default list, ``-``
removes the names matching its patterns (``*`` and ``?``), ``^`` puts its names first. The
defaults are those of the OpenSSH version when it is known: stated in the file as a comment
(``# OpenSSH 9.2``) or given by the caller; they ship as data, per version, with their
source. Without a version, only the names the file itself adds are reported, and the note
says the defaults are not included. As in OpenSSH, the first value of a keyword wins;
values inside ``Match`` (sshd) or ``Host`` (ssh) blocks are reported with the block named.
``HostKey`` files are followed into the key reader. ``Include`` fragments are read too.
"""

from __future__ import annotations

import fnmatch
import functools
import re
from dataclasses import dataclass

from pqtriage.errors import CatalogError, Place
from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.data import load_data, require_sources
from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
    Reference,
)
from pqtriage.sources.scan.finders.tlsconfig import SERVER_CERTIFICATE, resolve_path
from pqtriage.sources.scan.findings import Finding, FindingKind, ProblemKind, ScanProblem

#: Keyword (lower case) -> (canonical keyword, purpose of its algorithms).
LISTS: dict[str, tuple[str, Purpose]] = {
    "kexalgorithms": ("KexAlgorithms", Purpose.KEY_ESTABLISHMENT),
    "ciphers": ("Ciphers", Purpose.ENCRYPTION),
    "macs": ("MACs", Purpose.INTEGRITY),
    "hostkeyalgorithms": ("HostKeyAlgorithms", Purpose.AUTHENTICATION),
    "pubkeyacceptedalgorithms": ("PubkeyAcceptedAlgorithms", Purpose.AUTHENTICATION),
    "pubkeyacceptedkeytypes": ("PubkeyAcceptedAlgorithms", Purpose.AUTHENTICATION),
    "casignaturealgorithms": ("CASignatureAlgorithms", Purpose.SIGNATURE),
    "hostbasedacceptedalgorithms": ("HostbasedAcceptedAlgorithms", Purpose.AUTHENTICATION),
    "hostbasedacceptedkeytypes": ("HostbasedAcceptedAlgorithms", Purpose.AUTHENTICATION),
}
_VERSION = re.compile(r"#.*\bOpenSSH[_ ]?(\d+\.\d+)", re.IGNORECASE)
_SERVER_ONLY = ("hostkey", "listenaddress", "permitrootlogin", "authorizedkeysfile", "usepam",
                "subsystem", "match", "passwordauthentication", "x11forwarding")  # fmt: skip
_CLIENT_ONLY = ("host", "hostname", "identityfile", "stricthostkeychecking", "user",
                "userknownhostsfile", "proxyjump", "forwardagent")  # fmt: skip


@dataclass(frozen=True)
class OpensshDefaults:
    """Default lists of one OpenSSH version for one program."""

    version: str
    """OpenSSH version (``9.2``)."""
    lists: dict[str, tuple[str, ...]]
    """Canonical keyword -> default names, in order."""
    source: str
    """Where the defaults come from."""


@functools.lru_cache(maxsize=1)
def _defaults() -> dict[tuple[str, str], OpensshDefaults]:
    raw = load_data("openssh_defaults.yaml", ("versions",))
    require_sources(raw["versions"], "openssh_defaults.yaml", "versions")
    table = {}
    known = {canonical for canonical, _ in LISTS.values()}
    for row in raw["versions"]:
        for program in ("sshd", "ssh"):
            lists = {key: tuple(names) for key, names in row[program].items()}
            if not set(lists) <= known:
                raise CatalogError(
                    f"OpenSSH {row['version']} {program}: unknown lists "
                    + ", ".join(sorted(set(lists) - known)),
                    place=Place("pqtriage/data/discovery/openssh_defaults.yaml"),
                )
            table[(str(row["version"]), program)] = OpensshDefaults(
                str(row["version"]), lists, str(row["source"])
            )
    return table


def known_versions() -> tuple[str, ...]:
    """Versions whose defaults ship."""
    return tuple(sorted({version for version, _ in _defaults()}))


def defaults_for(version: str | None, program: str) -> OpensshDefaults | None:
    """Defaults of a version (``9.2``, ``9.2p1`` and ``OpenSSH_9.2`` alike), None if unknown."""
    if not version:
        return None
    match = re.search(r"(\d+\.\d+)", version)
    return _defaults().get((match.group(1), program)) if match else None


def apply_operator(value: str, default: tuple[str, ...] | None) -> tuple[list[str], str]:
    """The resulting list of a value with OpenSSH's ``+``/``-``/``^`` operators, and how.

    With no default known, ``+`` and ``^`` give only their own names and ``-`` gives none.
    """
    names = [name for name in value[1:].split(",") if name] if value[:1] in "+-^" else []
    if value[:1] == "+":
        base = list(default or ())
        return base + [n for n in names if n not in base], "appended to"
    if value[:1] == "^":
        return names + [n for n in (default or ()) if n not in names], "put before"
    if value[:1] == "-":
        kept = [n for n in (default or ()) if not any(fnmatch.fnmatchcase(n, p) for p in names)]
        return kept, "removed from"
    return [name for name in value.split(",") if name], "set by"


class OpensshConfigFinder(Finder):
    """Reads sshd_config and ssh_config files (and their Include fragments)."""

    name = "openssh config"

    def wants(self, path: str, head: bytes) -> bool:
        base = path.replace("\\", "/").rsplit("/", 1)[-1].lower()
        return (
            base in ("sshd_config", "ssh_config", "config") and ("/.ssh/" in path or "ssh" in base)
            or "/sshd_config.d/" in path
            or "/ssh_config.d/" in path
            or base.endswith((".sshd_config", ".ssh_config"))
        )

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        text = data.decode("utf-8", "replace")
        program = _program(path, text)
        if program is None:
            return NOT_MINE
        stated = _VERSION.search(text)
        version = stated.group(1) if stated else context.openssh_version
        defaults = defaults_for(version, program)
        seen: set[str] = set()
        findings: list[Finding] = []
        references: list[Reference] = []
        block = ""
        for number, raw_line in enumerate(text.splitlines(), 1):
            keyword, value = _split(raw_line)
            if not keyword:
                continue
            lower = keyword.lower()
            if lower in ("match", "host"):
                block = f"in {keyword} {value} (line {number})"
                continue
            if lower == "include" and value:
                for item in value.split():
                    references.append(Reference(
                        resolve_path(path, item, ("ssh",)), SourceRef(path, line=number, detail=f"line{number}"),
                        "include", self.name,
                    ))  # fmt: skip
            elif lower in ("hostkey", "identityfile", "hostcertificate") and value:
                references.append(Reference(
                    resolve_path(path, value.strip('"'), ("ssh",)),
                    SourceRef(path, line=number, detail=f"line{number}"),
                    SERVER_CERTIFICATE if lower == "hostkey" else keyword,
                ))  # fmt: skip
            elif lower in LISTS:
                canonical, purpose = LISTS[lower]
                if canonical in seen and not block:
                    continue  # OpenSSH: the first value obtained is used
                if not block:
                    seen.add(canonical)
                default = defaults.lists.get(canonical) if defaults else None
                names, how = apply_operator(value, default)
                note = f"{how} the OpenSSH {defaults.version} defaults" if (
                    defaults and value[:1] in "+-^") else (
                    f"{how} the defaults of an unstated OpenSSH version; the defaults are not listed"
                    if value[:1] in "+-^" else "")  # fmt: skip
                notes = tuple(n for n in (f"{canonical} at line {number}", note, block) if n)
                findings += [_use(path, number, name, purpose, notes, canonical) for name in names]
        if defaults is not None:
            unused = _unused_lists(text, program)
            for canonical, default_names in defaults.lists.items():
                if canonical in seen or canonical in unused:
                    continue
                purpose = next(p for c, p in LISTS.values() if c == canonical)
                note = f"{canonical} not set: OpenSSH {defaults.version} default"
                findings += [
                    _use(path, 0, name, purpose, (note,), canonical) for name in default_names
                ]
        problems: tuple[ScanProblem, ...] = ()
        if defaults is None:
            problems = (ScanProblem(path, ProblemKind.SKIPPED, (
                "OpenSSH version not stated: the default lists are not included (give "
                "--openssh-version, or a '# OpenSSH 9.2' comment in the file)"
                if version is None else
                f"no shipped defaults for OpenSSH {version}: the default lists are not included"
            )),)  # fmt: skip
        return FinderResult(claimed=True, findings=tuple(findings), references=tuple(references),
                            problems=problems)  # fmt: skip


def _unused_lists(text: str, program: str) -> set[str]:
    """Default lists that are not used with this file's settings, so not listed as uses:
    hostbased algorithms unless HostbasedAuthentication is yes (off by default, sshd_config(5)
    and ssh_config(5)), public-key algorithms when PubkeyAuthentication is no, and on a server
    the CA signature algorithms unless TrustedUserCAKeys names user CAs."""
    values: dict[str, str] = {}
    for line in text.splitlines():
        keyword, value = _split(line)
        values.setdefault(keyword.lower(), value.lower())
    unused = set()
    if values.get("hostbasedauthentication") != "yes":
        unused.add("HostbasedAcceptedAlgorithms")
    if values.get("pubkeyauthentication") == "no":
        unused.add("PubkeyAcceptedAlgorithms")
    if program == "sshd" and values.get("trustedusercakeys", "none") == "none":
        unused.add("CASignatureAlgorithms")
    return unused


CERT_SUFFIX = "-cert-v01@openssh.com"


def key_algorithm(name: str) -> tuple[str, str | None]:
    """The signature algorithm an OpenSSH key-type name stands for, and a note when it is a
    variant: certificates (``-cert-v01@openssh.com``, OpenSSH PROTOCOL.certkeys) sign with
    their key type; FIDO security keys (``sk-``, OpenSSH PROTOCOL.u2f) with the same curve."""
    base, notes = name, []
    if base.endswith(CERT_SUFFIX):
        base = base[: -len(CERT_SUFFIX)]
        notes.append("OpenSSH certificate")
    if base.startswith("sk-"):
        base = base[3:].removesuffix("@openssh.com")
        notes.append("FIDO security key")
    if base == name:
        return name, None
    return base, f"{name}: {' and '.join(notes)} signed with {base}"


def _use(
    path: str, line: int, name: str, purpose: Purpose, notes: tuple[str, ...], keyword: str
) -> Finding:
    detail = f"line{line}:{keyword}:{name}" if line else f"default:{keyword}:{name}"
    algorithm, variant = key_algorithm(name) if purpose is not Purpose.KEY_ESTABLISHMENT and (
        keyword not in ("Ciphers", "MACs")) else (name, None)  # fmt: skip
    return Finding(
        source=SourceRef(path, line=line or None, detail=detail),
        kind=FindingKind.CONFIG_SETTING,
        algorithm=algorithm,
        purpose=purpose,
        protocol="SSH",
        notes=notes + ((variant,) if variant else ()),
    )


def _split(line: str) -> tuple[str, str]:
    """(keyword, value) of a configuration line; ``Keyword value`` or ``Keyword=value``."""
    text = line.strip()
    if not text or text.startswith("#"):
        return "", ""
    match = re.match(r"([A-Za-z][A-Za-z0-9]*)\s*(?:=\s*|\s+)(.*)$", text)
    if not match:
        return text, ""
    value = match.group(2).split(" #", 1)[0].strip()
    return match.group(1), value


def _program(path: str, text: str) -> str | None:
    """``sshd`` or ``ssh`` by name, else by keywords; None when neither fits."""
    lower = path.lower()
    if "sshd_config" in lower:
        return "sshd"
    if "ssh_config" in lower or "/.ssh/config" in lower:
        return "ssh"
    keywords = {_split(line)[0].lower() for line in text.splitlines()}
    if keywords & set(_SERVER_ONLY):
        return "sshd"
    if keywords & set(_CLIENT_ONLY) or keywords & set(LISTS):
        return "ssh"
    return None
