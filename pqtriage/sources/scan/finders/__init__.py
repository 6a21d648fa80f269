"""Finders: one small module per kind of file the scan reads, behind one interface.

:func:`default_finders` lists them in the order they are tried; every finder whose
``wants`` test accepts a file reads it (see ``dispatch``).
"""

from __future__ import annotations

from pqtriage.sources.scan.finders.interface import Finder


def default_finders() -> list[Finder]:
    """Every finder, key material first (its tally also takes files named like key material)."""
    from pqtriage.sources.scan.finders.apache import ApacheFinder
    from pqtriage.sources.scan.finders.archives import ArchiveFinder
    from pqtriage.sources.scan.finders.haproxy import HaproxyFinder
    from pqtriage.sources.scan.finders.java_security import JavaSecurityFinder
    from pqtriage.sources.scan.finders.key_material import KeyMaterialFinder
    from pqtriage.sources.scan.finders.keystores import KeystoreFinder
    from pqtriage.sources.scan.finders.nginx import NginxFinder
    from pqtriage.sources.scan.finders.openssh_config import OpensshConfigFinder
    from pqtriage.sources.scan.finders.openssl_conf import OpensslConfFinder
    from pqtriage.sources.scan.finders.openvpn import OpenvpnFinder
    from pqtriage.sources.scan.finders.source_code import SourceCodeFinder
    from pqtriage.sources.scan.finders.strongswan import StrongswanFinder
    from pqtriage.sources.scan.finders.traffic import TrafficFinder
    from pqtriage.sources.scan.finders.wireguard import WireguardFinder

    return [
        KeyMaterialFinder(),
        KeystoreFinder(),
        ArchiveFinder(),
        TrafficFinder(),
        NginxFinder(),
        ApacheFinder(),
        HaproxyFinder(),
        OpensshConfigFinder(),
        OpensslConfFinder(),
        StrongswanFinder(),
        OpenvpnFinder(),
        WireguardFinder(),
        JavaSecurityFinder(),
        SourceCodeFinder(),
    ]
