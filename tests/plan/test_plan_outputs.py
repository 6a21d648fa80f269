"""Plan renderers: JSON fields, Markdown escaping, the terminal view, the command function."""

from __future__ import annotations

import datetime
import io
import json

import pytest
from plan_helpers import ECDH_P256, UNKNOWN, candidate
from rich.console import Console

from pqtriage.cli.plan import run_plan
from pqtriage.errors import PlanError, UsageError
from pqtriage.formats.text import md_escape
from pqtriage.plan.policies import select_policies
from pqtriage.plan.scheduler import Capacity, parse_capacity

D = datetime.date
HOSTILE = "Pay|roll *x* [bold]red[/bold] <script>alert(1)</script> \x1b[31m"


def systems():  # type: ignore[no-untyped-def]
    return [
        candidate("pki", rank=2, years=1.0, start_by=D(2027, 6, 30), name="Root CA"),
        candidate("pay", rank=1, years=0.5, depends_on=("pki",), vendor=None,
                  start_by=D(2028, 1, 1), uses=(ECDH_P256, UNKNOWN), name=HOSTILE),
    ]  # fmt: skip


def render(renderable: object, width: int = 100) -> str:
    console = Console(file=io.StringIO(), width=width, color_system=None, legacy_windows=False)
    console.print(renderable)
    return console.file.getvalue()  # type: ignore[attr-defined]


def run(fmt: str, **kwargs: object):  # type: ignore[no-untyped-def]
    return run_plan(
        systems(),
        as_of=D(2027, 2, 15),
        policies=select_policies(["nist-ir-8547", "cnsa2"]),
        capacity=Capacity(concurrent=1),
        output_format=fmt,  # type: ignore[arg-type]
        **kwargs,  # type: ignore[arg-type]
    )


def test_json_items_carry_the_fields_the_issue_names() -> None:
    text, svg = run("json")
    assert svg is None
    data = json.loads(text)
    items = {item["id"]: item for item in data["items"]}
    assert set(items) == {"pki", "pay"}
    for item in items.values():
        for key in ("id", "planned_start", "planned_finish", "deadlines", "meets_deadlines",
                    "meets_start_by"):  # fmt: skip
            assert key in item
        for deadline in item["deadlines"]:
            assert {"policy", "date", "kind", "source"} <= set(deadline)
    assert items["pki"]["planned_start"] == "2027-04-01"
    assert items["pki"]["deadlines"][0] == {
        "policy": "nist-ir-8547",
        "milestone": "signature-112-deprecated",
        "kind": "deprecated",
        "date": "2030-12-31",
        "source": "NIST IR 8547 ipd (2024), Table 2: 112-bit signatures deprecated after 2030",
        "note": None,
        "requires": "stop-using",
        "source_status": "draft",
        "checkpoint": False,
        "met": True,
        "slack_days": 1005,
    }
    pay = items["pay"]
    # No vendor readiness given: the documented default 'unknown' (+4 quarters) applies.
    assert (pay["vendor_readiness"], pay["vendor_readiness_assumed"]) == ("unknown", True)
    assert pay["planned_start"] == "2028-04-01"
    # Unassessed use and missing CNSA 2.0 category: stated, so meets_deadlines is undetermined.
    assert pay["meets_deadlines"] is None
    assert any("FrobCipher" in reason for reason in pay["undetermined"])
    assert any("policy_category" in reason for reason in pay["undetermined"])
    assert pay["name"] == HOSTILE
    assert data["critical_path"] == ["pki", "pay"]


def test_markdown_section_escapes_input_text_and_links_the_chart() -> None:
    text, svg = run("markdown", chart_name="timeline.svg")
    assert svg is not None and svg.lstrip().startswith("<?xml")
    assert "![Migration timeline](timeline.svg)" in text
    assert "<script>" not in text and "\x1b" not in text
    assert md_escape(HOSTILE) in text
    row = next(line for line in text.splitlines() if line.startswith("| pay"))
    assert row.count(" | ") == 9  # the pipe in the name did not add a column
    assert "no deadline could be determined" in text


