"""Scan of 10k files of mixed kinds against the bare per-file parse of each kind.

Goal: at most 3x a loop that does only the unavoidable parse of each file with the
reference library of its kind: cryptography for certificates, pyjks for keystores, zipfile
(and cryptography for the certificate inside) for archives, tree-sitter for source code, dpkt
for captures, and a line split for configuration files. Files: certificates, nginx and sshd
configurations, JKS keystores, zip archives, source files in five languages, pcap captures of
a synthetic TLS 1.3 handshake, and plain text that no finder reads.
Run: python bench/bench_mixed_scan.py [--quick]
"""

from __future__ import annotations

import argparse
import datetime as dt
import io
import sys
import zipfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.common import Figure, best_of, main_for, pqtriage_argv, profile_summary, work_dir

GOAL_RATIO = 3.0
SCAN_ARGS = ("scan", "{folder}", "--format", "json", "-o", "{out}", "--keystore-password", "bench-pass")
"""CLI arguments of the measured scan (pqtriage/cli/scan.py)."""
SHARE = {"cert": 30, "nginx": 15, "sshd": 15, "jks": 5, "zip": 5, "source": 20, "pcap": 5, "text": 5}
"""Per cent of the files of each kind."""
NGINX = """\
events {}
http {
    ssl_protocols TLSv1.2 TLSv1.3;
    ssl_ciphers HIGH:!aNULL:!MD5:DES-CBC3-SHA;
    server {
        listen 443 ssl;
        server_name app-%d.example.invalid;
        ssl_ecdh_curve X25519:prime256v1;
    }
}
"""
SSHD = "# OpenSSH 9.2\nPort 22\nKexAlgorithms +diffie-hellman-group14-sha1\nCiphers -aes128-ctr\nMACs ^hmac-sha1\n# host %d\n"
SOURCES = {
    ".py": "import hashlib\nfrom cryptography.hazmat.primitives.asymmetric import rsa\nBITS = 2048\n"
           "def f(d):\n    rsa.generate_private_key(public_exponent=65537, key_size=BITS)\n"
           "    return hashlib.md5(d).hexdigest()  # %d\n",
    ".java": "import javax.crypto.Cipher;\nclass A%d { void f() throws Exception { Cipher.getInstance(\"DES/ECB/PKCS5Padding\"); } }\n",
    ".go": "package main\nimport (\"crypto/rand\"; \"crypto/rsa\")\nfunc main() { rsa.GenerateKey(rand.Reader, 1024) } // %d\n",
    ".js": "const crypto = require('crypto');\ncrypto.createHash('sha1').update('%d');\n",
    ".c": "#include <openssl/evp.h>\nconst EVP_CIPHER *f%d(void) { return EVP_des_ede3_cbc(); }\n",
}

FLOOR_CODE = """\
import io, pathlib, sys, zipfile
import dpkt, jks
from cryptography import x509
from tree_sitter import Language, Parser
import tree_sitter_python, tree_sitter_java, tree_sitter_go, tree_sitter_javascript, tree_sitter_c
parsers = {'.py': tree_sitter_python, '.java': tree_sitter_java, '.go': tree_sitter_go,
           '.js': tree_sitter_javascript, '.c': tree_sitter_c}
parsers = {k: Parser(Language(v.language())) for k, v in parsers.items()}
for path in sorted(pathlib.Path(sys.argv[1]).rglob('*')):
    if not path.is_file():
        continue
    data = path.read_bytes()
    suffix = path.suffix
    if suffix == '.pem':
        x509.load_pem_x509_certificate(data).public_key()
    elif suffix == '.jks':
        store = jks.KeyStore.loads(data, 'bench-pass')
        for entry in store.certs.values():
            x509.load_der_x509_certificate(entry.cert).public_key()
    elif suffix == '.zip':
        with zipfile.ZipFile(io.BytesIO(data)) as archive:
            for name in archive.namelist():
                member = archive.read(name)
                if name.endswith('.pem'):
                    x509.load_pem_x509_certificate(member).public_key()
    elif suffix in parsers:
        parsers[suffix].parse(data)
    elif suffix == '.pcap':
        for _, frame in dpkt.pcap.Reader(io.BytesIO(data)):
            dpkt.ethernet.Ethernet(frame)
    else:
        [line.split() for line in data.decode('utf-8', 'replace').splitlines()]
"""


