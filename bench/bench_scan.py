"""Scan of 1k and 10k certificates against a bare loop of the cryptography library.

Goal (issue 7): at most 2x a loop of x509.load_pem_x509_certificate plus
public_key() over the same files. Skips with a note while pqtriage.sources.scan
is not there yet (discovery is merged separately).
Run: python bench/bench_scan.py [--quick]
"""

from __future__ import annotations

import argparse
import datetime as dt
import importlib.util
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.common import Figure, best_of, main_for, pqtriage_argv, profile_summary, work_dir

GOAL_RATIO = 2.0
SCAN_ARGS = ("scan", "{folder}", "--format", "json", "-o", "{out}")
"""CLI arguments of the measured scan (pqtriage/cli/scan.py: PATHS, --format, --output)."""

PHASES_CODE = """\
import json, sys, time
started = time.perf_counter()
from pqtriage.cli.scan import scan_command
from pqtriage.sources.scan.emit import inventory_dict, render
from pqtriage.sources.scan.grouping import GroupBy, group_findings
from pqtriage.sources.scan.scanner import plan, scan_entries
imported = time.perf_counter()
entries, problems = plan([sys.argv[1]])
result = scan_entries(entries, problems)
scanned = time.perf_counter()
render(inventory_dict(group_findings(list(result.findings), GroupBy.FOLDER)), 'json')
done = time.perf_counter()
print(json.dumps({'imports': imported - started, 'walk, read, describe': scanned - imported,
                  'inventory and JSON': done - scanned}))
"""
"""Where the scan's time goes, measured in one process (imports, per-file work, output)."""

FLOOR_CODE = """\
import pathlib, sys
from cryptography import x509
for path in sorted(pathlib.Path(sys.argv[1]).glob('*.pem')):
    x509.load_pem_x509_certificate(path.read_bytes()).public_key()
"""


def write_certificates(folder: Path, count: int) -> Path:
    """``count`` distinct self-issued certificates of fictional hosts, one PEM file each."""
    target = folder / f"certs-{count}"
    if target.exists() and len(list(target.glob("*.pem"))) == count:
        return target
    target.mkdir(parents=True, exist_ok=True)
    from cryptography import x509
    from cryptography.hazmat.primitives import hashes, serialization
    from cryptography.hazmat.primitives.asymmetric import ec, rsa
    from cryptography.x509.oid import NameOID

    keys: list[ec.EllipticCurvePrivateKey | rsa.RSAPrivateKey] = [ec.generate_private_key(ec.SECP256R1()), ec.generate_private_key(ec.SECP384R1()),
            rsa.generate_private_key(public_exponent=65537, key_size=2048)]
    start = dt.datetime(2026, 1, 1, tzinfo=dt.UTC)
    for index in range(count):
        key = keys[index % len(keys)]
        name = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, f"host-{index}.example.invalid")])
        cert = (x509.CertificateBuilder().subject_name(name).issuer_name(name)
                .public_key(key.public_key()).serial_number(index + 1)
                .not_valid_before(start).not_valid_after(start + dt.timedelta(days=365))
                .sign(key, hashes.SHA256()))
        (target / f"host-{index:05d}.pem").write_bytes(cert.public_bytes(serialization.Encoding.PEM))
    return target


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure (or skip it)."""
    figure = Figure(
        name="Certificate scan",
        measured="pqtriage " + " ".join(SCAN_ARGS),
        floor="python loop: x509.load_pem_x509_certificate(data).public_key() per file",
        goal=f"at most {GOAL_RATIO:g}x the floor",
        met=None,
    )
    if importlib.util.find_spec("pqtriage.sources.scan") is None:
        figure.notes.append("skipped: pqtriage.sources.scan is not in this checkout yet (discovery not merged)")
        return [figure]
    folder = work_dir()
    ratio = 0.0
    for count in ((200, 1_000) if args.quick else (1_000, 10_000)):
        certs = write_certificates(folder, count)
        out = folder / f"scan-{count}.json"
        scan = [a.format(folder=certs, out=out) for a in SCAN_ARGS]
        floor = best_of([sys.executable, "-c", FLOOR_CODE, str(certs)], 3)
        run = best_of(pqtriage_argv(*scan), 3)
        ratio = run.seconds / floor.seconds
        figure.rows.append({"certificates": f"{count:,}", "scan s": f"{run.seconds:.2f}",
                            "floor s": f"{floor.seconds:.2f}", "ratio": f"{ratio:.2f}x"})
    figure.met = ratio <= GOAL_RATIO
    phases = _phases(certs)
    if phases:
        figure.notes.append(f"where the time goes at {count:,} certificates: " + ", ".join(
            f"{name} {seconds:.2f} s" for name, seconds in phases.items()))
    figure.notes.append(
        "the floor only parses each certificate and its key; the scan also reads subject, issuer, "
        "validity, extensions and signature algorithm, verifies each signature with the key that made it (the issuer proof), makes up to three uses per certificate (key, signature, signature hash), and writes "
        "them as a JSON inventory (about 750 bytes per certificate)")
    if not figure.met and args.profile:
        figure.profile = profile_summary(scan)
    return [figure]


def _phases(certs: Path) -> dict[str, float]:
    import json
    import subprocess

    from bench.common import ROOT, child_env

    done = subprocess.run([sys.executable, "-c", PHASES_CODE, str(certs)], cwd=ROOT, env=child_env(),
                          capture_output=True, text=True, check=False, timeout=600)
    try:
        return dict(json.loads(done.stdout))
    except ValueError:
        return {}


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
