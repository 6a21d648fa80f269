"""The side-by-side table: exact text, grouping that loses nothing, 100 columns, years."""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import replace

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.formats.table.side_by_side import side_by_side
from pqtriage.model.profile import decimal_year
from pqtriage.sources.profile_file import load_profile
from pqtriage.threat.estimate import estimate
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.resource_arrival import ResourceArrivalModel
from pqtriage.threat.side_by_side import TableContext, compact_names, group_estimates
from tests.threat.helpers import cipher, curve, ffdh, hash_, rsa
from tests.threat.test_view import _small, render


def test_side_by_side_exact_text_with_grouping_and_legend() -> None:
    rows = [
        _small("RSA-2048", years=(2036.4, 2029.6)),
        replace(_small("ECDSA P-256", years=(2036.4, 2029.6)), problem_bits=256),
        replace(_small("ECDH P-256", years=(2036.4, 2029.6)), problem_bits=256),
    ]
    context = TableContext(
        params=ThreatParameters(),
        methods=(("factoring", "1905.09749", False),),
        reference_physical_qubits=2.0e7,
        profile="test",
        risk_tolerance=0.1,
        as_of="2026-04-01",
    )
    assert render(side_by_side(rows, context)).splitlines() == [
        "                  What falls when, against RSA-2048 factored in about a day",
        "                                logical  physical           q-bits          falls         band",
        "algorithms          method       qubits    qubits  runtime   /cat.   shift  10% / median  10%",
        "\u2500" * 94,
        # Equal years and shifts: by label. ECDSA and ECDH P-256 share one row.
        "P-256 (ECDSA/ECDH)  1905.09749    6,189      20 M    5.1 h       -  +0.0 y  2029 / 2036   -",
        "RSA-2048            1905.09749    6,189      20 M    5.1 h       -  +0.0 y  2029 / 2036   -",
        "methods: factoring 1905.09749; collisions: classical bound.",
        "assumptions (hardware file): error rate 0.001, cycle 1 us, reaction 10 us, run failure <= 0.25,",
        "  usable qubits double every 1 y, runtime limit 24 h, MAXDEPTH 2^64; reference RSA-2048 20 M",
        "  qubits.",
        "shift = 1 y x (log2(qubits / reference qubits) + log2(expected runtime / 24 h) where over the",
        "  limit), both costed like with like (so not always the qubits shown); beyond horizon: over 50 y.",
        "  Qubits: one run (Shor); q-bits/cat.: quantum security bits and NIST category. Methods: the",
        "  default per family is the most recent result whose circuit is published. Tables:",
        "  arXiv:2505.15917 and 1905.09749 rows, log-scale interpolation between them.",
        "falls: year at 10% risk tolerance / median, profile test, given no CRQC by 2026-04-01; band 10%:",
        "  the 10-90 % band of the first year over the survey range, the doubling time and the",
        "  construction; broken: classically broken today (its classical status), no quantum date applies.",
        "Caution: estimates are uncertain by years; official guidance and deadlines come first.",
    ]


@pytest.mark.parametrize(
    "names, label",
    [
        (
            ["ECDSA P-256", "ECDH P-256", "ECDSA secp256k1", "ECDH brainpoolP256r1"],
            "P-256, secp256k1, brainpoolP256r1 (ECDSA/ECDH)",
        ),
        (["DH-2048", "DSA-2048", "ffdhe2048", "modp2048"], "DH/DSA-2048, ffdhe2048, modp2048"),
        (
            ["AES-128", "AES-128-GCM", "Camellia-128", "Camellia-128-CBC", "RC4"],
            "AES/Camellia-128, RC4",
        ),
        (["SHA-256", "SHA3-256", "SHA-512/256"], "SHA-256, SHA3-256, SHA-512/256"),
        (["DES", "DES-CBC"], "DES"),
    ],
)
def test_compact_names(names: list[str], label: str) -> None:
    assert compact_names(names) == label