PHASES_CODE = """\
import json, sys, time
started = time.process_time()
from pqtriage.sources.scan.emit import inventory_dict, render
from pqtriage.sources.scan.finders.interface import FinderContext
from pqtriage.sources.scan.finders.openssl_cli import system_expander
from pqtriage.sources.scan.grouping import GroupBy, group_findings
from pqtriage.sources.scan.scanner import plan, scan_entries
imported = time.process_time()
entries, problems = plan([sys.argv[1]])
context = FinderContext(passwords=(b'bench-pass',), expand_cipher_string=system_expander())
result = scan_entries(entries, problems, context=context)
scanned = time.process_time()
document = inventory_dict(group_findings(list(result.findings), GroupBy.FOLDER))
grouped = time.process_time()
render(document, 'json')
done = time.process_time()
print(json.dumps({'imports': imported - started, 'finders': scanned - imported,
                  'systems and uses': grouped - scanned, 'JSON text': done - grouped,
                  'uses': len(result.findings)}))
"""
"""Where the scan's CPU time goes, in one process (imports, finders, inventory, output)."""


def _phases(files: Path) -> dict[str, float]:
    import json
    import subprocess

    from bench.common import ROOT, child_env

    done = subprocess.run([sys.executable, "-c", PHASES_CODE, str(files)], cwd=ROOT, env=child_env(),
                          capture_output=True, text=True, check=False, timeout=900)
    try:
        return dict(json.loads(done.stdout))
    except ValueError:
        return {}


def _tls_pcap() -> bytes:
    """A pcap of one synthetic TLS 1.3 exchange on loopback (ClientHello, ServerHello)."""
    import dpkt

    def hello(kind: int, body: bytes) -> bytes:
        message = bytes([kind]) + len(body).to_bytes(3, "big") + body
        return b"\x16\x03\x01" + len(message).to_bytes(2, "big") + message

    share = b"\x00\x1d\x00\x20" + bytes(32)  # x25519 (RFC 8446 section 4.2.8)
    client_ext = (b"\x00\x0a\x00\x04\x00\x02\x00\x1d" + b"\x00\x33" + (len(share) + 2).to_bytes(2, "big")
                  + len(share).to_bytes(2, "big") + share + b"\x00\x2b\x00\x03\x02\x03\x04")
    client = (b"\x03\x03" + bytes(32) + b"\x00" + b"\x00\x02\x13\x01" + b"\x01\x00"
              + len(client_ext).to_bytes(2, "big") + client_ext)
    server_ext = b"\x00\x2b\x00\x02\x03\x04" + b"\x00\x33" + len(share).to_bytes(2, "big") + share
    server = (b"\x03\x03" + bytes(32) + b"\x00" + b"\x13\x01" + b"\x00"
              + len(server_ext).to_bytes(2, "big") + server_ext)
    out = io.BytesIO()
    writer = dpkt.pcap.Writer(out)
    for number, (src, sport, dst, dport, flags, payload) in enumerate([
        (1, 50000, 2, 443, dpkt.tcp.TH_SYN, b""),
        (1, 50000, 2, 443, dpkt.tcp.TH_ACK, hello(1, client)),
        (2, 443, 1, 50000, dpkt.tcp.TH_ACK, hello(2, server)),
    ]):
        tcp = dpkt.tcp.TCP(sport=sport, dport=dport, seq=1000 if src == 1 else 5000, flags=flags,
                           data=payload)
        if number == 1:
            tcp.seq = 1000 + 1
        if number == 0:
            tcp.seq = 1000
        ip = dpkt.ip.IP(src=bytes([127, 0, 0, src]), dst=bytes([127, 0, 0, dst]), p=6, data=tcp)
        ip.len = len(bytes(ip))
        writer.writepkt(bytes(dpkt.ethernet.Ethernet(type=0x0800, data=ip)), ts=number)
    return out.getvalue()


