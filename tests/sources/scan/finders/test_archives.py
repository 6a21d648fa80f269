"""Archives made by the real tools (the JDK's jar, GNU tar, gzip, xz) and by Python's zipfile,
read member by member with ``archive!/member`` names, inside the archive bounds.
"""

from __future__ import annotations

import io
import subprocess
import zipfile
from pathlib import Path

from pqtriage.sources.scan.finders.interface import ArchiveLimits, FinderContext
from pqtriage.sources.scan.scanner import ScanResult, plan, scan_entries
from tests.sources import material as m
from tests.sources.scan.finders.tools import need, run


def _scan(path: Path, limits: ArchiveLimits | None = None) -> ScanResult:
    entries, problems = plan([str(path)])
    context = FinderContext(limits=limits or ArchiveLimits())
    return scan_entries(entries, problems, context=context)


def _content(folder: Path) -> Path:
    src = folder / "src"
    key = m.rsa_key(2048)
    m.write(src / "conf/server.pem", m.cert_pem(m.certificate(key, "app.example.test")))
    m.write(src / "conf/sshd_config", "KexAlgorithms diffie-hellman-group1-sha1\n")
    return src


def test_jar_tar_gz_tar_xz_and_gzip(tmp_path: Path) -> None:
    jar = need("jar", "default-jdk-headless")
    src = _content(tmp_path)
    run(jar, "cf", str(tmp_path / "app.jar"), "-C", str(src), ".")
    run("tar", "czf", str(tmp_path / "app.tar.gz"), "-C", str(src), "conf")
    run("tar", "cJf", str(tmp_path / "app.tar.xz"), "-C", str(src), "conf")
    run("gzip", "-k", str(src / "conf/server.pem"))
    (src / "conf/server.pem.gz").rename(tmp_path / "server.pem.gz")
    result = _scan(tmp_path / "app.jar")
    names = {f.source.file for f in result.findings}
    assert f"{tmp_path}/app.jar!/conf/server.pem" in names
    assert f"{tmp_path}/app.jar!/conf/sshd_config" in names
    for archive in ("app.tar.gz", "app.tar.xz"):
        found = {f.source.file for f in _scan(tmp_path / archive).findings}
        assert f"{tmp_path}/{archive}!/conf/server.pem" in found, archive
    found = {f.source.file for f in _scan(tmp_path / "server.pem.gz").findings}
    assert found == {f"{tmp_path}/server.pem.gz!/server.pem"}


def test_nested_archives_and_the_depth_bound(tmp_path: Path) -> None:
    inner = io.BytesIO()
    with zipfile.ZipFile(inner, "w") as archive:
        archive.writestr("keys/id.pub", m.ssh_public_line(m.rsa_key(2048), "deploy"))
    outer = tmp_path / "bundle.war"
    with zipfile.ZipFile(outer, "w") as archive:
        archive.writestr("WEB-INF/lib/inner.jar", inner.getvalue())
    found = {f.source.file for f in _scan(outer).findings}
    assert found == {f"{outer}!/WEB-INF/lib/inner.jar!/keys/id.pub"}
    shallow = _scan(outer, ArchiveLimits(max_depth=1))
    assert not shallow.findings
    assert any("nested deeper than 1" in p.reason for p in shallow.problems)


def test_zip_bomb_is_refused_with_one_line(tmp_path: Path) -> None:
    bomb = tmp_path / "bomb.zip"
    with zipfile.ZipFile(bomb, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("zeros.bin", bytes(64 * 1024 * 1024))
    result = _scan(bomb)
    lines = [p.line() for p in result.problems if p.place == str(bomb)]
    assert len(lines) == 1 and "zip bomb refused" in lines[0]
    assert result.summary is not None
    assert result.summary.finders["archive"].not_understood[0][0] == str(bomb)


def test_total_size_bound_counts_nested_members(tmp_path: Path) -> None:
    archive_path = tmp_path / "many.zip"
    with zipfile.ZipFile(archive_path, "w") as archive:
        for index in range(20):
            archive.writestr(f"part{index}.txt", b"x" * 1000)
    result = _scan(archive_path, ArchiveLimits(max_total_bytes=5000))
    assert any("size limit" in p.reason for p in result.problems)
    result = _scan(archive_path, ArchiveLimits(max_members=5))
    assert any("more members than the limit" in p.reason for p in result.problems)


def test_truncated_archive_is_not_understood(tmp_path: Path) -> None:
    src = _content(tmp_path)
    subprocess.run(["tar", "czf", str(tmp_path / "t.tgz"), "-C", str(src), "conf"], check=True)
    data = (tmp_path / "t.tgz").read_bytes()
    (tmp_path / "t.tgz").write_bytes(data[: len(data) // 2])
    result = _scan(tmp_path / "t.tgz")
    assert result.summary is not None
    assert result.summary.finders["archive"].not_understood
    assert not result.complete
