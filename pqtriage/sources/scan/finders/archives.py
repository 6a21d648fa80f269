"""Archives: zip (jar, war, ear, apk), tar (plain, gzip, bzip2, xz) and gzip, read in memory
and handed back to the finders member by member, named ``archive.jar!/path/inside``.

Bounds (:class:`ArchiveLimits`): nesting depth, total uncompressed bytes and member count per
archive on disk (nested archives draw on the same budget), the size of one member, and the
compression ratio of large members. A member is read with a cap on the bytes actually
produced, whatever its header claims, so a zip bomb stops at the cap: the archive is refused
with one line and what was read before stays. Symbolic links, devices and folders inside a
tar are not followed. Nothing is written to disk.
"""

from __future__ import annotations

import bz2
import gzip
import io
import lzma
import tarfile
import zipfile
import zlib
from collections.abc import Iterator
from typing import Any

from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    ArchiveBudget,
    Finder,
    FinderContext,
    FinderResult,
    Member,
)
from pqtriage.sources.scan.findings import ProblemKind, ScanProblem

ZIP_MAGIC = b"PK\x03\x04"
EMPTY_ZIP = b"PK\x05\x06"
GZIP_MAGIC = b"\x1f\x8b"
XZ_MAGIC = b"\xfd7zXZ\x00"
BZIP2_MAGIC = b"BZh"
_ERRORS = (zipfile.BadZipFile, tarfile.TarError, OSError, EOFError, zlib.error, lzma.LZMAError,
           ValueError, NotImplementedError, RuntimeError)  # fmt: skip


class ArchiveRefused(Exception):
    """A bound was reached: the rest of the archive is not read."""


def _is_tar(head: bytes) -> bool:
    return len(head) > 262 and head[257:262] == b"ustar"


class ArchiveFinder(Finder):
    """Reads zip, jar, war, tar, tar.gz, tar.xz, tar.bz2 and gzip files."""

    name = "archive"

    def wants(self, path: str, head: bytes) -> bool:
        return head.startswith((ZIP_MAGIC, EMPTY_ZIP, GZIP_MAGIC, XZ_MAGIC, BZIP2_MAGIC)) or _is_tar(
            head
        )

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        limits = context.limits
        budget = context.budget or ArchiveBudget(limits.max_total_bytes, limits.max_members)
        if context.depth >= limits.max_depth:
            return _refused(path, f"nested deeper than {limits.max_depth} archives; not opened")
        members: list[Member] = []
        problems: list[ScanProblem] = []
        try:
            for name, content in _members(data, path, context, budget, problems):
                members.append(Member(f"{path}!/{name}", content))
        except ArchiveRefused as refusal:
            problems.append(ScanProblem(path, ProblemKind.NOT_UNDERSTOOD, str(refusal)))
            return FinderResult(claimed=True, members=tuple(members), problems=tuple(problems),
                                not_understood=str(refusal))  # fmt: skip
        except _ERRORS as error:
            if not members:
                if data.startswith(BZIP2_MAGIC) or data.startswith(GZIP_MAGIC[:1] + b"\x00"):
                    return NOT_MINE
                return _refused(path, f"damaged archive ({type(error).__name__}: {error})"[:200])
            reason = f"damaged after {len(members)} members ({type(error).__name__})"
            problems.append(ScanProblem(path, ProblemKind.NOT_UNDERSTOOD, reason))
            return FinderResult(claimed=True, members=tuple(members), problems=tuple(problems),
                                not_understood=reason)  # fmt: skip
        return FinderResult(claimed=True, members=tuple(members), problems=tuple(problems))


def _refused(path: str, reason: str) -> FinderResult:
    problem = ScanProblem(path, ProblemKind.NOT_UNDERSTOOD, reason)
    return FinderResult(claimed=True, problems=(problem,), not_understood=reason)