def write_files(folder: Path, count: int) -> Path:
    """``count`` files of mixed kinds under one folder (generated once, reused)."""
    target = folder / f"mixed-{count}"
    marker = target / ".complete"
    if marker.exists():
        return target
    target.mkdir(parents=True, exist_ok=True)
    import jks
    from cryptography import x509
    from cryptography.hazmat.primitives import hashes, serialization
    from cryptography.hazmat.primitives.asymmetric import ec, rsa
    from cryptography.x509.oid import NameOID

    keys = [ec.generate_private_key(ec.SECP256R1()), rsa.generate_private_key(public_exponent=65537, key_size=2048)]
    start = dt.datetime(2026, 1, 1, tzinfo=dt.UTC)

    def certificate(index: int) -> x509.Certificate:
        key = keys[index % len(keys)]
        name = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, f"host-{index}.example.invalid")])
        return (x509.CertificateBuilder().subject_name(name).issuer_name(name)
                .public_key(key.public_key()).serial_number(index + 1)
                .not_valid_before(start).not_valid_after(start + dt.timedelta(days=365))
                .sign(key, hashes.SHA256()))

    pcap = _tls_pcap()
    index = 0
    for kind, share in SHARE.items():
        for number in range(count * share // 100):
            index += 1
            folder_name = target / kind / f"{number // 500:03d}"
            folder_name.mkdir(parents=True, exist_ok=True)
            if kind == "cert":
                data = certificate(index).public_bytes(serialization.Encoding.PEM)
                (folder_name / f"host-{number:05d}.pem").write_bytes(data)
            elif kind == "nginx":
                (folder_name / f"site-{number:05d}.conf").write_text("# nginx\n" + NGINX % number)
            elif kind == "sshd":
                (folder_name / f"host-{number:05d}.sshd_config").write_text(SSHD % number)
            elif kind == "jks":
                der = certificate(index).public_bytes(serialization.Encoding.DER)
                store = jks.KeyStore.new("jks", [jks.TrustedCertEntry.new("ca", der)])
                (folder_name / f"trust-{number:05d}.jks").write_bytes(store.saves("bench-pass"))
            elif kind == "zip":
                buffer = io.BytesIO()
                with zipfile.ZipFile(buffer, "w") as archive:
                    archive.writestr("conf/server.pem", certificate(index).public_bytes(serialization.Encoding.PEM))
                    archive.writestr("conf/app.properties", f"name=app-{number}\n")
                (folder_name / f"app-{number:05d}.zip").write_bytes(buffer.getvalue())
            elif kind == "source":
                suffix = list(SOURCES)[number % len(SOURCES)]
                (folder_name / f"unit_{number:05d}{suffix}").write_text(SOURCES[suffix] % number)
            elif kind == "pcap":
                (folder_name / f"capture-{number:05d}.pcap").write_bytes(pcap)
            else:
                (folder_name / f"readme-{number:05d}.txt").write_text(f"notes {number}\n")
    marker.write_text("")
    return target


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure."""
    figure = Figure(
        name="Mixed scan",
        measured="pqtriage " + " ".join(SCAN_ARGS),
        floor="python loop: the reference library's parse of each file by kind (see the module docstring)",
        goal=f"at most {GOAL_RATIO:g}x the floor (CPU time)",
        met=None,
    )
    folder = work_dir()
    ratio = 0.0
    for count in ((1_000,) if args.quick else (1_000, 10_000)):
        files = write_files(folder, count)
        out = folder / f"mixed-scan-{count}.json"
        scan = [a.format(folder=files, out=out) for a in SCAN_ARGS]
        floor = best_of([sys.executable, "-c", FLOOR_CODE, str(files)], 3)
        run = best_of(pqtriage_argv(*scan), 3)
        # The figure is the ratio of CPU times (the machine may be shared); wall times beside it.
        ratio = run.cpu_seconds / floor.cpu_seconds
        figure.rows.append({"files": f"{count:,}", "scan CPU s": f"{run.cpu_seconds:.2f}",
                            "floor CPU s": f"{floor.cpu_seconds:.2f}", "ratio": f"{ratio:.2f}x",
                            "scan wall s": f"{run.seconds:.2f}", "floor wall s": f"{floor.seconds:.2f}",
                            "peak MiB": f"{run.peak_rss_bytes / 2**20:.0f}"})
    figure.met = ratio <= GOAL_RATIO
    phases = _phases(files)
    if phases:
        uses = int(phases.pop("uses"))
        figure.notes.append(
            f"where the time goes at {count:,} files ({uses:,} uses, {uses / count:.0f} per file): "
            + ", ".join(f"{name} {seconds:.2f} s" for name, seconds in phases.items()))
    figure.notes.append(
        "kinds: " + ", ".join(f"{kind} {share}%" for kind, share in SHARE.items())
        + "; the scan also describes every certificate (names, validity, extensions), expands "
        "each cipher string, applies the OpenSSH defaults, follows references, and writes "
        "every use as a JSON inventory")
    if not figure.met and args.profile:
        figure.profile = profile_summary(scan)
    return [figure]


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
