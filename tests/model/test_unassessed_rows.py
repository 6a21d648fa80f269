"""A system whose weakest use is unassessed shows no start-by date and no probability, and says
which use made it unassessed; validity dates give a signature its trust period.

Mosca's rule ("Cybersecurity in an era with quantum computers: will we be ready?", IEEE Security
& Privacy 16(5), 2018; IACR ePrint 2015/1075): exposed when x + y > z, worked by hand with the
fixed CRQC year of a what-if profile.
"""

from __future__ import annotations

import datetime as dt

from pqtriage.model.arrival_model import SharedArrival
from pqtriage.model.inventory import CryptoUse, Inventory, Purpose, SourceRef, System
from pqtriage.model.triage import triage
from pqtriage.model.validity import remaining_years
from pqtriage.model.verdict import Verdict
from pqtriage.sources.profile_file import parse_profile
from tests.fakes import FakeCatalog

AS_OF = dt.date(2026, 1, 1)
PROFILE = parse_profile(b"crqc_year: 2035\n", "what-if.yaml")  # z = 2035.0: 9 years from today


def _run(*uses: CryptoUse, x: float = 2, y: float = 1):
    system = System(id="gate", name="Gate", shelf_life_years=x, migration_years=y, uses=uses)
    return triage(Inventory("Test", (system,)), FakeCatalog(), PROFILE, SharedArrival(), AS_OF).items[0]


def test_unassessed_system_has_no_date_and_no_probability_from_its_other_uses() -> None:
    known = CryptoUse(Purpose.KEY_ESTABLISHMENT, "RSA-2048")  # x + y = 3 < 9: within margin, start 2032
    unknown = CryptoUse(Purpose.ENCRYPTION, "Frobnicate-9", source=SourceRef("inv.yaml", 12, 7))
    item = _run(known, unknown)
    assert item.verdict is Verdict.UNASSESSED
    assert item.uses[0].start_by == dt.date(2032, 1, 1)  # the known use still has its own date
    assert (item.start_by, item.exposure_probability, item.margin_years) == (None, None, None)
    assert item.reason.startswith("use Frobnicate-9 (encryption, line 12): ")  # the verdict's reason
    assert item.rank_reason.startswith("first: ")  # the place has its own field
    assert "'Frobnicate-9' is not in the catalog" in item.reason


def test_assessed_system_keeps_its_earliest_date() -> None:
    item = _run(CryptoUse(Purpose.KEY_ESTABLISHMENT, "RSA-2048"))
    assert item.verdict is Verdict.WITHIN_MARGIN and item.start_by == dt.date(2032, 1, 1)


def test_remaining_validity_is_the_trust_period_of_a_signature() -> None:
    # Valid until 2033-01-01: 2557 days after 2026-01-01, 7.0 Julian years (365.25 days).
    assert remaining_years(dt.date(2033, 1, 1), AS_OF) == 7.0
    assert remaining_years(dt.date(2020, 1, 1), AS_OF) == 0.0  # expired: nothing left to trust
    assert remaining_years(dt.date(9999, 12, 31), AS_OF) == 100.0  # RFC 5280 "no expiration" date: capped
    signed = CryptoUse(Purpose.SIGNATURE, "ECDSA P-256", not_after=dt.date(2033, 1, 1))
    item = _run(signed, y=3)
    # x = 7 (remaining validity) + y = 3 = 10 > 9 years to z: exposed.
    assert item.uses[0].x_years == 7.0 and item.verdict is Verdict.EXPOSED
    given = CryptoUse(Purpose.SIGNATURE, "ECDSA P-256", trust_years=1, not_after=dt.date(2033, 1, 1))
    assert _run(given, y=3).uses[0].x_years == 1.0  # a trust period the owner gives wins