def test_md_escape() -> None:
    assert md_escape("a|b") == "a\\|b"
    assert md_escape("*x* _y_ [l](u)") == "\\*x\\* \\_y\\_ \\[l\\](u)"
    assert md_escape("<b>&") == "&lt;b&gt;&amp;"
    assert md_escape("one\ntwo\x07") == "one two\\\\x07"


def test_terminal_view_shows_input_literally() -> None:
    renderable, svg = run("table", period="quarter")
    assert svg is None
    out = render(renderable, width=250)  # wide enough that the name is not folded
    assert "[bold]red[/bold]" in out  # markup shown, not applied
    assert "\x1b" not in out and "\\x1b" in out
    assert " 2027-Q2  pki" in out and " 2028-Q2  pay" in out
    assert "pay misses start-by 2028-01-01" in out


def test_terminal_view_by_year_exact() -> None:
    plan_systems = [candidate("pki", rank=1, years=1.0, start_by=D(2027, 6, 30), name="Root CA")]
    renderable, _ = run_plan(
        plan_systems,
        as_of=D(2027, 2, 15),
        policies=select_policies(["nist-ir-8547"]),
        capacity=Capacity(concurrent=1),
    )
    # 2027-Q2..2028-Q1 migrating: years 2027 and 2028 active; start-by in 2027 (S over the
    # bar); earliest deadline 2030-12-31 (D); the axis runs to the 2035 deadline.
    lines = [
        (
            "Migration plan from 2027-04-01 (made 2027-02-15); capacity 1 migration in parallel; "
            "policies "
        ),
        "nist-ir-8547 (draft)",
        " " * 100,
        " Period  System        Rank  Window           Start by    Earliest deadline   Slack (d)  Status     ",
        " " + "─" * 98 + " ",
        " 2027    pki              1  2027-Q2–2028-Q1  2027-06-30  2030-12-31               1005  on time    ",
        "         Root CA" + " " * 42 + "deprecated" + " " * 32,
        # NIST IR 8547 is an initial public draft: labelled as such.
        " " * 58 + "(nist-ir-8547" + " " * 29,
        " " * 58 + "(draft))" + " " * 34,
        " " * 100,
        " " * 22,
        " System   2027 … 2035 ",
        " " + "─" * 20 + " ",
        " pki      S█·D·····   ",
        " " * 22,
        (
            "Timeline: 1 character = 1 year; █ migrating, S start-by, D earliest deadline; bold id: "
            "critical path"
        ),
        "Critical path: pki",
    ]
    assert render(renderable) == "\n".join(lines) + "\n"


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        (None, Capacity()),
        ("3", Capacity(concurrent=3)),
        ("40pw", Capacity(person_weeks_per_quarter=40.0)),
        ("2, 26PW", Capacity(concurrent=2, person_weeks_per_quarter=26.0)),
    ],
)
def test_parse_capacity(text: str | None, expected: Capacity) -> None:
    assert parse_capacity(text) == expected


@pytest.mark.parametrize("text", ["three", "0", "-5pw"])
def test_parse_capacity_refuses_nonsense(text: str) -> None:
    with pytest.raises(UsageError):
        parse_capacity(text)


def test_command_refuses_a_cycle_and_bad_values() -> None:
    cyclic = [candidate("a", depends_on=("b",)), candidate("b", depends_on=("a",))]
    with pytest.raises(PlanError, match="dependency cycle: a -> b -> a"):
        run_plan(cyclic, as_of=D(2027, 1, 1), policies=select_policies([]))
    with pytest.raises(PlanError, match="unknown policy_category 'toaster'"):
        run_plan([candidate("a", category="toaster")], as_of=D(2027, 1, 1), policies=())
    with pytest.raises(UsageError):
        run_plan([candidate("a")], as_of=D(2027, 1, 1), policies=(), output_format="pdf")  # type: ignore[arg-type]
