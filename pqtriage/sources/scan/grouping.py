"""Group findings into systems by a rule the user chooses (``--group-by``).

Rules (documented in docs/discovery.md):
  folder   one system per folder holding the files (the default for scan); probe findings
           form one system per target.
  file     one system per file (or probe target).
  subject  one system per certificate subject common name (first DNS name, else the whole
           subject); findings without a subject fall back to the folder rule.
  host     one system per host: known_hosts host names, certificate DNS names, probe
           targets; findings without a host fall back to the folder rule.
Uses seen in captured traffic always form one system per server address and port, whatever
the rule (as probe findings form one per target).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from enum import Enum

from pqtriage.sources.scan.findings import Finding


class GroupBy(str, Enum):
    """How findings become systems."""

    FOLDER = "folder"
    FILE = "file"
    SUBJECT = "subject"
    HOST = "host"


@dataclass(frozen=True)
class Group:
    """Findings that form one system."""

    key: str
    """What the findings share: a folder, file, subject name, host or probe target."""
    label: str
    """What kind of key it is: folder, file, subject, host or target."""
    findings: tuple[Finding, ...]
    """The findings, in scan order."""


def _is_probe(finding: Finding) -> bool:
    return finding.host is not None and finding.source.file == finding.host


def _is_captured(finding: Finding) -> bool:
    """A use seen in captured traffic (``capture.pcap#packetN:server:port:...``)."""
    return finding.host is not None and (finding.source.detail or "").startswith("packet")


def group_key(finding: Finding, rule: GroupBy) -> tuple[str, str]:
    """Return (label, key) of the group a finding belongs to under a rule."""
    if _is_probe(finding):
        return "target", finding.source.file
    if _is_captured(finding):
        return "target", str(finding.host)  # one system per server, as a probe of it would be
    if rule is GroupBy.SUBJECT and finding.subject_name:
        return "subject", finding.subject_name
    if rule is GroupBy.HOST and finding.host:
        return "host", finding.host
    if rule is GroupBy.FILE:
        return "file", finding.source.file
    folder = os.path.dirname(finding.source.file) or "."
    return "folder", folder


def group_findings(findings: list[Finding] | tuple[Finding, ...], rule: GroupBy) -> list[Group]:
    """Group findings by a rule; groups sorted by key, findings kept in scan order."""
    buckets: dict[tuple[str, str], list[Finding]] = {}
    folders: dict[str, tuple[str, str]] = {}  # the folder rule's key per file (most uses share)
    for finding in findings:
        if rule is GroupBy.FOLDER and not _is_probe(finding) and not _is_captured(finding):
            key = folders.get(finding.source.file)
            if key is None:
                key = folders[finding.source.file] = group_key(finding, rule)
        else:
            key = group_key(finding, rule)
        buckets.setdefault(key, []).append(finding)
    return [
        Group(key=key, label=label, findings=tuple(items))
        for (label, key), items in sorted(
            buckets.items(), key=lambda item: (item[0][1], item[0][0])
        )
    ]