def _take(budget: ArchiveBudget, size: int, name: str) -> None:
    budget.members -= 1
    budget.total_bytes -= size
    if budget.members < 0:
        raise ArchiveRefused(f"more members than the limit; refused at {name}")
    if budget.total_bytes < 0:
        raise ArchiveRefused(f"unpacks to more than the size limit; refused at {name} (zip bomb?)")


def _read_capped(stream: Any, cap: int, name: str) -> bytes:
    chunks, total = [], 0
    while True:
        chunk = stream.read(min(1 << 20, cap + 1 - total))
        if not chunk:
            break
        chunks.append(chunk)
        total += len(chunk)
        if total > cap:
            raise ArchiveRefused(f"{name} unpacks past {cap} bytes (zip bomb?); archive refused")
    return b"".join(chunks)


def _members(
    data: bytes, path: str, context: FinderContext, budget: ArchiveBudget,
    problems: list[ScanProblem],
) -> Iterator[tuple[str, bytes]]:
    limits = context.limits
    cap = min(limits.max_member_bytes, max(budget.total_bytes, 0))
    if data.startswith((ZIP_MAGIC, EMPTY_ZIP)):
        with zipfile.ZipFile(io.BytesIO(data)) as archive:
            for info in archive.infolist():
                if info.is_dir():
                    continue
                declared = info.file_size
                if declared > 1 << 20 and info.compress_size and (
                    declared / info.compress_size > limits.max_ratio
                ):
                    raise ArchiveRefused(
                        f"{info.filename} compresses {declared // info.compress_size}:1 "
                        f"(limit {limits.max_ratio}:1); zip bomb refused"
                    )
                if declared > limits.max_member_bytes:
                    problems.append(ScanProblem(f"{path}!/{info.filename}", ProblemKind.SKIPPED,
                                                f"member larger than the limit ({declared} bytes)"))  # fmt: skip
                    continue
                with archive.open(info) as stream:
                    content = _read_capped(stream, cap, info.filename)
                _take(budget, len(content), info.filename)
                yield info.filename, content
        return
    if _is_tar(data[:512]) or _compressed_tar(data):
        with tarfile.open(fileobj=io.BytesIO(data), mode="r:*") as archive:
            for entry in archive:
                if not entry.isfile():
                    continue
                if entry.size > limits.max_member_bytes:
                    problems.append(ScanProblem(f"{path}!/{entry.name}", ProblemKind.SKIPPED,
                                                f"member larger than the limit ({entry.size} bytes)"))  # fmt: skip
                    continue
                _take(budget, entry.size, entry.name)
                member = archive.extractfile(entry)
                if member is not None:
                    yield entry.name, _read_capped(member, cap, entry.name)
        return
    opener: dict[bytes, Any] = {
        GZIP_MAGIC: lambda raw: gzip.GzipFile(fileobj=raw),
        XZ_MAGIC: lzma.LZMAFile,
        BZIP2_MAGIC: bz2.BZ2File,
    }
    for magic, kind in opener.items():
        if data.startswith(magic):
            with kind(io.BytesIO(data)) as stream:
                content = _read_capped(stream, cap, "the compressed stream")
            base = path.rsplit("/", 1)[-1]
            inner = base.rsplit(".", 1)[0] if "." in base else base
            _take(budget, len(content), inner)
            yield inner, content
            return


def _compressed_tar(data: bytes) -> bool:
    """A compressed stream whose first 512 bytes, decompressed, are a tar header."""
    try:
        if data.startswith(GZIP_MAGIC):
            head = zlib.decompressobj(16 + zlib.MAX_WBITS).decompress(data[:65536], 1024)
        elif data.startswith(XZ_MAGIC):
            head = lzma.LZMADecompressor().decompress(data[:65536], 1024)
        elif data.startswith(BZIP2_MAGIC):
            head = bz2.BZ2Decompressor().decompress(data[:65536])[:1024]
        else:
            return False
    except (zlib.error, lzma.LZMAError, OSError, EOFError, ValueError):
        return False
    return _is_tar(head[:512])
