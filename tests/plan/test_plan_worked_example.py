"""A small plan worked out by hand, checked end to end.

Inputs (plan made 2027-02-15, so quarter 0 is 2027-Q2 starting 2027-04-01; capacity one
migration at a time; policy NIST IR 8547 ipd (2024), Tables 2 and 4):

  id    rank  years  quarters  vendor     release  depends  use (strength, SP 800-57 Table 2)
  pki   2     1.0    4         available  q0       -        RSA-2048 signature (112)
  web   1     0.5    2         announced  q4       pki      ECDH P-256 (128)
  mail  3     2.5    10        unknown    q4       -        RSA-2048 key transport (112)

Priority: web (rank 1) waits on pki, so pki takes rank 1 too; order web, pki, mail.
  q0: web waits for pki; pki starts (q0-q3 = 2027-04-01..2028-03-31); mail released only at q4.
  q4: pki done at q3 and web released at q4: web runs q4-q5 (2028-04-01..2028-09-30);
      mail is released but the one slot is taken.
  q6: mail runs q6-q15 (2028-10-01..2031-03-31).
Checks:
  pki  start 2027-04-01 <= start-by 2027-06-30 (slack 90 days); 2030-12-31 met by 1005 days.
  web  start 2028-04-01 > start-by 2028-01-01: missed. The latest start meeting it is 2028-Q1
       (q3); both the dependency (ready q4) and the vendor delay (q4) hold it back, so neither
       fix alone is enough.
  mail 112-bit deprecated after 2030: finish 2031-03-31 misses 2030-12-31 by 90 days. Latest
       finish q14 (2030-Q4), latest start q14 - 10 + 1 = q5 (2028-07-01); earliest allowed q4
       (vendor), it started q6 for want of capacity: more capacity alone fixes it, finishing
       q13 = 2030-09-30. Disallowed after 2035 is met.
  critical path: mail finishes last and has no dependencies: (mail,).
"""

from __future__ import annotations

import datetime

import pytest
from plan_helpers import ECDH_P256, RSA_2048_KEY_TRANSPORT, RSA_2048_SIGNATURE, candidate

from pqtriage.plan.planner import Plan, build_plan
from pqtriage.plan.policies import select_policies
from pqtriage.plan.scheduler import Capacity

D = datetime.date


@pytest.fixture(scope="module")
def plan() -> Plan:
    systems = [
        candidate("pki", rank=2, years=1.0, vendor="available", start_by=D(2027, 6, 30),
                  uses=(RSA_2048_SIGNATURE,)),
        candidate("web", rank=1, years=0.5, vendor="announced", depends_on=("pki",),
                  start_by=D(2028, 1, 1), uses=(ECDH_P256,)),
        candidate("mail", rank=3, years=2.5, vendor="unknown", start_by=D(2029, 1, 1),
                  uses=(RSA_2048_KEY_TRANSPORT,)),
    ]  # fmt: skip
    return build_plan(
        systems, D(2027, 2, 15), select_policies(["nist-ir-8547"]), Capacity(concurrent=1)
    )


def by_id(plan: Plan, system_id: str):  # type: ignore[no-untyped-def]
    return next(s for s in plan.systems if s.candidate.id == system_id)


def test_dates(plan: Plan) -> None:
    assert plan.start == D(2027, 4, 1)
    got = {s.candidate.id: (s.planned_start, s.planned_finish) for s in plan.systems}
    assert got == {
        "pki": (D(2027, 4, 1), D(2028, 3, 31)),
        "web": (D(2028, 4, 1), D(2028, 9, 30)),
        "mail": (D(2028, 10, 1), D(2031, 3, 31)),
    }
    assert [s.candidate.id for s in plan.systems] == ["pki", "web", "mail"]


def test_start_by_checks(plan: Plan) -> None:
    pki, web, mail = (by_id(plan, i) for i in ("pki", "web", "mail"))
    assert (pki.meets_start_by, pki.start_by_slack_days) == (True, 90)
    assert web.meets_start_by is False
    assert mail.meets_start_by is True


def test_deadline_checks(plan: Plan) -> None:
    pki, web, mail = (by_id(plan, i) for i in ("pki", "web", "mail"))
    assert (pki.meets_deadlines, pki.deadline_slack_days) == (True, 1005)
    assert web.meets_deadlines is True
    assert mail.meets_deadlines is False
    assert mail.deadline_slack_days == -90
    assert [(r.deadline.kind, r.deadline.date, r.met) for r in mail.results] == [
        ("deprecated", D(2030, 12, 31), False),
        ("disallowed", D(2035, 12, 31), True),
    ]


def test_fixes(plan: Plan) -> None:
    (web_miss,) = by_id(plan, "web").misses
    assert web_miss.target == "start-by"
    assert web_miss.latest_start == D(2028, 1, 1)
    assert [(f.kind, f.sufficient) for f in web_miss.fixes] == [
        ("earlier-dependencies", False),
        ("vendor-date", False),
    ]
    assert "pki (finishes 2028-03-31) must finish by 2027-12-31" in web_miss.fixes[0].text
    (mail_miss,) = by_id(plan, "mail").misses
    assert mail_miss.target == "nist-ir-8547/key-establishment-112-deprecated"
    assert mail_miss.latest_start == D(2028, 7, 1)
    (fix,) = mail_miss.fixes
    assert (fix.kind, fix.sufficient) == ("more-capacity", True)
    assert "starts on 2028-04-01" in fix.text and "finishing 2030-09-30" in fix.text


def test_critical_path_and_defaults(plan: Plan) -> None:
    assert plan.critical_path == ("mail",)
    pki = by_id(plan, "pki")
    # Default effort: 52 person-weeks per migration year (one person full time).
    assert (pki.effort_person_weeks, pki.effort_assumed) == (52.0, True)
    assert by_id(plan, "mail").earliest_start == D(2028, 4, 1)  # unknown readiness: +1 year