SPECS = [
    rsa(1024, 80),
    rsa(2048),
    rsa(4096, 152),
    curve("ECDSA P-256", 256),
    curve("ECDH P-256", 256),
    curve("ECDSA P-384", 384, 192),
    ffdh(2048, 112),
    cipher(56, "DES"),
    cipher(128),
    cipher(128, "Camellia-128"),
    hash_("SHA-256", 256, "collision"),
]
AS_OF = decimal_year(dt.date(2026, 4, 1))
PROFILE = load_profile("survey-2025-upper")
MODEL = ResourceArrivalModel(profile=PROFILE, as_of_year=AS_OF)
ESTIMATES = {s.name: estimate(s, arrival_model=MODEL) for s in SPECS}


@settings(max_examples=30, deadline=None)
@given(st.lists(st.sampled_from(sorted(ESTIMATES)), unique=True))
def test_grouping_keeps_every_estimate_exactly_once(names: list[str]) -> None:
    groups = group_estimates([ESTIMATES[n] for n in names])
    members = [e.algorithm for g in groups for e in g.members]
    assert sorted(members) == sorted(names)
    for g in groups:  # members share attack, problem and size
        assert len({(e.attack, e.problem, e.problem_bits) for e in g.members}) == 1


def test_rows_are_sorted_by_the_year_they_fall() -> None:
    groups = group_estimates(list(ESTIMATES.values()))
    years = [g.first.arrival.median_year for g in groups if g.first.arrival]  # type: ignore[union-attr]
    finite = [y for y in years if y is not None and not math.isinf(y)]
    assert finite == sorted(finite)
    labels = [g.label for g in groups]
    assert labels.index("RSA-1024") < labels.index("RSA-2048") < labels.index("RSA-4096")
    assert "AES/Camellia-128" in labels and "P-256 (ECDSA/ECDH)" in labels


def test_years_of_the_reference_task_match_the_survey() -> None:
    # Quantum Threat Timeline Report 2025 (Global Risk Institute, published 9 March 2026), upper
    # end (V2): 15 % within 5 years, 49 % within 10, 70 % within 15 of the report.
    # Median: 10 + 5 x (0.50 - 0.49) / 0.21 = 10.24 years; 10 %: 5 x 0.10 / 0.15 = 3.33 years.
    model = ResourceArrivalModel(profile=PROFILE, as_of_year=decimal_year(dt.date(2026, 3, 9)))
    row = model.explain(rsa(2048))
    start = decimal_year(dt.date(2026, 3, 9))
    assert row.median_year == pytest.approx(start + 10.24, abs=0.01)
    assert row.cautious_year == pytest.approx(start + 3.33, abs=0.01)
    # A shifted algorithm falls that much later (no conditioning bites when nothing could
    # have fallen yet): RSA-4096 under the default construction.
    later = model.explain(rsa(4096, 152))
    assert later.median_year == pytest.approx(start + 10.24 + later.shift_years, abs=0.01)


def test_the_real_catalog_fits_100_columns_without_truncation() -> None:
    from pqtriage.catalog import load_catalog
    from pqtriage.cli.estimate import estimate_command

    catalog = load_catalog()
    view, _ = estimate_command(
        None, True, None, 1e-3, 1.0, 10.0, 64, "text",
        resolve=catalog.resolve, specs=catalog.specs,
        profile=PROFILE, as_of_year=AS_OF, as_of_label="2026-04-01",
    )  # fmt: skip
    text = render(view)  # type: ignore[arg-type]
    assert max(len(line) for line in text.splitlines()) <= 100
    assert "\u2026" not in text  # rich's ellipsis: nothing cut
    # UMAC-128 (RFC 4418, an AES-128 key) shares the 128-bit key-search row with AES and Camellia.
    for name in ("RSA-2048", "P-256", "secp256k1", "ffdhe2048", "AES/Camellia/UMAC-128", "SHA3-512"):
        assert name in text
    assert "2505.15917 (default)" in text and "MAXDEPTH 2^64" in text
    assert "beyond horizon" in text and "official guidance" in text
